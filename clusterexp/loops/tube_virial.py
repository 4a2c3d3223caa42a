"""Cluster and virial coefficients of one mobile species among Poisson flux tubes, exact in the named
tube pieces, with honest O(coverage^k) terms; sampled pieces substituted with propagated errors.

    coefficients = tube_coefficients("bose", flux=Rational(1, 2), order=4)
    coefficients.virial[(2,)]        # -1/4 - n^2 (T2 - 1/64)/4   (+ O(n^3))
    compose(coefficients.virial[(2,)], {TWO_TUBES: Estimate(0.0178, 2e-4)}, {COVERAGE: 0.1})

Pieces (docs/tubes.md, symbols of our own naming):
  COVERAGE   n, tubes per lambda^2 of the mobile species;
  TWO_TUBES  T2 = E[Re X_1 X_2], the connected integral of one loop of duration beta and two tubes
             (`tube_estimates.estimate_two_tubes`); b_l of a bose (fermi) species gains
             (+-1)^(l+1) (n^2/2) T2 for every l (a loop of duration l beta has l^2 T2);
  ANYON_TUBE B = the coefficient of n in b_2 of identical anyons (`estimate_anyons_tube`).
Known exactly: the one-tube term F = -s(1 - s)/2, s = flux mod 1 (Comtet, Georgelin, Ouvry 1989),
in b_l as (+-1)^(l+1) (n/l) F.  Bose/fermi: b_l through n^2, so the results carry O(n^3).  Anyons:
b_1 through n^2 but b_2 only through n (its n^2 term is a four-body piece: two mobile particles and two
tubes), and b_l, l >= 3, are many-body pieces; so anyonic results stop at |n| = 2 and carry O(n^2).
"""
from __future__ import annotations

import math
from dataclasses import dataclass

import sympy

from ..exact.virial import cluster_to_virial
from ..errors import NotSupportedYet
from .estimator import Estimate

COVERAGE = sympy.Symbol("n_tubes", nonnegative=True)
TWO_TUBES = sympy.Symbol("T_two_tubes", real=True)
ANYON_TUBE = sympy.Symbol("B_anyon_tube", real=True)


def _exact(value, what: str) -> sympy.Rational:
    if isinstance(value, float) or not sympy.sympify(value).is_Rational:
        raise ValueError(f"{what} must be an exact rational number (sympy.Rational or int), got {value!r}: "
                         "the derivation stays exact; floats enter only through `compose`")
    return sympy.Rational(value)


def one_tube(flux) -> sympy.Expr:
    """-s(1 - s)/2 with s = flux mod 1 (exact for a rational flux)."""
    s = _exact(flux, "the flux") % 1
    return -s * (1 - s) / 2


@dataclass(frozen=True)
class TubeCoefficients:
    clusters: dict            # (l,) -> b_l, polynomial in COVERAGE and the pieces
    virial: dict              # (l,) -> a_l, truncated
    truncation: dict          # {COVERAGE: k}: every value is exact below n^k, O(n^k) beyond


def tube_coefficients(statistics, flux, order: int) -> TubeCoefficients:
    """b_l and a_l (l <= order) of one mobile species among tubes of the given (rational) flux.

    statistics: "bose", "fermi" or an exchange parameter alpha (a rational number; 0 and 1 mod 2 are
    bose and fermi).  Anyons are supported through order 2 only (see the module docstring).
    """
    f = one_tube(flux)
    n = COVERAGE
    if statistics not in ("bose", "fermi"):
        statistics = _exact(statistics, "the exchange parameter")
    if statistics in ("bose", "fermi") or statistics % 2 in (0, 1):
        fermi = statistics == "fermi" or (statistics != "bose" and statistics % 2 == 1)
        b = {(l,): (-1 if fermi and l % 2 == 0 else 1) * (sympy.Rational(1, l * l) + n * f / l + n ** 2 * TWO_TUBES / 2)
             for l in range(1, order + 1)}
        truncation = {n: 3}
    else:
        if order > 2:
            raise NotSupportedYet(f"anyons among flux tubes to order {order}: b_l with l >= 3 are many-body "
                                  "pieces with tubes and are not derived; supported: order 2 (b_1 exact, b_2 to "
                                  "first order in the coverage with the sampled piece B_anyon_tube)")
        a = statistics % 2
        b = {(1,): 1 + n * f, (2,): sympy.Rational(1, 4) - a + a ** 2 / 2 + n * ANYON_TUBE}
        b = {k: v for k, v in b.items() if k[0] <= order}
        truncation = {n: 2}
    result = cluster_to_virial(b, order, 1, truncation=truncation)
    virial = {k: sympy.expand(result.virial[k]) for k in b}
    return TubeCoefficients(b, virial, truncation)


def compose(expression, estimates: dict, values: dict) -> Estimate:
    """Value of an exact expression with sampled pieces: the other symbols take `values`, the pieces their
    estimates; error = sqrt(sum (d expression / d piece)^2 error^2), first order (exact for the
    expressions above, which are linear in each piece)."""
    expr = sympy.sympify(expression).subs(values)
    point = {s: e.value for s, e in estimates.items()}
    value = float(expr.subs(point))
    variance = sum(float(sympy.diff(expr, s).subs(point)) ** 2 * e.error ** 2 for s, e in estimates.items())
    return Estimate(value, math.sqrt(variance))
