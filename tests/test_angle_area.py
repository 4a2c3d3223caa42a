"""The derived angle-area part of the two-loop clusters (docs/perturbative.md, section 4i) against the
quadrature table, section 4c's exact 2-cycle, a general-purpose library and sampled discretised loops."""
import math

import mpmath
import numpy as np
import pytest
import sympy
from sympy import Rational as R

from clusterexp.errors import NotSupportedYet
from clusterexp.routes import two_loop_table
from clusterexp.routes.angle_area import (
    angle_area_coefficients,
    first_order_normalisation,
    one_species_units,
    self_pair_angle_area,
)
from clusterexp.routes.perturbative import Species, chain_part, taylor_coefficients


@pytest.mark.parametrize("period, lag", [(2, 1), (3, 1), (4, 2), (5, 2), (7, 3)])
def test_self_pair_mode_sum_with_mpmath(period, lag):
    """Section 4i: E[theta Area] = pi sum_n n s_n^2 omega_n |phi_n|^2 / V. Independent route: mpmath sums
    the modes (variances s_n = T/(2 pi^2 n^2) of the loop written out) and divides by the variance
    V = 2 lag (T - lag)/T of the pair taken from the loop's variogram directly, not from the modes; the
    sum must give the sympy value (1 per unit diffusion), and the mode sum of V must give V."""
    T = mpmath.mpf(period)
    s = lambda n: T / (2 * mpmath.pi ** 2 * n ** 2)
    phi2 = lambda n: 2 * (1 - mpmath.cos(2 * mpmath.pi * n * lag / T))
    V = 2 * lag * (T - lag) / T
    # the modes n = period m + r, r = 1..period, grouped so that each series is smooth in m
    both_signs = lambda f: 2 * mpmath.nsum(lambda m: sum(f(period * m + r) for r in range(1, period + 1)), [0, mpmath.inf])
    numerator = both_signs(lambda n: mpmath.pi * n * s(n) ** 2 * (2 * mpmath.pi * n / T) * phi2(n))
    modes_of_v = both_signs(lambda n: s(n) * phi2(n))
    assert abs(modes_of_v - V) < 1e-12
    assert abs(numerator / V - float(self_pair_angle_area(period, lag))) < 1e-12
    assert self_pair_angle_area(period, lag, R(3, 7)) == R(3, 7)


def test_equal_masses_against_the_quadrature_table():
    """Independent route: `two_loop_table.ANGLE`, the quadrature engine of section 4f
    (`routes/two_loop_quadrature.py`: finite-difference Gaussian calculus on the link curves themselves,
    with the equal-time delta terms, at tolerance 1e-7), which this module does not use; every entry within
    its error bound, every two-loop cluster n = 4..10 (twenty-three), both cycles (n = 7 .. 10 from the
    vectorised engine `routes/two_loop_fast.py`)."""
    assert len(two_loop_table.ANGLE) == 23 and set(two_loop_table.ANGLE) == set(two_loop_table.LINK)
    for (p, q), ((angle_p, bound_p), (angle_q, bound_q)) in two_loop_table.ANGLE.items():
        exact_p, exact_q = one_species_units(p, q)
        assert abs(float(exact_p) - angle_p) <= bound_p, (p, q, exact_p, angle_p)
        assert abs(float(exact_q) - angle_q) <= max(bound_q, 1e-12), (p, q, exact_q, angle_q)
        # the pattern read off the table: -(p - 1)/2 times the cluster's |first order|
        first = R(1, p * q) if p != q else R(1, 2 * p * p)
        assert (exact_p, exact_q) == (-(p - 1) * first / 2, -(q - 1) * first / 2)


@pytest.mark.parametrize("masses", [(1, 1), (2, 1), (1, 3), (R(1, 2), R(5, 2)), (1, 10 ** 6 + 1), (R(10 ** 7 + 3, 7), 1)])
def test_pair_with_one_is_section_4c(masses):
    """Section 4c, derived separately for the 2-cycle by the antipodal curve D(t) = S(t) - S(t + 1):
    e_i d of b_{2,1} gets -(m_j/m_ref)/4 from the 2-cycle with the loop, any masses (the package's b_{2,1},
    which carries it, minus its Landau chain); the loop has no self pair, so e_j d gets nothing; and the
    normalisation is 4c's P = m_i m_j/(8 pi m_ref^2). The far mass ratios once made sympy's nsimplify
    guess surds for the exact rational."""
    m_i, m_j = masses
    e, d = sympy.symbols("e d", real=True)
    species = [Species(e, m_i), Species(None, m_j)]
    chain = chain_part(species, {(0, 1): d}, (2, 1))[e * d]
    b = taylor_coefficients(species, {(0, 1): d}, (2, 1), ("boson", "boson"), 2, unknown="name")
    assert angle_area_coefficients(2, 1, m_i, m_j) == (b[e * d] - chain, 0)
    assert angle_area_coefficients(2, 1, m_i, m_j) == (-R(m_j) / 4, 0)
    assert first_order_normalisation(2, 1, m_i, m_j) == R(m_i) * m_j / (8 * sympy.pi)
    # the reference mass: masses and m_ref scaled together change nothing
    assert angle_area_coefficients(3, 2, 3 * R(m_i), 3 * R(m_j), 3) == angle_area_coefficients(3, 2, m_i, m_j)


def _loops(rng, count, period, steps, diffusion):
    """Discretised Brownian loops (period * steps points, periodic) of the given diffusion per component."""
    walk = rng.normal(scale=math.sqrt(diffusion / steps), size=(count, period * steps, 2))
    walk -= walk.mean(axis=1, keepdims=True)
    return np.concatenate([np.zeros((count, 1, 2)), np.cumsum(walk, axis=1)[:, :-1]], axis=1)


def _pair_angle(loop, lag, steps):
    """Angle swept in one unit of time by loop(t) - loop(t + lag), from its wrapped increments."""
    size = loop.shape[1]
    t = np.arange(steps + 1)
    gap = loop[:, t] - loop[:, (t + lag * steps) % size]
    z = gap[..., 0] + 1j * gap[..., 1]
    return np.angle(z[:, 1:] / z[:, :-1]).sum(axis=1)


def _area(curve):
    """Shoelace area of closed polygons (points along axis 1)."""
    nxt = np.roll(curve, -1, axis=1)
    return 0.5 * (curve[..., 0] * nxt[..., 1] - curve[..., 1] * nxt[..., 0]).sum(axis=1)


@pytest.mark.parametrize("period, lag, diffusion", [(3, 1, 1.0), (4, 1, 0.5), (4, 2, 2.0)])
def test_self_pair_against_sampled_loops(period, lag, diffusion):
    """Independent route: direct numpy sampling of discretised loops (50 steps per unit time, 40,000
    loops; wrapped angle increments and the shoelace area, as in section 4c's 2-cycle check, whose
    discretisation undercounts by about 1%): E[theta Area(X)] = D_X for lags 1 and 2 of 3- and 4-cycles,
    and a factor 2 either way is rejected."""
    rng = np.random.default_rng(4100 + 10 * period + lag)
    samples = []
    for _ in range(4):
        loop = _loops(rng, 10_000, period, 50, diffusion)
        samples.append(_pair_angle(loop, lag, 50) * _area(loop))
    samples = np.concatenate(samples)
    mean, error = samples.mean(), samples.std() / math.sqrt(len(samples))
    exact = float(self_pair_angle_area(period, lag, sympy.nsimplify(diffusion)))
    assert abs(mean - exact) < 0.03 * exact + 4 * error, (mean, error, exact)
    assert abs(mean - exact / 2) > 0.3 * exact and abs(mean - 2 * exact) > 0.5 * exact


def _link_area(x_loop, y_loop, p, q, steps):
    """Sum of the shoelace areas of the link curves X(s + a) - Y(s + b), one per orbit of (a, b)."""
    span = p * q // math.gcd(p, q)
    s = np.arange(span * steps)
    total, seen = 0.0, set()
    for a in range(p):
        for b in range(q):
            if (a, b) in seen:
                continue
            seen.update(((a + j) % p, (b + j) % q) for j in range(span))
            total = total + _area(x_loop[:, (s + a * steps) % (p * steps)] - y_loop[:, (s + b * steps) % (q * steps)])
    return total


@pytest.mark.parametrize("p, q, d_x, d_y", [(3, 2, 1.0, 3.0), (2, 2, 0.5, 2.0)])
def test_unequal_masses_against_sampled_link_curves(p, q, d_x, d_y):
    """Independent route for unequal masses (the quadrature engine's angle part is for one species):
    numpy sampling of discretised loops X (p-cycle, diffusion m_ref/m_i) and Y (q-cycle, m_ref/m_j), the
    link curves built from both and their full shoelace areas, 40 steps per unit time, 80,000 pairs of loops.
    Checks the reduction sum_R E[theta_u Area(R)] = q E[theta_u Area(X)] = q D_X (and p D_Y for a pair of
    Y), and so the coefficients -2 pi P q sum_u E[theta_u Area] against `angle_area_coefficients` at
    m_i = 1/d_x, m_j = 1/d_y."""
    rng = np.random.default_rng(4200 + 10 * p + q)
    x_side, y_side = [], []
    for _ in range(8):
        x_loop, y_loop = _loops(rng, 10_000, p, 40, d_x), _loops(rng, 10_000, q, 40, d_y)
        area = _link_area(x_loop, y_loop, p, q, 40)
        x_side.append(_pair_angle(x_loop, 1, 40) * area)
        y_side.append(_pair_angle(y_loop, 1, 40) * area)
    m_i, m_j = sympy.nsimplify(1 / d_x), sympy.nsimplify(1 / d_y)
    norm = float(first_order_normalisation(p, q, m_i, m_j))
    coefficients = angle_area_coefficients(p, q, m_i, m_j)
    for samples, own, other, diffusion, exact in ((x_side, p, q, d_x, coefficients[0]),
                                                   (y_side, q, p, d_y, coefficients[1])):
        samples = np.concatenate(samples)
        mean, error = samples.mean(), samples.std() / math.sqrt(len(samples))
        assert abs(mean - other * diffusion) < 0.03 * other * diffusion + 4 * error, (mean, error)
        # every self pair carries the same expectation (lag symmetry and the lag-free result above)
        sampled = -2 * math.pi * norm * own * (own - 1) / 2 * mean
        scale = -2 * math.pi * norm * own * (own - 1) / 2
        assert abs(sampled - float(exact)) < abs(scale) * (0.03 * other * diffusion + 4 * error), (sampled, exact)
    # the mass dependence: the e_i d part goes with m_j, not with m_i
    assert coefficients[0] == -m_j * (p - 1) / (2 * p * q)


@pytest.mark.parametrize("p, q, d_x, d_y", [(2, 1, 0.5, 1.0), (2, 2, 0.5, 2.0)])
def test_unequal_masses_against_the_quadrature_engine(p, q, d_x, d_y):
    """Independent route: the quadrature engine of section 4f (`routes/two_loop_quadrature.py`, its
    cross part only, tolerance 1e-6, about 3 s and 10 s), with two diffusion constants: Gaussian calculus
    on the link curves themselves with the equal-time delta terms, normalised by its own single-segment
    first order G_1 and section 3's first order -(m_i + m_j)/(2 p q); no use of this module's reduction to
    the own loop's area. (Longer runs, not repeated here: {3, 2} at D_X = 1, D_Y = 3 gives 5.99999 and
    9.00000 against q D_X p(p - 1)/2 = 6 and p D_Y q(q - 1)/2 = 9; {3, 1} at D_X = 2, D_Y = 1/2 gives 5.999998.)"""
    from clusterexp.routes.two_loop_quadrature import two_loop_parts
    segments, single, _, _, angle_area = two_loop_parts(p, q, DX=d_x, DY=d_y, TOL=1e-6, cross_only=True)
    m_i, m_j = sympy.nsimplify(1 / d_x), sympy.nsimplify(1 / d_y)
    norm = -float(m_i + m_j) / (2 * p * q) / (segments * single)
    exact = angle_area_coefficients(p, q, m_i, m_j)
    for loop, value in zip("XY", exact):
        assert abs(-2 * math.pi * norm * angle_area[loop] - float(value)) < 1e-5, (loop, angle_area[loop], value)


def test_bad_input():
    """Floats are refused as not supported yet (the part is exact); cycle lengths and lags are checked."""
    with pytest.raises(NotSupportedYet):
        angle_area_coefficients(3, 2, 1.5, 1)
    with pytest.raises(ValueError):
        angle_area_coefficients(0, 2)
    with pytest.raises(ValueError):
        angle_area_coefficients(3, 2, -1, 1)
    with pytest.raises(ValueError):
        self_pair_angle_area(3, 3)
    assert angle_area_coefficients(1, 1) == (0, 0)
