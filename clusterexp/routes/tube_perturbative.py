"""Taylor coefficients of the tube pieces (`routes.tube_pieces`) about zero flux and the boson/fermion
point, through second order, from the perturbative route's mixtures (`routes.perturbative`) with one
species made infinitely heavy (docs/tubes.md, "Small fluxes from an infinitely heavy species").

A static tube of flux f is a particle of a species H of infinite mass whose mutual parameter with every
mobile species is f. Poisson tubes of coverage n are an ideal classical gas of H at fugacity z_H with
n = z_H b_{e_H}, b_{e_H} = M/m_ref. The mixture's ln Xi averages the mobile gas over the tube positions
with the weight the tubes' own partition function gives (an annealed average), the tube pieces are
defined with ln Xi of the mobile gas averaged at fixed tubes (quenched). With Delta(R) = ln Xi(R) -
ln Xi(no tube) for one tube at R, the annealed one-tube term is n int d^2R (e^Delta - 1)/lambda^2, the
quenched one n int d^2R Delta/lambda^2. The one-tube shift of one loop, s = -|f|(1 - |f|)/2, does not
depend on R (the particle's start point is integrated), so at z_i z_j the two differ by s_i s_j
(1/2 s^2 at z_i^2), which is f^2/4 (f^2/8) at second order:

  B_anyon_tube_A(e, f) = lim_{M -> inf} b_{2 e_A + e_H}/b_{e_H} - s^2/2,
  B_braid_tube_A_B(d, f) = lim b_{e_A + e_B + e_H}/b_{e_H} - s^2,
  T_two_tubes(f) = lim 2 (m_A/m_ref) b_{e_A + 2 e_H}/b_{e_H}^2          (one mobile particle: no difference).

The mixture coefficients are exact rational functions of M; the limit is read off by exact polynomial
interpolation in 1/M through `NODES` (every term of the route is a polynomial of low degree in 1/M) and
checked at one more node, so a term that is not such a polynomial stops with an internal error instead
of a wrong limit.
"""
from __future__ import annotations

import functools

import sympy

from .perturbative import Species, chain_part, taylor_coefficients

FLUX = sympy.Symbol("f", real=True)          # deviation of the flux from an integer
EXCHANGE = sympy.Symbol("e", real=True)      # deviation of the anyons' exchange parameter from its point
EXCHANGE_B = sympy.Symbol("e_B", real=True)  # the same for the second species of a braid pair
MUTUAL = sympy.Symbol("d", real=True)        # deviation of the braid pair's mutual parameter from an integer
KINDS = ("two_tubes", "anyon", "braid")
NODES = (1, 2, 3, 4, 5, 6)                   # heavy masses M (units of m_ref); the last one checks the rest


def _heavy(kind: str, M: int, about, masses, cycle, tubes: int = 1) -> dict:
    """{monomial: Rational} of the mixture coefficient with a heavy species of mass M, divided by the
    tube factor (b_{e_H}, or b_{e_H}^2 / (2 m_A) for two tubes), the heavy links renamed to the flux.
    tubes = 2 (kinds "anyon" and "braid"): the coefficient with two heavy particles over b_{e_H}^2, the
    coverage-squared part (`_two_tubes`).
    kind "anyon": b_{l e_A + e_H}, l = cycle; for l >= 3 its d^2 coefficient is the chains (derived)
    plus the cluster of the l-cycle with the heavy loop, which the route computes for equal masses only
    but whose static limit is exact: one loop of duration l beta around a point flux, the l-cycle's
    (+-1)^(l+1)/l times the d^2 part 1/2 of the one-tube shift s (docs/tubes.md (iii))."""
    g = [sympy.Symbol(f"g_{k}", real=True) for k in range(2)]
    if tubes == 2:
        return _two_tubes(kind, M, about, masses, cycle, g)
    if kind == "two_tubes":
        species = [Species(None, masses[0]), Species(None, M)]
        terms = taylor_coefficients(species, {(0, 1): g[0]}, (1, 2), ("boson", "boson"), 2)
        scale = sympy.Rational(2) * sympy.Rational(masses[0]) / M ** 2
    elif kind == "anyon":
        species = [Species(EXCHANGE, masses[0]), Species(None, M)]
        terms = taylor_coefficients(species, {(0, 1): g[0]}, (cycle, 1), (about, "boson"), 2, unknown="name",
                                    closed_forms=False)
        if isinstance(terms[g[0] ** 2], sympy.Symbol):   # not derived at finite M (or the closed form of
            # section 4k, not a polynomial in 1/M): its static limit
            sign = 1 if about == "boson" else (-1) ** (cycle + 1)
            chains = chain_part(species, {(0, 1): g[0]}, (cycle, 1), (about, "boson"))[g[0] ** 2]
            terms[g[0] ** 2] = chains + sign * sympy.Rational(M, 2 * cycle)
        scale = sympy.Rational(1, M)
    else:   # cycle = (a, b): b_{a e_A + b e_B + e_H}; about = (point of A, point of B)
        a, b = cycle
        species = [Species(EXCHANGE if a >= 2 else None, masses[0]), Species(EXCHANGE_B if b >= 2 else None, masses[1]),
                   Species(None, M)]
        terms = taylor_coefficients(species, {(0, 1): MUTUAL, (0, 2): g[0], (1, 2): g[1]}, (a, b, 1),
                                    (*about, "boson"), 2)
        scale = sympy.Rational(1, M)
    total = sympy.expand(sum(scale * value * monomial for monomial, value in terms.items()))
    return sympy.expand(total.xreplace({g[0]: FLUX, g[1]: FLUX}))


def _two_tubes(kind: str, M: int, about, masses, cycle, g) -> dict:
    """The coverage-squared part at heavy mass M: b_{l e_A + 2 e_H} (kind "anyon", cycle = l, A of mass
    masses[0]) or b_{a e_A + b e_B + 2 e_H} (kind "braid") over b_{e_H}^2 = M^2 (docs/tubes.md (iii),
    "The coverage-squared part"). For the anyons at l >= 2 the route leaves the g^2 coefficient named at
    unequal masses: it is the chains (derived, any masses) plus the link squared of the cluster of A's
    l-cycle with the 2-cycle of the heavy species, which is homogeneous of degree one in the masses and
    tends to its heavy-cycle line M/(2l) (docs/perturbative.md 4j): over M^2 it vanishes in the limit, so
    the chains alone are kept here (the limit is then exact; at finite M this is not the mixture's
    coefficient)."""
    if kind == "anyon":
        species = [Species(EXCHANGE if cycle >= 2 else None, masses[0]), Species(None, M)]
        mutual, index, points = {(0, 1): g[0]}, (cycle, 2), (about, "boson")
    else:
        a, b = cycle
        species = [Species(EXCHANGE if a >= 2 else None, masses[0]),
                   Species(EXCHANGE_B if b >= 2 else None, masses[1]), Species(None, M)]
        mutual, index, points = {(0, 1): MUTUAL, (0, 2): g[0], (1, 2): g[1]}, (a, b, 2), (*about, "boson")
    terms = taylor_coefficients(species, mutual, index, points, 2, unknown="name", closed_forms=False)
    for monomial, value in list(terms.items()):
        if isinstance(value, sympy.Symbol):
            if monomial != g[0] ** 2 or kind != "anyon":
                raise RuntimeError(f"coverage-squared part: {monomial} not derived at finite M (internal error)")
            terms[monomial] = chain_part(species, mutual, index, points)[monomial]
    total = sympy.expand(sum(value * monomial for monomial, value in terms.items()) / M ** 2)
    return sympy.expand(total.xreplace({g[0]: FLUX, g[1]: FLUX}))


def _limit(values: list[sympy.Rational]) -> sympy.Rational:
    """The value at x = 0 of the polynomial through (1/M, value) at the nodes but the last, which must
    lie on it too (exact Lagrange interpolation)."""
    xs = [sympy.Rational(1, M) for M in NODES]

    def through(points, x):
        out = sympy.Integer(0)
        for a, (xa, ya) in enumerate(points):
            weight = sympy.Integer(1)
            for b, (xb, _) in enumerate(points):
                if b != a:
                    weight *= (x - xb) / (xa - xb)
            out += ya * weight
        return out
    fit = list(zip(xs[:-1], values[:-1]))
    if through(fit, xs[-1]) != values[-1]:
        raise RuntimeError("static limit: a mixture coefficient is not a polynomial of low degree in 1/M "
                           "(internal error, docs/tubes.md)")
    return through(fit, sympy.Integer(0))


def tube_coefficients(kind: str, about="boson", masses=(1, 1), order: int = 2, cycle=None,
                      tubes: int = 1) -> dict:
    """{monomial: Rational} of the tube piece `kind` ("two_tubes", "anyon", "braid") through `order`
    (0, 1 or 2) in FLUX (the flux minus an integer), EXCHANGE (the anyons' exchange parameter minus
    their point `about`, "boson" or "fermion") and MUTUAL (the braid pair's mutual parameter minus an
    integer), |x| for the kinks; masses: the mobile species' masses (m_A, m_B) in units of m_ref (exact).
    For "anyon", `cycle` = l >= 2 (default 2) gives the coefficient of the coverage in b_l of the anyons
    (l = 2: the piece B_anyon_tube). For "braid", `cycle` = (a, b) (default (1, 1): the piece
    B_braid_tube) gives the coefficient of the coverage in b_{a e_A + b e_B}, and `about` is one point
    for both species or a pair (A's, B's). tubes = 2 (kinds "anyon" and "braid"): the coefficient of the
    coverage squared instead (two tubes; l = 2 is the piece B_anyon_two_tubes, (1, 1) B_braid_two_tubes),
    which depends on the masses in units of m_ref (masses[0] for the anyons). Monomials absent from the
    dict have coefficient 0."""
    if kind not in KINDS:
        raise ValueError(f"kind must be one of {KINDS}, got {kind!r}")
    if order not in (0, 1, 2):
        raise ValueError(f"order must be 0, 1 or 2, got {order!r}")
    if tubes not in (1, 2) or (tubes == 2 and kind == "two_tubes"):
        raise ValueError(f"tubes must be 1 or 2 (2 for the kinds 'anyon' and 'braid'), got {tubes!r}")
    if kind == "anyon":
        cycle = 2 if cycle is None else cycle
        if not isinstance(cycle, int) or cycle < 2:
            raise ValueError(f"cycle must be an integer >= 2 for kind 'anyon'; got {cycle!r}")
    elif kind == "braid":
        cycle = (1, 1) if cycle is None else tuple(cycle)
        if len(cycle) != 2 or not all(isinstance(k, int) and k >= 1 for k in cycle):
            raise ValueError(f"cycle must be a pair of integers >= 1 for kind 'braid'; got {cycle!r}")
        points = (about, about) if isinstance(about, str) else tuple(about)
        if len(points) != 2 or not set(points) <= {"boson", "fermion"}:
            raise ValueError(f"about must be 'boson', 'fermion' or a pair of them; got {about!r}")
        # one particle of a species has no exchange: its point does not matter
        about = tuple(p if k >= 2 else "boson" for p, k in zip(points, cycle))
    elif cycle is not None:
        raise ValueError(f"cycle is for the kinds 'anyon' and 'braid'; got {cycle!r}")
    masses = tuple(sympy.Rational(m) for m in masses)
    return dict(_coefficients(kind, about, masses, order, cycle, tubes))


@functools.lru_cache(maxsize=256)
def _coefficients(kind: str, about, masses: tuple, order: int, cycle, tubes: int = 1) -> tuple:
    """tube_coefficients as a tuple of items, computed once per process and argument set (six mixtures
    through the perturbative route each, 0.01-0.2 s; every expansion and truncated claim asks again)."""
    per_node = [sympy.Poly(_heavy(kind, M, about, masses, cycle, tubes), *sorted(
        {FLUX, EXCHANGE, EXCHANGE_B, MUTUAL, sympy.Abs(FLUX), sympy.Abs(EXCHANGE), sympy.Abs(EXCHANGE_B),
         sympy.Abs(MUTUAL)}, key=str))
        for M in NODES]
    monomials = sorted(set().union(*(p.monoms() for p in per_node)))
    gens = per_node[0].gens
    out = {}
    for powers in monomials:
        value = _limit([p.coeff_monomial(powers) for p in per_node])
        monomial = sympy.Mul(*(g ** k for g, k in zip(gens, powers)))
        degree = sum(powers)
        if value != 0 and degree <= order:
            out[monomial] = out.get(monomial, 0) + value
    if kind == "braid" and any(m.has(EXCHANGE, EXCHANGE_B) for m in out):
        raise RuntimeError("braid pieces: an exchange term at second order (docs/tubes.md (iii) says the "
                           "loops of a mixed cluster with a tube need three links for it; internal error)")
    if order >= 2 and tubes == 1:   # quenched, not annealed: minus (e^Delta - 1 - Delta) at z^l, through f^2
        # (two tubes: annealed and quenched differ from the third order on, docs/tubes.md (iii))
        out[FLUX ** 2] = out.get(FLUX ** 2, 0) - _quenched_correction(kind, about, cycle)
    return tuple((m, v) for m, v in out.items() if v != 0)



def _quenched_correction(kind: str, about, cycle) -> sympy.Rational:
    """The f^2 coefficient of the annealed-only part (e^Delta - 1 - Delta) of the one-tube term: Delta =
    sum_a z^a s_a does not depend on the tube's position, and s_a = (+-1)^(a+1) F/a, F = -|f|/2 + O(f^2),
    is the one-tube part of b_a of the ideal species (docs/tubes.md (iii)); at second order only products
    of two first-order s_a remain: (1/2) sum_{a+b=l} s_a s_b for anyons (l = 2: s_1^2/2 = f^2/8), s_a of
    A times s_b of B for b_{a e_A + b e_B} (a mixed multi-index has no first-order shift of its own; f^2/4
    for the braid piece), nothing for one mobile particle (two tubes)."""
    if kind == "braid":   # s_a of A times s_b of B
        (a, b), (pa, pb) = cycle, about
        sign = (1 if pa == "boson" else (-1) ** (a + 1)) * (1 if pb == "boson" else (-1) ** (b + 1))
        return sympy.Rational(sign, 4 * a * b)
    if kind == "two_tubes":
        return sympy.Integer(0)
    sign = 1 if about == "boson" else -1
    first = {a: -sympy.Rational(sign ** (a + 1), 2 * a) for a in range(1, cycle)}
    return sum((first[a] * first[cycle - a] for a in range(1, cycle)), sympy.Integer(0)) / 2
