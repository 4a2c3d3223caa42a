"""The k-cycle alone at second order, summed exactly (clusterexp/routes/cycle_square.py, docs/perturbative.md
4l), side by side with the routes it replaces, in one run:

* the quadrature of the same pair decomposition (routes/cycle_alone.k_cycle_orders at the rule (8, 8): scipy
  for the single pairs, the graded rule of two_loop_fast for the pairs of pairs), which the package ran on
  demand for n = 11 .. 16 (minutes each) before 4l;
* the straightforward route to the same closed pieces: every distinct half lag integral by mpmath's
  adaptive quadrature at 25 digits, the single pairs by mpmath's dilogarithm;
* the exact sum (surd logarithms, dilogarithms by argument, canonical form).

Printed per k: seconds of each route, the ratios, the difference of each from the ring part; then the
growth with k of the exact sum alone (k = 10 .. 40). Figures in cycle_square-last-run.txt.

Run:  python benchmarks/cycle_square.py          (about two minutes of one core)
"""
from __future__ import annotations

import sys
import time
from fractions import Fraction
from pathlib import Path

sys.path.insert(0, str(Path(__file__).resolve().parent.parent))

import mpmath  # noqa: E402

from clusterexp.routes import cycle_alone, cycle_square  # noqa: E402


def _mp(x: Fraction) -> mpmath.mpf:
    return mpmath.mpf(x.numerator) / x.denominator


def by_adaptive_quadrature(k: int) -> mpmath.mpf:
    """The k-cycle's alpha^2 coefficient from the same pieces, every half lag integral by mpmath.quad."""
    with mpmath.workdps(25):
        halves, shared, lags = cycle_square._lag_classes(k)
        total = mpmath.mpf(0)
        for j, count in lags.items():
            v = Fraction(j * (k - j), k)
            total += count * (mpmath.polylog(2, _mp(((v - 1) / v) ** 2)) / 4 - mpmath.pi ** 2 / 24)
        for (c0, c1, V), count in halves.items():
            a, sigma, big = _mp(c0), _mp(c1 - c0), _mp(V)

            def integrand(w):
                c = a + sigma * w
                log_part = -1 / big if c == 0 else mpmath.log(abs(1 - c * c / big)) / (c * c)   # (rounding at a corner)
                return (1 - w) * (1 / (big - c * c) + sigma ** 2 / 2 * log_part)
            total += count * mpmath.quad(integrand, [0, 1])
        for (c0, V), count in shared.items():
            total += count * mpmath.log(1 - _mp(c0 * c0 / V)) / (2 * _mp(c0))
        return total / k ** 2


def main() -> None:
    print(f"# benchmarks/cycle_square.py, {time.strftime('%Y-%m-%d %H:%MZ', time.gmtime())}")
    print(f"{'k':>3} {'exact s':>9} {'mpmath s':>9} {'scipy s':>9} {'mp/ex':>7} {'sc/ex':>7} "
          f"{'mpmath - ring':>14} {'scipy - ring':>13}  exact")
    for k in (4, 6, 8, 10, 12):
        cycle_square.cycle_square.cache_clear()
        start = time.perf_counter()
        exact = cycle_square.cycle_square(k)
        t_exact = time.perf_counter() - start
        ring = cycle_square.ring_part(k)
        start = time.perf_counter()
        mp_value = by_adaptive_quadrature(k)
        t_mp = time.perf_counter() - start
        with mpmath.workdps(25):
            mp_difference = float(mp_value - _mp(ring))
        start = time.perf_counter()
        sc_value = cycle_alone.k_cycle_orders(k, 8, 8)[1]
        t_sc = time.perf_counter() - start
        print(f"{k:>3} {t_exact:9.3f} {t_mp:9.2f} {t_sc:9.2f} {t_mp / t_exact:7.0f} {t_sc / t_exact:7.0f} "
              f"{mp_difference:14.1e} {sc_value - float(ring):13.1e}  {exact}", flush=True)
    print("# the exact sum alone (k-cycle = ring part checked each time)")
    for k in (10, 16, 20, 30, 40):
        cycle_square.cycle_square.cache_clear()
        start = time.perf_counter()
        exact = cycle_square.cycle_square(k)
        print(f"{k:>3} {time.perf_counter() - start:9.2f} s  equals the ring part: {exact == cycle_square.ring_part(k)}",
              flush=True)


if __name__ == "__main__":
    main()
