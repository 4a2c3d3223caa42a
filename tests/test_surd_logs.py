"""Exact surd arithmetic and the canonical form of sums of logarithms (clusterexp/routes/surd_logs.py),
against mpmath at 50 digits (a general-purpose library) and against identities that hold in the quadratic
fields (norms, the fundamental units of Z[sqrt 3] and Z[sqrt 7]: textbook number theory, from memory)."""
from fractions import Fraction as F

import mpmath
import pytest
import sympy

from clusterexp.routes import link_integrals
from clusterexp.routes.surd_logs import LogSum, Surd, canonical, squarefree


def _mp(x) -> mpmath.mpf:
    return x.mp() if isinstance(x, (Surd, LogSum)) else mpmath.mpf(F(x).numerator) / F(x).denominator


@pytest.mark.parametrize("n", [1, 2, 12, 18, 50, 72, 105, 1000, 9801])
def test_squarefree(n):
    k, D = squarefree(n)
    assert k * k * D == n and all(D % (p * p) for p in range(2, D + 1))


def test_surd_arithmetic_against_mpmath():
    """Sums, products, quotients, signs and square roots of surds equal mpmath's to 50 digits."""
    with mpmath.workdps(60):
        values = [Surd(F(3, 7), F(-2, 5), 6), Surd(-1, 1, 6), Surd(F(5, 3)), Surd.sqrt(F(27, 2)), Surd(0, 3, 6)]
        for x in values:
            for y in values:
                for got, want in ((x + y, _mp(x) + _mp(y)), (x - y, _mp(x) - _mp(y)), (x * y, _mp(x) * _mp(y))):
                    assert abs(got.mp() - want) < mpmath.mpf(10) ** -50
                if y != 0:
                    assert abs((x / y).mp() - _mp(x) / _mp(y)) < mpmath.mpf(10) ** -50
            assert x.sign() == mpmath.sign(_mp(x)) and (x * x.conjugate()).D == 1
        assert Surd.sqrt(F(27, 2)) == Surd(0, F(3, 2), 6) and Surd.sqrt(F(24, 5)) == Surd(0, F(2, 5), 30)
        # signs near cancellation: 1 + sqrt 2 - 2.41421356 > 0, 99 - 70 sqrt 2 > 0, 70 sqrt 2 - 99 < 0
        assert Surd(99, -70, 2).sign() == 1 and Surd(-99, 70, 2).sign() == -1
        assert Surd(F(-141421356, 10 ** 8), 1, 2).sign() == 1 and Surd(F(-141421357, 10 ** 8), 1, 2).sign() == -1


def test_fields_do_not_mix():
    with pytest.raises(ArithmeticError):
        Surd(0, 1, 2) * Surd(0, 1, 3)
    with pytest.raises(ArithmeticError):
        LogSum.log(2) * LogSum.log(3)


def test_canonical_merges_powers_and_products():
    """2 ln(7 + 4 sqrt 3) = 4 ln(2 + sqrt 3) (a square), and (11 + 4 sqrt 7)/3 (4 + sqrt 7)/3 = 8 + 3 sqrt 7
    (a product): the canonical form keeps one logarithm per relation; the value is unchanged (mpmath)."""
    r3, r7 = Surd(0, 1, 3), Surd(0, 1, 7)
    # c ln|w| + conj: with w = 2 + sqrt 3 and c = sqrt 3, 2 sqrt(3) ln(2 + sqrt 3) + the conjugate term
    value = r3 * LogSum.log(Surd(7, 4, 3)) + (-r3) * LogSum.log(Surd(7, -4, 3))
    assert canonical(value) == 4 * sympy.sqrt(3) * sympy.log(2 + sympy.sqrt(3))
    u1, u2 = Surd(F(11, 3), F(4, 3), 7), Surd(F(4, 3), F(1, 3), 7)
    value = LogSum()
    for u in (u1, u2):
        value = value + r7 * LogSum.log(u) - r7 * LogSum.log(u.conjugate())
    got = canonical(value)
    assert got == 2 * sympy.sqrt(7) * sympy.log(8 + 3 * sympy.sqrt(7))
    with mpmath.workdps(50):
        assert abs(sympy.N(got, 50) - value.mp()) < 1e-45
    # the rational logarithms collect by primes: ln 12 - ln 18 + 1/2 = 1/2 + ln 2 - ln 3
    value = LogSum.log(12) - LogSum.log(18) + F(1, 2)
    assert canonical(value) == sympy.Rational(1, 2) + sympy.log(2) - sympy.log(3)


def test_an_odd_sum_is_refused():
    """sqrt(3) ln 2 alone is not invariant under sqrt 3 -> -sqrt 3: not a canonical form's input."""
    with pytest.raises(ArithmeticError, match="not invariant"):
        canonical(Surd(0, 1, 3) * LogSum.log(2))


@pytest.mark.parametrize("p, q, m_i, m_j", [(3, 1, 1, 1), (2, 3, 1, 1), (4, 4, 1, 1), (6, 4, 1, 1), (5, 2, 2, 7),
                                           (7, 3, 2, 5), (10, 10, 1, 1), (3, 1, 1, 10 ** 6 + 1)])
def test_the_closed_form_exactly_and_in_floating_point(p, q, m_i, m_j):
    """`link_integrals.exact_ratio` (surd arithmetic, canonical form) equals `ratio` (the same formulas in
    mpmath at 60 digits) to 50 digits (bookkeeping between two arithmetics; the formulas' outside checks
    are in tests/test_link_integrals.py). Its rational part is -(p m_i + q m_j)/(m_i + m_j) (-(p + q)/2 at
    equal masses): in the coefficient of b, m_i/(2 q) + m_j/(2 p), the line through the two static limits
    (docs 4k), so the logarithms vanish in both limits. An observation on these cases, not derived."""
    exact = link_integrals.exact_ratio(p, q, m_i, m_j)
    with mpmath.workdps(60):
        number = link_integrals.ratio(p, q, m_i, m_j, 60)
        assert abs(mpmath.mpf(str(sympy.N(exact, 60))) - number) < mpmath.mpf(10) ** -50 * max(1, abs(number))
    rational = sum((t for t in sympy.Add.make_args(exact) if t.is_Rational), sympy.Integer(0))
    assert rational == -sympy.Rational(p * m_i + q * m_j, m_i + m_j)


def test_short_closed_forms():
    """The forms printed in docs 4k: r(3, 1) = -2 + (sqrt 3/12) ln(2 + sqrt 3), r(2, 2) = -2 - (sqrt 3/6)
    ln(2 + sqrt 3), and now r(2, 3) = -5/2 - (sqrt 6/12) ln(5 + 2 sqrt 6) and, at masses (1, 2),
    r(2, 2) = -2 - (sqrt 7/21) ln(8 + 3 sqrt 7): one logarithm of the fundamental unit each."""
    s3, s6, s7, log = sympy.sqrt(3), sympy.sqrt(6), sympy.sqrt(7), sympy.log
    assert link_integrals.exact_ratio(3, 1) == -2 + s3 / 12 * log(2 + s3)
    assert link_integrals.exact_ratio(2, 2) == -2 - s3 / 6 * log(2 + s3)
    assert link_integrals.exact_ratio(2, 3) == -sympy.Rational(5, 2) - s6 / 12 * log(5 + 2 * s6)
    assert link_integrals.exact_ratio(2, 2, 1, 2) == -2 - s7 / 21 * log(8 + 3 * s7)


def test_the_sum_rule_is_exact():
    """The sum rule observed in docs 4f with the quadrature (sum over the splittings {p, q} of n of r,
    weight 1/2 for p = q, is -n(n - 1)/4) holds exactly in the closed form: the canonical form of the sum
    is that rational number, every logarithm cancelled between splittings (relations verified in exact
    arithmetic), at n = 3 .. 12 (n = 30 in 12 s, docs 4k). The rational parts alone give it (-n/2 each),
    so the rule says that the logarithms of the splittings cancel."""
    from fractions import Fraction

    for n in range(3, 13):
        total = LogSum()
        for p in range((n + 1) // 2, n):
            q = n - p
            dx = link_integrals._diffusion(p, q, 1, 1)
            total = total + link_integrals._closed_form(p, q, dx, 1 - dx, link_integrals.EXACT) * \
                (Fraction(1, 2) if p == q else 1)
        assert canonical(total) == sympy.Rational(-n * (n - 1), 4), n
