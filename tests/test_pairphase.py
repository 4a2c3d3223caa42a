"""Pair phases in the plane: exact two-body coefficients, kinks, composition with given many-body parts."""
import pytest
import sympy

import clusterexp
from clusterexp.errors import InputError
from conftest import run_cli


def values(text, kind="virial"):
    return {c.index: c.value for c in clusterexp.derive(text) if c.kind == kind}


def symbol(d, name):
    return next(s for v in d.values() for s in v.free_symbols if s.name == name)


def test_second_virial_of_anyons_on_the_whole_line():
    """a_2(alpha) = -1/4 + alpha - alpha^2/2 on [0, 2], period 2, even; a_2(0) = -1/4, a_2(1/2) = 1/8,
    a_2(1) = 1/4 [published: Arovas, Schrieffer, Wilczek, Zee, Nucl. Phys. B 251 (1985) 117]."""
    a = values("dimension 2 parameter alpha species A exchange alpha clusters pairphase derive virial up to 2")
    alpha = symbol(a, "alpha")
    a2 = a[(2,)]
    for x, expected in ((0, sympy.Rational(-1, 4)), (sympy.Rational(1, 2), sympy.Rational(1, 8)), (1, sympy.Rational(1, 4))):
        assert a2.subs(alpha, x) == expected
    for x in (sympy.Rational(k, 7) for k in range(-20, 21)):
        s = x % 2
        assert a2.subs(alpha, x) == -sympy.Rational(1, 4) + s - s ** 2 / 2     # period 2 on [0, 2]
        assert a2.subs(alpha, x) == a2.subs(alpha, 2 - x)                       # alpha -> 2 - alpha
        assert a2.subs(alpha, x) == a2.subs(alpha, -x)                          # even
    # sympy can evaluate, differentiate and print it
    assert sympy.diff(a2, alpha).subs(alpha, sympy.Rational(1, 2)) == sympy.Rational(1, 2)
    assert sympy.latex(a2)


def test_restricted_range_gives_the_polynomial_branch():
    a = values("dimension 2 parameter alpha in [0, 1] species A exchange alpha clusters pairphase derive virial up to 2")
    alpha = symbol(a, "alpha")
    assert sympy.expand(a[(2,)] - (-sympy.Rational(1, 4) + alpha - alpha ** 2 / 2)) == 0


@pytest.mark.parametrize("point, word", [(0, "bose"), (1, "fermi")])
def test_boson_and_fermion_points_agree_with_the_ideal_route(point, word):
    """Independent route: alpha = 0 and 1 against `clusters ideal` (route R1) for b_1, b_2 and a_2."""
    pair = values(f"dimension 2 species A exchange {point} clusters pairphase derive cluster up to 3", "cluster")
    ideal = values(f"dimension 2 species A {word} clusters ideal derive cluster up to 3", "cluster")
    assert pair == ideal


def test_mixed_coefficient_of_two_species_vanishes_at_integer_mutual_parameter():
    """b_11 = -delta(1 - delta), delta = frac(alpha_12) (equal masses); zero at alpha_12 = 0 and 1 (fact of the
    trade: integer braiding is no statistical coupling)."""
    b = values("dimension 2 parameter nu species A species B mutual A B = nu clusters pairphase derive cluster up to 2",
               "cluster")
    nu = symbol(b, "nu")
    for x in (0, 1, 2, -1):
        assert b[(1, 1)].subs(nu, x) == 0
    assert b[(1, 1)].subs(nu, sympy.Rational(1, 3)) == -sympy.Rational(2, 9)
    assert b[(1, 1)].subs(nu, sympy.Rational(4, 3)) == -sympy.Rational(2, 9)  # period 1


def test_unequal_masses_against_an_independent_derivation():
    """Independent derivation written here: in free space the two-particle trace factorises into the
    centre of mass (mass M = m_A + m_B: A/lambda_M^2 = (M/m_ref) A/lambda^2) and the relative motion,
    whose Aharonov-Bohm change Tr[e^{-beta H}(delta) - e^{-beta H}(0)] = -delta(1 - delta)/2 does not depend
    on the reduced mass [Comtet, Georgelin, Ouvry, J. Phys. A 22 (1989) 3917, from memory]. So
    b_11 = -(M/m_ref) delta(1 - delta)/2. Second route: the declared-spectrum machinery (R2) with the trapped
    Z_11 = Z_cm Z_rel written out, Z_rel = x(x^d + x^(1-d))/((1-x)(1-x^2))."""
    b = values("dimension 2 parameter mu positive species A species B mass mu mutual A B = 1/3 clusters pairphase "
               "derive cluster up to 2", "cluster")
    mu = symbol(b, "mu")
    assert sympy.simplify(b[(1, 1)] - (-(1 + mu) * sympy.Rational(1, 3) * sympy.Rational(2, 3) / 2)) == 0
    # the harmonic regulator with mass ratio 3 and the relative spectrum summed by hand
    trapped = ("dimension 2 species A species B mass 3 clusters spectrum { "
               "trapped Z[1,1] = x/(1 - x)^2 * x*(x^(1/3) + x^(2/3))/((1 - x)*(1 - x^2)) } derive cluster b[1,1]")
    spectral = values(trapped, "cluster")[(1, 1)]
    exact = values("dimension 2 species A species B mass 3 mutual A B = 1/3 clusters pairphase derive cluster b[1,1]",
                   "cluster")[(1, 1)]
    assert spectral == exact == -sympy.Rational(4, 9)


def test_flux_tube_shift():
    """One particle and one flux tube: Z(gamma) - Z(0) = -gamma(1 - gamma)/2 on [0, 1], period 1
    [derived with R3; attributed to Comtet, Georgelin, Ouvry 1989, from memory]: the first-order tube term of
    b_1 per unit coverage."""
    b = values("dimension 2 parameter f, n species A bose tubes flux f coverage n clusters pairphase "
               "derive cluster up to 2", "cluster")
    f, n = symbol(b, "f"), symbol(b, "n")
    first = sympy.expand(b[(1,)].removeO()).coeff(n, 1)
    for x in (sympy.Rational(1, 4), sympy.Rational(1, 2), sympy.Rational(5, 4)):
        s = x % 1
        assert first.subs(f, x) == -s * (1 - s) / 2
    assert b[(1,)].has(sympy.Order)  # honest: multi-tube terms unknown


def test_published_third_virial_series_as_given_input():
    """The published a_3 = 1/36 + sin^2(pi alpha)/(12 pi^2) + ... [Myrheim & Olaussen, cond-mat/9210028;
    Mashkevich, Myrheim, Olaussen, hep-th/9602171] near bosons is 1/36 + alpha^2/12 + O(alpha^4); given to
    second order it comes back to second order with an honest O term, and b_3 follows from it."""
    d = clusterexp.derive("dimension 2 parameter alpha in [0, 1] species A exchange alpha clusters pairphase "
                          "{ a[3] = 1/36 + alpha^2/12 + O(alpha^3) } derive virial up to 3 derive cluster up to 3")
    a3 = d.value("virial", (3,))
    alpha = next(iter(a3.removeO().free_symbols))
    assert a3.removeO() == sympy.Rational(1, 36) + alpha ** 2 / 12
    assert a3.getO() == sympy.Order(alpha ** 3)
    b2, b3 = d.value("cluster", (2,)), d.value("cluster", (3,)).removeO()
    # a_3 = 4 b_2^2 - 2 b_3 (single-species inversion), to second order
    check = sympy.expand(4 * b2 ** 2 - 2 * b3 - (sympy.Rational(1, 36) + alpha ** 2 / 12))
    assert all(sympy.degree(t, alpha) >= 3 for t in sympy.Add.make_args(check) if t != 0)


def test_unknown_many_body_parts_stay_named():
    a = values("dimension 2 parameter alpha in [0, 1] species A exchange alpha clusters pairphase derive virial up to 3")
    assert sympy.Symbol("b_3") in a[(3,)].free_symbols


def test_kinked_expansion_needs_a_side(cli):
    base = "dimension 2 parameter alpha species A exchange alpha clusters pairphase derive virial up to 2 "
    result = cli("run", "-e", base + "expand alpha about 0 to 2")
    assert result.returncode == 2 and "not analytic at alpha = 0" in result.stderr and "^" in result.stderr
    result = cli("run", "-e", base + "expand alpha about 0 to 2 from both")
    assert result.returncode == 0
    assert "non-analytic at alpha = 0, from above): -alpha**2/2 + alpha - 1/4" in result.stdout
    assert "non-analytic at alpha = 0, from below): -alpha**2/2 - alpha - 1/4" in result.stdout


@pytest.mark.parametrize("text, message", [
    ("dimension 3 species A clusters pairphase", "pair phases are a property of the plane"),
    ("dimension 2 species A clusters pairphase { b[2] = 1 }", "the two-body coefficients of pair phases are exact"),
    ("dimension 2 species A exchange 1/2 species B tubes flux 1/3 coverage 1/10 clusters pairphase",
     "not supported yet"),
    ("dimension 2 species A tubes flux 1/3 coverage 1/10 clusters ideal", "flux tubes are used with"),
    ("dimension 2 species A exchange sqrt(-1) clusters pairphase", "the exchange parameter must be real"),
    ("dimension 2 species A species B mutual A A = 1/2 clusters pairphase", "a mutual parameter needs two distinct"),
    ("dimension 2 species A clusters pairphase expand beta about 0 to 2", "`expand` needs a declared parameter"),
])
def test_pairphase_bad_input(text, message):
    with pytest.raises((InputError, clusterexp.NotSupportedYet)) as caught:
        clusterexp.derive(text)
    assert str(caught.value).split("error: ", 1)[-1].startswith(message) or message in str(caught.value)
