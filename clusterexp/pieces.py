"""Named many-body pieces (b_3, b_2_1, a_3, ...) as the functions they are.

A piece the tool cannot compute stays a named symbol, but it is not a constant: it is an unknown
function of every parameter in the definition of the species it involves (their masses and exchange
parameters, the mutual parameters among them, and the flux tubes). A series or a truncated
comparison in such a parameter must therefore expand the piece too. This module names its Taylor
coefficients,

    b_3 = b_3_alpha_0 + b_3_alpha_1_above alpha + b_3_alpha_2_above alpha^2 + O(alpha^3)   (alpha -> 0+),

so that every O term printed through a piece is one the tool can back.

Where the expansion point is a kink of the piece, the expansion is one-sided and its coefficients
from above and from below are different unknowns; the value at the point itself (order 0) is shared,
pieces being continuous. A piece is taken to have a kink wherever its pair phases can: an exchange
parameter at a boson point (0 mod 2), a mutual parameter or a tube flux at 0 mod 1 (the |alpha| term
of the exact two-body coefficients; physics.md, route R3). Elsewhere it is taken to be analytic.
"""
from __future__ import annotations

import itertools
import re
from dataclasses import dataclass
from typing import Iterable, Mapping, Sequence

import sympy

from .naming import bracket_label
from .piece_taylor import deviation as deviation_of
from .piece_taylor import carried, expanded, in_shifts, line_coefficient, tube_taylor

_PIECE = re.compile(r"^([ab])_(\d+(?:_\d+)*)$")
SIDE_SIGNS = {"above": "+", "below": "-"}


@dataclass(frozen=True)
class Unknown:
    """One named Taylor coefficient of a piece: the coefficient of prod_v (v - v0)^k_v in `piece`
    about the point, approached from `sides[v]` in the variables where the point is a kink."""

    symbol: sympy.Symbol
    piece: sympy.Symbol
    monomial: tuple[tuple[sympy.Symbol, sympy.Expr, int, str | None], ...]  # (variable, point, power, side)

    @property
    def description(self) -> str:
        """E.g. `coefficient of alpha^2 in b[3] about alpha = 0 from above`, `value of b[3] at alpha = 0`."""
        powers = " ".join(_power_text(v, p, k) for v, p, k, _ in self.monomial if k)
        where = ", ".join(f"{v} = {p}" + (f" from {s}" if s and k else "") for v, p, k, s in self.monomial)
        what = piece_label(self.piece)
        return f"coefficient of {powers} in {what} about {where}" if powers else f"value of {what} at {where}"

    def latex(self, names: Mapping | None = None) -> str:
        """{b_3}^{[alpha^2]+}: the coefficient of alpha^2 from above; b_3|_{alpha=0}: the value there."""
        names = dict(names or {})
        base = names.get(self.piece) or sympy.latex(self.piece)
        factors = []
        for v, p, k, _ in self.monomial:
            if not k:
                continue
            var = sympy.latex(v - p if p != 0 else v, symbol_names=names)
            var = var if p == 0 else rf"({var})"
            factors.append(var if k == 1 else f"{var}^{{{k}}}")
        if not factors:
            where = ",".join(f"{sympy.latex(v, symbol_names=names)}={sympy.latex(p)}" for v, p, _, _ in self.monomial)
            return rf"\left.{base}\right|_{{{where}}}"
        signs = "".join(SIDE_SIGNS[s] for _, _, k, s in self.monomial if s and k)
        return rf"{{{base}}}^{{[{' '.join(factors)}]{signs}}}"

    def latex_description(self, names: Mapping | None = None) -> str:
        """The description with the symbols typeset (for the LaTeX document)."""
        names = dict(names or {})
        powers = [sympy.latex((v - p) ** k if p != 0 else v ** k, symbol_names=names)
                  for v, p, k, _ in self.monomial if k]
        where = ", ".join(f"${sympy.latex(v, symbol_names=names)}={sympy.latex(p)}$"
                          + (f" from {s}" if s and k else "") for v, p, k, s in self.monomial)
        what = f"${names.get(self.piece) or sympy.latex(self.piece)}$"
        if not powers:
            return f"the value of {what} at {where}"
        return f"the coefficient of ${' '.join(powers)}$ in {what} about {where}"


def _power_text(v, p, k) -> str:
    base = str(v) if p == 0 else f"({v} - {p})"
    return base if k == 1 else f"{base}^{k}"


# Every unknown ever named, by its symbol's name. A name is a function of what it means (piece,
# variables, points, powers, sides), so one table serves every derivation.
_NAMED: dict[str, Unknown] = {}


def piece_label(piece: sympy.Symbol) -> str:
    match = _PIECE.match(piece.name)
    if match is None:
        return piece.name
    return f"{match.group(1)}{bracket_label(tuple(int(n) for n in match.group(2).split('_')))}"


def _root(symbol: sympy.Symbol) -> tuple[sympy.Symbol, set]:
    """The generated piece an unknown descends from, and the names of the variables already expanded
    on the way."""
    expanded = set()
    while symbol.name in _NAMED:
        unknown = _NAMED[symbol.name]
        expanded |= {v.name for v, _, _, _ in unknown.monomial}  # names: a symbol's assumptions may differ
        symbol = unknown.piece
    return symbol, expanded


def piece_index(symbol: sympy.Symbol, K: int) -> tuple[int, ...] | None:
    """The multi-index of a generated b/a symbol (or of a named Taylor coefficient of one) of a system
    of K species, else None."""
    root, _ = _root(symbol) if isinstance(symbol, sympy.Symbol) else (symbol, set())
    match = _PIECE.match(getattr(root, "name", ""))
    if not match:
        return None
    index = tuple(int(n) for n in match.group(2).split("_"))
    return index if len(index) == K else None


def _tube_piece(symbol):
    """The tube piece (routes/tube_pieces: T_two_tubes, B_anyon_tube_A) a symbol is, or descends from."""
    from .routes.tube_pieces import tube_piece
    return tube_piece(_root(symbol)[0]) if isinstance(symbol, sympy.Symbol) else None


def tube_latex_names(system) -> dict:
    """The LaTeX names of the tube pieces of a system (routes/tube_pieces), for the printers."""
    from .routes.tube_pieces import pieces_of
    return {piece.symbol: piece.latex_name for piece in pieces_of(system)}


def pieces_in(value: sympy.Expr, K: int) -> list[sympy.Symbol]:
    return sorted((s for s in sympy.sympify(value).free_symbols
                   if piece_index(s, K) is not None or _tube_piece(s) is not None), key=lambda s: s.name)


def unknowns_in(values: Iterable) -> list[Unknown]:
    """The named Taylor coefficients that occur in the given values, sorted by name."""
    names = set()
    for value in values:
        names |= {s.name for s in sympy.sympify(value).free_symbols if s.name in _NAMED}
    return [_NAMED[n] for n in sorted(names)]


def _definitions(system, index, piece=None) -> list[tuple[str, sympy.Expr]]:
    """(kind, expression) of everything a piece with this multi-index (or the tube piece `piece`)
    depends on: kind "exchange" (period 2), "mutual" and "flux" (period 1), "smooth" (masses, the tube
    coverage)."""
    tube = _tube_piece(piece) if piece is not None and system.tubes is not None else None
    if tube is not None:
        return tube.definitions(system)
    if index is None:
        return []
    occupied = [i for i, n in enumerate(index) if n]
    names = system.species_names
    out = []
    for i in occupied:
        out += [("smooth", system.species[i].mass), ("exchange", system.species[i].exchange)]
    out.append(("smooth", system.reference_mass))
    for i, j in itertools.combinations(occupied, 2):
        out.append(("mutual", system.mutual(names[i], names[j])))
    if system.tubes is not None and not tube_free(system, piece):
        out += [("flux", system.tubes.flux), ("smooth", system.tubes.coverage)]
    return out


def tube_free(system, symbol) -> bool:
    """Whether `symbol` is the value at zero tube coverage of a generated piece: the piece of the gas
    without tubes, a function of no flux (its Taylor coefficients are the tube-free ones)."""
    return coverage_power(system, symbol) == 0


def coverage_power(system, symbol) -> int | None:
    """k when `symbol` is the coefficient of coverage^k in a generated piece (k = 0: its value at zero
    coverage), reached by expansions in the coverage alone; else None."""
    if system.tubes is None or not isinstance(symbol, sympy.Symbol):
        return None
    coverage = {s.name for s in sympy.sympify(system.tubes.coverage).free_symbols}
    power = None
    while symbol.name in _NAMED:
        unknown = _NAMED[symbol.name]
        if any(v.name not in coverage or p != 0 for v, p, _, _ in unknown.monomial) or power is not None:
            return None
        power, symbol = sum(k for _, _, k, _ in unknown.monomial), unknown.piece
    return power if _PIECE.match(symbol.name) else None


_PERIODS = {"exchange": 2, "mutual": 1, "flux": 1}


def depends_on(system, piece: sympy.Symbol) -> set[sympy.Symbol]:
    """The parameters a piece (or an unknown Taylor coefficient of one) is a function of."""
    index = piece_index(piece, len(system.species))
    _, expanded = _root(piece)
    return {s for _, e in _definitions(system, index, piece) for s in sympy.sympify(e).free_symbols if s.name not in expanded}


def kinked(system, piece: sympy.Symbol, variable: sympy.Symbol, point) -> bool:
    """Whether the piece may have a kink in `variable` at `point` (a pair phase at its boson point;
    a point where that cannot be decided counts as a kink)."""
    index = piece_index(piece, len(system.species))
    for kind, expr in _definitions(system, index, piece):
        expr = sympy.sympify(expr)
        if kind == "smooth" or variable not in expr.free_symbols:
            continue
        at = expr.subs(variable, point)
        if not at.is_number:
            return True
        if (at / _PERIODS[kind]).is_integer:
            return True
    return False


def any_kink(system, value, variable, point) -> bool:
    return any(variable in depends_on(system, p) and kinked(system, p, variable, point)
               for p in pieces_in(value, len(system.species)))


def depends_through_pieces(system, value, variable) -> bool:
    return any(variable in depends_on(system, p) for p in pieces_in(value, len(system.species)))


def _name(piece, monomial) -> str:
    parts = [piece.name]
    for v, p, k, s in monomial:
        part = f"{v.name}_{k}"
        if p != 0:
            part += "_about_" + re.sub(r"[^0-9a-z]", "_", sympy.sstr(p).replace("-", "m"))
        if s and k:
            part += f"_{s}"
        parts.append(part)
    return "_".join(parts)


def expand_pieces(system, value: sympy.Expr, variables: Sequence[tuple[sympy.Symbol, sympy.Expr, int, str | None]],
                  notes: list | None = None) -> tuple[sympy.Expr, list[Unknown]]:
    """`value` with every named piece that depends on one of the `variables` replaced by its Taylor
    polynomial: the coefficients the perturbative route derives (`derived_taylor`) and the value at a
    point where the regime knows it (`value_at`) exactly, the others named. `variables`: (symbol,
    point, highest power kept, side) with side "above"/"below" used where the point is a kink of the
    piece (None: the caller has checked there is none). Returns the new value and the unknowns
    introduced, in a fixed order; `notes` (a list) receives one line per piece with derived terms."""
    K = len(system.species)
    unknowns: list[Unknown] = []
    replacements = {}
    numbers: dict = {}   # the irrational numbers of derived coefficients -> symbols while expanding (fast)
    for piece in pieces_in(value, K):
        own = depends_on(system, piece)
        used = [(v, p, k, s if kinked(system, piece, v, p) else None) for v, p, k, s in variables if v in own]
        if not used:
            continue
        for v, p, _, s in used:
            if s is None and kinked(system, piece, v, p):
                raise ValueError(f"{piece_label(piece)} is not analytic at {v} = {p}")
        polynomial = sympy.Integer(0)
        derived = derived_taylor(system, piece, used)
        if derived is not None and derived[1] >= 1 and notes is not None:
            reach = f"{derived[1] - 1}, partly {derived[1]}," if derived[2] else f"{derived[1]}"
            source = "docs/tubes.md" if system.tubes is not None and (_tube_piece(piece) or (coverage_power(
                system, piece) or 0) >= 1) \
                else "docs/perturbative.md"
            notes.append(f"{piece_label(piece)} through order {reach} from the perturbative route ({source})")
        for powers in itertools.product(*(range(k + 1) for _, _, k, _ in used)):
            monomial = tuple((v, p, e, s) for (v, p, _, s), e in zip(used, powers))
            coefficient = value_at(system, piece, {v: p for v, p, _, _ in used}) if not any(powers) else None
            if any(powers) and not all(powers):   # known on the whole line (integer flux, no braiding, bosons)
                line = value_at(system, piece, {v: p for (v, p, _, _), e in zip(used, powers) if not e})
                if line is not None and not pieces_in(line, K):
                    coefficient = line_coefficient(line, [(v, p, e, s) for (v, p, _, s), e in zip(used, powers) if e])
            if derived is not None and sum(powers) <= derived[1] and powers not in derived[2]:
                coefficient = carried(derived[0].get(powers, sympy.Integer(0)), numbers)
            if coefficient is None:
                unknown = Unknown(sympy.Symbol(_name(piece, monomial)), piece, monomial)
                _NAMED.setdefault(unknown.symbol.name, unknown)
                unknowns.append(unknown)
                coefficient = unknown.symbol
            polynomial += coefficient * sympy.Mul(*((v - p) ** e for v, p, e, _ in monomial))
        replacements[piece] = polynomial
    if not replacements:
        return value, []
    back = {symbol: number for number, symbol in numbers.items()}
    return expanded(sympy.sympify(value).xreplace(replacements)).xreplace(back), unknowns


def value_at(system, piece: sympy.Symbol, point: Mapping) -> sympy.Expr | None:
    """The exact value of a cluster piece at a point of its parameters where the regime knows it
    (e.g. every pair phase at a boson or fermion point, or no braiding left inside the cluster),
    else None. The pieces are continuous there, so this is also the order-0 Taylor coefficient from
    either side."""
    import dataclasses

    from .routes import regime_of
    from .routes.pairphase import two_body_clusters
    if not regime_of(system).named_pieces:
        return None
    if piece.name in _NAMED:
        return _coverage_part_at(system, piece, point)
    tube = _tube_piece(piece) if system.tubes is not None else None
    if tube is not None:
        return tube.value_at(system, {v: sympy.sympify(p) for v, p in point.items()})
    if not piece.name.startswith("b_"):
        return None
    index = piece_index(piece, len(system.species))
    point = {v: sympy.sympify(p) for v, p in point.items()}

    def at(expr):
        return sympy.sympify(expr).subs(point)
    species = tuple(dataclasses.replace(s, mass=at(s.mass), exchange=at(s.exchange)) for s in system.species)
    mutuals = tuple(dataclasses.replace(m, value=at(m.value)) for m in system.mutuals)
    tubes = system.tubes and dataclasses.replace(system.tubes, flux=at(system.tubes.flux),
                                                 coverage=at(system.tubes.coverage))
    there = dataclasses.replace(system, species=species, mutuals=mutuals, tubes=tubes)
    value = two_body_clusters(there, sum(index)).get(index)
    return None if value is None else sympy.expand(value)


def _coverage_part_at(system, piece: sympy.Symbol, point: Mapping) -> sympy.Expr | None:
    """value_at for the coefficient of a power of the tube coverage in a generated b (`coverage_power`)."""
    power = coverage_power(system, piece)
    if power is None:
        return None
    from .piece_taylor import coverage_part_at
    return coverage_part_at(system, _root(piece)[0], power, {v: sympy.sympify(p) for v, p in point.items()},
                            value_at)


def derived_taylor(system, piece: sympy.Symbol, used) -> tuple | None:
    """The Taylor coefficients of a cluster piece that the perturbative route derives
    (`routes.perturbative`, docs/perturbative.md), as ({powers of (v - v0) per used variable: value},
    the total order through which the route was asked, the powers it could not derive there), or None
    where it does not apply: every pair
    phase of the piece's species must sit at a boson or fermion point (mutual: an integer) at the
    expansion point, each deviation linear in one expansion variable, masses rational. Among tubes: the
    value at zero coverage of a b piece (the tube-free piece), and the tube pieces themselves about an
    integer flux (`routes.tube_perturbative`, docs/tubes.md)."""
    from .routes import regime_of
    from .routes.perturbative import Species as Perturbed
    from .routes.perturbative import taylor_coefficients
    if not regime_of(system).named_pieces:
        return None
    tube = _tube_piece(piece) if system.tubes is not None and piece.name not in _NAMED else None
    index = piece_index(piece, len(system.species))
    cycle = None
    occupied = [i for i, n in enumerate(index or ()) if n]
    power = coverage_power(system, piece) if tube is None else None
    if power in (1, 2) and _root(piece)[0].name.startswith("b_") and len(occupied) in (1, 2):
        # the coverage (squared) part of b_l of one species (an anyon piece) or of b_{a e_A + b e_B} of two
        from .routes.tube_pieces import TubePiece   # (a braid piece)
        names = [system.species_names[i] for i in occupied]
        cycle = index[occupied[0]] if len(occupied) == 1 else tuple(index[i] for i in occupied)
        tube = TubePiece(piece, names[0], None, power) if len(occupied) == 1 else \
            TubePiece(piece, None, "_".join(names), power)
    if tube is None and (not _root(piece)[0].name.startswith("b_")
                         or ((piece.name in _NAMED or system.tubes is not None) and not tube_free(system, piece))):
        return None
    point = {v: sympy.sympify(p) for v, p, _, _ in used}
    shift = {v: sympy.Symbol(f"u_{v.name}") for v in point}
    side = {v: s for v, _, _, s in used}
    shifts = [shift[v] for v, _, _, _ in used]
    order = min(sum(k for _, _, k, _ in used), 2)   # a box (O(p^2) + O(q^2)) holds p q: total degree 2

    def deviation(expr):
        return deviation_of(expr, point, shift, side)

    def mass(m):   # a mass in units of m_ref at the point, or None
        if sympy.sympify(m / system.reference_mass).free_symbols & set(point):
            return None   # a mass that moves with the expansion variable: not the route's expansion
        m = sympy.sympify(m / system.reference_mass).subs(point)
        return m if m.is_Rational and m > 0 else None
    if tube is not None:
        return tube_taylor(system, tube, deviation, mass, order, shifts, cycle)
    occupied = [i for i, n in enumerate(index) if n]
    deviations = {}   # perturbative symbol -> (deviation in the shifts, sign of |deviation| on the side)
    species, about = [], []
    names = system.species_names
    for i, s in enumerate(system.species):
        m = mass(s.mass)
        if m is None:
            return None
        if i not in occupied:
            species.append(Perturbed(None, m))
            about.append("boson")
            continue
        found = deviation(s.exchange)
        if found is None:
            return None
        at, dev = found
        about.append("boson" if at % 2 == 0 else "fermion")
        symbol = sympy.Symbol(f"e_{i}", real=True) if dev else None
        if dev:
            deviations[symbol] = dev
        species.append(Perturbed(symbol, m))
    mutual = {}
    for i, j in itertools.combinations(occupied, 2):
        found = deviation(system.mutual(names[i], names[j]))
        if found is None:
            return None
        if found[1]:
            mutual[(i, j)] = sympy.Symbol(f"d_{i}_{j}", real=True)
            deviations[mutual[(i, j)]] = found[1]
    terms = taylor_coefficients(species, mutual, index, tuple(about), order, unknown="name")
    found = in_shifts(terms, deviations, shifts)
    return None if found is None else (found[0], order, found[1])


def side_in_range(parameters: Iterable, symbol: sympy.Symbol, point) -> str | None:
    """The side of `point` on which the declared range of `symbol` lies, when the point ends it."""
    p = next((p for p in parameters if p.symbol == symbol), None)
    if p is None:
        return None
    if p.lower is not None and sympy.simplify(p.lower - point) == 0:
        return "above"
    if p.upper is not None and sympy.simplify(p.upper - point) == 0:
        return "below"
    if p.lower is not None and bool(p.lower > point):
        return "above"
    if p.upper is not None and bool(p.upper < point):
        return "below"
    return None


def truncate_pieces(system, value, limits: Mapping[sympy.Symbol, int]) -> tuple[sympy.Expr, list[Unknown]]:
    """For a comparison or value truncated at O(p^k) (about p = 0): the pieces expanded through p^(k-1),
    one-sided on the side of 0 where p's declared range lies; a piece with a kink at 0 whose range
    lies on both sides is refused (InputError without a place: the caller adds it)."""
    variables = []
    for symbol, k in sorted(limits.items(), key=lambda item: item[0].name):
        side = side_in_range(system.parameters, symbol, 0)
        if side is None and any_kink(system, value, symbol, 0):
            from .errors import InputError
            raise InputError(f"the named many-body pieces are not analytic at {symbol} = 0 (boson point): "
                             f"declare the range of {symbol} on one side of 0")
        variables.append((symbol, sympy.Integer(0), k - 1, side))
    return expand_pieces(system, value, variables)


def conditions(system, difference: sympy.Expr) -> list[sympy.Expr] | None:
    """What must hold for `difference` (claimed - derived) to vanish, when it involves named pieces:
    one equation per monomial in the parameters no piece there depends on, when it is a polynomial
    in them (each solved for a piece where it is linear in one), else the whole difference = 0. None:
    no piece involved. A part free of pieces that is not 0 comes back as `sympy.false` (refuted
    whatever the pieces are)."""
    K = len(system.species)
    difference = sympy.expand(difference)
    unknown = pieces_in(difference, K)
    if not unknown:
        return None
    felt = set().union(*(depends_on(system, p) for p in unknown))
    others = sorted(difference.free_symbols - set(unknown) - felt, key=lambda s: s.name)
    parts = [difference]
    if others and difference.is_polynomial(*others):
        parts = [c for c in sympy.Poly(difference, *others).coeffs() if c != 0]
    out = []
    for part in parts:
        involved = pieces_in(part, K)
        if not involved:
            return [sympy.false]
        solved = None
        for piece in reversed(involved):  # the highest-named piece first: b_3_alpha_2 before b_3_alpha_0
            if sympy.degree(part, piece) == 1:
                solution = sympy.solve(part, piece, dict=True)
                if len(solution) == 1:
                    solved = sympy.Eq(piece, sympy.expand(solution[0][piece]), evaluate=False)
                    break
        out.append(solved if solved is not None else sympy.Eq(part, 0, evaluate=False))
    return sorted(out, key=lambda e: sympy.sstr(e))


def refuse_contradicted_given(system) -> None:
    """A given cluster series `b[n] = c_0 + c_1 p + ... + O(p^k)` must agree with the Taylor coefficients
    the tool knows (the value at a boson or fermion point, the perturbative route's derived orders),
    on the side of p = 0 where p's declared range lies; a contradiction is refused at its line."""
    from .errors import InputError
    from .exact.orders import split_truncation
    from .naming import cluster_symbol
    for v in system.source.values:
        exact, limits = split_truncation(v.value)
        if v.kind != "cluster" or len(limits) != 1:
            continue
        (symbol, k), = limits.items()
        if symbol not in depends_on(system, cluster_symbol(v.index)):
            continue
        side = side_in_range(system.parameters, symbol, 0)
        try:
            known, _ = expand_pieces(system, cluster_symbol(v.index), [(symbol, sympy.Integer(0), k - 1, side)])
        except ValueError:   # a kink with no side: the given series is refused elsewhere or cut
            continue
        unknown = {u.symbol for u in unknowns_in([known])}
        stated = sympy.Poly(sympy.expand(exact), symbol) if exact.is_polynomial(symbol) else None
        mine = sympy.Poly(sympy.expand(known), symbol) if known.is_polynomial(symbol) else None
        if stated is None or mine is None:
            continue
        for power in range(k):
            tool = mine.coeff_monomial(symbol ** power)
            if (unknown and tool.has(*unknown)) or pieces_in(tool, len(system.species)):
                continue
            given = stated.coeff_monomial(symbol ** power)
            if sympy.simplify(given - tool) != 0:
                what = "value" if power == 0 else f"coefficient of {symbol}^{power}" if power > 1 else \
                    f"coefficient of {symbol}"
                raise InputError(f"b{list(v.index)} is given with the {what} equal to {given}, but the tool knows it is "
                                 f"{tool} (about {symbol} = 0{' from ' + side if side else ''}: ideal-gas value or "
                                 "perturbative route, docs/perturbative.md)", v.span)
