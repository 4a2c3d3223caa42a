"""The k-cycle alone at second order, summed exactly (clusterexp/routes/cycle_square.py, docs/perturbative.md
section 4l): each ingredient against an independent evaluation (the single pair against the Schlaefli
quadrature, the steps of its derivation, each half lag integral against mpmath's quadrature), the result
against the published a_3 (k = 3), the exact two-body lemma (k = 2) and the quadrature of the same pair
decomposition (routes/cycle_alone.py, k = 4, 5), and its sign about fermions in b_n."""
from fractions import Fraction

import mpmath
import pytest
import sympy

from clusterexp.routes import cycle_alone, cycle_square
from clusterexp.routes.surd_logs import Surd


def test_ring_part_against_its_series():
    """(1/2)[z^k] z ln^2(1 - z)/(1 - z) by sympy's series against the harmonic-number sum."""
    z = sympy.Symbol("z")
    for k in (2, 3, 4, 7, 8):
        series = sympy.Rational(1, 2) * sympy.series(sympy.log(1 - z) ** 2 * z / (1 - z), z, 0, k + 1).removeO().coeff(z, k)
        assert cycle_square.ring_part(k) == Fraction(int(series.p), int(series.q))


@pytest.mark.parametrize("k, j", [(3, 1), (4, 1), (4, 2), (5, 2), (7, 3), (9, 2)])
def test_one_pair_against_the_schlaefli_form(k, j):
    """S(rho) = Li_2(rho^2)/4 - pi^2/24 (derived in section 4l (i)) for the pair of strands at lag j of a
    k-cycle (rho = 1 - k/(j(k - j)), negative, zero and positive here) against the Schlaefli form of section 4d
    by scipy's quadrature
    (`cycle_alone._single`: the Aharonov-Bohm kernel with the Gaussian end points), to 1e-12. At k = 3 it
    is the value of section 4d, -0.344320356941374."""
    v = Fraction(j * (k - j), k)
    quadrature = cycle_alone._single(float(v), float(v - 1), 1e-10)[1]
    closed = float(mpmath.polylog(2, float(((v - 1) / v) ** 2)) / 4 - mpmath.pi ** 2 / 24)
    assert abs(quadrature - closed) < 1e-12, (quadrature, closed)
    if k == 3:
        assert abs(closed + 0.344320356941374) < 1e-14


@pytest.mark.parametrize("k, j", [(3, 1), (4, 2), (5, 2), (9, 2)])
def test_one_pair_first_order_and_the_fock_half(k, j):
    """The derivation of (4l.1) gives the |alpha| coefficient of one pair as -(1 - rho) = -1/v (section 4l
    (i)); the Schlaefli quadrature (`cycle_alone._single`) agrees to 1e-12 (at k = 3, -3/2: section 4d), and
    summed over the pairs of a k-cycle, -k H_{k-1}, it is k^2 times the Fock half of the contact,
    -(1/2)[z^k] ln^2(1 - z) (section 3)."""
    v = Fraction(j * (k - j), k)
    assert abs(cycle_alone._single(float(v), float(v - 1), 1e-10)[0] + float(1 / v)) < 1e-12
    pairs = sum(Fraction(k - i) / Fraction(i * (k - i), k) for i in range(1, k))
    z = sympy.Symbol("z")
    half = -sympy.Rational(1, 2) * sympy.series(sympy.log(1 - z) ** 2, z, 0, k + 1).removeO().coeff(z, k)
    assert -pairs / k ** 2 == Fraction(int(half.p), int(half.q))


@pytest.mark.parametrize("rho", ["-0.9", "-0.5", "0.25", "0.7"])
def test_the_two_terms_of_one_pair(rho):
    """The two steps of the derivation of (4l.1) against the integrals they evaluate, to 20 digits:
    E[phi^2] = pi^2/3 - pi arcsin(rho) + arcsin(rho)^2 - Li_2(rho^2)/2 for the principal angle between the
    ends (density ((1 - rho^2)/(2 pi)) Jt(-rho cos phi)), and Lemma F3 of the winding term,
    int_0^inf s K_0(A s) K_0(B s) I_0(C s) ds = psi/(2 A B sin psi) with cos psi = (A^2 + B^2 - C^2)/(2AB), at
    the arguments of the derivation (A = 1, B = a u, C = 1 - b u)."""
    with mpmath.workdps(30):
        r = mpmath.mpf(rho)

        def jt(y):
            if abs(y - 1) < mpmath.mpf("0.1"):
                return mpmath.hyp2f1(2, 2, mpmath.mpf(5) / 2, (1 - y) / 2) / 3
            return (1 - y * mpmath.acos(y) / mpmath.sqrt(1 - y * y)) / (1 - y * y)
        moment = (1 - r * r) / mpmath.pi * mpmath.quad(lambda phi: phi ** 2 * jt(-r * mpmath.cos(phi)), [0, mpmath.pi])
        closed = mpmath.pi ** 2 / 3 - mpmath.pi * mpmath.asin(r) + mpmath.asin(r) ** 2 - mpmath.polylog(2, r * r) / 2
        assert abs(moment - closed) < mpmath.mpf(10) ** -20, (moment, closed)
        lam = (1 - r) / (1 + r)
        a, b, u = 1 + lam, 1 - lam, mpmath.mpf("0.6")
        A, B, C = mpmath.mpf(1), a * u, 1 - b * u
        integral = mpmath.quad(lambda x: x * mpmath.besselk(0, A * x) * mpmath.besselk(0, B * x) * mpmath.besseli(0, C * x),
                               [0, 1, 10, mpmath.inf])
        psi = mpmath.acos((A * A + B * B - C * C) / (2 * A * B))
        assert abs(psi - mpmath.acos(r + (1 - r) * u)) < mpmath.mpf(10) ** -25   # cos psi = rho + (1 - rho) u
        assert abs(integral - psi / (2 * A * B * mpmath.sin(psi))) < mpmath.mpf(10) ** -20, integral


def _mp(x: Fraction) -> mpmath.mpf:
    return mpmath.mpf(x.numerator) / x.denominator


def _numeric(total) -> mpmath.mpf:
    with mpmath.workdps(40):
        return _mp(total.constant) + sum(c.mp() * mpmath.log(abs(w.mp())) for w, c in total.logs.items()) + \
            sum(_mp(q) * mpmath.polylog(2, _mp(x)) for x, q in total.dilogs.items()) + _mp(total.pi2) * mpmath.pi ** 2


@pytest.mark.parametrize("c0, c1, V", [
    (Fraction(1, 3), Fraction(-1, 5), Fraction(2, 3)),        # sqrt V irrational
    (Fraction(0), Fraction(1, 2), Fraction(3, 4)),            # the lag-0 covariance zero
    (Fraction(1, 2), Fraction(0), Fraction(3, 4)),            # ... and at the far end
    (Fraction(1, 4), Fraction(1, 2), Fraction(1, 4)),         # c1 = sqrt V: the two pairs one vector there
    (Fraction(-1, 6), Fraction(-2, 3), Fraction(4, 9)),       # c1 = -sqrt V
    (Fraction(1, 5), Fraction(1, 5), Fraction(1, 2)),         # constant covariance
])
def test_half_lag_integral_against_quadrature(c0, c1, V):
    """The antiderivative of `cycle_square._half` against mpmath's quadrature of int_0^1 (1 - w) [1/(V - c^2)
    + (sigma^2/(2 c^2)) ln(1 - c^2/V)] dw, c = c0 + sigma w, to 20 digits."""
    total = cycle_square._Sum()
    cycle_square._half(total, c0, c1, V, 1)
    def integrand(w):
        c = mp[0] + sigma * w
        log_part = -1 / mp[2] if c == 0 else mpmath.log(1 - c * c / mp[2]) / (c * c)
        return (1 - w) * (1 / (mp[2] - c * c) + sigma ** 2 / 2 * log_part)
    with mpmath.workdps(40):
        sigma, mp = _mp(c1 - c0), [_mp(x) for x in (c0, c1, V)]
        quadrature = mpmath.quad(integrand, [0, 1])
        assert abs(_numeric(total) - quadrature) < mpmath.mpf(10) ** -20, (_numeric(total), quadrature)


def test_every_logarithm_argument_is_a_quadratic_surd():
    """The sum keeps one coefficient per logarithm argument, each in the field of its argument (the
    canonical form checks the conjugation-odd part at 60 digits, surd_logs.canonical)."""
    total = cycle_square._Sum()
    cycle_square._half(total, Fraction(1, 3), Fraction(-1, 5), Fraction(2, 3), 1)
    assert all(isinstance(w, Surd) and (c.D == 1 or c.D == w.D) for w, c in total.logs.items())


def test_two_and_three_cycles_against_outside_values():
    """k = 2: no alpha^2 term (the exact two-body b_2 split into its loop clusters, docs 4b (i), whose test
    evaluates the channel sums and the Bessel integrals independently). k = 3: the ring part 1/2, which is
    what the published a_3 = 1/36 + alpha^2/12 requires of the 3-cycle (Myrheim & Olaussen, Phys. Lett. B
    299 (1993) 267; section 4b (iii): X_C = 0)."""
    assert cycle_square.cycle_square(2) == 0
    assert cycle_square.cycle_square(3) == sympy.Rational(1, 2)


@pytest.mark.parametrize("k", list(range(4, 13)) + [20])
def test_k_cycle_is_its_ring_part_exactly(k):
    """Every dilogarithm and logarithm of the pairs and pairs of pairs cancels and the k-cycle's alpha^2
    coefficient is its Fock-squared ring part, exactly (section 4l); the quadrature of the same decomposition
    (routes/cycle_alone.py, tests/test_two_loop_fast.py) finds it to 1e-10 for k <= 16 (docs 4h)."""
    value = cycle_square.cycle_square(k)
    assert value.is_Rational and value == cycle_square.ring_part(k), value


@pytest.mark.parametrize("k", [4, 5])
def test_k_cycle_against_the_quadrature_of_the_same_decomposition(k):
    """The exact sum against `cycle_alone.k_cycle_orders`, the same pairs and pairs of pairs by quadrature
    (scipy for the single pairs, the graded rule of two_loop_fast for the pairs of pairs), to 1e-9."""
    quadrature = cycle_alone.k_cycle_orders(k, 8, 8)[1]
    assert abs(float(cycle_square.cycle_square(k)) - quadrature) < 1e-9, quadrature


def test_nothing_is_assumed_about_the_result():
    """What does not cancel stays in the result: the 4-cycle's sum with the single pairs' pi^2/24 counted
    twice comes out as its ring part minus 6 pi^2/(24 * 16) (six pairs), and with a dilogarithm added as its
    ring part plus that dilogarithm."""
    total = cycle_square._total(4)
    total.pi2 -= Fraction(6, 24)
    assert total.expression(Fraction(1, 16)) == 1 - sympy.pi ** 2 / 64
    total = cycle_square._total(4)
    assert not any(total.dilogs.values())       # they cancel argument by argument as they are added
    total.dilog(Fraction(1, 4), Fraction(1, 9))  # one that does not
    left = total.expression(Fraction(1, 16))
    assert left == 1 + sympy.polylog(2, sympy.Rational(1, 9)) / 64, left
    with pytest.raises(ValueError):
        cycle_square.cycle_square(1)


@pytest.mark.parametrize("k", [4, 5])
def test_the_k_cycle_changes_sign_with_its_transpositions_about_fermions(k, monkeypatch):
    """b_k of one species takes the k-cycle alone with the sign (-1)^(k-1) about fermions (its total angle
    is pi (k - 1) mod 2 pi: one sign per transposition) and the two-loop clusters with (-1)^k: with the
    k-cycle set to its ring part plus one, e^2 of b_k moves by +1 about bosons and by (-1)^(k-1) about
    fermions (times the mass)."""
    from clusterexp.routes import perturbative
    e = sympy.Symbol("e", real=True)
    before = {about: perturbative.taylor_coefficients([perturbative.Species(e, 2)], {}, (k,), about)[e ** 2]
              for about in ("boson", "fermion")}
    monkeypatch.setattr(cycle_square, "cycle_square", lambda n: sympy.Rational(
        cycle_square.ring_part(n).numerator, cycle_square.ring_part(n).denominator) + 1)
    for about, sign in (("boson", 1), ("fermion", (-1) ** (k - 1))):
        after = perturbative.taylor_coefficients([perturbative.Species(e, 2)], {}, (k,), about)[e ** 2]
        assert sympy.simplify(after - before[about] - 2 * sign) == 0, (about, after, before[about])
