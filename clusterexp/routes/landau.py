"""Lowest-Landau-level anyons of K species (route R4), by two independent routes: exclusion statistics
with the statistics matrix g_ii = alpha_i, g_ij = alpha_ij (Isakov, Mashkevich, Ouvry, Nucl. Phys. B 448
(1995) 457), or the harmonic regulator on the declared LLL spectrum (bosonic LLL levels 1/(1 - x) shifted
by sum_i alpha_i N_i (N_i - 1)/2 + sum_{i<j} alpha_ij N_i N_j, weight |n|)."""
from __future__ import annotations

import sympy

from ..model import System
from .base import Clusters, Quantities, Regime, ring_native
from .exclusion import level_clusters, wu_latex, wu_text
from .spectrum import SpeciesSpectrum, trapped_clusters

LANDAU = Quantities(
    pressure="beta P / rho_L", density="nu_{i}", variable="nu",
    single="nu_i = rho_i / rho_L, rho_L = eB/h the degeneracy of the lowest Landau level per area (the same "
           "for every species: equal charges); b_(single particle) = 1, a_(single particle) = 1",
    unit="rho_L", pressure_latex=r"\beta P/\rho_L", density_latex=r"\nu_{{{label}}}", variable_latex=r"\nu",
    single_latex=r"$\nu_i=\rho_i/\rho_L$ with $\rho_L=eB/h$ the degeneracy per area of the lowest Landau level "
                 r"(equal charges); single-particle $b=1$")


def landau_matrix(system: System) -> tuple[tuple[sympy.Expr, ...], ...]:
    """Statistics matrix of lowest-Landau-level anyons: g_ii = alpha_i, g_ij = alpha_ij (symmetric)."""
    names = system.species_names
    return tuple(tuple(system.species[i].exchange if i == j else system.mutual(names[i], names[j])
                       for j in range(len(names))) for i in range(len(names)))


def landau_spectrum(system: System):
    """The declared-spectrum form of the same gas: bosonic LLL levels 1/(1 - x) shifted by
    sum_i alpha_i N_i (N_i - 1)/2 + sum_{i<j} alpha_ij N_i N_j, weight |n|."""
    g = landau_matrix(system)
    K = len(g)

    def shift(n):
        total = sum(g[i][i] * sympy.Rational(n[i] * (n[i] - 1), 2) for i in range(K))
        return total + sum(g[i][j] * n[i] * n[j] for i in range(K) for j in range(i + 1, K))
    species = [SpeciesSpectrum(1 / (1 - sympy.Symbol("x")), "bose", sympy.Integer(1)) for _ in range(K)]
    return species, shift


def landau_clusters(system: System, order: int, route: str | None = None) -> Clusters:
    route = route or system.source.form
    if route == "spectrum":
        species, shift = landau_spectrum(system)
        ring, b = trapped_clusters(species, shift, order, 0, 2, area="count")
        return ring_native(ring, b, lambda n: sum(n))
    ring, b = level_clusters(landau_matrix(system), order)
    return ring_native(ring, b, lambda n: 1)


class LandauRegime(Regime):
    """`clusters landau [spectrum]`: anyons in the lowest Landau level, per rho_L."""

    kind = "landau"

    def clusters(self, plan) -> Clusters:
        return landau_clusters(plan.system, plan.order)

    def quantities(self, system) -> Quantities:
        return LANDAU

    def matrix(self, system):
        return landau_matrix(system)

    def text_lines(self, system) -> list[str]:
        head = ["regime: lowest Landau level, beta P / rho_L = sum_n b_n z^n, virial coefficients in "
                "nu = rho / rho_L (rho_L = eB/h, all species with the same charge); route: "
                + ("harmonic regulator on the declared LLL spectrum" if system.source.form == "spectrum"
                   else "exclusion statistics with g_ii = alpha_i, g_ij = alpha_ij")]
        return head + wu_text(landau_matrix(system), system.species_names, True, "beta P / rho_L = ")

    def latex_paragraphs(self, system, labels) -> list[str]:
        text = (r"Lowest Landau level (all species with the same charge, degeneracy $\rho_L=eB/h$ per area): "
                r"$\beta P/\rho_L=\sum_n b_n z^n$ and the virial coefficients are those of $\nu=\rho/\rho_L$. "
                r"Statistics matrix $g_{ii}=\alpha_i$, $g_{ij}=\alpha_{ij}$.")
        return wu_latex(landau_matrix(system), labels, True, text, lambda logs: rf"\beta P/\rho_L={logs}")
