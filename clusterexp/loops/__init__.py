"""Brownian-loop (path-integral) Monte Carlo for third-order cluster coefficients of free planar anyons.

See docs/loops.md for the derivation and `estimator` for the API.
"""
from .estimator import (DEFAULT_SLICES, KINDS, Estimate, SecondOrderResult, ThirdOrderResult,
                        estimate_second_order, estimate_third_order, scan_third_order)
from .runner import BEFORE, LoopsError, Reduction, TargetNotReachable

__all__ = ["BEFORE", "DEFAULT_SLICES", "KINDS", "Estimate", "Reduction", "SecondOrderResult", "ThirdOrderResult",
           "LoopsError",
           "TargetNotReachable", "estimate_second_order", "estimate_third_order", "scan_third_order"]
