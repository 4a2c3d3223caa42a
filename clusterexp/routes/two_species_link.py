"""Computed on demand, not closed: the link squared of the two-loop cluster of a mixture at unequal masses.

The package now takes this coefficient from its closed form (`link_integrals`,
docs/perturbative.md 4k); this module is kept as the independent quadrature check of that closed form
(tests) and for the benchmarks, and the package does not call it.

In b_n with a particles of species i and b of species j, the d_ij^2 coefficient is the chains of three
loops (exact, `perturbative._chain`) plus the link squared of the cluster {a-cycle X of species i,
b-cycle Y of species j} (docs/perturbative.md, sections 4f-4h and 4j). X is a Brownian loop of duration a
with per-component diffusion D_X = m_ref/m_i, Y one of duration b with D_Y = m_ref/m_j; the link curves
are X(s + a0) - Y(s + b0). The cluster's first order, -(m_i + m_j)/(2 m_ref a b) |d| (section 3), shared
by its a b link segments of contact -pi (D_X + D_Y) |d| each, fixes its normalisation
P = m_i m_j/(2 pi m_ref^2 a^2 b^2) (`angle_area.first_order_normalisation`), and the d^2 coefficient is
P times the engine's link squared (`two_loop_fast.link_squared`, numerical evaluation).

The mass dependence is not linear (section 4j): the coefficient is m_j g(m_i/m_j) (homogeneous of
degree one in the masses, the engine's integrals being homogeneous of degree one in (D_X, D_Y)), with
g(r) -> r/(2 b) for a heavy a-cycle (one static flux a d seen by the b-cycle, approached with a
logarithm) and g(r) -> 1/(2 a) per m_j for a heavy b-cycle, but g is neither of the two lines between.
So there is no table: each mass ratio is computed when asked, at two quadrature rules (the engine's
tolerances 1e-6 and 1e-7), with the error bound of benchmarks/two_loop_table.py (ten times the change
between the rules, never below FLOOR per unit of the larger mass), cached for the process. The cost
grows with the cluster (about 4 s for |n| = 4, up to 40 s for |n| = 6, up to about two minutes for
|n| = 8 on this machine; benchmarks/two_species_link.py), so it is offered for |n| <= MAX_PARTICLES.
Mass ratios up to MAX_RATIO use the two rules. Beyond, up to FAR_RATIO, two chords of the light loop's
link curves that run over the same two points in opposite directions coincide in the light loop's part on
the line x + y = 1, and only the heavy loop's small diffusion keeps them apart there: a near-singularity of
width about (m_light/m_heavy)^(1/2) in the middle of the rule's widest panels (section 4j). So FAR_RULES
are three rules graded toward that line as well (`two_loop_fast.square_rule`, `middle`), and the number is
given only where the three converge (each change at least CONVERGING times smaller than the one before),
with ten times the last change as the bound; where they do not, NotSupportedYet says so and the
coefficient keeps its name. A terminal shows which rule is running. The clusters with |n| <= 6 at ratios 1/100 .. 100
come from `two_species_table` instead (the same engine's values at Chebyshev points, interpolated, with
their own bound): no quadrature at all for a mixture's series through total order 6.
"""
from __future__ import annotations

from fractions import Fraction
from functools import lru_cache

from ..errors import NotSupportedYet
from ..progress import Progress
from . import two_loop_fast, two_species_table
from .angle_area import first_order_normalisation
from .link_integrals import exact_mass

MAX_PARTICLES = 10
MAX_RATIO = 100          # two rules up to here
FAR_RATIO = 10 ** 5      # three rules, and a number only where they converge, up to here
RULES = ((8, 8), (10, 12))             # (levels, nodes): two_loop_fast.RULES at the tolerances 1e-6 and 1e-7
FAR_RULES = ((8, 12, 8), (8, 16, 8), (8, 24, 8))    # (levels, nodes, middle): graded toward x + y = 1 too
FLOOR = 2e-6
MARGIN = 10
CONVERGING = 10
USE_TABLE = True         # |n| <= 6 at ratios 1/100 .. 100 from two_species_table (benchmarks turn it off)


def link_squared_coefficient(a: int, b: int, m_i, m_j) -> tuple[float, float]:
    """(value, error bound) of the d_ij^2 coefficient that the link of the cluster {a-cycle of species i,
    b-cycle of species j} adds to b_{a e_i + b e_j}, about bosons for both species (about fermions times
    (-1)^(a - 1) (-1)^(b - 1)), masses in units of m_ref; the chains of three loops are not included.
    Numerical evaluation (two quadrature rules, the three FAR_RULES beyond MAX_RATIO), cached per
    (a, b, m_i/m_j). At a + b = 3 this is section 4e's exact (m_i/2 + m_j/4)/m_ref for {2-cycle, loop}."""
    for value, name in ((a, "a"), (b, "b")):
        if isinstance(value, bool) or not isinstance(value, int) or value < 1:
            raise ValueError(f"{name} must be a positive integer cycle length, got {value!r}")
    m_i, m_j = exact_mass(m_i, "m_i"), exact_mass(m_j, "m_j")
    if a + b > MAX_PARTICLES:
        raise NotSupportedYet(f"the link squared of the {{{a}-cycle, {b}-cycle}} cluster at unequal masses for "
                              f"|n| = {a + b} > {MAX_PARTICLES} (computed on demand up to |n| = {MAX_PARTICLES}; "
                              "docs/perturbative.md, section 4j)")
    ratio = m_i / m_j
    if max(ratio, 1 / ratio) > FAR_RATIO:
        raise NotSupportedYet(f"the link squared at the mass ratio {ratio} (the quadrature is offered for ratios "
                              f"up to {FAR_RATIO}; docs/perturbative.md, section 4j)")
    if a < b:                                     # the engine's clusters are {p-cycle, q-cycle}, p >= q
        a, b, ratio = b, a, 1 / ratio
        m_j = m_i
    if USE_TABLE and two_species_table.covers(a, b, ratio):
        value, bound = two_species_table.coefficient(a, b, ratio)
        return float(m_j) * value, float(m_j) * bound
    value, bound = _at_ratio(a, b, ratio)
    if value is None:
        raise NotSupportedYet(f"the link squared of the {{{a}-cycle, {b}-cycle}} cluster at masses {ratio}:1 "
                              f"(the {a}-cycle's to the {b}-cycle's): {bound} (docs/perturbative.md, section 4j)")
    return float(m_j) * value, float(m_j) * bound


@lru_cache(maxsize=None)
def _at_ratio(a: int, b: int, ratio: Fraction) -> tuple:
    """(value, bound) per unit of m_j at m_i/m_j = ratio (a >= b), or (None, why) where the rules of a
    far mass ratio do not converge; cached for the process (refusals too); a terminal shows which rule is
    running (`progress.Progress`, on stderr and only on a terminal)."""
    norm = float(first_order_normalisation(a, b, ratio, 1, 1))
    rules = RULES if max(ratio, 1 / ratio) <= MAX_RATIO else FAR_RULES
    report = Progress()
    values = []
    try:
        for k, rule in enumerate(rules, 1):
            report.step(f"quadrature rule {k}/{len(rules)}, link^2 of {{{a}-cycle, {b}-cycle}}, masses {ratio}:1")
            _, _, link2 = two_loop_fast.link_squared(a, b, float(1 / ratio), 1.0, *rule)
            values.append(norm * link2)
    finally:
        report.done()
    return _judged(values, FLOOR * float(max(ratio, 1)))


def _judged(values: list, floor: float) -> tuple:
    """(value of the finest rule, bound) from the values of successively finer rules: the bound is MARGIN
    times the last change (never below floor); with three or more rules, each change must be at least
    CONVERGING times smaller than the one before, else (None, why)."""
    changes = [abs(y - x) for x, y in zip(values, values[1:])]
    for before, after in zip(changes, changes[1:]):
        if after > floor / MARGIN and CONVERGING * after > before:
            return None, (f"the quadrature rules do not converge there (changes {before:.1e}, then {after:.1e}; "
                          "the mass ratio is too far for them)")
    return float(values[-1]), float(max(MARGIN * changes[-1], floor))
