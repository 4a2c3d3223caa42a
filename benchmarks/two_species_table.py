"""Generate clusterexp/routes/two_species_table.py: the d_ij^2 link coefficient of the two-species clusters
{p-cycle of i, q-cycle of j} at unequal masses, at Chebyshev points in ln(m_i/m_j) over [1/100, 100], and
measure what the table saves against the quadrature on demand.

Run:  python benchmarks/two_species_table.py --nodes WORK 4 5 6     (node values into WORK/, one JSON per
                                                                     cluster and piece; resumable; hours)
      python benchmarks/two_species_table.py --write WORK           (assemble the module from WORK/)
      python benchmarks/two_species_table.py --check 3,1 2,2        (the table against the engine at
                                                                     ratios between the nodes)

Each node runs the engine (routes/two_loop_fast.link_squared) at two rules, as the on-demand route does
(routes/two_species_link.py): (8, 8) and (10, 12) where the ratio is within [1/10, 10], (10, 12) and
(12, 16) beyond (the far pieces, where the rules converge more slowly); the node's value is the finer
rule's and its bound MARGIN times the change. docs/perturbative.md, section 4j ("A table for |n| <= 6").
"""
from __future__ import annotations

import argparse
import json
import math
import os
import re
import sys
import time
from fractions import Fraction
from pathlib import Path

sys.path.insert(0, str(Path(__file__).resolve().parent.parent))

import numpy as np  # noqa: E402

from clusterexp.routes import two_loop_fast  # noqa: E402
from clusterexp.routes.angle_area import first_order_normalisation  # noqa: E402

EDGES = (-math.log(100), -math.log(10), 0.0, math.log(10), math.log(100))
POINTS = 12
NEAR_RULES = ((8, 8), (10, 12))
FAR_RULES = ((10, 12), (12, 16))
MARGIN = 10
MODULE = Path(__file__).resolve().parent.parent / "clusterexp" / "routes" / "two_species_table.py"


def piece_points(piece: int) -> list[float]:
    """The Chebyshev points (first kind) of one piece, in x = ln(m_i/m_j)."""
    lo, hi = EDGES[piece], EDGES[piece + 1]
    mid, half = (lo + hi) / 2, (hi - lo) / 2
    return [mid + half * math.cos(math.pi * (k + 0.5) / POINTS) for k in range(POINTS)]


def normalisation(p: int, q: int, ratio: float) -> float:
    """P of the cluster at m_i/m_j = ratio, per unit m_j: m_i m_j/(2 pi p^2 q^2) (angle_area's)."""
    return ratio / (2 * math.pi * p * p * q * q)


def node(p: int, q: int, x: float, rules) -> tuple[float, float]:
    """(w, bound of w) at x: w = c/(1 + r), c the coefficient per unit m_j at r = e^x."""
    r = math.exp(x)
    values = [normalisation(p, q, r) * two_loop_fast.link_squared(p, q, 1 / r, 1.0, *rule)[2] for rule in rules]
    return values[-1] / (1 + r), MARGIN * abs(values[-1] - values[0]) / (1 + r)


def run_nodes(work: Path, ns: list[int]) -> None:
    work.mkdir(parents=True, exist_ok=True)
    for p, q, ratio in ((3, 1, Fraction(7, 3)), (2, 2, Fraction(1, 5))):     # the float P is angle_area's P
        assert abs(normalisation(p, q, float(ratio)) - float(first_order_normalisation(p, q, ratio, 1, 1))) < 1e-15
    jobs = [(p, n - p, piece) for n in sorted(ns, reverse=True) for p in range(n - 1, (n - 1) // 2, -1) for piece in range(4)]
    for p, q, piece in jobs:
        out = work / f"{p}_{q}_{piece}.json"
        if out.exists():
            continue
        lock = work / f"{p}_{q}_{piece}.lock"
        try:
            fd = os.open(lock, os.O_CREAT | os.O_EXCL)       # several processes may share WORK
        except FileExistsError:
            continue
        os.close(fd)
        rules = NEAR_RULES if piece in (1, 2) else FAR_RULES
        start = time.perf_counter()
        rows = [node(p, q, x, rules) for x in piece_points(piece)]
        seconds = time.perf_counter() - start
        out.write_text(json.dumps({"p": p, "q": q, "piece": piece, "rules": rules, "seconds": seconds,
                                   "w": [w for w, _ in rows], "bound": [b for _, b in rows]}))
        lock.unlink()
        print(f"{{{p},{q}}} piece {piece} ({math.exp(EDGES[piece]):g} .. {math.exp(EDGES[piece + 1]):g}), "
              f"rules {rules}: {seconds:.0f} s, largest node bound (w) {max(b for _, b in rows):.1e}", flush=True)


def tail(w: list[float]) -> float:
    """|c_{N-1}| + |c_{N-2}| of the Chebyshev series through the N points (first kind)."""
    n = len(w)
    theta = [math.pi * (k + 0.5) / n for k in range(n)]
    coef = [2 / n * sum(f * math.cos(j * t) for f, t in zip(w, theta)) for j in range(n)]
    return abs(coef[-1]) + abs(coef[-2])


def write(work: Path) -> None:
    entries = {}
    for path in sorted(work.glob("*.json")):
        d = json.loads(path.read_text())
        entries.setdefault((d["p"], d["q"]), {})[d["piece"]] = d
    lines = []
    for (p, q), pieces in sorted(entries.items(), key=lambda kv: (sum(kv[0]), -kv[0][0])):
        if sorted(pieces) != [0, 1, 2, 3]:
            raise SystemExit(f"{{{p},{q}}}: pieces {sorted(pieces)} only; run --nodes to the end first")
        lines.append(f"    ({p}, {q}): (")
        for k in range(4):
            d = pieces[k]
            values = [repr(w) for w in d["w"]]
            bounds = [f"{b:.3e}" for b in d["bound"]]
            lines.append("        ([" + ",\n          ".join(", ".join(values[k:k + 4]) for k in range(0, POINTS, 4)) + "],")
            lines.append("         [" + ",\n          ".join(", ".join(bounds[k:k + 6]) for k in range(0, POINTS, 6)) + "],")
            lines.append(f"         {tail(d['w']):.3e}),")
        lines.append("    ),")
    text = MODULE.read_text()
    block = re.compile(r"^NODES = \{\n.*?^\}\n", re.DOTALL | re.MULTILINE)
    if len(block.findall(text)) != 1:
        raise SystemExit(f"{MODULE}: no single NODES block to replace")
    MODULE.write_text(block.sub(lambda _: "NODES = {\n" + "\n".join(lines) + "\n}\n", text))
    print(f"wrote {len(entries)} clusters into {MODULE}")


def check(clusters: list[tuple[int, int]]) -> None:
    from clusterexp.routes import two_species_table
    rng = np.random.default_rng(5)
    for p, q in clusters:
        for x in rng.uniform(EDGES[0], EDGES[-1], 4):
            ratio = Fraction(math.exp(x)).limit_denominator(1000)
            value, bound = two_species_table.coefficient(p, q, ratio)
            r = float(ratio)
            rules = NEAR_RULES if 1 / 10 <= r <= 10 else FAR_RULES
            start = time.perf_counter()
            direct = [normalisation(p, q, r) * two_loop_fast.link_squared(p, q, 1 / r, 1.0, *rule)[2] for rule in rules]
            seconds = time.perf_counter() - start
            print(f"{{{p},{q}}} ratio {ratio}: table {value:.10f} +- {bound:.1e}; engine {direct[-1]:.10f} "
                  f"(rules' change {abs(direct[-1] - direct[0]):.1e}, {seconds:.1f} s); difference "
                  f"{abs(value - direct[-1]):.1e}: {'within' if abs(value - direct[-1]) <= bound else 'OUTSIDE'} the bound",
                  flush=True)


def main() -> None:
    parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    parser.add_argument("--nodes", type=Path)
    parser.add_argument("--write", type=Path)
    parser.add_argument("--check", nargs="*")
    parser.add_argument("ns", nargs="*", type=int)
    args = parser.parse_args()
    if args.nodes:
        run_nodes(args.nodes, args.ns or [4, 5, 6])
    elif args.write:
        write(args.write)
    elif args.check is not None:
        check([tuple(int(v) for v in c.split(",")) for c in args.check])


if __name__ == "__main__":
    main()
