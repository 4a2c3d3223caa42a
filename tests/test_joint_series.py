"""Joint series in several statistics parameters (`expand alpha, nu about 0, 0 to 2`): the perturbative
expansion of every printed coefficient about a boson / fermion / uncoupled point through a total degree.

The expected values are hand calculations (written out in each docstring) from the exact two-body
coefficients (route R3; Arovas, Schrieffer, Wilczek, Zee 1985 for b_2) and the perturbative b_{2,1} of
docs/perturbative.md, sections 3 and 4c, which tests/test_perturbative.py checks against outside routes.
"""
from __future__ import annotations

import json

import pytest
import sympy

import clusterexp
from clusterexp.errors import InputError
from clusterexp.export import latex_document, to_json

alpha, nu = sympy.symbols("alpha nu", real=True)
BASE = ("dimension 2 parameter alpha in {arange} parameter nu in [0, 1/2] species A exchange alpha species B bose "
        "mutual A B = nu clusters pairphase order 3 ")


def _series(derivation, kind, index):
    (c,) = [c for c in derivation.coefficients if c.kind == kind and c.index == index]
    return derivation.series_of(c)


def _plain(expr):
    """The expression in plain real symbols (the declared parameters carry their range's assumptions)."""
    return expr.xreplace({s: sympy.Symbol(s.name, real=True) for s in expr.free_symbols})


def test_mixed_third_virial_coefficient_about_bosons():
    """a[2,1] = 2 a^2 n^2 - 2 a^2 n - 4 a n^2 + 4 a n - 2 b_21 + n^4 - 2 n^3 + 2 n^2 - n (exact composition,
    alpha in [0, 1]) with b_21 = -n/2 + 29 n^2/24 + 2 |a||n| - a n/3 + O(3): a[2,1] = 2 a n/3 - 5 n^2/12 + O(3).
    No first-order term: at first order only the second virial coefficients change (the mixed analogue
    of Dasnieres de Veigy & Ouvry 1992, derived in docs/perturbative.md section 3)."""
    d = clusterexp.derive(BASE.format(arange="[0, 1/2]") + "expand alpha, nu about 0 to 2")
    (piece,) = _series(d, "virial", (2, 1))
    assert sympy.expand(_plain(piece.polynomial) - (2 * alpha * nu / 3 - sympy.Rational(5, 12) * nu ** 2)) == 0
    assert not piece.unknowns and piece.known == 2
    assert [s for _, _, s in piece.variables] == ["above", "above"]
    (b21,) = _series(d, "cluster", (2, 1))
    assert sympy.expand(_plain(b21.polynomial) - (-nu / 2 + sympy.Rational(29, 24) * nu ** 2 + sympy.Rational(5, 3) * alpha * nu)) == 0
    (b11,) = _series(d, "cluster", (1, 1))     # exact: -nu(1 - nu), route R3
    assert sympy.expand(_plain(b11.polynomial) - (nu ** 2 - nu)) == 0
    # b_3 of species A through alpha^2 (docs/perturbative.md, 4d): 1/9 - alpha + 59/24 alpha^2, which with the
    # exact b_2 gives the published a_3 = 1/36 + alpha^2/12 (Myrheim & Olaussen 1993)
    (b3,) = _series(d, "cluster", (3, 0))
    assert not b3.unknowns
    assert sympy.expand(_plain(b3.polynomial) - (sympy.Rational(1, 9) - alpha + sympy.Rational(59, 24) * alpha ** 2)) == 0
    (a3,) = _series(d, "virial", (3, 0))
    assert sympy.expand(_plain(a3.polynomial) - (sympy.Rational(1, 36) + alpha ** 2 / 12)) == 0


def test_mixed_third_virial_coefficient_about_fermions():
    """Species A about fermions (alpha = 1 + e, range [1/2, 1], from below): the exact part of a[2,1]
    gives n + 0 e n + 0 n^2 through degree 2 and b_21 = n/2 - 7 n^2/24 + e n/6, so
    a[2,1] = 7 n^2/12 - e n/3 + O(3); printed in powers of (alpha - 1)."""
    d = clusterexp.derive(BASE.format(arange="[1/2, 1]") + "expand alpha, nu about 1, 0 to 2")
    (piece,) = _series(d, "virial", (2, 1))
    assert sympy.expand(_plain(piece.polynomial) - (sympy.Rational(7, 12) * nu ** 2 - (alpha - 1) * nu / 3)) == 0
    assert [s for _, _, s in piece.variables] == ["below", "above"]
    record = json.loads(to_json(d))
    (a21,) = [c for c in record["coefficients"] if c["index"] == [2, 1] and c["kind"] == "virial"]
    (series,) = a21["series"]
    assert series["value"].startswith("-nu*(alpha - 1)/3 + 7*nu**2/12 + O(")
    assert [j["side"] for j in series["joint"]] == ["below", "above"]
    assert r"\text{joint series through total degree }2" in latex_document(d)


@pytest.mark.parametrize("statement, message", [
    ("expand alpha, nu about 0 to 2 from both", "from both"),
    ("expand alpha, nu about 0, 0, 0 to 2", "one point for all or one per parameter"),
    ("expand alpha, alpha about 0 to 2", "listed twice"),
    ("expand alpha, mu about 0 to 2", "declared parameter"),
])
def test_bad_joint_requests_point_at_the_line(statement, message):
    with pytest.raises(InputError, match=message) as caught:
        clusterexp.derive(BASE.format(arange="[0, 1/2]") + statement)
    assert caught.value.span is not None


def test_a_kink_without_a_side_is_refused():
    """alpha declared on both sides of the boson point: b_2 has an |alpha| kink there, so the joint series
    needs a side."""
    d = clusterexp.derive(BASE.format(arange="[-1/2, 1/2]") + "expand alpha, nu about 0 to 2")
    with pytest.raises(InputError, match="not analytic at alpha = 0") as caught:
        _series(d, "cluster", (2, 0))
    assert caught.value.span is not None
    d = clusterexp.derive(BASE.format(arange="[-1/2, 1/2]") + "expand alpha, nu about 0 to 2 from below")
    (b2,) = _series(d, "cluster", (2, 0))      # 1/4 - |alpha| + alpha^2/2 below 0: 1/4 + alpha + alpha^2/2
    assert sympy.expand(_plain(b2.polynomial) - (sympy.Rational(1, 4) + alpha + alpha ** 2 / 2)) == 0


@pytest.mark.parametrize("arange, statement", [("[0, 1/2]", "expand alpha, nu about 0 to 2"),
                                               ("[1/2, 1]", "expand alpha, nu about 1, 0 to 2"),
                                               ("[-1/2, 1/2]", "expand alpha, nu about 0 to 2 from below")])
def test_ring_truncation_agrees_with_the_series_route(monkeypatch, arange, statement):
    """The joint Taylor polynomial is taken by ring arithmetic with a total-degree filter when the value is
    a polynomial; the general route (one sympy series in a common scale, each deviation signed by its
    side) must print the same, at the boson point, the fermion point and a kink approached from below."""
    from clusterexp import expansions
    from clusterexp.export import to_text
    text = BASE.format(arange=arange) + statement
    fast = to_text(clusterexp.derive(text))
    monkeypatch.setattr(expansions, "_polynomial_part", lambda *args: None)
    assert to_text(clusterexp.derive(text)) == fast


def test_a_given_truncated_piece_limits_the_total_degree():
    """b[2,1] given to O(nu^2) (its derived first order): the joint series stops at total degree 1, with the
    given O term's parameter in the total-degree remainder only."""
    d = clusterexp.derive(BASE.format(arange="[0, 1/2]").replace("clusters pairphase",
                                                                  "clusters pairphase { b[2,1] = -nu/2 + O(nu^2) }")
                          + "expand alpha, nu about 0 to 2")
    (piece,) = _series(d, "virial", (2, 1))
    assert piece.known == 1 and len(piece.remainder) == 1
    assert sympy.expand(_plain(piece.polynomial)) == 0        # a[2,1] has no first-order term
