"""Brownian-loop numbers for the three-body problems with static flux tubes (clusterexp.loops.tubes,
clusterexp.loops.tube_estimates, clusterexp.loops.refine; derivation in docs/tubes.md).

Each check names what it rests on; Monte Carlo values are compared within a few of their own standard
errors (fixed seeds, small budgets: the file runs in seconds).
"""
from __future__ import annotations

import math

import numpy as np
import pytest

from clusterexp.loops import LoopsError
from clusterexp.loops.refine import path_slices, refine
from clusterexp.loops.tube_estimates import (estimate_anyons_tube, estimate_separation, estimate_two_tubes,
                                             flux_shift)
from clusterexp.loops.tubes import SeparationSamples, TwoTubeSamples

SIGMAS = 4.0


def one_tube(gamma: float) -> float:
    """Z(gamma) - Z(0) = -gamma(1 - gamma)/2 on [0, 1], period 1: one particle and one Aharonov-Bohm
    tube (Comtet, Georgelin, Ouvry, J. Phys. A 22 (1989) 3917), written here independently of the code."""
    s = gamma % 1.0
    return -s * (1.0 - s) / 2.0


def arovas_b2(alpha: float) -> float:
    """b_2 = 1/4 - a + a^2/2, a = alpha mod 2 (Arovas, Schrieffer, Wilczek, Zee, Nucl. Phys. B 251 (1985)
    117, in the convention alpha = 0 bosons)."""
    a = alpha % 2.0
    return 0.25 - a + a * a / 2.0


def within(estimate, expected, sigmas=SIGMAS, floor=0.0) -> bool:
    return abs(estimate.value - expected) <= sigmas * estimate.error + floor


# ---------------------------------------------------------------------------- refinement


def test_refinement_draws_bridge_midpoints_from_their_exact_law():
    # Brownian bridge over one slice from a to b with per-component variance v: the midpoint is
    # Gaussian with mean (a+b)/2 and per-component variance v/4 (textbook bridge law, common practice).
    rng = np.random.default_rng(3)
    count, v = 20000, 0.04
    mobile = np.zeros((count, 2), dtype=complex)
    mobile[:, 1] = 0.1
    tubes = [np.full(count, 0.05 + 0.01j), np.full(count, 0.05 - 0.01j)]
    rows, starts, ends = path_slices([mobile] + tubes)
    levels = refine(rng, rows, starts, ends, (True, False, False), v, [(0, 1), (0, 2)], depth=1)
    halves = levels[1]
    assert halves.rows.size == 2 * count             # every slice is near both tubes: all halved once
    mids = halves.ends[0][: count]
    assert abs(mids.mean() - 0.05) < 5 * math.sqrt(v / 4 / count)
    assert abs(mids.real.var() / (v / 4) - 1.0) < 0.05 and abs(mids.imag.var() / (v / 4) - 1.0) < 0.05
    assert np.all(halves.starts[1] == tubes[0][0])   # static bodies do not move


# ---------------------------------------------------------------------------- one tube, integer fluxes


@pytest.fixture(scope="module")
def map_run():
    fluxes = [0.0, 1.0, -1.0, 0.3, 1.3, -0.7, 0.5]
    points = [(g1, g2) for g1 in fluxes for g2 in (0.3, 0.5, -0.25)]
    return {p.params: p for p in estimate_two_tubes(points, samples=12000, seed=19).points}


def test_one_tube_reproduces_comtet_georgelin_ouvry(map_run):
    for gamma in (0.3, 0.5, -0.25):
        point = map_run[(0.5, gamma)]
        assert within(point.values["single_2"], one_tube(gamma))
        assert point.exact["single_2"] == pytest.approx(one_tube(gamma))


def test_integer_flux_has_no_effect(map_run):
    # Period 1 in the flux (fact of the trade): a tube of integer flux is invisible, pathwise.
    for g2 in (0.3, 0.5, -0.25):
        for g1 in (0.0, 1.0, -1.0):
            assert abs(map_run[(g1, g2)].values["connected"].value) < 1e-12
            assert abs(map_run[(g1, g2)].values["single_1"].value) < 1e-12
        # a shift of one flux by an integer changes nothing on the same loops
        assert map_run[(1.3, g2)].values["connected"].value == pytest.approx(
            map_run[(0.3, g2)].values["connected"].value, abs=1e-9)
        assert map_run[(-0.7, g2)].values["connected"].value == pytest.approx(
            map_run[(0.3, g2)].values["connected"].value, abs=1e-9)


def test_two_tube_value_is_positive_and_resolved(map_run):
    # Not a published number: a guard that the connected integral is resolved (> 10 standard errors)
    # at half flux, where it is largest; its value is recorded in docs/tubes.md.
    t2 = map_run[(0.5, 0.5)].values["connected"]
    assert t2.value > 10 * t2.error


# ---------------------------------------------------------------------------- zero and large separation


def test_opposite_fluxes_cancel_at_zero_separation():
    # Two tubes at one point are one tube of flux gamma1 + gamma2 (gauge field additive); for gamma and
    # -gamma the joint phase is exactly 1, so the connected integral is 2 f(gamma), f = gamma(1-gamma)/2.
    run = estimate_separation([(0.3, -0.3), (0.2, 0.5), (0.25, 0.25)], separation=0, samples=6000, seed=4)
    for point in run.points:
        g1, g2 = point.params
        expected = one_tube(g1 + g2) - one_tube(g1) - one_tube(g2)
        assert within(point.values["connected"], expected)
    samples = SeparationSamples(np.random.default_rng(1), 500, 16, separation=0)
    joint = samples.phases("t1", 0.3 + (-0.3))
    assert np.allclose(joint, 1.0)


def test_far_apart_tubes_are_not_connected():
    # A loop of duration beta has size ~lambda/2; two tubes 3 lambda apart are never both encircled.
    run = estimate_separation([(0.5, 0.5)], separation=3.0, samples=4000, seed=5)
    assert abs(run.points[0].values["connected"].value) < 1e-6


def test_two_tube_integral_equals_the_integral_of_the_fixed_separation_family():
    # Independent sampling geometry: T2 = int d^2d K(d) = int 2 pi d K(d) dd, K from loops with the tubes
    # a fixed distance apart (their midpoint sampled), integrated by Gauss-Legendre on [0, 1] (K(1) < 1e-7,
    # docs/tubes.md); against the two-tube family, whose tubes are drawn independently.
    nodes, weights = np.polynomial.legendre.leggauss(10)
    value, variance = 0.0, 0.0
    for x, w in zip(nodes, weights):
        d = 0.5 * (x + 1.0)
        k = estimate_separation([(0.5, -0.25)], separation=d, samples=3000, seed=40).points[0].values["connected"]
        value += 0.5 * w * 2 * math.pi * d * k.value
        variance += (0.5 * w * 2 * math.pi * d * k.error) ** 2
    direct = estimate_two_tubes([(0.5, -0.25)], samples=12000, seed=41).points[0].values["connected"]
    assert abs(value - direct.value) < SIGMAS * math.hypot(math.sqrt(variance), direct.error) + 0.03 * direct.value


# ---------------------------------------------------------------------------- small flux


def test_small_flux_contact_and_mean_field_terms():
    """Small fluxes: T2 = E[Re X1 X2] with X_g = int d^2R (e^{2 pi i g w(R)} - 1).  Re X_g -> -|g|/2 on
    every loop (the contact term of one tube, whose mean is the exact -|g|/2 + g^2/2 of Comtet,
    Georgelin, Ouvry 1989), and Im X_g -> 2 pi g A with A the loop's algebraic (Levy) area, whose
    variance for a bridge of duration 1 and per-component variance 1/(2 pi) is 1/(48 pi^2) (P. Levy's
    stochastic area law, (x/2)/sinh(x/2); from memory): the uniform mean field n g of the tubes.  So
    (T2(g, g) + T2(g, -g))/2 -> f(g)^2 and T2(g, -g) - T2(g, g) -> g^2/6.  At g = 0.02 the second
    is measured 10-15% low (docs/tubes.md: the approach is slow), hence the 30% margin."""
    g = 0.02
    run = estimate_two_tubes([(g, g), (g, -g)], samples=40000, seed=8)
    same, opposite = (p.values["connected"] for p in run.points)
    symmetric = (same.value + opposite.value) / 2
    assert abs(symmetric - one_tube(g) ** 2) < 0.08 * one_tube(g) ** 2 + SIGMAS * same.error
    assert abs((opposite.value - same.value) / (g * g / 6) - 1.0) < 0.3


def test_small_flux_law_agrees_with_the_perturbative_route_for_two_heavy_species():
    """Independent route for T2 = |g1||g2|/4 - g1 g2/12 + ...: two tube species are two particle species of
    mass M -> infinity with mutual parameters g1, g2 with the mobile one; b_{1,1,1}/(b_{0,1,0} b_{0,0,1}) is
    then the connected integral of one loop and two tubes.  The perturbative route (routes/perturbative.py:
    Hartree-Fock ring of the contacts for |x||y|, the Landau mean-field term for d_ij d_ik;
    docs/perturbative.md) gives (M+1)^2/(4 M^2) and -1/12."""
    import sympy
    from clusterexp.routes.perturbative import Species, taylor_coefficients
    d1, d2 = sympy.symbols("d1 d2", real=True)
    for mass in (10 ** 3, 10 ** 6):
        c = taylor_coefficients([Species(None), Species(None, mass=mass), Species(None, mass=mass)],
                                {(0, 1): d1, (0, 2): d2}, (1, 1, 1), "boson", 2, unknown="name")
        assert abs(c[sympy.Abs(d1) * sympy.Abs(d2)] / mass ** 2 - sympy.Rational(1, 4)) <= sympy.Rational(1, mass)
        assert c[d1 * d2] / mass ** 2 == sympy.Rational(-1, 12)
        assert c[sympy.Abs(d1)] == 0 and c[d1 ** 2] == 0


# ---------------------------------------------------------------------------- two anyons and one tube


@pytest.fixture(scope="module")
def anyon_run():
    points = [(0.0, 0.3), (1.0, 0.3), (2.0, 0.3), (0.25, 0.0), (0.25, 1.0), (0.25, 0.3), (0.25, 1.3),
              (0.5, 0.5), (0.5, 0.05), (0.5, -0.05)]
    return {p.params: p for p in estimate_anyons_tube(points, samples=24000, seed=23).points}


def test_bose_and_fermi_mobile_species_reduce_to_the_exact_first_order(anyon_run):
    # alpha = 0 (bose) or 1 (fermi): b_2 gains (+-1) (n/2) (-s(1-s)/2), the l = 2 cycle around one tube
    # (the tool's exact first order, routes/pairphase, which rests on Comtet, Georgelin, Ouvry 1989).
    for alpha, sign in ((0.0, 1.0), (1.0, -1.0), (2.0, 1.0)):
        point = anyon_run[(alpha, 0.3)]
        assert within(point.values["b2_coverage1"], sign * one_tube(0.3) / 2)
        assert point.exact["b2_coverage1"] == pytest.approx(sign * one_tube(0.3) / 2)


def test_no_tube_gives_exact_b2_of_anyons(anyon_run):
    # The tube-free parts of the same loops give b_2(alpha) (Arovas et al. 1985); a tube of flux 0 or 1
    # adds nothing, pathwise.
    for params, point in anyon_run.items():
        assert within(point.values["b2_no_tube"], arovas_b2(params[0]), floor=1e-12)
    for gamma in (0.0, 1.0):
        assert abs(anyon_run[(0.25, gamma)].values["b2_coverage1"].value) < 1e-12
    assert anyon_run[(0.25, 1.3)].values["b2_coverage1"].value == pytest.approx(
        anyon_run[(0.25, 0.3)].values["b2_coverage1"].value, abs=1e-9)


def test_anyon_tube_contact_term_at_small_flux(anyon_run):
    """Derived in docs/tubes.md: at small flux the even part in gamma of the first-order term of b_2 is
    the one-tube contact -|gamma|/2 per unit duration times the exact b_2 (Arovas et al. 1985):
    (b2^(1)(a, g) + b2^(1)(a, -g))/2 = -|g| b_2(a) + O(g^2); so the contact cancels in a_2."""
    plus, minus = anyon_run[(0.5, 0.05)].values["b2_coverage1"], anyon_run[(0.5, -0.05)].values["b2_coverage1"]
    even = (plus.value + minus.value) / 2
    assert abs(even - (-0.05 * arovas_b2(0.5))) < 0.2 * 0.05 * abs(arovas_b2(0.5)) + SIGMAS * plus.error


def test_contact_law_agrees_with_the_perturbative_route_for_an_infinitely_heavy_species():
    """Independent route: a tube is a particle of infinite mass whose mutual parameter with the mobile
    species is its flux.  The perturbative route (routes/perturbative.py: contact vertices fixed by the
    exact two-body b, Hartree-Fock ring for |x||y|; docs/perturbative.md) gives b_{2,1} of two bosonic
    anyons and one particle of mass M through second order; divided by b_{0,1} = M it is the first order
    in the coverage.  Its |gamma| and |alpha||gamma| coefficients must tend to those of the derived law
    b2^(1) = -|gamma| b_2(alpha) + ... = -|gamma|/4 + |alpha||gamma| + ... (docs/tubes.md)."""
    import sympy
    from clusterexp.routes.perturbative import Species, taylor_coefficients
    e, d = sympy.symbols("e d", real=True)
    for mass in (10 ** 3, 10 ** 6):
        c = taylor_coefficients([Species(e), Species(None, mass=mass)], {(0, 1): d}, (2, 1), "boson", 2,
                                unknown="name")
        assert abs(c[sympy.Abs(d)] / mass - sympy.Rational(-1, 4)) <= sympy.Rational(1, mass)
        assert abs(c[sympy.Abs(d) * sympy.Abs(e)] / mass - 1) <= sympy.Rational(1, mass)
        assert c[sympy.Abs(e)] == 0


def test_half_flux_symmetry_of_the_exchange_part():
    # At gamma = 1/2 the winding factor e^{i pi w} is real; the exchange phase obeys
    # Phi(1 - alpha) = -conj Phi(alpha) (odd multiples of pi), so the exchange part is odd under
    # alpha -> 1 - alpha and vanishes at alpha = 1/2, sample by sample (exact laws, pathwise).
    from clusterexp.loops.tubes import SwapTubeSamples
    samples = SwapTubeSamples(np.random.default_rng(5), 400, 8)
    assert np.allclose(samples.values(0.5, 0.5)["swap_tube"], 0.0, atol=1e-12)
    assert np.allclose(samples.values(0.3, 0.5)["swap_tube"], -samples.values(0.7, 0.5)["swap_tube"], atol=1e-9)
    assert not np.allclose(samples.values(0.3, 0.4)["swap_tube"], -samples.values(0.7, 0.4)["swap_tube"])


def test_braiding_species_with_a_tube():
    run = estimate_anyons_tube([(0.0, 0.3, 0.5), (1.0, 0.3, 0.5), (0.4, 0.3, 0.3)], kind="distinct",
                               samples=6000, seed=2)
    no_braid, no_braid_1, braid = run.points
    # integer mutual parameter: no braiding, the pair factorises (period 1), pathwise zero
    assert abs(no_braid.values["b11_coverage1"].value) < 1e-12
    assert abs(no_braid_1.values["b11_coverage1"].value) < 1e-12
    # tube-free part: b_11 = -d(1 - d) (harmonic regulator, routes/pairphase; docs/loops.md by Bessel
    # integrals: an independent route)
    assert within(braid.values["b11_no_tube"], -0.4 * 0.6)
    assert within(braid.values["single"], one_tube(0.3))


# ---------------------------------------------------------------------------- runs and refusals


def test_time_cap_alone_is_a_budget():
    run = estimate_two_tubes([(0.5, 0.5)], time_cap=0.5, seed=3, batch=200)
    assert run.rounds >= 2 and run.samples == 200 * run.rounds


def test_seeded_runs_repeat_and_workers_do_not_matter():
    one = estimate_two_tubes([(0.5, 0.25)], samples=3000, seed=7, batch=500)
    two = estimate_two_tubes([(0.5, 0.25)], samples=3000, seed=7, batch=500, workers=2)
    assert one.points[0].values["connected"] == two.points[0].values["connected"]
    other = estimate_two_tubes([(0.5, 0.25)], samples=3000, seed=8, batch=500)
    assert other.points[0].values["connected"] != one.points[0].values["connected"]


@pytest.mark.parametrize("call,needle", [
    (lambda: estimate_two_tubes([(0.5, 0.5, 0.5)], samples=1000), "2 real numbers"),
    (lambda: estimate_two_tubes([(0.5, 0.5)]), "budget"),
    (lambda: estimate_anyons_tube([(0.5, 0.5)], kind="three", samples=1000), "unknown kind"),
    (lambda: estimate_two_tubes([(0.5, float("nan"))], samples=1000), "real numbers"),
    (lambda: estimate_two_tubes([(0.5, 0.5)], samples=1000, depth=40), "depth"),
])
def test_requests_outside_the_problems_are_refused(call, needle):
    with pytest.raises(LoopsError, match=needle):
        call()


def test_unreachable_target_says_what_it_would_need():
    from clusterexp.loops import TargetNotReachable
    with pytest.raises(TargetNotReachable, match="would need"):
        estimate_two_tubes([(0.5, 0.5)], samples=2000, seed=1, batch=500, target_error=1e-6)


def test_two_tube_samples_weights_are_finite():
    samples = TwoTubeSamples(np.random.default_rng(0), 300, 8)
    values = samples.values(0.5, 0.5)
    assert all(np.all(np.isfinite(v)) for v in values.values())
    assert flux_shift(0.5) == one_tube(0.5)


# ---------------------------------------------------------------------------- exact composition


def _virial_by_undetermined_coefficients(b: dict, order: int, truncation: int) -> dict:
    """Independent route (plain sympy, not the project's kernel): z = sum c_k rho^k solved order by order
    from rho = sum l b_l z^l (each c_k from its linear equation, 1/b_1 as a truncated geometric series),
    then P = sum b_l z^l expanded in rho; every power n^truncation and beyond dropped along the way."""
    import sympy
    from clusterexp.loops.tube_virial import COVERAGE as n
    rho = sympy.Symbol("rho")

    def cut(expr):
        expr = sympy.expand(expr)
        return sum(expr.coeff(n, j) * n ** j for j in range(truncation))

    inverse_b1 = cut(sum((1 - b[(1,)]) ** j for j in range(truncation)))
    c = []
    for k in range(1, order + 1):
        z = sum(ck * rho ** (j + 1) for j, ck in enumerate(c))
        rest = sympy.expand(sum(l * b[(l,)] * z ** l for l in range(1, order + 1))).coeff(rho, k)
        c.append(cut(((1 if k == 1 else 0) - rest) * inverse_b1))
    z = sum(ck * rho ** (j + 1) for j, ck in enumerate(c))
    pressure = sympy.expand(sum(b[(l,)] * z ** l for l in range(1, order + 1)))
    return {(k,): cut(pressure.coeff(rho, k)) for k in range(1, order + 1)}


@pytest.mark.parametrize("statistics,flux,order", [("bose", "1/2", 4), ("fermi", "1/3", 3), ("1/2", "1/4", 2)])
def test_tube_virials_against_an_independent_inversion(statistics, flux, order):
    import sympy
    from clusterexp.loops.tube_virial import tube_coefficients
    coefficients = tube_coefficients(sympy.Rational(statistics) if "/" in statistics else statistics,
                                     sympy.Rational(flux), order)
    k = next(iter(coefficients.truncation.values()))
    reference = _virial_by_undetermined_coefficients(coefficients.clusters, order, k)
    for index, value in coefficients.virial.items():
        assert sympy.expand(value - reference[index]) == 0


def test_tube_virials_see_only_the_fluctuation_of_the_winding_area():
    # If every loop had the same X = l F (no fluctuation, T2 = F^2) the tubes would only shift the
    # chemical potential (z -> z e^{nF}), which leaves the equation of state in densities unchanged: every
    # a_l is the free one (ideal 2D Bose: B_{l-1}/l!; Viefers, Ravndal, Haugset, Am. J. Phys. 63 (1995) 369).
    import sympy
    from clusterexp.loops.tube_virial import COVERAGE, TWO_TUBES, one_tube, tube_coefficients
    f = one_tube(sympy.Rational(1, 3))
    c = tube_coefficients("bose", sympy.Rational(1, 3), 4)
    free = {(1,): 1, (2,): sympy.Rational(-1, 4), (3,): sympy.Rational(1, 36), (4,): 0}
    for index, value in c.virial.items():
        assert sympy.expand(value.subs(TWO_TUBES, f ** 2)) == free[index]
    # and the hand derivation of docs/tubes.md: a_2 = -1/4 - (n^2/4)(T2 - F^2) + O(n^3)
    assert sympy.expand(c.virial[(2,)] - (-sympy.Rational(1, 4) - COVERAGE ** 2 * (TWO_TUBES - f ** 2) / 4)) == 0


def test_anyon_virial_first_order_agrees_between_exact_and_sampled_routes():
    import sympy
    from clusterexp.loops.tube_virial import ANYON_TUBE, COVERAGE, compose, tube_coefficients
    from clusterexp.loops.estimator import Estimate
    point = estimate_anyons_tube([(0.5, 0.25)], samples=4000, seed=3).points[0]
    c = tube_coefficients(sympy.Rational(1, 2), sympy.Rational(1, 4), 2)
    slope = sympy.diff(c.virial[(2,)], COVERAGE)
    value = compose(slope, {ANYON_TUBE: point.values["b2_coverage1"]}, {})
    assert value.value == pytest.approx(point.values["a2_coverage1"].value, abs=1e-12)
    assert value.error == pytest.approx(point.values["a2_coverage1"].error, rel=1e-12)
    with pytest.raises(Exception, match="not supported yet|order 3"):
        tube_coefficients(sympy.Rational(1, 2), sympy.Rational(1, 4), 3)
    assert compose(COVERAGE * ANYON_TUBE, {ANYON_TUBE: Estimate(2.0, 0.5)}, {COVERAGE: 3}) == Estimate(6.0, 1.5)
    with pytest.raises(ValueError, match="exact rational"):
        tube_coefficients("bose", 0.1, 2)
    with pytest.raises(ValueError, match="exact rational"):
        tube_coefficients(0.5, sympy.Rational(1, 4), 2)
