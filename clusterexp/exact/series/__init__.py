"""The exact multi-species truncated series kernel."""
from .horner import HornerComposition
from .ring import PolynomialRing, available_backends, collect_atoms, default_backend
from .series import PowerTable, Series, indices_up_to, multi_indices, revert

__all__ = ["HornerComposition", "PolynomialRing", "PowerTable", "Series", "available_backends", "collect_atoms",
           "default_backend", "indices_up_to", "multi_indices", "revert"]
