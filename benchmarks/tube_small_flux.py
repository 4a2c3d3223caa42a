"""The tube pieces at small parameters: sampled loops (`loops.tube_estimates.flux_parts`) against the
second-order Taylor coefficients of `routes.tube_perturbative` (docs/tubes.md, "Small fluxes from an
infinitely heavy species"), an independent check: the sampler knows nothing of the perturbative route.

The piece is sampled at (parameter point + h, flux +-h) for h = 0.2, 0.1, 0.05, 0.025, both signs on
the same loops. Its part odd in the flux is c h^2 + O(h^3), its even part c1 h + c2 h^2 + O(h^3) with c1
the contact law's; X = (part - c1 h)/h^2 is extrapolated to h = 0 (`limit_at_zero`) through the two
smallest steps (Richardson: removes a h only), through three (a h + b h^2) and through all four. The
test (tests/test_tube_perturbative.py) uses three steps with 40/80/160 batches.

Run:  python benchmarks/tube_small_flux.py [--rounds 400]
"""
from __future__ import annotations

import argparse
import sys
import time
from pathlib import Path

sys.path.insert(0, str(Path(__file__).resolve().parent.parent))

import sympy  # noqa: E402

from clusterexp.loops.tube_estimates import flux_parts, limit_at_zero  # noqa: E402
from clusterexp.routes.tube_perturbative import EXCHANGE, FLUX, MUTUAL, tube_coefficients  # noqa: E402

CASES = (("anyon", "boson", 0.0), ("anyon", "fermion", 1.0), ("braid", "boson", 0.0))


def main() -> None:
    parser = argparse.ArgumentParser()
    parser.add_argument("--rounds", type=int, default=400, help="batches of 1000 loops at h = 0.2, 0.1 (twice that at 0.05, 0.025)")
    parser.add_argument("--seed", type=int, default=31)
    args = parser.parse_args()
    print(f"# tube pieces at small parameters: sampled loops (16 slices) against the route's second order; "
          f"{args.rounds} batches of 1000 loops at h = 0.2, 0.1, {2 * args.rounds} at 0.05, 0.025, seed {args.seed}")
    for kind, about, base in CASES:
        start = time.perf_counter()
        terms = tube_coefficients(kind, about)
        x = EXCHANGE if kind == "anyon" else MUTUAL
        expected = {"odd": (0, terms.get(x * FLUX, 0)),
                    "even": (terms.get(sympy.Abs(FLUX), 0), terms.get(sympy.Abs(x) * sympy.Abs(FLUX), 0)
                             + terms.get(FLUX ** 2, 0))}
        sampler = "identical" if kind == "anyon" else "distinct"
        steps = ((0.2, args.rounds), (0.1, args.rounds), (0.05, 2 * args.rounds), (0.025, 2 * args.rounds))
        parts = {h: flux_parts(sampler, base, h, rounds, seed=args.seed) for h, rounds in steps}
        print(f"\n{kind} piece about {about} (parameter {base} + h, flux +-h), {time.perf_counter() - start:.0f} s")
        for k, which in enumerate(("odd", "even")):
            c1, c2 = expected[which]
            X = {h: (parts[h][k].value - float(c1) * h) / h ** 2 for h, _ in steps}
            bars = {h: parts[h][k].error / h ** 2 for h, _ in steps}
            print(f"  {which} part, route {sympy.nsimplify(c2)} = {float(c2):+.4f}; X(h): " + ", ".join(
                f"{h}: {X[h]:+.4f} +- {bars[h]:.4f}" for h, _ in steps))
            for chosen in ((0.05, 0.025), (0.2, 0.1, 0.05), (0.1, 0.05, 0.025), (0.2, 0.1, 0.05, 0.025)):
                limit = limit_at_zero(chosen, [X[h] for h in chosen], [bars[h] for h in chosen])
                print(f"    through h = {', '.join(map(str, chosen))}: {limit.value:+.4f} +- {limit.error:.4f} "
                      f"({(limit.value - float(c2)) / limit.error:+.1f} sigma)")


if __name__ == "__main__":
    main()
