"""Exact two-body inputs and the cluster -> virial relations used by the loop estimator (floats).

Conventions: beta P lambda^2 = sum b_n z^n (b_1 = 1), exchange phase e^{i pi alpha} (period 2),
mutual parameter alpha_12 with e^{2 pi i alpha_12} for one full winding (period 1).
"""
from __future__ import annotations

import math


def _frac(value: float) -> float:
    return value - math.floor(value)


def loop_part_b2(alpha: float) -> float:
    """(1/Area) times the connected two-loop integral: -d(1-d), d = frac(alpha).

    Two closed Brownian loops contribute sum over windings n of (e^{2 pi i alpha n} - 1); integrated
    over their separation this is -d(1-d) (Laplace transform of I_nu, see docs/loops.md).
    """
    d = _frac(alpha)
    return -d * (1.0 - d)


def swap_part_b2(alpha: float) -> float:
    """(1/Area) times the transposition integral of two identical particles: +-(1-2d)/2."""
    d = _frac(alpha)
    sign = -1.0 if (math.floor(alpha) % 2) else 1.0
    return sign * (1.0 - 2.0 * d) / 2.0


def b2_identical(alpha: float) -> float:
    """b_2 of identical anyons: 1/4 - a + a^2/2 with a = alpha reduced to [0, 2) (period 2, even)."""
    return 0.5 * (loop_part_b2(alpha) + swap_part_b2(alpha))


def b11_mutual(alpha_12: float) -> float:
    """b_11 of two distinct particles with mutual parameter alpha_12: -d(1-d), d = frac(alpha_12)."""
    return loop_part_b2(alpha_12)


def a3_identical(b2: float, b3: float) -> float:
    return 4.0 * b2 * b2 - 2.0 * b3


def a21_mixed(b20: float, b11: float, b21: float) -> float:
    """Virial coefficient of rho_1^2 rho_2 for two species (series inversion, docs/loops.md)."""
    return b11 * b11 + 4.0 * b11 * b20 - 2.0 * b21
