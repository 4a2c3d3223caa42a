"""Ideal quantum gases (route R1): b_{l e_i} = (m_i/m_ref)^{d/2} (+-1)^{l+1} l^{-1-d/2}, upper sign
bosons, lower fermions; Boltzmann species have b_{e_i} only; ideal species have no mixed b."""
from __future__ import annotations

from typing import Sequence

import sympy

from .base import Clusters, Regime

Index = tuple[int, ...]

STATISTICS = ("bose", "fermi", "boltzmann")


def ideal_clusters(statistics: Sequence[str], masses: Sequence[sympy.Expr], m_ref: sympy.Expr, d: int,
                   order: int) -> dict[Index, sympy.Expr]:
    """Every nonzero b_n up to total order `order` (exact: irrational powers stay sympy radicals).

    >>> ideal_clusters(["bose"], [1], 1, 3, 3)[(2,)]
    sqrt(2)/8
    """
    K = len(statistics)
    half_d = sympy.Rational(d, 2)
    out: dict[Index, sympy.Expr] = {}
    for i, (kind, m) in enumerate(zip(statistics, masses)):
        if kind not in STATISTICS:
            raise ValueError(f"unknown statistics {kind!r}")
        top = 1 if kind == "boltzmann" else order
        for l in range(1, top + 1):
            sign = 1 if kind == "bose" or l % 2 else -1
            index = tuple(l if j == i else 0 for j in range(K))
            out[index] = sympy.powsimp((m / m_ref) ** half_d) * sign * sympy.Integer(l) ** (-1 - half_d)
    return out


class IdealRegime(Regime):
    """`clusters ideal`: Bose, Fermi and Boltzmann species (bose/fermi by word or by the exchange
    parameter modulo 2), any d, any masses."""

    kind = "ideal"

    def check(self, builder, source, names):
        from ..errors import InputError
        from ..exact.periods import species_statistics
        for s in builder.species.values():
            if species_statistics(s, builder.by_symbol()) is None:
                raise InputError(f"`clusters ideal` needs bose, fermi or boltzmann species; {s.name} has "
                                 f"exchange parameter {s.exchange}, neither bosonic nor fermionic modulo the "
                                 "period 2", s.span)
        builder.no_mutuals("ideal gases")
        return source

    def clusters(self, plan) -> Clusters:
        from ..exact.periods import species_statistics
        system = plan.system
        params = {p.symbol: p for p in system.parameters}
        stats = [species_statistics(s, params) for s in system.species]   # validated: bose/fermi modulo 2
        return Clusters(ideal_clusters(stats, [s.mass for s in system.species], system.reference_mass,
                                       system.dimension, plan.order))

    def equation_of_state(self, system, span=None):
        """Polylogarithms in the densities (clusterexp.eos.ideal)."""
        from ..eos.ideal import IdealEquationOfState
        return IdealEquationOfState(system)

    def text_lines(self, system) -> list[str]:
        return ["regime: ideal gases, b_(l of species i) = (m_i/m_ref)^(d/2) (+-1)^(l+1) l^(-1-d/2) "
                "(+ bose, - fermi; boltzmann: b_1 only); no mixed coefficients"]

    def latex_paragraphs(self, system, labels) -> list[str]:
        return [r"Ideal gases: $b_{l\,e_i}=(m_i/m_{\mathrm{ref}})^{d/2}(\pm1)^{l+1}l^{-1-d/2}$ "
                r"(upper sign bosons, lower fermions; Boltzmann species have $b_{e_i}$ only); no mixed coefficients."]
