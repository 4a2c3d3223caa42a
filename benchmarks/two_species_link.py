"""The d_ij^2 coefficient of two species at unequal masses, computed on demand (clusterexp/routes/two_species_link.py):
what each cluster costs as |n| grows, how far the two quadrature rules agree, and whether the bound (ten times
their change) holds against a third, finer rule where they agree least (the largest mass ratio).

Run:  python benchmarks/two_species_link.py          (about twenty minutes of one core; figures in
                                                      two_species_link-last-run.txt)
      python benchmarks/two_species_link.py 7        (one |n|)

For every cluster {a-cycle of species i, b-cycle of species j}, a + b = |n|, at masses (m_i, m_j) = (2, 1):
the seconds of each rule (`two_species_link.RULES`, the engine's tolerances 1e-6 and 1e-7), the value per unit of
m_j, the change between the rules and the bound; then the same cluster through the tool's path
(`link_squared_coefficient`, cached: what every later `expand` or `claim` of the run pays), side by side. At the
mass ratio 100 (both orders of the species) the largest cluster of each |n| is run at a third rule (levels 12,
nodes 16) to see the finer rule's own error against the bound.
"""
from __future__ import annotations

import sys
import time
from fractions import Fraction
from pathlib import Path

sys.path.insert(0, str(Path(__file__).resolve().parent.parent))

from clusterexp.routes import two_loop_fast, two_species_link  # noqa: E402
from clusterexp.routes.angle_area import first_order_normalisation  # noqa: E402

THIRD_RULE = (12, 16)


def _rules(a: int, b: int, ratio: Fraction, rules) -> list[tuple[float, float]]:
    """(value per unit m_j, seconds) at each rule, a >= b, m_i/m_j = ratio."""
    norm = float(first_order_normalisation(a, b, ratio, 1, 1))
    out = []
    for rule in rules:
        start = time.perf_counter()
        _, _, link2 = two_loop_fast.link_squared(a, b, float(1 / ratio), 1.0, *rule)
        out.append((norm * link2, time.perf_counter() - start))
    return out


def main(argv) -> None:
    sizes = [int(argv[0])] if argv else [7, 8]
    print(f"# benchmarks/two_species_link.py {' '.join(argv)}, {time.strftime('%Y-%m-%d %H:%MZ', time.gmtime())}, "
          f"MAX_PARTICLES = {two_species_link.MAX_PARTICLES}", flush=True)
    rules = [rule for _, rule in two_species_link.RULES]
    for n in sizes:
        print(f"|n| = {n}, masses (m_i, m_j) = (2, 1)", flush=True)
        for a in range(n - 1, 0, -1):
            b = n - a
            p, q, ratio = (a, b, Fraction(2)) if a >= b else (b, a, Fraction(1, 2))
            runs = _rules(p, q, ratio, rules)
            change = abs(runs[1][0] - runs[0][0])
            start = time.perf_counter()
            value, bound = two_species_link.link_squared_coefficient(a, b, 2, 1)
            tool = time.perf_counter() - start
            start = time.perf_counter()
            two_species_link.link_squared_coefficient(a, b, 2, 1)
            cached = time.perf_counter() - start
            print(f"  {{{a}-cycle of i, {b}-cycle of j}}: rules {runs[0][1]:5.1f} s + {runs[1][1]:5.1f} s, "
                  f"per m_j {runs[1][0]:.8f}, change {change:.1e}; tool {value:.7f} +- {bound:.0e} in {tool:5.1f} s, "
                  f"cached {cached * 1e3:.3f} ms", flush=True)
        a, b = (n + 1) // 2, n // 2
        for ratio in (Fraction(100), Fraction(1, 100)):
            runs = _rules(a, b, ratio, rules + [THIRD_RULE])
            change = abs(runs[1][0] - runs[0][0])
            bound = max(two_species_link.MARGIN * change, two_species_link.FLOOR * float(max(ratio, 1)))
            third = abs(runs[2][0] - runs[1][0])
            print(f"  ratio {ratio}, {{{a}, {b}}}: rules {runs[1][0]:.8f} (change {change:.1e}, bound {bound:.1e}), "
                  f"third rule {runs[2][0]:.8f} in {runs[2][1]:.0f} s moves it by {third:.1e}: "
                  f"{'within' if third <= bound else 'OUTSIDE'} the bound", flush=True)


if __name__ == "__main__":
    main(sys.argv[1:])
