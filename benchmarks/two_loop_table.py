"""The table of computed two-loop clusters (clusterexp/routes/two_loop_table.py): regenerate its entries
and measure what each costs as n = p + q grows.

Run:  python benchmarks/two_loop_table.py 3,1 2,2 4,1 ...     (minutes per cluster; one core each)
      python benchmarks/two_loop_table.py --n 5                (every cluster {p, q} with p + q = 5)

For each cluster {p-cycle, q-cycle} the quadrature engine (clusterexp/routes/two_loop_quadrature.py) runs
at the tolerances 1e-6 and 1e-7; the lines printed for the table are the 1e-7 values of the part beyond
the chains (link^2 + angle-area, one species), of link^2 and of the angle-area parts of each cycle (two
species), each with the error bound max(10 |change between the tolerances|, 2e-6) of two_loop_table.py. The rational parts the same run computes (the H F contact part and the angle-area
part) are printed beside their exact values as a check of the run. Side by side, the lookup the package
does instead (`perturbative.numerical_coefficients`, what `expand` and `claim` call) is timed on the same
n: the ratio is what the table saves a user.
"""
from __future__ import annotations

import sys
import time
from fractions import Fraction
from pathlib import Path

sys.path.insert(0, str(Path(__file__).resolve().parent.parent))

import sympy  # noqa: E402

from clusterexp.routes.perturbative import Species, numerical_coefficients  # noqa: E402
from clusterexp.routes.two_loop_quadrature import second_order  # noqa: E402

TOLERANCES = (1e-6, 1e-7)
FLOOR = 2e-6


def _clusters(argv):
    if argv[:1] == ["--n"]:
        n = int(argv[1])
        return [(p, n - p) for p in range(n - 1, (n - 1) // 2, -1)]
    return [tuple(int(x) for x in a.split(",")) for a in argv]


def _near_rational(x: float) -> str:
    f = Fraction(x).limit_denominator(200)
    return f"{x:.9f} (~{f}, off {abs(x - float(f)):.1e})"


def main(argv) -> None:
    e = sympy.Symbol("e", real=True)
    print("# benchmarks/two_loop_table.py: the quadrature engine per cluster, at two tolerances (wall seconds)")
    for p, q in _clusters(argv):
        runs = []
        for tol in TOLERANCES:
            start = time.perf_counter()
            parts = second_order(p, q, tol=tol)
            runs.append((tol, time.perf_counter() - start, parts))
            print(f"{{{p},{q}}} n={p + q} tol={tol:g}: {runs[-1][1]:8.1f} s  link2 {parts['link2']:.10f}  "
                  f"contact {_near_rational(parts['contact'])}  angle-area of the {p}-cycle "
                  f"{_near_rational(parts['angle_p'])}, of the {q}-cycle {_near_rational(parts['angle_q'])}  "
                  f"beyond {parts['beyond']:.10f}", flush=True)
        for key in ("beyond", "link2", "angle_p", "angle_q"):
            change = abs(runs[1][2][key] - runs[0][2][key])
            print(f"  table entry {key}: ({p}, {q}): ({runs[1][2][key]:.7f}, {max(10 * change, FLOOR):.0e}),   "
                  f"change between tolerances {change:.1e}", flush=True)
        n = p + q
        start = time.perf_counter()
        for _ in range(100):
            numerical_coefficients([Species(e)], {}, (n,), "boson")
        lookup = (time.perf_counter() - start) / 100
        print(f"  package lookup for b_{n} (numerical_coefficients): {lookup * 1e3:.3f} ms; engine / lookup = "
              f"{runs[1][1] / lookup:.2g}", flush=True)


if __name__ == "__main__":
    main(sys.argv[1:])
