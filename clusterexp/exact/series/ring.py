"""Exact coefficient rings for the series kernel.

A `PolynomialRing` is a sparse polynomial ring over the rationals whose first `nvars` generators are
the expansion variables (fugacities or densities) and whose remaining generators are *atoms*: declared
parameters, symbolic coefficients such as b_{2,1}, and any other sympy subexpression that is not a
polynomial in those (sqrt(2), zeta(3), sin(pi*alpha), 1/(1 - g), ...). Every polynomial identity in free
atoms stays true under any substitution, so the kernel is exact whatever the atoms stand for; relations
between atoms (sqrt(2)**2 = 2) are restored by sympy when results are converted back at the edge.

Two interchangeable backends: python-flint's `fmpq_mpoly` (fast, preferred) and sympy's own sparse
`PolyRing` over QQ (the fallback when python-flint is absent or `CLUSTEREXP_BACKEND=sympy` is set).
"""
from __future__ import annotations

import os
from fractions import Fraction
from functools import cached_property
from typing import Iterable, Mapping, Sequence

import sympy
from sympy.core.sorting import default_sort_key

try:  # python-flint is optional
    import flint as _flint
except ImportError:  # pragma: no cover - exercised in the fallback CI leg
    _flint = None


def available_backends() -> tuple[str, ...]:
    return ("flint", "sympy") if _flint is not None else ("sympy",)


def default_backend() -> str:
    wanted = os.environ.get("CLUSTEREXP_BACKEND", "").strip().lower()
    if wanted:
        if wanted not in available_backends():
            raise RuntimeError(f"CLUSTEREXP_BACKEND={wanted!r} is not available here; "
                               f"available: {', '.join(available_backends())}")
        return wanted
    return available_backends()[0]


class PolynomialRing:
    """Q[x_1..x_K, atoms]; elements are backend polynomials, manipulated with + - * directly.

    >>> import sympy
    >>> g = sympy.Symbol("g")
    >>> R = PolynomialRing(2, [g], backend="sympy")
    >>> R.to_expr(R.from_expr(g**2 / 3) * R.var(0), ["x", "y"])
    g**2*x/3
    """

    def __init__(self, nvars: int, atoms: Iterable[sympy.Expr] = (), backend: str | None = None,
                 var_names: Sequence[str] | None = None):
        self.nvars = nvars
        self.atoms: tuple[sympy.Expr, ...] = tuple(sorted(set(atoms), key=default_sort_key))
        self.backend = backend or default_backend()
        self.var_names = tuple(var_names) if var_names else tuple(f"x{i}" for i in range(nvars))
        names = list(self.var_names) + [f"t{k}" for k in range(len(self.atoms))]
        if not names:
            names = ["_unused"]
        self._ngens = len(names)
        if self.backend == "flint":
            self._ctx = _flint.fmpq_mpoly_ctx.get(tuple(names), "lex")  # lex: 1.4x faster products than deglex (benchmarks/last-run.txt)
            self._gens = self._ctx.gens()
            self._rational = _flint.fmpq
            self.zero = self._ctx.from_dict({})
            self.one = self._ctx.from_dict({(0,) * self._ngens: 1})
        elif self.backend == "sympy":
            from sympy.polys.domains import QQ
            from sympy.polys.rings import PolyRing
            self._ctx = PolyRing(names, QQ)
            self._gens = self._ctx.gens
            self._rational = QQ
            self.zero = self._ctx.zero
            self.one = self._ctx.one
        else:
            raise ValueError(f"unknown backend {self.backend!r}")
        self._atom_index = {a: k for k, a in enumerate(self.atoms)}

    # -- construction -------------------------------------------------------------------------------
    def rational(self, value) -> object:
        """An exact rational scalar of the backend (accepts int, Fraction, sympy Rational)."""
        if isinstance(value, sympy.Rational):
            return self._rational(int(value.p), int(value.q))
        if isinstance(value, Fraction):
            return self._rational(value.numerator, value.denominator)
        return self._rational(int(value), 1)

    def var(self, i: int):
        return self._gens[i]

    def atom(self, a: sympy.Expr):
        return self._gens[self.nvars + self._atom_index[a]]

    def constant(self, value):
        return self.one * self.rational(value)

    def from_terms(self, terms: Mapping[tuple[int, ...], object]):
        """Build from {full exponent tuple: rational}."""
        data = {k: self.rational(v) for k, v in terms.items() if v != 0}
        if self.backend == "flint":
            return self._ctx.from_dict(data)
        return self._ctx.from_dict(data) if data else self._ctx.zero

    def scalar_or_element(self, expr):
        """A backend rational scalar when expr is a rational number (cheaper to multiply by),
        else the ring element of expr over the atoms."""
        expr = sympy.sympify(expr)
        return self.rational(expr) if expr.is_Rational else self.from_expr(expr)

    def from_expr(self, expr) -> object:
        """A sympy expression free of the expansion variables, as a ring element over the atoms."""
        expr = sympy.sympify(expr)
        if expr.is_Rational:
            return self.constant(expr)
        nv, index = self.nvars, self._atom_index
        data: dict[tuple[int, ...], Fraction] = {}
        for coeff, powers in monomials(expr):
            exponents = [0] * self._ngens
            for base, e in powers:
                if base not in index:
                    raise KeyError(f"{base} is not an atom of this ring")
                exponents[nv + index[base]] += e
            key = tuple(exponents)
            data[key] = data.get(key, 0) + coeff
        return self.from_terms(data)

    # -- inspection ---------------------------------------------------------------------------------
    def terms(self, p) -> Iterable[tuple[tuple[int, ...], int, int]]:
        """(exponents, numerator, denominator) of every term of p."""
        items = p.to_dict().items() if self.backend == "flint" else p.items()
        for monom, c in items:
            if self.backend == "flint":
                yield monom, int(c.p), int(c.q)
            else:
                yield monom, int(c.numerator), int(c.denominator)

    def sparse_terms(self, p) -> Iterable[tuple[tuple[tuple[int, int], ...], int, int]]:
        """(((generator, exponent) for the nonzero exponents, by generator), numerator, denominator)
        of every term of p. With many atoms (a fully symbolic b has dozens) this is several times
        cheaper than `terms`: python-flint's printer runs in C, where `to_dict` builds one Python
        integer per generator and term. The printed form is checked against `to_dict` once per ring."""
        if self.backend == "flint" and self._printed_form_readable:
            yield from _read_printed(str(p), self._gen_position)
            return
        for monom, num, den in self.terms(p):
            yield tuple((j, int(e)) for j, e in enumerate(monom) if e), num, den

    @cached_property
    def _gen_position(self) -> dict[str, int]:
        return {str(g): j for j, g in enumerate(self._gens)}

    @cached_property
    def _printed_form_readable(self) -> bool:
        gens = self._gens
        probe = (gens[0] ** 3 * self.rational(Fraction(-7, 12)) + gens[-1] * 2 - self.one * self.rational(Fraction(5, 3))
                 + gens[0] * gens[-1] ** 2 + gens[-1] ** 11 * self.rational(Fraction(-1, 1)))
        try:
            read = {m: (n, d) for m, n, d in _read_printed(str(probe), self._gen_position)}
        except (ValueError, KeyError, IndexError):
            return False
        wanted = {tuple((j, int(e)) for j, e in enumerate(monom) if e): (n, d) for monom, n, d in self.terms(probe)}
        return read == wanted

    def is_zero(self, p) -> bool:
        return p.is_zero() if self.backend == "flint" else not p

    def drop_powers(self, p, limits: Mapping[sympy.Expr, int]):
        """p without every term in which some atom a of `limits` has a power of limits[a] or more
        (truncation in parameters that are known only to some order, e.g. a flux-tube coverage)."""
        positions = [(self.nvars + self._atom_index[a], k) for a, k in limits.items() if a in self._atom_index]
        if not positions:
            return p
        items = p.to_dict() if self.backend == "flint" else p
        kept = {m: c for m, c in items.items() if all(m[j] < k for j, k in positions)}
        if len(kept) == len(items):
            return p
        return self._ctx.from_dict(kept) if kept or self.backend == "flint" else self._ctx.zero

    def derivative(self, p, i: int):
        """d/dx_i of p."""
        if self.backend == "flint":
            return p.derivative(i)
        return p.diff(self._gens[i])

    def euler(self, p, i: int):
        """x_i d/dx_i applied to p (multiplies each term by its exponent of x_i)."""
        if self.backend == "flint":
            return p.derivative(i) * self._gens[i]
        return p.diff(self._gens[i]) * self._gens[i]

    @cached_property
    def _atom_exprs(self) -> tuple[sympy.Expr, ...]:
        return self.atoms

    def to_expr(self, p, variables: Sequence[sympy.Expr] | None = None) -> sympy.Expr:
        """Convert back to a sympy expression; the expansion variables become `variables` (when
        omitted, p must be free of them, as coefficients are)."""
        k = self.nvars
        if variables is None:
            names = None
        else:
            names = [sympy.Symbol(v) if isinstance(v, str) else v for v in variables]
        atoms = self._atom_exprs
        out = []
        for monom, num, den in self.terms(p):
            factors = [sympy.Rational(num, den)]
            if names is None:
                if any(monom[:k]):
                    raise ValueError("polynomial uses expansion variables but none were given")
            else:
                factors += [g if e == 1 else sympy.Pow(g, e) for g, e in zip(names, monom[:k]) if e]
            factors += [g if e == 1 else sympy.Pow(g, e) for g, e in zip(atoms, monom[k:]) if e]
            out.append(sympy.Mul(*factors))
        return sympy.Add(*out)

    def split_by_variables(self, p) -> dict[tuple[int, ...], object]:
        """{exponents of the expansion variables: coefficient (a ring element over the atoms only)}.
        The backend's own coefficient objects go straight back in (no round trip through Python
        fractions, which cost more than the grouping itself)."""
        k = self.nvars
        grouped: dict[tuple[int, ...], dict] = {}
        lowered = (0,) * k
        for monom, c in (p.to_dict() if self.backend == "flint" else p).items():
            key = monom[:k]
            found = grouped.get(key)
            if found is None:
                found = grouped[key] = {}
            found[lowered + monom[k:]] = c
        return {key: self._ctx.from_dict(t) for key, t in grouped.items()}


def _read_printed(text: str, position: Mapping[str, int]):
    """Terms of python-flint's printed form: '-t3^2*x0 + 5/3*t1 - 7' (generators named x<k>, t<k>)."""
    if text == "0":
        return
    factor_of: dict[str, tuple[int, int]] = {}   # "t3^2" -> (generator, exponent): factors repeat a lot
    for chunk in text.replace(" - ", " + -").split(" + "):
        negative = chunk[0] == "-"
        if negative:
            chunk = chunk[1:]
        factors = chunk.split("*")
        head = factors[0]
        if head[0].isdigit():
            num, _, den = head.partition("/")
            num, den = _integer(num), _integer(den) if den else 1
            del factors[0]
        else:
            num, den = 1, 1
        powers = []
        for factor in factors:
            found = factor_of.get(factor)
            if found is None:
                name, _, e = factor.partition("^")
                found = factor_of[factor] = (position[name], int(e) if e else 1)  # KeyError: not our format
            powers.append(found)
        powers.sort()
        yield tuple(powers), -num if negative else num, den


def _integer(digits: str) -> int:
    # int() of a decimal string is capped at 4300 digits (Python's guard); flint reads any length
    return int(digits) if len(digits) < 4000 else int(_flint.fmpz(digits))


def collect_atoms(exprs: Iterable[sympy.Expr]) -> set[sympy.Expr]:
    """The atoms a ring needs so that `from_expr` can represent every expression given."""
    found: set[sympy.Expr] = set()
    for expr in exprs:
        expr = sympy.sympify(expr)
        if not expr.is_Rational:
            for _, powers in monomials(expr):
                found.update(base for base, _ in powers)
    return found


def monomials(expr: sympy.Expr) -> list[tuple[Fraction, list[tuple[sympy.Expr, int]]]]:
    """expr as a sum of rational multiples of products of atom powers (positive integer exponents).

    A factor that is not a power of an atom with a positive integer exponent (sqrt(2), 1/(1 - g),
    sin(pi*a)) is itself an atom. Expressions already in expanded form are read without calling
    sympy's expand, which dominates the cost otherwise.
    """
    cached = _MONOMIAL_CACHE.get(expr)
    if cached is not None:
        return cached
    result = _flat_monomials(expr)
    if result is None:
        result = _flat_monomials(sympy.expand(expr))
        if result is None:  # expand left something non-flat: take factors as atoms
            result = []
            for term in sympy.Add.make_args(sympy.expand(expr)):
                coeff, factors = term.as_coeff_mul()
                result.append((_fraction(coeff) if coeff.is_Rational else Fraction(1),
                               [(f, 1) for f in (factors if coeff.is_Rational else (coeff,) + factors)]))
    if len(_MONOMIAL_CACHE) > 4096:
        _MONOMIAL_CACHE.clear()
    _MONOMIAL_CACHE[expr] = result
    return result


# collect_atoms and from_expr read the same expressions one after the other
_MONOMIAL_CACHE: dict[sympy.Expr, list] = {}


def _fraction(r: sympy.Rational) -> Fraction:
    return Fraction(int(r.p), int(r.q))


def _flat_monomials(expr: sympy.Expr):
    out = []
    for term in sympy.Add.make_args(expr):
        coeff = Fraction(1)
        powers = []
        for factor in sympy.Mul.make_args(term):
            if factor.is_Rational:
                coeff *= _fraction(factor)
                continue
            if factor.is_Add:
                return None
            if factor.is_Pow:
                base, e = factor.args
                if e.is_Integer and e.p > 0:
                    if base.is_Add or base.is_Mul:
                        return None
                    powers.append((base, int(e)))
                    continue
                if e.is_Integer and e.p < -1 and base.is_Symbol:
                    # mu**(-3) is (1/mu)**3: one atom 1/mu for every power (reduced b carry many)
                    powers.append((sympy.Pow(base, -1), -int(e)))
                    continue
            if factor.is_Number:  # a float or other non-rational number: refuse silently inexact input
                raise ValueError(f"inexact number {factor} in an exact derivation")
            powers.append((factor, 1))
        out.append((coeff, powers))
    return out
