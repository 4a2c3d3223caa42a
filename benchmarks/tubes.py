"""Flux tubes: time for a 9 x 9 map of the coverage-squared integral T2(gamma1, gamma2) to +-1e-3.

Run:  nice -n 10 python benchmarks/tubes.py            (9 x 9 map, fluxes k/8, k = 0..8; cap 600 s)
      nice -n 10 python benchmarks/tubes.py --quick    (3 x 3 map, fluxes 1/4, 1/2, 3/4; projects the 9 x 9)

A pilot run measures the worst standard error over the map; the samples needed for +-1e-3 at every
point follow from 1/sqrt(samples), and the map is then run with that budget (one set of loops for all
points: a scan).  Also printed: the slice and refinement convergence of T2(1/2, 1/2) and the first
order in the coverage of b_2 of anyons on a small map (docs/tubes.md).  Workers: 1 unless --workers.
"""
from __future__ import annotations

import argparse
import math
import os
import sys
import time
from pathlib import Path

sys.path.insert(0, str(Path(__file__).resolve().parent.parent))

from clusterexp.loops.tube_estimates import estimate_anyons_tube, estimate_two_tubes  # noqa: E402

TARGET = 1e-3
FINE_TARGET = 1e-4          # what the virial coefficients need: they see only T2 - F1 F2 (docs/tubes.md)
PILOT = 4000


def timed_map(fluxes, workers: int, cap: float, target: float = TARGET):
    points = [(a, b) for a in fluxes for b in fluxes]
    start = time.perf_counter()
    pilot = estimate_two_tubes(points, samples=PILOT, seed=2026, workers=workers)
    worst = max(p.values["connected"].error for p in pilot.points)
    need = int(math.ceil(PILOT * (worst / target) ** 2 * 1.3))       # 30% margin on the projection
    run = estimate_two_tubes(points, samples=max(need, 2 * PILOT), seed=2027, workers=workers,
                             time_cap=cap)
    total = time.perf_counter() - start
    return pilot, run, total


def main() -> None:
    parser = argparse.ArgumentParser()
    parser.add_argument("--quick", action="store_true")
    parser.add_argument("--workers", type=int, default=1)
    parser.add_argument("--cap", type=float, default=600.0)
    args = parser.parse_args()
    fluxes = [0.25, 0.5, 0.75] if args.quick else [k / 8 for k in range(9)]
    print(f"# tubes benchmark: {len(fluxes)} x {len(fluxes)} map of T2, target +-{TARGET:g}, workers={args.workers}, "
          f"cpus={os.cpu_count()}, load average {os.getloadavg()[0]:.2f}")
    pilot, run, total = timed_map(fluxes, args.workers, args.cap)
    worst = max(p.values["connected"].error for p in run.points)
    print(f"pilot {pilot.samples} samples in {pilot.seconds:.1f} s; map {run.samples} samples in {run.seconds:.1f} s "
          f"({run.samples / run.seconds:.0f} samples/s over {len(run.points)} points); total {total:.1f} s; "
          f"worst error {worst:.2e}")
    print("T2(gamma1, gamma2) (rows gamma1, columns gamma2):")
    print("        " + " ".join(f"{g:>9.3f}" for g in fluxes))
    for i, g1 in enumerate(fluxes):
        row = run.points[i * len(fluxes): (i + 1) * len(fluxes)]
        print(f"{g1:>7.3f} " + " ".join(f"{p.values['connected'].value:>9.5f}" for p in row))
    if args.quick:
        per_point = run.seconds  # the loops dominate; more points only add phase evaluations
        print(f"projection for the 9 x 9 map: the same loops serve every point; phase evaluations scale with "
              f"the 9 + 9 distinct fluxes (here {2 * len(fluxes)}): about {per_point * 18 / (2 * len(fluxes)):.0f} s "
              f"at this machine's load")
    pilot, run, total = timed_map(fluxes, args.workers, args.cap, FINE_TARGET)
    worst = max(p.values["connected"].error for p in run.points)
    print(f"to +-{FINE_TARGET:g}: map {run.samples} samples in {run.seconds:.1f} s; total with pilot {total:.1f} s; "
          f"worst error {worst:.2e}; the covariance T2 - F1 F2 (F = -s(1-s)/2), x 1e4:")
    print("        " + " ".join(f"{g:>7.3f}" for g in fluxes))
    for i, g1 in enumerate(fluxes):
        row = run.points[i * len(fluxes): (i + 1) * len(fluxes)]
        print(f"{g1:>7.3f} " + " ".join(f"{1e4 * (p.values['connected'].value - p.exact['single_1'] * p.exact['single_2']):>7.1f}"
                                        for p in row))
    print("slice and refinement convergence of T2(1/2, 1/2) and T2(1/4, -1/4) (seed 11, 400000 samples):")
    for slices, depth in ((8, 5), (16, 0), (16, 5), (32, 5), (64, 5)):
        r = estimate_two_tubes([(0.5, 0.5), (0.25, -0.25)], samples=400_000, seed=11, slices=slices, depth=depth,
                               workers=args.workers)
        print(f"  slices {slices:>2} depth {depth}: " + ", ".join(str(p.values["connected"]) for p in r.points)
              + f"   ({r.seconds:.1f} s)")
    print("first order in the coverage of b_2 and a_2 of anyons (alpha, gamma), 40000 samples:")
    r = estimate_anyons_tube([(a, g) for a in (0.25, 0.5, 0.75) for g in (0.25, 0.5)], samples=40_000, seed=12,
                             workers=args.workers)
    for p in r.points:
        print(f"  alpha {p.params[0]:.2f} gamma {p.params[1]:.2f}: b2^(1) = {p.values['b2_coverage1']}, "
              f"a2^(1) = {p.values['a2_coverage1']}, tube-free b_2 = {p.values['b2_no_tube']}")
    print(f"  ({r.seconds:.1f} s)")
    print(f"load average at the end: {os.getloadavg()[0]:.2f}")


if __name__ == "__main__":
    main()
