"""The link squared of the two-loop clusters in closed form (clusterexp/routes/link_integrals.py, docs/
perturbative.md 4k), side by side with the routes it replaces, in one run:

* the two-dimensional quadrature engine of 4f (routes/two_loop_fast.link_squared at its rule (10, 12), the
  one the package ran on demand for unequal masses; timed on a few clusters);
* the same one-dimensional integrals of 4k by mpmath's adaptive quadrature (the straightforward route to
  the same numbers: tanh-sinh on [0, 1] per lag pair, 25 digits);
* the closed form (logarithms of the roots of each quadratic, 40 digits).

Printed per cluster: seconds of each route, the ratios, and the largest difference between the values;
then the growth with n of the closed form (every cluster of n, n = 4 .. 30). Last, the exact expression:
the package's surd arithmetic with its canonical form (`exact_ratio`, routes/surd_logs.py) beside the
straightforward sympy route it replaced (the same formulas in sympy numbers, then sympy.simplify of the
expanded logarithms), with the number of terms each prints (the sympy route of the sixteenth session
used the roots' plain formula, which sympy simplifies faster: 0.07 to 0.43 s for these and a few more
clusters, measured on commit 48edff3; its forms were logarithms of products with surd exponents).
Figures in link_integrals-last-run.txt.

Run:  python benchmarks/link_integrals.py            (about a minute of one core, most of it the engine)
"""
from __future__ import annotations

import sys
import time
from pathlib import Path

sys.path.insert(0, str(Path(__file__).resolve().parent.parent))

import mpmath  # noqa: E402
import sympy  # noqa: E402

from clusterexp.routes import link_integrals, two_loop_fast  # noqa: E402
from clusterexp.routes.angle_area import first_order_normalisation  # noqa: E402

CASES = ((3, 1, 1, 1), (2, 2, 1, 1), (3, 2, 2, 1), (4, 2, 1, 3), (3, 3, 1, 10))


def by_adaptive_quadrature(p: int, q: int, m_i, m_j) -> mpmath.mpf:
    """r(p, q) from (4k.2)-(4k.3) with every integral by mpmath.quad instead of its closed form."""
    with mpmath.workdps(25):
        dx, dy = mpmath.mpf(1) / m_i, mpmath.mpf(1) / m_j
        drel = dx + dy

        def per_segment(p, q):
            def s(x, period):
                return x * (period - x) / period
            logs, poles = 0, 0
            for dj in range(p):
                for di in range(q):
                    def Q(u, dj=dj, di=di):
                        return dx * s(u + dj, p) + dy * s(u + di, q)
                    logs += mpmath.quad(lambda u: (1 - u) * mpmath.log(Q(u)), [0, 1])
                    if dj == 0 and di == 0:
                        poles += mpmath.quad(lambda u: (1 - u) * (1 / Q(u) - 1 / (drel * u)), [0, 1])
                    else:
                        poles += mpmath.quad(lambda u: (1 - u) / Q(u), [0, 1])
            area = -(2 * dx / p + 2 * dy / q) * 2 * logs + 2 * drel * mpmath.log(drel)
            area += sum(2 * dx * mpmath.log(dy * s(di, q)) for di in range(1, q))
            area += sum(2 * dy * mpmath.log(dx * s(dj, p)) for dj in range(1, p))
            return mpmath.pi * area / 2 + (2 * mpmath.pi * drel) ** 2 * (2 * poles / (4 * mpmath.pi)) / 2
        local = 2 * mpmath.pi * drel - per_segment(1, 1)
        return (per_segment(p, q) + local) / (-2 * mpmath.pi * drel)


def by_engine(p: int, q: int, m_i, m_j) -> float:
    """r(p, q) from the engine's link squared, normalised as two_species_link does (P link^2 is the
    coefficient, -(m_i + m_j) r / (2 p q) too)."""
    norm = float(first_order_normalisation(p, q, m_i, m_j, 1))
    _, _, link2 = two_loop_fast.link_squared(p, q, 1 / m_i, 1 / m_j, 10, 12)
    return -2 * p * q * norm * link2 / (m_i + m_j)


def timed(f, *args):
    start = time.perf_counter()
    value = f(*args)
    return value, time.perf_counter() - start


def main() -> None:
    print(f"# benchmarks/link_integrals.py, {time.strftime('%Y-%m-%d %H:%MZ', time.gmtime())}", flush=True)
    print("cluster {p, q} at masses m_i : m_j | engine s | adaptive s | closed s | engine/closed | adaptive/closed"
          " | |engine - closed| | |adaptive - closed|", flush=True)
    for p, q, m_i, m_j in CASES:
        link_integrals._ratio.cache_clear()
        closed, t_closed = timed(link_integrals.ratio, p, q, m_i, m_j)
        adaptive, t_adaptive = timed(by_adaptive_quadrature, p, q, m_i, m_j)
        engine, t_engine = timed(by_engine, p, q, m_i, m_j)
        print(f"{{{p}, {q}}} at {m_i}:{m_j} | {t_engine:.2f} | {t_adaptive:.3f} | {t_closed:.4f} | "
              f"{t_engine / t_closed:.0f} | {t_adaptive / t_closed:.0f} | {abs(engine - float(closed)):.1e} | "
              f"{float(abs(adaptive - closed)):.1e}", flush=True)
    print("growth with n (closed form, every cluster {p, n - p} at equal masses, and at masses 1 : 1000):", flush=True)
    for n in (4, 6, 8, 10, 12, 16, 20, 30):
        link_integrals._ratio.cache_clear()
        start = time.perf_counter()
        for p in range(1, n):
            link_integrals.ratio(p, n - p)
        equal = time.perf_counter() - start
        start = time.perf_counter()
        for p in range(1, n):
            link_integrals.coefficient(p, n - p, 1, 1000)
        unequal = time.perf_counter() - start
        terms = sum(p * (n - p) for p in range(1, n))
        print(f"  n = {n:2d}: {n - 1} clusters, {terms} lag pairs: {equal:.3f} s; at 1 : 1000 with the bound "
              f"(two precisions) {unequal:.3f} s", flush=True)
    print("exact expression: cluster | surd arithmetic s (terms) | sympy + simplify s (terms) | ratio | equal to 40 digits",
          flush=True)
    for p, q, m_i, m_j in ((3, 1, 1, 1), (2, 2, 1, 1), (3, 2, 1, 1)):   # {3, 2} at 2 : 1 took sympy over 4 minutes
        link_integrals._exact_ratio.cache_clear()
        exact, t_exact = timed(link_integrals.exact_ratio, p, q, m_i, m_j)
        plain, t_plain = timed(by_sympy, p, q, m_i, m_j)
        same = abs(sympy.N(exact - plain, 40)) < 1e-35
        print(f"  {{{p}, {q}}} at {m_i}:{m_j} | {t_exact:.3f} ({len(sympy.Add.make_args(exact))}) | {t_plain:.2f} "
              f"({len(sympy.Add.make_args(plain))}) | {t_plain / t_exact:.0f} | {same}", flush=True)


def by_sympy(p: int, q: int, m_i, m_j):
    """r(p, q) exactly in sympy numbers (the route before routes/surd_logs.py): the same `_closed_form`,
    then sympy.simplify of the expanded logarithms."""
    ops = link_integrals._Arithmetic(lambda x: sympy.Rational(x.numerator, x.denominator), sympy.log, sympy.sqrt,
                                     sympy.Abs)
    dx = link_integrals._diffusion(p, q, m_i, m_j)
    value = link_integrals._closed_form(p, q, dx, 1 - dx, ops)
    return sympy.simplify(sympy.expand_log(sympy.expand(value), force=True))


if __name__ == "__main__":
    main()
