"""The loop sampler's compiled hot path (clusterexp/loops/kernels.py) against its numpy reference, side by
side in one run: CPU microseconds per sample of each family in one process, and a_3(1/2) runs of the
target configuration (benchmarks/loops_target.py: 32 slices raw, Sen's symmetry, control variate,
allocation cycle 3 : triple 5) alternating between the two, with the error per minute of two cores.

Run:  python benchmarks/loops_kernels.py --seconds 60 --repeats 2      (figures in loops_kernels-last-run.txt)

The machine may be shared: the runs are timed by the CPU seconds their worker processes spend
(resource.getrusage of the children), not by the wall clock, and the error per minute is per minute of
two cores' CPU (CPU seconds / 2), so a busy machine slows the wall clock but not the figures (except
for what sharing the caches costs, which makes them pessimistic).
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

import numpy as np  # noqa: E402

from clusterexp.loops import Reduction, estimate_third_order  # noqa: E402
from clusterexp.loops import pairfactor, sampler  # noqa: E402

ALLOCATION = {"cycle": 3, "triple": 5}
FAMILIES = (("cycle", sampler.CycleSamples, (0.5,)), ("triple", sampler.TripleSamples, (0.5, 0.5, 0.5, 0.5)),
            ("exchange", sampler.ExchangeSamples, (0.25, 0.25)))


def children_cpu() -> float:
    r = resource.getrusage(resource.RUSAGE_CHILDREN)
    return r.ru_utime + r.ru_stime


def per_sample(compiled: bool, count: int = 2000, repeats: int = 20, slices: int = 32) -> dict:
    pairfactor.SETTINGS.compiled = compiled
    out = {}
    try:
        for name, make, args in FAMILIES:
            rng = np.random.default_rng(1)
            make(rng, count, slices).values(*args)         # compile / warm up
            start = time.process_time()
            for _ in range(repeats):
                make(rng, count, slices).values(*args)
            out[name] = (time.process_time() - start) / (repeats * count) * 1e6
    finally:
        pairfactor.SETTINGS.compiled = True
    return out


def target_run(compiled: bool, seconds: float, seed: int) -> tuple[float, float, float, float]:
    before = children_cpu()
    r = estimate_third_order("identical", 0.5, time_cap=seconds, seed=seed, workers=2,
                             reduction=Reduction(compiled=compiled), symmetric=True, slices=32, extrapolate=False,
                             allocation=ALLOCATION, progress=False)
    cpu = children_cpu() - before
    return r.a3.value, r.a3.error, cpu, r.samples


def main() -> None:
    parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    parser.add_argument("--seconds", type=float, default=60.0, help="wall seconds per a_3 run")
    parser.add_argument("--repeats", type=int, default=2)
    args = parser.parse_args()
    print(f"# loops_kernels: cpus={os.cpu_count()}, load average {os.getloadavg()[0]:.2f}", flush=True)
    print("CPU microseconds per sample, one process, 32 slices, 2000-sample batches (alpha 1/2; exchange 1/4):")
    ref, fast = per_sample(False), per_sample(True)
    for name in ref:
        print(f"  {name:9s} numpy {ref[name]:6.2f}   compiled {fast[name]:6.2f}   ratio {ref[name] / fast[name]:.2f}x")
    print("a_3(1/2), 32 slices raw, symmetric, control, allocation 3:5, two workers; "
          "error per minute of two cores' CPU = error x sqrt(CPU s / 120):", flush=True)
    pooled = {False: [], True: []}
    for k in range(args.repeats):
        for compiled in (False, True):
            value, error, cpu, samples = target_run(compiled, args.seconds, 20261204 + 2 * k + compiled)
            per_min = error * math.sqrt(cpu / 120.0)
            pooled[compiled].append(per_min)
            print(f"  {'compiled' if compiled else 'numpy   '} a_3 = {value:.6f} +- {error:.2e}  CPU {cpu:6.1f} s  "
                  f"{samples / cpu:9.0f} samples/CPU s  error per two-core minute {per_min:.2e}  "
                  f"load {os.getloadavg()[0]:.2f}", flush=True)
    for compiled in (False, True):
        e = math.sqrt(np.mean(np.square(pooled[compiled])))
        print(f"{'compiled' if compiled else 'numpy   '}: error per two-core minute {e:.2e}; "
              f"+-1e-5 projected at {(e / 1e-5) ** 2:.0f} min of two cores")
    e0 = math.sqrt(np.mean(np.square(pooled[False])))
    e1 = math.sqrt(np.mean(np.square(pooled[True])))
    print(f"speed-up in time to a given error (error per minute ratio squared): {(e0 / e1) ** 2:.2f}x")


if __name__ == "__main__":
    main()
