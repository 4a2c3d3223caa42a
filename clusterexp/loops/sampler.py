"""Brownian loops for the three-particle cluster coefficients, stored so that phases can be re-evaluated.

Units: lambda = 1 and beta = 1, so one particle's free kernel over imaginary time s is
(1/s) exp(-pi |x - y|^2 / s): a planar Brownian motion with per-component variance s / (2 pi).
A k-cycle of a permutation is one loop of duration k.  Every family below is translation invariant;
one position (the start of the first loop) is integrated out exactly and gives the area, the others
are sampled (importance sampling) where the integrand is not already normalised.

Each `*Samples` object keeps, per sample, the sum of minimal slice angles over far slices and the list
of near slices (see `pairfactor`).  The phase at any statistics parameter is recomputed from these
without new random numbers, which is what parameter scans reuse.

Families (the prefactors are derived in docs/loops.md):
  cycle      one loop of duration 3; value (1/9) Re Phi                       -> b_3 (identical only)
  exchange   loop of duration 2 (the transposed pair) and a loop of duration 1 (the third particle),
             value (1/4) Re[Phi_12 (Phi_cross - 1)] / g(c)                       -> b_3 and b_21
  triple     three loops of duration 1, value
             c Re[Phi_12 Phi_13 Phi_23 - 1 - F_12 - F_13 - F_23] / g(rho, eta)  (c = 1/2 or 3/2)
  pair_loop  two loops of duration 1 (validation: the loop part of b_2, and b_11)
  pair_swap  one loop of duration 2 (validation: the exchange part of b_2)
"""
from __future__ import annotations

from dataclasses import dataclass

import numpy as np

from .exact import loop_part_b2 as loop_part
from .kernels import bridges, half_phase
from .pairfactor import SAMPLING, SETTINGS, classify_segments, pair_factor

# Importance sampling of sampled offsets: a defensive mixture of two centred complex Gaussians, so that
# the weight stays bounded where the integrand's Gaussian tail is wider than the main component.
# Widths fixed once from a pilot study of the variance per second (docs/loops.md); not tuned to results.
MIX_WIDE_FRACTION = 0.2
MIX_WIDE_FACTOR = 2.5
WIDTH_EXCHANGE = 0.35
WIDTH_TRIPLE = 0.27          # 0.22 before the variance-reduction study (benchmarks/loops_reduction.py)
WIDTH_TRIPLE_BEFORE = 0.22
WIDTH_PAIR = 0.35
# Control variate of the triple family (docs/loops.md, "Variance reduction"): each pair's Re F_ij times a
# normalised Gaussian of the Jacobi coordinate orthogonal to that pair's offset, over g(rho, eta).  Its
# mean is exact: (1/2) int d^2c E[Re F] = (1/2) b_11(a_ij) = -d(1-d)/2 (docs/loops.md, two-body part).
WIDTH_CONTROL = 0.22


@dataclass
class PhaseData:
    """Stored slice data of a group of pairs that share one statistics parameter, per sample."""

    far: np.ndarray
    rows: np.ndarray
    x: np.ndarray
    phi: np.ndarray

    @classmethod
    def from_paths(cls, u: np.ndarray, v: float) -> "PhaseData":
        far, rows, x, phi = classify_segments(u, v)
        return cls(far, rows, x, phi)

    @classmethod
    def join(cls, parts: list["PhaseData"]) -> "PhaseData":
        """Several pair groups of the same samples under one parameter (phases multiply)."""
        return cls(sum(p.far for p in parts), np.concatenate([p.rows for p in parts]),
                   np.concatenate([p.x for p in parts]), np.concatenate([p.phi for p in parts]))

    def phase(self, alpha: float) -> np.ndarray:
        if self.rows.size and (2 * alpha) % 2 == 1 and getattr(SETTINGS, "closed_half", True) \
                and getattr(SETTINGS, "compiled", True):
            return half_phase(alpha, self.far, self.rows, self.x, self.phi)      # compiled closed form
        out = np.exp(1j * alpha * self.far)
        if self.rows.size:
            factors = pair_factor(alpha, self.x, self.phi, SAMPLING)
            if np.all(self.rows[1:] >= self.rows[:-1]):
                # rows come sorted from the classification: one product per sample over its run of rows
                starts = np.flatnonzero(np.r_[True, self.rows[1:] != self.rows[:-1]])
                out[self.rows[starts]] *= np.multiply.reduceat(factors, starts)
            else:                          # joined pair groups: rows of each group in turn
                np.multiply.at(out, self.rows, factors)
        return out

    @property
    def near_count(self) -> int:
        return int(self.rows.size)


def brownian_loops(rng: np.random.Generator, count: int, segments: int, duration: float) -> np.ndarray:
    """`count` planar Brownian bridges from 0 back to 0, `segments` equal slices over `duration`."""
    if hasattr(rng, "brownian_bridge"):    # randomized quasi-Monte Carlo (quasi.py): Levy construction
        return rng.brownian_bridge(count, segments, duration)
    scale = np.sqrt(duration / segments / (2.0 * np.pi))
    steps = rng.standard_normal((count, segments, 2))
    if getattr(SETTINGS, "compiled", True):
        return bridges(steps, scale)
    walk = np.zeros((count, segments + 1), dtype=complex)       # the numpy reference
    walk[:, 1:] = np.cumsum(steps[..., 0] * scale + 1j * (steps[..., 1] * scale), axis=1)
    return walk - (np.arange(segments + 1) / segments)[None, :] * walk[:, -1:]


def complex_normal(rng: np.random.Generator, count: int, width: float) -> np.ndarray:
    z = rng.standard_normal((count, 2)) * width
    return z[:, 0] + 1j * z[:, 1]


def mixture_offsets(rng: np.random.Generator, count: int, width: float, dims: int):
    """`dims` complex offsets per sample from the defensive mixture; returns (offsets, density)."""
    wide = rng.random(count) < MIX_WIDE_FRACTION
    scale = np.where(wide, width * MIX_WIDE_FACTOR, width)
    z = rng.standard_normal((count, dims, 2)) * scale[:, None, None]
    offsets = z[..., 0] + 1j * z[..., 1]
    r2 = (np.abs(offsets) ** 2).sum(axis=1)
    dens = 0.0
    for frac, w in ((1.0 - MIX_WIDE_FRACTION, width), (MIX_WIDE_FRACTION, width * MIX_WIDE_FACTOR)):
        dens = dens + frac * np.exp(-r2 / (2 * w * w)) / (2 * np.pi * w * w) ** dims
    return offsets, dens


def coarse(u: np.ndarray, stride: int) -> np.ndarray:
    """Every `stride`-th point: the same path seen with `stride` times fewer slices."""
    return u[:, ::stride]


def phase_levels(u: np.ndarray, slices: int, strides) -> dict[int, PhaseData]:
    """Slice data of a relative path at the full resolution and at coarser sub-samplings of it."""
    return {s: PhaseData.from_paths(coarse(u, s), slice_variance(slices // s)) for s in strides}


def slice_variance(segments: int) -> float:
    """Per-component variance of a relative vector's increment over one slice (two particles)."""
    return 2.0 * (1.0 / segments) / (2.0 * np.pi)


class CycleSamples:
    """The 3-cycle: one loop X of duration 3; the pair vectors X(t) - X(t+1) join into one closed curve."""

    def __init__(self, rng: np.random.Generator, count: int, slices: int, strides=(1,)):
        x = brownian_loops(rng, count, 3 * slices, 3.0)
        # X(t) - X(t + 1) over t in [0, 3]: the points shifted by one unit of time, cyclically
        shifted = np.concatenate([x[:, slices:3 * slices], x[:, :slices + 1]], axis=1)
        self.count = count
        self.levels = phase_levels(x - shifted, slices, strides)

    def values(self, alpha: float, stride: int = 1) -> np.ndarray:
        return self.levels[stride].phase(alpha).real / 9.0


class ExchangeSamples:
    """A transposed pair (one loop X of duration 2) and a third particle (loop Y of duration 1 at c)."""

    def __init__(self, rng: np.random.Generator, count: int, slices: int, strides=(1,)):
        x = brownian_loops(rng, count, 2 * slices, 2.0)
        y = brownian_loops(rng, count, slices, 1.0)
        centre = 0.5 * x[:, slices]
        off, dens = mixture_offsets(rng, count, WIDTH_EXCHANGE, 1)
        c = centre + off[:, 0]
        self.count = count
        self.weight = 1.0 / dens
        self.pair = phase_levels(x[:, : slices + 1] - x[:, slices:], slices, strides)
        y_twice = np.concatenate([y[:, :slices], y[:, :slices], y[:, :1]], axis=1)
        self.cross = phase_levels(x - (c[:, None] + y_twice), slices, strides)

    def values(self, alpha_pair: float, alpha_cross: float, stride: int = 1) -> np.ndarray:
        ph = self.pair[stride].phase(alpha_pair) * (self.cross[stride].phase(alpha_cross) - 1.0)
        return 0.25 * ph.real * self.weight


class TripleSamples:
    """Three loops of duration 1; offsets from Jacobi coordinates (rho, eta), d^2c2 d^2c3 = 3 d^2rho d^2eta."""

    def __init__(self, rng: np.random.Generator, count: int, slices: int, strides=(1,), width: float = WIDTH_TRIPLE):
        y = [brownian_loops(rng, count, slices, 1.0) for _ in range(3)]
        off, dens = mixture_offsets(rng, count, width, 2)
        rho, eta = off[:, 0], off[:, 1]
        # the Jacobi coordinate orthogonal to each pair's offset (rotations by 0, 120 and 240 degrees)
        half = np.sqrt(3.0) / 2.0
        across = {"12": eta, "13": -half * rho + 0.5 * eta, "23": -half * rho - 0.5 * eta}
        norm = 2.0 * np.pi * WIDTH_CONTROL ** 2
        self.control_weight = {k: np.exp(-np.abs(v) ** 2 / (2.0 * WIDTH_CONTROL ** 2)) / norm / dens
                               for k, v in across.items()}
        z2 = -np.sqrt(2.0) * rho
        z3 = -rho / np.sqrt(2.0) - np.sqrt(1.5) * eta
        p1, p2, p3 = y[0], z2[:, None] + y[1], z3[:, None] + y[2]
        self.count = count
        self.weight = 1.0 / dens
        self.p12 = phase_levels(p1 - p2, slices, strides)
        self.p13 = phase_levels(p1 - p3, slices, strides)
        self.p23 = phase_levels(p2 - p3, slices, strides)

    def _pair_terms(self, a12: float, a13: float, a23: float, stride: int):
        """F_12, F_13, F_23 (phase minus one), kept for the last parameters: the control reuses them."""
        key = (a12, a13, a23, stride)
        if getattr(self, "_last", (None,))[0] != key:
            self._last = (key, tuple(getattr(self, "p" + k)[stride].phase(a) - 1.0
                                     for k, a in (("12", a12), ("13", a13), ("23", a23))))
        return self._last[1]

    def values(self, a12: float, a13: float, a23: float, prefactor: float, stride: int = 1) -> np.ndarray:
        f12, f13, f23 = self._pair_terms(a12, a13, a23, stride)
        connected = f12 * f13 + f12 * f23 + f13 * f23 + f12 * f13 * f23
        return prefactor * connected.real * self.weight

    def control(self, a12: float, a13: float, a23: float, stride: int = 1) -> np.ndarray:
        """Per sample: the pair terms with exactly known mean, minus that mean (mean zero)."""
        out = np.zeros(self.count)
        for key, a, f in zip(("12", "13", "23"), (a12, a13, a23), self._pair_terms(a12, a13, a23, stride)):
            out += f.real * self.control_weight[key] - 0.5 * loop_part(a)
        return out


class PairLoopSamples:
    """Two loops of duration 1 at offset c: sum over samples of Re(Phi - 1)/g(c) estimates b_11.
    With a single pair the slice factors are exact at any slice number (no extrapolation needed)."""

    def __init__(self, rng: np.random.Generator, count: int, slices: int, strides=(1,)):
        y1 = brownian_loops(rng, count, slices, 1.0)
        y2 = brownian_loops(rng, count, slices, 1.0)
        off, dens = mixture_offsets(rng, count, WIDTH_PAIR, 1)
        self.count = count
        self.weight = 1.0 / dens
        self.data = PhaseData.from_paths(y1 - (off[:, 0:1] + y2), slice_variance(slices))

    def values(self, alpha: float, stride: int = 1) -> np.ndarray:
        return (self.data.phase(alpha) - 1.0).real * self.weight


class PairSwapSamples:
    """One loop X of duration 2, pair vector X(t) - X(t+1) from r to -r: (1/2) Re Phi is J_swap / Area."""

    def __init__(self, rng: np.random.Generator, count: int, slices: int, strides=(1,)):
        x = brownian_loops(rng, count, 2 * slices, 2.0)
        self.count = count
        self.data = PhaseData.from_paths(x[:, : slices + 1] - x[:, slices:], slice_variance(slices))

    def values(self, alpha: float, stride: int = 1) -> np.ndarray:
        return 0.5 * self.data.phase(alpha).real
