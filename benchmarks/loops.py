"""Brownian-loop Monte Carlo: how fast the error bar of a_3(1/2) shrinks on this machine.

Run:  python benchmarks/loops.py            (600 s; reports when +-1e-4 on a_3(1/2) was first reached)
      python benchmarks/loops.py --quick    (60 s; prints the projection to +-1e-4)

Prints the error reached per minute of wall time, the samples per second, the time to the target (or
the projection from the measured variance per sample when the cap stops the run), and the value next
to the published Fourier form (Myrheim & Olaussen, Phys. Lett. B 299 (1993) 267; c_2 from Mashkevich,
Myrheim & Olaussen, Phys. Lett. B 382 (1996) 124).  Uses both cores; run it on an idle machine.
"""
from __future__ import annotations

import argparse
import math
import os
import sys
import time
from pathlib import Path

sys.path.insert(0, str(Path(__file__).resolve().parent.parent))

from clusterexp.loops import estimate_third_order  # noqa: E402

# a_3 error is twice the b_3 error (a_3 = 4 b_2^2 - 2 b_3 with b_2 exact)
TARGET_A3 = 1e-4
ALLOCATION_HALF = {"cycle": 2, "exchange": 1, "triple": 6}   # the exchange family vanishes at alpha = 1/2


def published(alpha: float) -> float:
    s = math.sin(math.pi * alpha) ** 2
    return 1 / 36 + s / (12 * math.pi ** 2) - 1.65e-5 * s * s


def first_prefix_within(round_values, target_b3: float, least: int = 10):
    """The first number of rounds whose standard error of b_3 (scatter of round totals) is <= target."""
    values = list(round_values)
    for k in range(least, len(values) + 1):
        head = values[:k]
        mean = sum(head) / k
        error = math.sqrt(sum((v - mean) ** 2 for v in head) / (k - 1) / k)
        if error <= target_b3:
            return k
    return None


def main() -> None:
    parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    parser.add_argument("--quick", action="store_true", help="60 s run and a projection")
    parser.add_argument("--cap", type=float, default=None, help="time cap in seconds")
    parser.add_argument("--slices", type=int, default=16)
    parser.add_argument("--seed", type=int, default=2024)
    args = parser.parse_args()
    cap = args.cap or (60.0 if args.quick else 600.0)
    print(f"# loops benchmark: a_3(1/2), slices={args.slices} (cycle family extrapolated with slices/2), workers=2, "
          f"cap {cap:g} s, cpus={os.cpu_count()}, load average {os.getloadavg()[0]:.2f}")
    start = time.perf_counter()
    # The whole cap is always used (no early stop on the target), so that the value, the error per
    # minute and the time at which +-1e-4 was first reached are all reported, reached or not.
    r = estimate_third_order("identical", 0.5, time_cap=cap, seed=args.seed, workers=2, slices=args.slices,
                             allocation=ALLOCATION_HALF)
    reached = r.a3.error <= TARGET_A3
    first = first_prefix_within(r.round_values, TARGET_A3 / 2)
    if first is not None:
        print(f"+-{TARGET_A3:g} on a_3 first reached after {first} of {r.rounds} rounds, about "
              f"{r.seconds * first / r.rounds:.0f} s (error from the scatter of the round totals)")
    wall = time.perf_counter() - start
    per_minute = r.a3.error * math.sqrt(r.seconds / 60.0)
    to_target = r.seconds * (r.a3.error / TARGET_A3) ** 2
    print(f"a_3(1/2) = {r.a3.value:.6f} +- {r.a3.error:.2e}   published {published(0.5):.6f}   "
          f"deviation {(r.a3.value - published(0.5)) / r.a3.error:+.2f} sigma")
    print(f"b_3(1/2) = {r.b3.value:.6f} +- {r.b3.error:.2e}; parts: "
          + ", ".join(f"{k} {v}" for k, v in r.parts.items()))
    print(f"slice-extrapolation shift (raw - extrapolated) = {r.extrapolation_shift}")
    print(f"samples {r.samples} in {r.seconds:.1f} s ({r.samples / r.seconds:.0f} per s), {r.rounds} rounds; "
          f"wall incl. retries {wall:.1f} s")
    print(f"error of a_3 after one minute (scaled 1/sqrt(t)): {per_minute:.2e}")
    print(f"time to +-{TARGET_A3:g} on a_3: {'reached in ' + format(r.seconds, '.0f') + ' s' if reached else 'projected ' + format(to_target, '.0f') + ' s'}")
    print(f"load average at the end (1, 5, 15 min): {', '.join(f'{v:.2f}' for v in os.getloadavg())}")


if __name__ == "__main__":
    main()
