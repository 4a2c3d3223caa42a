"""The d_ij^2 coefficient of two species at unequal masses, computed on demand (clusterexp/routes/two_species_link.py):
what each cluster costs as |n| grows, how far the two quadrature rules agree, and whether the bound (ten times
their change) holds against a third, finer rule where they agree least (the largest mass ratio).

Run:  python benchmarks/two_species_link.py          (about twenty minutes of one core; figures in
                                                      two_species_link-last-run.txt)
      python benchmarks/two_species_link.py 7        (one |n|)
      python benchmarks/two_species_link.py --tool 9 (the tool's path only: each rule once, not twice)
      python benchmarks/two_species_link.py --far 4 5   (mass ratios 10^3 .. 10^5, three rules and a fourth)
      python benchmarks/two_species_link.py --kappa [5,2 ...]   (the heavy cycle's logarithm, docs/perturbative.md 4j;
                                                                 pairs heavy,light; default all)

For every cluster {a-cycle of species i, b-cycle of species j}, a + b = |n|, at masses (m_i, m_j) = (2, 1):
the seconds of each rule (`two_species_link.RULES`, the engine's tolerances 1e-6 and 1e-7), the value per unit of
m_j, the change between the rules and the bound; then the same cluster through the tool's path
(`link_squared_coefficient`, cached: what every later `expand` or `claim` of the run pays), side by side. At the
mass ratio 100 (both orders of the species) the largest cluster of each |n| is run at a third rule (levels 12,
nodes 16) to see the finer rule's own error against the bound.
"""
from __future__ import annotations

import math
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
    tool_only = "--tool" in argv
    sizes = [int(x) for x in argv if x != "--tool"] or [7, 8]
    print(f"# benchmarks/two_species_link.py {' '.join(argv)}, {time.strftime('%Y-%m-%d %H:%MZ', time.gmtime())}, "
          f"MAX_PARTICLES = {two_species_link.MAX_PARTICLES}", flush=True)
    rules = list(two_species_link.RULES)
    for n in sizes:
        print(f"|n| = {n}, masses (m_i, m_j) = (2, 1)", flush=True)
        for a in range(n - 1, 0, -1):
            b = n - a
            if tool_only:
                _tool_path(a, b)
                continue
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


def _tool_path(a: int, b: int) -> None:
    """The tool's path alone (both rules once, inside `link_squared_coefficient`): value, bound, seconds."""
    start = time.perf_counter()
    value, bound = two_species_link.link_squared_coefficient(a, b, 2, 1)
    tool = time.perf_counter() - start
    print(f"  {{{a}-cycle of i, {b}-cycle of j}}: tool {value:.7f} +- {bound:.0e} in {tool:5.1f} s (both rules)",
          flush=True)


FOURTH_RULE = (8, 32, 12)    # finer than FAR_RULES: more Gauss points per panel and a deeper grading toward x + y = 1


def far(sizes) -> None:
    """Beyond MAX_RATIO: every cluster of each |n| at the mass ratios 10^3, 10^4, 10^5 (both orders of the species)
    through the tool's path (three rules, a number only where they converge), and a fourth, finer rule to see whether
    the bound of each accepted number holds."""
    print(f"# benchmarks/two_species_link.py --far {' '.join(map(str, sizes))}, "
          f"{time.strftime('%Y-%m-%d %H:%MZ', time.gmtime())}, FAR_RATIO = {two_species_link.FAR_RATIO}, "
          f"FAR_RULES = {two_species_link.FAR_RULES}", flush=True)
    for n in sizes:
        for a in range(n - 1, 0, -1):
            b = n - a
            if a < b:
                continue
            for ratio in (Fraction(10 ** 3), Fraction(10 ** 4), Fraction(10 ** 5)):
                for rr in ((ratio, 1 / ratio) if a != b else (ratio,)):
                    start = time.perf_counter()
                    value, bound = two_species_link._at_ratio(a, b, rr)
                    tool = time.perf_counter() - start
                    heavy = f"heavy {a}-cycle" if rr > 1 else f"heavy {b}-cycle"
                    if value is None:
                        print(f"  {{{a}, {b}}} {heavy}, ratio {rr}: no number ({bound}); {tool:.0f} s", flush=True)
                        continue
                    (fourth, seconds), = _rules(a, b, rr, [FOURTH_RULE])
                    moved = abs(fourth - value)
                    print(f"  {{{a}, {b}}} {heavy}, ratio {rr}: per m_j {value:.9f} +- {bound:.1e} in {tool:.0f} s; "
                          f"fourth rule {FOURTH_RULE} in {seconds:.0f} s moves it by {moved:.1e}: "
                          f"{'within' if moved <= bound else 'OUTSIDE'} the bound", flush=True)


KAPPA_CASES = ((2, 1), (3, 1), (4, 1), (5, 1), (2, 2), (2, 3), (2, 4), (2, 5),     # (heavy cycle, light cycle)
               (3, 2), (4, 2), (3, 3), (5, 2), (4, 3), (6, 1))
KAPPA_RULES = two_species_link.FAR_RULES[-2:]


def kappa_law(a: int, b: int) -> Fraction:
    """The observed law of docs/perturbative.md 4j (not derived): [C(a, 3) - (b - 1) C(a, 2)]/(a b)^2."""
    return Fraction(math.comb(a, 3) - (b - 1) * math.comb(a, 2), (a * b) ** 2)


def kappa(cases) -> None:
    """The logarithm of the heavy-cycle approach c = m/(2 b) - kappa ln m + beta (heavy a-cycle, light b-cycle,
    m the mass ratio; docs/perturbative.md 4j, observed): the two finest far rules at m = 10^3, 10^4, 10^5 (their
    change beside each value), and kappa read off each decade, beside the observed law."""
    print(f"# benchmarks/two_species_link.py --kappa, {time.strftime('%Y-%m-%d %H:%MZ', time.gmtime())}, "
          f"rules {KAPPA_RULES}", flush=True)
    for a, b in cases:
        law = kappa_law(a, b)
        excess, notes = [], []
        for e in (3, 4, 5):
            m = Fraction(10 ** e)
            p, q, ratio = (a, b, m) if a >= b else (b, a, 1 / m)
            start = time.perf_counter()
            (coarse, _), (value, _) = _rules(p, q, ratio, KAPPA_RULES)
            scale = 1.0 if a >= b else float(m)          # c in units of the light mass
            excess.append(value * scale - float(m) / (2 * b))
            notes.append(f"change {abs(value - coarse) * scale:.1e}, {time.perf_counter() - start:.0f} s")
        steps = [(x - y) / math.log(10) for x, y in zip(excess, excess[1:])]
        print(f"  heavy {a}-cycle, light {b}-cycle: c - m/(2b) = {', '.join(f'{x:.7f}' for x in excess)} at 10^3..10^5 "
              f"({'; '.join(notes)}); kappa per decade {', '.join(f'{x:.6f}' for x in steps)}; "
              f"observed law {law} = {float(law):.6f}", flush=True)


if __name__ == "__main__":
    if sys.argv[1:2] == ["--far"]:
        far([int(x) for x in sys.argv[2:]] or [4, 5])
    elif sys.argv[1:2] == ["--kappa"]:
        kappa([tuple(int(v) for v in x.split(",")) for x in sys.argv[2:]] or KAPPA_CASES)
    else:
        main(sys.argv[1:])
