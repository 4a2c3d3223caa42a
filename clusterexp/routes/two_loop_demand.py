"""Computed on demand: the alpha^2 coefficient of b_n of one species beyond the table.

`two_loop_table` holds the part of b_n^(2) beyond the chains of three loops for n <= its
SINGLE_CYCLES_CHECKED (= 10), from the quadrature engine. For larger n it is assembled here when asked:

* every two-loop cluster {p-cycle, q-cycle}, p + q = n: its part beyond the chains, the link squared in
  closed form (`link_integrals`, docs/perturbative.md 4k; milliseconds) plus the angle-area parts
  (derived, `angle_area.one_species_units`, section 4i);
* the n-cycle alone (`cycle_alone.k_cycle_orders`, by quadrature): the chains carry its Fock-squared ring
  part (1/2)[z^n] z ln^2(1 - z)/(1 - z); what it has beyond (zero to 1e-10 for n <= 16, docs/perturbative.md
  4h, a finding, not a derivation) is computed and added, so nothing rests on that pattern here.

The n-cycle alone runs at two rules; its bound is max(MARGIN x the change between the rules, its own
value, FLOOR), the clusters' bounds (`link_integrals.coefficient`) are added. Per unit mass about bosons
(about fermions the clusters' sign is (-1)^n, the caller's). The cost is the n-cycle's quadrature
(benchmarks/two_loop_demand.py: about one to nine minutes of one core for n = 11 .. 16 on a loaded machine), so the result is
cached for the process, each step shows on a terminal, and n > MAX_N is refused (NotSupportedYet, said
beside the coefficient's name).
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
    beyond the chains of three loops, computed now for SINGLE_CYCLES_CHECKED < n <= MAX_N."""
    if isinstance(n, bool) or not isinstance(n, int) or n <= SINGLE_CYCLES_CHECKED:
        raise ValueError(f"n must be an integer above {SINGLE_CYCLES_CHECKED} (below, the table has it); got {n!r}")
    if n > MAX_N:
        raise NotSupportedYet(f"b_{n} at second order (the n-cycle alone is computed on demand up to n = "
                              f"{MAX_N}, by quadrature, minutes each; docs/perturbative.md, sections 4h, 4k)")
    return _computed(n)


@lru_cache(maxsize=None)
def _computed(n: int) -> tuple[float, float]:
    clusters = [(p, n - p) for p in range((n + 1) // 2, n)]
    value, bound = 0.0, 0.0
    start = time.perf_counter()
    for p, q in clusters:                     # closed form (section 4k) plus the derived angle-area parts
        link, link_bound = link_integrals.coefficient(p, q)
        half = 2 if p == q else 1             # one species' units: the cluster's first order is halved
        value += link / half + float(sum(one_species_units(p, q)))
        bound += link_bound / half
    STEPS.append((f"the {len(clusters)} two-loop clusters of b_{n} in closed form", time.perf_counter() - start, value))
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
    value += runs[-1]
    bound += max(MARGIN * abs(runs[1] - runs[0]), abs(runs[-1]), FLOOR)
    return float(value), float(bound)
