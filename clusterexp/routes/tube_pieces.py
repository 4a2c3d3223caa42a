"""The named pieces that static flux tubes add to the pair-phase regime (docs/tubes.md), as unknown
functions of the parameters they depend on, beside the many-body pieces b_n.

Poisson tubes of flux gamma, coverage n (tubes per lambda^2 of the reference species), the mobile
gas's ln Xi averaged over the tube positions:

  T_two_tubes       T2(gamma) = E[Re X_gamma1 X_gamma2] at gamma1 = gamma2 = gamma: the connected
                    integral of one loop of duration beta (lambda = 1) and two tubes. Every l-cycle of a
                    species of mass ratio r = m/m_ref gains (+-1)^(l+1) n^2 T2 / (2 r): a loop of duration
                    l beta has winding areas l/r in lambda_ref^2, and (n l X / r)^2 / 2 times r / l^2 is
                    n^2 X^2 / (2 r).  A function of the flux alone (period 1, kink at 0, zero at 0).
  B_anyon_tube_<A>  the coefficient of n in b_2 of the identical anyons of species A: two mobile
                    particles and one tube. A function of A's exchange parameter and the flux; it does
                    not depend on the mass (the one-tube part of Z_2 - Z_1^2/2 is a number, like the
                    one-tube shift of Z_1).  Exactly +-F/2 at the bose/fermi points, F = -s(1 - s)/2,
                    and 0 at integer flux.
  B_braid_tube_<A>_<B>  the coefficient of n in b_11 of two distinct species A, B with a mutual
                    parameter: two mobile particles and one tube, both feeling the tubes' flux
                    (docs/tubes.md, D of part (ii)).  A function of the mutual parameter, the flux and
                    the mass ratio m_A/m_B (not of m_ref: like the anyon-tube piece, one tube area
                    integral cancels one thermal area).  Exactly 0 where A and B do not braid (mutual
                    parameter an integer, period 1: the relative phase is 1 on every pair of loops, and
                    the one-tube shifts stay in b_10 and b_01 alone) and at integer flux.

With `tubes ... to order 2` the anyonic and braiding coefficients are kept through the coverage squared
too, with two more pieces (four-body: two mobile particles and two tubes; not sampled):

  B_anyon_two_tubes_<A>  the coefficient of n^2 in b_2 of the identical anyons of species A. A function of
                    A's exchange parameter, the flux and m_A/m_ref. Exactly (+-1) T2 m_ref/(2 m_A) at the
                    bose/fermi points (the 2-cycle's coverage-squared term above) and 0 at integer flux.
  B_braid_two_tubes_<A>_<B>  the coefficient of n^2 in b_11 of two braiding species. A function of the
                    mutual parameter, the flux and both masses over m_ref; 0 where they do not braid and at
                    integer flux.

Their values are sampled (`clusterexp.loops.tube_estimates`), not derived: in the exact results they
stay symbols, and `pieces` treats them like the b_n pieces (claims undecided with conditions, series
expanding them with named Taylor coefficients, a kink where a pair phase has one).
"""
from __future__ import annotations

import re
from dataclasses import dataclass

import sympy

TWO_TUBES_NAME = "T_two_tubes"      # the same symbol as loops.tube_virial.TWO_TUBES
ANYON_TUBE_PREFIX = "B_anyon_tube_"
BRAID_TUBE_PREFIX = "B_braid_tube_"
ANYON_TWO_TUBES_PREFIX = "B_anyon_two_tubes_"
BRAID_TWO_TUBES_PREFIX = "B_braid_two_tubes_"
_ANYON = re.compile(r"^B_anyon_(tube|two_tubes)_(.+)$")
_BRAID = re.compile(r"^B_braid_(tube|two_tubes)_(.+_.+)$")


def two_tubes_symbol() -> sympy.Symbol:
    return sympy.Symbol(TWO_TUBES_NAME, real=True)


def anyon_tube_symbol(species_name: str, tubes: int = 1) -> sympy.Symbol:
    """The coefficient of the coverage (tubes = 1) or of its square (tubes = 2) in b_2 of the anyons."""
    return sympy.Symbol((ANYON_TUBE_PREFIX if tubes == 1 else ANYON_TWO_TUBES_PREFIX) + species_name, real=True)


def braid_tube_symbol(first: str, second: str, tubes: int = 1) -> sympy.Symbol:
    """The piece of two distinct species, named in their order of declaration (tubes as for the anyons)."""
    prefix = BRAID_TUBE_PREFIX if tubes == 1 else BRAID_TWO_TUBES_PREFIX
    return sympy.Symbol(f"{prefix}{first}_{second}", real=True)


def pair_splits(names, text: str) -> list[tuple[str, str]]:
    """Every (first, second) of declared species, first declared before second, whose braid-piece name
    ends in `text` (species names may hold underscores: more than one split is a collision)."""
    order = {name: k for k, name in enumerate(names)}
    return [(text[:k], text[k + 1:]) for k in range(len(text)) if text[k] == "_"
            and text[:k] in order and text[k + 1:] in order and order[text[:k]] < order[text[k + 1:]]]


@dataclass(frozen=True)
class TubePiece:
    """A named tube piece: `species` is the mobile species it belongs to (None for T_two_tubes); for the
    piece of two braiding species `pair` is the text after the prefix (`pair_of` resolves it); `tubes`
    is the power of the coverage it multiplies in b_2 or b_11 (2: the four-body pieces)."""

    symbol: sympy.Symbol
    species: str | None
    pair: str | None = None
    tubes: int = 1

    def pair_of(self, system) -> tuple[str, str]:
        """The two species of a braid piece in this system (the first split: a collision is refused at
        the species' lines by `routes/pairphase`)."""
        return pair_splits(system.species_names, self.pair)[0]

    def definitions(self, system) -> list[tuple[str, sympy.Expr]]:
        """(kind, expression) of what it depends on, kinds as in `pieces._definitions`."""
        out = [("flux", system.tubes.flux)]
        if self.species is not None:
            species = system.species[system.species_names.index(self.species)]
            out.append(("exchange", species.exchange))
            if self.tubes == 2:
                out.append(("smooth", species.mass / system.reference_mass))
        if self.pair is not None:
            first, second = self.pair_of(system)
            masses = [system.species[system.species_names.index(name)].mass for name in (first, second)]
            out += [("mutual", system.mutual(first, second)), ("smooth", masses[0] / masses[1])]
            if self.tubes == 2:
                out.append(("smooth", masses[1] / system.reference_mass))
        return out

    def value_at(self, system, point) -> sympy.Expr | None:
        """The exact value where it is known (`exactly`), else None."""
        known = self.exactly(system, point)
        return None if known is None else known[0]

    def exactly(self, system, point) -> tuple[sympy.Expr, str] | None:
        """(exact value, why) where the piece is known for every value of the parameters `point`
        ({symbol: exact number}) leaves free, else None: zero at an integer flux (no Aharonov-Bohm phase,
        period 1); the braid piece zero where the mutual parameter is an integer (period 1: the relative
        phase is 1 on every pair of loops, D = 0 loop by loop); the anyon-tube piece +-F/2 at the bose
        (fermi) points, F = -s(1 - s)/2, s = flux mod 1: the l = 2 cycle of the ideal-gas b_2, whose n
        term is (+-1) F/2 (docs/tubes.md (ii): alpha = 0 gives (1/4) E[X of duration 2] = F/2). Integrality
        is decided exactly (sympy), never with floats; undecided means unknown."""
        from ..exact.periods import braids, reduced, species_statistics
        params = {p.symbol: p for p in system.parameters}
        flux = sympy.sympify(system.tubes.flux).subs(point)
        if _exactly_integer(flux):
            return sympy.Integer(0), "integer flux"
        if self.pair is not None:
            first, second = self.pair_of(system)
            mutual = sympy.sympify(system.mutual(first, second)).subs(point)
            if braids(mutual, params) is False:
                return sympy.Integer(0), f"{first} and {second} do not braid here"
            return None
        if self.species is None:
            return None
        import dataclasses
        species = system.species[system.species_names.index(self.species)]
        there = dataclasses.replace(species, exchange=sympy.sympify(species.exchange).subs(point))
        stats = species_statistics(there, params)
        if stats not in ("bose", "fermi"):
            return None
        sign, word, half = (1, "boson", "F/2") if stats == "bose" else (-1, "fermion", "-F/2")
        if self.tubes == 2:   # the ideal 2-cycle's coverage-squared term, (+-1) T2 m_ref / (2 m)
            ratio = sympy.sympify(species.mass / system.reference_mass).subs(point)
            return (sign * two_tubes_symbol() / (2 * ratio),
                    f"{self.species} is a {word} here, {'' if sign > 0 else '-'}{TWO_TUBES_NAME} m_ref/(2 m)")
        s = reduced(flux, 1, params)   # the one-tube shift -s(1 - s)/2 (as routes/pairphase.flux_shift)
        return (sympy.expand(sign * (-s * (1 - s) / 2) / 2),
                f"{self.species} is a {word} here, {half} with F = -s(1 - s)/2, s = flux mod 1")

    def text(self, system) -> str:
        flux = system.tubes.flux
        n = system.tubes.coverage
        power, count = (str(n), "one tube") if self.tubes == 1 else (f"{n}^2", "two tubes")
        if self.pair is not None:
            first, second = self.pair_of(system)
            how = "sampled" if self.tubes == 1 else "not sampled; derived near zero flux"
            return (f"{self.symbol} = the coefficient of {power} in b_(e_{first} + e_{second}) (two braiding particles "
                    f"and {count}; {how}, docs/tubes.md), 0 where they do not braid")
        if self.species is None:
            return (f"{self.symbol} = T2({flux}): the connected integral of one loop of duration beta and two tubes "
                    "of this flux (sampled, docs/tubes.md); b_l of a bose/fermi species gains "
                    f"(+-1)^(l+1) {n}^2 {self.symbol} m_ref/(2 m)")
        if self.tubes == 2:
            return (f"{self.symbol} = the coefficient of {n}^2 in b[2] of species {self.species} (two anyons and two "
                    f"tubes; not sampled, derived near zero flux, docs/tubes.md), +-{TWO_TUBES_NAME} m_ref/(2 m) at "
                    "the bose/fermi points")
        return (f"{self.symbol} = the coefficient of {n} in b[2] of species {self.species} "
                "(two anyons and one tube; sampled, docs/tubes.md), +-F/2 at the bose/fermi points")

    @property
    def latex_name(self) -> str:
        """The name in the LaTeX output (T with the subscript "2 tubes"; B with "tube" over the species,
        "braid" over the pair; "2 tubes" / "braid, 2 tubes" for the coverage-squared pieces)."""
        two = r",\,2\,tubes" if self.tubes == 2 else ""
        if self.pair is not None:
            pair = self.pair.replace("_", "\\_")
            return rf"B^{{\mathrm{{braid{two}}}}}_{{\mathrm{{{pair}}}}}"
        if self.species is None:
            return r"T_{\mathrm{2\,tubes}}"
        top = "tube" if self.tubes == 1 else r"2\,tubes"
        return rf"B^{{\mathrm{{{top}}}}}_{{\mathrm{{{self.species}}}}}"

    def latex(self, system) -> str:
        name = self.latex_name
        n = sympy.latex(system.tubes.coverage)
        power, count, how = (n, "one tube", "sampled") if self.tubes == 1 else \
            (f"{n}^2", "two tubes", "not sampled; derived near zero flux")
        if self.pair is not None:
            first, second = self.pair_of(system)
            return (rf"${name}$ is the coefficient of ${power}$ in $b_{{11}}$ of species "
                    rf"{first} and {second} (two braiding particles and {count}; {how}).")
        if self.species is None:
            return (rf"${name}$ is the connected integral of one loop of duration $\beta$ and two tubes of this "
                    r"flux (sampled); $b_{l e_i}$ of a bose/fermi species gains "
                    rf"$(\pm1)^{{l+1}}\,{n}^2\,{name}\,m_{{\mathrm{{ref}}}}/(2m_i)$.")
        return (rf"${name}$ is the coefficient of ${power}$ in $b_2$ of species "
                rf"{self.species} (two anyons and {count}; {how}).")


def _exactly_integer(value) -> bool:
    """Whether a value is an integer, decided exactly by sympy (False when undecided)."""
    value = sympy.sympify(value)
    if not value.is_number:
        return value.is_integer is True
    return sympy.simplify(value).is_integer is True


def exact_tube_values(system, symbols, point) -> dict[sympy.Symbol, tuple[sympy.Expr, str]]:
    """{piece: (exact value, why)} for the tube pieces among `symbols` that are exactly known at `point`
    ({parameter symbol: exact number}; `TubePiece.exactly`), the others left out."""
    if system.tubes is None:
        return {}
    out = {}
    for symbol in sorted(symbols, key=lambda s: s.name):
        piece = tube_piece(symbol)
        known = None if piece is None else piece.exactly(system, point)
        if known is not None:
            out[symbol] = known
    return out


def tube_piece(symbol) -> TubePiece | None:
    """The tube piece a symbol names, else None."""
    name = getattr(symbol, "name", "")
    if name == TWO_TUBES_NAME:
        return TubePiece(two_tubes_symbol(), None)
    match = _BRAID.match(name)
    if match:
        return TubePiece(sympy.Symbol(name, real=True), None, match.group(2), 1 if match.group(1) == "tube" else 2)
    match = _ANYON.match(name)
    if not match:
        return None
    tubes = 1 if match.group(1) == "tube" else 2
    return TubePiece(anyon_tube_symbol(match.group(2), tubes), match.group(2), None, tubes)


def pieces_of(system) -> list[TubePiece]:
    """The tube pieces of a system with tubes: T_two_tubes (in every b_(e_i)), one anyon-tube piece per
    anyonic species and one braid-tube piece per braiding pair, and with `to order 2` their
    coverage-squared pieces (for the glossary of every format)."""
    from ..exact.periods import species_statistics
    if system.tubes is None:
        return []
    params = {p.symbol: p for p in system.parameters}
    powers = (1, 2) if system.tubes.order == 2 else (1,)
    return [TubePiece(two_tubes_symbol(), None)] + [
        TubePiece(anyon_tube_symbol(s.name, k), s.name, None, k) for s in system.species for k in powers
        if species_statistics(s, params) not in ("bose", "fermi")] + [
        TubePiece(braid_tube_symbol(a, b, k), None, f"{a}_{b}", k) for a, b in braiding_pairs(system) for k in powers]


def braiding_pairs(system) -> list[tuple[str, str]]:
    """(first, second) in declaration order for every pair of species that may braid (a mutual parameter
    that is not surely an integer): their b_11 holds a braid-tube piece among tubes."""
    from ..exact.periods import braids
    params = {p.symbol: p for p in system.parameters}
    names = system.species_names
    return [(a, b) for k, a in enumerate(names) for b in names[k + 1:]
            if braids(system.mutual(a, b), params) is not False]


def coverage_truncation(system, value) -> tuple[sympy.Expr, str | None]:
    """(value without its O term, the note that says what is left out) for a series truncated in the
    tube coverage alone; (value, None) for a closed form; None for a series truncated in anything else
    (a given series in a statistics parameter: a table of it would be a polynomial in disguise)."""
    order = value.getO() if hasattr(value, "getO") else None
    if order is None:
        return value, None
    tubes = getattr(system, "tubes", None)
    if tubes is None or order.expr.free_symbols != {tubes.coverage}:
        return None
    note = f"truncated series, {sympy.sstr(order)} left out"
    if tubes.value is not None:
        note += f", {tubes.coverage} = {sympy.sstr(tubes.value)}"
    return value.removeO(), note
