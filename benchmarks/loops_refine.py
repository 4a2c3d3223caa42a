"""The pair-product error of the third-order families at n slices, seen directly: each sample's paths are
evaluated as they are (n slices) and again with every slice on which two of the three pairs are near cut
in halves, depth times (`loops.refine`: the midpoints drawn from their exact bridge laws, as for the
flux-tube estimators), and the difference refined - raw is averaged per sample (docs/loops.md, "Exact
phases per time slice").  Values are contributions to b_3 of identical anyons (cycle / 9, triple with its
1/2 and its importance weight), numpy code (not the compiled sampler).

Run:  python benchmarks/loops_refine.py cycle 0.5 32 4 900 11
      python benchmarks/loops_refine.py triple 0.5 32 4 900 12     (family, alpha, slices, depth, seconds, seed)
(figures in loops_refine-last-run.txt; one process per family, two side by side on two cores)
"""
import sys
import time
from pathlib import Path

import numpy as np

sys.path.insert(0, str(Path(__file__).resolve().parent.parent))
from clusterexp.loops.refine import pair_data, path_slices, refine  # noqa: E402
from clusterexp.loops.sampler import WIDTH_TRIPLE, brownian_loops, mixture_offsets  # noqa: E402


def cycle(rng, count, n, alpha, depth):
    x = brownian_loops(rng, count, 3 * n, 3.0)
    bodies = [x[:, 0:n + 1], x[:, n:2 * n + 1], x[:, 2 * n:3 * n + 1]]
    var = 1.0 / n / (2 * np.pi)
    rows, st, en = path_slices(bodies)
    pairs = [(0, 1), (1, 2), (2, 0)]
    out = []
    for d in (0, depth):
        lv = refine(rng, rows, st, en, (1, 1, 1), var, pairs, d)
        ph = np.ones(count, complex)
        for b, c in pairs:
            ph = ph * pair_data(lv, b, c, (1, 1, 1), var, count).phase(alpha)
        out.append(ph.real / 9.0)
    return out


def triple(rng, count, n, alpha, depth):
    y = [brownian_loops(rng, count, n, 1.0) for _ in range(3)]
    off, dens = mixture_offsets(rng, count, WIDTH_TRIPLE, 2)
    rho, eta = off[:, 0], off[:, 1]
    z2 = -np.sqrt(2.0) * rho
    z3 = -rho / np.sqrt(2.0) - np.sqrt(1.5) * eta
    bodies = [y[0], z2[:, None] + y[1], z3[:, None] + y[2]]
    var = 1.0 / n / (2 * np.pi)
    rows, st, en = path_slices(bodies)
    pairs = [(0, 1), (0, 2), (1, 2)]
    out = []
    for d in (0, depth):
        lv = refine(rng, rows, st, en, (1, 1, 1), var, pairs, d)
        f = [pair_data(lv, b, c, (1, 1, 1), var, count).phase(alpha) - 1.0 for b, c in pairs]
        conn = f[0] * f[1] + f[0] * f[2] + f[1] * f[2] + f[0] * f[1] * f[2]
        out.append(0.5 * conn.real / dens)
    return out

def main(argv) -> None:
    kind = argv[0]
    fam = {"cycle": cycle, "triple": triple}[kind]
    alpha, n, depth, budget, seed = float(argv[1]), int(argv[2]), int(argv[3]), float(argv[4]), int(argv[5])
    rng = np.random.default_rng(seed)
    sums, squares, count = np.zeros(3), np.zeros(3), 0
    start = last = time.perf_counter()
    while time.perf_counter() - start < budget:
        raw, ref = fam(rng, 4000, n, alpha, depth)
        for i, v in enumerate((raw, ref, ref - raw)):
            sums[i] += v.sum()
            squares[i] += (v * v).sum()
        count += raw.size
        if time.perf_counter() - last > 60 or time.perf_counter() - start >= budget:
            last = time.perf_counter()
            m = sums / count
            e = np.sqrt((squares / count - m * m) / (count - 1))
            print(f"{kind} a={alpha} n={n} D={depth} N={count} t={last - start:.0f}s raw {m[0]:+.7f}+-{e[0]:.2e} "
                  f"ref {m[1]:+.7f}+-{e[1]:.2e} diff {m[2]:+.3e}+-{e[2]:.2e}", flush=True)


if __name__ == "__main__":
    main(sys.argv[1:])
