"""Pair phases in the plane (route R3): exact two-body cluster coefficients, and the truncation
bookkeeping of the higher ones.

Harmonic regulator (x = e^{-beta hbar omega}): the relative motion of two particles has energies
hbar omega (2 n_r + |l + s| + 1). Summing the channels in closed form for s in its fundamental interval:

    identical (l even, s = alpha in [0, 2)):   Z_rel = x (x^s + x^{2-s}) / (1 - x^2)^2,
    distinct  (all l,  s = alpha_ij in [0, 1)): Z_rel = x (x^s + x^{1-s}) / ((1 - x)(1 - x^2)).

The centre of mass (mass M = m_i + m_j, same omega) has the one-body spectrum, so with the R2 weight
(M/m_ref)^{d/2}, d = 2,

    b_2(alpha)  - b_2(0)  = 2 lim [Z_rel(s) - Z_rel(0)] = s^2/2 - s,
    b_11(alpha) - b_11(0) = (M/m_ref) lim [Z_rel(s) - Z_rel(0)] = -(M/2 m_ref) s (1 - s).

Hence b_2 = (m_i/m_ref)(1/4 - s + s^2/2) with s = alpha mod 2 (even, period 2, kink at the boson
points), b_11 = -((m_i + m_j)/(2 m_ref)) s(1 - s) with s = alpha_ij mod 1. A static flux tube of flux
gamma (in flux quanta) shifts a mobile particle's partition function by -s(1 - s)/2, s = gamma mod 1,
independently of temperature and mass; each l-cycle of an ideal mobile species feels it once.
"""
from __future__ import annotations

from dataclasses import dataclass

import sympy

from ..model import Parameter
from ..periods import braids, coupled_groups, species_statistics


class PeriodicPart(sympy.Function):
    """x mod p as a function sympy can evaluate, differentiate (slope 1 away from the jumps, where the
    two-body coefficients are continuous anyway) and print: `Mod(x, p)` in text, (x mod p) in LaTeX."""

    nargs = 2

    @classmethod
    def eval(cls, x, p):
        if x.is_number and p.is_number:
            return sympy.Mod(x, p)
        return None

    def fdiff(self, argindex=1):
        if argindex == 1:
            return sympy.Integer(1)
        raise sympy.ArgumentIndexError(self, argindex)

    def _eval_evalf(self, prec):
        x, p = self.args
        value = sympy.Mod(x, p)
        return None if value.has(PeriodicPart) else value.evalf(prec)

    def _sympystr(self, printer):
        return f"Mod({printer._print(self.args[0])}, {printer._print(self.args[1])})"

    def _latex(self, printer, exp=None):
        body = rf"\left({printer._print(self.args[0])} \bmod {printer._print(self.args[1])}\right)"
        return body if exp is None else rf"{body}^{{{exp}}}"

    def floor_form(self) -> sympy.Expr:
        x, p = self.args
        return x - p * sympy.floor(x / p)


def reduced(value: sympy.Expr, period: int, parameters: dict[sympy.Symbol, Parameter]) -> sympy.Expr:
    """value mod period, written without floor when the declared range keeps it in one branch."""
    value = sympy.sympify(value)
    if value.is_number:
        return PeriodicPart(value, period)
    low, high = _range_of(value, parameters)
    if low is not None and high is not None:
        k = sympy.floor(low / period)
        if bool(high <= (k + 1) * period) or (bool(sympy.Eq(high, (k + 1) * period)) and _open_top(value, parameters)):
            return sympy.expand(value - k * period)
    return PeriodicPart(value, period)


def _range_of(value, parameters):
    """A range for a linear expression c*p + d in one declared parameter p, else (None, None)."""
    symbols = list(value.free_symbols)
    if len(symbols) != 1 or symbols[0] not in parameters:
        return None, None
    p = parameters[symbols[0]]
    if p.lower is None or p.upper is None:
        return None, None
    poly = sympy.Poly(value, symbols[0]) if value.is_polynomial(symbols[0]) else None
    if poly is None or poly.degree() > 1:
        return None, None
    ends = sorted([value.subs(symbols[0], p.lower), value.subs(symbols[0], p.upper)])
    return ends[0], ends[1]


def _open_top(value, parameters) -> bool:
    return False


def exchange_b2(alpha: sympy.Expr, mass_ratio: sympy.Expr, parameters) -> sympy.Expr:
    """b_{2 e_i} of identical anyons with exchange parameter alpha (period 2)."""
    s = reduced(alpha, 2, parameters)
    return _tidy(mass_ratio * (sympy.Rational(1, 4) - s + s ** 2 / 2))


def mutual_b11(alpha_ij: sympy.Expr, total_mass_ratio: sympy.Expr, parameters) -> sympy.Expr:
    """b_{e_i + e_j} of two distinct species with mutual parameter alpha_ij (period 1)."""
    s = reduced(alpha_ij, 1, parameters)
    return _tidy(-total_mass_ratio * s * (1 - s) / 2)


def flux_shift(gamma: sympy.Expr, parameters) -> sympy.Expr:
    """Z(gamma) - Z(0) for one particle around one flux tube: -s(1 - s)/2, s = gamma mod 1."""
    s = reduced(gamma, 1, parameters)
    return _tidy(-s * (1 - s) / 2)


def _tidy(expr: sympy.Expr) -> sympy.Expr:
    """Expanded when polynomial in the parameters; the periodic (Mod) form is kept factored."""
    return expr if expr.has(PeriodicPart) else sympy.expand(expr)


def kinks(expr: sympy.Expr, symbol: sympy.Symbol, point) -> bool:
    """True when expr has a floor (periodic extension) whose argument is an integer at the point, so
    that left and right expansions differ in general."""
    for f in expr.atoms(sympy.floor):
        if symbol in f.free_symbols and f.args[0].subs(symbol, point).is_integer:
            return True
    for m in expr.atoms(sympy.Mod, PeriodicPart):
        if symbol in m.free_symbols and (m.args[0].subs(symbol, point) / m.args[1]).is_integer:
            return True
    return False


def one_sided_series(expr: sympy.Expr, symbol: sympy.Symbol, point, order: int, side: str) -> sympy.Expr:
    """Taylor polynomial through (symbol - point)^order of expr approached from `side` ("above"/
    "below"): floors are frozen at their one-sided limits, leaving a polynomial branch."""
    eps = sympy.Rational(1, 10 ** 9)
    probe = point + (eps if side == "above" else -eps)
    expr = expr.replace(lambda e: isinstance(e, PeriodicPart), lambda e: e.floor_form())
    frozen = expr.subs({f: sympy.floor(f.args[0].subs(symbol, probe)) for f in expr.atoms(sympy.floor)
                        if symbol in f.free_symbols})
    frozen = frozen.subs({m: m.args[0] - m.args[1] * sympy.floor((m.args[0] / m.args[1]).subs(symbol, probe))
                          for m in frozen.atoms(sympy.Mod) if symbol in m.free_symbols})
    u = sympy.Symbol("u_shift")
    shifted = sympy.expand(frozen.subs(symbol, point + u))
    taylor = sympy.series(shifted, u, 0, order + 1).removeO() if not shifted.is_polynomial(u) else shifted
    poly = sympy.Poly(sympy.expand(taylor), u)
    kept = sum(c * u ** k for (k,), c in zip(poly.monoms(), poly.coeffs()) if k <= order)
    return sympy.expand(kept.subs(u, symbol - point))


def two_body_clusters(system, order: int) -> dict:
    """b_n for the pair-phase regime: b_{e_i} (with the first-order flux-tube shift), the exact
    |n| = 2 coefficients, the ideal-gas b_{l e_i} of species that are bosons or fermions modulo the
    exchange period 2 (with their tube shift), zero for every n whose species fall into groups that do
    not braid with each other (mutual parameters that are integers, period 1: the Hamiltonian
    separates and ln Xi is additive), and for everything else None (a many-body piece: a named symbol
    unless given)."""
    from ..series import indices_up_to
    params = {p.symbol: p for p in system.parameters}
    species = system.species
    K = len(species)
    m_ref = system.reference_mass
    tubes = system.tubes
    shift = flux_shift(tubes.flux, params) * tubes.coverage if tubes is not None else sympy.Integer(0)
    ideal = [species_statistics(s, params) for s in species]
    coupled = braiding_relation(system)
    out = {}
    for n in indices_up_to(K, order):
        occupied = [i for i in range(K) if n[i]]
        if len(occupied) == 1:
            i = occupied[0]
            l = n[i]
            ratio = species[i].mass / m_ref
            if l == 1:
                out[n] = ratio + shift
            elif ideal[i] in ("bose", "fermi"):  # ideal within the species: every l-cycle exact
                sign = 1 if ideal[i] == "bose" or l % 2 else -1
                out[n] = sympy.expand(sign * (ratio / sympy.Integer(l) ** 2 + shift / l))
            elif l == 2:
                out[n] = exchange_b2(species[i].exchange, ratio, params)
            else:
                out[n] = None
        elif len(coupled_groups(occupied, coupled)) > 1:
            out[n] = sympy.Integer(0)  # species that do not braid with each other: no mixed b
        elif len(occupied) == 2 and sum(n) == 2:
            i, j = occupied
            out[n] = mutual_b11(system.mutual(system.species_names[i], system.species_names[j]),
                                (species[i].mass + species[j].mass) / m_ref, params)
        else:
            out[n] = None
    return out


def braiding_relation(system):
    """coupled(i, j): False when species i and j surely do not braid (mutual parameter an integer,
    undeclared counts as 0), True otherwise (a braiding or undecided mutual parameter)."""
    params = {p.symbol: p for p in system.parameters}
    names = system.species_names

    def coupled(i: int, j: int) -> bool:
        return braids(system.mutual(names[i], names[j]), params) is not False
    return coupled


def separates(system, index) -> bool:
    """True when the species of `index` fall into groups that do not braid with each other: every
    coefficient (b, a, density, fugacity) at that multi-index vanishes exactly, whatever is given."""
    occupied = [i for i in range(len(index)) if index[i]]
    return len(occupied) > 1 and len(coupled_groups(occupied, braiding_relation(system))) > 1


ADJECTIVE = {"bose": "bosonic", "fermi": "fermionic"}


def known_piece(system, index) -> str | None:
    """Why b_index (|index| >= 3) of the pair-phase regime is known exactly, or None for a genuine
    many-body piece: the words of an error message refusing a given value for it."""
    params = {p.symbol: p for p in system.parameters}
    occupied = [i for i in range(len(index)) if index[i]]
    names = system.species_names
    if len(occupied) == 1:
        s = system.species[occupied[0]]
        stats = species_statistics(s, params)
        if stats in ("bose", "fermi") and not s.statistics:
            return (f"species {s.name} has exchange parameter {s.exchange}, which is {ADJECTIVE[stats]} modulo the "
                    f"period 2: an ideal {stats.capitalize()} gas, every b_l known exactly")
        if stats in ("bose", "fermi"):
            return f"species {s.name} is an ideal {stats.capitalize()} gas: every b_l is known exactly"
        return None
    if separates(system, index):
        groups = coupled_groups(occupied, braiding_relation(system))
        parts = " | ".join(", ".join(names[i] for i in sorted(g)) for g in groups)
        return (f"the species in it fall into groups that do not braid with each other ({parts}; a mutual "
                "parameter that is an integer, or undeclared, means no coupling, period 1): the Hamiltonian "
                "separates, ln Xi is additive and this mixed coefficient vanishes exactly")
    return None


def refuse_known_given(system) -> None:
    """A given b or a of the pair-phase regime must be a genuine many-body piece: refuse one whose value
    is known exactly (ideal species modulo the exchange period, species that do not braid)."""
    from ..errors import InputError
    for v in system.source.values:
        why = known_piece(system, v.index)
        if why:
            letter = "b" if v.kind == "cluster" else "a"
            raise InputError(f"{letter}{list(v.index)} is known exactly here, do not give it: {why}", v.span)


def virials_with_known_clusters(pieces: dict, given: dict, order: int, K: int, truncation=None) -> dict:
    """a_n for `clusters pairphase { a[...] = ... }` when some b_n with |n| >= 3 are known exactly (ideal
    species, species that do not braid) and the others are many-body pieces named or given as a_n.

    a_n = c_n b_n + (b_m with m < n) with c_n a nonzero constant, so the relations are triangular:
    every unknown b_n is a placeholder, solved (in increasing total order) from its a_n, which is the
    given value or the named a_n symbol; a known b_n gives its a_n through the reversion."""
    from ..naming import virial_symbol
    from ..virial import cluster_to_virial
    placeholders = {n: sympy.Symbol(f"placeholder_b_{'_'.join(map(str, n))}") for n, v in pieces.items() if v is None}
    b = {n: placeholders.get(n, v) for n, v in pieces.items()}
    a = dict(cluster_to_virial(b, order, K, truncation=truncation).virial)
    solved: dict = {}
    for n in sorted(placeholders, key=lambda n: (sum(n), tuple(-k for k in n))):
        target = given.get(n, virial_symbol(n))
        expr = sympy.expand(sympy.sympify(a[n]).subs(solved))
        slope = sympy.diff(expr, placeholders[n])
        if slope == 0 or slope.has(*placeholders.values()):
            raise ValueError(f"a{list(n)} does not determine b{list(n)} linearly")
        solved[placeholders[n]] = sympy.expand((target - (expr - slope * placeholders[n])) / slope)
        a[n] = target
    for n, value in a.items():
        if n not in placeholders:
            a[n] = sympy.expand(sympy.sympify(value).subs(solved))
    return a


def split_truncation(value: sympy.Expr) -> tuple[sympy.Expr, dict]:
    """A given value without its O(...) terms, and {symbol: first unknown power} from those terms."""
    value = sympy.sympify(value)
    if not value.has(sympy.Order):
        return value, {}
    limits = {}
    for term in sympy.Add.make_args(value):
        if isinstance(term, sympy.Order):
            base, e = term.expr.as_base_exp()
            if isinstance(base, sympy.Symbol) and e.is_Integer and e > 0:
                limits[base] = min(int(e), limits.get(base, int(e)))
    return value.removeO(), limits


def truncation_problem(value: sympy.Expr) -> str | None:
    """Why the O(...) terms of a given value cannot be read as honest truncation orders, else None.
    Each must be O(p^k) for one parameter p about 0 and k >= 1; sympy would silently swallow the
    known terms into anything else (1 + g + O(1/g) is O(1/g))."""
    value = sympy.sympify(value)
    orders = [t for t in sympy.Add.make_args(value) if isinstance(t, sympy.Order)]
    if not orders and value.has(sympy.Order):
        return "an O(...) term must be added to the known terms, not multiplied or nested"
    for term in orders:
        base, e = term.expr.as_base_exp()
        if not (isinstance(base, sympy.Symbol) and e.is_Integer and e > 0) or term.point[0] != 0:
            return (f"cannot read O({sympy.sstr(term.expr)}) as a truncation order: write O(p^k) with one parameter p "
                    "and k >= 1 (several parameters: O(p^k) + O(q^m))")
    return None


def truncate(value: sympy.Expr, limits: dict) -> sympy.Expr:
    """value as a polynomial in the truncated symbols with every power at or beyond its limit dropped,
    plus the O term that says so."""
    value = sympy.expand(value)
    for symbol, k in sorted(limits.items(), key=lambda item: item[0].name):
        if any(symbol in m.free_symbols for m in value.atoms(sympy.Mod, sympy.floor, PeriodicPart)):
            raise ValueError(f"cannot truncate a periodic (piecewise) dependence on {symbol}")
        if not value.is_polynomial(symbol):
            value = sympy.expand(sympy.series(value, symbol, 0, k).removeO())
        value = sum((term for term in sympy.Add.make_args(value) if sympy.degree(term, symbol) < k), sympy.Integer(0))
    orders = [sympy.Order(s ** k) for s, k in sorted(limits.items(), key=lambda item: item[0].name)]
    return sympy.Add(value, *orders) if orders else value


@dataclass(frozen=True)
class SeriesPiece:
    """One printed series of one coefficient: polynomial + remainder, through (variable - point)^known.

    `side` is None for an analytic (two-sided) expansion, else "above"/"below"; `kink` says the
    coefficient is not analytic at the point (the |alpha| term), `edge` that the point ends the
    parameter's declared range. `remainder` holds the O terms: the expansion's own and those of
    given truncated series in other parameters."""

    variable: sympy.Symbol
    point: sympy.Expr
    order: int
    known: int
    side: str | None
    kink: bool
    edge: bool
    polynomial: sympy.Expr
    remainder: tuple
    unknowns: tuple = ()  # `pieces.Unknown`s: named Taylor coefficients of many-body pieces in `polynomial`
    notes: tuple = ()

    @property
    def one_sided(self) -> bool:
        return self.side is not None

    @property
    def description(self) -> str:
        where = f"{self.variable} = {self.point}"
        if self.side is None:
            text = "analytic"
        elif self.kink:
            text = f"non-analytic at {where}, from {self.side}"
        else:
            text = f"one-sided: {where} ends the declared range, from {self.side}"
        if self.known < self.order:
            text += f"; the given series stop at order {self.known}"
        for note in self.notes:
            text += f"; {note}"
        return text


def _range_edge(symbol, point, parameters) -> str | None:
    p = next((p for p in (parameters or ()) if p.symbol == symbol), None)
    if p is None:
        return None
    if p.lower is not None and sympy.simplify(point - p.lower) == 0:
        return "lower"
    if p.upper is not None and sympy.simplify(point - p.upper) == 0:
        return "upper"
    return None


def _constant_givens(system, symbol, index) -> tuple[str, ...]:
    """Notes on given exact pieces the coefficient uses that do not contain `symbol` although the piece
    depends on it: the series takes them as the user gave them, constant in `symbol`."""
    from ..naming import cluster_symbol, coefficient_label, virial_symbol
    from ..pieces import depends_on
    out = []
    for v in system.source.values:
        if v.value.has(sympy.Order) or v.value.has(symbol) or index is None \
                or not all(a <= b for a, b in zip(v.index, index)):
            continue
        piece = (cluster_symbol if v.kind == "cluster" else virial_symbol)(v.index)
        if symbol in depends_on(system, piece):
            out.append(f"{coefficient_label(v.kind, v.index)} as given, taken as independent of {symbol}")
    return tuple(out)


def expansion_of(label: str, value: sympy.Expr, expansion, system, index=None) -> list[SeriesPiece]:
    """The series of one coefficient for one `expand` request (one piece per side); refuses a kinked
    expansion asked as if analytic, a side outside the declared range, and a series about another
    point than that of a given truncated series. Named many-body pieces that depend on the variable
    are expanded too, with named Taylor coefficients (`pieces.expand_pieces`)."""
    from ..errors import InputError
    from ..pieces import any_kink, expand_pieces
    parameters = system.parameters
    symbol, point, order, side, span = (expansion.symbol, expansion.point, expansion.order, expansion.side,
                                        expansion.span)
    exact, limits = split_truncation(value)
    known = order
    if symbol in limits:
        if point != 0:
            raise InputError(f"{label} is known only as a series about {symbol} = 0 (to O({symbol}^{limits[symbol]})); "
                             f"it cannot be expanded about {symbol} = {point}", span)
        known = min(order, limits[symbol] - 1)
    kinked = kinks(exact, symbol, point) or any_kink(system, exact, symbol, point)
    edge = _range_edge(symbol, point, parameters)
    inside = {"lower": "above", "upper": "below", None: None}[edge]
    if side is None:
        if kinked and edge is None:
            raise InputError(f"{label} is not analytic at {symbol} = {point} (a kink, |{symbol}| term): say "
                             "`from above`, `from below` or `from both`", span)
        sides = (inside,)
    else:
        sides = ("above", "below") if side == "both" else (side,)
        if edge is not None and any(s != inside for s in sides):
            raise InputError(f"{symbol} = {point} ends the declared range of {symbol}: only `from {inside}` stays "
                             "inside it", span)
        if not kinked and edge is None:
            sides = (None,)
    step = (symbol - point) ** (known + 1)
    own = sympy.Order(step) if point == 0 else sympy.Order(step, (symbol, point))
    others = tuple(sympy.Order(s ** k) for s, k in sorted(limits.items(), key=lambda item: item[0].name)
                   if s != symbol)
    out = []
    notes = _constant_givens(system, symbol, index)
    for s in sides:
        expanded, unknowns = expand_pieces(system, exact, [(symbol, point, known, s)])
        out.append(SeriesPiece(symbol, point, order, known, s, kinked, edge is not None,
                               one_sided_series(expanded, symbol, point, known, s or "above"), (own,) + others,
                               tuple(unknowns), notes))
    return out
