"""Numbers for the three-body problems with static flux tubes (docs/tubes.md).

    estimate_two_tubes([(0.5, 0.5), (0.25, -0.25)], samples=20_000, seed=1)
        T2(gamma1, gamma2): the connected integral of one mobile loop and two tubes; a single tube
        species of flux gamma adds (n^2/2) T2(gamma, gamma) to b_1 (and (+-1)^(l+1) (n^2/2) T2 to b_l
        of a bose/fermi species); two tube species of coverages n1, n2 add n1 n2 T2(gamma1, gamma2).
    estimate_anyons_tube([(0.5, 0.25)], samples=20_000, seed=1)
        first order in the coverage n of b_2 (and a_2) of identical anyons, points (alpha, gamma);
    estimate_anyons_tube([(0.5, 0.25, 0.25)], kind="distinct", ...)
        first order of b_11 (and a_11) of two species with mutual parameter alpha_12, points
        (alpha_12, gamma_1, gamma_2) (each species its flux).
    estimate_separation([(0.3, -0.3)], separation=0.1, samples=...)
        K(d): the two-tube connected integral at a fixed tube separation (checks).

Units lambda = 1; beta P lambda^2 = sum b_n z^n; tubes Poisson-distributed, the mobile gas's ln Xi
averaged over their positions.  Runs: rounds of one batch per family; batch (family, r) draws from
SeedSequence(seed, spawn_key=(family id, r)), so a value depends on the seed, the budget and the
settings only; the error bar is the scatter of the batch means.  A time cap stops submitting rounds.
"""
from __future__ import annotations

import math
import time
from dataclasses import dataclass

import numpy as np

from . import exact
from .estimator import Estimate
from .runner import LoopsError, TargetNotReachable, rounds_for, worker_pool
from .tubes import DEPTH, PairTubeSamples, SeparationSamples, SwapTubeSamples, TwoTubeSamples

DEFAULT_SLICES = 16
DEFAULT_BATCH = 1000
FAMILY_IDS = {"two_tubes": 21, "pair_tube": 22, "swap_tube": 23, "separation": 24}
SUPPORTED = ("supported with static flux tubes: one mobile particle and two tubes (the coverage-squared "
             "term), two mobile particles and one tube (the first order in the coverage of b_2 of identical "
             "anyons or of b_11 of two braiding species), in the plane")


def flux_shift(gamma: float) -> float:
    """Z(gamma) - Z(0) of one particle around one tube: -s(1 - s)/2, s = gamma mod 1."""
    s = gamma - math.floor(gamma)
    return -0.5 * s * (1.0 - s)


@dataclass(frozen=True)
class TubePoint:
    """Estimates at one parameter point: `values` (name -> Estimate) and the exact references the
    checks compare with (`exact`, name -> float)."""

    params: tuple[float, ...]
    values: dict[str, Estimate]
    exact: dict[str, float]


@dataclass(frozen=True)
class TubeRun:
    problem: str
    points: tuple[TubePoint, ...]
    samples: int
    rounds: int
    seconds: float
    slices: int
    depth: int
    seed: int


def _make(family: str, rng, count: int, slices: int, depth: int, setting):
    """One batch of a family; `setting` is the family's fixed setting: the tube separation of
    `separation`, the mass ratio m_1/m_2 of `pair_tube` (None: equal masses)."""
    if family == "two_tubes":
        return TwoTubeSamples(rng, count, slices, depth)
    if family == "separation":
        return SeparationSamples(rng, count, slices, setting, depth)
    if family == "pair_tube":
        return PairTubeSamples(rng, count, slices, depth, 1.0 if setting is None else setting)
    return SwapTubeSamples(rng, count, slices, depth)


def _family_values(family: str, samples, point: tuple) -> dict[str, np.ndarray]:
    """pair_tube takes (alpha, flux felt by particle 1, by particle 2): an identical pair's point
    (alpha, gamma) gives both the same flux; every other family takes the point's first two entries."""
    if family == "pair_tube":
        return samples.values(point[0], point[1], point[-1])
    return samples.values(point[0], point[1])


def run_batch(family: str, index: int, count: int, slices: int, seed: int, points: list[tuple], depth: int,
              setting) -> dict[str, np.ndarray]:
    """Means of every quantity of one family's batch at every point: name -> array over points."""
    seq = np.random.SeedSequence(entropy=seed, spawn_key=(FAMILY_IDS[family], index))
    samples = _make(family, np.random.default_rng(seq), count, slices, depth, setting)
    rows = [_family_values(family, samples, p) for p in points]
    return {name: np.array([r[name].mean() for r in rows]) for name in rows[0]}


def _run_task(task: tuple) -> dict[str, np.ndarray]:
    return run_batch(*task)


def _execute(families: list[str], count: int, slices: int, seed: int, points, depth, setting,
             max_rounds, time_cap, workers) -> tuple[dict, int, float]:
    """Rounds of batches (in a process pool when workers > 1) until the round or time cap.
    Returns (family -> name -> (rounds, points) array, rounds, seconds)."""
    start = time.perf_counter()
    done: dict = {}

    def task(f, r):
        return (f, r, count, slices, seed, points, depth, setting)

    def prefix() -> int:
        r = 0
        while all((f, r) in done for f in families):
            r += 1
        return r

    def may_submit(next_round: int) -> bool:
        if max_rounds is not None and next_round >= max_rounds:
            return False
        if time_cap is None:
            return True
        elapsed = time.perf_counter() - start
        have = prefix()
        return elapsed + (elapsed / have * workers if have else 0.0) <= time_cap   # one step: `workers` rounds

    # Rounds go out in steps of `workers` rounds (every family's batch of them at once); the caps are
    # checked between steps, so a step never outlives the time cap by more than its own length.
    pool = None
    if workers > 1:
        pool = worker_pool(workers)
    try:
        next_round = 0
        while may_submit(next_round):
            last = next_round + workers if max_rounds is None else min(next_round + workers, max_rounds)
            tasks = [task(f, r) for r in range(next_round, last) for f in families]
            results = pool.map(_run_task, tasks) if pool else map(_run_task, tasks)
            for t, result in zip(tasks, results):
                done[(t[0], t[1])] = result
            next_round = last
    finally:
        if pool is not None:
            pool.shutdown(cancel_futures=True)
    rounds = prefix()
    if rounds < 2:
        raise LoopsError(f"the run finished {rounds} round(s); at least 2 are needed for an error bar (one "
                         f"round is {count * len(families)} samples): raise the time cap or the sample budget")
    table = {f: {name: np.array([done[(f, r)][name] for r in range(rounds)]) for name in done[(f, 0)]}
             for f in families}
    return table, rounds, time.perf_counter() - start


def _combine(table: dict, rounds: int, k: int, terms: dict) -> Estimate:
    """sum of coef * mean over `terms` {(family, name): coef} at point k, with the error from the
    scatter of the per-round combination within each family (families are independent)."""
    value, var = 0.0, 0.0
    for family in {f for f, _ in terms}:
        series = sum(coef * table[f][name][:, k] for (f, name), coef in terms.items() if f == family)
        value += float(series.mean())
        var += float(series.var(ddof=1)) / rounds
    return Estimate(value, math.sqrt(var))


def _check_settings(points, samples, time_cap, seed, slices, depth, workers, width: int) -> list[tuple]:
    if samples is None and time_cap is None:
        raise LoopsError("give a budget: samples and/or time_cap (seconds)")
    if not isinstance(seed, int) or seed < 0:
        raise LoopsError(f"seed must be a non-negative integer, got {seed!r}")
    if not isinstance(slices, int) or slices < 2:
        raise LoopsError(f"slices must be an integer >= 2, got {slices!r}")
    if not isinstance(depth, int) or not 0 <= depth <= 12:
        raise LoopsError(f"depth (refinement halvings) must be an integer in [0, 12], got {depth!r}")
    if not isinstance(workers, int) or workers < 1:
        raise LoopsError(f"workers must be a positive integer, got {workers!r}")
    if time_cap is not None and not time_cap > 0:
        raise LoopsError("time_cap must be positive (seconds)")
    out = []
    for p in points:
        p = tuple(p)
        if len(p) != width or not all(isinstance(v, (int, float)) and math.isfinite(v) for v in p):
            raise LoopsError(f"each point is {width} real numbers, got {p!r}; " + SUPPORTED)
        out.append(tuple(float(v) for v in p))
    if not out:
        raise LoopsError("no parameter point given")
    return out


def _finish(problem, points, table, rounds, seconds, per_round, slices, depth, seed, target_error, rows):
    out = tuple(TubePoint(p, values, ref) for p, (values, ref) in zip(points, rows))
    if target_error is not None:
        worst = max(e.error for pt in out for name, e in pt.values.items() if name == "target")
        if worst > target_error:
            need = rounds * (worst / target_error) ** 2
            raise TargetNotReachable(
                f"target error {target_error:g} not reached: {worst:.3g} after {rounds * per_round} samples "
                f"({seconds:.1f} s); it would need about {need * per_round:.3g} samples, about "
                f"{seconds / rounds * need:.3g} s", seconds / rounds * need, need * per_round)
    return TubeRun(problem, out, rounds * per_round, rounds, seconds, slices, depth, seed)


def estimate_two_tubes(points, *, samples: int | None = None, time_cap: float | None = None,
                       target_error: float | None = None, seed: int = 0, slices: int = DEFAULT_SLICES,
                       depth: int = DEPTH, batch: int = DEFAULT_BATCH, workers: int = 1) -> TubeRun:
    """T2(gamma1, gamma2) at each point (gamma1, gamma2), one set of loops for all points.

    values: `connected` (T2; also `target`), `b1_coverage2` (T2/2: the n^2 coefficient of b_1 for one
    tube species when gamma1 = gamma2), `single_1`, `single_2` (one-tube integrals); exact: the
    single-tube values -s(1 - s)/2 (Comtet, Georgelin, Ouvry 1989) and T2 = 0 where a flux is an integer.
    target_error: the error bar T2 must reach at every point (raises TargetNotReachable otherwise).
    """
    pts = _check_settings(points, samples, time_cap, seed, slices, depth, workers, 2)
    max_rounds = None if samples is None else max(2, rounds_for(int(samples), batch))
    table, rounds, seconds = _execute(["two_tubes"], batch, slices, seed, pts, depth, None, max_rounds,
                                      time_cap, workers)
    rows = []
    for k, (g1, g2) in enumerate(pts):
        t2 = _combine(table, rounds, k, {("two_tubes", "connected"): 1.0})
        values = {"connected": t2, "target": t2, "b1_coverage2": Estimate(t2.value / 2, t2.error / 2),
                  "single_1": _combine(table, rounds, k, {("two_tubes", "single_1"): 1.0}),
                  "single_2": _combine(table, rounds, k, {("two_tubes", "single_2"): 1.0})}
        ref = {"single_1": flux_shift(g1), "single_2": flux_shift(g2)}
        if g1 == math.floor(g1) or g2 == math.floor(g2):
            ref["connected"] = 0.0
        rows.append((values, ref))
    return _finish("two_tubes", pts, table, rounds, seconds, batch, slices, depth, seed, target_error, rows)


def estimate_separation(points, separation: complex, *, samples: int, seed: int = 0,
                        slices: int = DEFAULT_SLICES, depth: int = DEPTH, batch: int = DEFAULT_BATCH,
                        workers: int = 1) -> TubeRun:
    """K(d) = int d^2c E[Re (Phi_1 - 1)(Phi_2 - 1)] for two tubes a fixed vector d apart (points
    (gamma1, gamma2)).  At d = 0 the two tubes are one of flux gamma1 + gamma2, so exactly
    K(0) = f(gamma1) + f(gamma2) - f(gamma1 + gamma2) with f(g) = s(1 - s)/2, s = g mod 1."""
    pts = _check_settings(points, samples, None, seed, slices, depth, workers, 2)
    table, rounds, seconds = _execute(["separation"], batch, slices, seed, pts, depth, complex(separation),
                                      max(2, rounds_for(int(samples), batch)), None, workers)
    rows = []
    for k, (g1, g2) in enumerate(pts):
        value = _combine(table, rounds, k, {("separation", "connected"): 1.0})
        ref = {"connected": flux_shift(g1 + g2) - flux_shift(g1) - flux_shift(g2)} if separation == 0 else {}
        rows.append(({"connected": value}, ref))
    return _finish("separation", pts, table, rounds, seconds, batch, slices, depth, seed, None, rows)


def estimate_anyons_tube(points, kind: str = "identical", *, samples: int | None = None,
                         time_cap: float | None = None, target_error: float | None = None, seed: int = 0,
                         slices: int = DEFAULT_SLICES, depth: int = DEPTH, batch: int = DEFAULT_BATCH,
                         workers: int = 1, mass_ratio: float = 1.0) -> TubeRun:
    """First order in the tube coverage n of the two-particle coefficients, one set of loops for all points.

    kind="identical", points (alpha, gamma): values `b2_coverage1` (also `target`), `a2_coverage1`
    (= -b2_coverage1 - 2 f b_2(alpha), f = -flux_shift), the tube-free `b2_no_tube` and the one-tube
    `single` (checks); exact: b_2(alpha) (Arovas, Schrieffer, Wilczek, Zee 1985), -s(1-s)/2, and the
    bose/fermi first order -+s(1-s)/4 where alpha is 0 or 1 mod 2.
    kind="distinct", points (alpha_12, gamma_1, gamma_2): `b11_coverage1`, `a11_coverage1`, `b11_no_tube`;
    `mass_ratio` = m_1/m_2 (lambda and the coverage per lambda^2 of particle 2): b11_coverage1 is then the
    piece B_braid_tube, which depends on the ratio alone; exact: b_11 = -((m_1 + m_2)/(2 m_2)) s(1 - s)
    (physics.md R3) and loop 1's one-tube integral (m_2/m_1)(-s(1 - s)/2); a11_coverage1 with m_ref = m_2.
    """
    if kind not in ("identical", "distinct"):
        raise LoopsError(f"unknown kind {kind!r}: 'identical' (b_2 of one species) or 'distinct' (b_11); " + SUPPORTED)
    if not (isinstance(mass_ratio, (int, float)) and math.isfinite(mass_ratio) and mass_ratio > 0):
        raise LoopsError(f"mass_ratio must be a positive number, got {mass_ratio!r}")
    if kind == "identical" and mass_ratio != 1.0:
        raise LoopsError("identical particles have one mass: mass_ratio is for kind='distinct'")
    width = 2 if kind == "identical" else 3
    pts = _check_settings(points, samples, time_cap, seed, slices, depth, workers, width)
    families = ["pair_tube", "swap_tube"] if kind == "identical" else ["pair_tube"]
    max_rounds = None if samples is None else max(2, rounds_for(int(samples), batch * len(families)))
    ratio = float(mass_ratio)
    table, rounds, seconds = _execute(families, batch, slices, seed, pts, depth, None if ratio == 1.0 else ratio,
                                      max_rounds, time_cap, workers)
    rows = []
    for k, p in enumerate(pts):
        single = _combine(table, rounds, k, {("pair_tube", "single"): 1.0})
        if kind == "identical":
            alpha, gamma = p
            b1 = _combine(table, rounds, k, {("pair_tube", "pair_tube"): 0.5, ("swap_tube", "swap_tube"): 0.25})
            b0 = _combine(table, rounds, k, {("pair_tube", "pair"): 0.5, ("swap_tube", "swap"): 0.25})
            b2 = exact.b2_identical(alpha)
            a1 = Estimate(-b1.value + 2.0 * flux_shift(gamma) * b2, b1.error)
            values = {"b2_coverage1": b1, "target": b1, "a2_coverage1": a1, "b2_no_tube": b0, "single": single}
            ref = {"b2_no_tube": b2, "single": flux_shift(gamma)}
            if alpha == math.floor(alpha):
                sign = 1.0 if int(math.floor(alpha)) % 2 == 0 else -1.0
                ref["b2_coverage1"] = sign * flux_shift(gamma) / 2.0
                ref["a2_coverage1"] = 0.0
        else:
            a12, g1, g2 = p
            b1 = _combine(table, rounds, k, {("pair_tube", "pair_tube"): 1.0})
            b0 = _combine(table, rounds, k, {("pair_tube", "pair"): 1.0})
            b11 = exact.b11_mutual(a12) * (1.0 + ratio) / 2.0
            # a_11 = -b_11/(b_10 b_01), b_10 = ratio + n F_1, b_01 = 1 + n F_2: its n term
            a1 = Estimate((-b1.value + (flux_shift(g1) / ratio + flux_shift(g2)) * b11) / ratio, b1.error / ratio)
            values = {"b11_coverage1": b1, "target": b1, "a11_coverage1": a1, "b11_no_tube": b0, "single": single}
            ref = {"b11_no_tube": b11, "single": flux_shift(g1) / ratio}
            if a12 == math.floor(a12):
                ref["b11_coverage1"] = 0.0
        rows.append((values, ref))
    per_round = batch * len(families)
    return _finish("anyons_tube_" + kind, pts, table, rounds, seconds, per_round, slices, depth, seed,
                   target_error, rows)


def flux_parts(kind: str, base: float, h: float, rounds: int, *, seed: int = 0, slices: int = DEFAULT_SLICES,
               batch: int = DEFAULT_BATCH) -> tuple[Estimate, Estimate]:
    """The parts odd and even in the flux of the first order in the coverage at the points (base + h,
    +-h): kind "identical" (b_2 of anyons, parameter alpha) or "distinct" (b_11, parameter alpha_12, both
    species feeling the flux), equal masses. Both signs are evaluated on the same loops and each part's
    bar is the scatter of its per-batch values, far below the two values' bars for the odd part (checks
    of the small-flux Taylor coefficients, docs/tubes.md)."""
    if kind not in ("identical", "distinct"):
        raise LoopsError(f"unknown kind {kind!r}: 'identical' or 'distinct'")
    if kind == "identical":
        points = [(base + h, h), (base + h, -h)]
        weights = {"pair_tube": 0.5, "swap_tube": 0.25}     # b_2's weights (docs/tubes.md (ii))
    else:
        points = [(base + h, h, h), (base + h, -h, -h)]
        weights = {"pair_tube": 1.0}
    odd, even = [], []
    for r in range(rounds):
        b = sum(w * run_batch(f, r, batch, slices, seed, points, DEPTH, None)[f] for f, w in weights.items())
        odd.append((b[0] - b[1]) / 2)
        even.append((b[0] + b[1]) / 2)
    return tuple(Estimate(float(np.mean(x)), float(np.std(x, ddof=1) / math.sqrt(rounds))) for x in (odd, even))


def limit_at_zero(steps, values, errors) -> Estimate:
    """The value at h = 0 of the polynomial through (h_k, value_k) (Lagrange; with three steps the
    remainder c + a h + b h^2 of a Taylor coefficient read off at finite h), its bar sum |L_k| error_k
    (conservative: no credit for correlations)."""
    weights = []
    for k, hk in enumerate(steps):
        w = 1.0
        for m, hm in enumerate(steps):
            if m != k:
                w *= (0.0 - hm) / (hk - hm)
        weights.append(w)
    return Estimate(sum(w * v for w, v in zip(weights, values)), sum(abs(w) * e for w, e in zip(weights, errors)))
