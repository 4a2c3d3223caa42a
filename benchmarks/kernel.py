"""Cluster -> virial conversion: clusterexp's kernel against a straightforward sympy route.

Run:  python benchmarks/kernel.py            (about 5 minutes; the sympy route is capped at 120 s)
      python benchmarks/kernel.py --quick    (kernel only, seconds)

Prints one table: kernel seconds with python-flint and with sympy's rings, the time to convert every
result to sympy expressions, the reference power-table design of the performance notes on the same
flint rings (`table s`, checked to give the same pressure; `ratio` = table / kernel), and the
straightforward route (sympy expressions: expand, substitution, solve) at the largest size it finishes
within its budget, with the ratio measured in this same run.
Run it on an idle machine; the two cores interfere.
"""
from __future__ import annotations

import argparse
import multiprocessing
import random
import statistics
import sys
import time
from pathlib import Path

sys.path.insert(0, str(Path(__file__).resolve().parent.parent))

import sympy  # noqa: E402

from clusterexp.exact.series import PolynomialRing, Series, available_backends, collect_atoms, indices_up_to  # noqa: E402
from clusterexp.exact.series.series import PowerTable, balanced_sum  # noqa: E402
from clusterexp.exact.virial import cluster_to_virial, reduced_clusters, reduced_to_virial  # noqa: E402

G1, G2, G12 = sympy.symbols("g1 g2 g12")


def rational_b(K: int, N: int, seed: int = 1) -> dict:
    """b_n = +-1/(|n|^2 + small integer): exact rationals of modest height."""
    rnd = random.Random(seed)
    return {n: (1 if sum(n) == 1 else sympy.Rational(rnd.choice((-1, 1)), sum(n) ** 2 + rnd.randint(0, 3)))
            for n in indices_up_to(K, N)}


def symbolic_b(K: int, N: int) -> dict:
    return {n: (1 if sum(n) == 1 else sympy.Symbol("b_" + "_".join(map(str, n)))) for n in indices_up_to(K, N)}


def one_level_exclusion_b(N: int) -> dict:
    """Two species sharing one level with statistics g1, g2 and mutual g12 (symmetric): b polynomial
    in three parameters. Built here with the kernel (not timed): u_i = z_i (1+u_i) prod_j (1+u_j)^(-g_ji),
    beta P = sum_i ln(1+u_i)."""
    ring = PolynomialRing(2, [G1, G2, G12])
    g = [[G1, G12], [G12, G2]]
    u = [Series(ring, N, []), Series(ring, N, [])]
    for _ in range(N):
        one_plus = [Series.constant(ring, N, 1) + ui for ui in u]
        u = [Series.variable(ring, N, i) * one_plus[i] * one_plus[0].power(-g[0][i]) * one_plus[1].power(-g[1][i])
             for i in range(2)]
    pressure = (Series.constant(ring, N, 1) + u[0]).log() + (Series.constant(ring, N, 1) + u[1]).log()
    return {n: ring.to_expr(c) for n, c in pressure.coefficients().items()}


def kernel_seconds(b: dict, N: int, backend: str, repeats: int = 3) -> tuple[float, float, int]:
    """Median seconds of the kernel (b already ring elements), and of converting every virial
    coefficient to sympy expressions; the number of output terms."""
    times, convert = [], []
    K = len(next(iter(b)))
    reduced, linear = reduced_clusters(b, K, N)
    ring = PolynomialRing(K, collect_atoms(reduced.values()), backend=backend)
    beta = {n: ring.scalar_or_element(v) for n, v in reduced.items()}
    for _ in range(repeats):
        start = time.perf_counter()
        result = reduced_to_virial(ring, beta, N, linear)
        times.append(time.perf_counter() - start)
        start = time.perf_counter()
        values = [result.virial[n] for n in result.virial]
        convert.append(time.perf_counter() - start)
    terms = sum(len(sympy.Add.make_args(v)) for v in values)
    return statistics.median(times), statistics.median(convert), terms


def power_table_kernel(ring: PolynomialRing, beta: dict, N: int) -> list:
    """The reference design of the performance notes, on the same rings: z_i = rho_i - sum_n n_i beta_n z^n
    solved order by order, every needed part of every power z^n formed once (a `PowerTable`), and
    P_m = sum_i [z_i]_m + sum_n beta_n [z^n]_m. Returns the parts of P (compared with the kernel's)."""
    K = ring.nvars
    z = [[ring.zero, ring.var(i)] for i in range(K)]
    indices = sorted((n for n in beta if sum(n) >= 2), key=lambda n: (sum(n), n))
    table = PowerTable(ring, z, N)
    pressure = [ring.zero, sum((ring.var(i) for i in range(1, K)), ring.var(0))]
    for m in range(2, N + 1):
        table.extend(m, [n for n in indices if sum(n) <= m])
        pieces = {n: table.part(n, m) for n in indices if sum(n) <= m}
        pieces = {n: piece for n, piece in pieces.items() if not ring.is_zero(piece)}
        for i in range(K):
            z[i].append(balanced_sum(ring, [beta[n] * piece * ring.rational(-n[i])
                                            for n, piece in pieces.items() if n[i]]))
        pressure.append(balanced_sum(ring, [z[i][m] for i in range(K)]
                                     + [beta[n] * piece for n, piece in pieces.items()]))
    return pressure


def power_table_seconds(b: dict, N: int, repeats: int = 3) -> float:
    """Median seconds of `power_table_kernel` with python-flint; checks it agrees with the kernel."""
    K = len(next(iter(b)))
    reduced, linear = reduced_clusters(b, K, N)
    ring = PolynomialRing(K, collect_atoms(reduced.values()), backend="flint")
    beta = {tuple(int(e) for e in n): ring.scalar_or_element(v) for n, v in reduced.items()}
    times = []
    for _ in range(repeats):
        start = time.perf_counter()
        pressure = power_table_kernel(ring, beta, N)
        times.append(time.perf_counter() - start)
    if pressure != reduced_to_virial(ring, beta, N, linear).pressure_series.parts:
        raise AssertionError("the power-table kernel and clusterexp's kernel disagree")
    return statistics.median(times)


def straightforward(b: dict, K: int, N: int) -> dict:
    """The textbook route in sympy expressions: ansatz z_i(rho) with unknown coefficients,
    substitute into rho_i(z), expand, truncate, solve; then substitute into P."""
    z = sympy.symbols(f"z0:{K}")
    r = sympy.symbols(f"r0:{K}")
    t = sympy.Symbol("t")
    P = sum(v * sympy.Mul(*(zi ** e for zi, e in zip(z, n))) for n, v in b.items())
    rho = [zi * sympy.diff(P, zi) for zi in z]
    unknowns, ansatz = [], []
    for i in range(K):
        terms = []
        for n in indices_up_to(K, N):
            if sum(n) == 1:
                continue
            c = sympy.Symbol(f"c{i}_" + "_".join(map(str, n)))
            unknowns.append(c)
            terms.append(c * sympy.Mul(*(ri ** e for ri, e in zip(r, n))))
        linear = r[i] / b[tuple(1 if j == i else 0 for j in range(K))]
        ansatz.append(linear + sum(terms))
    scaled = {zi: a.subs({ri: t * ri for ri in r}) for zi, a in zip(z, ansatz)}
    equations = []
    for i in range(K):
        expr = sympy.expand(rho[i].subs(scaled, simultaneous=True))
        series = sympy.series(expr, t, 0, N + 1).removeO()
        for m in range(2, N + 1):
            poly = sympy.Poly(series.coeff(t, m), *r)
            equations += poly.coeffs()
    solution = sympy.solve(equations, unknowns, dict=True)[0]
    zr = {zi: a.subs(solution) for zi, a in zip(z, ansatz)}
    pressure = sympy.expand(P.subs({zi: zr[zi].subs({ri: t * ri for ri in r}) for zi in z}, simultaneous=True))
    pressure = sympy.series(pressure, t, 0, N + 1).removeO().subs(t, 1)
    return sympy.Poly(sympy.expand(pressure), *r).as_dict()


def _timed_straightforward(queue, b, K, N):
    start = time.perf_counter()
    straightforward(b, K, N)
    queue.put(time.perf_counter() - start)


def straightforward_seconds(b: dict, K: int, N: int, budget: float) -> float | None:
    queue = multiprocessing.Queue()
    process = multiprocessing.Process(target=_timed_straightforward, args=(queue, b, K, N))
    process.start()
    process.join(budget)
    if process.is_alive():
        process.terminate()
        process.join()
        return None
    return queue.get() if not queue.empty() else None


CASES = [
    ("K=1, N=8, b_n = 1/n^2", 1, 8, lambda: {(n,): sympy.Rational(1, n * n) for n in range(1, 9)}),
    ("K=2, N=10, rational b", 2, 10, lambda: rational_b(2, 10)),
    ("K=3, N=7, rational b", 3, 7, lambda: rational_b(3, 7)),
    ("K=3, N=8, rational b", 3, 8, lambda: rational_b(3, 8)),
    ("K=2, N=6, fully symbolic b", 2, 6, lambda: symbolic_b(2, 6)),
    ("K=2, N=12, b polynomial in 3 parameters (one-level exclusion)", 2, 12, lambda: one_level_exclusion_b(12)),
    ("K=4, N=16, rational b", 4, 16, lambda: rational_b(4, 16)),
]

STRAIGHTFORWARD = [
    ("K=1 b_n = 1/n^2", 1, lambda N: {(n,): sympy.Rational(1, n * n) for n in range(1, N + 1)}, range(2, 9)),
    ("K=2 one-level exclusion b", 2, lambda N: one_level_exclusion_b(N), range(2, 7)),
]


def main() -> None:
    parser = argparse.ArgumentParser()
    parser.add_argument("--quick", action="store_true", help="kernel only")
    parser.add_argument("--budget", type=float, default=120.0, help="seconds per straightforward run")
    args = parser.parse_args()
    backends = available_backends()
    print("kernel seconds (median of 3; b as ring elements), sympy-expression conversion of all results,")
    print("and end-to-end cluster_to_virial from sympy b (input conversion included), flint:")
    print(f"{'case':62s} " + " ".join(f"{b + ' s':>10s}" for b in backends)
          + f" {'convert s':>10s} {'total s':>9s} {'terms':>7s} {'table s':>8s} {'ratio':>6s}")
    for name, K, N, make in CASES:
        b = make()
        row, convert, terms = [], None, None
        for backend in backends:
            if backend == "sympy" and K == 4:
                row.append(float("nan"))
                continue
            seconds, conv, terms = kernel_seconds(b, N, backend)
            row.append(seconds)
            convert = conv if convert is None else convert
        start = time.perf_counter()
        result = cluster_to_virial(b, N)
        [result.virial[n] for n in result.virial]
        total = time.perf_counter() - start
        table = power_table_seconds(b, N, repeats=1 if K == 4 else 3)
        print(f"{name:62s} " + " ".join(f"{s:10.4f}" for s in row) + f" {convert:10.4f} {total:9.4f} {terms:7d}"
              f" {table:8.4f} {table / row[0]:5.1f}x")
    if args.quick:
        return
    print()
    print("straightforward sympy route against the kernel (flint), same run:")
    for name, K, make, orders in STRAIGHTFORWARD:
        best = None
        for N in orders:
            b = make(N)
            seconds = straightforward_seconds(b, K, N, args.budget)
            if seconds is None:
                print(f"  {name}, N={N}: did not finish in {args.budget:.0f} s")
                break
            best = (N, seconds, kernel_seconds(b, N, backends[0])[0])
            print(f"  {name}, N={N}: straightforward {seconds:8.3f} s, kernel {best[2]:.5f} s, "
                  f"ratio {seconds / best[2]:,.0f}x")
        if best:
            print(f"  -> largest size within budget: N={best[0]}, ratio {best[1] / best[2]:,.0f}x")


if __name__ == "__main__":
    main()
