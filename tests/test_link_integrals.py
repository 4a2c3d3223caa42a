"""The link squared of the two-loop clusters in closed form (clusterexp/routes/link_integrals.py; docs/
perturbative.md section 4k), against values that the closed form does not use: section 4e's exact
{2-cycle, loop} law at any masses, the two-dimensional quadrature engine of section 4f (a different
decomposition: chord-closed pairs, no contact model) at equal and unequal masses, and the static-flux
law of a heavy cycle. Only r(1, 1) = -1 (the exact b_{1,1}) enters the closed form."""
from fractions import Fraction

import mpmath
import pytest

from clusterexp.errors import NotSupportedYet
from clusterexp.routes import link_integrals, two_loop_table


@pytest.mark.parametrize("m_i, m_j", [(1, 1), (2, 1), (1, 2), (3, 1), (1, 3), (1, 40), (40, 1), (1000, 1),
                                      (1, 1000), (Fraction(7, 3), Fraction(2, 5))])
def test_the_two_cycle_with_a_loop_is_the_chord_closed_law_at_every_mass(m_i, m_j):
    """{2-cycle of mass m_i, loop of mass m_j}: section 4e derived m_i/2 + m_j/4 by chord-closed pairs
    (checked there by both static limits: the flux law of Comtet, Georgelin, Ouvry, J. Phys. A 22 (1989)
    3917; at equal masses 3/4, as Sen's symmetry gives, Phys. Rev. Lett. 68 (1992) 2977). The closed form
    fixes its one constant at {1, 1}, so this is a check at every mass ratio, to 25 digits."""
    scale = -(mpmath.mpf(Fraction(m_i).numerator) / Fraction(m_i).denominator
              + mpmath.mpf(Fraction(m_j).numerator) / Fraction(m_j).denominator) / 4
    exact = Fraction(m_i) / 2 + Fraction(m_j) / 4
    value = scale * link_integrals.ratio(2, 1, m_i, m_j)
    assert abs(value - mpmath.mpf(exact.numerator) / exact.denominator) < mpmath.mpf(10) ** -25 * value
    float_value, bound = link_integrals.coefficient(2, 1, m_i, m_j)
    assert abs(float_value - float(exact)) <= bound < 1e-12 * float(exact)


def test_every_cluster_of_the_quadrature_table_through_n_10():
    """The 23 entries of two_loop_table.LINK (n = 4..10), computed by the two-dimensional quadrature
    engine of section 4f (rules (12, 16) and (14, 20), bounds 1e-11): the table holds |r|/(p q), halved
    for p = q. The closed form agrees with every entry within its bound."""
    assert len(two_loop_table.LINK) == 23
    for (p, q), (value, bound) in two_loop_table.LINK.items():
        closed = -link_integrals.ratio(p, q) / (p * q * (2 if p == q else 1))
        assert abs(closed - value) < bound, (p, q, closed, value)


@pytest.mark.parametrize("p, q, m_i, m_j, engine", [(2, 4, 1, 4, -3.86764434413), (2, 5, 1, 5, -4.57855480240)])
def test_unequal_masses_against_the_quadrature_engine(p, q, m_i, m_j, engine):
    """r at unequal masses from the engine of 4f (docs 4f: 'r(2, 4; 1, 4) = -3.86764434413', at the
    engine's rule (10, 12), good to 1e-10 there), an independent route."""
    assert abs(link_integrals.ratio(p, q, m_i, m_j) - engine) < 3e-10


def test_the_two_coincidences_the_engine_showed_are_exact():
    """Docs 4f found, with the engine to 4e-10 and 8e-13: r(3, 2; 2, 1) - r(2, 3; 2, 1) = -1/3 and
    r(2, 3; 1, 3) = r(2, 2) - 3/4. In the closed form both hold to 30 digits."""
    tiny = mpmath.mpf(10) ** -30
    assert abs(link_integrals.ratio(3, 2, 2, 1) - link_integrals.ratio(2, 3, 2, 1) + mpmath.mpf(1) / 3) < tiny
    assert abs(link_integrals.ratio(2, 3, 1, 3) - link_integrals.ratio(2, 2) + mpmath.mpf(3) / 4) < tiny
    # and the one the engine showed is not a coincidence stays false:
    assert abs(link_integrals.ratio(3, 1, 2, 1) - link_integrals.ratio(1, 3, 2, 1) + mpmath.mpf(2) / 3) > 0.01


@pytest.mark.parametrize("n", [11, 12, 16, 24])
def test_the_sum_rule_beyond_the_engine(n):
    """The sum rule observed on the engine for n = 4..10 (docs 4f: the mean of r over the transpositions
    of an n-cycle is -n/2) at n the engine never reached; a failure would mean the closed form and the
    engine part ways beyond the table."""
    total = sum(link_integrals.ratio(p, n - p) / (2 if 2 * p == n else 1) for p in range((n + 1) // 2, n))
    assert abs(total + mpmath.mpf(n * (n - 1)) / 4) < mpmath.mpf(10) ** -30


@pytest.mark.parametrize("a, b", [(3, 1), (2, 2), (3, 2), (4, 3), (6, 1)])
def test_a_heavy_cycle_is_a_static_flux_with_the_observed_logarithm(a, b):
    """A heavy a-cycle is one static flux a d seen by the b-cycle: the coefficient per unit m_j tends to
    m_i/(2 b) (the flux law of Comtet, Georgelin, Ouvry 1989, route R3), approached as -kappa ln(m_i/m_j)
    with kappa = [C(a, 3) - (b - 1) C(a, 2)]/(a b)^2 (observed with the engine at ratios 10^3 .. 10^5,
    docs 4j, and derived from the closed form's eps ln eps terms in docs 4k). At 10^10 .. 10^12 the closed
    form's numbers give that kappa to 1e-9."""
    law = mpmath.mpf(mpmath.binomial(a, 3) - (b - 1) * mpmath.binomial(a, 2)) / (a * b) ** 2

    def beyond(m):
        return -(m + 1) * link_integrals.ratio(a, b, m, 1) / (2 * a * b) - mpmath.mpf(m) / (2 * b)
    with mpmath.workdps(link_integrals.DIGITS):
        kappa = -(beyond(10 ** 12) - beyond(10 ** 10)) / mpmath.log(100)
    assert abs(kappa - law) < 1e-9
    with mpmath.workdps(link_integrals.DIGITS):
        assert abs(beyond(10 ** 12)) < 1 + 30 * abs(law)      # the static law leads: m_i/(2 b) = 5e11


@pytest.mark.parametrize("bad", [0, -1, 1.5, True])
def test_bad_cycle_lengths_and_masses_are_refused(bad):
    with pytest.raises(ValueError):
        link_integrals.ratio(bad, 1)
    with pytest.raises(NotSupportedYet if isinstance(bad, float) else ValueError):
        link_integrals.coefficient(2, 1, bad, 1)


def test_the_exact_expressions_of_the_first_clusters():
    """The closed form as sympy expressions (docs 4k): {2, 1} at masses (3, 1) is the rational -7/4 of
    section 4e exactly; r(3, 1) = -2 + (sqrt 3/12) ln(2 + sqrt 3) and r(2, 2) = -2 - (sqrt 3/6) ln(2 + sqrt 3)
    (to 50 digits against the expressions), so the sum rule at n = 4, r(3, 1) + r(2, 2)/2 = -3, holds
    exactly; and the numbers agree with `ratio`."""
    import sympy
    assert link_integrals.exact_ratio(2, 1, 3, 1) == sympy.Rational(-7, 4)
    log_term = sympy.sqrt(3) * sympy.log(2 + sympy.sqrt(3))
    r31, r22 = link_integrals.exact_ratio(3, 1), link_integrals.exact_ratio(2, 2)
    assert abs(sympy.N(r31 - (-2 + log_term / 12), 60)) < 1e-50
    assert abs(sympy.N(r22 - (-2 - log_term / 6), 60)) < 1e-50
    assert abs(sympy.N(r31 + r22 / 2 + 3, 60)) < 1e-50
    number = sympy.Float(mpmath.nstr(link_integrals.ratio(3, 2, 2, 1), 40), 45)
    assert abs(sympy.N(link_integrals.exact_ratio(3, 2, 2, 1), 45) - number) < 1e-30


def test_b4_in_closed_form_against_the_quadrature_table():
    """b_4^(2) of one species about bosons: the chains 11/12, the 4-cycle alone's ring part 1 (its
    quadrature equals 1 to 1e-13, docs 4h; summed exactly in 4l), the derived angle-area parts and the link squared of
    {3, 1} and {2, 2}: 35/8 - (sqrt 3/144) ln(2 + sqrt 3) (docs 4k), against the quadrature table's
    4.35915945841 +- 2e-11 (the engine of 4f, another route for the link squared); a_4^(2) = 1/16 +
    (sqrt 3/48) ln(2 + sqrt 3) against 0.11002162477 +- 6e-11 (docs 4h)."""
    import math
    from clusterexp.routes import two_loop_table
    from clusterexp.routes.perturbative import Species, chain_part, taylor_coefficients
    import sympy
    e = sympy.Symbol("e", real=True)
    beyond, bound = two_loop_table.beyond_the_chains(4)
    value = float(chain_part([Species(e)], {}, (4,), "boson")[e ** 2]) + beyond
    closed = 35 / 8 - math.sqrt(3) / 144 * math.log(2 + math.sqrt(3))
    assert abs(value - closed) < bound + 1e-13 and bound < 1e-10
    # the package prints that closed form
    derived = taylor_coefficients([Species(e)], {}, (4,), "boson")[e ** 2]
    assert derived == sympy.Rational(35, 8) - sympy.sqrt(3) / 144 * sympy.log(2 + sympy.sqrt(3))
    assert abs(1 / 16 + math.sqrt(3) / 48 * math.log(2 + math.sqrt(3)) - 0.11002162477) < 6e-11


@pytest.mark.parametrize("a, b, ratio, engine, tolerance", [
    (5, 2, 10 ** 3, 250.1084647387, 1e-6), (5, 2, 10 ** 4, 2500.1081558970, 1e-6),
    (6, 1, 10 ** 3, 500 - 3.6185128, 1e-6),
    (4, 3, 10 ** 4, 10 ** 4 / 6 + 0.6904485, 1e-6), (3, 3, 10 ** 5, 16667.611177, 1e-5),
    (4, 2, 10 ** 5, 25000.515430, 1e-5), (6, 1, 10 ** 5, 50000 - 6.1853382, 2e-5)])
def test_far_mass_ratios_against_the_graded_quadrature(a, b, ratio, engine, tolerance):
    """The coefficient per unit m_j of a heavy a-cycle at m_i/m_j = 10^3 .. 10^5 from the quadrature rules
    graded toward x + y = 1 (docs 4j, fourteenth and fifteenth sessions: three or four rules converging,
    changes 1e-8 .. 1.7e-6 per m_j, bounds ten times that), an independent route at the ratios where the
    ungraded rules failed."""
    value, bound = link_integrals.coefficient(a, b, ratio, 1)
    assert abs(value - engine) < tolerance, (value, engine)
