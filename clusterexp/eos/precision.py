"""Exact numbers at a requested precision for the equation of state: a private mpmath context per
call (the global precision is never touched), exact values carried into it, parameters substituted."""
from __future__ import annotations

from fractions import Fraction
from typing import Mapping

import mpmath
import sympy

from ..errors import InputError

GUARD_DIGITS = 10


def working_context(digits: int) -> mpmath.ctx_mp.MPContext:
    """A fresh mpmath context carrying `digits` plus guard digits (the global mp is left alone)."""
    if isinstance(digits, bool) or not isinstance(digits, int) or not 1 <= digits <= 1000:
        raise InputError(f"digits must be an integer from 1 to 1000, not {digits!r}")
    ctx = mpmath.MPContext()
    ctx.dps = digits + GUARD_DIGITS
    return ctx


def to_mpf(ctx, value) -> object:
    """An exact sympy number (or Fraction/int) as a number of `ctx` at its working precision."""
    if isinstance(value, int):
        return ctx.mpf(value)
    if isinstance(value, Fraction):
        return ctx.mpf(value.numerator) / value.denominator
    value = sympy.sympify(value)
    if value.is_Rational:
        return ctx.mpf(int(value.p)) / int(value.q)
    return ctx.mpf(sympy.N(value, ctx.dps + 5)._mpf_)


def substitute(value: sympy.Expr, parameters: Mapping) -> sympy.Expr:
    return sympy.sympify(value).xreplace(parameters) if parameters else sympy.sympify(value)
