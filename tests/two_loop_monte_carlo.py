"""Brownian-loop Monte Carlo of the two-loop clusters of one species (docs/perturbative.md, section 4f):
a p-cycle (loop X of duration p) and a q-cycle (loop Y of duration q) at offset c, with every pair's
Aharonov-Bohm factor exact per time slice (clusterexp.loops.pairfactor). A route independent of the
quadrature engine (clusterexp/routes/two_loop_quadrature.py): no closed segments, no Gaussian calculus,
only sampled loops and the exact two-body slice factor.

The cluster's term of b_{p+q} is K int d^2c E[Phi_self(X) Phi_self(Y) (Phi_link - 1)], where Phi_link is
the product of the phases of the p q pairs with one particle in each cycle (the link curves X(s + a) -
Y(s + b) - c, one per orbit of (a, b) -> (a + 1, b + 1)), Phi_self the phases of the pairs inside a
cycle, and K = 1/(p q)^2 (halved when p = q): (1/n!) times the number of permutations of that cycle type
times the free weight 1/k of each k-cycle (lambda = beta = 1, as in clusterexp.loops.sampler). The even
part (f(a) + f(-a))/2 about bosons is c1 |a| + c2 a^2 + c3 |a|^3 + ...; a fit over several small a gives
the first-order coefficient (checked against -1/2, -1/3, -1/8 of section 3) and the second (section 4f).
"""
from __future__ import annotations

import math

import numpy as np

from clusterexp.loops.sampler import PhaseData, brownian_loops, coarse, mixture_offsets, phase_levels, slice_variance

WIDTH = 0.4


def _self_curves(x: np.ndarray, p: int, n: int) -> list[np.ndarray]:
    """Relative paths of the pairs inside a p-cycle (loop x of p n slices), as sampled curves."""
    if p == 1:
        return []
    if p == 2:                                       # X(t) - X(t + 1), t in [0, 1]: the exchanged pair
        return [x[:, : n + 1] - x[:, n:]]
    if p in (3, 4):                                  # X(t) - X(t + 1), t in [0, p]: one closed curve
        idx = (np.arange(p * n + 1) + n) % (p * n)
        curves = [x - x[:, idx]]
        if p == 4:                                   # X(t) - X(t + 2), t in [0, 2]: pairs (0, 2), (1, 3)
            curves.append(x[:, : 2 * n + 1] - x[:, 2 * n:])
        return curves
    raise ValueError("p-cycles with p > 4 are not needed for b_4")


def _orbits(p: int, q: int) -> list[tuple[int, int]]:
    period = p * q // math.gcd(p, q)
    seen, out = set(), []
    for a in range(p):
        for b in range(q):
            if (a, b) not in seen:
                out.append((a, b))
                seen.update(((a + j) % p, (b + j) % q) for j in range(period))
    return out


class TwoLoopSamples:
    """`count` samples of the {p-cycle, q-cycle} cluster at `n` slices per unit time, seen at strides."""

    def __init__(self, rng: np.random.Generator, count: int, p: int, q: int, n: int, strides=(1,), own=True,
                 masses=None):
        """masses = (m_x, m_y), in units of m_ref (own=False only): two species, the p-cycle of mass m_x
        (per-component variance t/(2 pi m_x) over a time t) and the q-cycle of mass m_y; the link slices
        then have the relative variance (1/m_x + 1/m_y) t/(2 pi), and the cluster's term of b_{p,q} has
        the weight m_x m_y/(p q)^2 (each k-cycle of species s: free weight (m_s/m_ref)/k), its first order
        -(m_x + m_y)/(2 p q) (section 3). None: one species of unit mass, weight 1/(p q)^2, halved for p = q."""
        if masses is not None and own:
            raise ValueError("masses are for two species (own=False)")
        m_x, m_y = masses or (1.0, 1.0)
        x = brownian_loops(rng, count, p * n, float(p)) / math.sqrt(m_x)
        y = brownian_loops(rng, count, q * n, float(q)) / math.sqrt(m_y)
        centre = x[:, :: n][:, :p].mean(axis=1) - y[:, :: n][:, :q].mean(axis=1)
        off, dens = mixture_offsets(rng, count, WIDTH, 1)
        c = centre + off[:, 0]
        if masses is None:
            self.weight = 1.0 / dens / ((p * q) ** 2 * (2 if p == q else 1))
        else:
            self.weight = m_x * m_y / dens / (p * q) ** 2
        period = p * q // math.gcd(p, q)
        steps = np.arange(period * n + 1)
        links = [x[:, (steps + a * n) % (p * n)] - y[:, (steps + b * n) % (q * n)] - c[:, None]
                 for a, b in _orbits(p, q)]
        selfs = _self_curves(x, p, n) + _self_curves(y, q, n) if own else []   # own=False: any p, q
        self.link = _joined(links, n, strides, (1 / m_x + 1 / m_y) / 2)
        self.self = _joined(selfs, n, strides) if selfs else None

    def values(self, alpha: float, stride: int = 1, own: bool = True) -> np.ndarray:
        """own=False: the pairs inside each cycle carry no phase (two species, each at its boson point,
        with the mutual parameter alpha between them; one species' weight)."""
        ph = self.link[stride].phase(alpha) - 1.0
        if own and self.self is not None:
            ph = ph * self.self[stride].phase(alpha)
        return ph.real * self.weight


class CycleAloneSamples:
    """A p-cycle alone (one loop of duration p, every pair inside it): its term of b_p is
    Re Phi_self / p^2 ((1/p!) (p - 1)! free weight 1/p); minus the ideal-Bose 1/p^2 it is the phase part."""

    def __init__(self, rng: np.random.Generator, count: int, p: int, q: int, n: int, strides=(1,)):
        x = brownian_loops(rng, count, p * n, float(p))
        self.self = _joined(_self_curves(x, p, n), n, strides)
        self.weight = 1.0 / p ** 2

    def values(self, alpha: float, stride: int = 1) -> np.ndarray:
        return (self.self[stride].phase(alpha).real - 1.0) * self.weight


def _joined(curves, n, strides, diffusion: float = 1.0) -> dict[int, PhaseData]:
    """diffusion: the relative variance per slice over that of two particles of unit mass."""
    if diffusion == 1.0:
        levels = [phase_levels(u, n, strides) for u in curves]
    else:
        levels = [{s: PhaseData.from_paths(coarse(u, s), diffusion * slice_variance(n // s)) for s in strides}
                  for u in curves]
    return {s: PhaseData.join([lv[s] for lv in levels]) for s in strides}


def even_parts(p: int, q: int, amplitudes, n: int, strides, count: int, batches: int, seed: int,
               link_only: bool = False, masses=None):
    """Per batch and stride, the even part (f(a) + f(-a))/2 at each amplitude a (a -> 2 - a is -a for
    one species: the exchange parameter has period 2). Returns an array [batch, stride, amplitude].
    q = 0: the p-cycle alone (CycleAloneSamples), its ideal-Bose value taken off. link_only: only the
    pairs between the cycles carry the phase (a mutual parameter, period 1: -a is 1 - a); masses (with
    link_only): two species of those masses (`TwoLoopSamples`)."""
    rng = np.random.default_rng(seed)
    out = np.empty((batches, len(strides), len(amplitudes)))
    make = CycleAloneSamples if q == 0 else TwoLoopSamples
    period = 1.0 if link_only else 2.0
    for b in range(batches):
        s = make(rng, count, p, q, n, strides, own=False, masses=masses) if link_only \
            else make(rng, count, p, q, n, strides)
        values = (lambda a, st: s.values(a, st, own=False)) if link_only else s.values
        for i, st in enumerate(strides):
            for j, a in enumerate(amplitudes):
                out[b, i, j] = 0.5 * (values(a, st).mean() + values(period - a, st).mean())
    return out


def fit_coefficients(amplitudes, evens: np.ndarray, degree: int = 3) -> np.ndarray:
    """Least-squares c1 a + c2 a^2 + ... + c_degree a^degree through the even parts (last axis)."""
    a = np.asarray(amplitudes, dtype=float)
    design = np.stack([a ** k for k in range(1, degree + 1)], axis=1)
    solve = np.linalg.pinv(design)
    return np.einsum("kj,...j->...k", solve, evens)
