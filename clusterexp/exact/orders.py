"""The O terms of a given value read as truncation orders: `b[3] = 1/9 - alpha + O(alpha^2)` is known below
alpha^2. Shared by the input checks of the regimes and by the truncation bookkeeping (`expansions`)."""
from __future__ import annotations

import sympy


def split_truncation(value: sympy.Expr) -> tuple[sympy.Expr, dict]:
    """A given value without its O(...) terms, and {symbol: first unknown power} from those terms."""
    value = sympy.sympify(value)
    if not value.has(sympy.Order):
        return value, {}
    limits = {}
    for term in sympy.Add.make_args(value):
        if isinstance(term, sympy.Order):
            base, e = term.expr.as_base_exp()
            if isinstance(base, sympy.Symbol) and e.is_Integer and e > 0:
                limits[base] = min(int(e), limits.get(base, int(e)))
    return value.removeO(), limits


def truncation_problem(value: sympy.Expr) -> str | None:
    """Why the O(...) terms of a given value cannot be read as honest truncation orders, else None.
    Each must be O(p^k) for one parameter p about 0 and k >= 1; sympy would silently swallow the
    known terms into anything else (1 + g + O(1/g) is O(1/g))."""
    value = sympy.sympify(value)
    orders = [t for t in sympy.Add.make_args(value) if isinstance(t, sympy.Order)]
    if not orders and value.has(sympy.Order):
        return "an O(...) term must be added to the known terms, not multiplied or nested"
    for term in orders:
        base, e = term.expr.as_base_exp()
        if not (isinstance(base, sympy.Symbol) and e.is_Integer and e > 0) or term.point[0] != 0:
            return (f"cannot read O({sympy.sstr(term.expr)}) as a truncation order: write O(p^k) with one parameter p "
                    "and k >= 1 (several parameters: O(p^k) + O(q^m))")
    return None
