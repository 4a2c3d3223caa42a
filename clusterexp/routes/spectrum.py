"""The harmonic regulator from a declared spectrum (route R2).

The user declares the trapped system: per species the generating function of the one-body levels
L_i(x) = sum_k x^{eps_k / hbar omega} (x = e^{-t}, t = beta hbar omega), how the many-body states fill
them (bose or fermi occupations), and an energy shift hbar omega * s(N) that depends only on the
species numbers N (pairwise shifts such as alpha N(N-1)/2 + nu N_A N_B). Then

    Z_n(x) = x^{s(n)} Z_n^base(x),   ln Xi_trap = sum_n c_n(x) z^n,

and the thermodynamic limit divides by the reference one-body function and weighs by the trap's
effective area for the cluster:

    b_n = W_n lim_{t -> 0} c_n(x) / Z_{1,ref}(x),   W_n = (M_n / m_ref)^{d/2} ("area mass")
                                                   or W_n = |n| ("area count", lowest Landau level)
                                                   or W_n = 1 ("area one": the trapped gas itself,
                                                   densities counted per one-body partition function).

Everything is a truncated power series in t with exact coefficients (polynomials in the parameters):
with p_i the order of the pole of L_i at t = 0, the rescaled functions t^{sum_i p_i n_i} Z_n are
regular, and the limit sits at the fixed power P_n = sum_i p_i n_i - p_ref of t in the rescaled
c_n, all lower powers of which must vanish. When one does not, the limit does not exist, and the
error names the cluster, the power of 1/t and its coefficient. No `sympy.series` is used: x = e^{-t}
enters through exp and 1/(1 - e^{-t}) series built in the ring.
"""
from __future__ import annotations

from dataclasses import dataclass
from fractions import Fraction
from math import comb, factorial
from typing import Callable, Mapping, Sequence

import sympy

from ..errors import SeriesError
from ..exact.series import PolynomialRing, collect_atoms, indices_up_to

Index = tuple[int, ...]
X = sympy.Symbol("x")


class SpectrumError(SeriesError):
    """The declared spectrum does not give a valid trapped series or thermodynamic limit."""

    def __init__(self, message: str, where: str | None = None):
        super().__init__(message)
        self.where = where  # which declaration: "levels A", "shift", "trapped [2,1]", "limit [2,1]"


class TSeries:
    """t^val * sum_{k < len(c)} c_k t^k + O(t^(val + len(c))): a truncated Laurent series in t whose
    coefficients are ring elements (polynomials in the parameters)."""

    __slots__ = ("ring", "val", "c")

    def __init__(self, ring: PolynomialRing, val: int, coeffs: list):
        self.ring, self.val, self.c = ring, val, list(coeffs)

    @property
    def top(self) -> int:
        """Absolute precision: the first power of t not known."""
        return self.val + len(self.c)

    def normalised(self) -> "TSeries":
        """Strip exactly-zero leading coefficients (moving val up)."""
        k = 0
        while k < len(self.c) and self.ring.is_zero(self.c[k]):
            k += 1
        return TSeries(self.ring, self.val + k, self.c[k:])

    def coefficient(self, power: int):
        k = power - self.val
        if k < 0:
            return self.ring.zero
        if k >= len(self.c):
            raise SeriesError(f"coefficient of t^{power} is beyond the precision t^{self.top}")
        return self.c[k]

    def __add__(self, other: "TSeries") -> "TSeries":
        val = min(self.val, other.val)
        top = min(self.top, other.top)
        R = self.ring
        return TSeries(R, val, [self._at(p) + other._at(p) for p in range(val, top)])

    def __neg__(self) -> "TSeries":
        return TSeries(self.ring, self.val, [-x for x in self.c])

    def __sub__(self, other: "TSeries") -> "TSeries":
        return self + (-other)

    def _at(self, power: int):
        k = power - self.val
        return self.c[k] if 0 <= k < len(self.c) else self.ring.zero

    def __mul__(self, other: "TSeries") -> "TSeries":
        a, b = self.normalised(), other.normalised()
        n = min(len(a.c), len(b.c))
        R = a.ring
        out = []
        for m in range(n):
            acc = R.zero
            for k in range(m + 1):
                x, y = a.c[k], b.c[m - k]
                if not (R.is_zero(x) or R.is_zero(y)):
                    acc = acc + x * y
            out.append(acc)
        return TSeries(R, a.val + b.val, out)

    def scale(self, factor) -> "TSeries":
        return TSeries(self.ring, self.val, [x * factor for x in self.c])

    def inverse(self) -> "TSeries":
        a = self.normalised()
        if not a.c:
            raise SpectrumError("division by a series that vanishes to the working precision")
        lead = a.c[0]
        value = _rational_value(a.ring, lead)
        if value is None:
            raise SpectrumError("the leading term of a denominator is not a plain number; "
                                "write the level function so that its most singular part has a numeric coefficient")
        R = a.ring
        inv0 = R.rational(1 / value)
        out = [R.constant(1 / value)]
        for m in range(1, len(a.c)):
            acc = R.zero
            for k in range(1, m + 1):
                acc = acc + a.c[k] * out[m - k]
            out.append(-acc * inv0)
        return TSeries(R, -a.val, out)

    def power(self, e: int) -> "TSeries":
        if e < 0:
            return self.inverse().power(-e)
        result = TSeries(self.ring, 0, [self.ring.one] + [self.ring.zero] * (len(self.normalised().c) - 1))
        base = self
        while e:
            if e & 1:
                result = result * base
            base = base * base
            e >>= 1
        return result

    def dilate(self, l: int) -> "TSeries":
        """f(l t) from f(t)."""
        return TSeries(self.ring, self.val, [x * self.ring.rational(Fraction(l) ** (self.val + k))
                                             for k, x in enumerate(self.c)])

    def shift(self, powers: int) -> "TSeries":
        return TSeries(self.ring, self.val + powers, self.c)


def _rational_value(ring: PolynomialRing, element) -> Fraction | None:
    terms = list(ring.terms(element))
    if len(terms) != 1 or any(terms[0][0]):
        return None
    _, num, den = terms[0]
    return Fraction(num, den)


def exp_of_linear(ring: PolynomialRing, a, precision: int) -> TSeries:
    """e^{-a t} to precision t^precision, a a ring element."""
    out = [ring.one]
    for k in range(1, precision):
        out.append(out[-1] * a * ring.rational(Fraction(-1, k)))
    return TSeries(ring, 0, out)


def series_in_t(expr: sympy.Expr, ring: PolynomialRing, precision: int, what: str) -> TSeries:
    """A sympy expression in x = e^{-t} (and the ring's atoms) as a Laurent series in t, known
    through relative order `precision`. Supports + - * /, integer powers and x^a for any a free of x."""
    extra = precision + 8  # headroom for cancellations in denominators

    def go(e: sympy.Expr) -> TSeries:
        if not e.has(X):
            return TSeries(ring, 0, [ring.from_expr(e)] + [ring.zero] * (extra - 1))
        if e == X:
            return exp_of_linear(ring, ring.one, extra)
        if e.is_Add:
            out = None
            for arg in e.args:
                s = go(arg)
                out = s if out is None else out + s
            return out
        if e.is_Mul:
            out = None
            for arg in e.args:
                s = go(arg)
                out = s if out is None else out * s
            return out
        if e.is_Pow:
            base, exponent = e.args
            if base == X and not exponent.has(X):
                return exp_of_linear(ring, ring.from_expr(exponent), extra)
            if exponent.is_Integer and not exponent.has(X):
                return go(base).power(int(exponent))
            if isinstance(e, sympy.exp) or base == sympy.E:
                pass
        if isinstance(e, sympy.exp):
            arg = sympy.expand(e.args[0])
            coeff = arg.coeff(sympy.log(X))
            if arg == coeff * sympy.log(X) and not coeff.has(X):
                return exp_of_linear(ring, ring.from_expr(coeff), extra)
        raise SpectrumError(f"cannot expand {e} as a series in x = exp(-beta hbar omega): only sums, products, "
                            "integer powers and x^a are understood", what)

    try:
        return go(sympy.sympify(expr)).normalised()
    except ZeroDivisionError:  # pragma: no cover - guarded in inverse
        raise SpectrumError(f"{expr} is singular", what) from None


@dataclass(frozen=True)
class SpeciesSpectrum:
    levels: sympy.Expr           # one-body generating function in X
    fill: str                    # "bose" or "fermi"
    mass: sympy.Expr


def harmonic_levels(d: int) -> sympy.Expr:
    """The d-dimensional isotropic oscillator with its zero-point energy: (x^{1/2}/(1 - x))^d."""
    return (sympy.sqrt(X) / (1 - X)) ** d


def trapped_clusters(species: Sequence[SpeciesSpectrum], shift: Callable[[Index], sympy.Expr], order: int,
                     reference: int, dimension: int, area: str = "mass",
                     trapped: Mapping[Index, sympy.Expr] | None = None, atoms=(),
                     progress: Callable[[str], None] | None = None) -> tuple[PolynomialRing, dict[Index, object]]:
    """Cluster coefficients b_n, 1 <= |n| <= order, of the declared spectrum in the thermodynamic limit.

    `shift(n)` is the energy shift in units of hbar omega as a sympy expression (no x); `trapped`
    overrides Z_n(x) for chosen n. Returns ring elements (before the area weight, which is applied
    as a sympy factor by `area_weight`)."""
    K = len(species)
    trapped = dict(trapped or {})
    every = [s.levels for s in species] + list(trapped.values())
    shifts = {n: sympy.sympify(shift(n)) for n in indices_up_to(K, order)}
    ring = PolynomialRing(K, collect_atoms(list(shifts.values())) | set(atoms) | _atoms_of_x_functions(every))
    poles = _pole_orders(species, ring)
    p_ref = poles[reference]
    T = precision(poles, order, reference)
    L = [series_in_t(s.levels, ring, T, f"levels {i}") for i, s in enumerate(species)]
    base_single = [_OneSpecies(ring, T, L[i], poles[i], s.fill, f"levels {i}") for i, s in enumerate(species)]
    # One multi-index at a time, by total order (lowest first): its trapped partition function, its
    # cluster function and its limit, so that a cluster without a thermodynamic limit is reported as
    # soon as its order is reached instead of after every order has been built.
    indices = indices_up_to(K, order)
    unit_ref = tuple(1 if j == reference else 0 for j in range(K))
    Zt: dict[Index, TSeries] = {unit_ref: _trapped_function(unit_ref, trapped, ring, T, poles, base_single, shifts)}
    inverse_one_body = Zt[unit_ref].inverse()
    c: dict[Index, TSeries] = {}
    out: dict[Index, object] = {}
    for n in indices:
        if n not in Zt:
            Zt[n] = _trapped_function(n, trapped, ring, T, poles, base_single, shifts)
        # logarithm: |n| c_n = |n| Z_n - sum_{0 < k < n} |k| c_k Z_{n-k}
        total = sum(n)
        acc = Zt[n]
        for k in _below(n):
            if k in c:
                acc = acc - (c[k] * Zt[tuple(a - b for a, b in zip(n, k))]).scale(ring.rational(Fraction(sum(k), total)))
        c[n] = _truncate(acc, T)
        P = sum(p * m for p, m in zip(poles, n)) - p_ref
        ratio = c[n] * inverse_one_body
        for power in range(min(ratio.val, P), P):
            coefficient = ratio.coefficient(power)
            if not ring.is_zero(coefficient):
                raise SpectrumError(
                    f"no thermodynamic limit for the cluster {list(n)}: c_n(x)/Z_1(x) diverges like "
                    f"(beta hbar omega)^-{P - power} with coefficient {ring.to_expr(coefficient)} as omega -> 0; "
                    "the declared shifts change the trapped partition functions by more than the one-body "
                    "function can absorb (a uniform shift of every N-body state has a limit only for "
                    "one-dimensional level counting, such as the lowest Landau level with levels 1/(1 - x))",
                    f"limit {list(n)}")
        out[n] = ratio.coefficient(P)
        if total == 1 and ring.is_zero(out[n]):
            i = n.index(1)
            raise SpectrumError(
                f"the one-body level function of species {i + 1} diverges like (beta hbar omega)^-{poles[i]}, more "
                f"weakly than the reference species' (beta hbar omega)^-{p_ref}: its particles vanish from the "
                "thermodynamic limit (b = 0 for one of them); give it a level function as singular as the "
                "reference's, or make it the reference", f"levels {i}")
    if progress:
        progress("trapped partition functions formed")
    return ring, out


def _trapped_function(n, trapped, ring, T, poles, base_single, shifts) -> TSeries:
    """The rescaled trapped partition function t^(sum p_i n_i) Z_n of one multi-index."""
    if n in trapped:
        value = series_in_t(trapped[n], ring, T, f"trapped {list(n)}").shift(sum(p * m for p, m in zip(poles, n)))
        return _regular(value, T, f"trapped {list(n)}")
    value = _constant(ring, 1, T)
    for i, m in enumerate(n):
        if m:
            value = value * base_single[i].Z(m)
    s = shifts[n]
    if s != 0:
        value = value * exp_of_linear(ring, ring.from_expr(s), T)
    return _truncate(value, T)


class _OneSpecies:
    """The rescaled trapped partition functions Z_l of one species alone, formed up to the largest l
    asked for so far: ln Xi~ = sum_l (+-1)^{l+1}/l t^{p l} L(x^l) y^l, exponentiated by
    l Z_l = sum_{k=1}^{l} k c_k Z_{l-k}."""

    def __init__(self, ring, T, levels: TSeries, pole: int, fill: str, where: str):
        self.ring, self.T, self.levels, self.pole, self.fill, self.where = ring, T, levels, pole, fill, where
        self.logs = [None]
        self.functions = [_constant(ring, 1, T)]

    def Z(self, l: int) -> TSeries:
        ring, T = self.ring, self.T
        while len(self.functions) <= l:
            m = len(self.functions)
            sign = 1 if self.fill == "bose" or m % 2 else -1
            term = self.levels.dilate(m).shift(self.pole * m).scale(ring.rational(Fraction(sign, m)))
            self.logs.append(_regular(term, T, self.where))
            acc = None
            for k in range(1, m + 1):
                piece = (self.logs[k] * self.functions[m - k]).scale(ring.rational(Fraction(k, m)))
                acc = piece if acc is None else acc + piece
            self.functions.append(_truncate(acc, T))
        return self.functions[l]


def _pole_orders(species: Sequence[SpeciesSpectrum], ring: PolynomialRing) -> list[int]:
    """The order p_i of the pole of each level function L_i at t = 0 (L_i ~ t^-p_i)."""
    poles = []
    for i, s in enumerate(species):
        probe = series_in_t(s.levels, ring, 2, f"levels {i}")
        if not probe.c or probe.val >= 0:
            raise SpectrumError("the one-body level function must diverge as omega -> 0 (like (1 - x)^-p); "
                                f"it behaves as t^{probe.val}", f"levels {i}")
        poles.append(-probe.val)
    return poles


def pole_orders(levels: Sequence[sympy.Expr]) -> list[int]:
    """`_pole_orders` of bare level functions (for the cost estimate, before any ring is formed); each
    distinct function is expanded once (thousands of species usually share one)."""
    distinct = list(dict.fromkeys(levels))
    species = [SpeciesSpectrum(level, "bose", sympy.Integer(1)) for level in distinct]
    poles = dict(zip(distinct, _pole_orders(species, PolynomialRing(1, _atoms_of_x_functions(distinct)))))
    return [poles[level] for level in levels]


def precision(poles: Sequence[int], order: int, reference: int) -> int:
    """T, the powers of t every series keeps: the limit of cluster n sits at t^(sum_i p_i n_i - p_ref)."""
    return max(1, order * max(poles) - poles[reference] + 1)


def regulator_operations(poles: Sequence[int], order: int, reference: int, parameters: int) -> tuple[int, int]:
    """What `trapped_clusters` costs, counted before it runs: (products of two t-series coefficients,
    products of their terms). The logarithm dominates: for each n every 0 < k < n pairs c_k with
    Z_(n-k) (sum over |n| <= N of prod_i (n_i + 1) is C(N + 2K, 2K) pairs), each a product of two
    t-series truncated at T, T(T + 1)/2 coefficient products. With `parameters` symbols entering the
    shifts linearly, the coefficient of t^j is a polynomial of degree j in them, C(j + P, P) terms, and
    a truncated product multiplies sum_(m < T) C(m + 2P + 1, 2P + 1) = C(T + 2P + 1, 2P + 2) pairs of terms."""
    K = len(poles)
    T = precision(poles, order, reference)
    pairs = comb(order + 2 * K, 2 * K)
    return pairs * comb(T + 1, 2), pairs * comb(T + 2 * parameters + 1, 2 * parameters + 2)


def area_weight(index: Index, masses: Sequence[sympy.Expr], m_ref: sympy.Expr, d: int, area: str) -> sympy.Expr:
    if area == "count":
        return sympy.Integer(sum(index))
    if area == "one":
        return sympy.Integer(1)
    total = sympy.Add(*(n * m for n, m in zip(index, masses)))
    return sympy.powsimp(sympy.Pow(total / m_ref, sympy.Rational(d, 2)))


def _atoms_of_x_functions(exprs) -> set:
    """Atoms of the maximal x-free pieces of level functions (exponents a in x^a, coefficients)."""
    pieces = []

    def visit(e):
        if not e.has(X):
            pieces.append(e)
        else:
            for arg in e.args:
                visit(arg)

    for e in exprs:
        visit(sympy.sympify(e))
    return collect_atoms(pieces)


def _constant(ring, value, T) -> TSeries:
    return TSeries(ring, 0, [ring.constant(value)] + [ring.zero] * (T - 1))


def _truncate(s: TSeries, T: int) -> TSeries:
    keep = max(0, T - s.val)
    return TSeries(s.ring, s.val, s.c[:keep])


def _regular(s: TSeries, T: int, where: str) -> TSeries:
    s = _truncate(s.normalised(), T)
    if s.val < 0:
        raise SpectrumError(f"the trapped partition function is more singular than the one-body functions allow "
                            f"(a pole t^{s.val} after rescaling): not a valid series", where)
    if s.val > 0:
        s = TSeries(s.ring, 0, [s.ring.zero] * s.val + s.c)
    if len(s.c) < T:
        raise SpectrumError("internal precision loss in the t series", where)  # pragma: no cover
    return s


def _below(n: Index):
    """Multi-indices 0 < k < n componentwise (k != n)."""
    ranges = [range(m + 1) for m in n]
    from itertools import product
    for k in product(*ranges):
        if any(k) and k != n:
            yield k
