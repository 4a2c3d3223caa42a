"""Sympy-side arithmetic in parameters known only to some order (a flux-tube coverage n known to O(n^2)).

`limits` maps each such symbol to its first unknown power. Keeping values polynomial in these symbols
lets the kernel and the final truncation work on polynomials; the alternative, dividing by the
single-particle factor b_{e_i} = 1 + c n and expanding the resulting rational functions with
`sympy.series` at the end, costs seconds per coefficient already at the fourth order.
"""
from __future__ import annotations

from typing import Mapping

import sympy


def polynomial_limits(limits: Mapping[sympy.Symbol, int], exprs) -> dict:
    """The limits whose symbol enters every expression polynomially. Only for those is dropping
    high powers term by term sound: in n^2/sin(n) = n + ..., a factor not analytic or vanishing at
    n = 0 would move a dropped term below the limit."""
    exprs = [sympy.sympify(e) for e in exprs]
    return {s: k for s, k in limits.items() if all(not e.has(s) or e.is_polynomial(s) for e in exprs)}


def drop_high_powers(expr: sympy.Expr, limits: Mapping[sympy.Symbol, int]) -> sympy.Expr:
    """The expanded expr without its terms at or beyond a limit (expr polynomial in the symbols)."""
    expr = sympy.expand(expr)
    if not limits:
        return expr
    kept = []
    for term in sympy.Add.make_args(expr):
        powers = term.as_powers_dict()
        if all(powers.get(s, 0) < k for s, k in limits.items()):
            kept.append(term)
    return sympy.Add(*kept)


def reciprocal_power(c: sympy.Expr, e: int, limits: Mapping[sympy.Symbol, int]) -> sympy.Expr | None:
    """c^(-e) as a polynomial in the limited symbols, truncated at their limits, when c is a
    polynomial in them with a nonzero constant part; None otherwise (the caller divides exactly).

    >>> n, f = sympy.symbols("n f")
    >>> reciprocal_power(1 - f * n / 2, 2, {n: 2})
    f*n + 1
    """
    symbols = [s for s in limits if c.has(s)]
    if not symbols:
        return c ** (-e)
    c = sympy.expand(c)
    if not all(c.is_polynomial(s) for s in symbols):
        return None
    local = {s: limits[s] for s in symbols}
    c0 = c.subs({s: 0 for s in symbols})
    if c0 == 0:
        return None
    d = drop_high_powers(c / c0 - 1, local)     # no constant part: each power raises some degree
    top = sum(k - 1 for k in local.values())
    result, power = sympy.Integer(1), sympy.Integer(1)
    for j in range(1, top + 1):
        power = drop_high_powers(power * d, local)
        result += sympy.binomial(-e, j) * power
    return drop_high_powers(result * c0 ** (-e), local)
