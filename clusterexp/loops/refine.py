"""Time slices of several bodies, halved where two of their pairs are close at once.

The slice factor of `pairfactor` is exact for one pair: given the endpoints of a slice, the angle that
the pair's relative vector sweeps has a known law.  When one body takes part in two pairs (a mobile
particle and two flux tubes, two mobile particles and a tube), the two angles of one slice are
correlated, and the product of the two exact factors is only right when at most one of the pairs is
close (within a few slice lengths) -- the far pair then sweeps its minimal angle except with a
probability below exp(-NEAR_CUT) (a sideways bridge excursion, see `pairfactor`).

`refine` therefore cuts every slice on which two or more pairs are near into two halves, drawing the
midpoint of every mobile body from its exact Brownian-bridge law (mean the chord's midpoint,
per-component variance a quarter of the slice's), and repeats on the halves up to `depth` times.  This
is an exact change of the time grid (the bridge laws are consistent), so the estimators stay unbiased
in the limit of deep refinement; what remains after `depth` halvings is the product rule on slices
shorter by 2^depth, needed only where two bodies of the pairs are closer than ~6 slice lengths of
the refined grid (docs/tubes.md, "Refinement").

Static bodies (flux tubes) have variance 0: their position stays fixed.
"""
from __future__ import annotations

from dataclasses import dataclass

import numpy as np

from .pairfactor import NEAR_CUT, classify_segments
from .sampler import PhaseData


@dataclass
class Level:
    """Final slices of one refinement depth: per body, start and end points (complex arrays)."""

    depth: int
    rows: np.ndarray
    starts: list[np.ndarray]
    ends: list[np.ndarray]


def path_slices(paths: list[np.ndarray]) -> tuple[np.ndarray, list[np.ndarray], list[np.ndarray]]:
    """Flatten equally sliced paths (samples, points) into per-slice rows, starts and ends; a static
    body is given as a (samples,) array and repeated."""
    mobile = next(p for p in paths if p.ndim == 2)
    count, points = mobile.shape
    slices = points - 1
    rows = np.repeat(np.arange(count), slices)
    starts, ends = [], []
    for p in paths:
        if p.ndim == 2:
            starts.append(p[:, :-1].ravel())
            ends.append(p[:, 1:].ravel())
        else:
            fixed = np.repeat(p, slices)
            starts.append(fixed)
            ends.append(fixed)
    return rows, starts, ends


def _near(u0: np.ndarray, u1: np.ndarray, v: float, cut: float) -> np.ndarray:
    """Chord from u0 to u1 within sqrt(cut v / 2) of the origin."""
    w = u1 - u0
    ww = w.real * w.real + w.imag * w.imag
    with np.errstate(invalid="ignore", divide="ignore"):
        s = np.where(ww > 0, -(u0.real * w.real + u0.imag * w.imag) / ww, 0.0)
    p = u0 + np.clip(s, 0.0, 1.0) * w
    return 2.0 * (p.real * p.real + p.imag * p.imag) / v < cut


def refine(rng: np.random.Generator, rows, starts, ends, mobile: tuple[float, ...], variance: float,
           pairs: list[tuple[int, int]], depth: int, cut: float = NEAR_CUT) -> list[Level]:
    """Halve every slice on which two or more of `pairs` are near, `depth` times at most.

    variance: per-component variance of one mobile body's increment over an unrefined slice; `mobile`
    weighs it per body (1 or True for a particle of the unit mass, m_unit/m for another mass, 0 or False
    for a static tube).
    Returns the final slices grouped by depth (a slice's variance is variance / 2^depth).
    """
    levels = []
    for level in range(depth + 1):
        v = variance / 2 ** level
        near = np.zeros(rows.shape, dtype=int)
        for b, c in pairs:
            near += _near(starts[b] - starts[c], ends[b] - ends[c], v * (mobile[b] + mobile[c]), cut)
        split = near >= 2 if level < depth else np.zeros(rows.shape, dtype=bool)
        keep = ~split
        levels.append(Level(level, rows[keep], [s[keep] for s in starts], [e[keep] for e in ends]))
        if not split.any():
            break
        rows = np.concatenate([rows[split], rows[split]])
        new_starts, new_ends = [], []
        for s, e, moves in zip(starts, ends, mobile):
            s, e = s[split], e[split]
            if moves:   # a body's weight: its increment variance relative to `variance` (1/mass ratio)
                z = rng.standard_normal((s.size, 2)) * np.sqrt(v * moves / 4.0)
                mid = 0.5 * (s + e) + (z[:, 0] + 1j * z[:, 1])
            else:
                mid = s
            new_starts.append(np.concatenate([s, mid]))
            new_ends.append(np.concatenate([mid, e]))
        starts, ends = new_starts, new_ends
    return levels


def pair_data(levels: list[Level], b: int, c: int, mobile: tuple[float, ...], variance: float,
              count: int) -> PhaseData:
    """Slice data (far angle sums per sample, near slices) of the pair (b, c) over refined slices."""
    far = np.zeros(count)
    rows, xs, phis = [], [], []
    for lv in levels:
        if lv.rows.size == 0:
            continue
        u = np.stack([lv.starts[b] - lv.starts[c], lv.ends[b] - lv.ends[c]], axis=1)
        v = variance / 2 ** lv.depth * (mobile[b] + mobile[c])
        far_slice, near_rows, x, phi = classify_segments(u, v)
        far += np.bincount(lv.rows, weights=far_slice, minlength=count)
        rows.append(lv.rows[near_rows])
        xs.append(x)
        phis.append(phi)
    return PhaseData(far, np.concatenate(rows), np.concatenate(xs), np.concatenate(phis))
