"""Series of printed coefficients and truncation bookkeeping: values known only to some order
(`+ O(p^k)` in given pieces, the tube coverage), one-sided series at kinks (`expand`), and the
`SeriesPiece` every printer shows. Regime-independent: kinks are read off the periodic parts
(`periods.PeriodicPart`, floor, Mod) and named many-body pieces are expanded by `pieces`."""
from __future__ import annotations

from dataclasses import dataclass

import sympy

from .exact.orders import split_truncation, truncation_problem  # noqa: F401 (read here too)
from .exact.periods import PeriodicPart


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
    kept = sum((c * u ** k for (k,), c in zip(poly.monoms(), poly.coeffs()) if k <= order), sympy.Integer(0))
    return sympy.expand(kept.subs(u, symbol - point))


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
    from .naming import cluster_symbol, coefficient_label, virial_symbol
    from .pieces import depends_on
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
    from .errors import InputError
    from .pieces import any_kink, expand_pieces
    parameters = system.parameters
    symbol, point, order, side, span = (expansion.symbol, expansion.point, expansion.order, expansion.side,
                                        expansion.span)
    exact, limits = split_truncation(value)
    _check_point(label, exact, symbol, point, parameters, span)
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
        derived: list[str] = []
        expanded, unknowns = expand_pieces(system, exact, [(symbol, point, known, s)], derived)
        try:
            polynomial = one_sided_series(expanded, symbol, point, known, s or "above")
        except (sympy.PolynomialError, NotImplementedError, ValueError, TypeError) as error:
            raise InputError(f"{label} has no Taylor series in {symbol} about {symbol} = {point} "
                             f"({type(error).__name__}: a pole or a branch point there)", span) from None
        out.append(SeriesPiece(symbol, point, order, known, s, kinked, edge is not None, polynomial,
                               (own,) + others, tuple(unknowns), notes + tuple(derived)))
    return out


def _check_point(label, exact, symbol, point, parameters, span) -> None:
    """Refuse an expansion point outside the declared range (the printed branch holds inside it only)
    and one where a periodic part also depends on other parameters (its jumps are not decided there)."""
    from .errors import InputError
    p = next((p for p in parameters if p.symbol == symbol), None)
    if p is not None:
        below = p.lower is not None and bool(sympy.simplify(point - p.lower) < 0)
        above = p.upper is not None and bool(sympy.simplify(point - p.upper) > 0)
        if below or above:
            raise InputError(f"{symbol} = {point} lies outside the declared range of {symbol}; the coefficients "
                             "are printed for that range only (a periodic closed form on one branch): expand "
                             "about a point inside it, or widen the range", span)
    for part in exact.atoms(sympy.floor, sympy.Mod, PeriodicPart):
        if symbol in part.free_symbols and not part.args[0].subs(symbol, point).is_number:
            raise InputError(f"{label}: its periodic part {sympy.sstr(part)} depends on other parameters too, so "
                             f"whether it jumps at {symbol} = {point} is not decided; declare their ranges inside "
                             "one period", span)
