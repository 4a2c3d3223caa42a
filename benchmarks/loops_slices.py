"""Correlated slice study of the third-order families (docs/loops.md, "Correlated slice study"): the same
loops seen at n, n/2, n/4, n/8 slices (every 1st, 2nd, 4th, 8th point of an n-slice path), with the
differences V(n) - V(n/2) averaged per sample, which resolves the slice dependence far better than
independent runs at each n.

Run:  python benchmarks/loops_slices.py --alpha 0.5 --slices 64 --budget 1500 --seed 11
      python benchmarks/loops_slices.py --alpha 0.25 --slices 64 --budget 1500 --seed 12
(figures in loops_slices-last-run.txt; each run is one process, so two run side by side on two cores)

Values are contributions to b_3: the cycle family divided by 9 (as in the estimator), the triple family
with its prefactor 1/2 of identical anyons, the exchange family with its 1/4, all at the full statistics
parameter (the exchange family with --families exchange).
"""
from __future__ import annotations

import argparse
import os
import sys
import time
from pathlib import Path

import numpy as np

sys.path.insert(0, str(Path(__file__).resolve().parent.parent))

from clusterexp.loops.sampler import CycleSamples, ExchangeSamples, TripleSamples  # noqa: E402

STRIDES = (1, 2, 4, 8)
BATCH = 400


FAMILIES = ("cycle", "triple", "exchange")


def study(alpha: float, slices: int, budget: float, seed: int, families=FAMILIES[:2]) -> dict:
    rng = np.random.default_rng(seed)
    levels = [slices // s for s in STRIDES]
    keys = [f"V({m})" for m in levels] + [f"V({levels[k]}) - V({levels[k + 1]})" for k in range(3)]
    sums = {f: {k: np.zeros(2) for k in keys} for f in families}
    counts = {f: 0 for f in families}
    start = time.perf_counter()
    while time.perf_counter() - start < budget:
        for family, values in [(f, MAKERS[f](rng, slices, alpha)) for f in families]:
            items = {f"V({m})": v for m, v in zip(levels, values)}
            items.update({f"V({levels[k]}) - V({levels[k + 1]})": values[k] - values[k + 1] for k in range(3)})
            for key, x in items.items():
                sums[family][key] += (x.sum(), (x * x).sum())
            counts[family] += BATCH
    out = {"seconds": time.perf_counter() - start}
    for family, table in sums.items():
        n = counts[family]
        out[family] = {"samples": n}
        for key, (s1, s2) in table.items():
            mean = s1 / n
            out[family][key] = (mean, float(np.sqrt((s2 / n - mean * mean) / (n - 1))))
    return out


def _cycle(rng, slices, alpha):
    samples = CycleSamples(rng, BATCH, slices, STRIDES)
    return [samples.values(alpha, s) for s in STRIDES]


def _triple(rng, slices, alpha):
    samples = TripleSamples(rng, BATCH, slices, STRIDES)
    return [samples.values(alpha, alpha, alpha, 0.5, s) for s in STRIDES]


def _exchange(rng, slices, alpha):
    samples = ExchangeSamples(rng, BATCH, slices, STRIDES)
    return [samples.values(alpha, alpha, s) for s in STRIDES]


MAKERS = {"cycle": _cycle, "triple": _triple, "exchange": _exchange}


def main() -> None:
    parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    parser.add_argument("--alpha", type=float, default=0.5)
    parser.add_argument("--slices", type=int, default=64)
    parser.add_argument("--budget", type=float, default=600.0, help="wall seconds")
    parser.add_argument("--seed", type=int, default=11)
    parser.add_argument("--families", default="cycle,triple", help=f"comma-separated, of {', '.join(FAMILIES)}")
    args = parser.parse_args()
    print(f"# loops_slices: alpha = {args.alpha:g}, slices {args.slices} seen at strides {STRIDES}, "
          f"budget {args.budget:g} s, seed {args.seed}, load average {os.getloadavg()[0]:.2f}", flush=True)
    families = tuple(args.families.split(","))
    result = study(args.alpha, args.slices, args.budget, args.seed, families)
    for family in families:
        print(f"{family} ({result[family]['samples']} samples, {result['seconds']:.0f} s):")
        for key, value in result[family].items():
            if key != "samples":
                mean, err = value
                print(f"  {key:<18} {mean:+.7f} +- {err:.2e}")


if __name__ == "__main__":
    main()
