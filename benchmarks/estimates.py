"""How close the size estimate's regulator time (limits.estimate) comes to a measured run of the
harmonic regulator, on this machine (the refusal of too-large derivations rests on it). Prints
measured and estimated seconds side by side; run on an idle machine:

    python benchmarks/estimates.py
"""
from __future__ import annotations

import time

from clusterexp.language.build import build_system
from clusterexp.derivation import _Plan
from clusterexp.limits import estimate

CASES = [
    ("two LLL species, two parameters, order 10", "dimension 2 parameter g parameter nu species A exchange g "
     "species B exchange g mutual A B = nu clusters landau spectrum derive virial up to 10"),
    ("two LLL species, two parameters, order 12", "dimension 2 parameter g parameter nu species A exchange g "
     "species B exchange g mutual A B = nu clusters landau spectrum derive virial up to 12"),
    ("one LLL species, one parameter, order 20", "dimension 2 parameter g species A exchange g "
     "clusters landau spectrum derive virial up to 20"),
]


def main() -> None:
    print(f"{'case':45s} {'measured s':>11s} {'estimated s':>12s} {'ratio':>7s}")
    for label, text in CASES:
        system = build_system(text)
        start = time.process_time()
        _Plan(system).clusters  # noqa: B018 -- the regulator's work
        spent = time.process_time() - start
        guess = estimate(system).regulator_seconds
        print(f"{label:45s} {spent:11.2f} {guess:12.2f} {guess / spent if spent else float('nan'):7.2f}")


if __name__ == "__main__":
    main()
