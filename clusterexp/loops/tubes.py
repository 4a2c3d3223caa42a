"""Loop families of the three-body problems with static flux tubes (docs/tubes.md).

Units lambda = 1, beta = 1 (a loop of duration s is a planar Brownian bridge with per-component variance
s/(2 pi)); tubes are Poisson-distributed with n tubes per lambda^2 and the mobile gas's ln Xi is
averaged over their positions.  Flux gamma in flux quanta: a loop winding w times around a tube
picks up e^{2 pi i gamma w}; exchange alpha: e^{i pi alpha} per exchange (pair_factor's parameter is
alpha for a pair of identical particles and the mutual parameter for distinct ones, on the angle swept
by their relative vector).

Families (each sample's value has the cluster integral as its expectation):

  two_tubes    one loop of duration 1, tubes at R1, R2 (independent offsets about the loop's
               centroid, density g(o1) g(o2)):
                 connected = Re[(Phi_1 - 1)(Phi_2 - 1)] / (g(o1) g(o2))  -> T2(gamma1, gamma2)
                 single_k  = Re(Phi_k - 1) / g(ok)                       -> -s_k(1 - s_k)/2
  separation   the same loop, the two tubes a fixed vector apart, their midpoint sampled:
                 connected at that separation (K(d) of docs/tubes.md); at d = 0 the tubes are one
                 tube of flux gamma1 + gamma2
  pair_tube    two loops of duration 1 (offset c) and one tube R:
                 pair_tube = Re[(Phi_12 - 1)(Phi_1R Phi_2R - 1)] / (g(c) g(R))
                 pair      = Re(Phi_12 - 1) / g(c)                        -> C/A (two-body, exact)
                 single    = Re(Phi_1R - 1) / g(R)                        -> -s(1 - s)/2
  swap_tube    one loop of duration 2 (an exchanged pair) and one tube R:
                 swap_tube = Re[Phi_12 (Phi_1R Phi_2R - 1)] / g(R)
                 swap      = Re Phi_12                                    -> 1 - 2a (two-body, exact)

Every family's paths are refined (`refine`) where two of its pairs are near on one slice, so the
product of exact per-pair slice factors has no pair-product error beyond the refinement depth.
"""
from __future__ import annotations

import numpy as np

from .refine import pair_data, path_slices, refine
from .sampler import brownian_loops, mixture_offsets

# Offsets of tubes and of the second loop: the defensive mixture of `sampler` (0.8 N(w) + 0.2 N(2.5 w)).
# Widths from a pilot of the variance per sample at gamma = 1/2, alpha = 1/2 (docs/tubes.md).
WIDTH_TUBE = 0.25
WIDTH_LOOP_PAIR = 0.35
DEPTH = 5                     # refinement halvings (slices down to 1/32 of the base slice)
ONE = (True,)


def _centroid(path: np.ndarray) -> np.ndarray:
    return path[:, :-1].mean(axis=1)


class _Phases:
    """Phase of each stored pair at a parameter value, cached within one batch (scans reuse them)."""

    def __init__(self, data: dict):
        self.data = data
        self.cache = {}

    def __call__(self, name: str, value: float) -> np.ndarray:
        key = (name, float(value))
        if key not in self.cache:
            self.cache[key] = self.data[name].phase(float(value))
        return self.cache[key]


def _pair_phases(rng, paths, mobile, variance, pairs: dict, depth: int) -> _Phases:
    rows, starts, ends = path_slices(paths)
    count = paths[0].shape[0]
    levels = refine(rng, rows, starts, ends, mobile, variance, list(pairs.values()), depth)
    return _Phases({name: pair_data(levels, b, c, mobile, variance, count) for name, (b, c) in pairs.items()})


class TwoTubeSamples:
    """One loop of duration 1 and two tubes at independent offsets about its centroid."""

    def __init__(self, rng: np.random.Generator, count: int, slices: int, depth: int = DEPTH):
        y = brownian_loops(rng, count, slices, 1.0)
        o1, g1 = mixture_offsets(rng, count, WIDTH_TUBE, 1)
        o2, g2 = mixture_offsets(rng, count, WIDTH_TUBE, 1)
        centre = _centroid(y)
        self.weights = (1.0 / g1, 1.0 / g2)
        self.phases = _pair_phases(rng, [y, centre + o1[:, 0], centre + o2[:, 0]], (True, False, False),
                                   1.0 / slices / (2 * np.pi), {"t1": (0, 1), "t2": (0, 2)}, depth)

    def values(self, gamma1: float, gamma2: float) -> dict[str, np.ndarray]:
        p1, p2 = self.phases("t1", gamma1), self.phases("t2", gamma2)
        w1, w2 = self.weights
        return {"connected": ((p1 - 1.0) * (p2 - 1.0)).real * w1 * w2,
                "single_1": (p1 - 1.0).real * w1, "single_2": (p2 - 1.0).real * w2}


class SeparationSamples:
    """One loop of duration 1 and two tubes a fixed (complex) vector apart; their midpoint is sampled."""

    def __init__(self, rng: np.random.Generator, count: int, slices: int, separation: complex,
                 depth: int = DEPTH):
        y = brownian_loops(rng, count, slices, 1.0)
        o, g = mixture_offsets(rng, count, WIDTH_TUBE, 1)
        mid = _centroid(y) + o[:, 0]
        self.weight = 1.0 / g
        self.merged = separation == 0
        variance = 1.0 / slices / (2 * np.pi)
        if self.merged:   # one tube carrying both fluxes: the windings around the two are equal
            self.phases = _pair_phases(rng, [y, mid], (True, False), variance, {"t1": (0, 1)}, 0)
        else:
            half = 0.5 * complex(separation)
            self.phases = _pair_phases(rng, [y, mid + half, mid - half], (True, False, False), variance,
                                       {"t1": (0, 1), "t2": (0, 2)}, depth)

    def values(self, gamma1: float, gamma2: float) -> dict[str, np.ndarray]:
        if self.merged:
            joint = self.phases("t1", gamma1 + gamma2)
            p1, p2 = self.phases("t1", gamma1), self.phases("t1", gamma2)
            connected = joint - p1 - p2 + 1.0
        else:
            connected = (self.phases("t1", gamma1) - 1.0) * (self.phases("t2", gamma2) - 1.0)
        return {"connected": connected.real * self.weight}


class PairTubeSamples:
    """Two loops of duration 1 (the second at offset c from the first's centroid) and one tube R
    about the midpoint of their centroids.  `ratio` = m_1/m_2: particle 1's loop has the per-component
    variance of a loop of duration 1/ratio (lambda of particle 2 = 1), and the integrals pair_tube and
    pair are weighed by r_1 r_2 = ratio, the product of the two thermal densities K_r(x, x) = r
    (docs/tubes.md, unequal masses); `single` is loop 1's own one-tube integral, (1/ratio)(-s(1 - s)/2)."""

    def __init__(self, rng: np.random.Generator, count: int, slices: int, depth: int = DEPTH,
                 ratio: float = 1.0):
        y1 = brownian_loops(rng, count, slices, 1.0 / ratio)
        y2 = brownian_loops(rng, count, slices, 1.0)
        oc, gc = mixture_offsets(rng, count, WIDTH_LOOP_PAIR, 1)
        orr, gr = mixture_offsets(rng, count, WIDTH_TUBE, 1)
        c1 = _centroid(y1)
        second = y2 + (c1 - _centroid(y2) + oc[:, 0])[:, None]
        tube = 0.5 * (c1 + _centroid(second)) + orr[:, 0]
        self.weights = (1.0 / gc, 1.0 / gr)
        self.ratio = float(ratio)
        self.phases = _pair_phases(rng, [y1, second, tube], (1.0 / ratio, 1.0, 0.0), 1.0 / slices / (2 * np.pi),
                                   {"pair": (0, 1), "t1": (0, 2), "t2": (1, 2)}, depth)

    def values(self, alpha: float, gamma1: float, gamma2: float) -> dict[str, np.ndarray]:
        f = self.phases("pair", alpha) - 1.0
        p1, p2 = self.phases("t1", gamma1), self.phases("t2", gamma2)
        wc, wr = self.weights
        return {"pair_tube": (f * (p1 * p2 - 1.0)).real * wc * wr * self.ratio, "pair": f.real * wc * self.ratio,
                "single": (p1 - 1.0).real * wr}


class SwapTubeSamples:
    """One loop X of duration 2 (particle 1 is X on [0, 1], particle 2 is X on [1, 2]) and one tube R
    about the loop's centroid."""

    def __init__(self, rng: np.random.Generator, count: int, slices: int, depth: int = DEPTH):
        x = brownian_loops(rng, count, 2 * slices, 2.0)
        o, g = mixture_offsets(rng, count, WIDTH_TUBE, 1)
        tube = _centroid(x) + o[:, 0]
        self.weight = 1.0 / g
        self.phases = _pair_phases(rng, [x[:, : slices + 1], x[:, slices:], tube], (True, True, False),
                                   1.0 / slices / (2 * np.pi), {"pair": (0, 1), "t1": (0, 2), "t2": (1, 2)},
                                   depth)

    def values(self, alpha: float, gamma: float) -> dict[str, np.ndarray]:
        swap = self.phases("pair", alpha)
        around = self.phases("t1", gamma) * self.phases("t2", gamma) - 1.0
        return {"swap_tube": (swap * around).real * self.weight, "swap": swap.real}
