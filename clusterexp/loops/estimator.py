"""Public API of the Brownian-loop (path-integral) Monte Carlo estimator of third-order coefficients.

    estimate_third_order(kind="identical", alpha=0.5, samples=200_000, seed=1)
    estimate_third_order(kind="pair_plus_one", alpha=0.0, alpha_12=0.5, time_cap=60)
    scan_third_order(kind="identical", alphas=[0.25, 0.5, 0.75], samples=..., seed=...)
    estimate_second_order(kind="identical", alpha=0.3, samples=...)   # validation of the sampler

Units lambda = 1; beta P lambda^2 = sum b_n z^n.  The derivation, normalisations and the error
analysis are in docs/loops.md.
"""
from __future__ import annotations

import dataclasses
import functools
import math
import sys
from dataclasses import dataclass, field

import numpy as np

from . import exact
from .distributed import cluster_pool, scheduler_address
from .runner import LoopsError, Reduction, RunPlan, TargetNotReachable, combined_error, execute, rounds_for

__all__ = ["Estimate", "ThirdOrderResult", "SecondOrderResult", "estimate_third_order", "scan_third_order",
           "estimate_second_order", "LoopsError", "TargetNotReachable", "KINDS", "DEFAULT_SLICES"]

KINDS = ("identical", "pair_plus_one")
DEFAULT_SLICES = 16
# Relative numbers of samples per family in one round.  Fixed (not adapted to the run) so that results
# depend only on the seed and the budget; chosen from a pilot of variance x cost per sample at
# alpha = 1/2 (docs/loops.md).
ALLOCATION = {
    "identical": {"cycle": 2, "exchange": 3, "triple": 7},
    "pair_plus_one": {"exchange": 2, "triple": 5},
    "symmetric": {"cycle": 1, "triple": 3},
    "second_identical": {"pair_loop": 2, "pair_swap": 1},
    "second_distinct": {"pair_loop": 1},
}
DEFAULT_UNIT = 200
SUPPORTED = ("supported: kind='identical' (b_3 of one species of anyons, exchange parameter alpha) and "
             "kind='pair_plus_one' (b_21: two identical anyons with exchange parameter alpha plus one particle "
             "of another species with mutual parameter alpha_12), in dimension 2, at order 3")


@dataclass(frozen=True)
class Estimate:
    value: float
    error: float

    def __str__(self) -> str:
        return f"{self.value:.6g} +- {self.error:.2g}"


@dataclass(frozen=True)
class ThirdOrderResult:
    """Third-order cluster and virial coefficients at one parameter point.

    cluster: b_3 (identical) or b_21 (pair_plus_one), the full coefficient.  Every disconnected and
    two-body term of Z_3 - Z_1 Z_2 + Z_1^3/3 cancels exactly before sampling, so all of it is connected;
    `three_body` is cluster minus its ideal-Bose value (1/9 for b_3, 0 for b_21), i.e. what the
    statistical phases add.  parts: the sampled families (cycle, exchange, triple).
    extrapolation_shift: value at the full slice number without the slice extrapolation minus the
    extrapolated value (the size of the discretisation correction; for any power law 1/slices^p, p >= 1,
    the error left after the extrapolation is at most twice this shift).  round_values: the cluster
    coefficient of each round (independent, equal-size), for correlated comparisons between points
    of one scan.
    virial: a_3 (identical) or a_21 (pair_plus_one) with the propagated error; the two-body inputs are
    exact (`two_body`).
    """

    kind: str
    alpha: float
    alpha_12: float | None
    name: str
    cluster: Estimate
    three_body: Estimate
    virial_name: str
    virial: Estimate
    two_body: dict[str, float]
    parts: dict[str, Estimate]
    extrapolation_shift: Estimate
    round_values: tuple[float, ...]
    samples: int
    samples_per_family: dict[str, int]
    rounds: int
    seconds: float
    slices: int
    seed: int
    extrapolated: bool = True   # the slice extrapolation was on (`extrapolate=`)
    family_shifts: dict[str, Estimate] = field(default_factory=dict)   # extrapolation_shift per family

    @property
    def slice_bound(self) -> float | None:
        """A bound on the discretisation error the slice extrapolation leaves in `cluster`, assuming
        each family's error is dominated by one power law C/slices^p with p >= 1 (the correlated slice
        study finds p near 2, docs/loops.md "Slicing bias"): what remains of a family is then at most twice
        its extrapolation shift.  The families' shifts are added in size (they must not cancel), and since
        they are sampled, two standard errors of their sum are added.  Not part of the statistical error
        bar.  None without the extrapolation: then the O(1/slices) error is not assessed."""
        if not self.extrapolated:
            return None
        shifts = self.family_shifts or {"all": self.extrapolation_shift}
        size = sum(abs(s.value) for s in shifts.values())
        noise = math.sqrt(sum(s.error ** 2 for s in shifts.values()))
        return 2.0 * (size + 2.0 * noise)

    @property
    def b3(self) -> Estimate:
        if self.kind != "identical":
            raise LoopsError("b3 is the identical-anyon coefficient; this result holds b_21 (use .cluster)")
        return self.cluster

    @property
    def a3(self) -> Estimate:
        if self.kind != "identical":
            raise LoopsError("a3 is the identical-anyon coefficient; this result holds a_21 (use .virial)")
        return self.virial

    @property
    def b21(self) -> Estimate:
        if self.kind != "pair_plus_one":
            raise LoopsError("b21 needs kind='pair_plus_one'")
        return self.cluster

    @property
    def a21(self) -> Estimate:
        if self.kind != "pair_plus_one":
            raise LoopsError("a21 needs kind='pair_plus_one'")
        return self.virial

    def __str__(self) -> str:
        where = f"alpha={self.alpha:g}" + ("" if self.alpha_12 is None else f", alpha_12={self.alpha_12:g}")
        return (f"{self.name}({where}) = {self.cluster}; {self.virial_name} = {self.virial} "
                f"[{self.samples} samples, {self.rounds} rounds, {self.slices} slices, {self.seconds:.1f} s]")


@dataclass(frozen=True)
class SecondOrderResult:
    """Sampled second-order coefficient (b_2 or b_11) next to its exact value: a check of the sampler."""

    kind: str
    alpha: float
    estimate: Estimate
    exact: float
    parts: dict[str, Estimate] = field(default_factory=dict)
    samples: int = 0


def _check_domain(kind, order, dimension, species, alpha, alpha_12) -> None:
    if dimension != 2:
        raise LoopsError(f"dimension {dimension!r} is not supported: winding phases exist only in the plane; "
                         + SUPPORTED)
    if order != 3:
        raise LoopsError(f"order {order!r} is not supported (only three-particle, third-order coefficients; "
                         f"use estimate_second_order for the two-body check); " + SUPPORTED)
    if species is not None and species not in (1, 2):
        raise LoopsError(f"{species!r} species are not supported (three or more species are not); " + SUPPORTED)
    if kind not in KINDS:
        raise LoopsError(f"unknown kind {kind!r}; " + SUPPORTED)
    if species is not None and species != (1 if kind == "identical" else 2):
        raise LoopsError(f"kind={kind!r} has {1 if kind == 'identical' else 2} species, not {species}; " + SUPPORTED)
    if kind == "identical" and alpha_12 is not None:
        raise LoopsError("alpha_12 belongs to kind='pair_plus_one'; identical anyons take alpha only")
    if kind == "pair_plus_one" and alpha_12 is None:
        raise LoopsError("kind='pair_plus_one' needs alpha_12 (the mutual parameter with the third particle)")


def _check_number(name: str, value) -> float:
    try:
        out = float(value)
    except (TypeError, ValueError):
        raise LoopsError(f"{name} must be a real number, got {value!r}") from None
    if not math.isfinite(out):
        raise LoopsError(f"{name} must be finite, got {value!r}")
    return out


SEQUENCES = ("random", "sobol")


def _plan(kind_key, kind, params, samples, time_cap, target_error, seed, workers, slices, batch, progress,
          label, extrapolate=True, allocation=None, scheduler=None, sequence=None, reduction=None) -> RunPlan:
    if samples is None and time_cap is None and target_error is None:
        raise LoopsError("give a budget: samples, time_cap (seconds) and/or target_error")
    if not isinstance(slices, int) or slices < 2:
        raise LoopsError(f"slices must be an integer >= 2, got {slices!r}")
    if extrapolate and slices % 2:
        raise LoopsError(f"slices must be even when extrapolating in the slice number, got {slices}")
    if not isinstance(workers, int) or workers < 1:
        raise LoopsError(f"workers must be a positive integer, got {workers!r}")
    if not isinstance(seed, int) or seed < 0:
        raise LoopsError(f"seed must be a non-negative integer, got {seed!r}")
    if time_cap is not None and not (_check_number("time_cap", time_cap) > 0):
        raise LoopsError("time_cap must be positive (seconds)")
    if target_error is not None and not (_check_number("target_error", target_error) > 0):
        raise LoopsError("target_error must be positive")
    alloc = ALLOCATION[kind_key]
    if allocation is not None:
        if set(allocation) != set(alloc) or not all(isinstance(k, int) and k > 0 for k in allocation.values()):
            raise LoopsError(f"allocation must give a positive integer for each of {sorted(alloc)}")
        alloc = dict(allocation)
    units = sum(alloc.values())
    if batch is None:
        batch = DEFAULT_UNIT
        if samples is not None:
            batch = int(min(DEFAULT_UNIT, max(10, samples // (units * 20))))
    reduction = Reduction() if reduction is None else reduction
    if not isinstance(reduction, Reduction):
        raise LoopsError(f"reduction must be a loops.Reduction, got {reduction!r}")
    if sequence is not None:
        reduction = dataclasses.replace(reduction, sequence=sequence)
    if reduction.sequence not in SEQUENCES:
        raise LoopsError(f"sequence must be one of {', '.join(SEQUENCES)}, got {reduction.sequence!r}")
    families = {f: k * batch for f, k in alloc.items()}
    if reduction.sequence == "sobol":
        # scrambled Sobol points keep their balance only in blocks of a power of two
        families = {f: 1 << max(1, round(math.log2(n))) for f, n in families.items()}
    address = scheduler_address(scheduler)
    pool = functools.partial(cluster_pool, address) if address else None
    max_rounds = None if samples is None else rounds_for(int(samples), sum(families.values()))
    if progress is None:
        progress = bool(getattr(sys.stderr, "isatty", lambda: False)())
    return RunPlan(kind, families, params, slices, seed, workers, max_rounds, time_cap, target_error,
                   label, progress, bool(extrapolate), pool, reduction)


def _with_exact_exchange(out, params):
    """The exchange family from Sen's symmetry: b_2(alpha)^2 - b_2(1 - alpha)^2, every round."""
    exact_values = np.array([exact.b2_identical(p[0]) ** 2 - exact.b2_identical(1.0 - p[0]) ** 2 for p in params])
    column = np.tile(exact_values, (out.rounds, 1))
    return dataclasses.replace(out, batch_means={**out.batch_means, "exchange": column},
                               batch_raw={**out.batch_raw, "exchange": column})


def _mean(rounds) -> Estimate:
    """Mean of independent equal-size rounds and its standard error."""
    return Estimate(float(rounds.mean()), float(rounds.std(ddof=1) / math.sqrt(len(rounds))))


def _summaries(out, n_params):
    """Per parameter point: (total value, total error, per-family Estimates, shift, per-family shifts,
    round values)."""
    err = combined_error(out.batch_means)
    rows = []
    for k in range(n_params):
        parts = {}
        total = 0.0
        rounds = sum(m[:, k] for m in out.batch_means.values())
        shift_rounds = sum(out.batch_raw[f][:, k] - m[:, k] for f, m in out.batch_means.items())
        for f, m in out.batch_means.items():
            parts[f] = _mean(m[:, k])
            total += parts[f].value
        shift = _mean(shift_rounds)
        shifts = {f: _mean(out.batch_raw[f][:, k] - m[:, k]) for f, m in out.batch_means.items()}
        rows.append((total, float(err[k]), parts, shift, shifts, tuple(float(r) for r in rounds)))
    return rows


def scan_third_order(kind: str = "identical", alphas=None, *, grid=None, samples: int | None = None,
                     time_cap: float | None = None, target_error: float | None = None, seed: int = 0,
                     workers: int = 2, slices: int = DEFAULT_SLICES, batch: int | None = None,
                     progress: bool | None = None, order: int = 3, dimension: int = 2,
                     species: int | None = None, extrapolate: bool = True,
                     allocation: dict[str, int] | None = None, scheduler: str | None = None,
                     sequence: str | None = None, reduction: Reduction | None = None,
                     symmetric: bool = False) -> list[ThirdOrderResult]:
    """Third-order coefficients at many parameter points from one set of loops.

    identical: alphas = sequence of exchange parameters.  pair_plus_one: grid = sequence of
    (alpha, alpha_12) pairs.  The loops (and their stored slice angles) are drawn once per batch and
    every point's phase is evaluated on them, so a point's value equals a separate run with the same
    seed, budget and slices.  target_error applies to the worst point.  extrapolate=False switches the
    slice-number extrapolation off (then the O(1/slices) pair-product error remains).  allocation:
    relative numbers of samples per family in a round (default ALLOCATION[kind]).  scheduler: the
    address of a dask scheduler to run the batches on (default: the environment variable
    CLUSTEREXP_SAMPLE_CLUSTER, else worker processes on this machine); the numbers are the same.
    sequence="sobol": randomized quasi-Monte Carlo (quasi.py), one independent scramble per batch.
    reduction: the variance-reduction settings (runner.Reduction; default: control variate on, tuned
    offsets; runner.BEFORE is the estimator as it was before them).  symmetric (identical only): the
    exchange family is not sampled but taken from Sen's symmetry a_3(alpha) = a_3(1 - alpha), exactly
    b_2(alpha)^2 - b_2(1 - alpha)^2 (docs/loops.md); the result then rests on that published symmetry.
    """
    if kind == "identical":
        _check_domain(kind, order, dimension, species, 0.0, None)
        if alphas is None or grid is not None:
            raise LoopsError("kind='identical' scans take alphas=[...] (no grid)")
        params = [(_check_number("alpha", a),) for a in alphas]
    else:
        _check_domain(kind, order, dimension, species, 0.0, 0.0 if kind == "pair_plus_one" else None)
        if grid is None or alphas is not None:
            raise LoopsError("kind='pair_plus_one' scans take grid=[(alpha, alpha_12), ...]")
        params = [(_check_number("alpha", a), _check_number("alpha_12", b)) for a, b in grid]
    if not params:
        raise LoopsError("empty scan")
    name = "b_3" if kind == "identical" else "b_21"
    if symmetric and kind != "identical":
        raise LoopsError("symmetric=True uses Sen's symmetry of identical anyons (alpha -> 1 - alpha); "
                         "kind='pair_plus_one' has no such exact exchange part")
    if symmetric:
        allocation = {f: k for f, k in (allocation or ALLOCATION[kind]).items() if f != "exchange"}
    plan = _plan("symmetric" if symmetric else kind, kind, params, samples, time_cap, target_error, seed, workers,
                 slices, batch, progress, name, extrapolate, allocation, scheduler, sequence, reduction)
    out = execute(plan)
    if symmetric:
        out = _with_exact_exchange(out, params)
    per_family = {f: n * out.rounds for f, n in plan.families.items()}
    results = []
    for p, (value, err, parts, shift, shifts, round_values) in zip(params, _summaries(out, len(params))):
        if kind == "identical":
            b2 = exact.b2_identical(p[0])
            two = {"b_2": b2, "a_2": -b2}
            virial = Estimate(exact.a3_identical(b2, value), 2.0 * err)
            ideal, vname, a12 = 1.0 / 9.0, "a_3", None
        else:
            b20, b11 = exact.b2_identical(p[0]), exact.b11_mutual(p[1])
            two = {"b_20": b20, "b_11": b11, "a_20": -b20, "a_11": -b11}
            virial = Estimate(exact.a21_mixed(b20, b11, value), 2.0 * err)
            ideal, vname, a12 = 0.0, "a_21", p[1]
        results.append(ThirdOrderResult(
            kind=kind, alpha=p[0], alpha_12=a12, name=name, cluster=Estimate(value, err),
            three_body=Estimate(value - ideal, err), virial_name=vname, virial=virial, two_body=two,
            parts=parts, extrapolation_shift=shift, round_values=round_values, samples=sum(per_family.values()), samples_per_family=per_family, rounds=out.rounds,
            seconds=out.seconds, slices=slices, seed=seed, extrapolated=bool(extrapolate), family_shifts=shifts))
    return results


def estimate_third_order(kind: str = "identical", alpha: float | None = None, alpha_12: float | None = None,
                         *, samples: int | None = None, time_cap: float | None = None,
                         target_error: float | None = None, seed: int = 0, workers: int = 2,
                         slices: int = DEFAULT_SLICES, batch: int | None = None, progress: bool | None = None,
                         order: int = 3, dimension: int = 2, species: int | None = None,
                         extrapolate: bool = True, allocation: dict[str, int] | None = None,
                         scheduler: str | None = None, sequence: str | None = None,
                         reduction: Reduction | None = None, symmetric: bool = False) -> ThirdOrderResult:
    """b_3 and a_3 of identical anyons, or b_21 and a_21 of two identical anyons plus one other particle.

    Budget: samples (total loop samples), time_cap (seconds) and/or target_error (standard error of the
    cluster coefficient).  If target_error cannot be met within the caps, TargetNotReachable says how
    many samples and seconds it would take.  seed makes the run reproducible for a given budget.
    """
    _check_domain(kind, order, dimension, species, alpha, alpha_12)
    if alpha is None:
        raise LoopsError("alpha (the exchange parameter of the identical particles) is required")
    if kind == "identical":
        return scan_third_order(kind, [alpha], samples=samples, time_cap=time_cap, target_error=target_error,
                                seed=seed, workers=workers, slices=slices, batch=batch, progress=progress,
                                extrapolate=extrapolate, allocation=allocation, scheduler=scheduler,
                                sequence=sequence, reduction=reduction, symmetric=symmetric)[0]
    return scan_third_order(kind, grid=[(alpha, alpha_12)], samples=samples, time_cap=time_cap,
                            target_error=target_error, seed=seed, workers=workers, slices=slices, batch=batch,
                            progress=progress, extrapolate=extrapolate, allocation=allocation,
                            scheduler=scheduler, sequence=sequence, reduction=reduction, symmetric=symmetric)[0]


def estimate_second_order(kind: str = "identical", alpha: float = 0.0, *, samples: int = 100_000,
                          seed: int = 0, workers: int = 1, slices: int = DEFAULT_SLICES,
                          batch: int | None = None, sequence: str | None = None) -> SecondOrderResult:
    """Sample b_2 (kind='identical', exchange alpha) or b_11 (kind='distinct', mutual alpha) with the
    same loops, slice factors and importance sampling as the third-order families; the exact values
    are known, so this validates normalisations and error bars."""
    if kind not in ("identical", "distinct"):
        raise LoopsError(f"unknown kind {kind!r} for the second-order check: 'identical' (b_2) or 'distinct' (b_11)")
    a = _check_number("alpha", alpha)
    key = "second_" + kind
    plan = _plan(key, kind, [(a,)], samples, None, None, seed, workers, slices, batch, False,
                 "b_2" if kind == "identical" else "b_11", extrapolate=False, sequence=sequence)
    out = execute(plan)
    value, err, parts, _, _, _ = _summaries(out, 1)[0]
    if kind == "identical":
        # b_2 = (1/2) [loop part + swap part], each part estimating its integral over the area.
        lp, sp = parts["pair_loop"], parts["pair_swap"]
        value = 0.5 * (lp.value + sp.value)
        err = 0.5 * math.hypot(lp.error, sp.error)
        return SecondOrderResult(kind, a, Estimate(value, err), exact.b2_identical(a), parts,
                                 out.rounds * sum(plan.families.values()))
    return SecondOrderResult(kind, a, Estimate(value, err), exact.b11_mutual(a), parts,
                             out.rounds * sum(plan.families.values()))
