"""Brownian-loop Monte Carlo of third-order cluster coefficients (clusterexp.loops).

Every physics expectation names its source; the Monte Carlo values are compared within their own
error bars.  Budgets are small so that the file runs in well under a minute on two cores.
"""
from __future__ import annotations

import math

import mpmath
import numpy as np
import pytest

from clusterexp.errors import ClusterexpError
from clusterexp.loops import (LoopsError, TargetNotReachable, estimate_second_order, estimate_third_order,
                              scan_third_order)
from clusterexp.loops import exact
from clusterexp.loops.pairfactor import SAMPLING, pair_factor


def published_a3(alpha: float) -> float:
    """a_3 = 1/36 + sin^2(pi a)/(12 pi^2) + c_2 sin^4(pi a), c_2 = -1.65e-5: Myrheim & Olaussen,
    Phys. Lett. B 299 (1993) 267 (cond-mat/9210028) for the Fourier form; Mashkevich, Myrheim &
    Olaussen, Phys. Lett. B 382 (1996) 124 (hep-th/9602171) for c_2 (journal reference from memory)."""
    s = math.sin(math.pi * alpha) ** 2
    return 1.0 / 36.0 + s / (12.0 * math.pi ** 2) - 1.65e-5 * s * s


# ---------------------------------------------------------------------------- slice factor


def bessel_sum_factor(alpha: float, x: float, phi: float) -> complex:
    """Independent route: sum_m e^{-i m phi} I_{|m+alpha|}(x) / e^{x cos phi}, the partial-wave form of
    the Aharonov-Bohm heat kernel over the free one (Aharonov & Bohm, Phys. Rev. 115 (1959) 485, partial
    waves; from memory), evaluated with mpmath at high precision."""
    mpmath.mp.dps = 50
    total = mpmath.mpc(0)
    for m in range(-int(3 * x + 40), int(3 * x + 41)):
        total += mpmath.exp(mpmath.mpc(0, -m) * mpmath.mpf(phi)) * mpmath.besseli(abs(m + mpmath.mpf(alpha)),
                                                                                  mpmath.mpf(x))
    return complex(total / mpmath.exp(mpmath.mpf(x) * mpmath.cos(mpmath.mpf(phi))))


@pytest.mark.parametrize("alpha,x,phi", [
    (0.3, 1e-4, 1.0), (0.5, 0.2, -2.5), (0.77, 1.0, 3.1), (1.25, 3.0, math.pi), (-0.4, 6.0, -3.05),
    (0.5, 9.0, 2.9), (0.1, 2.0, 0.0), (1.9, 0.05, -0.3),
])
def test_slice_factor_matches_bessel_partial_waves(alpha, x, phi):
    reference = bessel_sum_factor(alpha, x, phi)
    assert abs(pair_factor(alpha, np.array([x]), np.array([phi]))[0] - reference) < 1e-10
    # the sampler's cheaper quadrature (pairfactor.SAMPLING) stays within its stated 1e-7
    assert abs(pair_factor(alpha, np.array([x]), np.array([phi]), SAMPLING)[0] - reference) < 1e-7


def test_slice_factor_limits():
    # Integer alpha: the phase of a winding is trivial, only the minimal angle counts (exact identity).
    x = np.array([0.3, 2.0]); phi = np.array([1.0, -2.0])
    assert np.allclose(pair_factor(2.0, x, phi), np.exp(2j * phi))
    # Far from the origin (large x, phi not near pi) the factor is the minimal-angle phase.
    assert abs(pair_factor(0.37, np.array([400.0]), np.array([0.8]))[0] - np.exp(0.37j * 0.8)) < 1e-12


# ---------------------------------------------------------------------------- exact inputs


def test_exact_two_body_inputs():
    # b_2 = -a_2, a_2 = -1/4 + a - a^2/2 on [0, 2], period 2, even: Arovas, Schrieffer, Wilczek & Zee,
    # Nucl. Phys. B 251 (1985) 117.
    for a in np.linspace(0.0, 2.0, 9):
        assert exact.b2_identical(a) == pytest.approx(-(-0.25 + a - a * a / 2), abs=1e-14)
        assert exact.b2_identical(a + 2.0) == pytest.approx(exact.b2_identical(a), abs=1e-12)
        assert exact.b2_identical(-a) == pytest.approx(exact.b2_identical(a), abs=1e-12)
    # b_11 = -d(1-d), d = frac(alpha_12) (harmonic-regulator result quoted in the project brief; rederived
    # by the Laplace transform of I_nu in docs/loops.md and checked by sampling below).
    for a in (0.0, 0.2, 0.5, 1.0, 1.3):
        d = a - math.floor(a)
        assert exact.b11_mutual(a) == pytest.approx(-d * (1 - d), abs=1e-14)


def test_loop_part_integral_by_quadrature():
    # Independent route for the two-loop integral: a relative loop at distance r has
    # E[e^{i a Theta}] = sum_m I_|m+a|(x) / e^x with x = 2 pi r^2 in Jacobi units, so
    # int d^2rho (E - 1) = (1/2) int_0^inf e^{-x} sum_m [I_|m+a|(x) - I_|m|(x)] dx, and the centre of
    # mass gives a factor 2 (d^2 zeta integrates to 2 Area).  By Poisson summation the integrand decays
    # like exp(-2 pi^2 x), so [0, 20] suffices.
    mpmath.mp.dps = 15
    a = 0.3

    def integrand(x):
        s = sum(mpmath.besseli(abs(m + a), x) - mpmath.besseli(abs(m), x) for m in range(-25, 26))
        return mpmath.exp(-x) * s

    value = 2 * 0.5 * mpmath.quad(integrand, [0, 0.2, 1, 5, 20])
    assert float(value) == pytest.approx(exact.loop_part_b2(a), abs=1e-6)


def test_mixed_virial_formula_by_numerical_inversion():
    # Independent route: invert rho_s = z_s d(beta P)/dz_s numerically on a grid of small densities,
    # fit beta P(rho_1, rho_2) by a polynomial and compare the rho_1^2 rho_2 coefficient with
    # a_21 = b11^2 + 4 b11 b20 - 2 b21 (and the single-species a_3 = 4 b2^2 - 2 b3).
    b20, b11, b02, b30, b21, b12, b03 = 0.13, -0.21, 0.07, 0.05, -0.04, 0.02, 0.03

    def pressure(z1, z2):
        return (z1 + z2 + b20 * z1**2 + b11 * z1 * z2 + b02 * z2**2 + b30 * z1**3 + b21 * z1**2 * z2
                + b12 * z1 * z2**2 + b03 * z2**3)

    def densities(z1, z2):
        return (z1 + 2 * b20 * z1**2 + b11 * z1 * z2 + 3 * b30 * z1**3 + 2 * b21 * z1**2 * z2 + b12 * z1 * z2**2,
                z2 + 2 * b02 * z2**2 + b11 * z1 * z2 + 3 * b03 * z2**3 + b21 * z1**2 * z2 + 2 * b12 * z1 * z2**2)

    grid = np.linspace(-0.02, 0.02, 9)
    r1, r2 = [a.ravel() for a in np.meshgrid(grid, grid)]
    z1, z2 = r1.copy(), r2.copy()
    for _ in range(100):
        d1, d2 = densities(z1, z2)
        z1, z2 = z1 + (r1 - d1), z2 + (r2 - d2)
    p = pressure(z1, z2)
    powers = [(i, j) for i in range(6) for j in range(6) if 1 <= i + j <= 5]
    design = np.stack([r1**i * r2**j for i, j in powers], axis=1)
    coef = dict(zip(powers, np.linalg.lstsq(design, p, rcond=None)[0]))
    assert coef[(2, 1)] == pytest.approx(exact.a21_mixed(b20, b11, b21), abs=1e-6)
    assert coef[(3, 0)] == pytest.approx(exact.a3_identical(b20, b30), abs=1e-6)


# ---------------------------------------------------------------------------- two-body sampling


def test_two_body_sampler_reproduces_exact_values():
    # Validates normalisations, loops, offsets and slice factors against the exact results above.
    for kind, a in (("identical", 0.3), ("identical", 1.6), ("distinct", 0.5)):
        r = estimate_second_order(kind, a, samples=120_000, seed=5)
        assert r.estimate.error < 2.5e-3
        assert abs(r.estimate.value - r.exact) < 4 * r.estimate.error, (kind, a, r)


def test_error_bars_cover_exact_two_body_values():
    # Coverage: 40 independent small runs with exact answers; a correct error bar puts ~95% within
    # 2 sigma (P(fewer than 32 of 40) < 1e-4); an error bar too small by 2 fails with probability > 0.9.
    inside = 0
    runs = [("identical", 0.3), ("identical", 1.25), ("distinct", 0.5), ("distinct", 0.8)] * 10
    for seed, (kind, a) in enumerate(runs):
        r = estimate_second_order(kind, a, samples=4_000, seed=1000 + seed)
        inside += abs(r.estimate.value - r.exact) < 2 * r.estimate.error
    assert inside >= 32, inside


# ---------------------------------------------------------------------------- third order


def test_boson_and_fermion_points():
    # Ideal 2D Bose and Fermi gases: b_3 = 1/9, so a_3 = 4 (1/4)^2 - 2/9 = 1/36 (textbook ideal quantum
    # gases, e.g. Huang, Statistical Mechanics (1987); from memory).  The phases are then exactly +-1,
    # so the error bars vanish; the period (alpha -> alpha + 2) is the exchange convention.
    res = scan_third_order("identical", [0.0, 1.0, 2.0, -1.0], samples=6_000, seed=2, workers=1, slices=8)
    for r in res:
        assert abs(r.a3.value - 1.0 / 36.0) <= max(2 * r.a3.error, 1e-12), r
        assert abs(r.b3.value - 1.0 / 9.0) <= max(2 * r.b3.error, 1e-12)


@pytest.mark.parametrize("alpha,samples,allocation", [
    # The exchange family vanishes identically at alpha = 1/2 and dominates the variance at 1/4, hence
    # the allocations (relative samples per family).  About 15 s each on two idle cores.
    (0.5, 500_000, {"cycle": 3, "exchange": 1, "triple": 6}),
    (0.25, 600_000, {"cycle": 1, "exchange": 6, "triple": 3}),
])
def test_a3_against_published_fourier_form(alpha, samples, allocation):
    r = estimate_third_order("identical", alpha, samples=samples, seed=7, workers=2, slices=8,
                             allocation=allocation)
    assert r.a3.error < 5e-4, r
    assert abs(r.a3.value - published_a3(alpha)) < 3 * r.a3.error, (r, published_a3(alpha))


def test_a3_symmetric_under_alpha_to_one_minus_alpha():
    # a_3(alpha) = a_3(1 - alpha): Sen, Phys. Rev. Lett. 68 (1992) 2977.  Both points come from the
    # same loops, so the error of the difference is taken from the per-round differences.
    lo, hi = scan_third_order("identical", [0.3, 0.7], samples=150_000, seed=8, workers=2, slices=8,
                              allocation={"cycle": 1, "exchange": 8, "triple": 1})
    diff_rounds = np.array(lo.round_values) - np.array(hi.round_values)
    # a_3 difference = 4 (b2(lo)^2 - b2(hi)^2) - 2 (b3(lo) - b3(hi)); only the b3 part is sampled
    two_body = 4 * (lo.two_body["b_2"] ** 2 - hi.two_body["b_2"] ** 2)
    diff = two_body - 2 * diff_rounds.mean()
    err = 2 * diff_rounds.std(ddof=1) / math.sqrt(diff_rounds.size)
    assert err < 2e-3
    assert abs(two_body) > 10 * err          # the symmetry is not satisfied term by term
    assert abs(diff) < 3 * err, (diff, err)


def test_mixed_coefficient_vanishes_at_integer_mutual_parameter():
    # Mutual phase e^{2 pi i alpha_12 n}: trivial at alpha_12 = 0 and 1, so b_21 = a_21 = 0 there
    # (project convention; the same statement as "no mutual statistics").  At alpha_12 = 1/2 it is not
    # zero, and alpha_12 has period 1.
    grid = [(0.3, 0.0), (0.3, 1.0), (1.0, 1.0), (0.0, 0.5), (0.3, 0.4), (0.3, 1.4), (1.7, 0.6)]
    res = scan_third_order("pair_plus_one", grid=grid, samples=40_000, seed=3, workers=1, slices=8)
    for r in res[:3]:
        assert abs(r.b21.value) <= max(2 * r.b21.error, 1e-12), r
        assert abs(r.a21.value) <= max(2 * r.a21.error, 1e-12), r
    half = res[3]
    assert abs(half.b21.value) > 5 * half.b21.error, half
    assert res[4].b21.value == pytest.approx(res[5].b21.value, abs=1e-12)
    # Reflection (all phases conjugated) with both periods: (alpha, alpha_12) -> (2 - alpha, 1 - alpha_12)
    assert res[6].b21.value == pytest.approx(res[4].b21.value, abs=1e-12)


def test_scan_reuses_samples_and_matches_single_runs():
    kw = dict(samples=12_000, seed=11, workers=1, slices=8)
    scan = scan_third_order("identical", [0.2, 0.45], **kw)
    single = estimate_third_order("identical", 0.45, **kw)
    assert single.b3.value == scan[1].b3.value
    assert single.b3.error == scan[1].b3.error
    assert single.round_values == scan[1].round_values
    grid = scan_third_order("pair_plus_one", grid=[(0.0, 0.3), (0.5, 0.5)], **kw)
    one = estimate_third_order("pair_plus_one", 0.5, 0.5, **kw)
    assert one.b21.value == grid[1].b21.value


def test_seed_reproducible_independent_of_workers():
    kw = dict(samples=24_000, slices=8)
    a = estimate_third_order("identical", 0.4, seed=9, workers=1, **kw)
    b = estimate_third_order("identical", 0.4, seed=9, workers=2, **kw)
    c = estimate_third_order("identical", 0.4, seed=10, workers=1, **kw)
    assert a.b3.value == b.b3.value and a.b3.error == b.b3.error and a.rounds == b.rounds
    assert a.b3.value != c.b3.value


def test_time_cap_and_unreachable_target():
    r = estimate_third_order("identical", 0.5, time_cap=1.5, seed=1, workers=1, slices=8)
    assert r.seconds < 5 and r.rounds >= 2
    with pytest.raises(TargetNotReachable) as info:
        estimate_third_order("identical", 0.5, target_error=1e-7, time_cap=3, seed=1, workers=1, slices=8)
    assert info.value.needed_seconds > 3
    assert "would need" in str(info.value)
    # a reachable target stops early
    r = estimate_third_order("identical", 1.0, target_error=1e-3, time_cap=30, seed=1, workers=1, slices=8)
    assert r.b3.error <= 1e-3


@pytest.mark.parametrize("kwargs,needle", [
    (dict(kind="identical", alpha=0.5, order=4), "order 4"),
    (dict(kind="identical", alpha=0.5, dimension=3), "dimension 3"),
    (dict(kind="identical", alpha=0.5, species=3), "species"),
    (dict(kind="three_species", alpha=0.5), "unknown kind"),
    (dict(kind="pair_plus_one", alpha=0.5), "needs alpha_12"),
    (dict(kind="identical", alpha=0.5, alpha_12=0.2), "alpha_12 belongs"),
    (dict(kind="identical", alpha=0.5), "budget"),
    (dict(kind="identical", alpha=0.5, samples=100, slices=7), "even"),
])
def test_requests_outside_the_domain(kwargs, needle):
    with pytest.raises(LoopsError) as info:
        estimate_third_order(**kwargs)
    assert isinstance(info.value, ClusterexpError)
    assert needle in str(info.value)
    if needle in ("order 4", "dimension 3", "species", "unknown kind"):
        assert "supported" in str(info.value) and "pair_plus_one" in str(info.value)
