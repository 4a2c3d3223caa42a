"""b_n of one species at second order beyond the table, computed on demand (clusterexp/routes/two_loop_demand.py):
what each step costs as n grows, and the coefficient it gives.

Run:  python benchmarks/two_loop_demand.py 12         (about two minutes of one core; figures in
                                                       two_loop_demand-last-run.txt)

For n the steps are the clusters {p-cycle, q-cycle}, p + q = n, in closed form (link_integrals, docs 4k; until
the sixteenth session by quadrature at two rules, which took six to twenty-one minutes for n = 9 .. 11), then
the n-cycle alone at two rules (cycle_alone.k_cycle_orders); each is timed (two_loop_demand.STEPS). Printed:
the part beyond the chains with its bound, the whole alpha^2 coefficient of b_n about bosons (what the
package prints: `perturbative.taylor_coefficients`, the closed form plus the named rest, and
`numerical_coefficients`, the rest's number), and, side by side, the same call again (the process cache:
what every later `expand` or `claim` of the run pays).
"""
from __future__ import annotations

import sys
import time
from pathlib import Path

sys.path.insert(0, str(Path(__file__).resolve().parent.parent))

import sympy  # noqa: E402

from clusterexp.routes import two_loop_demand  # noqa: E402
from clusterexp.routes.perturbative import REST, Species, numerical_coefficients, taylor_coefficients  # noqa: E402


def main(argv) -> None:
    n = int(argv[0]) if argv else 11
    print(f"# benchmarks/two_loop_demand.py {n}, {time.strftime('%Y-%m-%d %H:%MZ', time.gmtime())}", flush=True)
    e = sympy.Symbol("e", real=True)
    start = time.perf_counter()
    value, bound = two_loop_demand.beyond_on_demand(n)
    first = time.perf_counter() - start
    for step, seconds, part in two_loop_demand.STEPS:
        print(f"  {step}: {seconds:7.1f} s  {part:+.10f}", flush=True)
    start = time.perf_counter()
    rest, rest_bound = numerical_coefficients([Species(e)], {}, (n,), "boson")[e ** 2]
    again = time.perf_counter() - start
    closed = taylor_coefficients([Species(e)], {}, (n,), "boson", unknown="name")[e ** 2]
    closed = closed.subs({x: 0 for x in closed.free_symbols if x.name.endswith(REST)})
    print(f"beyond the chains: {value:.7f} +- {bound:.0e} (on demand, {first:.1f} s)", flush=True)
    print(f"alpha^2 coefficient of b_{n} about bosons: {float(closed) + rest:.6f} +- {rest_bound:.0e} (closed form "
          f"plus the rest {rest:+.1e}); about fermions the clusters' part is signed (-1)^n", flush=True)
    print(f"the same call again (cached): {again * 1e3:.2f} ms; on demand / cached = {first / max(again, 1e-9):.1e}")


if __name__ == "__main__":
    main(sys.argv[1:])
