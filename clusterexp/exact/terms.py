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
        pref = _power_product(factor)
        reader = _AtomReader.of(ring, pref[1] if pref is not None else None)
        if reader is None:
            return None
        rows = list(ring.sparse_terms(element))
        if any(j < ring.nvars for powers, _, _ in rows for j, _ in powers):
            raise ValueError("a coefficient still carries expansion variables")
        return reader.term_sum(rows, pref[0])

    @classmethod
    def _presorted(cls, terms: list[tuple[Monomial, Fraction]]) -> "TermSum":
        out = cls.__new__(cls)
        out.terms = terms
        return out

    @classmethod
    def split_ring_part(cls, ring, part) -> "dict[tuple[int, ...], TermSum] | None":
        """Every coefficient of a homogeneous part (a ring element in the expansion variables), keyed by
        its multi-index, in one pass over the part's terms; None unless every atom is a power of one
        symbol. Same terms, same order as `from_ring` on each coefficient (tests compare); it skips
        splitting the part into ring elements and reading each back, which cost more than the kernel."""
        reader = _AtomReader.of(ring)
        if reader is None:
            return None
        k = ring.nvars
        groups: dict[tuple[int, ...], list] = {}
        for powers, num, den in ring.sparse_terms(part):
            split = 0
            while split < len(powers) and powers[split][0] < k:
                split += 1
            key = [0] * k
            for j, e in powers[:split]:
                key[j] = e
            key = tuple(key)
            found = groups.get(key)
            if found is None:
                found = groups[key] = []
            found.append((powers[split:], num, den))
        return {key: reader.term_sum(rows) for key, rows in groups.items()}

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

    def latex_terms(self, symbol_names: Mapping[sympy.Symbol, str] | None = None) -> list[str]:
        """The printed terms with their signs, ["a", "+ b", "- c"] (what `latex_lines.top_level_terms`
        reads off the joined text, without scanning it)."""
        names = dict(symbol_names or {})
        out = []
        for negative, up, down in self._fractions(lambda s, e: _latex_power(names.get(s) or sympy.latex(s), e)):
            body = " ".join(up)
            if down:
                body = rf"\frac{{{body}}}{{{' '.join(down)}}}"
            out.append(("- " if negative else "") + body if not out else ("- " if negative else "+ ") + body)
        return out or ["0"]

    def latex(self, symbol_names: Mapping[sympy.Symbol, str] | None = None) -> str:
        return " ".join(self.latex_terms(symbol_names))


class _AtomReader:
    """Turns sparse ring terms over the atoms into TermSum monomials: each atom is a power of one symbol
    (s, or 1/mu, sqrt(mu)); powers of one symbol from several atoms are added."""

    def __init__(self, nvars: int, atoms: list[tuple[sympy.Symbol, Fraction]], extra: Mapping):
        symbols = sorted({s for s, _ in atoms} | set(extra), key=default_sort_key)
        rank = {s: n for n, s in enumerate(symbols)}
        # generator j of the ring (j >= nvars) -> (rank of its symbol, symbol, exponent per unit power)
        self.atoms = {nvars + j: (rank[s], s, unit) for j, (s, unit) in enumerate(atoms)}
        self.extra = sorted((rank[s], s, e) for s, e in extra.items())
        # distinct: one atom per symbol, so nothing to merge; monotone: ranks follow the generators
        self.distinct = not extra and len(rank) == len(atoms)
        ranks = [rank[s] for s, _ in atoms]
        self.monotone = ranks == sorted(ranks)
        self._factors: dict = {}   # (generator, exponent) -> (rank, key element, monomial factor)

    @classmethod
    def of(cls, ring, extra: Mapping | None = {}) -> "_AtomReader | None":
        if extra is None:
            return None
        atoms = []
        for a in ring.atoms:
            found = _power_product(a)
            if found is None or found[0] != 1 or len(found[1]) != 1:
                return None
            atoms.append(next(iter(found[1].items())))
        return cls(ring.nvars, atoms, extra)

    def term_sum(self, rows, scale: Fraction = Fraction(1)) -> "TermSum":
        """rows: (sparse atom powers by generator, numerator, denominator), each times scale * extra."""
        if self.distinct:
            return self._distinct_term_sum(rows, scale)
        atoms = self.atoms
        terms: dict[Monomial, Fraction] = {}
        ranked_of: dict[Monomial, list] = {}
        for powers, num, den in rows:
            ranked = sorted(self.extra + [(atoms[j][0], atoms[j][1], atoms[j][2] * e) for j, e in powers], key=_first)
            merged: list = []
            for item in ranked:    # equal ranks are adjacent: one symbol from several atoms
                if merged and merged[-1][0] == item[0]:
                    merged[-1] = (item[0], item[1], merged[-1][2] + item[2])
                else:
                    merged.append(item)
            ranked = [item for item in merged if item[2] != 0]
            monomial = tuple([(s, e) for _, s, e in ranked])
            c = Fraction(num, den) if scale == 1 else Fraction(num, den) * scale
            if monomial in terms:
                terms[monomial] += c
            else:
                terms[monomial] = c
                ranked_of[monomial] = ranked

        def key(monomial):
            return _descending(ranked_of[monomial])
        return TermSum._presorted([(m, terms[m]) for m in sorted(terms, key=key) if terms[m] != 0])

    def _distinct_term_sum(self, rows, scale: Fraction) -> "TermSum":
        """One atom per symbol: distinct ring terms are distinct monomials, nothing to merge or to
        look up (hashing sympy symbols costs more than the rest). Each (generator, exponent) pair is
        translated once: (rank, its key element, its monomial factor)."""
        factor = self._factors
        entries = []
        for powers, num, den in rows:
            try:
                ranked = [factor[p] for p in powers]
            except KeyError:
                ranked = [self._factor(p) for p in powers]
            if not self.monotone:
                ranked.sort(key=_first)
            if num:
                entries.append((tuple([r[1] for r in ranked]) + _ENDED, tuple([r[2] for r in ranked]),
                                Fraction(num, den) if scale == 1 else Fraction(num, den) * scale))
        entries.sort(key=_first)
        return TermSum._presorted([(monomial, c) for _, monomial, c in entries])

    def _factor(self, pair):
        found = self._factors.get(pair)
        if found is None:
            j, e = pair
            r, symbol, unit = self.atoms[j]
            e = unit * e
            found = self._factors[pair] = (r, _descending([(r, symbol, e)])[0], (symbol, e))
        return found


def _descending(ranked) -> tuple:
    """A key that sorts exponent vectors (zero where a symbol is absent) in descending lex order, read
    off the sparse (rank, symbol, exponent) list: compared position by position, a positive exponent
    at a lower rank comes first, then a vector that has ended (zeros), then negative exponents, the one
    at the higher rank first. Same order as `TermSum`'s dense key (tests compare)."""
    return tuple([(0, r, -e) if e > 0 else (2, -r, -e) for r, _, e in ranked]) + _ENDED


_ENDED = ((1, 0, 0),)


def _first(item):
    return item[0]


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
