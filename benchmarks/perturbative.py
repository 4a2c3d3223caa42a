"""Perturbative route: cost of the Taylor coefficients of b_n about the boson point, and of the
first-order virial coefficients built from them, as the order grows.

Run:  python benchmarks/perturbative.py      (a few seconds; figures in benchmarks/perturbative-last-run.txt)

Cases (targets from the issue, "seconds here"): one species through second order for every n up to 8,
two species with exchange and mutual parameters through total degree 2 for every multi-index up to total
order 6, three species up to total order 5; and the cluster -> virial composition of the first-order
b's (the a_n through first order) for the same tables. Coefficients not derived at second order come
back as named unknowns (unknown="name"), so the figures time the whole table. Last, what a user runs:
the joint series `expand alpha, nu about 0 to 2` of every b and a of two species up to total order 3-6,
end to end (derive and print), beside the same input without the series (the ratio is the series' cost);
and one species, every a_n through alpha^2 up to n = 4 .. 10, end to end with cold caches (the clusters of
section 4k and the n-cycles of 4l computed in the run); the same at unequal masses (1 and 3/2), where the
d_ij^2 coefficients of |n| >= 4 are the closed forms
of docs/perturbative.md section 4k, exact expressions with logarithms of quadratic surds (until the
eighteenth session they were numbers: from a table, 1.2 s at total order 6, or by quadrature on demand,
124 s; benchmarks/two_species_table.py keeps that comparison).
"""
from __future__ import annotations

import sys
from pathlib import Path

sys.path.insert(0, str(Path(__file__).resolve().parent.parent))

import sympy  # noqa: E402

import clusterexp  # noqa: E402
from clusterexp.export import to_text  # noqa: E402

from clusterexp.routes.perturbative import Species, expansion, taylor_coefficients  # noqa: E402
from clusterexp.exact.series import indices_up_to  # noqa: E402
from clusterexp.exact.virial import cluster_to_virial  # noqa: E402
from regimes import seconds  # noqa: E402  (the median-of-runs timer of the regimes benchmark)

e1, e2, e3, d12, d13, d23 = sympy.symbols("e1 e2 e3 d12 d13 d23", real=True)
CASES = {
    1: ([Species(e1)], {}),
    2: ([Species(e1), Species(e2, sympy.Rational(3, 2))], {(0, 1): d12}),
    3: ([Species(e1), Species(e2, 2), Species(e3)], {(0, 1): d12, (0, 2): d13, (1, 2): d23}),
}


def table(K, order, degree):
    species, mutual = CASES[K]
    return {n: taylor_coefficients(species, mutual, n, "boson", degree, unknown="name")
            for n in indices_up_to(K, order)}


def first_order_virial(K, order):
    species, mutual = CASES[K]
    b, absolute = {}, {}
    for n in indices_up_to(K, order):
        value = expansion(species, mutual, n, "boson", 1)
        for a in value.atoms(sympy.Abs):
            absolute.setdefault(a, sympy.Symbol(f"u_{a.args[0]}", positive=True))
        b[n] = value.subs(absolute)
    virial = cluster_to_virial(b, order, truncation={u: 2 for u in absolute.values()}).virial
    return [virial[n] for n in virial]  # every a_n converted to sympy


JOINT = ("dimension 2 parameter alpha in [0, 1/2] parameter nu in [0, 1/2] species A exchange alpha "
         "species B bose mutual A B = nu clusters pairphase order {order} ")


ONE = "dimension 2 parameter alpha in [0, 1/2] species A exchange alpha clusters pairphase derive virial up to {order} "


def cold():
    """Clear the process caches of the closed forms (link squared, n-cycle alone)."""
    from clusterexp.routes import cycle_square, link_integrals
    cycle_square.cycle_square.cache_clear()
    link_integrals._exact_ratio.cache_clear()


def cold_printed(text):
    cold()
    return printed(text)


UNEQUAL = ("dimension 2 parameter alpha in [0, 1/2] parameter nu in [0, 1/2] species A exchange alpha "
           "species B mass 3/2 exchange alpha mutual A B = nu clusters pairphase order {order} ")


def printed(text):
    return to_text(clusterexp.derive(text))


def main():
    first_order_virial(2, 3)  # warm-up (imports, ring construction)
    print("# benchmarks/perturbative.py: wall seconds (median of 3) for the whole table up to the order")
    print(f"{'case':<58}{'coefficients':>13}{'seconds':>10}")
    for K, top in ((1, 8), (2, 6), (3, 5)):
        for order in range(2, top + 1):
            count = len(list(indices_up_to(K, order)))
            t = seconds(lambda: table(K, order, 2))
            print(f"{f'K={K}, Taylor coefficients through degree 2, |n| <= {order}':<58}{count:>13}{t:>10.4f}")
    for K, top in ((1, 8), (2, 6), (3, 4)):
        for order in range(3, top + 1):
            t = seconds(lambda: first_order_virial(K, order), repeats=3)
            print(f"{f'K={K}, a_n through first order (b table + virial), |n| <= {order}':<58}{'':>13}{t:>10.4f}")
    print(f"{'joint series, two species, total degree 2 (end to end)':<58}{'plain':>13}{'series':>10}{'ratio':>8}")
    for order in range(3, 7):
        plain = seconds(lambda: printed(JOINT.format(order=order)), repeats=1)
        joint = seconds(lambda: printed(JOINT.format(order=order) + "expand alpha, nu about 0 to 2"), repeats=1)
        print(f"{f'  |n| <= {order}':<58}{plain:>13.3f}{joint:>10.3f}{joint / plain:>8.1f}")
    print(f"{'one species, a_n through alpha^2 (end to end, cold caches)':<58}{'plain':>13}{'series':>10}{'ratio':>8}")
    for order in range(4, 11):
        plain = seconds(lambda: cold_printed(ONE.format(order=order)), repeats=1)
        series = seconds(lambda: cold_printed(ONE.format(order=order) + "expand alpha about 0 to 2"), repeats=1)
        print(f"{f'  n <= {order}':<58}{plain:>13.3f}{series:>10.3f}{series / plain:>8.1f}")
    print(f"{'the same at masses 1 and 3/2 (d^2 in closed form, section 4k)':<58}{'plain':>13}{'series':>10}{'ratio':>8}")
    for order in range(4, 7):
        plain = seconds(lambda: printed(UNEQUAL.format(order=order)), repeats=1)
        joint = seconds(lambda: printed(UNEQUAL.format(order=order) + "expand alpha, nu about 0 to 2"), repeats=1)
        print(f"{f'  |n| <= {order}':<58}{plain:>13.3f}{joint:>10.3f}{joint / plain:>8.1f}")


if __name__ == "__main__":
    main()
