"""The table of computed two-loop clusters (clusterexp/routes/two_loop_table.py): regenerate its entries
and measure what each costs as n = p + q grows.

Run:  python benchmarks/two_loop_table.py 3,1 2,2 4,1 ...     (seconds to minutes per cluster; one core)
      python benchmarks/two_loop_table.py --n 5                (every cluster {p, q} with p + q = 5)
      python benchmarks/two_loop_table.py --scalar 2,2         (the scalar engine beside the vectorised one)
      python benchmarks/two_loop_table.py --cycles 7 8         (the k-cycles alone, routes/cycle_alone.py)
      python benchmarks/two_loop_table.py --links 4 5 6 7 8    (the LINK entries at two fine rules)
      python benchmarks/two_loop_table.py --angles 9 10        (the ANGLE entries: the angle-area parts alone)

For each cluster {p-cycle, q-cycle} the vectorised engine (clusterexp/routes/two_loop_fast.py) runs with
its rules for the tolerances 1e-6 and 1e-7; the lines printed for the table are the 1e-7 values of the
part beyond the chains (link^2 + angle-area, one species), of link^2 and of the angle-area parts of each
cycle (two species), each with the error bound max(10 |change between the rules|, 2e-6) of
two_loop_table.py (the floor covers the largest difference with the scalar engine on n = 4..6, 5e-7).
The rational parts the same run computes (the H F contact part and the angle-area part) are printed
beside their exact values as a check of the run. With --scalar the scalar engine
(clusterexp/routes/two_loop_quadrature.py) runs first at the same tolerances and the ratio of wall
times is printed. Side by side, what the package does instead, the closed form of docs/perturbative.md 4k
(`perturbative.taylor_coefficients`, what `expand` and `claim` call), is timed on the same n.
"""
from __future__ import annotations

import sys
import time
from fractions import Fraction
from pathlib import Path

sys.path.insert(0, str(Path(__file__).resolve().parent.parent))

import sympy

from clusterexp.routes import two_loop_fast, two_loop_quadrature
from clusterexp.routes.cycle_alone import k_cycle_orders
from clusterexp.routes.perturbative import Species, taylor_coefficients

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


def _run(engine, name, p, q):
    runs = []
    for tol in TOLERANCES:
        start = time.perf_counter()
        parts = engine(p, q, tol=tol)
        runs.append((tol, time.perf_counter() - start, parts))
        print(f"{{{p},{q}}} n={p + q} {name} tol={tol:g}: {runs[-1][1]:8.1f} s  link2 {parts['link2']:.10f}  "
              f"contact {_near_rational(parts['contact'])}  angle-area of the {p}-cycle "
              f"{_near_rational(parts['angle_p'])}, of the {q}-cycle {_near_rational(parts['angle_q'])}  "
              f"beyond {parts['beyond']:.10f}", flush=True)
    return runs


def _cycles(ks) -> None:
    z = sympy.Symbol("z")
    for k in ks:
        ring = sympy.Rational(1, 2) * sympy.series(sympy.log(1 - z) ** 2 * z / (1 - z), z, 0, k + 1).removeO().coeff(z, k)
        values = []
        for rule in ((8, 8), (10, 12)):
            start = time.perf_counter()
            first, second = k_cycle_orders(k, *rule)
            values.append(second)
            print(f"{k}-cycle alone, rule {rule}: {time.perf_counter() - start:6.1f} s  first order {first:.12f}  "
                  f"second order {second:.12f}  Fock-squared ring part {ring} = {float(ring):.12f}  "
                  f"difference {second - float(ring):.1e}", flush=True)
        print(f"  change between the rules {abs(values[1] - values[0]):.1e}", flush=True)


LINK_RULES = ((12, 16), (14, 20))         # (levels, nodes) of the table's LINK entries
LINK_FLOOR = 1e-11


def _links(ns) -> None:
    """The LINK entries (equal masses) at two fine rules, and the sum rule of docs/perturbative.md 4f:
    over the clusters {p, n - p} (weight 1/2 for p = n - p) the ratios r = link^2/(segments x G1) add up
    to -n(n - 1)/4."""
    print(f"# the link squared of every cluster with p + q = n at the rules {LINK_RULES} (wall seconds)")
    for n in ns:
        total = 0.0
        for p in range(n - 1, (n - 1) // 2, -1):
            q = n - p
            runs = []
            for rule in LINK_RULES:
                start = time.perf_counter()
                segments, g1, link2 = two_loop_fast.link_squared(p, q, 1.0, 1.0, *rule)
                runs.append((link2 / (segments * g1), time.perf_counter() - start))
            (r0, t0), (r1, t1) = runs
            share = 0.5 if p == q else 1.0
            total += share * r1
            unit = share / (p * q)                 # |r| / (p q), halved for p = q: the table's units
            print(f"{{{p},{q}}}: r = {r1:.15f}, change {abs(r1 - r0):.1e} ({t0:.0f} s, {t1:.0f} s)   "
                  f"table entry ({p}, {q}): ({-r1 * unit:.13f}, {max(10 * abs(r1 - r0) * unit, LINK_FLOOR):.0e}),",
                  flush=True)
        print(f"  n = {n}: sum of the weighted r = {total:.15f}, + n(n - 1)/4 = {total + n * (n - 1) / 4:.1e}",
              flush=True)


def _angles(ns) -> None:
    """The ANGLE entries (equal masses): the vectorised engine's angle-area parts alone
    (`two_loop_fast.angle_area`, no link squared) at the rules of the tolerances 1e-6 and 1e-7, normalised
    by `two_loop_quadrature.second_order` itself, beside the derived values of docs/perturbative.md 4i."""
    from clusterexp.routes.angle_area import one_species_units
    from clusterexp.routes.two_loop_quadrature import chord_closed_single

    def angle_only(p, q, tol):          # the tuple of two_loop_parts without its link squared (0 here)
        L, orbits = two_loop_fast.orbits_of(p, q)
        contact, area = two_loop_fast.angle_area(p, q, *two_loop_fast.RULES[tol])
        return L * len(orbits), chord_closed_single(1, 2.0, (p - 1) / p + (q - 1) / q), 0.0, contact, area
    print("# the angle-area parts of every cluster with p + q = n at the rules of the tolerances 1e-6, 1e-7")
    for n in ns:
        for p in range(n - 1, (n - 1) // 2, -1):
            q = n - p
            runs = []
            for tol in TOLERANCES:
                start = time.perf_counter()
                parts = two_loop_quadrature.second_order(p, q, tol, parts=angle_only)
                runs.append((parts["angle_p"], parts["angle_q"], time.perf_counter() - start))
            (p0, q0, t0), (p1, q1, t1) = runs
            exact_p, exact_q = one_species_units(p, q)
            bound_p = max(10 * abs(p1 - p0), FLOOR)
            entry_q = f"({q1:.7f}, {max(10 * abs(q1 - q0), FLOOR):.0e})" if q > 1 else "(0.0, 0.0)"
            print(f"{{{p},{q}}} ({t0:.0f} s, {t1:.0f} s): derived {exact_p}, {exact_q}; off by "
                  f"{abs(p1 - float(exact_p)):.1e}, {abs(q1 - float(exact_q)):.1e}   "
                  f"table entry ({p}, {q}): (({p1:.7f}, {bound_p:.0e}), {entry_q}),", flush=True)


def main(argv) -> None:
    if argv[:1] == ["--angles"]:
        _angles([int(n) for n in argv[1:]])
        return
    if argv[:1] == ["--cycles"]:
        _cycles([int(k) for k in argv[1:]])
        return
    if argv[:1] == ["--links"]:
        _links([int(n) for n in argv[1:]])
        return
    scalar = argv[:1] == ["--scalar"]
    argv = argv[1:] if scalar else argv
    e = sympy.Symbol("e", real=True)
    print("# benchmarks/two_loop_table.py: the engine per cluster, at two tolerances (wall seconds)")
    for p, q in _clusters(argv):
        if scalar:
            slow = _run(lambda p, q, tol: two_loop_quadrature.second_order(p, q, tol), "scalar", p, q)
        runs = _run(two_loop_fast.second_order, "vectorised", p, q)
        if scalar:
            for (tol, t_slow, a), (_, t_fast, b) in zip(slow, runs):
                print(f"  tol {tol:g}: scalar / vectorised wall time = {t_slow / t_fast:.0f}; link2 differs by "
                      f"{abs(a['link2'] - b['link2']):.1e}, beyond by {abs(a['beyond'] - b['beyond']):.1e}", flush=True)
        for key in ("beyond", "link2", "angle_p", "angle_q"):
            change = abs(runs[1][2][key] - runs[0][2][key])
            print(f"  table entry {key}: ({p}, {q}): ({runs[1][2][key]:.7f}, {max(10 * change, FLOOR):.0e}),   "
                  f"change between tolerances {change:.1e}", flush=True)
        n = p + q
        start = time.perf_counter()
        for _ in range(10):
            taylor_coefficients([Species(e)], {}, (n,), "boson", unknown="name")
        lookup = (time.perf_counter() - start) / 10
        print(f"  the package's closed form for b_{n} (taylor_coefficients): {lookup * 1e3:.3f} ms; engine / "
              f"closed form = {runs[1][1] / lookup:.2g}", flush=True)


if __name__ == "__main__":
    main(sys.argv[1:])
