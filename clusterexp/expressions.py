"""Expression subtrees -> sympy, built node by node (user text is never handed to sympify/eval)."""
from __future__ import annotations

from fractions import Fraction
from typing import Callable, Mapping

import lark
import sympy

from .errors import InputError, Span

MAX_EXPONENT = 10000

FUNCTIONS: dict[str, tuple[Callable, int]] = {
    "sqrt": (sympy.sqrt, 1), "exp": (sympy.exp, 1), "log": (sympy.log, 1), "sin": (sympy.sin, 1),
    "cos": (sympy.cos, 1), "tan": (sympy.tan, 1), "abs": (sympy.Abs, 1), "zeta": (sympy.zeta, 1),
    "gamma": (sympy.gamma, 1), "binomial": (sympy.binomial, 2), "factorial": (sympy.factorial, 1),
    "frac": (sympy.frac, 1), "floor": (sympy.floor, 1),
}
CONSTANTS = {"pi": sympy.pi}


class ExpressionBuilder:
    """Turns an expression tree into sympy, resolving names through `symbols`."""

    def __init__(self, symbols: Mapping[str, sympy.Symbol], span_of: Callable[[object], Span]):
        self.symbols = symbols
        self.span_of = span_of

    def build(self, tree) -> sympy.Expr:
        if isinstance(tree, lark.Token):
            raise InputError(f"unexpected {tree!s}", self.span_of(tree))
        method = getattr(self, "_" + tree.data, None)
        if method is None:
            if len(tree.children) == 1:  # "+ x" and parenthesised expressions
                return self.build(tree.children[0])
            raise InputError(f"cannot read expression {tree.data}", self.span_of(tree))
        return method(tree)

    def _number(self, tree):
        text = str(tree.children[0])
        return sympy.Rational(Fraction(text))

    def _name(self, tree):
        token = tree.children[0]
        name = str(token)
        if name in CONSTANTS:
            return CONSTANTS[name]
        if name in self.symbols:
            return self.symbols[name]
        if name in FUNCTIONS:
            raise InputError(f"'{name}' is a function; write {name}(...)", self.span_of(token))
        raise InputError(f"unknown name '{name}'; declare it with `parameter {name}`", self.span_of(token))

    def _call(self, tree):
        token, *args = tree.children
        name = str(token)
        if name not in FUNCTIONS:
            raise InputError(f"unknown function '{name}'", self.span_of(token),
                             hint="known functions: " + ", ".join(sorted(FUNCTIONS)))
        function, arity = FUNCTIONS[name]
        if len(args) != arity:
            raise InputError(f"{name} takes {arity} argument{'s' if arity > 1 else ''}, got {len(args)}",
                             self.span_of(token))
        return function(*(self.build(a) for a in args))

    def _add(self, tree):
        return self.build(tree.children[0]) + self.build(tree.children[1])

    def _sub(self, tree):
        return self.build(tree.children[0]) - self.build(tree.children[1])

    def _mul(self, tree):
        return self.build(tree.children[0]) * self.build(tree.children[1])

    def _div(self, tree):
        denominator = self.build(tree.children[1])
        if denominator == 0:
            raise InputError("division by zero", self.span_of(tree.children[1]))
        return self.build(tree.children[0]) / denominator

    def _neg(self, tree):
        return -self.build(tree.children[0])

    def _pow(self, tree):
        base = self.build(tree.children[0])
        exponent = self.build(tree.children[-1])
        if exponent.is_Number and abs(exponent) > MAX_EXPONENT:
            raise InputError(f"exponent {exponent} is too large (at most {MAX_EXPONENT})",
                             self.span_of(tree.children[-1]))
        if base == 0 and exponent.is_Number and exponent < 0:
            raise InputError("division by zero", self.span_of(tree))
        return base ** exponent
