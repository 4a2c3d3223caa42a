"""Computed on demand, not closed: the alpha^2 coefficient of b_n of one species beyond the table.

`two_loop_table` holds the part of b_n^(2) beyond the chains of three loops for n <= its
SINGLE_CYCLES_CHECKED (= 10), computed once by benchmarks/two_loop_table.py. For larger n the same
quantities are computed here when asked, with the same engines and the same error bound:

* every two-loop cluster {p-cycle, q-cycle}, p + q = n: its part beyond the chains (link squared plus
  the angle-area parts, `two_loop_fast.second_order`, normalised by the cluster's first order);
* the n-cycle alone (`cycle_alone.k_cycle_orders`): the chains carry its Fock-squared ring part
  (1/2)[z^n] z ln^2(1 - z)/(1 - z); what it has beyond (zero to 1e-13 for n <= 8, docs/perturbative.md 4h,
  a finding, not a derivation) is computed and added, so nothing rests on that pattern here.

Each at the engines' rules for the tolerances 1e-6 and 1e-7; the bound is max(MARGIN x the change
between the rules, FLOOR) per cluster, as for the table. Per unit mass about bosons (about fermions the
clusters' sign is (-1)^n, the caller's). The cost grows fast with n (benchmarks/two_loop_demand.py: six
minutes of one core for n = 9, twenty on a loaded machine for n = 10, when these were still computed here;
n = 11 twenty-one minutes with the other core running the test suite), so the result is
cached for the process, each step shows on a terminal, and n > MAX_N is refused (NotSupportedYet, said
beside the coefficient's name).
"""
from __future__ import annotations

import time
from fractions import Fraction
from functools import lru_cache

from ..errors import NotSupportedYet
from ..progress import Progress
from . import two_loop_fast
from .cycle_alone import k_cycle_orders
from .two_loop_table import FLOOR, SINGLE_CYCLES_CHECKED

MAX_N = 11
TOLERANCES = (1e-6, 1e-7)
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
        raise NotSupportedYet(f"b_{n} at second order (the two-loop clusters are computed on demand up to n = "
                              f"{MAX_N}, each n costing several times the one before; docs/perturbative.md, "
                              "section 4h)")
    return _computed(n)


@lru_cache(maxsize=None)
def _computed(n: int) -> tuple[float, float]:
    clusters = [(p, n - p) for p in range((n + 1) // 2, n)]
    report = Progress()
    value, bound = 0.0, 0.0
    try:
        for k, (p, q) in enumerate(clusters, 1):
            runs = []
            for tol in TOLERANCES:
                report.step(f"quadrature b_{n} at second order, cluster {{{p}-cycle, {q}-cycle}} "
                            f"({k}/{len(clusters) + 1}), rule {tol:g}")
                start = time.perf_counter()
                runs.append(two_loop_fast.second_order(p, q, tol)["beyond"])
                STEPS.append((f"{{{p},{q}}} tol={tol:g}", time.perf_counter() - start, runs[-1]))
            value += runs[-1]
            bound += max(MARGIN * abs(runs[1] - runs[0]), FLOOR)
        runs = []
        for rule in CYCLE_RULES:
            report.step(f"quadrature b_{n} at second order, the {n}-cycle alone ({len(clusters) + 1}/{len(clusters) + 1})")
            start = time.perf_counter()
            runs.append(k_cycle_orders(n, *rule)[1] - float(ring_part(n)))
            STEPS.append((f"{n}-cycle alone beyond its ring part, rule {rule}", time.perf_counter() - start, runs[-1]))
        value += runs[-1]
        bound += max(MARGIN * abs(runs[1] - runs[0]), abs(runs[-1]), FLOOR)
    finally:
        report.done()
    return float(value), float(bound)


def link_squared_on_demand(a: int, b: int) -> tuple[float, float]:
    """(value, error bound) of the link squared of the cluster {a-cycle, b-cycle} at equal masses, in one
    species' units as in `two_loop_table.LINK` (for two species the caller scales it), computed now for
    SINGLE_CYCLES_CHECKED < a + b <= MAX_N (the table has the smaller ones)."""
    n = a + b
    if n <= SINGLE_CYCLES_CHECKED:
        raise ValueError(f"a + b must be above {SINGLE_CYCLES_CHECKED} (below, the table has it); got {a} + {b}")
    if n > MAX_N:
        raise NotSupportedYet(f"the link squared of the {{{a}-cycle, {b}-cycle}} cluster for |n| = {n} (computed on "
                              f"demand up to |n| = {MAX_N}; docs/perturbative.md, section 4h)")
    return _link(max(a, b), min(a, b))


@lru_cache(maxsize=None)
def _link(p: int, q: int) -> tuple[float, float]:
    report = Progress()
    runs = []
    try:
        for tol in TOLERANCES:
            report.step(f"quadrature link^2 of {{{p}-cycle, {q}-cycle}}, rule {tol:g}")
            start = time.perf_counter()
            runs.append(two_loop_fast.second_order(p, q, tol)["link2"])
            STEPS.append((f"link^2 {{{p},{q}}} tol={tol:g}", time.perf_counter() - start, runs[-1]))
    finally:
        report.done()
    return float(runs[-1]), float(max(MARGIN * abs(runs[1] - runs[0]), FLOOR))
