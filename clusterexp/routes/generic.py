"""The regimes of general formulas: `clusters generic` (every b_n its own symbol), `clusters given { ... }`
(some or all b_n stated, the rest symbols) and `virials given { ... }` (some or all a_n stated, the b_n
derived). No physics route: the cluster <-> virial machinery does everything."""
from __future__ import annotations

from typing import Mapping

import sympy

from ..naming import cluster_symbol, virial_symbol
from ..exact.series import indices_up_to
from ..exact.virial import unit_index
from .base import Clusters, Regime


class GenericRegime(Regime):
    """`clusters generic` and `clusters given { b[...] = ... }`: the b's not stated are symbols."""

    kind = "generic"
    no_equation_of_state = "generic cluster coefficients (symbols)"
    computed = False

    def clusters(self, plan) -> Clusters:
        if plan.given_kind == "virial":
            from ..exact.virial import virial_to_cluster
            return Clusters(virial_to_cluster(plan.virial, plan.order, plan.K, linear=plan.linear))
        b = {unit_index(plan.K, i): c for i, c in enumerate(plan.linear)}
        for index in indices_up_to(plan.K, plan.order, start=2):
            b[index] = plan.given.get(index, cluster_symbol(index))
        return Clusters(b)

    def virials(self, plan) -> Mapping | None:
        if plan.given_kind != "virial":
            return None
        a = {unit_index(plan.K, i): sympy.Integer(1) for i in range(plan.K)}
        for index in indices_up_to(plan.K, plan.order, start=2):
            a[index] = plan.given.get(index, virial_symbol(index))
        return a


class GivenRegime(GenericRegime):
    """`clusters given { ... }` / `virials given { ... }` (a grammar block of its own)."""

    kind = "given"
    no_equation_of_state = "given cluster or virial coefficients"
    forms = ()
