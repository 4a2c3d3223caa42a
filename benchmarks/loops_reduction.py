"""Variance reduction of the Brownian-loop Monte Carlo, measured side by side in one run.

Run:  nice -n 10 python benchmarks/loops_reduction.py --cap 30 --passes 2

Every configuration samples a_3(1/2) for the same wall-time cap on the same workers, one after the
other, and the whole sequence is repeated (`--passes`) so that a change of the machine's load hits all
configurations alike; errors per minute are pooled over the passes (inverse-variance weights).  From
the error per minute the time to +-1e-5 on a_3 is PROJECTED (error ~ 1/sqrt(time)); nothing here runs
for an hour.  The value of the last configuration, pooled over its passes, is compared with the
published a_3(1/2) = 1/36 + 1/(12 pi^2) + c_2, c_2 = -1.65e-5 (Myrheim & Olaussen, Phys. Lett. B 299
(1993) 267; Mashkevich, Myrheim & Olaussen, Phys. Lett. B 382 (1996) 124).
"""
from __future__ import annotations

import argparse
import math
import os
import sys
import time
from dataclasses import replace
from pathlib import Path

sys.path.insert(0, str(Path(__file__).resolve().parent.parent))

from clusterexp.loops import BEFORE, Reduction, estimate_third_order  # noqa: E402
from clusterexp.loops.sampler import WIDTH_TRIPLE  # noqa: E402

TARGET = 1e-5
PUBLISHED = 1 / 36 + 1 / (12 * math.pi ** 2) - 1.65e-5
CLOSED = replace(BEFORE, closed_half=True)
CONTROL_ONLY = replace(CLOSED, control=True)
AFTER = Reduction()
# (name, reduction, symmetric, allocation)
CONFIGURATIONS = [
    ("before (as of the last loops benchmark)", BEFORE, False, {"cycle": 2, "exchange": 1, "triple": 6}),
    ("+ closed-form slice factor at alpha = 1/2", CLOSED, False, {"cycle": 2, "exchange": 1, "triple": 6}),
    ("+ control variate (triple family)", CONTROL_ONLY, False, {"cycle": 2, "exchange": 1, "triple": 6}),
    (f"+ importance: triple offsets width {WIDTH_TRIPLE}", AFTER, False, {"cycle": 2, "exchange": 1, "triple": 6}),
    ("+ Sen's symmetry (exchange family exact)", AFTER, True, {"cycle": 2, "triple": 6}),
    ("+ allocation for the reduced variances", AFTER, True, {"cycle": 3, "triple": 5}),
    ("+ randomized QMC (scrambled Sobol, bridge)", replace(AFTER, sequence="sobol"), True, {"cycle": 3, "triple": 5}),
]


def main() -> None:
    parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    parser.add_argument("--cap", type=float, default=30.0, help="seconds per configuration and pass")
    parser.add_argument("--passes", type=int, default=2)
    parser.add_argument("--workers", type=int, default=2)
    parser.add_argument("--seed", type=int, default=2026)
    args = parser.parse_args()
    print(f"# loops_reduction: a_3(1/2), slices=16, workers={args.workers}, cap {args.cap:g} s x {args.passes} "
          f"passes, cpus={os.cpu_count()}, load average {os.getloadavg()[0]:.2f}")
    runs = {name: [] for name, *_ in CONFIGURATIONS}
    for p in range(args.passes):
        for k, (name, reduction, symmetric, allocation) in enumerate(CONFIGURATIONS):
            r = estimate_third_order("identical", 0.5, time_cap=args.cap, seed=args.seed + 100 * p + k,
                                     workers=args.workers, reduction=reduction, symmetric=symmetric,
                                     allocation=allocation, progress=False)
            runs[name].append(r)
            print(f"pass {p + 1} {name}: a_3 = {r.a3.value:.6f} +- {r.a3.error:.2e} in {r.seconds:.1f} s, "
                  f"{r.samples} samples, load {os.getloadavg()[0]:.2f}", flush=True)
    print()
    print(f"{'configuration':48s} {'error/min':>10s} {'ratio':>6s} {'time to 1e-5 (projected)':>26s}")
    base = None
    for name, *_ in CONFIGURATIONS:
        # error after one minute: err^2 * t / 60 per run, pooled as 1/sum(1/var)
        per_minute = 1.0 / math.sqrt(sum(1.0 / (r.a3.error ** 2 * r.seconds / 60.0) for r in runs[name]))
        base = per_minute if base is None else base
        hours = 60.0 * (per_minute / TARGET) ** 2 / 3600.0
        print(f"{name:48s} {per_minute:10.3e} {(base / per_minute) ** 2:6.2f}x {hours:20.1f} h")
    last = runs[CONFIGURATIONS[-2][0]] + runs[CONFIGURATIONS[-1][0]]
    weights = [1.0 / r.a3.error ** 2 for r in last]
    value = sum(w * r.a3.value for w, r in zip(weights, last)) / sum(weights)
    error = 1.0 / math.sqrt(sum(weights))
    print(f"\npooled a_3(1/2) of the last two configurations: {value:.6f} +- {error:.1e}; published {PUBLISHED:.6f}; "
          f"deviation {(value - PUBLISHED) / error:+.2f} sigma")
    print("ratio = (error per minute before / after)^2 = speed-up in time to a given error")
    print(f"load average at the end: {', '.join(f'{v:.2f}' for v in os.getloadavg())}")


if __name__ == "__main__":
    start = time.perf_counter()
    main()
    print(f"wall {time.perf_counter() - start:.0f} s")
