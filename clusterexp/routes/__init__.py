"""Physical routes to exact cluster coefficients: one function per regime, chosen by the source kind.

Every route returns a `Clusters`: either exact ring elements with unit single-particle coefficients
(the fast path, fed straight to the virial kernel) or sympy values (masses, radicals).
"""
from __future__ import annotations

from dataclasses import dataclass
from fractions import Fraction
from typing import Mapping

import sympy

from ..errors import InputError
from ..model import System
from ..periods import species_statistics
from ..series import PolynomialRing, indices_up_to
from .exclusion import continuum_factor, equal_masses, level_clusters, statistics_ring
from .ideal import ideal_clusters
from .spectrum import SpeciesSpectrum, SpectrumError, area_weight, trapped_clusters

Index = tuple[int, ...]


@dataclass
class Clusters:
    """b_n for 1 <= |n| <= order: `values` (sympy) always; `ring`/`elements` when every b_n is an
    exact ring element and every b_{e_i} = 1."""

    values: Mapping[Index, sympy.Expr]
    ring: PolynomialRing | None = None
    elements: dict | None = None


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


def _ring_native(ring, elements, weight) -> Clusters:
    """Multiply by rational weights in the ring; the values convert lazily."""
    from ..virial import CoefficientTable
    scaled = {n: e * ring.rational(weight(n)) for n, e in elements.items()}
    order = max(sum(n) for n in scaled)
    return Clusters(CoefficientTable(ring, scaled, order), ring, scaled)


def _sympy_values(ring, elements, factor) -> Clusters:
    return Clusters({n: ring.to_expr(e) * factor(n) for n, e in elements.items()})


def exclusion_clusters(system: System, order: int) -> Clusters:
    g = system.source.matrix
    ring, b = level_clusters(g, order)
    if system.source.form == "level":
        return _ring_native(ring, b, lambda n: 1)
    masses = [s.mass for s in system.species]
    d = system.dimension
    if equal_masses(masses) and d == 2:
        return _ring_native(ring, b, lambda n: Fraction(1, sum(n)))
    m_ref = system.reference_mass
    return _sympy_values(ring, b, lambda n: continuum_factor(n, masses, m_ref, d))


def landau_clusters(system: System, order: int, route: str | None = None) -> Clusters:
    route = route or system.source.form
    if route == "spectrum":
        species, shift = landau_spectrum(system)
        ring, b = trapped_clusters(species, shift, order, 0, 2, area="count")
        return _ring_native(ring, b, lambda n: sum(n))
    ring, b = level_clusters(landau_matrix(system), order)
    return _ring_native(ring, b, lambda n: 1)


def spectrum_clusters(system: System, order: int) -> Clusters:
    spec = system.source.spectrum
    species = [SpeciesSpectrum(levels, fill, s.mass) for levels, fill, s in zip(spec.levels, spec.fill, system.species)]
    counts = spec.counts

    def shift(n):
        return spec.shift.subs(dict(zip(counts, n)))
    reference = system.species_index(system.reference)
    try:
        ring, b = trapped_clusters(species, shift, order, reference, system.dimension, spec.area,
                                   trapped=dict(spec.trapped))
    except SpectrumError as error:
        raise InputError(str(error), spec.span) from None
    masses = [s.mass for s in system.species]
    m_ref = system.reference_mass
    weights = {n: area_weight(n, masses, m_ref, system.dimension, spec.area) for n in b}
    if all(w.is_Rational for w in weights.values()) and all(weights[n] == 1 for n in b if sum(n) == 1):
        return _ring_native(ring, b, lambda n: Fraction(int(weights[n].p), int(weights[n].q)))
    return _sympy_values(ring, b, weights.__getitem__)


def ideal(system: System, order: int) -> Clusters:
    params = {p.symbol: p for p in system.parameters}
    stats = [species_statistics(s, params) for s in system.species]   # validated: bose/fermi modulo 2
    return Clusters(ideal_clusters(stats, [s.mass for s in system.species], system.reference_mass,
                                   system.dimension, order))


ROUTES = {"ideal": ideal, "exclusion": exclusion_clusters, "landau": landau_clusters, "spectrum": spectrum_clusters}


def physical_clusters(system: System, order: int) -> Clusters:
    return ROUTES[system.source.kind](system, order)


__all__ = ["Clusters", "ROUTES", "physical_clusters", "landau_matrix", "landau_spectrum", "indices_up_to",
           "statistics_ring"]
