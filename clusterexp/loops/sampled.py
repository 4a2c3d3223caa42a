"""Running `sample` statements: Monte Carlo b's fed into the exact composition, with error bars.

The derivation stays exact: a sampled cluster coefficient keeps its symbol (b_3, b_2_1) in every
derived expression. Numbers appear only here, at the end: at each point the declared parameters are
substituted exactly, the symbol is replaced by the estimate, and the error bar is propagated to first
order, error(c) = sqrt(sum_k (dc/db_k)^2 error(b_k)^2) (exact for third-order coefficients, which are
linear in the one third-order b they contain; docs/loops.md).

Each sampled b of a statement is one estimator run over every point of the statement (a scan reuses
the same loops, docs/loops.md); its seed is derived from the statement's seed and the multi-index, so
different coefficients (and different statements with the same seed) use independent random numbers,
and `sample b[..] ... with N loops seed S` alone reproduces a run exactly.
"""
from __future__ import annotations

import math
from typing import Callable

import numpy as np
import sympy

from ..errors import InputError
from ..model import Sampling, System
from ..naming import bracket_label, cluster_symbol
from .estimator import DEFAULT_UNIT, scan_third_order
from .request import estimator_kind, grid_points, statistics_of
from .runner import LoopsError, TargetNotReachable
from .sampled_records import (SampledCluster, SampledNumbers, SampledPoint, SampledRun,  # noqa: F401 (re-exported)
                              SampledStatement, SampledValue, label as _label)

WORKERS = 2


def run_seed(seed: int, index: tuple[int, ...]) -> int:
    """The estimator seed of one sampled b: a hash of (seed, multi-index) through numpy's SeedSequence."""
    return int(np.random.SeedSequence([seed, *index]).generate_state(1, dtype=np.uint64)[0] >> 1)


def run_samplings(system: System, exact: Callable[[str, tuple], sympy.Expr]) -> SampledNumbers:
    """Run every `sample` statement; `exact(kind, index)` gives the derived exact coefficient."""
    return SampledNumbers(tuple(_statement(system, s, exact) for s in system.samplings))


def _mass_ratio(system: System, index) -> float:
    _, pair, _ = estimator_kind(index)
    return float(sympy.nsimplify(system.species[pair].mass / system.reference_mass))


def _statement(system: System, sampling: Sampling, exact) -> SampledStatement:
    if system.tubes is not None:   # the named tube pieces (loops/tube_sampling.py)
        from .tube_sampling import tube_statement
        return tube_statement(system, sampling, exact, grid_points(sampling))
    points = grid_points(sampling)
    names = [s.name for s in _ordered_symbols(sampling)]
    b_indices = list(dict.fromkeys(index for _, index, _ in sampling.coefficients))
    exprs = {(kind, index): sympy.sympify(exact(kind, index)) for kind, index, _ in sampling.coefficients}
    estimates: dict[tuple, list[tuple[float, float]]] = {}
    bounds: dict[tuple, list[float]] = {}
    runs = []
    for index in b_indices:
        values, run = _run(system, sampling, index, points, exprs, len(b_indices))
        estimates[index] = [(v, e) for v, e, _ in values]
        bounds[index] = [b for _, _, b in values]
        runs.append(run)
    out_points = []
    for k, point in enumerate(points):
        row = []
        for kind, index, _ in sampling.coefficients:
            expr = exprs[(kind, index)]
            at = {cluster_symbol(n): estimates[n][k] for n in b_indices}
            value, error = propagate(expr, point, at)
            bound = propagated_bound(expr, point, at, {cluster_symbol(n): bounds[n][k] for n in b_indices})
            row.append(SampledValue(_label(kind, index), kind, index, value, error, slice_bound=bound))
        shown = tuple((name, point[next(s for s in point if s.name == name)]) for name in names)
        out_points.append(SampledPoint(shown, tuple(row)))
    clusters = tuple(SampledCluster(n, tuple(point.items()), *estimates[n][k], slice_bound=bounds[n][k])
                     for n in b_indices for k, point in enumerate(points))
    return SampledStatement(sampling, tuple(runs), tuple(out_points), clusters)


def _ordered_symbols(sampling: Sampling) -> list[sympy.Symbol]:
    """Scanned parameters first (in grid order), then the fixed ones."""
    return [s for s, _ in sampling.axes] + [s for s, _ in sampling.fixed]


def propagate(expr: sympy.Expr, point: dict, estimates: dict) -> tuple[float, float]:
    """Value and first-order error of a derived coefficient at one point."""
    at_point = expr.xreplace(point)
    value = at_point.xreplace({s: sympy.Float(v, 17) for s, (v, _) in estimates.items()})
    if value.free_symbols:
        raise InputError(f"cannot evaluate {expr}: it still depends on "
                         f"{', '.join(sorted(s.name for s in value.free_symbols))}")
    variance = sum((_slope(at_point, symbol, estimates) * error) ** 2 for symbol, (_, error) in estimates.items())
    return float(value), math.sqrt(variance)


def _slope(at_point: sympy.Expr, symbol: sympy.Symbol, estimates: dict) -> float:
    """dc/db at the estimates (exact for third-order coefficients, linear in their third-order b)."""
    return float(sympy.diff(at_point, symbol).xreplace({s: sympy.Float(v, 17) for s, (v, _) in estimates.items()}))


def propagated_bound(expr: sympy.Expr, point: dict, estimates: dict, bounds: dict) -> float | None:
    """The slice-discretisation bound of a derived coefficient: sum_k |dc/db_k| bound_k (exact for the
    third-order coefficients, linear in their one third-order b); None when a b's bound is not assessed."""
    at_point = expr.xreplace(point)
    total = 0.0
    for symbol, bound in bounds.items():
        if symbol not in at_point.free_symbols:
            continue
        if bound is None:
            return None
        total += abs(_slope(at_point, symbol, estimates)) * bound
    return total


def _run(system: System, sampling: Sampling, index, points, exprs, runs: int):
    """One estimator scan for the b of `index` over every point: [(value, error, slice bound)] per point,
    in the reference species' units (b scales with m/m_ref), and the run's record."""
    kind, _, _ = estimator_kind(index)
    statistics = statistics_of(system.species, system.mutual, index)
    params = []
    for point in points:
        alpha = float(statistics["alpha"].xreplace(point))
        params.append((alpha,) if kind == "identical" else (alpha, float(statistics["alpha_12"].xreplace(point))))
    distinct = list(dict.fromkeys(params))
    ratio = _mass_ratio(system, index)
    target = _cluster_target(sampling, index, points, exprs, ratio)
    seed = run_seed(sampling.seed, index)
    cap = None if sampling.time_cap is None else sampling.time_cap / runs
    label = f"b{bracket_label(index)}"
    try:
        if kind == "identical":
            results = scan_third_order(kind, [p[0] for p in distinct], samples=sampling.loops, time_cap=cap,
                                       target_error=target, seed=seed, workers=WORKERS, batch=DEFAULT_UNIT,
                                       slices=sampling.slices)
        else:
            results = scan_third_order(kind, grid=distinct, samples=sampling.loops, time_cap=cap, target_error=target,
                                       seed=seed, workers=WORKERS, batch=DEFAULT_UNIT, slices=sampling.slices)
    except TargetNotReachable as error:
        wanted = ", ".join(_label(k, n) for k, n, _ in sampling.coefficients if n == index)
        budget = (f"the time cap of {cap:g} s" + (f" (its share of `within {sampling.time_cap:g} seconds`)"
                                                  if runs > 1 else "")) if cap else f"{sampling.loops} loops"
        raise InputError(f"target {sampling.target:g} on {wanted} is out of reach with {budget}: at the measured "
                         f"variance the run would need about {error.needed_samples:.3g} loops, about "
                         f"{error.needed_seconds:.3g} s on {WORKERS} cores; raise `within` (or `with ... loops`) "
                         "or the target (the error falls like 1/sqrt(time))",
                         sampling.clause_span("target")) from None
    except LoopsError as error:
        raise InputError(f"{label}: {error}", sampling.clause_span("within" if cap else "loops")) from None
    by_params = {p: (ratio * r.cluster.value, ratio * r.cluster.error,
                     None if r.slice_bound is None else ratio * r.slice_bound)
                 for p, r in zip(distinct, results)}
    first = results[0]
    record = SampledRun(index, label, kind, sampling.seed, seed, first.samples, first.rounds, first.seconds,
                        first.slices)
    return [by_params[p] for p in params], record


def _cluster_target(sampling: Sampling, index, points, exprs, ratio: float) -> float | None:
    """The error bar the estimator must reach on its own b so that every listed coefficient that
    contains this b meets the statement's target at every point."""
    if sampling.target is None:
        return None
    symbol = cluster_symbol(index)
    steepest = 0.0
    for (kind, n), expr in exprs.items():
        if n != index:
            continue
        for point in points:
            slope = sympy.diff(expr.xreplace(point), symbol)
            if slope.free_symbols:   # not linear in the sampled b: take it as given at the ideal value
                slope = slope.xreplace({s: 0 for s in slope.free_symbols})
            steepest = max(steepest, abs(float(slope)))
    return sampling.target / (max(steepest, 1e-300) * ratio)
