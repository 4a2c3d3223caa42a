"""Exactly solvable regimes: exclusion route, spectral (harmonic-regulator) route, and the
straightforward sympy alternatives, timed side by side in one run.

Run:  python benchmarks/regimes.py          (about a minute)
      python benchmarks/regimes.py --quick  (our routes only)

Cases (targets from the issue): LLL cluster + virial coefficients, K = 2 with three symbolic parameters
to total order 12 and K = 3 with six to order 7 through the exclusion route (<= 0.5 s each); the
spectral route for the same K = 2 case to order 8 (<= 2 s); one-species exclusion with symbolic g to
order 40 (<= 0.5 s). The straightforward routes: sympy's `series` for the Laurent expansion the spectral
route needs, and Wu's equations iterated with sympy expressions.
"""
from __future__ import annotations

import argparse
import statistics
import sys
import time
from pathlib import Path

sys.path.insert(0, str(Path(__file__).resolve().parent.parent))

import sympy  # noqa: E402

import clusterexp  # noqa: E402


def seconds(fn, repeats=3):
    times = []
    for _ in range(repeats):
        start = time.perf_counter()
        fn()
        times.append(time.perf_counter() - start)
    return statistics.median(times)


def derive_all(text):
    d = clusterexp.derive(text)
    d.system  # noqa: B018
    # touch every coefficient through the fast printer (no sympy expressions built)
    return [c.terms for c in d]


K2 = ("dimension 2 parameter g1, g2, g12 in [0, 1] species A exchange g1 species B exchange g2 mutual A B = g12 "
      "clusters landau{route} derive cluster up to {N} derive virial up to {N}")
K3 = ("dimension 2 parameter a1, a2, a3, a12, a13, a23 in [0, 1] species A exchange a1 species B exchange a2 "
      "species C exchange a3 mutual A B = a12 mutual A C = a13 mutual B C = a23 clusters landau "
      "derive cluster up to 7 derive virial up to 7")
ONE = "dimension 2 parameter g species A exchange g clusters exclusion level derive cluster up to 40 derive virial up to 40"


def sympy_laurent(order):
    t, c = sympy.symbols("t c")
    start = time.perf_counter()
    sympy.series(sympy.exp(-c * t) / (1 - sympy.exp(-t)) ** 2, t, 0, order)
    return time.perf_counter() - start


def sympy_wu_iteration(N):
    """One species on one level, u = z (1+u)^(1-g), iterated with sympy `series` (the straightforward route)."""
    z, g = sympy.symbols("z g")
    start = time.perf_counter()
    u = sympy.Integer(0)
    for _ in range(N):
        u = sympy.series(z * (1 + u) ** (1 - g), z, 0, N + 1).removeO()
    sympy.series(sympy.log(1 + u), z, 0, N + 1)
    return time.perf_counter() - start


def main():
    parser = argparse.ArgumentParser()
    parser.add_argument("--quick", action="store_true")
    args = parser.parse_args()
    rows = [
        ("LLL K=2, 3 symbols, order 12, exclusion route (b and a)", K2.format(route="", N=12), 0.5),
        ("LLL K=3, 6 symbols, order 7, exclusion route (b and a)", K3, 0.5),
        ("LLL K=2, 3 symbols, order 8, spectral route (b and a)", K2.format(route=" spectrum", N=8), 2.0),
        ("one species, symbolic g, order 40, exclusion (b and a)", ONE, 0.5),
    ]
    print(f"{'case':60s} {'seconds':>9s} {'target':>7s}")
    for label, text, target in rows:
        s = seconds(lambda: derive_all(text))
        print(f"{label:60s} {s:9.3f} {target:7.1f}  {'ok' if s <= target else 'MISSED'}")
    if args.quick:
        return
    print("\nstraightforward sympy routes, same run:")
    ours = seconds(lambda: derive_all("dimension 2 parameter g species A exchange g clusters exclusion level "
                                      "derive cluster up to 6"))
    for N in (4, 5, 6):
        s = sympy_wu_iteration(N)
        print(f"  Wu's equation iterated with sympy series, order {N}: {s:8.2f} s")
    print(f"  clusterexp, same quantity to order 6 (with parsing): {ours:.4f} s -> ratio {s / ours:,.0f}x")
    s = sympy_laurent(20)
    ring = seconds(lambda: clusterexp.routes.spectrum.series_in_t(
        sympy.exp(0) * sympy.Symbol("x") ** sympy.Symbol("c") / (1 - sympy.Symbol("x")) ** 2,
        clusterexp.exact.series.PolynomialRing(0, [sympy.Symbol("c")]), 20, "bench"))
    print(f"  Laurent series of x^c/(1-x)^2, x = e^-t, to t^20: sympy.series {s:.2f} s, ring {ring:.4f} s "
          f"-> ratio {s / ring:,.0f}x")


if __name__ == "__main__":
    import clusterexp.routes.spectrum  # noqa: F401
    main()
