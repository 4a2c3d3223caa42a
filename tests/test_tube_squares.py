"""The coverage-squared parts of anyonic and braiding coefficients among flux tubes (`tubes ... to order 2`;
routes/tube_perturbative.py with tubes=2, docs/tubes.md (iii), "The coverage-squared part").

Outside references: the small-flux two-tube law T2 = |g1||g2|/4 - g1 g2/12 of docs/tubes.md (i), derived
there from the loops' winding areas and Levy's area law, not from the perturbative route, with the
bose/fermi weight of an l-cycle, (+-1)^(l+1) n^2 T2 m_ref/(2 m) (docs/tubes.md, the l-cycle of duration
l beta); the exact statement that species which do not braid have no mixed coefficient (the Hamiltonian
separates); and the exact ideal-gas b_2 at the bose and fermi points.
"""
import json

import pytest
import sympy

import clusterexp
from clusterexp.errors import NotSupportedYet
from clusterexp.routes.tube_perturbative import FLUX as f
from clusterexp.routes.tube_perturbative import tube_coefficients

T2_SMALL_FLUX = sympy.Rational(1, 4) - sympy.Rational(1, 12)   # docs/tubes.md (i), g1 = g2 = f


@pytest.mark.parametrize("cycle", [2, 3, 4, 5])
@pytest.mark.parametrize("about", ["boson", "fermion"])
@pytest.mark.parametrize("mass", [1, 2, sympy.Rational(1, 3)])
def test_anyon_coverage_square_is_the_ideal_two_tube_law(cycle, about, mass):
    """Through second order the coverage-squared part of b_l of anyons is the l-cycle's two-tube term of
    the ideal gas, (+-1)^(l+1) T2 m_ref/(2 m) with T2 = f^2/6: no exchange term (two tubes and two or more
    mobile loops need three links; the l-cycle's own exchange angle with two links is third order), and
    annealed and quenched agree at this order (docs/tubes.md (iii))."""
    sign = 1 if about == "boson" or cycle % 2 else -1
    assert tube_coefficients("anyon", about, (mass, 1), 2, cycle, tubes=2) == \
        {f ** 2: sign * T2_SMALL_FLUX / (2 * sympy.Rational(mass))}
    assert tube_coefficients("anyon", about, (mass, 1), 1, cycle, tubes=2) == {}


@pytest.mark.parametrize("cycle", [(1, 1), (2, 1), (1, 2), (2, 2), (3, 1)])
@pytest.mark.parametrize("about", ["boson", "fermion", ("fermion", "boson")])
@pytest.mark.parametrize("masses", [(1, 1), (2, 1), (1, 3)])
def test_braid_coverage_square_vanishes_through_second_order(cycle, about, masses):
    """Two braiding species and two tubes: at least four loops, connected by at least three links, so
    nothing through second order (the heavy species' own 2-cycle, which the route sees at finite mass,
    drops out in the static limit)."""
    assert tube_coefficients("braid", about, masses, 2, cycle, tubes=2) == {}


def test_bad_tube_counts_are_refused():
    with pytest.raises(ValueError, match="tubes must be 1 or 2"):
        tube_coefficients("two_tubes", tubes=2)
    with pytest.raises(ValueError, match="tubes must be 1 or 2"):
        tube_coefficients("anyon", tubes=3)


ANYONS = """dimension 2
parameter alpha real
parameter f real
parameter n nonnegative
species A exchange alpha mass {mass}
species R bose
reference R
tubes flux f coverage n{order}
clusters pairphase
derive cluster up to 3
derive virial up to 3
expand alpha, f about {point}, 0 to 2 from above
"""


def _series(document, kind, index):
    (entry,) = [c for c in document["coefficients"] if c["kind"] == kind and tuple(c["index"]) == index]
    return entry


@pytest.mark.parametrize("point, sign", [(0, 1), (1, -1)])
def test_expand_to_order_two_prints_the_coverage_squares(cli, tmp_path, point, sign):
    """b[2] and b[3] of anyons of mass 2 (m_ref = 1) among tubes to order 2, about bosons and fermions:
    the n^2 f^2 coefficient is (+-1)^(l+1) (f^2/6)/(2 * 2) = +-1/24 (the ideal two-tube law), and no
    coverage-squared coefficient stays named; b[1] has T2/(2 * 2) n^2 = f^2 n^2/24 as well."""
    path = tmp_path / "gas.in"
    path.write_text(ANYONS.format(mass=2, order=" to order 2", point=point))
    result = cli("run", str(path), "--format", "json", "--no-files")
    assert result.returncode == 0, result.stderr
    document = json.loads(result.stdout)
    alpha, fx, n = sympy.symbols("alpha f n", real=True)
    for index, weight in (((1, 0), 1), ((2, 0), sign), ((3, 0), 1)):
        text = _series(document, "cluster", index)["series"][0]["value"]
        poly = sympy.expand(sympy.sympify(text.split(" + O(")[0], locals={"alpha": alpha, "f": fx, "n": n}))
        assert poly.coeff(n, 2) == weight * fx ** 2 / 24, (index, text)
        assert "O(n**3)" in text, text
    values = [s["value"] for c in document["coefficients"] for s in c.get("series") or ()]
    assert values and not any("_n_2" in v for v in values), "a coverage-squared coefficient left named"
    b2 = _series(document, "cluster", (2, 0))["value"]
    assert "B_anyon_two_tubes_A*n**2" in b2 and "O(n**3)" in b2


def _value(derivation, index):
    (entry,) = [c for c in derivation.coefficients if c.kind == "cluster" and tuple(c.index) == index]
    return str(entry.value)


def test_default_keeps_anyons_at_first_order_and_to_order_one_cuts_bosons():
    """Without `to order 2` anyonic results stop at O(n^2) as before (no four-body piece named); `to order
    1` cuts bose/fermi species there too (their T_two_tubes term left out)."""
    text = _value(clusterexp.derive(ANYONS.format(mass=1, order="", point=0)), (2, 0))
    assert "B_anyon_two_tubes" not in text and "O(n**2)" in text
    bosons = clusterexp.derive("dimension 2 parameter f real parameter n nonnegative species A bose "
                               "tubes flux f coverage n to order 1 clusters pairphase derive cluster up to 2")
    text = _value(bosons, (2,))
    assert "T_two_tubes" not in text and "O(n**2)" in text


def test_braid_square_in_b11_and_zero_second_order(cli, tmp_path):
    """b[1,1] of two braiding species among tubes to order 2 holds n^2 B_braid_two_tubes_A_B; about (nu,
    f) = (0, 0+) its n^2 part vanishes through second order, so does that of b[2,1]."""
    path = tmp_path / "gas.in"
    path.write_text("""dimension 2
parameter nu real
parameter f real
parameter n nonnegative
species A bose
species B bose mass 2
mutual A B = nu
tubes flux f coverage n to order 2
clusters pairphase
derive cluster up to 3
expand nu, f about 0, 0 to 2 from above
""")
    result = cli("run", str(path), "--format", "json", "--no-files")
    assert result.returncode == 0, result.stderr
    document = json.loads(result.stdout)
    assert "B_braid_two_tubes_A_B*n**2" in _series(document, "cluster", (1, 1))["value"]
    nu, fx, n = sympy.symbols("nu f n", real=True)
    for index in ((1, 1), (2, 1), (1, 2)):
        text = _series(document, "cluster", index)["series"][0]["value"]
        poly = sympy.expand(sympy.sympify(text.split(" + O(")[0], locals={"nu": nu, "f": fx, "n": n}))
        assert poly.coeff(n, 2) == 0, (index, text)


@pytest.mark.parametrize("exchange, value", [("0", "T_two_tubes/4"), ("1", "-T_two_tubes/4")])
def test_at_the_bose_and_fermi_points_the_square_is_the_ideal_two_cycle(exchange, value):
    """At an integer exchange parameter the anyons' b_2 is the ideal gas's, whose 2-cycle gains
    (+-1) n^2 T2 m_ref/(2 m): with m = 2 m_ref the piece is +-T_two_tubes/4 exactly."""
    from clusterexp.routes.tube_pieces import anyon_tube_symbol, exact_tube_values
    system = clusterexp.derive(ANYONS.format(mass=2, order=" to order 2", point=0)).system
    alpha = next(p.symbol for p in system.parameters if p.name == "alpha")
    piece = anyon_tube_symbol("A", 2)
    known = exact_tube_values(system, {piece}, {alpha: sympy.Integer(exchange)})
    assert known[piece][0] == sympy.sympify(value, locals={"T_two_tubes": sympy.Symbol("T_two_tubes", real=True)})


@pytest.mark.parametrize("order, error", [(3, NotSupportedYet), (0, NotSupportedYet)])
def test_order_beyond_two_is_refused_at_its_number(order, error):
    with pytest.raises(error) as caught:
        clusterexp.derive(f"dimension 2 parameter n species A bose\ntubes flux 1/2 coverage n to order {order} "
                          "clusters pairphase")
    assert "three tubes and more are not derived" in str(caught.value)
    assert str(caught.value.span).endswith("2:36")


def test_cli_refusal_of_the_order_has_a_caret_and_exit_code_2(cli):
    result = cli("run", "-e", "dimension 2 parameter n species A bose tubes flux 1/2 coverage n to order 5 "
                 "clusters pairphase derive virial up to 2")
    assert result.returncode == 2, result.stderr
    assert "to order 5" in result.stderr and "^" in result.stderr and "Traceback" not in result.stderr


def test_sampling_a_square_piece_is_not_supported_yet():
    """The loop estimator has no family for two mobile particles and two tubes: refused at the
    coefficient, saying what to do; b[1] of the anyons (one particle: T_two_tubes) is sampled."""
    base = ("dimension 2\nparameter n\nspecies A exchange 1/2\ntubes flux 1/3 coverage n to order 2\n"
            "clusters pairphase\n")
    with pytest.raises(NotSupportedYet, match="does not sample yet") as caught:
        clusterexp.derive(base + "sample b[2] with 4000 loops")
    assert str(caught.value.span).endswith("6:8")
    derivation = clusterexp.derive(base + "derive cluster up to 2\nsample b[1] seed 3 with 4000 loops")
    assert derivation.system.tubes.order == 2


def test_evaluate_away_from_exact_points_says_the_pieces_are_not_sampled_with_order_two(cli):
    """`evaluate` of b[2] of anyons at a generic point with `to order 2`: refused at the statement, saying
    that the pieces are not sampled in this setting (instead of proposing a `sample` that is refused)."""
    result = cli("run", "-e", ANYONS.format(mass=1, order=" to order 2", point=0).replace(
        "expand alpha, f about 0, 0 to 2 from above", "evaluate b[2,0] at alpha = 1/2, f = 1/3, n = 1/10"))
    assert result.returncode == 2, result.stderr
    assert "does not sample the pieces of b[2] of anyons" in result.stderr and "^" in result.stderr
    assert "Traceback" not in result.stderr
