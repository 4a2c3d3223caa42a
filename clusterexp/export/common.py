"""Pieces every printer shares: the conventions sentence and the system summary."""
from __future__ import annotations

from ..model import System

CONVENTIONS = (
    "beta P lambda^d = sum_n b_n z^n = sum_n a_n (rho lambda^d)^n; "
    "exchange parameter alpha: 0 bosons, 1 fermions (period 2); "
    "mutual parameter alpha_ij: period 1; lambda = thermal wavelength of the reference species; "
    "b_(single particle of i) = (m_i/m_ref)^(d/2), a_(single particle) = 1"
)

KIND_TITLES = {
    "cluster": "cluster coefficients b",
    "virial": "virial coefficients a",
    "density": "density expansion rho_i lambda^d in the fugacities z",
    "fugacity": "fugacity expansion z_i in the densities rho lambda^d",
}


def summary_lines(system: System) -> list[str]:
    species = ", ".join(
        f"{s.name} (mass {s.mass}, exchange {s.exchange})" for s in system.species)
    lines = [f"dimension {system.dimension}; species in index order: {species}",
             f"reference species {system.reference}; total order {system.order}; "
             f"cluster coefficients: {system.source.kind}"]
    if system.mutuals:
        lines.append("mutual parameters: " + ", ".join(
            f"{m.first}-{m.second} = {m.value}" for m in system.mutuals))
    return lines
