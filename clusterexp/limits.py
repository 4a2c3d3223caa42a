"""How big a derivation will be, estimated before it starts, and the refusal when it is too big.

The estimate needs only the validated `System`: no series is formed.

- Multi-indices: every n with 1 <= |n| <= N for K species, C(N + K, K) - 1 of them.
- Unknown symbols: the generated b's (or, for `virials given`, a's) of order >= 2 that the input
  does not state.
- Terms: with every b a symbol, each monomial of a coefficient of total order N is a product of
  b_m (|m| >= 2) whose weights w = |m| - 1 add up to N - 1 (one species: a_n has p(n - 1) terms,
  the partitions of n - 1). Counting such products where a part of weight w may be any of the
  C(w + K, K - 1) multi-indices of total w + 1 gives the distinct monomials of the top-order layer (an
  estimate: it ignores which species the parts belong to; one monomial appears in several
  coefficients, so the layer is taken as twice that count for K >= 2, within a factor 3 of measured
  layers for K <= 4, N <= 10). A stated value adds as many
  distinct monomials as it has non-constant terms; a stated number adds none, it only fills weight.
  The largest single coefficient is estimated as the layer's share of the most central multi-index.
- Pair phases count like `given`: the exact two-body coefficients (and those of ideal species) are
  stated values, the many-body pieces unknown symbols unless given.
- Any other computed regime has no unknown symbols; its coefficients are taken as polynomials of
  degree about N in the P declared parameters, C(N + P, P) terms each.
- Generators: every exact polynomial of the kernel stores an exponent for each generator of its
  ring (the K expansion variables, every unknown symbol, every parameter), and about one polynomial
  per generator is formed, so memory and time grow like G^2 (measured: 100 species to order 2,
  G = 5,150, 11 s and 1.5 GB; 300 species would need about 120 GB). G^2 / GENERATOR_CELLS counts
  against the same limit as the terms.
- Printed coefficients: every coefficient the requests list (density and fugacity ones per species).
- The harmonic regulator (`clusters spectrum`, `clusters landau spectrum`) is counted in coefficient
  products (`routes.spectrum.regulator_operations`) and converted to seconds, then to the same
  units: DEFAULT_SIZE_LIMIT stands for about half a minute of work.

`check_size` refuses, with an `InputError` at the deciding `derive` request, any derivation whose
estimated top-layer terms exceed the limit.
"""
from __future__ import annotations

from dataclasses import dataclass
from math import comb

import sympy

from .errors import InputError
from .exact.orders import split_truncation
from .routes import regime_of

DEFAULT_SIZE_LIMIT = 200_000
"""Estimated terms in the top-order layer (or multi-indices, whichever is more) above which a
derivation is refused unless the limit is raised. Measured on one laptop: two species generic to
total order 14 is about 1.1e5 and takes about 30 s; order 16 would pass 4e5."""
FAR_BEYOND = 10_000  # estimates this many times the default get no "raise the limit" advice
SECONDS_PER_UNIT = 30.0 / DEFAULT_SIZE_LIMIT
"""The default limit is about half a minute of work (two species generic to order 14: 1.1e5, 30 s)."""
GENERATOR_CELLS = 175
"""Exponent cells (generators^2) per unit of size: the default limit is then about 5,900 generators,
some 2 GB of exponents (57 bytes per cell measured, 100 species to order 2)."""
BYTES_PER_CELL = 57
DETAILED_INDICES = 5_000  # pair phases: multi-indices up to which the exact two-body values are formed
SECONDS_PER_COEFFICIENT_PRODUCT = 1.5e-6  # the harmonic regulator, measured on orders 10-40, K <= 3
SECONDS_PER_TERM_PRODUCT = 3e-9


@dataclass(frozen=True)
class SizeEstimate:
    species: int
    order: int
    multi_indices: int
    unknown_symbols: int
    layer_terms: int       # estimated terms of all coefficients of the top total order together
    largest_terms: int     # estimated terms of the largest single coefficient
    generators: int = 0    # generators of the kernel's polynomial ring (variables, unknowns, parameters)
    printed: int = 0       # coefficients the requests list
    regulator_seconds: float = 0.0  # estimated time of the harmonic regulator (declared spectra)

    @property
    def generator_size(self) -> int:
        return self.generators ** 2 // GENERATOR_CELLS

    @property
    def regulator_size(self) -> int:
        return int(self.regulator_seconds / SECONDS_PER_UNIT)

    @property
    def size(self) -> int:
        """The number compared with the limit."""
        return max(self.layer_terms, self.multi_indices, self.printed, self.generator_size, self.regulator_size)

    def describe(self) -> str:
        text = (f"{self.species} species to total order {self.order}: {self.multi_indices:,} multi-indices, "
                f"{self.unknown_symbols:,} unknown coefficients, about {_round(self.layer_terms)} terms at the "
                f"top order (largest coefficient about {_round(self.largest_terms)})")
        if self.printed > max(self.layer_terms, self.multi_indices):
            text += f", {self.printed:,} coefficients to print"
        if self.generator_size > max(self.layer_terms, self.multi_indices):
            text += (f"; its exact polynomials would carry {self.generators:,} generators each, about "
                     f"{_bytes(self.generators ** 2 * BYTES_PER_CELL)} of memory")
        if self.regulator_seconds >= 1:
            text += (f"; the harmonic regulator (trapped spectrum) alone would take about "
                     f"{duration_text(self.regulator_seconds)}")
        return text


def count_multi_indices(K: int, N: int) -> int:
    """Multi-indices n of K species with 1 <= |n| <= N."""
    return comb(N + K, K) - 1


def weighted_partitions(weights: dict[int, int], total: int, up_to: bool = False) -> int:
    """Multisets of parts with weights adding to `total` (or to at most `total` when `up_to`),
    where `weights[w]` distinct parts have weight w. Exact: the product over w of
    (1 - x^w)^(-weights[w]) = sum_j C(k + j - 1, j) x^(w j), truncated at x^total."""
    ways = [1] + [0] * total
    for w, kinds in sorted(weights.items()):
        if kinds <= 0 or w > total:
            continue
        series = [comb(kinds + j - 1, j) for j in range(total // w + 1)]
        ways = [sum(ways[s - w * j] * series[j] for j in range(s // w + 1)) for s in range(total + 1)]
    return sum(ways) if up_to else ways[total]


def estimate(system) -> SizeEstimate:
    """Size of the derivation a validated `System` asks for."""
    K = len(system.species)
    N = max([system.order] + [_request_order(r) for r in system.requests])
    indices = count_multi_indices(K, N)
    higher = indices - K                                 # generated coefficients with |n| >= 2
    given = {v.index: split_truncation(v.value)[0] for v in getattr(system.source, "values", ())}
    regime = regime_of(system)
    # values the regime states exactly (like given ones), and how many pairs it counts as known
    # without forming them (many species: forming every exact value costs sympy work per multi-index)
    known, exact_pairs = regime.stated_for_estimate(system, N, detailed=indices <= DETAILED_INDICES)
    given = {**known, **given}
    # weight w = |m| - 1 >= 1; parts of weight w: all multi-indices of total w + 1
    kinds = {w: comb(w + K, K - 1) for w in range(1, N)}
    fills = False
    for index, value in given.items():
        w = sum(index) - 1
        if not 1 <= w < N:
            continue
        constant, varying = _split(value)
        kinds[w] += varying - 1                          # the symbol is replaced by its value's terms
        fills = fills or constant
    top = comb(N + K - 1, K - 1)                         # multi-indices of total order N
    P = len(system.parameters)
    printed = sum(_printed(request, K) for request in system.requests)
    if regime.computed:
        # a computed regime: no unknown symbols; its b's are functions of the declared parameters,
        # taken as polynomials of degree about N (monomials of degree <= N in P parameters)
        largest = comb(N + P, P)
        return SizeEstimate(K, N, indices, 0, largest * top, largest, K + P, printed, _regulator_seconds(system, N))
    distinct = weighted_partitions(kinds, N - 1, up_to=fills) if N >= 2 else 1
    # one monomial shows up in several coefficients of the layer: measured, the layer holds about
    # twice the distinct monomials for K >= 2 (K <= 4, N <= 10)
    layer = distinct if K == 1 else 2 * distinct
    largest = layer if K == 1 else max(1, -(-layer * _central_share(K, N) // top))
    unknown = max(higher - len(given) - exact_pairs, 0)
    return SizeEstimate(K, N, indices, unknown, layer, min(largest, layer), K + unknown + P, printed)


def _printed(request, K: int) -> int:
    """Coefficients one request lists: its multi-indices, and for densities and fugacities one per
    species present in each (K C(N + K - 1, K) of them up to order N)."""
    if request.indices:
        count = len(request.indices)
        return count * K if request.quantity in ("density", "fugacity") else count
    N = request.up_to
    if request.quantity in ("density", "fugacity"):
        return K * comb(N + K - 1, K)                    # pairs (species i, n) with n_i >= 1, |n| <= N
    return count_multi_indices(K, N)


def _regulator_seconds(system, N: int) -> float:
    """Estimated time of the harmonic regulator when the regime uses it, else 0."""
    work = regime_of(system).regulator_work(system, N)
    if work is None:
        return 0.0
    products, term_products = work
    return SECONDS_PER_COEFFICIENT_PRODUCT * products + SECONDS_PER_TERM_PRODUCT * term_products


def _central_share(K: int, N: int) -> int:
    # the central multi-indices mix all species and have the most terms; a fixed factor K is the
    # empirical ratio between the largest coefficient and the layer mean for K = 2, 3
    return K


def _split(value) -> tuple[bool, int]:
    """(has a constant term, number of non-constant terms) of a stated value."""
    value = sympy.sympify(value)
    if value.is_number:
        return True, 0
    terms = sympy.Add.make_args(sympy.expand(value))
    constant = any(t.is_number for t in terms)
    return constant, sum(1 for t in terms if not t.is_number)


def _request_order(request) -> int:
    if request.up_to is not None:
        return request.up_to
    return max((sum(n) for n in request.indices), default=1)


def _deciding_request(system):
    return max(system.requests, key=_request_order) if system.requests else None


def check_size(system, limit: int | None = None) -> SizeEstimate:
    """Refuse a derivation estimated above `limit` (default: the input's own `size limit` when the
    model carries one, else `DEFAULT_SIZE_LIMIT`). Returns the estimate when it fits."""
    if limit is None:
        limit = getattr(system, "size_limit", None) or DEFAULT_SIZE_LIMIT
    found = estimate(system)
    if found.size > limit:
        request = _deciding_request(system)
        if found.size > FAR_BEYOND * DEFAULT_SIZE_LIMIT:
            hint = "this is far beyond what can be computed; lower the order or use fewer species"
        else:
            hint = (f"lower the order, or raise the limit with `--size-limit {_suggest(found.size)}` on the "
                    f"command line or `size limit {_suggest(found.size)}` in the input")
        raise InputError(
            f"this derivation is too large to start: {found.describe()}; the size limit is {limit:,}",
            request.span if request is not None else None, hint=hint)
    return found


def _suggest(size: int) -> int:
    digits = len(str(size))
    return (size // 10 ** (digits - 1) + 1) * 10 ** (digits - 1)


def _bytes(n: int) -> str:
    for unit, size in (("TB", 10 ** 12), ("GB", 10 ** 9), ("MB", 10 ** 6)):
        if n >= size:
            return f"{_amount(n / size)} {unit}"
    return f"{n:,} bytes"


def duration_text(seconds: float) -> str:
    """A time for a refusal message: `about 4.3 minutes`, `1,584 years`."""
    for unit, size in (("years", 365.25 * 86400), ("days", 86400), ("hours", 3600), ("minutes", 60)):
        if seconds >= 2 * size:
            return f"{_amount(seconds / size)} {unit}"
    return f"{_amount(seconds)} seconds"


def _amount(x: float) -> str:
    if x >= 1e6:
        return f"{x:.1e}".replace("e+", "e")
    return f"{x:,.0f}" if x >= 10 else f"{x:.1f}"


def _round(n: int) -> str:
    if n < 10_000:
        return str(n)
    return f"{float(n):.2g}".replace("e+", "e")
