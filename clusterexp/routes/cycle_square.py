"""The k-cycle alone at second order in the exchange parameter, exactly (docs/perturbative.md, section 4l).

The k-cycle cluster of one species (unit mass, about bosons) is (1/k^2) E[e^{i alpha Theta}], Theta the sum
of the angles of the C(k, 2) pairs of strands of one Brownian loop of duration k. Section 4d writes its
alpha^2 coefficient as a sum over the pairs and the pairs of pairs:

* one pair (a, b), lag j = b - a: its relative vector has per-component variance v = j(k - j)/k at each end
  and covariance v - 1 between its ends, rho = 1 - 1/v; its alpha^2 part is S(rho) = Li_2(rho^2)/4 - pi^2/24
  (derived in section 4l (i); the tests compare the Schlaefli form of section 4d by scipy,
  `cycle_alone._single`);
* two pairs p, q: Lambda - C, a lag integral int_{-1}^{1} (1 - |u|) F(c(u)) du with
  F(c) = 1/(V - c^2) + (c'^2/(2 c^2)) ln(1 - c^2/V), V the product of the two variances and c(u) the
  covariance of the two relative vectors at lag u, linear on [-1, 0] and on [0, 1] (the loop's variogram
  h(k - h)/k is quadratic, so only its kink at lag 0 survives); minus the equal-time term of strands the two
  pairs share, -shared * (-ln(1 - c(0)^2/V)/(2 c(0))).

Each half of a lag integral has an elementary antiderivative (`_half`): logarithms of sqrt(V) +- c with
coefficients in Q(sqrt V), logarithms of rationals, and Li_2(c^2/V) at the two ends. The module adds all of
it exactly (`surd_logs`: the logarithms; a table {x: q} for the dilogarithms, Li_2(1) = pi^2/6 read as pi^2)
and returns the canonical sympy expression. Nothing is assumed about the result: whatever does not cancel
is returned (a dilogarithm as sympy's polylog). For every k computed (k = 2 .. 40, section 4l) every
dilogarithm and every logarithm cancels and the result is the Fock-squared ring part
(1/2)[z^k] z ln^2(1 - z)/(1 - z).
"""
from __future__ import annotations

from collections import Counter, defaultdict
from fractions import Fraction
from functools import lru_cache
from itertools import combinations

import sympy

from ..progress import Progress
from .surd_logs import LogSum, Surd, canonical

SHOWN_FROM = 20    # show progress on a terminal from this k on (k = 40 takes about fourteen seconds)


def ring_part(k: int) -> Fraction:
    """The Fock-squared ring part of the k-cycle alone, (1/2)[z^k] z ln^2(1 - z)/(1 - z), exactly:
    ln^2(1 - z) = sum_{m >= 2} (2 H_{m-1}/m) z^m, so the coefficient is sum_{m=2}^{k-1} H_{m-1}/m."""
    harmonic, total = Fraction(0), Fraction(0)
    for m in range(2, k):
        harmonic += Fraction(1, m - 1)
        total += harmonic / m
    return total


def _lag_classes(k: int):
    """(halves, shared, lags): Counters of the distinct half lag integrals {(c0, c1, V): count}, of the
    equal-time terms {(c0, V): signed count}, and of the single pairs {j: count}."""
    def variogram(h):
        h %= k
        return Fraction(h * (k - h), k)

    def cov(p, q, lag):          # Cov(A_p(s), A_q(s - lag)) per component, A_p = X(s + a) - X(s + b)
        (a, b), (c, d) = p, q
        return -(variogram(a - c + lag) - variogram(a - d + lag) - variogram(b - c + lag)
                 + variogram(b - d + lag)) / 2
    pairs = list(combinations(range(k), 2))
    var = {p: cov(p, p, 0) for p in pairs}
    halves, shared = Counter(), Counter()
    for p, q in combinations(pairs, 2):
        V = var[p] * var[q]
        c0 = cov(p, q, 0)
        halves[(c0, cov(p, q, 1), V)] += 1
        halves[(c0, cov(p, q, -1), V)] += 1
        (a, b), (c, d) = p, q
        common = (a == c) - (a == d) - (b == c) + (b == d)
        if common and c0:
            shared[(c0, V)] += common
    return halves, shared, Counter(b - a for a, b in pairs)


class _Sum:
    """c_0 + sum_w q_w ln|w| + sum_x d_x Li_2(x) + e pi^2 with exact coefficients (logs merged by argument)."""

    def __init__(self):
        self.constant = Fraction(0)
        self.logs: dict = defaultdict(lambda: Surd(0))
        self.dilogs: dict = defaultdict(Fraction)
        self.pi2 = Fraction(0)

    def log(self, coefficient, argument) -> None:
        coefficient = coefficient if isinstance(coefficient, Surd) else Surd(coefficient)
        if coefficient != 0:
            argument = argument if isinstance(argument, Surd) else Surd(argument)
            self.logs[argument] = self.logs[argument] + coefficient

    def dilog(self, coefficient: Fraction, x: Fraction) -> None:
        if x == 1:
            self.pi2 += coefficient / 6
        elif x:
            self.dilogs[x] += coefficient

    def expression(self, scale: Fraction) -> sympy.Expr:
        terms = [(c * scale, w) for w, c in self.logs.items() if c != 0]
        out = canonical(LogSum({1: Surd(self.constant * scale)}, terms))
        pi2 = self.pi2 * scale
        out += sympy.Rational(pi2.numerator, pi2.denominator) * sympy.pi ** 2
        for x, q in sorted(self.dilogs.items()):
            if q:
                q = q * scale
                out += sympy.Rational(q.numerator, q.denominator) * sympy.polylog(2, sympy.Rational(x.numerator, x.denominator))
        return out


def _half(total: _Sum, c0: Fraction, c1: Fraction, V: Fraction, count: int) -> None:
    """count x int_0^1 (1 - w) F(c0 + (c1 - c0) w) dw added to `total` (F of the module's docstring, c' =
    c1 - c0). With c = c0 + sigma w: (1/sigma^2) int_{c0}^{c1} (c1 - c)/(V - c^2) dc + (1/2) int_{c0}^{c1}
    (c1 - c) ln(1 - c^2/V)/c^2 dc; the first is [-A ln|R - c| + B ln|R + c|], R = sqrt V, A = (c1 - R)/(2R),
    B = (c1 + R)/(2R); the second is (1/2)[c1 G(c1) - c1 G(c0)] + (1/4)[Li_2(c1^2/V) - Li_2(c0^2/V)] with
    G(c) = -ln(1 - c^2/V)/c - (1/R) ln((R + c)/(R - c)). A logarithm whose coefficient vanishes (c1 = +-R: the
    two pairs are one vector at the end of the lag range) is left out, so nothing diverges."""
    sigma = c1 - c0
    if sigma == 0:
        total.constant += Fraction(count, 2) / (V - c0 * c0)
        return
    R = Surd.sqrt(V)
    A, B = (c1 - R) / (2 * R), (c1 + R) / (2 * R)
    first = Fraction(count) / (sigma * sigma)
    for c, sign in ((c1, 1), (c0, -1)):
        total.log(-A * first * sign, R - c)
        total.log(B * first * sign, R + c)
    half = Fraction(count, 2)
    if c1:
        # c1 G(c1) = ln V - (1 - c1/R) ln|R - c1| - (1 + c1/R) ln|R + c1|
        total.log(half, V)
        total.log(-(1 - c1 / R) * half, R - c1)
        total.log(-(1 + c1 / R) * half, R + c1)
        if c0:   # - c1 G(c0); at c0 = 0 it vanishes
            total.log(half * c1 / c0, 1 - c0 * c0 / V)
            total.log((c1 / R) * half, R + c0)
            total.log(-(c1 / R) * half, R - c0)
    total.dilog(Fraction(count, 4), c1 * c1 / V)
    total.dilog(Fraction(-count, 4), c0 * c0 / V)


@lru_cache(maxsize=None)
def cycle_square(k: int) -> sympy.Expr:
    """The alpha^2 coefficient of the k-cycle cluster (1/k^2) E[e^{i alpha Theta}] of one species of unit
    mass about bosons, k >= 2, exactly: a sympy expression (a Rational for every k computed, the ring part).
    About fermions (alpha = 1 + e) the k-cycle is (-1)^(k-1) times the same function of e (its total angle
    is pi (k - 1) mod 2 pi): the caller's sign."""
    if isinstance(k, bool) or not isinstance(k, int) or k < 2:
        raise ValueError(f"k must be an integer >= 2, got {k!r}")
    report = Progress(enabled=None if k >= SHOWN_FROM else False)
    try:
        report.step(f"cluster the {k}-cycle alone at second order, exactly")
        return _total(k).expression(Fraction(1, k * k))
    finally:
        report.done()


def _total(k: int) -> _Sum:
    """k^2 times the k-cycle's alpha^2 coefficient as an unreduced `_Sum`: the single pairs, the half lag
    integrals and the equal-time terms."""
    halves, shared, lags = _lag_classes(k)
    total = _Sum()
    for j, count in lags.items():
        v = Fraction(j * (k - j), k)
        total.dilog(Fraction(count, 4), (v - 1) ** 2 / v ** 2)
        total.pi2 -= Fraction(count, 24)
    for (c0, c1, V), count in halves.items():
        _half(total, c0, c1, V, count)
    for (c0, V), count in shared.items():
        total.log(Fraction(count, 2) / c0, 1 - c0 * c0 / V)
    return total
