"""Deciding a claim numerically: reproducible rational points in the declared ranges (`Sampler`), exact
evaluation there, comparison at a number of significant digits and the values shown at a mismatch: the
numeric half of `checks`."""
from __future__ import annotations

import itertools
import math
import random

import mpmath
import sympy

from ..errors import InputError
from .numbers import Interval

SHOWN_DIGITS = 20           # digits of the two values printed at a mismatch


# ---------------------------------------------------------------------------------------------
# sampling and evaluation


class Sampler:
    """Reproducible rational points in a box of intervals; closed ends first, then random points."""

    DENOMINATORS = (50, 5000)

    def __init__(self, symbols, intervals: dict, seed: int):
        self.symbols = symbols
        self.intervals = intervals
        self.rng = random.Random(seed)
        self.integers = {s: bool(s.is_integer) for s in symbols}
        self.ranges = {s: _rational_ends(intervals[s]) for s in symbols}
        self.exhaustive = False
        self.size = math.inf
        if symbols and all(self.integers.values()):
            counts = 1
            for s in symbols:
                lo, hi = self._integer_range(s)
                counts *= max(0, hi - lo + 1)
            self.size = counts

    def _integer_range(self, s) -> tuple[int, int]:
        lo, hi, lo_open, hi_open = self.ranges[s]
        first = math.floor(lo) + 1 if lo_open or lo != math.floor(lo) else int(lo)
        last = math.ceil(hi) - 1 if hi_open or hi != math.ceil(hi) else int(hi)
        return int(first), int(last)

    def points(self, wanted: int, limit: int):
        if not self.symbols:
            yield {}
            return
        if self.size <= wanted:  # all integer points
            self.exhaustive = True
            axes = [range(self._integer_range(s)[0], self._integer_range(s)[1] + 1) for s in self.symbols]
            for combo in itertools.product(*axes):
                yield {s: sympy.Integer(v) for s, v in zip(self.symbols, combo)}
            return
        seen = set()
        for attempt in range(limit):
            point = {s: self._value(s, attempt) for s in self.symbols}
            key = tuple(point[s] for s in self.symbols)
            if key in seen:
                continue
            seen.add(key)
            yield point

    def _value(self, s, attempt: int):
        lo, hi, lo_open, hi_open = self.ranges[s]
        if self.integers[s]:
            first, last = self._integer_range(s)
            if first > last:
                raise InputError(f"no integer lies in the range of {s.name}")
            return sympy.Integer(self.rng.randint(first, last))
        if attempt == 0 and not lo_open:
            return lo
        if attempt == 1 and not hi_open:
            return hi
        q = self.rng.randint(*self.DENOMINATORS)
        k = self.rng.randint(1, q - 1)
        return lo + (hi - lo) * sympy.Rational(k, q)


def _rational_ends(interval: Interval):
    """Rational ends inside the interval (irrational ends are moved inwards by at most 1e-12 and
    then never hit, so they count as open)."""
    lo, hi = interval.lower, interval.upper
    lo_open, hi_open = interval.lower_open, interval.upper_open
    if not lo.is_Rational:
        lo, lo_open = sympy.ceiling(lo * 10**12) / sympy.Integer(10**12), False
    if not hi.is_Rational:
        hi, hi_open = sympy.floor(hi * 10**12) / sympy.Integer(10**12), False
    return sympy.Rational(lo), sympy.Rational(hi), lo_open, hi_open


_BAD = (sympy.zoo, sympy.oo, -sympy.oo, sympy.nan)


def value_at(expr, point: dict, digits: int):
    """The exact value at the point (a sympy Rational), else an mpmath number with `digits` + 10
    digits; None where the expression is singular."""
    try:
        exact = expr.xreplace(point) if point else expr
    except (ZeroDivisionError, ValueError):
        return None
    if exact.has(*_BAD):
        return None
    if exact.is_Rational:
        return exact
    try:
        number = sympy.N(exact, digits + 10)
    except (ZeroDivisionError, ValueError, TypeError):
        return None
    if number.has(*_BAD) or not number.is_number:
        return None
    real, imag = number.as_real_imag()
    if not (real.is_Number and imag.is_Number):
        return None
    with mpmath.workdps(digits + 10):
        re = mpmath.mpf(sympy.Float(real, digits + 10)._mpf_)
        im = mpmath.mpf(sympy.Float(imag, digits + 10)._mpf_)
        return re if im == 0 else mpmath.mpc(re, im)


def agree(left, right, digits: int) -> bool:
    if isinstance(left, sympy.Basic) and isinstance(right, sympy.Basic):
        return left == right
    with mpmath.workdps(digits + 10):
        a, b = _mp(left, digits), _mp(right, digits)
        scale = max(mpmath.mpf(1), abs(a), abs(b))
        return abs(a - b) <= mpmath.mpf(10) ** (-digits) * scale


def _mp(value, digits):
    if isinstance(value, sympy.Basic):
        return mpmath.mpf(sympy.Float(value, digits + 10)._mpf_)
    return value


def shown_pair(left, right) -> tuple[str, str]:
    """The two values as text, with as many digits as it takes (up to 200) for them to read
    differently; failing that, the second one says by how much they differ."""
    pair = (_shown(left), _shown(right))
    if all(isinstance(v, sympy.Basic) and len(sympy.sstr(v)) <= 40 for v in (left, right)):
        return pair  # both exact and short
    digits = SHOWN_DIGITS
    pair = (_shown(left, digits, numeric=True), _shown(right, digits, numeric=True))
    while pair[0] == pair[1] and digits < 200:
        digits *= 2
        pair = (_shown(left, digits, numeric=True), _shown(right, digits, numeric=True))
    if pair[0] == pair[1]:
        if isinstance(left, sympy.Basic) and isinstance(right, sympy.Basic):
            difference = sympy.sstr(sympy.N(left - right, 5))
        else:
            with mpmath.workdps(400):
                difference = mpmath.nstr(_mp(left, 400) - _mp(right, 400), 5)
        pair = (pair[0], f"{pair[1]} (claimed - derived = {difference})")
    return pair


def _shown(value, digits: int = SHOWN_DIGITS, numeric: bool = False) -> str:
    if isinstance(value, sympy.Basic):
        text = sympy.sstr(value)
        if len(text) <= 40 and not numeric:
            return text
    with mpmath.workdps(digits + 10):
        if isinstance(value, sympy.Basic):
            value = _mp(value, digits)
        if isinstance(value, mpmath.mpc):
            return f"{mpmath.nstr(value.real, digits)}{'-' if value.imag < 0 else '+'}" \
                   f"{mpmath.nstr(abs(value.imag), digits)}j"
        return mpmath.nstr(value, digits)
