"""Compiled loops for the hot path of the sampler (numba): the slice classification of relative paths and
the product of the slice factors at half-integer statistics parameters.

Each function does in one pass per sample what `pairfactor.classify_segments` and
`PhaseData.phase` (with the closed form of `pairfactor.pair_factor` at alpha = k + 1/2) do with whole
numpy arrays; those stay as the reference (tests/test_loops_kernels.py compares the two to rounding).
The numpy form makes about twenty passes over arrays of (samples x slices) numbers, larger than the
caches; here each sample's slices are read once (benchmarks/loops_kernels.py: the speed-up).

Compiled on first use and cached on disk next to this file (numba's `cache=True`), so worker processes
of a run load the machine code instead of compiling it again.
"""
from __future__ import annotations

import math

import numba
import numpy as np


@numba.njit(cache=True, nogil=True)
def _classify(ur, ui, v, cut):                                        # pragma: no cover - compiled
    paths, points = ur.shape
    limit = 0.5 * cut * v
    far = np.zeros(paths)
    near = np.zeros((paths, points - 1), dtype=np.bool_)
    angle = np.empty((paths, points - 1))
    total = 0
    for i in range(paths):
        acc = 0.0
        for j in range(points - 1):
            ar, ai, br, bi = ur[i, j], ui[i, j], ur[i, j + 1], ui[i, j + 1]
            dot = ar * br + ai * bi
            phi = math.atan2(ar * bi - ai * br, dot)
            r0 = ar * ar + ai * ai
            num = r0 - dot
            ww = num + (br * br + bi * bi - dot)
            s = num / ww if ww > 0.0 else 0.0
            s = min(max(s, 0.0), 1.0)
            if r0 + s * (s * ww - 2.0 * num) < limit:
                near[i, j] = True
                angle[i, j] = phi
                total += 1
            else:
                acc += phi
        far[i] = acc
    rows = np.empty(total, dtype=np.int64)
    x = np.empty(total)
    phis = np.empty(total)
    k = 0
    for i in range(paths):
        for j in range(points - 1):
            if near[i, j]:
                ar, ai, br, bi = ur[i, j], ui[i, j], ur[i, j + 1], ui[i, j + 1]
                rows[k] = i
                x[k] = math.sqrt((ar * ar + ai * ai) * (br * br + bi * bi)) / v
                phis[k] = angle[i, j]
                k += 1
    return far, rows, x, phis


def classify(u: np.ndarray, v: float, cut: float):
    """As `pairfactor.classify_segments`: (far_sum, rows, x, phi) for complex paths u (paths, points)."""
    return _classify(np.ascontiguousarray(u.real), np.ascontiguousarray(u.imag), float(v), float(cut))


@numba.njit(cache=True, nogil=True)
def _half_phase(alpha, far, rows, x, phi):                           # pragma: no cover - compiled
    out = np.empty(far.size, dtype=np.complex128)
    for i in range(far.size):
        out[i] = complex(math.cos(alpha * far[i]), math.sin(alpha * far[i]))
    for k in range(rows.size):
        # R(k + 1/2; x, phi) = e^{i (k + 1/2) phi} erf(sqrt(2x) cos(phi/2)) (pairfactor.pair_factor)
        w = math.erf(math.sqrt(2.0 * x[k]) * math.cos(0.5 * phi[k]))
        out[rows[k]] *= complex(w * math.cos(alpha * phi[k]), w * math.sin(alpha * phi[k]))
    return out


def half_phase(alpha: float, far: np.ndarray, rows: np.ndarray, x: np.ndarray, phi: np.ndarray) -> np.ndarray:
    """exp(i alpha far) times the product of the exact slice factors over each sample's near slices, for
    half-integer alpha (the closed form); rows in any order."""
    return _half_phase(float(alpha), far, rows, x, phi)


@numba.njit(cache=True, nogil=True)
def _bridges(steps, scale):                                           # pragma: no cover - compiled
    count, segments = steps.shape[0], steps.shape[1]
    walk = np.empty((count, segments + 1), dtype=np.complex128)
    for i in range(count):
        xr = 0.0
        xi = 0.0
        walk[i, 0] = 0.0
        for j in range(segments):
            xr += steps[i, j, 0] * scale
            xi += steps[i, j, 1] * scale
            walk[i, j + 1] = complex(xr, xi)
        end = walk[i, segments]
        for j in range(1, segments + 1):
            walk[i, j] -= (j / segments) * end
    return walk


def bridges(steps: np.ndarray, scale: float) -> np.ndarray:
    """Planar Brownian bridges from 0 back to 0 out of Gaussian steps (count, segments, 2) of unit
    variance: the walk of the scaled steps minus its end point times the elapsed fraction."""
    return _bridges(steps, float(scale))
