"""Batches of loop samples on worker processes: seeds, rounds, caps, error bars.

A run is a sequence of rounds; round r holds one batch of every family of the requested kind.  Batch
(family, r) draws its random numbers from SeedSequence(seed, spawn_key=(family id, r)), so its values
depend only on (seed, family, r, batch size, slices) and never on which process ran it or when.  The
estimate after R rounds uses rounds 0..R-1 only (a contiguous prefix), so a run that stopped on a time
cap is reproduced exactly by asking for the same number of rounds.

Errors come from the scatter of independent batch means (every batch of a family has the same size).
"""
from __future__ import annotations

import functools
import math
import os
import signal
import sys
import threading
import time
from concurrent.futures import FIRST_COMPLETED, ProcessPoolExecutor, wait
from contextlib import contextmanager
from dataclasses import dataclass
from multiprocessing import get_all_start_methods, get_context

import numpy as np

from clusterexp.errors import ClusterexpError

from . import pairfactor, sampler

FAMILY_IDS = {"cycle": 1, "exchange": 2, "triple": 3, "pair_loop": 4, "pair_swap": 5}
SAMPLE_CLASSES = {
    "cycle": sampler.CycleSamples,
    "exchange": sampler.ExchangeSamples,
    "triple": sampler.TripleSamples,
    "pair_loop": sampler.PairLoopSamples,
    "pair_swap": sampler.PairSwapSamples,
}
MIN_ROUNDS_FOR_TARGET = 10


@dataclass(frozen=True)
class Reduction:
    """Variance-reduction settings of a run (docs/loops.md, "Variance reduction"); part of what a
    batch's numbers depend on.  control: the triple family's control variate (pair terms with exact
    mean); triple_width: the main width of its offset density; sequence: "random" or "sobol"."""

    control: bool = True
    triple_width: float = sampler.WIDTH_TRIPLE
    sequence: str = "random"
    closed_half: bool = True      # the slice factor's closed form at half-integer alpha (pairfactor.py)
    compiled: bool = True         # the compiled hot path (kernels.py); False: the numpy reference


BEFORE = Reduction(control=False, triple_width=sampler.WIDTH_TRIPLE_BEFORE, closed_half=False, compiled=False)
EARLY_MARGIN = 2.0       # give up early when the projection exceeds the cap by this factor ...
EARLY_FRACTION = 0.1     # ... and at least this fraction of the cap has been spent


class LoopsError(ClusterexpError):
    """A request the loop estimator does not support, or inconsistent run settings."""


class TargetNotReachable(LoopsError):
    """The requested error bar cannot be reached within the time or sample cap."""

    def __init__(self, message: str, needed_seconds: float, needed_samples: float):
        super().__init__(message)
        self.needed_seconds = needed_seconds
        self.needed_samples = needed_samples


def family_values(kind: str, family: str, samples, params: tuple, stride: int = 1) -> np.ndarray:
    """Per-sample contribution of one family to the third-order (or second-order) coefficient."""
    if family == "cycle":
        return samples.values(params[0], stride)
    if family == "exchange":
        return samples.values(params[0], params[1] if kind == "pair_plus_one" else params[0], stride)
    if family == "triple":
        if kind == "pair_plus_one":
            return samples.values(params[0], params[1], params[1], 1.5, stride)
        return samples.values(params[0], params[0], params[0], 0.5, stride)
    if family in ("pair_loop", "pair_swap"):
        return samples.values(params[0])
    raise LoopsError(f"unknown family {family!r}")


# Families extrapolated in the slice number: the three-particle families, whose pair-product error
# (two pairs sharing a particle within one slice) vanishes as the slices grow; the two-body families are
# exact at any slicing.  The correlated slice study (docs/loops.md: the same loops seen at 64, 32, 16,
# 8 slices) found the differences V(n) - V(n/2) of every family falling by factors of 3 to more than 5
# per doubling at alpha = 1/4 and 1/2, i.e. faster than 1/n: the extrapolation assumes 1/n^2,
# V(n) + (V(n) - V(n/2))/3, and for any power 1/n^p with p >= 1 its remaining error is at most twice
# the reported shift (raw minus extrapolated).
EXTRAPOLATED_FAMILIES = ("cycle", "exchange", "triple")
EXTRAPOLATION_WEIGHT = 1.0 / 3.0     # 1/(2^p - 1) with p = 2


def _control(kind: str, samples, params: tuple, stride: int) -> np.ndarray:
    """The triple family's control (mean zero exactly) at one parameter point."""
    if kind == "pair_plus_one":
        return samples.control(params[0], params[1], params[1], stride)
    return samples.control(params[0], params[0], params[0], stride)


def run_batch(kind: str, family: str, index: int, count: int, slices: int, seed: int,
              params: list[tuple], extrapolate: bool = True,
              reduction: Reduction = Reduction()) -> tuple:
    """One batch at every parameter point: (mean of the family's per-sample values, the mean at the
    full slice number without extrapolation, seconds, control statistics or None); `reduction` holds
    the variance-reduction settings (the control statistics are the control's mean, its covariance
    with the values and its variance, per point, for the triple family with `reduction.control`).

    With `extrapolate` (the three-particle families), each sample is evaluated on its own path with
    `slices` slices and with every second slice point only (slices/2), and contributes
    V(slices) + (V(slices) - V(slices/2))/3: the pair-product error falls like 1/slices^2 or faster where
    it was measured (EXTRAPOLATION_WEIGHT), and the two values are strongly correlated, so this costs
    little variance.
    """
    pairfactor.SETTINGS.closed_half = reduction.closed_half
    pairfactor.SETTINGS.compiled = reduction.compiled
    try:
        return _batch(kind, family, index, count, slices, seed, params, extrapolate, reduction)
    finally:
        pairfactor.SETTINGS.closed_half = True
        pairfactor.SETTINGS.compiled = True


def _batch(kind, family, index, count, slices, seed, params, extrapolate, reduction):
    start = time.perf_counter()
    seq = np.random.SeedSequence(entropy=seed, spawn_key=(FAMILY_IDS[family], index))
    rng = np.random.default_rng(seq)
    extrapolate = extrapolate and family in EXTRAPOLATED_FAMILIES
    strides = (1, 2) if extrapolate else (1,)
    make = SAMPLE_CLASSES[family]
    if family == "triple":
        make = functools.partial(make, width=reduction.triple_width)
    if reduction.sequence == "sobol":
        from .quasi import scrambled_source
        rng = scrambled_source(make, rng, count, slices, strides)
    samples = make(rng, count, slices, strides)
    means = np.empty(len(params))
    raw = np.empty(len(params))
    controlled = reduction.control and family == "triple"
    # per point: the control's mean, its covariance with the values and its variance (within the batch)
    control = np.zeros((3, len(params))) if controlled else None
    for k, p in enumerate(params):
        v = family_values(kind, family, samples, p, 1)
        raw[k] = v.mean()
        if extrapolate:
            v = v + EXTRAPOLATION_WEIGHT * (v - family_values(kind, family, samples, p, 2))
        means[k] = v.mean()
        if controlled:
            c = _control(kind, samples, p, 1)
            control[:, k] = c.mean(), np.mean((v - means[k]) * (c - c.mean())), c.var()
    return means, raw, time.perf_counter() - start, control


@dataclass
class RunPlan:
    kind: str
    families: dict[str, int]          # family -> samples per batch
    params: list[tuple]
    slices: int
    seed: int
    workers: int
    max_rounds: int | None            # from a sample budget
    time_cap: float | None
    target_error: float | None
    label: str                        # name of the estimated coefficient, for messages
    progress: bool
    extrapolate: bool = True
    pool: object = None               # callable -> (context, submit, first finished, slots) on a
                                      # cluster (distributed.cluster_pool); None: processes here
    reduction: Reduction = Reduction()


@dataclass
class RunOutcome:
    rounds: int
    seconds: float
    batch_means: dict[str, np.ndarray]     # family -> (rounds, params), extrapolated in slices
    batch_raw: dict[str, np.ndarray]       # the same at the full slice number, not extrapolated


def controlled(stats: np.ndarray, means: np.ndarray, raw: np.ndarray):
    """Batch means corrected by the control variate: m - beta c, with beta = pooled within-batch
    covariance / variance over every round used (one beta per point, the same for all rounds, so the
    rounds stay independent and equally weighted; its estimation bias is O(1/samples))."""
    covariance, variance = stats[:, 1, :].sum(axis=0), stats[:, 2, :].sum(axis=0)
    beta = np.divide(covariance, variance, out=np.zeros_like(covariance), where=variance > 0)
    return means - beta * stats[:, 0, :], raw - beta * stats[:, 0, :]


def combined_error(batch_means: dict[str, np.ndarray]) -> np.ndarray:
    """Standard error of the sum over families, per parameter point."""
    var = 0.0
    for m in batch_means.values():
        r = m.shape[0]
        # column by column, so that a point's error does not depend on the other points of a scan
        col = np.array([m[:, k].var(ddof=1) / r for k in range(m.shape[1])]) if r > 1 else np.full(m.shape[1], np.inf)
        var = var + col
    return np.sqrt(var)


def _round_tasks(plan: RunPlan, r: int):
    return [(plan.kind, f, r, n, plan.slices, plan.seed, plan.params, plan.extrapolate, plan.reduction)
            for f, n in plan.families.items()]


def _quiet_worker() -> None:
    """Workers leave Ctrl-C and SIGTERM to the process that owns them. A terminal (or `kill` of the
    process group) signals every process; a worker interrupted while it waits on the pool's queues can
    leave the pool unable to shut down, and the run would hang instead of ending with one line."""
    signal.signal(signal.SIGINT, signal.SIG_IGN)
    if hasattr(signal, "SIGTERM"):
        signal.signal(signal.SIGTERM, signal.SIG_IGN)
    # A worker that ignores SIGTERM must not outlive its owner: if the owner is killed by a signal it
    # cannot clean up after (SIGTERM to it alone, SIGKILL), the idle workers would stay behind for good.
    threading.Thread(target=_exit_with_owner, args=(os.getppid(),), daemon=True).start()


def _exit_with_owner(owner: int, every: float = 0.5) -> None:
    while os.getppid() == owner:
        time.sleep(every)
    os._exit(0)


def worker_pool(workers: int) -> ProcessPoolExecutor:
    """A local process pool of quiet workers (fork where available: workers need no re-import of the
    caller's script, spawn would require a main guard)."""
    ctx = get_context("fork" if "fork" in get_all_start_methods() else "spawn")
    return ProcessPoolExecutor(max_workers=workers, mp_context=ctx, initializer=_quiet_worker)


@contextmanager
def _closing(pool: ProcessPoolExecutor):
    """Shut the pool down on the way out; an interrupted run drops its queued batches instead of
    computing them (the batches in flight are short)."""
    try:
        yield pool
    finally:
        pool.shutdown(wait=True, cancel_futures=True)


def _local_pool(workers: int):
    """Worker processes on this machine: (context manager, submit, wait for the first finished)."""
    pool = worker_pool(workers)
    return _closing(pool), (lambda task: pool.submit(run_batch, *task)), \
        (lambda futures: wait(futures, return_when=FIRST_COMPLETED)[0])


def execute(plan: RunPlan) -> RunOutcome:
    start = time.perf_counter()
    per_round = sum(plan.families.values())
    done: dict[tuple[str, int], tuple] = {}
    prefix = 0
    next_round = 0
    stop_submitting = False
    show = plan.progress

    def complete_prefix() -> int:
        r = prefix
        while all((f, r) in done for f in plan.families):
            r += 1
        return r

    def outcome(rounds: int) -> RunOutcome:
        means = {f: np.array([done[(f, r)][0] for r in range(rounds)]).reshape(rounds, len(plan.params))
                 for f in plan.families}
        raw = {f: np.array([done[(f, r)][1] for r in range(rounds)]).reshape(rounds, len(plan.params))
               for f in plan.families}
        for f in plan.families:
            if done[(f, 0)][3] is not None:
                means[f], raw[f] = controlled(np.array([done[(f, r)][3] for r in range(rounds)]), means[f], raw[f])
        return RunOutcome(rounds, time.perf_counter() - start, means, raw)

    def check_target(rounds: int) -> bool:
        """True when the target is met; raises when the caps make it unreachable."""
        if plan.target_error is None or rounds < MIN_ROUNDS_FOR_TARGET:
            return False
        err = float(np.max(combined_error(outcome(rounds).batch_means)))
        if err <= plan.target_error:
            return True
        elapsed = time.perf_counter() - start
        factor = (err / plan.target_error) ** 2
        need_rounds = rounds * factor
        need_seconds = elapsed / rounds * need_rounds
        need_samples = need_rounds * per_round
        # Raise early only when clearly out of reach (the projection from a short run is noisy and
        # includes start-up); a near miss runs to the cap and is reported at the end.
        over_time = (plan.time_cap is not None and need_seconds > EARLY_MARGIN * plan.time_cap
                     and elapsed >= EARLY_FRACTION * plan.time_cap)
        over_samples = (plan.max_rounds is not None and need_rounds > EARLY_MARGIN * plan.max_rounds
                        and rounds >= EARLY_FRACTION * plan.max_rounds)
        if over_time or over_samples:
            caps = []
            if plan.time_cap is not None:
                caps.append(f"time cap {plan.time_cap:g} s")
            if plan.max_rounds is not None:
                caps.append(f"sample cap {plan.max_rounds * per_round} samples")
            raise TargetNotReachable(
                f"target error {plan.target_error:g} on {plan.label} is out of reach: after {rounds * per_round} "
                f"samples ({elapsed:.1f} s) the error is {err:.3g}; at the measured variance per sample the "
                f"run would need about {need_samples:.3g} samples, about {need_seconds:.3g} s with "
                f"{plan.workers} worker(s), but the {' and '.join(caps)} allow less. Raise the cap or the "
                f"target error.", need_seconds, need_samples)
        return False

    def report(rounds: int) -> None:
        if not show or rounds < 2:
            return
        means = outcome(rounds).batch_means
        err = float(np.max(combined_error(means)))
        value = sum(m.mean(axis=0) for m in means.values())[0]
        sys.stderr.write(f"\r[loops] {plan.label}: {rounds} rounds, {rounds * per_round} samples, "
                         f"{value:.6f} +- {err:.2g}, {time.perf_counter() - start:.1f} s   ")
        sys.stderr.flush()

    def may_submit() -> bool:
        if stop_submitting:
            return False
        if plan.max_rounds is not None and next_round >= plan.max_rounds:
            return False
        if plan.time_cap is not None:
            elapsed = time.perf_counter() - start
            per = elapsed / prefix if prefix else 0.0
            if elapsed + per / max(plan.workers, 1) > plan.time_cap:
                return False
        return True

    try:
        if plan.workers <= 1 and plan.pool is None:
            while may_submit():
                for task in _round_tasks(plan, next_round):
                    done[(task[1], task[2])] = run_batch(*task)
                next_round += 1
                prefix = complete_prefix()
                report(prefix)
                if check_target(prefix):
                    break
        else:
            if plan.pool is not None:
                context, submit, first_finished, slots = plan.pool()
            else:
                (context, submit, first_finished), slots = _local_pool(plan.workers), plan.workers
            with context:
                pending = {}
                while True:
                    while may_submit() and len(pending) < (slots + 1) * len(plan.families):
                        for task in _round_tasks(plan, next_round):
                            pending[submit(task)] = (task[1], task[2])
                        next_round += 1
                    if not pending:
                        break
                    for fut in first_finished(list(pending)):
                        # keyed by (family, round): a batch recomputed after a lost worker replaces
                        # nothing and is never counted twice
                        done[pending.pop(fut)] = fut.result()
                    prefix = complete_prefix()
                    report(prefix)
                    if check_target(prefix):
                        stop_submitting = True
                        for fut in pending:
                            fut.cancel()
                        break
    finally:
        if show:
            sys.stderr.write("\n")
    rounds = complete_prefix()
    if rounds < 2:
        raise LoopsError(f"the run finished {rounds} round(s); at least 2 are needed for an error bar "
                         f"(one round here is {per_round} samples): raise the time cap or the sample budget")
    out = outcome(rounds)
    if plan.target_error is not None:
        err = float(np.max(combined_error(out.batch_means)))
        if err > plan.target_error:
            need = rounds * (err / plan.target_error) ** 2
            raise TargetNotReachable(
                f"target error {plan.target_error:g} on {plan.label} not reached: error {err:.3g} after "
                f"{rounds * per_round} samples ({out.seconds:.1f} s); the run would need about "
                f"{need * per_round:.3g} samples, about {out.seconds / rounds * need:.3g} s.",
                out.seconds / rounds * need, need * per_round)
    return out


def rounds_for(samples: int, per_round: int) -> int:
    return max(1, math.ceil(samples / per_round))
