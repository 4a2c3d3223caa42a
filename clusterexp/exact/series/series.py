"""Truncated power series in K variables with exact coefficients.

A `Series` is stored as its homogeneous parts: `parts[m]` is the degree-m part in the K expansion
variables, an exact sparse polynomial of a `PolynomialRing` (which may also carry parameter atoms).
The series knows its order: it is exact through total degree `order` and says `+ O(order + 1)`.
Products form only the parts they keep, (ST)_m = sum_{a+b=m} S_a T_b, so nothing above the order is
ever computed. Combining two series keeps the smaller order.
"""
from __future__ import annotations

from fractions import Fraction
from itertools import combinations_with_replacement
from typing import Callable, Iterator, Mapping, Sequence

import sympy

from ...errors import SeriesError
from .ring import PolynomialRing

Index = tuple[int, ...]


def multi_indices(nvars: int, total: int) -> Iterator[Index]:
    """All exponent tuples of length nvars with the given total degree, in descending lex order.

    Iterative (a recursion had one frame per variable: 1000 species overflowed the stack): the
    multisets of `total` variable positions, in lexicographic order, are the exponent tuples in
    descending lexicographic order."""
    for positions in combinations_with_replacement(range(nvars), total):
        exponents = [0] * nvars
        for i in positions:
            exponents[i] += 1
        yield tuple(exponents)


def indices_up_to(nvars: int, order: int, start: int = 1) -> list[Index]:
    """Every multi-index with start <= |n| <= order, by total degree, then descending lex."""
    return [n for m in range(start, order + 1) for n in multi_indices(nvars, m)]


class Series:
    """A truncated multivariate power series; immutable by convention (operations return new ones)."""

    __slots__ = ("ring", "order", "parts")

    def __init__(self, ring: PolynomialRing, order: int, parts: Sequence | None = None):
        if order < 0:
            raise ValueError("order must be >= 0")
        self.ring = ring
        self.order = order
        parts = list(parts or [])[: order + 1]
        parts += [ring.zero] * (order + 1 - len(parts))
        self.parts = parts

    # -- construction -------------------------------------------------------------------------------
    @classmethod
    def from_coefficients(cls, ring: PolynomialRing, order: int,
                          coefficients: Mapping[Index, object]) -> "Series":
        """From {multi-index: coefficient}; a coefficient is a rational, a sympy expression in the
        ring's atoms, or already a ring element over the atoms."""
        parts = [ring.zero] * (order + 1)
        for index, value in coefficients.items():
            m = sum(index)
            if m > order:
                continue
            monomial = ring.one
            for i, e in enumerate(index):
                if e:
                    monomial = monomial * ring.var(i) ** e
            parts[m] = parts[m] + _as_element(ring, value) * monomial
        return cls(ring, order, parts)

    @classmethod
    def variable(cls, ring: PolynomialRing, order: int, i: int) -> "Series":
        return cls(ring, order, [ring.zero, ring.var(i)])

    @classmethod
    def constant(cls, ring: PolynomialRing, order: int, value=1) -> "Series":
        return cls(ring, order, [_as_element(ring, value)])

    # -- inspection ---------------------------------------------------------------------------------
    @property
    def nvars(self) -> int:
        return self.ring.nvars

    def coefficient(self, index: Index):
        """The coefficient of x^index as a ring element over the atoms."""
        m = sum(index)
        if m > self.order:
            raise SeriesError(f"coefficient of total degree {m} is beyond this series' order {self.order}")
        return self.ring.split_by_variables(self.parts[m]).get(tuple(index), self.ring.zero)

    def coefficients(self) -> dict[Index, object]:
        """All nonzero coefficients, {multi-index: ring element over the atoms}."""
        out: dict[Index, object] = {}
        for part in self.parts:
            out.update(self.ring.split_by_variables(part))
        return out

    def to_expr(self, variables: Sequence) -> sympy.Expr:
        return sympy.Add(*(self.ring.to_expr(p, variables) for p in self.parts))

    def __repr__(self) -> str:
        names = [f"x{i}" for i in range(self.nvars)]
        return f"Series({self.to_expr(names)} + O({self.order + 1}))"

    # -- arithmetic ---------------------------------------------------------------------------------
    def _check(self, other: "Series") -> None:
        if other.ring is not self.ring:
            raise SeriesError("series over different coefficient rings cannot be combined")

    def __add__(self, other: "Series") -> "Series":
        self._check(other)
        n = min(self.order, other.order)
        return Series(self.ring, n, [self.parts[m] + other.parts[m] for m in range(n + 1)])

    def __sub__(self, other: "Series") -> "Series":
        self._check(other)
        n = min(self.order, other.order)
        return Series(self.ring, n, [self.parts[m] - other.parts[m] for m in range(n + 1)])

    def __neg__(self) -> "Series":
        return Series(self.ring, self.order, [-p for p in self.parts])

    def scale(self, factor) -> "Series":
        """Multiply by a scalar: rational, sympy expression in the atoms, or ring element."""
        f = _as_element(self.ring, factor)
        return Series(self.ring, self.order, [p * f for p in self.parts])

    def __mul__(self, other: "Series") -> "Series":
        self._check(other)
        n = min(self.order, other.order)
        a, b = self.parts, other.parts
        parts = []
        for m in range(n + 1):
            acc = self.ring.zero
            for k in range(m + 1):
                if not (self.ring.is_zero(a[k]) or self.ring.is_zero(b[m - k])):
                    acc = acc + a[k] * b[m - k]
            parts.append(acc)
        return Series(self.ring, n, parts)

    def truncate(self, order: int) -> "Series":
        return Series(self.ring, min(order, self.order), self.parts[: order + 1])

    def euler(self, i: int) -> "Series":
        """x_i d/dx_i, e.g. the density rho_i = z_i d/dz_i of the pressure series."""
        return Series(self.ring, self.order, [self.ring.euler(p, i) for p in self.parts])

    def shift_down(self, i: int) -> "Series":
        """Divide by x_i; every term must contain x_i. The order drops by one."""
        parts = []
        for part in self.parts[1:]:
            terms = {}
            for monom, num, den in self.ring.terms(part):
                if monom[i] == 0:
                    raise SeriesError(f"series is not divisible by variable {i}")
                lowered = list(monom)
                lowered[i] -= 1
                terms[tuple(lowered)] = Fraction(num, den)
            parts.append(self.ring.from_terms(terms))
        if not self.ring.is_zero(self.parts[0]):
            raise SeriesError(f"series is not divisible by variable {i}")
        return Series(self.ring, self.order - 1, parts)

    # -- transcendental functions (recurrences from the Euler operator E = sum_i x_i d/dx_i) --------
    def _unit_constant(self, what: str) -> None:
        if self.parts[0] != self.ring.one:
            raise SeriesError(f"{what} needs a series with constant term 1 (got another constant term); "
                              "divide out the constant first")

    def log(self) -> "Series":
        """log S for S = 1 + ...: from S * E(log S) = E S, i.e. m L_m = m S_m - sum_k k L_k S_{m-k}."""
        self._unit_constant("log")
        s, R = self.parts, self.ring
        logs = [R.zero]
        for m in range(1, self.order + 1):
            acc = s[m] * R.rational(m)
            for k in range(1, m):
                if not (R.is_zero(logs[k]) or R.is_zero(s[m - k])):
                    acc = acc - logs[k] * s[m - k] * R.rational(k)
            logs.append(acc * R.rational(Fraction(1, m)))
        return Series(R, self.order, logs)

    def exp(self) -> "Series":
        """exp L for L without constant term: m E_m = sum_{k=1}^m k L_k E_{m-k}."""
        if not self.ring.is_zero(self.parts[0]):
            raise SeriesError("exp needs a series without constant term (exp of a constant is not exact)")
        l, R = self.parts, self.ring
        out = [R.one]
        for m in range(1, self.order + 1):
            acc = R.zero
            for k in range(1, m + 1):
                if not (R.is_zero(l[k]) or R.is_zero(out[m - k])):
                    acc = acc + l[k] * out[m - k] * R.rational(k)
            out.append(acc * R.rational(Fraction(1, m)))
        return Series(R, self.order, out)

    def power(self, exponent) -> "Series":
        """S**s for S = 1 + ... and any exponent s (rational, or a sympy expression in the atoms):
        from S * E(P) = s P * E(S): m P_m = sum_{k=1}^m (s k - (m - k)) S_k P_{m-k}."""
        self._unit_constant("power")
        R, s = self.ring, self.parts
        e = _as_element(R, exponent)
        out = [R.one]
        for m in range(1, self.order + 1):
            acc = R.zero
            for k in range(1, m + 1):
                if not (R.is_zero(s[k]) or R.is_zero(out[m - k])):
                    acc = acc + s[k] * out[m - k] * (e * R.rational(k) - R.rational(m - k))
            out.append(acc * R.rational(Fraction(1, m)))
        return Series(R, self.order, out)

    def inverse(self) -> "Series":
        """1/S for S with constant term 1."""
        return self.power(-1)

    def compose(self, inner: Sequence["Series"]) -> "Series":
        """S(T_1, ..., T_K) for series T_i without constant term, all over the same ring."""
        if len(inner) != self.nvars:
            raise SeriesError(f"compose needs {self.nvars} inner series, got {len(inner)}")
        for t in inner:
            self._check(t)
            if not self.ring.is_zero(t.parts[0]):
                raise SeriesError("compose needs inner series without constant term")
        n = min([self.order] + [t.order for t in inner])
        table = PowerTable(self.ring, [t.parts for t in inner], n)
        coefficients = self.truncate(n).coefficients()
        closed = _close_under_chain(sorted(c for c in coefficients if sum(c) >= 2))
        out = [coefficients.get((0,) * self.nvars, self.ring.zero)]
        ordered = _by_total(coefficients)
        for m in range(1, n + 1):
            table.extend(m, [c for c in closed if sum(c) <= m])
            out.append(_combine(self.ring, ordered, table, m))
        return Series(self.ring, n, out)


class PowerTable:
    """Homogeneous parts [w^n]_m of the powers of K series w_i = x_i-free-constant series, built
    order by order and each piece once: w^n = w^{n - e_j} * w_j with j the last nonzero entry.

    `parts[i]` must have parts[i][0] == 0. The table can grow while the w_i are still being solved
    for: `extend(m)` needs the parts of the w_i up to degree m - 1 only (for |n| >= 2), plus degree m
    for |n| = 1 when asked.
    """

    def __init__(self, ring: PolynomialRing, parts: Sequence[list], order: int):
        self.ring = ring
        self.w = parts
        self.order = order
        self._table: dict[Index, list] = {}
        self._chain: dict[Index, tuple[int, Index, int]] = {}

    def _entry(self, index: Index) -> list:
        entry = self._table.get(index)
        if entry is None:
            entry = []  # entry[k] is the part of degree |n| + k
            self._table[index] = entry
        return entry

    def part(self, index: Index, m: int, total: int | None = None):
        if total is None:
            total = sum(index)
        if m < total:
            return self.ring.zero
        if total == 1:
            return self.w[index.index(1)][m]
        return self._table[index][m - total] if index in self._table else self.ring.zero

    def extend(self, m: int, indices: Sequence[Index] | None = None) -> None:
        """Compute [w^n]_m for every n with 2 <= |n| <= m (or the given indices, which must be
        closed under the chain n -> n - e_j), in order of increasing |n|."""
        if indices is None:
            indices = [n for t in range(2, m + 1) for n in multi_indices(self.ring.nvars, t)]
        R = self.ring
        is_zero = R.is_zero
        table = self._table
        for index in indices:
            total = sum(index)
            if total < 2 or total > m:
                continue
            chain = self._chain.get(index)
            if chain is None:
                j = max(i for i, e in enumerate(index) if e)
                lower = list(index)
                lower[j] -= 1
                chain = self._chain[index] = (j, tuple(lower), total - 1)
            j, lower, lower_total = chain
            wj = self.w[j]
            if lower_total == 1:
                left_parts = self.w[lower.index(1)]
                offset = 0
            else:
                left_parts = table.get(lower)
                offset = lower_total
            acc = R.zero
            if left_parts is not None:
                # [w^n]_m = sum_k [w^{n-e_j}]_{m-k} [w_j]_k, k = 1 .. m - |n| + 1
                for k in range(1, m - total + 2):
                    piece = wj[k]
                    left = left_parts[m - k - offset]
                    if not (is_zero(piece) or is_zero(left)):
                        acc = acc + left * piece
            entry = table.get(index)
            if entry is None:
                entry = table[index] = []  # entry[k] is the part of degree |n| + k
            if len(entry) != m - total:
                raise AssertionError("PowerTable.extend called out of order")
            entry.append(acc)


def revert(series: Sequence[Series], also: Sequence[Series] = ()) -> tuple[list[Series], list[Series]]:
    """Series reversion: given f_i(w) = w_i + (degree >= 2), return w_i(x) with f(w(x)) = x, and
    the series in `also` evaluated at w(x) (sharing the same powers of w).

    Solved order by order from w_i = x_i - g_i(w), g_i = f_i - w_i; the degree-m part of the right
    side needs the w's to degree m - 1 only, so every piece of every power w^n is formed once.
    """
    ring = series[0].ring
    order = min([s.order for s in series] + [h.order for h in also])
    for i, s in enumerate(series):
        s._check(series[0])
        if not ring.is_zero(s.parts[0]) or s.parts[1] != ring.var(i):
            raise SeriesError("revert needs f_i = x_i + higher-order terms (unit linear part); "
                              "rescale the variables first")
    for h in also:
        h._check(series[0])
    g = [_higher_terms(s.truncate(order)) for s in series]
    extra = [h.truncate(order).coefficients() for h in also]
    return revert_coefficients(ring, order, g, extra)


def revert_coefficients(ring: PolynomialRing, order: int, g: Sequence[Mapping[Index, object]],
                        extra: Sequence[Mapping[Index, object]] = ()) -> tuple[list[Series], list[Series]]:
    """The core of `revert`, on coefficient tables: w_i = x_i - sum_n g_i[n] w^n (all |n| >= 2),
    plus sum_n h[n] w^n for each table h in `extra`. Coefficients are ring elements or scalars."""
    K = ring.nvars
    needed = {n for c in g for n in c} | {n for c in extra for n in c if sum(n) >= 2}
    closed = _close_under_chain(sorted(needed))
    g = [_by_total(c) for c in g]
    composed = [[c.get((0,) * K, ring.zero)] for c in extra]
    extra = [_by_total(c) for c in extra]
    w = [[ring.zero, ring.var(i)] for i in range(K)]
    table = PowerTable(ring, w, order)
    for m in range(1, order + 1):
        if m >= 2:
            table.extend(m, [n for n in closed if sum(n) <= m])
            for i in range(K):
                w[i].append(-_combine(ring, g[i], table, m))
        for c, out in zip(extra, composed):
            out.append(_combine(ring, c, table, m))
    return ([Series(ring, order, w[i]) for i in range(K)],
            [Series(ring, order, out) for out in composed])


def _higher_terms(s: Series) -> dict[Index, object]:
    return {n: c for n, c in s.coefficients().items() if sum(n) >= 2}


def _combine(ring: PolynomialRing, coefficients: Sequence[tuple[Index, int, object]],
             table: PowerTable, m: int):
    """Degree-m part of sum_n c_n w^n over (n, |n|, c_n) sorted by |n| (constant term excluded)."""
    is_zero = ring.is_zero
    terms = []
    for index, total, c in coefficients:
        if total > m:
            break
        if total:
            piece = table.part(index, m, total)
            if not is_zero(piece):
                terms.append(c * piece)
    return balanced_sum(ring, terms[::-1])


def balanced_sum(ring: PolynomialRing, terms: list):
    """Sum of many polynomials by pairs: adding a small piece to a large accumulator costs the
    accumulator's size, so a running sum is quadratic where the pairwise tree is not."""
    if not terms:
        return ring.zero
    while len(terms) > 1:
        paired = [terms[k] + terms[k + 1] for k in range(0, len(terms) - 1, 2)]
        if len(terms) % 2:
            paired.append(terms[-1])
        terms = paired
    return terms[0]


def _by_total(coefficients: Mapping[Index, object]) -> list[tuple[Index, int, object]]:
    return sorted(((n, sum(n), c) for n, c in coefficients.items()), key=lambda t: t[1])


def _close_under_chain(indices: Sequence[Index]) -> list[Index]:
    """Add every n - e_j (j the last nonzero entry) needed to build the given powers."""
    seen = set()
    stack = list(indices)
    while stack:
        n = stack.pop()
        if n in seen or sum(n) < 2:
            continue
        seen.add(n)
        j = max(i for i, e in enumerate(n) if e)
        lower = list(n)
        lower[j] -= 1
        stack.append(tuple(lower))
    return sorted(seen, key=lambda n: (sum(n), tuple(-e for e in n)))


def _as_element(ring: PolynomialRing, value):
    if isinstance(value, (int, Fraction)):
        return ring.constant(value)
    if isinstance(value, sympy.Basic):
        return ring.from_expr(value)
    return value  # assumed to be a ring element already
