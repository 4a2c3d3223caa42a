"""The 3-cycle cluster of b_3 at second order in the exchange parameter (docs/perturbative.md, section 4d).

The 3-cycle of three identical particles is (1/9) E[exp(i alpha (theta_p + theta_q + theta_r))], the
three angles those swept by the relative vectors of its three pairs (the segments [0,1], [1,2], [2,3] of
D(tau) = X(tau) - X(tau + 1) on a Brownian loop X of duration 3). Expanding the product of
(1 + f_p), f_p = e^{i alpha theta_p} - 1, its alpha^2 coefficient is (1/3)(S + Lambda - C):

* S, the single-pair term: the exact Aharonov-Bohm heat kernel of one pair between its end points,
  weighted by the Gaussian law of the end points (an exact integral, evaluated two ways);
* Lambda, the contact-contact term of two different pairs: int int ds dt / det Cov(D(s), D(1 + t));
* C, the covariance E[theta_p theta_q] of the angles of two different pairs, by Gaussian calculus,
  with its equal-time part (the shared particle moves both pairs at once).

Units hbar = m = beta = 1 (lambda^2 = 2 pi); a free particle's kernel over time 1 is e^{-|x|^2/2}/(2 pi).
The checks: the first order of S is the derived contact term -3/2 (half of b_3^(1) = -1 sits in the
3-cycle); S by the Bessel sum (mpmath) and by the Schlaefli form (scipy) agree; the closed forms of
Lambda and C against their quadratures; C against sampled Brownian loops (numpy); and the sum, 1/2,
is the ring part alone (X_C = 0), which with the rest of b_3 gives the published a_3 = 1/36 + alpha^2/12
(Myrheim & Olaussen, Phys. Lett. B 299 (1993) 267).
"""
import math
import warnings
from itertools import combinations

import mpmath
import numpy as np
import pytest
import sympy
from scipy import integrate, special

from clusterexp.routes.perturbative import Species, chain_part, taylor_coefficients
from clusterexp.routes.two_loop_quadrature import laplace_x_k0 as _laplace_x_k0

PERIOD = 3.0
VARIANCE = 2.0 / 3.0          # per-component variance of D(s) = X(s) - X(s + 1) on a loop of duration 3


def _loop_covariance(a, b, c, d):
    """E[(X_a - X_b)(X_c - X_d)] per component for a Brownian loop of duration 3 (variogram |h|(T - |h|)/T)."""
    def gamma(h):
        h = abs(h) % PERIOD
        return h * (PERIOD - h) / PERIOD
    return 0.5 * (gamma(a - d) + gamma(b - c) - gamma(a - c) - gamma(b - d))


def _lag_covariance(u):
    """Cov(D_x(s), D_x(s + u)) from the loop's variogram (not the piecewise-linear closed form)."""
    return _loop_covariance(0.0, 1.0, u, u + 1.0)


def _single_pair_schlaefli(order):
    """[E f_p] at first or second order in alpha, from the Schlaefli integral of I_nu:
    sum_l e^{i l phi} I_{|l + alpha|}(z) = e^{-i alpha phi} e^{z cos phi} - (sin(pi alpha)/pi) int_0^inf
    e^{-z cosh t} [e^{-alpha t}/(1 + e^{i phi - t}) + e^{(alpha - 1) t} e^{-i phi}/(1 + e^{-i phi - t})] dt
    (|phi| < pi, 0 <= alpha < 1), whose real bracket is 1 at alpha = 0 and whose alpha-derivative is
    -t sinh t/(cosh t + cos phi); the x-integral with x K_0(2x) is `_laplace_x_k0`."""
    options = dict(epsabs=1e-13, epsrel=1e-12)
    if order == 1:
        value = 2 * integrate.dblquad(lambda t, p: _laplace_x_k0(1.5 * np.cos(p) + 0.5 * np.cosh(t)),
                                      0, np.pi, 0, 60, **options)[0]
        return -3 / (2 * np.pi) * value
    phase = -integrate.quad(lambda p: p * p * _laplace_x_k0(np.cos(p)), 0, np.pi, epsabs=1e-14, epsrel=1e-13)[0]
    tail = 2 * integrate.dblquad(
        lambda t, p: t * np.sinh(t) * _laplace_x_k0(1.5 * np.cos(p) + 0.5 * np.cosh(t)) / (np.cosh(t) + np.cos(p)),
        0, np.pi, 0, 60, **options)[0]
    return 3 / (2 * np.pi) * (phase + tail)


def _single_pair_bessel_sum(x_max=24, digits=20):
    """[E f_p]_2 = (3/2) int_0^inf x K_0(2x) sum_l (-1)^l I_l(3x/2) d^2/dnu^2 I_nu(x/2)|_{nu=|l|} dx (mpmath,
    the alternating sum needs the extra digits); the tail beyond x_max is below 1e-10."""
    with mpmath.workdps(digits):
        def integrand(x):
            total = mpmath.mpf(0)
            for l in range(int(8 + 2.5 * x)):
                term = (-1) ** l * mpmath.besseli(l, 1.5 * x) * mpmath.diff(lambda nu: mpmath.besseli(nu, x / 2), l, 2)
                total += term if l == 0 else 2 * term
            return x * mpmath.besselk(0, 2 * x) * total
        return float(1.5 * mpmath.quad(integrand, [0, 1, 4, 10, x_max]))


CLOSED_S = float(mpmath.polylog(2, 0.25) / 4 - mpmath.pi ** 2 / 24)
CLOSED_LAMBDA = 1.5 + 2 * math.log(2)
CLOSED_C = 2 * math.log(2) - math.pi ** 2 / 24 + float(mpmath.polylog(2, 0.25)) / 4


def test_single_pair_first_order_is_the_derived_contact_share():
    """First order: [E f_p]_1 = -3 int x K_0(2x) I_0(3x/2) K_0(x/2) dx = -3/2 (scipy, exponentially scaled
    Bessel functions) and the Schlaefli form agrees; (1/3)(-3/2) = -1/2 is the 3-cycle's share of the
    derived b_3^(1) = -(2/3) H_2 = -1 (Sen's symmetry gives the loop + 2-cycle the other -1/2)."""
    bessel = integrate.quad(lambda x: x * special.k0e(2 * x) * special.i0e(1.5 * x) * special.k0e(x / 2)
                            * math.exp(-x), 0, np.inf, epsabs=1e-14, epsrel=1e-12)[0]
    assert abs(-3 * bessel + 1.5) < 1e-10
    assert abs(_single_pair_schlaefli(1) + 1.5) < 1e-10


def test_single_pair_second_order_by_two_routes():
    """[E f_p]_2 by the Bessel sum (mpmath) and by the Schlaefli form (scipy): the same exact integral by
    two evaluations; both equal Li_2(1/4)/4 - pi^2/24 (identified; not proven by hand)."""
    schlaefli = _single_pair_schlaefli(2)
    assert abs(schlaefli - CLOSED_S) < 1e-12
    assert abs(_single_pair_bessel_sum() - schlaefli) < 1e-9


def test_contact_contact_and_angle_covariance_closed_forms():
    """Lambda = int_0^2 (1 - |u - 1|) du / (v^2 - c(u)^2) = 3/2 + 2 ln 2 and
    C = int_0^2 (1 - |u - 1|) g(u) du + (3/2) ln(4/3) = 2 ln 2 - pi^2/24 + Li_2(1/4)/4, with
    g(u) = -(rho'/rho)^2 ln(1 - rho^2)/2 (rho = c/v; Gaussian calculus for two isotropic planar Gaussian
    vectors: E[sin^2 phi] = -(1 - rho^2) ln(1 - rho^2)/(2 rho^2), E[A.B/(|A|^2 |B|^2)] = -ln(1 - rho^2)/(2 rho v))
    and the equal-time term -E[A.B/(|A|^2 |B|^2)] at u = 1 times the jump -1 of the increments' covariance.
    c(u) comes from the loop's variogram; rho' by a difference inside each piece between the kinks of c."""
    v = _lag_covariance(0.0)
    assert abs(v - VARIANCE) < 1e-15
    cuts = [0, 2 / 3, 1, 2]
    lam = sum(integrate.quad(lambda u: (1 - abs(u - 1)) / (v * v - _lag_covariance(u) ** 2), a, b,
                             epsabs=1e-13)[0] for a, b in zip(cuts, cuts[1:]))
    assert abs(lam - CLOSED_LAMBDA) < 1e-9

    def g(u, h=1e-6):
        rho = _lag_covariance(u) / v
        step = h if u % 1 < 0.5 else -h      # difference toward the middle of the piece, away from the kinks
        slope = (_lag_covariance(u + step) - _lag_covariance(u)) / (step * v)
        if abs(rho) < 1e-9:
            return slope ** 2 / 2
        return -(slope / rho) ** 2 * math.log1p(-rho * rho) / 2
    regular = sum(integrate.quad(lambda u: (1 - abs(u - 1)) * g(u), a, b, epsabs=1e-12)[0]
                  for a, b in ((0, 2 / 3), (2 / 3, 1), (1, 2)))
    rho_one = _lag_covariance(1.0) / v
    equal_time = -(-math.log1p(-rho_one ** 2) / (2 * rho_one * v))   # jump -1 of Cov(D'(s), D'(s + u)) at u = 1
    assert abs(rho_one + 0.5) < 1e-12
    assert abs(regular + equal_time - CLOSED_C) < 1e-8


def test_angle_covariance_against_sampled_loops():
    """Independent route for C: discretised Brownian loops of duration 3 (numpy, 64 steps per unit time),
    the angles of the three segments of D summed from principal increments (their sum is 2 pi times an
    integer, checked), and the mean of theta_p theta_q over the three neighbouring pairs. The Gaussian-calculus
    value 1.0420 agrees within four standard errors; without its equal-time term (0.6105) it would not."""
    rng = np.random.default_rng(20261203)
    steps, loops, chunk = 64, 120_000, 20_000
    n = 3 * steps
    values = []
    for _ in range(loops // chunk):
        increments = (rng.standard_normal((chunk, n)) + 1j * rng.standard_normal((chunk, n))) / math.sqrt(steps)
        x = np.cumsum(increments, axis=1)
        x -= np.arange(1, n + 1)[None, :] / n * x[:, -1:]
        d = x - np.roll(x, -steps, axis=1)
        angles = np.angle(np.roll(d, -1, axis=1) / d).reshape(chunk, 3, steps).sum(axis=2)
        turns = angles.sum(axis=1) / (2 * math.pi)
        assert np.allclose(turns, np.round(turns), atol=1e-6)
        values.append((angles[:, 0] * angles[:, 1] + angles[:, 1] * angles[:, 2] + angles[:, 2] * angles[:, 0]) / 3)
    values = np.concatenate(values)
    mean, error = values.mean(), values.std() / math.sqrt(len(values))
    assert abs(mean - CLOSED_C) < 4 * error + 0.01, (mean, error)
    assert abs(mean - (CLOSED_C - 1.5 * math.log(4 / 3))) > 8 * error


def test_three_cycle_second_order_is_its_ring_part_and_b3_is_59_24():
    """(1/3)(S + Lambda - C) = 1/2: the 3-cycle at second order is its ring part F^2 = 1/2 alone (X_C = 0);
    with the three loops (11/24, chains) and the loop + 2-cycle (3/2, Sen's symmetry) b_3^(2) = 59/24 about
    bosons, and -13/24 about fermions (the loop + 2-cycle changes sign), which the module returns; with the
    exact b_2 this is the published a_3 = 1/36 + alpha^2/12 and 1/36 + (1 - alpha)^2/12 (Myrheim & Olaussen
    1993)."""
    three_cycle = (CLOSED_S + CLOSED_LAMBDA - CLOSED_C) / 3
    assert abs(three_cycle - 0.5) < 1e-14
    assert abs((_single_pair_schlaefli(2) + CLOSED_LAMBDA - CLOSED_C) / 3 - 0.5) < 1e-12
    e = sympy.Symbol("e", real=True)
    three_loops = chain_part([Species(e)], {}, (3,), fock=False)[e ** 2]
    loop_and_two_cycle = sympy.Rational(3, 2)
    b3 = three_loops + loop_and_two_cycle + sympy.Rational(1, 2)
    assert b3 == sympy.Rational(59, 24)
    assert taylor_coefficients([Species(e)], {}, (3,), "boson", 2)[e ** 2] == b3
    assert taylor_coefficients([Species(e)], {}, (3,), "fermion", 2)[e ** 2] == three_loops - loop_and_two_cycle + sympy.Rational(1, 2)
    for about, b2 in (("boson", sympy.Rational(1, 4) - e + e ** 2 / 2), ("fermion", -sympy.Rational(1, 4) + e ** 2 / 2)):
        coefficients = taylor_coefficients([Species(e)], {}, (3,), about, 2)
        b3_series = sum(value * monomial for monomial, value in coefficients.items()).subs(sympy.Abs(e), e)
        a3 = sympy.expand(4 * b2 ** 2 - 2 * b3_series)
        assert [a3.coeff(e, k) for k in range(3)] == [sympy.Rational(1, 36), 0, sympy.Rational(1, 12)]


@pytest.mark.parametrize("mass", [sympy.Rational(1, 2), 3])
def test_b3_scales_with_the_mass_in_the_plane(mass):
    e = sympy.Symbol("e", real=True)
    unit = taylor_coefficients([Species(e)], {}, (3,), "boson", 2)
    heavy = taylor_coefficients([Species(e, mass)], {}, (3,), "boson", 2)
    assert all(heavy[m] == mass * unit[m] for m in unit)


# ------------------------------------------------------------------------------------- every k-cycle


def _k_cycle_orders(k, tol=1e-9):
    """(first, second)-order coefficients of the k-cycle cluster (1/k^2) E[e^{i alpha Theta}] by the pair
    decomposition of docs/perturbative.md, section 4d, for any k (pairs (a, b) of the k strands; their
    relative vectors X(s + a) - X(s + b), s in [0, 1], on a loop of duration k):
    single pairs exactly (the Aharonov-Bohm kernel with the Gaussian law of the pair's end points, in the
    Schlaefli form), pairs of pairs by Lambda_pq - C_pq with the Gaussian-calculus angle covariance and its
    equal-time terms (strands shared at the same physical time)."""
    def gam(h):                       # the loop's variogram, |h| < k
        return abs(h) - h * h / k

    def dgam(h):
        return math.copysign(1.0, h) - 2 * h / k

    def cov(p, s, q, t):
        (a, b), (c, d) = p, q
        return -0.5 * (gam(s + a - t - c) - gam(s + a - t - d) - gam(s + b - t - c) + gam(s + b - t - d))

    def cov_s(p, s, q, t):            # d/ds; every term depends on s - t, so d/dt = -d/ds
        (a, b), (c, d) = p, q
        return -0.5 * (dgam(s + a - t - c) - dgam(s + a - t - d) - dgam(s + b - t - c) + dgam(s + b - t - d))

    def single(p):
        v, c = cov(p, 0, p, 0), cov(p, 0, p, 1)
        det = v * v - c * c
        a = v / (2 * det)
        weight = 1 / (math.pi * det)          # 2 (half range in phi) / (2 pi det)

        def laplace(t, phi):
            return _laplace_x_k0(((np.cosh(t) + np.cos(phi)) / 2 - (c / det) * np.cos(phi)) / a) / a ** 2
        first = -weight * integrate.dblquad(laplace, 0, np.pi, 0, 50, epsabs=tol, epsrel=tol)[0]
        tail = weight * integrate.dblquad(lambda t, phi: laplace(t, phi) * t * np.sinh(t) / (np.cosh(t) + np.cos(phi)),
                                          0, np.pi, 0, 50, epsabs=tol, epsrel=tol)[0]
        angle_law = lambda phi: weight * _laplace_x_k0(-(c / det) * np.cos(phi) / a) / a ** 2   # noqa: E731
        assert abs(integrate.quad(angle_law, 0, np.pi)[0] - 1) < 1e-8
        assert abs(first + 1 / v) < 1e-6          # the contact: -2 pi times the density of the pair at 0
        return first, tail - 0.5 * integrate.quad(lambda phi: phi * phi * angle_law(phi), 0, np.pi, epsabs=tol)[0]

    def expectation_ab(c, v_a, v_b):           # E[A.B/(|A|^2 |B|^2)]
        rho2 = c * c / (v_a * v_b)
        return c / (2 * v_a * v_b) if rho2 < 1e-14 else -math.log1p(-rho2) * c / (2 * rho2 * v_a * v_b)

    def two_pairs(p, q):
        v_a, v_b = cov(p, 0, p, 0), cov(q, 0, q, 0)
        lam = integrate.dblquad(lambda t, s: 1 / (v_a * v_b - cov(p, s, q, t) ** 2), 0, 1, 0, 1, epsabs=tol)[0]

        def g(t, s):
            c, c_s = cov(p, s, q, t), cov_s(p, s, q, t)
            c_t = -c_s
            det = v_a * v_b - c * c
            rho2 = c * c / (v_a * v_b)
            sin2 = 0.5 if rho2 < 1e-14 else -(1 - rho2) * math.log1p(-rho2) / (2 * rho2)
            return -(v_a * v_b * c_s * c_t / det ** 2) * sin2 + (c * c_s * c_t / det) * expectation_ab(c, v_a, v_b)
        angle = integrate.dblquad(g, 0, 1, 0, 1, epsabs=tol)[0]
        (a, b), (c, d) = p, q
        shared = (a == c) - (a == d) - (b == c) + (b == d)
        if shared:
            angle += shared * integrate.quad(lambda s: expectation_ab(cov(p, s, q, s), v_a, v_b), 0, 1, epsabs=tol)[0]
        return lam - angle

    pairs = list(combinations(range(k), 2))
    with warnings.catch_warnings():
        # the corners where two pairs become the same vector are integrable log singularities: quad
        # reports its subdivision limit there; the tests bound the error by comparing with exact values
        warnings.simplefilter("ignore", integrate.IntegrationWarning)
        singles = [single(p) for p in pairs]
        first = sum(f for f, _ in singles)
        second = sum(s for _, s in singles) + sum(two_pairs(p, q) for p, q in combinations(pairs, 2))
    return first / k ** 2, second / k ** 2


def _fock_squared_ring(k):
    """The F^2 part of the one-species ring (1/2) (H + F)^2 k (docs/perturbative.md (4.1), H = F = |alpha| r,
    r = -ln(1 - z), k = z/(1 - z)) in b_k: two Fock tadpoles merge their loops with the central one into one
    k-cycle. Computed here with sympy series, independently of the module."""
    z = sympy.Symbol("z")
    return sympy.Rational(1, 2) * sympy.series(sympy.log(1 - z) ** 2 * z / (1 - z), z, 0, k + 1).removeO().coeff(z, k)


@pytest.mark.parametrize("k", [3, 4])
def test_every_k_cycle_carries_only_its_fock_ring_part(k):
    """The k-cycle alone at second order is its F^2 ring part, (1/2)[z^k] ln^2(1 - z) z/(1 - z): 1/2 for
    k = 3 (and the engine agrees with the closed forms above), 1 for k = 4; the quadratures of section 4d
    give 1.4583333 = 35/24 and 1.875 = 15/8 for k = 5, 6 as well (docs; too slow for the suite). First
    order: the k-cycle's share of b_k^(1), the Fock half (1/2)[z^k] ln^2(1 - z) of the contact (section 3)."""
    first, second = _k_cycle_orders(k, tol=1e-8)
    z = sympy.Symbol("z")
    fock_half = sympy.Rational(1, 2) * sympy.series(sympy.log(1 - z) ** 2, z, 0, k + 1).removeO().coeff(z, k)
    assert abs(first + float(fock_half)) < 1e-7
    assert abs(second - float(_fock_squared_ring(k))) < 2e-5, second
    if k == 3:
        assert abs(second - (CLOSED_S + CLOSED_LAMBDA - CLOSED_C) / 3) < 2e-5


def test_two_loop_engine_reproduces_the_loop_with_a_two_cycle():
    """The engine of section 4f (clusterexp/routes/two_loop_quadrature.py) on the cluster that Sen's symmetry fixes: the
    one-species loop + 2-cycle of b_3 is 3/2 at second order (test_b3_loop_clusters_from_sen_symmetry),
    split into the link^2 part 3/4 (section 4e, with the static limits), the Hartree-Fock ring 1 and the
    angle-area part -1/4 (section 4c: E[Theta_S Area(S)] = lambda^2/(2 pi)); normalisation P from the
    cluster's first order, -1/2 (the Fock half of b_3^(1) = -1 that is not in the 3-cycle)."""
    from clusterexp.routes.two_loop_quadrature import two_loop_parts
    segments, first, link2, contact, angle_area = two_loop_parts(2, 1, TOL=1e-6)
    norm = -0.5 / (segments * first)
    assert abs(first + 2 * math.pi) < 1e-7
    assert abs(norm * link2 - 0.75) < 1e-4
    assert abs(norm * contact - 1.0) < 1e-6
    assert abs(-2 * math.pi * norm * sum(angle_area.values()) + 0.25) < 1e-4
