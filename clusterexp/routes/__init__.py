"""Physical regimes, one module each, and the registry the stages ask (`regime_of(system)`).

Each module holds the route's computation and one `base.Regime` subclass that states everything the
tool knows about the regime (validation, size, cluster coefficients, quantities, statements). Adding a
regime: one module, one line in `REGIMES` (DEVELOPERS.md, "How to add a regime").
"""
from __future__ import annotations

from .base import THERMAL, Clusters, Quantities, Regime
from .exclusion import ExclusionRegime, statistics_ring
from .generic import GenericRegime, GivenRegime
from .ideal import IdealRegime
from .landau import LandauRegime, landau_clusters, landau_matrix, landau_spectrum
from .pairphase import PairPhaseRegime
from .spectrum_regime import SpectrumRegime

REGIMES: dict[str, Regime] = {regime.kind: regime for regime in (
    GenericRegime(), IdealRegime(), ExclusionRegime(), LandauRegime(), PairPhaseRegime(), SpectrumRegime(),
    GivenRegime())}


def regime_of(system) -> Regime:
    """The regime of a system (`clusters <kind>`)."""
    return REGIMES[system.source.kind]


__all__ = ["Clusters", "Quantities", "REGIMES", "Regime", "THERMAL", "landau_clusters", "landau_matrix",
           "landau_spectrum", "regime_of", "statistics_ring"]
