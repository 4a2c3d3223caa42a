"""Derived: the link squared of every two-loop cluster {p-cycle of species i, q-cycle of species j}, at any
masses, as a finite sum of logarithms of quadratic surds (docs/perturbative.md, section 4k).

The cluster's second order in the mutual parameter d, offset integrated, is that of the weight
exp(i d Theta - g sum_a int delta^2(R_a)) over the p q link segments R_a (the winding Theta of the link
curves and the contact of strength g = 2 pi D_rel |d| that gives the exact first order). With the
Fourier form of the winding and the Gaussian laws of the two loops, every term reduces to the integrals

    int_0^1 (1 - u) ln Q(u) du    and    int_0^1 (1 - u) / Q(u) du ,

Q(u) = D_X s_p(u + dj) + D_Y s_q(u + di) quadratic in u (s_p(x) = x (p - x) / p), one per pair of
strand lags (dj, di); both are elementary (the roots of Q are real, outside (0, 1)). The local
divergences of the segment with itself depend only on D_rel = D_X + D_Y and are fixed once by the exact
two-body result of one closed pair, b_{1,1} = -|d| + d^2 (Aharonov-Bohm).

`ratio(p, q, m_i, m_j)` is r = (second order) / (first order), per link segment; the d^2 coefficient
of b is -(m_i + m_j) r / (2 m_ref p q) (`coefficient`). Exact in the masses; evaluated with mpmath at
DIGITS significant digits (the surds and logarithms are the only floating-point steps).
"""
from __future__ import annotations

from fractions import Fraction
from functools import lru_cache

import mpmath

from ..errors import NotSupportedYet
from .surd_logs import LogSum, Surd, canonical

DIGITS = 40


def _mp(x: Fraction) -> mpmath.mpf:
    return mpmath.mpf(x.numerator) / x.denominator


def _sigma(x: int, period: int) -> Fraction:
    return Fraction(x * (period - x), period)


class _Arithmetic:
    """The few operations the closed form needs: mpmath numbers (`NUMERIC`) or exact surds and sums of
    their logarithms (`EXACT`, module surd_logs)."""

    def __init__(self, number, log, sqrt, absolute):
        self.number, self.log, self.sqrt, self.abs = number, log, sqrt, absolute


NUMERIC = _Arithmetic(_mp, mpmath.log, mpmath.sqrt, abs)


EXACT = _Arithmetic(Surd, LogSum.log, Surd.sqrt, abs)


def _closed_form(p: int, q: int, dx: Fraction, dy: Fraction, ops: _Arithmetic):
    """r(p, q) at the diffusions (dx, dy) by (4k.4) of docs/perturbative.md: r = 1/2 - A/(4 D_rel) -
    (D_rel/2) sum F_2, every integral over [0, 1] of a lag pair's quadratic Q(u) = a + b u + c u^2 in closed
    form from its roots rho_1 <= 0 < 1 <= rho_2 (real: Q > 0 on (0, 1), c < 0)."""
    number, log = ops.number, ops.log

    def log_moment(rho):                            # int_0^1 (1 - u) ln|u - rho| du
        def antiderivative(v):
            if v == 0:
                return 0
            lv = log(ops.abs(v))
            return (1 - rho) * (v * lv - v) - (v * v * lv / 2 - v * v / 4)
        return antiderivative(1 - rho) - antiderivative(-rho)

    def pole_moment(rho):                           # int_0^1 (1 - u)/(u - rho) du, rho = 1 allowed
        return -1 if rho == 1 else (1 - rho) * log(ops.abs((1 - rho) / rho)) - 1
    drel, c = dx + dy, -(dx / p + dy / q)
    logs, poles = number(Fraction(0)), number(Fraction(0))
    for dj in range(p):
        for di in range(q):
            # s_p(u + dj) = (u + dj)(p - dj - u)/p on [0, 1], likewise s_q(u + di)
            a = dx * _sigma(dj, p) + dy * _sigma(di, q)
            b = dx * Fraction(p - 2 * dj, p) + dy * Fraction(q - 2 * di, q)
            if a == 0:                              # the segment with itself: Q = u (b + c u), rho_1 = 0
                rho1, rho2 = number(Fraction(0)), number(-b / c)
                poles += pole_moment(rho2) / number(-b)                      # less 1/(D_rel u)
            else:
                disc = ops.sqrt(number(b * b - 4 * a * c))
                # no cancellation in floating point (the small root of a heavy loop's pairs)
                half = -(number(b) + (disc if b >= 0 else -disc)) / 2
                rho1, rho2 = (number(a) / half, half / number(c)) if b >= 0 else (half / number(c), number(a) / half)
                poles += (pole_moment(rho2) - pole_moment(rho1)) / (number(c) * (rho2 - rho1))
            logs += log(number(-c)) / 2 + log_moment(rho1) + log_moment(rho2)
    area = -number(2 * dx / p + 2 * dy / q) * 2 * logs + 2 * number(drel) * log(number(drel))
    area += sum(2 * number(dx) * log(number(dy * _sigma(di, q))) for di in range(1, q))
    area += sum(2 * number(dy) * log(number(dx * _sigma(dj, p))) for dj in range(1, p))
    return number(Fraction(1, 2)) - area / (4 * number(drel)) - number(drel) * poles / 2


def exact_mass(value, name: str) -> Fraction:
    """A positive rational mass as a Fraction (ints, Fractions, sympy Rationals); a float is refused as
    not supported (the closed form is exact in the masses), anything else non-positive or non-rational
    is a ValueError."""
    if isinstance(value, float):
        raise NotSupportedYet(f"{name} = {value!r} is a float: give an exact mass (int, Fraction or Rational)")
    if isinstance(value, bool):
        raise ValueError(f"{name} must be a positive rational mass, got {value!r}")
    try:
        out = Fraction(str(value))
    except (TypeError, ValueError):
        raise ValueError(f"{name} must be a positive rational mass, got {value!r}") from None
    if out <= 0:
        raise ValueError(f"{name} must be a positive rational mass, got {value!r}")
    return out


def ratio(p: int, q: int, m_i=1, m_j=1, digits: int = DIGITS) -> mpmath.mpf:
    """r(p, q; m_i, m_j): the cluster's d^2 coefficient over its first order, per link segment (the
    p-cycle of mass m_i per particle, the q-cycle of mass m_j), at `digits` working digits. -3/2 for
    {2, 1} at equal masses."""
    return _ratio(p, q, _diffusion(p, q, m_i, m_j), digits)


def _diffusion(p, q, m_i, m_j) -> Fraction:
    """D_X of the p-cycle when D_X + D_Y = 1 (m_j/(m_i + m_j)), after checking the arguments."""
    for value, name in ((p, "p"), (q, "q")):
        if isinstance(value, bool) or not isinstance(value, int) or value < 1:
            raise ValueError(f"{name} must be a positive integer cycle length, got {value!r}")
    m_i, m_j = exact_mass(m_i, "m_i"), exact_mass(m_j, "m_j")
    return m_j / (m_i + m_j)


@lru_cache(maxsize=None)
def _ratio(p: int, q: int, dx: Fraction, digits: int) -> mpmath.mpf:
    """r at D_X = dx, D_Y = 1 - dx (r is homogeneous of degree zero in the diffusions)."""
    with mpmath.workdps(digits):
        return +_closed_form(p, q, dx, 1 - dx, NUMERIC)


def coefficient(p: int, q: int, m_i=1, m_j=1) -> tuple[float, float]:
    """(value, bound) of the d_ij^2 coefficient that the link of {p-cycle of i, q-cycle of j} adds to b
    (m_ref = 1), about bosons for both species; the chains of three loops are not included (m_i/2 + m_j/4
    for {2, 1}). The bound is ten times the change from DIGITS to DIGITS + 20 working digits (the
    logarithms' rounding; it grows with the mass ratio), never below 1e-15 of the value (the float)."""
    with mpmath.workdps(DIGITS + 20):
        scale = -_mp(exact_mass(m_i, "m_i") + exact_mass(m_j, "m_j")) / (2 * p * q)
        fine = scale * ratio(p, q, m_i, m_j, DIGITS + 20)
        rough = scale * ratio(p, q, m_i, m_j, DIGITS)
        return float(fine), float(max(10 * abs(fine - rough), 1e-15 * abs(fine)))


def exact_ratio(p: int, q: int, m_i=1, m_j=1):
    """r(p, q; m_i, m_j) as an exact sympy expression: a rational number plus rational multiples of
    sqrt(D) ln u, u > 1 of norm +-1 in Q(sqrt D) (the same formulas as `ratio`, in exact surd arithmetic,
    put in the canonical form of `surd_logs.canonical`; docs 4k). E.g. r(3, 1) = -2 + (sqrt(3)/12)
    ln(2 + sqrt(3)) at equal masses. Milliseconds per cluster."""
    return _exact_ratio(p, q, _diffusion(p, q, m_i, m_j))


@lru_cache(maxsize=4096)
def _exact_ratio(p: int, q: int, dx: Fraction):
    return canonical(_closed_form(p, q, dx, 1 - dx, EXACT))


def exact_coefficient(p: int, q: int, m_i=1, m_j=1):
    """The exact sympy value of `coefficient`: -(m_i + m_j) r / (2 m_ref p q), m_ref = 1."""
    import sympy
    total = exact_mass(m_i, "m_i") + exact_mass(m_j, "m_j")
    return sympy.expand(-sympy.Rational(total.numerator, total.denominator) / (2 * p * q) * exact_ratio(p, q, m_i, m_j))
