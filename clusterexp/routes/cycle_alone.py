"""A k-cycle alone at second order in the exchange parameter (docs/perturbative.md, sections 4d and 4h), by
the pair decomposition of section 4d evaluated by quadrature: the independent route for `cycle_square`,
which sums the same pairs and pairs of pairs exactly (section 4l); the package itself does not call it
(tests/test_two_loop_fast.py, tests/test_cycle_square.py, benchmarks/cycle_square.py).

The same sum as tests/test_three_cycle.py `_k_cycle_orders` (the scalar version, kept there as the
cross-check for k = 3, 4): the single pairs (a, b) of the k strands exactly (the Aharonov-Bohm kernel with
the Gaussian law of the pair's end points, Schlaefli's form; one quadrature per lag b - a), the pairs of
pairs as Lambda_pq - C_pq with the angle covariance of Gaussian calculus and its equal-time term. Here the
pairs of pairs are integrated together on the graded rule of `two_loop_fast` (covariances compiled once,
evaluated on arrays): every kink (equal times) lies on s - t = -1, 0, 1, and two pairs are the same
vector only at the corners.
"""
from __future__ import annotations

import math
import warnings
from functools import cache
from itertools import combinations

import numpy as np
from scipy import integrate

from .two_loop_fast import Forms, line_rule, square_rule
from .two_loop_quadrature import laplace_x_k0


@cache
def _single(v: float, c: float, tol: float):
    """(first, second)-order parts of one pair whose relative vector has per-component variance v at
    each end and covariance c between its ends."""
    det = v * v - c * c
    a = v / (2 * det)
    weight = 1 / (math.pi * det)

    def laplace(t, phi):
        return laplace_x_k0(((np.cosh(t) + np.cos(phi)) / 2 - (c / det) * np.cos(phi)) / a) / a ** 2
    first = -weight * integrate.dblquad(laplace, 0, np.pi, 0, 50, epsabs=tol, epsrel=tol)[0]
    tail = weight * integrate.dblquad(lambda t, phi: laplace(t, phi) * t * np.sinh(t) / (np.cosh(t) + np.cos(phi)),
                                      0, np.pi, 0, 50, epsabs=tol, epsrel=tol)[0]

    def angle_law(phi):
        return weight * laplace_x_k0(-(c / det) * np.cos(phi) / a) / a ** 2
    return first, tail - 0.5 * integrate.quad(lambda phi: phi * phi * angle_law(phi), 0, np.pi, epsabs=tol)[0]


def _expectation_ab(c, v_a, v_b):
    """E[A.B/(|A|^2 |B|^2)] of two centred Gaussian planar vectors, elementwise."""
    rho2 = c * c / (v_a * v_b)
    safe = np.where(rho2 < 1e-14, 0.5, rho2)
    return np.where(rho2 < 1e-14, c / (2 * v_a * v_b), -np.log1p(-safe) * c / (2 * safe * v_a * v_b))


def k_cycle_orders(k: int, levels: int = 10, nodes: int = 12, tol: float = 1e-10):
    """(first, second)-order coefficients of the k-cycle cluster (1/k^2) E[e^{i alpha Theta}]."""
    def gam(h):
        h = h % k
        return h * (k - h) / k

    def pair_cov(p, q, lag):                 # cov(A_p(s), A_q(s - lag)) per component
        (a, b), (c, d) = p, q
        return -0.5 * (gam(a - c + lag) - gam(a - d + lag) - gam(b - c + lag) + gam(b - d + lag))
    pairs = list(combinations(range(k), 2))
    with warnings.catch_warnings():
        warnings.simplefilter("ignore", integrate.IntegrationWarning)
        singles = [_single(pair_cov(p, p, 0), pair_cov(p, p, 1), tol) for p in pairs]
    first = sum(f for f, _ in singles)
    second = sum(s for _, s in singles)
    forms, line_forms = Forms({"X": (1.0, k)}), Forms({"X": (1.0, k)})
    plan = []
    for p, q in combinations(pairs, 2):
        A = [("X", 0, (1, 0, 0), (p[0], 1, 0)), ("X", 0, (-1, 0, 0), (p[1], 1, 0))]       # s = x
        dA = [(z, 1, co, t) for z, _, co, t in A]
        B = [("X", 0, (1, 0, 0), (q[0], 0, 1)), ("X", 0, (-1, 0, 0), (q[1], 0, 1))]       # t = y
        s = [forms.slot(), forms.slot()]
        forms.add(A, B, s[0]); forms.add(dA, B, s[1])
        (a, b), (c, d) = p, q
        shared = (a == c) - (a == d) - (b == c) + (b == d)
        ls = None
        if shared:
            ls = line_forms.slot()
            line_forms.add(A, B, ls)
        plan.append((pair_cov(p, p, 0), pair_cov(q, q, 0), s, shared, ls))
    forms.compile(); line_forms.compile()
    u, y, w = square_rule(levels, nodes)
    vals = forms.evaluate(u, y)
    xl, wl = line_rule()
    lvals = line_forms.evaluate(0 * xl, xl) if line_forms.nslots else None
    for v_a, v_b, s, shared, ls in plan:
        c, c_s = vals[s[0]], vals[s[1]]
        c_t = -c_s
        det = v_a * v_b - c * c
        rho2 = c * c / (v_a * v_b)
        safe = np.where(rho2 < 1e-14, 0.5, rho2)
        sin2 = np.where(rho2 < 1e-14, 0.5, -(1 - safe) * np.log1p(-safe) / (2 * safe))
        g = -(v_a * v_b * c_s * c_t / det ** 2) * sin2 + (c * c_s * c_t / det) * _expectation_ab(c, v_a, v_b)
        lam_minus_angle = (1 / det - g) @ w
        if shared:
            lam_minus_angle -= shared * (_expectation_ab(lvals[ls], v_a, v_b) @ wl)
        second += lam_minus_angle
    return first / k ** 2, second / k ** 2
