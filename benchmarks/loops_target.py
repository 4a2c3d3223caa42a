"""a_3(1/2) to +-1e-5, run for real (not projected): the best configuration of loops_reduction.py
(closed-form slice factor, control variate, wide triple offsets, Sen's symmetry, allocation cycle 3 :
triple 5) in chunks of independent seeds, pooled with inverse-variance weights, until the pooled standard
error of a_3 is at most the target or the wall-time budget is spent.

Run:  python benchmarks/loops_target.py --budget 3600 --chunk 300 --slices 32   (figures in loops_target-last-run.txt)

Slices: 32 by default here (the library's default is 16). The correlated slice study of docs/loops.md
(benchmarks/loops_slices.py) puts the discretisation error of the families at 16 slices at 1-2e-5 in
b_3 before extrapolation, the size of this target; at 32 slices every family's V(64) - V(32) is
consistent with zero at alpha = 1/2 (cycle -0.09e-5 +- 0.40e-5, triple +0.36e-5 +- 0.92e-5), so --raw
(no extrapolation, a third less work per sample and no extrapolation noise) rests on that study; without
--raw the pooled extrapolation shift is printed, and the error left after the extrapolation is at most
twice it.

Time is also counted in CPU seconds (this process and its worker processes, resource.getrusage): on a
machine shared with other jobs the wall clock says little, and CPU seconds / 2 is the time on two
dedicated cores (pessimistic: sharing the caches makes each sample cost more CPU).  --budget-cpu stops
on that count instead of the wall clock.

Each chunk is an ordinary estimate_third_order run (with its own slice extrapolation unless --raw), so the
pooled value is an honest estimate with an honest error; the check is the published a_3(1/2) = 1/36 +
1/(12 pi^2) + c_2, c_2 = -1.65e-5 (Myrheim & Olaussen, Phys. Lett. B 299 (1993) 267; Mashkevich, Myrheim &
Olaussen, Phys. Lett. B 382 (1996) 124), which must lie within the pooled error bar (two standard errors).
"""
from __future__ import annotations

import argparse
import math
import os
import resource
import sys
import time
from pathlib import Path

sys.path.insert(0, str(Path(__file__).resolve().parent.parent))

from clusterexp.loops import Reduction, estimate_third_order  # noqa: E402

PUBLISHED = 1 / 36 + 1 / (12 * math.pi ** 2) - 1.65e-5
ALLOCATION = {"cycle": 3, "triple": 5}


def cpu_seconds() -> float:
    """CPU seconds of this process and of its finished worker processes (each chunk's pool is shut down
    and joined before the next, so its workers are counted)."""
    total = 0.0
    for who in (resource.RUSAGE_SELF, resource.RUSAGE_CHILDREN):
        r = resource.getrusage(who)
        total += r.ru_utime + r.ru_stime
    return total


def main() -> None:
    parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    parser.add_argument("--budget", type=float, default=3600.0, help="wall seconds in all")
    parser.add_argument("--budget-cpu", type=float, default=None,
                        help="CPU seconds in all (two dedicated cores for an hour: 7200); then --budget only caps the wall clock")
    parser.add_argument("--chunk", type=float, default=300.0, help="wall seconds per independent run")
    parser.add_argument("--target", type=float, default=1e-5)
    parser.add_argument("--workers", type=int, default=2)
    parser.add_argument("--seed", type=int, default=20261203)
    parser.add_argument("--slices", type=int, default=32)
    parser.add_argument("--raw", action="store_true",
                        help="no slice extrapolation (at 32 slices its residual is below 1e-5 by the slice study)")
    args = parser.parse_args()
    print(f"# loops_target: a_3(1/2) to +-{args.target:g}, chunks of {args.chunk:g} s, budget {args.budget:g} s, "
          f"slices={args.slices}{' raw' if args.raw else ''}, workers={args.workers}, cpus={os.cpu_count()}, load average {os.getloadavg()[0]:.2f}", flush=True)
    start = time.perf_counter()
    cpu_start = cpu_seconds()
    weights, weighted, k = 0.0, 0.0, 0
    shift_w, shift_sum = 0.0, 0.0
    while True:
        left = args.budget - (time.perf_counter() - start)
        if left < 10:
            break
        if args.budget_cpu is not None:
            cpu_left = args.budget_cpu - (cpu_seconds() - cpu_start)
            if cpu_left < 20:
                break
        r = estimate_third_order("identical", 0.5, time_cap=min(args.chunk, left), seed=args.seed + k,
                                 workers=args.workers, reduction=Reduction(), symmetric=True, slices=args.slices,
                                 extrapolate=not args.raw,
                                 allocation=ALLOCATION, progress=False)
        k += 1
        w = 1.0 / r.a3.error ** 2
        weights += w
        weighted += w * r.a3.value
        value, error = weighted / weights, 1.0 / math.sqrt(weights)
        # the shift is in b_3; a_3 = 4 b_2^2 - 2 b_3 moves by -2 times it
        if not args.raw:
            sw = 1.0 / max(r.extrapolation_shift.error, 1e-12) ** 2
            shift_w += sw
            shift_sum += sw * (-2.0 * r.extrapolation_shift.value)
        elapsed = time.perf_counter() - start
        cpu = cpu_seconds() - cpu_start
        print(f"chunk {k}: a_3 = {r.a3.value:.6f} +- {r.a3.error:.2e} ({r.samples} samples, {r.seconds:.0f} s); "
              f"pooled {value:.7f} +- {error:.2e} after {elapsed / 60:.1f} min wall, {cpu / 60:.1f} CPU min "
              f"({cpu / 120:.1f} min of two cores), load {os.getloadavg()[0]:.2f}", flush=True)
        if error <= args.target:
            break
    value, error = weighted / weights, 1.0 / math.sqrt(weights)
    elapsed = time.perf_counter() - start
    cpu = cpu_seconds() - cpu_start
    reached = "reached" if error <= args.target else "NOT reached"
    print(f"\ntarget +-{args.target:g} {reached} after {elapsed / 60:.1f} min wall = {cpu / 60:.1f} CPU min = "
          f"{cpu / 120:.1f} min of two cores ({k} chunks): a_3(1/2) = {value:.7f} "
          f"+- {error:.2e}; published {PUBLISHED:.7f}; deviation {(value - PUBLISHED) / error:+.2f} sigma")
    if shift_w:
        print(f"slice extrapolation: a_3 raw minus extrapolated = {shift_sum / shift_w:+.2e} "
              f"(+- {1.0 / math.sqrt(shift_w):.1e}); the error left is at most twice it")
    print(f"load average at the end: {', '.join(f'{v:.2f}' for v in os.getloadavg())}")


if __name__ == "__main__":
    main()
