"""Deciding a claim symbolically, with bounded effort (`bounded`, `decide_zero`), truncating both sides
of a truncated claim (`truncate`) and the leading term of a mismatch (`leading_term`): the symbolic half
of `checks`."""
from __future__ import annotations

import signal
import threading
from typing import Sequence

import sympy

from ..errors import InputError
from .check_result import _text
from .numbers import parameter_interval

MAX_SIMPLIFY_OPS = 3000     # larger differences are not handed to simplify
_EPS = sympy.Dummy("eps")


# ---------------------------------------------------------------------------------------------
# symbolic zero test with bounded effort


class _OutOfTime(Exception):
    pass


def bounded(function, seconds: float | None):
    """Run `function()`; give up (return None) after `seconds` when a timer can be armed (POSIX,
    main thread, no timer already running), else run it unbounded."""
    usable = (seconds is not None and hasattr(signal, "setitimer")
              and threading.current_thread() is threading.main_thread()
              and signal.getitimer(signal.ITIMER_REAL) == (0.0, 0.0))
    if not usable:
        return function()

    def alarm(signum, frame):
        raise _OutOfTime

    previous = signal.signal(signal.SIGALRM, alarm)
    try:
        signal.setitimer(signal.ITIMER_REAL, seconds)
        try:
            return function()
        finally:
            signal.setitimer(signal.ITIMER_REAL, 0)
    except _OutOfTime:
        return None
    finally:
        signal.signal(signal.SIGALRM, previous)


def _is_rational_over_q(expr) -> bool:
    """Built from symbols and rationals by +, * and integer powers only."""
    if expr.is_Symbol or expr.is_Rational:
        return True
    if expr.is_Add or expr.is_Mul:
        return all(_is_rational_over_q(a) for a in expr.args)
    if expr.is_Pow:
        return expr.exp.is_Integer and _is_rational_over_q(expr.base)
    return False


def decide_zero(difference, seconds) -> tuple[bool | None, str, sympy.Expr]:
    """(True: zero, False: nonzero, None: undecided; how; the simplified difference)."""
    expanded = sympy.expand(difference)
    if expanded == 0:
        return True, "by expansion", expanded
    if _is_rational_over_q(expanded):
        normal = sympy.cancel(sympy.together(expanded))
        if normal == 0:
            return True, "rational-function normal form", normal
        return False, "rational-function normal form", sympy.factor(normal)
    if not expanded.free_symbols:
        x = sympy.Dummy("x")
        polynomial = bounded(lambda: _minimal_polynomial(expanded, x), seconds)
        if polynomial is not None:
            if sympy.expand(polynomial - x) == 0:
                return True, "minimal polynomial", sympy.Integer(0)
            return False, "minimal polynomial", expanded
    if sympy.count_ops(expanded) > MAX_SIMPLIFY_OPS:
        return None, "", expanded
    simplified = bounded(lambda: sympy.simplify(expanded), seconds)
    if simplified is None:
        return None, "", expanded
    if simplified == 0:
        return True, "simplify", simplified
    return None, "", simplified


def _minimal_polynomial(number, x):
    try:
        return sympy.minimal_polynomial(number, x)
    except (NotImplementedError, sympy.polys.polyerrors.PolynomialError, sympy.polys.polyerrors.NotAlgebraic,
            ArithmeticError, ValueError, TypeError):
        return None


# ---------------------------------------------------------------------------------------------
# truncated series


def truncate(expr, variables: Sequence[sympy.Symbol], order: int, what: str = "value") -> sympy.Expr:
    """The Taylor polynomial of `expr` about 0 in `variables` through total order `order`."""
    scaled = sympy.sympify(expr).xreplace({v: _EPS * v for v in variables})
    names = ", ".join(v.name for v in variables)
    if scaled.is_polynomial(_EPS):
        coefficients = _poly_coefficients(sympy.expand(scaled), order)
    elif scaled.is_rational_function(_EPS):
        numerator, denominator = sympy.fraction(sympy.cancel(sympy.together(scaled), _EPS))
        top = _poly_coefficients(sympy.expand(numerator), order)
        bottom = _poly_coefficients(sympy.expand(denominator), order)
        if sympy.simplify(bottom[0]) == 0:
            raise InputError(f"the {what} has a pole at {names} = 0: not a power series there")
        coefficients = []
        for j in range(order + 1):
            c = top[j] - sum(bottom[i] * coefficients[j - i] for i in range(1, j + 1))
            coefficients.append(sympy.cancel(c / bottom[0]))
    else:
        series = bounded(lambda: sympy.series(scaled, _EPS, 0, order + 1).removeO(), 30.0)
        if series is None or series.has(sympy.Order):
            raise InputError(f"could not expand the {what} in {names} in the time allowed")
        series = sympy.expand(series)
        if not series.is_polynomial(_EPS):
            raise InputError(f"the {what} is not a power series in {names} about 0 "
                             f"(its expansion is {_text(series.subs(_EPS, 1))})")
        coefficients = _poly_coefficients(series, order)
    return sympy.Add(*coefficients)


def _poly_coefficients(polynomial, order: int) -> list[sympy.Expr]:
    """Coefficients of eps^0..eps^order, each times its eps-free monomial (eps set to 1)."""
    out = [sympy.Integer(0)] * (order + 1)
    for term in sympy.Add.make_args(polynomial):
        rest, power = term.as_independent(_EPS, as_Add=False)
        exponent = sympy.degree(power, _EPS) if power != 1 else 0
        if exponent <= order:
            out[int(exponent)] += rest
    return out


# ---------------------------------------------------------------------------------------------
# leading term of a mismatch


def leading_term(difference, intervals: dict) -> tuple[sympy.Expr | None, tuple, str | None]:
    """The leading term of `difference` in its symbols, about 0 when 0 lies in a symbol's sampling
    interval, else about the interval's lower end: (term, ((name, centre), ...), note)."""
    symbols = sorted(difference.free_symbols, key=lambda s: s.name)
    if not symbols:
        return None, (), None
    centres = {}
    for s in symbols:
        interval = intervals.get(s) or parameter_interval(s)
        centres[s] = sympy.Integer(0) if interval.lower <= 0 <= interval.upper else interval.lower
    shifted = {s: sympy.Dummy(s.name) for s in symbols}
    scaled = difference.xreplace({s: centres[s] + _EPS * shifted[s] for s in symbols})
    back = {shifted[s]: (s - centres[s]) if centres[s] != 0 else s for s in symbols}
    about = tuple((s.name, centres[s]) for s in symbols)
    term = None
    if scaled.is_rational_function(_EPS):
        numerator, denominator = sympy.fraction(sympy.together(scaled))
        low_n = _lowest(sympy.expand(numerator))
        low_d = _lowest(sympy.expand(denominator))
        if low_n is not None and low_d is not None:
            (a, ca), (b, cb) = low_n, low_d
            term = sympy.factor(sympy.cancel(ca / cb))  # eps^(a - b) set to 1: the shifted symbols carry the degree
    else:
        found = bounded(lambda: _as_leading_term(scaled), 10.0)
        if found is not None and not found.has(sympy.Order) and found != 0:
            term = found.subs(_EPS, 1)
    if term is None:
        return None, about, "no leading term found"
    return term.xreplace(back), about, None


def _as_leading_term(expr):
    try:
        return expr.as_leading_term(_EPS)
    except (NotImplementedError, ValueError, TypeError, ArithmeticError, sympy.PoleError):
        return None  # sympy has no expansion of some function in it


def _lowest(polynomial) -> tuple[int, sympy.Expr] | None:
    """(lowest power of eps, its coefficient) of a polynomial in eps."""
    by_power: dict[int, list] = {}
    for term in sympy.Add.make_args(polynomial):
        rest, power = term.as_independent(_EPS, as_Add=False)
        exponent = int(sympy.degree(power, _EPS)) if power != 1 else 0
        by_power.setdefault(exponent, []).append(rest)
    for exponent in sorted(by_power):
        coefficient = sympy.expand(sympy.Add(*by_power[exponent]))
        if coefficient != 0:
            return exponent, coefficient
    return None
