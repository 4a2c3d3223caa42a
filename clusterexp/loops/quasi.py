"""Randomized quasi-Monte Carlo for the loop families: scrambled Sobol points, Brownian bridges.

A batch of N = 2^m samples takes one scrambled Sobol point set in D dimensions (scipy.stats.qmc,
Owen-type scrambling seeded by the batch's SeedSequence); each sample is one point.  Every batch mean is
an unbiased estimate (each scrambled point is uniform on the cube) and batches are independent
scrambles, so the runner's error from the scatter of batch means stays valid unchanged.

The loops are built by the Brownian-bridge (Levy) construction: the first coordinates fix the
midpoints of the whole loop, later ones fill in finer and finer slices.  The Sobol dimensions are
handed out in that order across all loops and offsets of a sample (offsets and the mixture choice
first, then bisection level 1 of every loop, level 2, ...): the low, best-distributed dimensions carry
the coarse shape of the paths, where most of the variance of the winding phases sits.

The sample classes of `sampler` draw through three calls (`random`, `standard_normal`,
`brownian_bridge`); a dry run with two samples records which coordinates each call needs and at what
level, and the real batch reads them from the point set in that order.
"""
from __future__ import annotations

import numpy as np
from scipy.special import ndtri
from scipy.stats import qmc

EDGE = 1e-15   # keep ndtri finite: a scrambled coordinate may be 0 only with probability 0, but floats


def bisection_order(segments: int) -> list[tuple[int, int, int, int]]:
    """(middle, left, right, level) of the Levy construction of a bridge over `segments` slices,
    breadth first: all midpoints of level 1, then level 2, ..."""
    out, queue = [], [(0, segments, 1)]
    while queue:
        nxt = []
        for left, right, level in queue:
            if right - left < 2:
                continue
            middle = (left + right) // 2
            out.append((middle, left, right, level))
            nxt += [(left, middle, level + 1), (middle, right, level + 1)]
        queue = nxt
    return out


def bridge_from_normals(normals: np.ndarray, segments: int, duration: float) -> np.ndarray:
    """Planar Brownian bridges from 0 back to 0 (per-component variance duration/(2 pi) per unit
    time) from standard normals of shape (count, segments - 1, 2), in `bisection_order`."""
    count = normals.shape[0]
    unit = duration / segments / (2.0 * np.pi)       # variance of one slice's increment per component
    walk = np.zeros((count, segments + 1), dtype=complex)
    for k, (middle, left, right, _) in enumerate(bisection_order(segments)):
        # conditional law of the midpoint given both ends (slices counted in units of one slice)
        a, b = middle - left, right - middle
        mean = (b * walk[:, left] + a * walk[:, right]) / (a + b)
        scale = np.sqrt(unit * a * b / (a + b))
        walk[:, middle] = mean + scale * (normals[:, k, 0] + 1j * normals[:, k, 1])
    return walk


class _Recorder:
    """Stands in for the random source in a dry run and records each call's coordinate levels."""

    def __init__(self):
        self.calls: list[np.ndarray] = []     # per call: the level of each coordinate (0 = first)
        self._rng = np.random.default_rng(0)

    def random(self, count):
        self.calls.append(np.zeros(1, dtype=int))
        return self._rng.random(count)

    def standard_normal(self, shape):
        self.calls.append(np.zeros(int(np.prod(shape[1:])), dtype=int))
        return self._rng.standard_normal(shape)

    def brownian_bridge(self, count, segments, duration):
        levels = [level for _, _, _, level in bisection_order(segments)]
        self.calls.append(np.repeat(levels, 2))
        normals = self._rng.standard_normal((count, segments - 1, 2))
        return bridge_from_normals(normals, segments, duration)


class ScrambledSobol:
    """The random source of one batch: coordinates of one scrambled Sobol point set, in the order
    the dry run found, handed out call by call."""

    def __init__(self, calls: list[np.ndarray], count: int, rng: np.random.Generator):
        levels = np.concatenate(calls)
        dims = levels.size
        # lowest level first; within a level, in the order of the calls (stable sort)
        rank = np.empty(dims, dtype=int)
        rank[np.argsort(levels, kind="stable")] = np.arange(dims)
        points = qmc.Sobol(dims, scramble=True, seed=rng).random(count)
        points = points[:, rank]
        starts = np.cumsum([0] + [c.size for c in calls])
        self._blocks = [points[:, a:b] for a, b in zip(starts[:-1], starts[1:])]
        self._next = 0

    def _block(self) -> np.ndarray:
        block = self._blocks[self._next]
        self._next += 1
        return block

    def random(self, count):
        return self._block()[:, 0].copy()

    def standard_normal(self, shape):
        return ndtri(np.clip(self._block(), EDGE, 1.0 - EDGE)).reshape(shape)

    def brownian_bridge(self, count, segments, duration):
        normals = ndtri(np.clip(self._block(), EDGE, 1.0 - EDGE)).reshape(count, segments - 1, 2)
        return bridge_from_normals(normals, segments, duration)


def scrambled_source(sample_class, rng: np.random.Generator, count: int, slices: int, strides):
    """The source for `sample_class(source, count, slices, strides)` in a batch of `count` points."""
    if count & (count - 1):
        raise ValueError(f"a scrambled Sobol batch needs a power of two of samples, got {count}")
    recorder = _Recorder()
    sample_class(recorder, 2, slices, strides)
    return ScrambledSobol(recorder.calls, count, rng)
