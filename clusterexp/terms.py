"""Sums of monomials printed without building sympy expressions.

Large results (thousands of terms in symbolic cluster coefficients) cost seconds to convert into sympy
expressions and more to print with sympy's printers. A `TermSum` holds a value as exact rational
coefficients times power products of plain symbols, read straight off the series ring, and prints
itself as text (sympy-parsable) and LaTeX in one linear pass. Whatever does not fit that shape
(sqrt(2), sin(pi*alpha), 1/(1 - g) as atoms, whose relations sympy must restore) is left to sympy.
"""
from __future__ import annotations

from fractions import Fraction
from typing import Mapping

import sympy
from sympy.core.sorting import default_sort_key

Monomial = tuple[tuple[sympy.Symbol, Fraction], ...]


def _power_product(expr: sympy.Expr) -> tuple[Fraction, dict[sympy.Symbol, Fraction]] | None:
    """expr = c * prod s^e with rational c and exponents, symbols s; else None."""
    expr = sympy.sympify(expr)
    coeff = Fraction(1)
    powers: dict[sympy.Symbol, Fraction] = {}
    for factor in sympy.Mul.make_args(expr):
        if factor.is_Rational:
            coeff *= Fraction(int(factor.p), int(factor.q))
            continue
        base, e = factor.as_base_exp()
        if not (isinstance(base, sympy.Symbol) and e.is_Rational):
            return None
        powers[base] = powers.get(base, 0) + (int(e.p) if e.q == 1 else Fraction(int(e.p), int(e.q)))
    return coeff, powers


class TermSum:
    """sum_k c_k prod_s s^(e_ks): exact rationals c_k, rational exponents, symbols s."""

    def __init__(self, terms: Mapping[Monomial, Fraction]):
        cleaned = {m: c for m, c in terms.items() if c != 0}
        bases = sorted({s for m in cleaned for s, _ in m}, key=default_sort_key)
        rank = {s: k for k, s in enumerate(bases)}
        n = len(bases)

        def key(item):
            vector = [0] * n
            for s, e in item[0]:
                vector[rank[s]] = e
            return tuple(-v for v in vector)

        self.terms: list[tuple[Monomial, Fraction]] = sorted(cleaned.items(), key=key)

    @classmethod
    def from_ring(cls, ring, element, factor: sympy.Expr = sympy.Integer(1)) -> "TermSum | None":
        """A ring element over the atoms, times a power-product factor; None if it does not fit."""
        atoms = []
        for a in ring.atoms:  # symbols, or powers of a symbol such as 1/mu
            found = _power_product(a)
            if found is None or found[0] != 1 or len(found[1]) != 1:
                return None
            atoms.append(next(iter(found[1].items())))
        pref = _power_product(factor)
        if pref is None:
            return None
        scale, extra = pref
        order = {s: n for n, s in enumerate(sorted({s for s, _ in atoms} | set(extra), key=default_sort_key))}
        k = ring.nvars
        terms: dict[Monomial, Fraction] = {}
        for monom, num, den in ring.terms(element):
            if any(monom[:k]):
                raise ValueError("a coefficient still carries expansion variables")
            powers = dict(extra)
            for (symbol, unit), e in zip(atoms, monom[k:]):
                if e:
                    powers[symbol] = powers.get(symbol, 0) + unit * int(e)
            key = tuple(sorted(((s, e) for s, e in powers.items() if e != 0), key=lambda p: order[p[0]]))
            c = Fraction(num, den) if scale == 1 else Fraction(num, den) * scale
            terms[key] = terms[key] + c if key in terms else c
        return cls(terms)

    @classmethod
    def from_expr(cls, expr: sympy.Expr) -> "TermSum | None":
        """An expression that is already a flat sum of power products of symbols; else None."""
        expr = sympy.sympify(expr)
        terms: dict[Monomial, Fraction] = {}
        for term in sympy.Add.make_args(expr):
            found = _power_product(term)
            if found is None:
                return None
            coeff, powers = found
            key = tuple(sorted(((s, e) for s, e in powers.items() if e != 0),
                               key=lambda p: default_sort_key(p[0])))
            terms[key] = terms.get(key, 0) + coeff
        return cls(terms)

    def __len__(self) -> int:
        return len(self.terms)

    # -- printing -------------------------------------------------------------------------------------
    def _fractions(self, power):
        """Each term as (negative?, numerator factors, denominator factors); `power(s, |e|)` prints
        one factor and is called once per distinct (symbol, exponent)."""
        printed: dict = {}
        for monomial, c in self.terms:
            up, down = [], []
            for s, e in monomial:
                if (s, e) not in printed:
                    printed[(s, e)] = power(s, abs(e))
                (up if e > 0 else down).append(printed[(s, e)])
            if abs(c.numerator) != 1 or not up:
                up.insert(0, str(abs(c.numerator)))
            if c.denominator != 1:
                down.insert(0, str(c.denominator))
            yield c < 0, up, down

    @staticmethod
    def _join(pieces, head_minus: str) -> str:
        out = []
        for k, (negative, body) in enumerate(pieces):
            out.append((head_minus if negative else "") if k == 0 else (" - " if negative else " + "))
            out.append(body)
        return "".join(out) or "0"

    def text(self) -> str:
        """Plain text that `sympy.sympify` reads back to the same value."""
        pieces = []
        for negative, up, down in self._fractions(_text_power):
            body = "*".join(up)
            if down:
                body += "/" + (down[0] if len(down) == 1 else "(" + "*".join(down) + ")")
            pieces.append((negative, body))
        return self._join(pieces, "-")

    def latex(self, symbol_names: Mapping[sympy.Symbol, str] | None = None) -> str:
        names = dict(symbol_names or {})
        pieces = []
        for negative, up, down in self._fractions(lambda s, e: _latex_power(names.get(s) or sympy.latex(s), e)):
            body = " ".join(up)
            if down:
                body = rf"\frac{{{body}}}{{{' '.join(down)}}}"
            pieces.append((negative, body))
        return self._join(pieces, "- ")


HALF = Fraction(1, 2)


def _text_power(s: sympy.Symbol, e: Fraction) -> str:
    if e == 1:
        return s.name
    if e == HALF:
        return f"sqrt({s.name})"
    if e.denominator == 1:
        return f"{s.name}**{e.numerator}"
    return f"{s.name}**({e.numerator}/{e.denominator})"


def _latex_power(base: str, e: Fraction) -> str:
    if e == 1:
        return base
    if e == HALF:
        return rf"\sqrt{{{base}}}"
    if "_" in base or "^" in base:  # b_{A^{2}}^{2} would read ambiguously
        base = rf"\left({base}\right)"
    if e.denominator == 1:
        return f"{base}^{{{e.numerator}}}"
    return rf"{base}^{{\frac{{{e.numerator}}}{{{e.denominator}}}}}"


def text_of(value: sympy.Expr, terms: "TermSum | None" = None) -> str:
    """Text of a value: through its TermSum when there is one, else sympy's printer."""
    terms = terms if terms is not None else TermSum.from_expr(value)
    return terms.text() if terms is not None else sympy.sstr(value, order="lex")


def latex_of(value, terms: "TermSum | None" = None, symbol_names=None) -> str:
    terms = terms if terms is not None else TermSum.from_expr(value)
    if terms is not None:
        return terms.latex(symbol_names)
    return sympy.latex(value, symbol_names=symbol_names or {}, order="lex")
