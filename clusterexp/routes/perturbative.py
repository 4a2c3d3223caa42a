"""Taylor coefficients of the pair-phase cluster coefficients b_n about the boson/fermion point.

Planar particles of K species, each expanded about bosons (exchange 0) or fermions (exchange 1), with
mutual parameters expanded about an integer (no coupling). Variables, all real: e_i = alpha_i - 0 or
alpha_i - 1 (the species' own exchange), d_ij = alpha_ij - k (a mutual parameter). Conventions of the
project: beta P lambda_ref^2 = sum_n b_n z^n, b_{e_i} = m_i/m_ref, alpha = 0 bosons, period 2 for
exchange, period 1 for mutual. The derivation is docs/perturbative.md; in short:

* first order (every n): the statistical coupling acts as a contact between pairs, fixed by the exact
  two-body b (route R3), and its ideal-gas average follows from Wick's theorem:
  beta P^(1) lambda^2 = -sum_{i<j} G_ij |d_ij| r_i r_j - sum_i chi_i G_ii |e_i| r_i^2, with
  r_i = rho_i lambda^2 of the ideal base gas, G_ij = m_ref (m_i + m_j)/(2 m_i m_j), G_ii = m_ref/m_i,
  chi_i = 1 about bosons, 0 about fermions;
* second order, |n| = 2: the exact two-body coefficients;
* second order, |n| >= 3: the chains of three loops are derived for every n: the Hartree-Fock ring of
  the contact, (1/2) sum_i (beta Sigma_i)^2 k_i with k_i = z_i dr_i/dz_i, and the Landau term of the
  mean statistical field, -(1/24) sum_i x_i^2 k_i (`chain_part`). They are the whole coefficient of a
  product |x||y| of the absolute values of two different parameters (two contact vertices meet only in
  the ring) and of a product d_ij d_ik of two mutual parameters around a shared species (Hartree chains
  only); monomials that connect no cluster are zero. Products e_i d_ij also get the cluster of the
  n_i-cycle of i with the n_j-cycle of j through its self angles and its link's area: derived for every
  n and any masses (section 4i, `angle_area`). Squares x^2 also get two-loop and one-loop clusters:
  derived for three particles of one species (b_3: the loop + 2-cycle from Sen's symmetry, the 3-cycle
  from its pairs; sections 4b, 4d) and for two particles of one species with one of another (b_{2,1}:
  d_ij^2 for any masses; section 4e) and for d_ij^2 of two species at every n and any masses (the
  chains plus the link squared of the {n_i-cycle, n_j-cycle} cluster in closed form, section 4k: a
  rational number plus rational multiples of sqrt(D) ln u, a sympy expression, not linear in the
  masses), and for e_i^2 of one species at every n (the chains, every two-loop cluster in closed form,
  and the n-cycle alone, `cycle_square`: its pairs and pairs of pairs summed exactly, section 4l).
  Every second-order coefficient of the regime is thereby derived; closed_forms=False (the tube route)
  leaves the squares that need the logarithms named.

Monomials whose sign changes under the mirror image (every parameter -> minus itself; e.g. x,
x*Abs(y), x*Abs(x)) vanish by that symmetry and are not listed.

>>> import sympy
>>> e, d = sympy.symbols("e d", real=True)
>>> taylor_coefficients([Species(e), Species(None)], {(0, 1): d}, (2, 1), "boson", 1)
{1: 0, Abs(e): 0, Abs(d): -1/2}
"""
from __future__ import annotations

from dataclasses import dataclass
from fractions import Fraction
from itertools import combinations_with_replacement
from typing import Mapping, Sequence

import sympy

from ..errors import NotSupportedYet
from .angle_area import angle_area_coefficients

POINTS = ("boson", "fermion")
DERIVED_ORDER = 2
_HOW = "docs/perturbative.md, section 4"


@dataclass(frozen=True)
class Species:
    """One species: the symbol of its exchange deviation e_i (None: held exactly at its point) and its
    mass in units of the reference mass."""

    exchange: sympy.Symbol | None = None
    mass: object = 1


@dataclass(frozen=True)
class _Link:
    """A link type: the species pair {i, j} (i == j for exchange) and the symbol of its parameter."""

    i: int
    j: int
    symbol: sympy.Symbol

    @property
    def species(self) -> frozenset:
        return frozenset((self.i, self.j))


def _rational(value, what: str) -> Fraction:
    if isinstance(value, float):
        raise TypeError(f"{what} must be exact (an integer or a Rational), not the float {value!r}")
    value = sympy.Rational(value) if not isinstance(value, sympy.Basic) else value
    if not value.is_Rational or not value > 0:
        raise ValueError(f"{what} must be a positive rational number, got {value}")
    return Fraction(int(value.p), int(value.q))


def _check_symbol(symbol, what: str) -> sympy.Symbol:
    if not isinstance(symbol, sympy.Symbol) or not symbol.is_real:
        raise ValueError(f"{what} must be a real sympy Symbol (sympy.Symbol(name, real=True)), got {symbol!r}")
    return symbol


class _Gas:
    """The base-point ideal gas: masses, statistics signs, and the one-variable series coefficients
    r_i[l] = [z_i^l] rho_i lambda^2 and k_i[l] = [z_i^l] z_i d r_i/d z_i."""

    def __init__(self, species: Sequence[Species], about: Sequence[str]):
        self.mass = [_rational(s.mass, f"mass of species {k}") for k, s in enumerate(species)]
        self.sign = [1 if a == "boson" else -1 for a in about]
        self.contact = [a == "boson" for a in about]

    def r(self, i: int, l: int) -> Fraction:
        return self.mass[i] * Fraction(self.sign[i] ** (l + 1), l)

    def k(self, i: int, l: int) -> Fraction:
        return self.mass[i] * self.sign[i] ** (l + 1)

    def weight(self, i: int, j: int) -> Fraction:
        """G_ij = m_ref (m_i + m_j)/(2 m_i m_j); G_ii = m_ref/m_i (the reference mass is 1)."""
        return (self.mass[i] + self.mass[j]) / (2 * self.mass[i] * self.mass[j])


def _links(species: Sequence[Species], mutual: Mapping[tuple[int, int], sympy.Symbol]) -> list[_Link]:
    K = len(species)
    links = [_Link(i, i, _check_symbol(s.exchange, f"exchange symbol of species {i}"))
             for i, s in enumerate(species) if s.exchange is not None]
    for key, symbol in sorted(mutual.items()):
        i, j = key
        if not (0 <= i < j < K):
            raise ValueError(f"mutual pair {key!r} must be (i, j) with 0 <= i < j < {K}")
        links.append(_Link(i, j, _check_symbol(symbol, f"mutual symbol of {key!r}")))
    names = [link.symbol for link in links]
    if len(set(names)) != len(names):
        raise ValueError("each statistics parameter needs its own symbol")
    return links


def _points(about, K: int) -> tuple[str, ...]:
    about = (about,) * K if isinstance(about, str) else tuple(about)
    if len(about) != K or any(a not in POINTS for a in about):
        raise ValueError(f"about must be 'boson' or 'fermion', one word or one per species; got {about!r}")
    return about


def _index(multi_index, K: int) -> tuple[int, ...]:
    n = tuple(multi_index)
    if len(n) != K or any(not isinstance(x, int) or x < 0 for x in n) or sum(n) < 1:
        raise ValueError(f"multi-index {multi_index!r} must give {K} non-negative integer counts, at least one particle")
    return n


def _ideal(gas: _Gas, n) -> Fraction:
    support = [i for i, x in enumerate(n) if x]
    if len(support) != 1:
        return Fraction(0)
    i = support[0]
    return gas.r(i, n[i]) / n[i]


def _first_order(gas: _Gas, link: _Link, n) -> Fraction:
    """Coefficient of |x| (x the link's parameter) in b_n: the contact term (3.1)."""
    support = frozenset(i for i, x in enumerate(n) if x)
    if support != link.species:
        return Fraction(0)
    i, j = link.i, link.j
    if i == j:
        if not gas.contact[i]:
            return Fraction(0)
        l = n[i]
        # [z^l] r_i^2 = sum_{a+b=l} r_i[a] r_i[b]
        return -gas.weight(i, i) * sum((gas.r(i, a) * gas.r(i, l - a) for a in range(1, l)), Fraction(0))
    return -gas.weight(i, j) * gas.r(i, n[i]) * gas.r(j, n[j])


def _two_body_square(gas: _Gas, link: _Link, n) -> Fraction:
    """Coefficient of x^2 in a two-particle b (exact route R3): (m_i/m_ref) e_i^2/2, ((m_i+m_j)/2) d_ij^2."""
    if frozenset(i for i, x in enumerate(n) if x) != link.species:
        return Fraction(0)
    if link.i == link.j:
        return gas.mass[link.i] / 2
    return (gas.mass[link.i] + gas.mass[link.j]) / 2


def _series_coefficient(gas: _Gas, factors: Sequence[tuple[str, int]], n) -> Fraction:
    """[z^n] of a product of the one-variable series r_s (kind "r") and k_s (kind "k")."""
    by_species: dict[int, list[str]] = {}
    for kind, s in factors:
        by_species.setdefault(s, []).append(kind)
    if set(by_species) != {i for i, x in enumerate(n) if x}:
        return Fraction(0)  # r and k start at z^1: every species of n needs a factor, and only those
    total = Fraction(1)
    for s, kinds in by_species.items():
        product = [Fraction(1)] + [Fraction(0)] * n[s]
        for kind in kinds:
            term = gas.r if kind == "r" else gas.k
            product = [sum((product[a] * term(s, l - a) for a in range(l)), Fraction(0)) for l in range(n[s] + 1)]
        total *= product[n[s]]
    return total


def _far_end(link: _Link, c: int) -> int:
    return link.j if link.i == c else link.i


def _chain(gas: _Gas, p: _Link, q: _Link, n, fock: bool = True) -> tuple[Fraction, Fraction]:
    """(coefficient of |x||y|, coefficient of x y) in b_n from the chains of three loops with links p and
    q (x, y their parameters): the ring of contact self-energies (4.1) and the Landau term (4.2), summed
    over the possible central species. fock=False keeps only the Hartree part of the exchange contact
    (chains of distinct loops, without exchange between the central loop and a neighbour)."""
    ring = landau = Fraction(0)
    pair = 1 if p == q else 2  # a square of a sum has each cross term twice
    for c in sorted(p.species & q.species):
        spread = _series_coefficient(gas, [("r", _far_end(p, c)), ("r", _far_end(q, c)), ("k", c)], n)
        contact = Fraction(1)
        for link in (p, q):
            if link.i == link.j:
                contact *= (2 if fock else 1) * gas.weight(c, c) * gas.contact[c]
            else:
                contact *= gas.weight(link.i, link.j)
        ring += Fraction(pair, 2) * contact * spread
        landau -= Fraction(pair, 24) / gas.mass[c] ** 2 * spread
    return ring, landau


def chain_part(species: Sequence[Species], mutual: Mapping[tuple[int, int], sympy.Symbol],
               multi_index: Sequence[int], about="boson", fock: bool = True) -> dict:
    """Second-order contributions of the chains of three loops to b_n, {monomial: Rational}.

    They are the whole second-order coefficient of a product of two different mutual parameters sharing
    a species, and one part of the coefficient of a square or of an exchange-times-mutual product
    (docs/perturbative.md, section 4). A square x^2 collects its ring and Landau parts.
    """
    gas = _Gas(species, _points(about, len(species)))
    links = _links(species, mutual)
    n = _index(multi_index, len(species))
    out: dict = {}
    for p, q in combinations_with_replacement(links, 2):
        ring, landau = _chain(gas, p, q, n, fock)
        if p == q:
            out[p.symbol ** 2] = ring + landau
        else:
            out[sympy.Abs(p.symbol) * sympy.Abs(q.symbol)] = ring
            out[p.symbol * q.symbol] = landau
    return {m: sympy.Rational(v.numerator, v.denominator) for m, v in out.items()}


def _pair_with_one(gas: _Gas, link: _Link, n):
    """For b_n with two particles of species i and one of species j (link = the mutual pair {i, j}): the
    d_ij^2 coefficient of the cluster of the 2-cycle of species i with the one-particle loop of j
    (section 4e), (m_i/2 + m_j/4)/m_ref: the relative curve cut into its two pairs, each closed by the
    chord between its ends; 3/4 for equal masses, as Sen's symmetry gives, and the static limits
    m_i -> inf, one flux 2 d, and m_j -> inf, one static flux d. The 2-cycle's sign about fermions flips
    it. None for any other n. (Its e_i d_ij coefficient, -(m_j/m_ref)/4, is the p = 2, q = 1 case of
    `angle_area.angle_area_coefficients`.)"""
    if link.i == link.j:
        return None
    pairs = [(a, b) for a, b in ((link.i, link.j), (link.j, link.i)) if n[a] == 2 and n[b] == 1]
    if sum(n) != 3 or not pairs:
        return None
    i, j = pairs[0]
    return gas.sign[i] * (gas.mass[i] / 2 + gas.mass[j] / 4)


def _beyond_the_chains_of_three(gas: _Gas, i: int) -> Fraction:
    """The e_i^2 coefficient of b_3 (three particles of species i) beyond the chains of three loops:
    the loop + 2-cycle cluster beyond its ring part, +1/2 (Sen's symmetry with the exact b_2; its sign
    flips about fermions with the 2-cycle), plus the 3-cycle beyond its ring part, X_C = 0 (the single-pair
    Aharonov-Bohm integral, the contact-contact integral 3/2 + 2 ln 2 and the angle covariance
    2 ln 2 - pi^2/24 + Li_2(1/4)/4 of its three pairs; docs/perturbative.md, section 4d). Times m_i/m_ref:
    b_3 of one species scales with its mass in the plane."""
    return gas.sign[i] * gas.mass[i] / 2


def _two_species_square(gas: _Gas, link: _Link, n):
    """The d^2 coefficient of b_n of two species i, j (|n| >= 4) for the mutual link d = d_ij, exactly:
    the chains of three loops plus the link squared of the cluster of the n_i-cycle of i with the
    n_j-cycle of j in closed form (section 4k: a rational number plus rational multiples of sqrt(D) ln u,
    `link_integrals.exact_coefficient`), signed by the cycles' transpositions about fermions. A sympy
    expression."""
    from .link_integrals import exact_coefficient
    i, j = link.i, link.j
    a, b = n[i], n[j]
    sign = gas.sign[i] ** (a - 1) * gas.sign[j] ** (b - 1)
    ring, landau = _chain(gas, link, link, n)
    chains = ring + landau
    return sympy.Rational(chains.numerator, chains.denominator) + sign * exact_coefficient(a, b, gas.mass[i], gas.mass[j])


def _one_species_square(gas: _Gas, link: _Link, n) -> sympy.Expr:
    """The e^2 coefficient of b_n of one species i, n_i >= 4: the chains of three loops (with the
    n-cycle's ring part) plus every two-loop cluster {p-cycle, q-cycle}, p + q = n_i, exactly (the link
    squared in closed form, section 4k, and the angle-area parts, 4i; one species' units: a cluster with
    p = q counts half; signed (-1)^n_i about fermions, one sign per transposition of the two cycles), plus
    the n-cycle alone beyond its ring part (`cycle_square`, section 4l: computed exactly, zero for every n
    so far; signed (-1)^(n_i - 1) about fermions: its total angle is pi (n_i - 1) mod 2 pi), times
    m_i/m_ref."""
    from .angle_area import one_species_units
    from .cycle_square import cycle_square, ring_part
    from .link_integrals import exact_coefficient
    i = link.i
    k = n[i]
    ring, landau = _chain(gas, link, link, n)
    clusters = sum((exact_coefficient(p, k - p) / (2 if 2 * p == k else 1) + sum(one_species_units(p, k - p))
                    for p in range((k + 1) // 2, k)), sympy.Integer(0))
    ring_k = ring_part(k)
    alone = cycle_square(k) - sympy.Rational(ring_k.numerator, ring_k.denominator)
    mass = sympy.Rational(gas.mass[i].numerator, gas.mass[i].denominator)
    chains = sympy.Rational((ring + landau).numerator, (ring + landau).denominator)
    return sympy.expand(chains + gas.sign[i] ** k * mass * clusters + gas.sign[i] ** (k - 1) * mass * alone)


def _acts(link: _Link, n) -> bool:
    """Whether the link's parameter can enter b_n at all: an exchange needs two particles of its species."""
    return n[link.i] >= 2 if link.i == link.j else n[link.i] >= 1 and n[link.j] >= 1


def _second_order(gas: _Gas, p: _Link, q: _Link, n, closed_forms: bool = True):
    """{monomial: value or None (not derived)} for the second-order monomials of the link pair (p, q)."""
    x, y = p.symbol, q.symbol
    support = frozenset(i for i, v in enumerate(n) if v)
    if p == q:
        if support != p.species or not _acts(p, n):
            return {x ** 2: Fraction(0)}
        if sum(n) == 2:
            return {x ** 2: _two_body_square(gas, p, n)}
        if sum(n) == 3 and p.i == p.j:
            ring, landau = _chain(gas, p, p, n)
            return {x ** 2: ring + landau + _beyond_the_chains_of_three(gas, p.i)}
        pair = _pair_with_one(gas, p, n)
        if pair is not None:
            ring, landau = _chain(gas, p, p, n)
            return {x ** 2: ring + landau + pair}
        if not closed_forms:
            return {x ** 2: None}
        if p.i != p.j:
            return {x ** 2: _two_species_square(gas, p, n)}
        return {x ** 2: _one_species_square(gas, p, n)}
    monomials = (sympy.Abs(x) * sympy.Abs(y), x * y)
    if not p.species & q.species or support != p.species | q.species or not (_acts(p, n) and _acts(q, n)):
        return dict.fromkeys(monomials, Fraction(0))
    ring, landau = _chain(gas, p, q, n)
    if p.i == p.j or q.i == q.j:
        # exchange times mutual: two contact vertices meet only in the ring; the vector potentials also
        # meet in the cluster of the n_i-cycle of i with the n_j-cycle of j, through the self angles of
        # the i-cycle and the area of the link (section 4i, exact for any masses)
        exchange, mutual = (p, q) if p.i == p.j else (q, p)
        if mutual.i == mutual.j:
            return {monomials[0]: ring, monomials[1]: None}
        i = exchange.i
        j = mutual.j if mutual.i == i else mutual.i
        own, _ = angle_area_coefficients(n[i], n[j], gas.mass[i], gas.mass[j])
        sign = gas.sign[i] ** (n[i] - 1) * gas.sign[j] ** (n[j] - 1)
        return {monomials[0]: ring, monomials[1]: landau + sign * Fraction(int(own.p), int(own.q))}
    # two mutual links around a shared species: Hartree chains only (ring and Landau)
    return {monomials[0]: ring, monomials[1]: landau}


def taylor_coefficients(species: Sequence[Species], mutual: Mapping[tuple[int, int], sympy.Symbol],
                        multi_index: Sequence[int], about="boson", order: int = 2,
                        unknown: str = "raise", closed_forms: bool = True) -> dict:
    """Taylor coefficients of b_n through `order` in the statistics parameters about the base point.

    species: Species(exchange symbol or None, mass); mutual: {(i, j): symbol}, i < j; about: "boson" /
    "fermion" (one word or one per species); order 0, 1 or 2; closed_forms=False treats the squares that
    need the closed forms of sections 4k, 4l (d_ij^2 and e_i^2 at |n| >= 4) as not derived (the tube route's
    static limits need only rational coefficients). Returns {monomial: exact value} for every
    mirror-even monomial of degree <= order (zeros included), in a fixed order: Rationals, except the
    squares at |n| >= 4 (logarithms of quadratic surds, sections 4k, 4l). A coefficient that is not
    derived (closed_forms=False) raises NotSupportedYet naming it, or becomes a named Symbol with
    unknown="name".
    """
    K = len(species)
    if not isinstance(order, int) or order < 0:
        raise ValueError(f"order must be a non-negative integer, got {order!r}")
    if order > DERIVED_ORDER:
        raise NotSupportedYet(f"order {order} in the statistics parameters (derived through order "
                              f"{DERIVED_ORDER}; {_HOW})")
    if unknown not in ("raise", "name"):
        raise ValueError("unknown must be 'raise' or 'name'")
    gas = _Gas(species, _points(about, K))
    links = _links(species, mutual)
    n = _index(multi_index, K)
    out: dict = {sympy.Integer(1): _ideal(gas, n)}
    if order >= 1:
        for link in links:
            out[sympy.Abs(link.symbol)] = _first_order(gas, link, n)
    if order >= 2:
        for p, q in combinations_with_replacement(links, 2):
            out.update(_second_order(gas, p, q, n, closed_forms))
    missing = [m for m, v in out.items() if v is None]
    if missing and unknown == "raise":
        listed = ", ".join(str(m) for m in missing)
        raise NotSupportedYet(f"second-order Taylor coefficients of b[{','.join(map(str, n))}] in {listed}: "
                              f"not derived ({_HOW}); derived at "
                              "second order: two-particle b, b_3 of one species, products |x||y| of two different "
                              "parameters, products d_ij d_ik of two mutual parameters, products e_i d_ij (any n), "
                              "and every square x^2 (sections 4k, 4l), which closed_forms=False leaves out")
    label = "_".join(map(str, n))
    return {m: (sympy.Symbol(f"t_b_{label}__{m}") if v is None
                else sympy.Rational(v.numerator, v.denominator) if isinstance(v, Fraction) else v)
            for m, v in out.items()}


def expansion(species, mutual, multi_index, about="boson", order: int = 2, unknown: str = "raise") -> sympy.Expr:
    """The Taylor polynomial sum(value * monomial) of b_n through `order` (without the O-term)."""
    terms = taylor_coefficients(species, mutual, multi_index, about, order, unknown)
    return sympy.Add(*(value * monomial for monomial, value in terms.items()))
