"""Cluster <-> virial machinery for K species to any total order (route R6).

Conventions (README): beta P lambda^d = sum_n b_n z^n and rho_i lambda^d = z_i d/dz_i of it;
beta P lambda^d = sum_n a_n (rho lambda^d)^n with a_{e_i} = 1. b_{e_i} = (m_i/m_ref)^{d/2} carries
the masses; the machinery takes whatever b_{e_i} it is given (default 1).

Inside, the fugacities are rescaled to w_i = b_{e_i} z_i so that every series has a unit linear part
and the whole computation is ring arithmetic: with beta_n = b_n / prod_i b_{e_i}^{n_i},
F(w) = sum_n beta_n w^n, rho_i = w_i dF/dw_i, and P(rho) = F(w(rho)) after one reversion. The
division by b_{e_i} happens at the edge, in sympy.

All public functions take {multi-index: value} (values: rationals or sympy expressions) and return a
`CoefficientTable`, a read-only mapping that converts to sympy only what is looked at.
"""
from __future__ import annotations

from fractions import Fraction
from functools import cached_property
from typing import Callable, Iterator, Mapping, Sequence

import sympy

from ..errors import SeriesError
from .series import PolynomialRing, Series, collect_atoms, indices_up_to, revert
from .series.horner import HornerComposition
from .series.series import balanced_sum
from .series.truncation import drop_high_powers, polynomial_limits, reciprocal_power

Index = tuple[int, ...]


class CoefficientTable(Mapping):
    """{multi-index: sympy value}, converted lazily from exact ring elements.

    `factor` (optional) gives, per multi-index, a sympy factor applied at the edge (a mass factor);
    `limits` ({symbol: first unknown power}) drops the powers a truncated-series factor brings beyond them.
    Iteration order is deterministic: by total order, then descending lex.
    """

    def __init__(self, ring: PolynomialRing, elements: Mapping[Index, object] | Series, order: int,
                 factor: Callable[[Index], sympy.Expr] | None = None,
                 limits: Mapping[sympy.Symbol, int] | None = None):
        self.ring = ring
        self.order = order
        # a Series is split into its coefficients only when first looked at: the split walks every
        # term in Python and costs about as much as the whole kernel
        self._source = elements
        self._factor = factor
        self._limits = dict(limits or {})
        self._cache: dict[Index, sympy.Expr] = {}
        self._split_parts: dict[int, object] = {}

    @cached_property
    def _elements(self) -> dict[Index, object]:
        source = self._source
        return source.coefficients() if isinstance(source, Series) else dict(source)

    @cached_property
    def _keys(self) -> list[Index]:
        return [n for n in indices_up_to(self.ring.nvars, self.order, start=0) if n in self._elements]

    def __getitem__(self, index: Index) -> sympy.Expr:
        index = tuple(index)
        if sum(index) > self.order:
            raise KeyError(f"{index} is beyond the computed total order {self.order}")
        if index not in self._cache:
            element = self._elements.get(index)
            value = sympy.Integer(0) if element is None else self.ring.to_expr(element)
            if self._factor is not None:
                value = value * self._factor(index)
                if self._limits:
                    value = drop_high_powers(value, self._limits)
            self._cache[index] = value
        return self._cache[index]

    def __iter__(self) -> Iterator[Index]:
        return iter(self._keys)

    def __len__(self) -> int:
        return len(self._keys)

    def element(self, index: Index):
        """The exact ring element behind a value (before the edge factor)."""
        return self._elements.get(tuple(index), self.ring.zero)

    def term_sum(self, index: Index):
        """The value as a `TermSum` read straight off the ring (no sympy expression is built), or
        None when an atom or the edge factor is not a plain power product of symbols."""
        from .terms import TermSum
        if self._limits:
            return None
        index = tuple(index)
        if self._factor is None and isinstance(self._source, Series) and sum(index) <= self._source.order:
            found = self._part_term_sums(sum(index))
            if found is not None:
                return found.get(index, TermSum({}))
        factor = sympy.Integer(1) if self._factor is None else self._factor(index)
        return TermSum.from_ring(self.ring, self.element(index), factor)

    def _part_term_sums(self, degree: int):
        if degree not in self._split_parts:
            from .terms import TermSum
            self._split_parts[degree] = TermSum.split_ring_part(self.ring, self._source.parts[degree])
        return self._split_parts[degree]

    def __repr__(self) -> str:
        return f"CoefficientTable(order={self.order}, {len(self)} nonzero coefficients)"


def _nspecies(coefficients: Mapping[Index, object], nspecies: int | None) -> int:
    if nspecies is not None:
        return nspecies
    for index in coefficients:
        return len(index)
    raise ValueError("cannot tell the number of species from an empty table; pass nspecies")


def unit_index(K: int, i: int) -> Index:
    return tuple(1 if j == i else 0 for j in range(K))


def _linear(values: Mapping[Index, object], K: int) -> list[sympy.Expr]:
    return [sympy.sympify(values.get(unit_index(K, i), 1)) for i in range(K)]


def _mass_power(linear: Sequence[sympy.Expr], index: Index) -> sympy.Expr:
    return sympy.Mul(*(c ** e for c, e in zip(linear, index) if e))


def _working_ring(values: Mapping[Index, sympy.Expr], K: int, backend: str | None) -> PolynomialRing:
    return PolynomialRing(K, collect_atoms(values.values()), backend=backend)


def reduced_clusters(b: Mapping[Index, object], K: int, order: int,
                     truncation: Mapping[sympy.Symbol, int] | None = None) -> tuple[dict[Index, sympy.Expr], list]:
    """beta_n = b_n / prod b_{e_i}^{n_i} for 2 <= |n| <= order, and the linear coefficients.
    With `truncation` ({symbol: first unknown power}, as `sound_truncation` returns it), a b_{e_i}
    that depends on such a symbol is divided out as a truncated power series in it, so that beta
    stays polynomial in it."""
    linear = _linear(b, K)
    divide = _Divider(linear, truncation)
    for i, c in enumerate(linear):
        if c == 0:
            raise SeriesError(f"b for a single particle of species {i + 1} is zero; the gas has no ideal limit")
    reduced = {}
    for index, value in b.items():
        index = tuple(index)
        if len(index) != K:
            raise ValueError(f"multi-index {index} does not have {K} entries")
        if 2 <= sum(index) <= order:
            value = sympy.sympify(value)
            if value != 0:
                reduced[index] = value if all(c == 1 for c in linear) else divide(value, index)
    return reduced, linear


def sound_truncation(b: Mapping[Index, object], linear: Sequence[sympy.Expr],
                     truncation: Mapping[sympy.Symbol, int] | None, order: int) -> dict:
    """The part of `truncation` that may be applied term by term, decided once for the whole input:
    symbols that every b (up to the order) and every b_{e_i} contain only polynomially, and whose
    b_{e_i} have a nonzero constant part (so that 1/b_{e_i} is a power series). One value with a pole
    (x/n) would carry a cut made elsewhere below the limit."""
    if not truncation:
        return {}
    values = [v for n, v in b.items() if 1 <= sum(n) <= order] + list(linear)
    limits = polynomial_limits(truncation, values)
    return {s: k for s, k in limits.items() if all(reciprocal_power(c, 1, {s: k}) is not None for c in linear)}


class _Divider:
    """value / prod_i c_i^{n_i}, by truncated reciprocal series where `truncation` allows."""

    def __init__(self, linear: Sequence[sympy.Expr], truncation: Mapping[sympy.Symbol, int] | None):
        self.linear, self.truncation = linear, dict(truncation or {})
        self._reciprocals: dict[tuple[int, int], sympy.Expr | None] = {}

    def reciprocal(self, i: int, e: int) -> sympy.Expr | None:
        if (i, e) not in self._reciprocals:
            self._reciprocals[i, e] = reciprocal_power(self.linear[i], e, self.truncation)
        return self._reciprocals[i, e]

    def __call__(self, value: sympy.Expr, index: Index) -> sympy.Expr:
        if self.truncation:
            factors = [self.reciprocal(i, e) for i, e in enumerate(index) if e]
            if all(f is not None for f in factors):
                return drop_high_powers(value * sympy.Mul(*factors), self.truncation)
        return value / _mass_power(self.linear, index)


def cluster_to_virial(b: Mapping[Index, object], order: int, nspecies: int | None = None,
                      backend: str | None = None, on_order=None,
                      truncation: Mapping[sympy.Symbol, int] | None = None) -> "VirialResult":
    """Virial coefficients a_n (and the fugacity expansion) from cluster coefficients b_n.

    `truncation` ({symbol: first unknown power}) names parameters known only to some order: results
    are polynomials in them with every power at or beyond its limit dropped (exact below it).

    >>> b = {(1,): 1, (2,): sympy.Symbol("b2"), (3,): sympy.Symbol("b3")}
    >>> cluster_to_virial(b, 3).virial[(3,)]
    4*b2**2 - 2*b3
    """
    K = _nspecies(b, nspecies)
    # a symbol entering some value otherwise than polynomially is left whole (exact, slower): the
    # caller's truncation expands it
    limits = sound_truncation(b, _linear(b, K), truncation, order)
    reduced, linear = reduced_clusters(b, K, order, limits)
    ring = _working_ring(reduced, K, backend)
    beta = {n: ring.scalar_or_element(v) for n, v in reduced.items()}
    result = reduced_to_virial(ring, beta, order, linear, on_order)
    return result.truncated(limits) if limits else result


def reduced_to_virial(ring: PolynomialRing, beta: Mapping[Index, object], order: int,
                      linear: Sequence[sympy.Expr] | None = None, on_order=None) -> "VirialResult":
    """The kernel of `cluster_to_virial` on ring elements: beta_n (|n| >= 2) already reduced by the
    single-particle factors.

    Order by order in rho, with w_i = rho_i exp(h_i), h_i = d/drho_i sum_{m>=2} P_m/(m-1)
    (Gibbs-Duhem) and P = F(w) = sum_i w_i + R(w), R = sum_{|n|>=2} beta_n w^n: the unknown degree-m
    parts enter linearly, and Euler's relation sum_i rho_i dP_m/drho_i = m P_m closes them,
        P_m = -(m - 1) (R_m + sum_i rho_i Q_i),
    Q_i being the known part of [exp h_i]_{m-1}. So only R needs the powers of w: one composition
    per order instead of one per species plus one for P, formed by `HornerComposition` (Horner's rule
    in the leading variables, a power table in the rest). `revert` would give the same (tests compare).
    `on_order(m)`, when given, is called as each total order m starts (progress reports).
    """
    K = ring.nvars
    zero, is_zero = ring.zero, ring.is_zero
    w = [[zero, ring.var(i)] for i in range(K)]
    exp_h = [[ring.one] for _ in range(K)]      # parts of exp(h_i)
    # slope[i][k] = d P_{k+1} / d rho_i = k [h_i]_k: the weight k of the exp recurrence comes free
    slope = [[zero] for _ in range(K)]
    pressure = [zero, sum((ring.var(i) for i in range(1, K)), ring.var(0))]
    higher = HornerComposition(ring, w, {n: c for n, c in beta.items() if sum(n) >= 2}, order)
    higher.next_part(), higher.next_part()      # degrees 0 and 1 of R vanish
    for m in range(2, order + 1):
        if on_order is not None:
            on_order(m)
        known = [higher.next_part()]
        q = []
        for i in range(K):
            # [exp h]_{m-1} = [h]_{m-1} + (1/(m-1)) sum_{k=1}^{m-2} k [h]_k [exp h]_{m-1-k}
            acc = balanced_sum(ring, [slope[i][k] * exp_h[i][m - 1 - k] for k in range(1, m - 1)
                                      if not (is_zero(slope[i][k]) or is_zero(exp_h[i][m - 1 - k]))])
            q.append(acc * ring.rational(Fraction(1, m - 1)))
            known.append(ring.var(i) * q[i])
        p_m = balanced_sum(ring, known) * ring.rational(-(m - 1))
        pressure.append(p_m)
        for i in range(K):
            slope[i].append(ring.derivative(p_m, i))
            exp_h[i].append(slope[i][m - 1] * ring.rational(Fraction(1, m - 1)) + q[i])
            w[i].append(ring.var(i) * exp_h[i][m - 1])
    return VirialResult(ring, order, linear or [sympy.Integer(1)] * K,
                        Series(ring, order, pressure), [Series(ring, order, wi) for wi in w])


class VirialResult:
    """The outcome of one reversion: virial coefficients and fugacities z_i(rho)."""

    def __init__(self, ring, order, linear, pressure: Series, w: Sequence[Series]):
        self.ring, self.order, self.linear = ring, order, list(linear)
        self.pressure_series = pressure
        self.w_series = list(w)
        self.virial = CoefficientTable(ring, pressure, order)

    def truncated(self, limits: Mapping[sympy.Symbol, int]) -> "VirialResult":
        """The same result with every power of a limited symbol at or beyond its limit dropped."""
        result = VirialResult(self.ring, self.order, self.linear, _dropped(self.pressure_series, limits),
                              [_dropped(w, limits) for w in self.w_series])
        result.limits = dict(limits)
        return result

    limits: Mapping[sympy.Symbol, int] = {}

    def fugacity(self, i: int) -> CoefficientTable:
        """z_i(rho) = w_i(rho) / b_{e_i}: coefficients of rho^n in the fugacity of species i."""
        c = self.linear[i]
        if c == 1:
            return CoefficientTable(self.ring, self.w_series[i], self.order)
        inverse = reciprocal_power(c, 1, self.limits) if self.limits else None
        if inverse is None:
            return CoefficientTable(self.ring, self.w_series[i], self.order, lambda index: 1 / c)
        return CoefficientTable(self.ring, self.w_series[i], self.order, lambda index: inverse, self.limits)

    def legendre_pressure(self) -> Series:
        """P(rho) recomputed from the fugacities alone (independent self-check):
        the degree-m part of P is (m - 1)/m times that of sum_i rho_i ln(w_i / rho_i)."""
        pressure = legendre_pressure(self.w_series)
        return _dropped(pressure, self.limits) if self.limits else pressure


def _dropped(s: Series, limits: Mapping[sympy.Symbol, int]) -> Series:
    """s with every power of a limited symbol at or beyond its limit dropped, part by part."""
    return Series(s.ring, s.order, [s.ring.drop_powers(p, limits) for p in s.parts])


def legendre_pressure(w: Sequence[Series]) -> Series:
    """beta P lambda^d from w_i(rho) = b_{e_i} z_i(rho) through the Legendre transform (Gibbs-Duhem)."""
    ring = w[0].ring
    total = None
    for i, wi in enumerate(w):
        ratio = wi.shift_down(i)                       # w_i / rho_i = 1 + ...
        term = _times_variable(ratio.log(), i)
        total = term if total is None else total + term
    parts = [ring.zero] + [ring.zero] * total.order
    for m in range(1, total.order + 1):
        parts[m] = total.parts[m] * ring.rational(Fraction(m - 1, m))
    for i in range(len(w)):
        parts[1] = parts[1] + ring.var(i)
    return Series(ring, total.order, parts)


def virial_to_cluster(a: Mapping[Index, object], order: int, nspecies: int | None = None,
                      linear: Sequence[object] | None = None, backend: str | None = None) -> CoefficientTable:
    """Cluster coefficients b_n from virial coefficients a_n (a_{e_i} = 1 implied).

    Gibbs-Duhem gives ln(w_i / rho_i) = d/drho_i sum_{m>=2} P_m / (m - 1); one reversion turns
    w(rho) into rho(w), and F(w) = P(rho(w)). `linear` are the b_{e_i} (default 1).
    """
    K = _nspecies(a, nspecies)
    lin = [sympy.sympify(c) for c in (linear or [1] * K)]
    higher = {tuple(n): sympy.sympify(v) for n, v in a.items() if 2 <= sum(n) <= order and v != 0}
    ring = _working_ring(higher, K, backend)
    coefficients = {unit_index(K, i): 1 for i in range(K)}
    coefficients.update(higher)
    P = Series.from_coefficients(ring, order + 1, coefficients)
    H = Series(ring, P.order, [ring.zero, ring.zero] +
               [P.parts[m] * ring.rational(Fraction(1, m - 1)) for m in range(2, P.order + 1)])
    w = []
    for i in range(K):
        log_ratio = H.euler(i).shift_down(i)            # d H / d rho_i, order drops by one
        w.append(_times_variable(log_ratio.exp(), i))    # w_i = rho_i exp(dH/drho_i)
    rho, (F,) = revert(w, also=[P.truncate(order)])
    factor = None if all(c == 1 for c in lin) else (lambda index: _mass_power(lin, index))
    return CoefficientTable(ring, F.coefficients(), order, factor)


def _times_variable(s: Series, i: int) -> Series:
    ring = s.ring
    return Series(ring, s.order + 1, [ring.zero] + [p * ring.var(i) for p in s.parts])


def density_expansion(b: Mapping[Index, object], order: int, nspecies: int | None = None,
                      backend: str | None = None) -> list[CoefficientTable]:
    """rho_i lambda^d = sum_n n_i b_n z^n, one table per species."""
    K = _nspecies(b, nspecies)
    values = {tuple(n): sympy.sympify(v) for n, v in b.items() if 1 <= sum(n) <= order}
    ring = _working_ring(values, K, backend)
    F = Series.from_coefficients(ring, order, values)
    return [CoefficientTable(ring, F.euler(i).coefficients(), order) for i in range(K)]


def partition_to_cluster(Z: Mapping[Index, object], order: int, nspecies: int | None = None,
                         backend: str | None = None) -> CoefficientTable:
    """Coefficients of ln Xi, Xi = 1 + sum_n Z_n z^n (Z_0 = 1). Dividing by the volume factor
    (Area / lambda^d, or the trapped one-body function in the harmonic regulator) is the caller's."""
    K = _nspecies(Z, nspecies)
    values = {tuple(n): sympy.sympify(v) for n, v in Z.items() if 1 <= sum(n) <= order}
    ring = _working_ring(values, K, backend)
    values[(0,) * K] = 1
    return CoefficientTable(ring, Series.from_coefficients(ring, order, values).log().coefficients(), order)


def cluster_to_partition(b: Mapping[Index, object], order: int, nspecies: int | None = None,
                         backend: str | None = None) -> CoefficientTable:
    """Z_n from the coefficients of ln Xi: Xi = exp(sum_n b_n z^n)."""
    K = _nspecies(b, nspecies)
    values = {tuple(n): sympy.sympify(v) for n, v in b.items() if 1 <= sum(n) <= order}
    ring = _working_ring(values, K, backend)
    return CoefficientTable(ring, Series.from_coefficients(ring, order, values).exp().coefficients(), order)
