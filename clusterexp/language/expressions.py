"""Expression subtrees -> sympy, built node by node (user text is never handed to sympify/eval)."""
from __future__ import annotations

import math
import re
from fractions import Fraction
from typing import Callable, Mapping

import lark
import sympy

from ..errors import InputError, Span
from .hints import did_you_mean

MAX_EXPONENT = 10000
MAX_DIGITS = 1000           # digits of any exact number an expression produces
MAX_NESTING = 100           # nested operators and calls (a long chain of + or * counts once)
MAX_FUNCTION_ARGUMENT = 1000  # |n| for factorial, gamma, binomial, zeta: beyond it they explode or hang
GROWING = ("factorial", "gamma", "binomial", "zeta")
_NUMBER = re.compile(r"([0-9]*)(?:\.([0-9]*))?(?:[eE]([-+]?[0-9]+))?")
_LOG10_2 = 0.30103

FUNCTIONS: dict[str, tuple[Callable, int]] = {
    "sqrt": (sympy.sqrt, 1), "exp": (sympy.exp, 1), "log": (sympy.log, 1), "sin": (sympy.sin, 1),
    "cos": (sympy.cos, 1), "tan": (sympy.tan, 1), "abs": (sympy.Abs, 1), "zeta": (sympy.zeta, 1),
    "gamma": (sympy.gamma, 1), "binomial": (sympy.binomial, 2), "factorial": (sympy.factorial, 1),
    "frac": (sympy.frac, 1), "floor": (sympy.floor, 1),
    "O": (lambda x: sympy.Order(x), 1),  # truncation of a series given by the user: O(alpha^3)
    "Mod": (lambda x, p: _periodic(x, p), 2),  # as printed for the periodic pair-phase closed forms
}


def _periodic(x, period):
    from ..exact.periods import PeriodicPart
    return PeriodicPart(x, period)
CONSTANTS = {"pi": sympy.pi}


class ExpressionBuilder:
    """Turns an expression tree into sympy, resolving names through `symbols`."""

    def __init__(self, symbols: Mapping[str, sympy.Symbol], span_of: Callable[[object], Span]):
        self.symbols = symbols
        self.span_of = span_of
        self._depth = 0

    def build(self, tree) -> sympy.Expr:
        if self._depth >= MAX_NESTING:
            raise InputError(f"expression is nested too deeply (at most {MAX_NESTING} levels)", self.span_of(tree))
        outermost = self._depth == 0
        self._depth += 1
        try:
            return self._build(tree)
        except NotImplementedError as error:
            # sympy gives up on some combinations, e.g. abs(x) + O(x^2) (no leading term of abs at 0)
            raise InputError(f"cannot form this expression: {error}"
                             + ("; O(...) needs the other terms to be series in its variable"
                                if "leading_term" in str(error) else ""), self.span_of(tree)) from None
        except RecursionError:
            if not outermost:
                raise
            raise InputError("expression is too deeply nested to evaluate", self.span_of(tree)) from None
        finally:
            self._depth -= 1

    def _build(self, tree) -> sympy.Expr:
        if isinstance(tree, lark.Token):
            raise InputError(f"unexpected {tree!s}", self.span_of(tree))
        method = getattr(self, "_" + tree.data, None)
        if method is None:
            if len(tree.children) == 1:  # "+ x" and parenthesised expressions
                return self.build(tree.children[0])
            raise InputError(f"cannot read expression {tree.data}", self.span_of(tree))
        return method(tree)

    def _number(self, tree):
        token = tree.children[0]
        text = str(token)
        whole, decimals, exponent = _NUMBER.fullmatch(text).groups()
        if not (whole + (decimals or "")).strip("0"):
            return sympy.Integer(0)  # whatever the exponent (Fraction would form 10**exponent first)
        digits = len(whole.lstrip("0")) + len(decimals or "")
        if len(exponent or "") > 8 or digits + abs(int(exponent or 0)) > MAX_DIGITS:
            raise InputError(f"number with too many digits (at most {MAX_DIGITS})", self.span_of(token))
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
        raise InputError(f"unknown name '{name}'; declare it with `parameter {name}`", self.span_of(token),
                         did_you_mean(name, [*self.symbols, *CONSTANTS]))

    def _call(self, tree):
        token, *args = tree.children
        name = str(token)
        if name not in FUNCTIONS:
            raise InputError(f"unknown function '{name}'", self.span_of(token),
                             hint=did_you_mean(name, FUNCTIONS) or "known functions: " + ", ".join(sorted(FUNCTIONS)))
        function, arity = FUNCTIONS[name]
        if len(args) != arity:
            raise InputError(f"{name} takes {arity} argument{'s' if arity > 1 else ''}, got {len(args)}",
                             self.span_of(token))
        values = [self.build(a) for a in args]
        if name in GROWING:
            for arg, value in zip(args, values):
                if value.is_Number and abs(value) > MAX_FUNCTION_ARGUMENT:
                    raise InputError(f"argument of {name} is too large (at most {MAX_FUNCTION_ARGUMENT} in size)",
                                     self.span_of(arg))
        return self._small(function(*values), tree)

    # a chain `x1 + x2 - x3 ...` (or `*`, `/`) is one left-leaning spine: walk it without recursion,
    # so a long sum or product is not mistaken for deep nesting
    def _spine(self, tree, operations: tuple[str, ...]):
        links = []
        while isinstance(tree, lark.Tree) and tree.data in operations:
            links.append((tree.data, tree.children[1]))
            tree = tree.children[0]
        return tree, links[::-1]

    def _add(self, tree):
        head, links = self._spine(tree, ("add", "sub"))
        terms = [self.build(head)]
        for operation, operand in links:
            value = self.build(operand)
            terms.append(value if operation == "add" else -value)
        return self._small(sympy.Add(*terms), tree)

    _sub = _add

    def _mul(self, tree):
        head, links = self._spine(tree, ("mul", "div"))
        result = self.build(head)
        for operation, operand in links:
            value = self.build(operand)
            if operation == "div":
                if value == 0:
                    raise InputError("division by zero", self.span_of(operand))
                value = 1 / value
            result = self._small(result * value, operand)
        return result

    _div = _mul

    def _neg(self, tree):
        sign = 1
        while isinstance(tree, lark.Tree) and tree.data == "neg":
            sign, tree = -sign, tree.children[0]
        value = self.build(tree)
        return value if sign == 1 else -value

    def _pow(self, tree):
        base = self.build(tree.children[0])
        exponent = self.build(tree.children[-1])
        if exponent.is_Number and (abs(exponent) > MAX_EXPONENT or
                                   (exponent.is_Rational and exponent.q > MAX_EXPONENT)):
            raise InputError(f"exponent {_short(exponent)} is too large (at most {MAX_EXPONENT})",
                             self.span_of(tree.children[-1]))
        if base == 0 and exponent.is_Number and exponent < 0:
            raise InputError("division by zero", self.span_of(tree))
        if base.is_Rational and exponent.is_Rational and base != 0:
            digits = float(abs(exponent)) * math.log10(max(abs(base.p), base.q))
            if digits > MAX_DIGITS + 1:
                raise InputError(f"this power has about {int(digits)} digits (at most {MAX_DIGITS})",
                                 self.span_of(tree))
        return self._small(base ** exponent, tree)

    def _small(self, value, node):
        """Refuse exact numbers beyond MAX_DIGITS (they make every later step slow and cannot be
        printed); looks at the value and its top-level numeric factors or terms only."""
        for number in (value, *getattr(value, "args", ())):
            if number.is_Rational and number.is_Number:
                bits = max(abs(number.p).bit_length(), number.q.bit_length())
                if bits * _LOG10_2 > MAX_DIGITS + 1:
                    raise InputError(f"a number in this expression has about {int(bits * _LOG10_2)} digits "
                                     f"(at most {MAX_DIGITS})", self.span_of(node))
        return value


def _short(number) -> str:
    text = str(number)
    return text if len(text) <= 40 else text[:20] + "..." + text[-10:]
