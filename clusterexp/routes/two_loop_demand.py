"""Computed, not derived: the n-cycle alone of one species beyond its ring part, the one part of the
alpha^2 coefficient of b_n (n >= 4) that is not in closed form.

The rest of b_n^(2) is exact (`perturbative._one_species_square`): the chains of three loops (with the
n-cycle's Fock-squared ring part (1/2)[z^n] z ln^2(1 - z)/(1 - z)) and every two-loop cluster {p-cycle,
q-cycle}, p + q = n, the link squared in closed form (`link_integrals`, docs/perturbative.md 4k) plus the
angle-area parts (`angle_area.one_species_units`, section 4i). What the n-cycle alone has beyond its ring
part is zero to 1e-10 for n <= 16 (docs/perturbative.md 4h): a finding, not a derivation, so the package
names it and shows this module's number beside the name (`cycle_rest`):

* n <= SINGLE_CYCLES_CHECKED (= 10): measured once at two rules, zero within CHECKED_BOUND;
* n <= MAX_N: computed when asked (`cycle_alone.k_cycle_orders`, by quadrature at two rules; its bound is
  max(MARGIN x the change between the rules, its own value, FLOOR)); about one to nine minutes of one
  core for n = 11 .. 16 on a loaded machine (benchmarks/two_loop_demand.py), so the result is cached for
  the process and each step shows on a terminal;
* n > MAX_N: refused (NotSupportedYet, said beside the name).

`beyond_on_demand` adds the clusters (as floats) for the benchmark that compares with the quadrature.
Per unit mass about bosons (about fermions the sign is (-1)^n, the caller's).
"""
from __future__ import annotations

import time
from fractions import Fraction
from functools import lru_cache

from ..errors import NotSupportedYet
from ..progress import Progress
from . import link_integrals
from .angle_area import one_species_units
from .cycle_alone import k_cycle_orders
from .two_loop_table import FLOOR, SINGLE_CYCLES_CHECKED

MAX_N = 16
CYCLE_RULES = ((8, 8), (10, 12))           # (levels, nodes) of the k-cycle alone at the same two tolerances
MARGIN = 10
# the k-cycles alone, k = 4 .. SINGLE_CYCLES_CHECKED, beyond their ring parts: at most 1e-13 at the rule
# (10, 12) and 1.4e-10 at (8, 8) (docs/perturbative.md 4h); ten times the largest change between the rules
CHECKED_BOUND = 2e-9
STEPS: list[tuple[str, float, float]] = []   # (step, seconds, value) of the computations run so far (benchmarks)


def ring_part(n: int) -> Fraction:
    """The Fock-squared ring part of the n-cycle alone, (1/2)[z^n] z ln^2(1 - z)/(1 - z), exactly:
    ln^2(1 - z) = sum_{m >= 2} (2 H_{m-1}/m) z^m, so the coefficient is sum_{m=2}^{n-1} H_{m-1}/m."""
    harmonic, total = Fraction(0), Fraction(0)
    for m in range(2, n):
        harmonic += Fraction(1, m - 1)
        total += harmonic / m
    return total


def beyond_on_demand(n: int) -> tuple[float, float]:
    """(value, error bound) of the alpha^2 coefficient of b_n (one species of unit mass, about bosons)
    beyond the chains of three loops, computed now for SINGLE_CYCLES_CHECKED < n <= MAX_N: the clusters in
    closed form plus `cycle_rest` (the package itself keeps them apart: the clusters exact, the rest
    named with its number)."""
    if isinstance(n, bool) or not isinstance(n, int) or n <= SINGLE_CYCLES_CHECKED:
        raise ValueError(f"n must be an integer above {SINGLE_CYCLES_CHECKED} (below, the table has it); got {n!r}")
    rest, rest_bound = cycle_rest(n)
    clusters = [(p, n - p) for p in range((n + 1) // 2, n)]
    value, bound = 0.0, 0.0
    start = time.perf_counter()
    for p, q in clusters:                     # closed form (section 4k) plus the derived angle-area parts
        link, link_bound = link_integrals.coefficient(p, q)
        half = 2 if p == q else 1             # one species' units: the cluster's first order is halved
        value += link / half + float(sum(one_species_units(p, q)))
        bound += link_bound / half
    STEPS.append((f"the {len(clusters)} two-loop clusters of b_{n} in closed form", time.perf_counter() - start, value))
    return value + rest, bound + rest_bound


def cycle_rest(n: int) -> tuple[float, float]:
    """(value, error bound) of the n-cycle alone beyond its ring part (per unit mass, about bosons; its
    sign about fermions is (-1)^n, the caller's), n >= 4: zero within CHECKED_BOUND for n <= SINGLE_CYCLES_CHECKED
    (measured at two rules, docs/perturbative.md 4h), computed by quadrature for n <= MAX_N (minutes,
    cached), NotSupportedYet beyond."""
    if isinstance(n, bool) or not isinstance(n, int) or n < 4:
        raise ValueError(f"n must be an integer >= 4, got {n!r}")
    if n <= SINGLE_CYCLES_CHECKED:
        return 0.0, CHECKED_BOUND
    if n > MAX_N:
        raise NotSupportedYet(f"b_{n} at second order (the n-cycle alone is computed on demand up to n = "
                              f"{MAX_N}, by quadrature, minutes each; docs/perturbative.md, sections 4h, 4k)")
    return _computed(n)


@lru_cache(maxsize=None)
def _computed(n: int) -> tuple[float, float]:
    report = Progress()
    runs = []
    try:
        for k, rule in enumerate(CYCLE_RULES, 1):
            report.step(f"quadrature b_{n} at second order, the {n}-cycle alone, rule {k}/{len(CYCLE_RULES)}")
            start = time.perf_counter()
            runs.append(k_cycle_orders(n, *rule)[1] - float(ring_part(n)))
            STEPS.append((f"{n}-cycle alone beyond its ring part, rule {rule}", time.perf_counter() - start, runs[-1]))
    finally:
        report.done()
    return float(runs[-1]), float(max(MARGIN * abs(runs[1] - runs[0]), abs(runs[-1]), FLOOR))
