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

DIGITS = 40


def _mp(x: Fraction) -> mpmath.mpf:
    return mpmath.mpf(x.numerator) / x.denominator


def _sigma(x: Fraction, period: int) -> Fraction:
    return x * (period - x) / period


def _log_moment(rho) -> mpmath.mpf:
    """int_0^1 (1 - u) ln|u - rho| du for a real rho outside (0, 1)."""
    def antiderivative(v):
        if v == 0:
            return mpmath.mpf(0)
        lv = mpmath.log(abs(v))
        return (1 - rho) * (v * lv - v) - (v * v * lv / 2 - v * v / 4)
    return antiderivative(1 - rho) - antiderivative(-rho)


def _pole_moment(rho) -> mpmath.mpf:
    """int_0^1 (1 - u) / (u - rho) du for a real rho outside [0, 1) (rho = 1 allowed)."""
    if rho == 1:
        return mpmath.mpf(-1)
    return (1 - rho) * mpmath.log(abs((1 - rho) / rho)) - 1


def _roots(a: Fraction, b: Fraction, c: Fraction):
    """The two real roots rho_1 <= 0 < 1 <= rho_2 of a + b u + c u^2 (c < 0, positive on (0, 1))."""
    disc = mpmath.sqrt(_mp(b * b - 4 * a * c))
    half = -(_mp(b) + (disc if b >= 0 else -disc)) / 2      # no cancellation (the small root at a heavy loop)
    first, second = half / _mp(c), _mp(a) / half
    return min(first, second), max(first, second)


def _per_segment(p: int, q: int, dx: Fraction, dy: Fraction) -> mpmath.mpf:
    """The second-order coefficient per link segment, before the local constant: (pi/2) A + (2 pi
    D_rel)^2 K / 2 in the notation of docs/perturbative.md 4k."""
    drel = dx + dy
    c = -(dx / p + dy / q)
    logs, poles = mpmath.mpf(0), mpmath.mpf(0)
    for dj in range(p):
        for di in range(q):
            # Q(u) = a + b u + c u^2 on [0, 1]: s_p(u + dj) = (u + dj)(p - dj - u)/p
            a = dx * _sigma(Fraction(dj), p) + dy * _sigma(Fraction(di), q)
            b = dx * Fraction(p - 2 * dj, p) + dy * Fraction(q - 2 * di, q)
            if a == 0:                              # the segment with itself: Q = u (b + c u), rho_1 = 0
                rho2 = -b / c
                logs += mpmath.log(_mp(-c)) / 2 + _log_moment(0) + _log_moment(_mp(rho2))
                poles += _pole_moment(_mp(rho2)) / _mp(c * rho2)     # less 1/(D_rel u)
                continue
            rho1, rho2 = _roots(a, b, c)
            logs += mpmath.log(_mp(-c)) / 2 + _log_moment(rho1) + _log_moment(rho2)
            poles += (_pole_moment(rho2) - _pole_moment(rho1)) / (_mp(c) * (rho2 - rho1))
    area = -_mp(2 * dx / p + 2 * dy / q) * 2 * logs + 2 * _mp(drel) * mpmath.log(_mp(drel))
    area += sum(2 * _mp(dx) * mpmath.log(_mp(dy * _sigma(Fraction(di), q))) for di in range(1, q))
    area += sum(2 * _mp(dy) * mpmath.log(_mp(dx * _sigma(Fraction(dj), p))) for dj in range(1, p))
    contact = 2 * poles / (4 * mpmath.pi)
    return mpmath.pi * area / 2 + (2 * mpmath.pi * _mp(drel)) ** 2 * contact / 2


def _mass(value, name: str) -> Fraction:
    if isinstance(value, (bool, float)):
        raise ValueError(f"{name} must be an exact positive mass (int, Fraction or Rational), got {value!r}")
    try:
        out = Fraction(str(value))
    except (TypeError, ValueError):
        raise ValueError(f"{name} must be an exact positive mass, got {value!r}") from None
    if out <= 0:
        raise ValueError(f"{name} must be an exact positive mass, got {value!r}")
    return out


def ratio(p: int, q: int, m_i=1, m_j=1, digits: int = DIGITS) -> mpmath.mpf:
    """r(p, q; m_i, m_j): the cluster's d^2 coefficient over its first order, per link segment (the
    p-cycle of mass m_i per particle, the q-cycle of mass m_j), at `digits` working digits. -3/2 for
    {2, 1} at equal masses."""
    for value, name in ((p, "p"), (q, "q")):
        if isinstance(value, bool) or not isinstance(value, int) or value < 1:
            raise ValueError(f"{name} must be a positive integer cycle length, got {value!r}")
    m_i, m_j = _mass(m_i, "m_i"), _mass(m_j, "m_j")
    return _ratio(p, q, m_j / (m_i + m_j), digits)


@lru_cache(maxsize=None)
def _ratio(p: int, q: int, dx: Fraction, digits: int) -> mpmath.mpf:
    """r at D_X = dx, D_Y = 1 - dx (r is homogeneous of degree zero in the diffusions)."""
    dy = 1 - dx
    with mpmath.workdps(digits):
        local = 2 * mpmath.pi - _per_segment(1, 1, dx, dy)          # fixed by r(1, 1) = -1
        return +((_per_segment(p, q, dx, dy) + local) / (-2 * mpmath.pi))


def coefficient(p: int, q: int, m_i=1, m_j=1) -> tuple[float, float]:
    """(value, bound) of the d_ij^2 coefficient that the link of {p-cycle of i, q-cycle of j} adds to b
    (m_ref = 1), about bosons for both species; the chains of three loops are not included (m_i/2 + m_j/4
    for {2, 1}). The bound is ten times the change from DIGITS to DIGITS + 20 working digits (the
    logarithms' rounding; it grows with the mass ratio), never below 1e-15 of the value (the float)."""
    with mpmath.workdps(DIGITS + 20):
        scale = -_mp(_mass(m_i, "m_i") + _mass(m_j, "m_j")) / (2 * p * q)
        fine = scale * ratio(p, q, m_i, m_j, DIGITS + 20)
        rough = scale * ratio(p, q, m_i, m_j, DIGITS)
        return float(fine), float(max(10 * abs(fine - rough), 1e-15 * abs(fine)))


def exact_ratio(p: int, q: int, m_i=1, m_j=1):
    """r(p, q; m_i, m_j) as an exact sympy expression: a rational number plus rational multiples of
    logarithms of quadratic surds (the same formulas as `_per_segment`, with sympy's exact roots; docs
    4k). E.g. r(3, 1) = -2 + (sqrt(3)/12) ln(2 + sqrt(3)) at equal masses. Simplification takes about a
    second for |n| <= 6 and grows with p q."""
    import sympy
    ratio(p, q, m_i, m_j, 15)                       # the same checks of the arguments
    m_i, m_j = _mass(m_i, "m_i"), _mass(m_j, "m_j")
    dx = sympy.Rational(m_j.numerator * m_i.denominator, m_j.denominator * m_i.numerator + m_j.numerator * m_i.denominator)
    local = 2 * sympy.pi - _exact_per_segment(1, 1, dx, 1 - dx)
    value = (_exact_per_segment(p, q, dx, 1 - dx) + local) / (-2 * sympy.pi)
    return sympy.simplify(sympy.expand_log(sympy.expand(value), force=True))


def _exact_per_segment(p: int, q: int, dx, dy):
    """`_per_segment` in exact arithmetic (sympy): rational lags, surd roots, exact logarithms."""
    import sympy

    def sigma(x: int, period: int):
        return sympy.Rational(x * (period - x), period)

    def log_moment(rho):
        def antiderivative(v):
            if v == 0:
                return 0
            lv = sympy.log(sympy.Abs(v))
            return (1 - rho) * (v * lv - v) - (v * v * lv / 2 - v * v / 4)
        return antiderivative(1 - rho) - antiderivative(-rho)

    def pole_moment(rho):
        return -1 if rho == 1 else (1 - rho) * sympy.log(sympy.Abs((1 - rho) / rho)) - 1
    drel, c = dx + dy, -(dx / p + dy / q)
    logs, poles = 0, 0
    for dj in range(p):
        for di in range(q):
            a = dx * sigma(dj, p) + dy * sigma(di, q)
            b = dx * sympy.Rational(p - 2 * dj, p) + dy * sympy.Rational(q - 2 * di, q)
            if a == 0:
                rho2 = -b / c
                logs += sympy.log(-c) / 2 + log_moment(sympy.Integer(0)) + log_moment(rho2)
                poles += pole_moment(rho2) / (c * rho2)
                continue
            disc = sympy.sqrt(b * b - 4 * a * c)
            rho1, rho2 = (-b + disc) / (2 * c), (-b - disc) / (2 * c)
            logs += sympy.log(-c) / 2 + log_moment(rho1) + log_moment(rho2)
            poles += (pole_moment(rho2) - pole_moment(rho1)) / (c * (rho2 - rho1))
    area = -(2 * dx / p + 2 * dy / q) * 2 * logs + 2 * drel * sympy.log(drel)
    area += sum(2 * dx * sympy.log(dy * sigma(di, q)) for di in range(1, q))
    area += sum(2 * dy * sympy.log(dx * sigma(dj, p)) for dj in range(1, p))
    return sympy.pi * area / 2 + (2 * sympy.pi * drel) ** 2 * (2 * poles / (4 * sympy.pi)) / 2
