"""Series of printed coefficients and truncation bookkeeping: values known only to some order
(`+ O(p^k)` in given pieces, the tube coverage), one-sided series at kinks (`expand`), and the
`SeriesPiece` every printer shows. Regime-independent: kinks are read off the periodic parts
(`periods.PeriodicPart`, floor, Mod) and named many-body pieces are expanded by `pieces`."""
from __future__ import annotations

from dataclasses import dataclass

import sympy

from .exact.orders import split_truncation, truncation_problem  # noqa: F401 (read here too)
from .exact.periods import PeriodicPart, frozen_at  # noqa: F401 (frozen_at read here too)


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
    frozen, _ = frozen_at(expr, {symbol: point + (eps if side == "above" else -eps)})
    u = sympy.Symbol("u_shift")
    shifted = sympy.expand(frozen.subs(symbol, point + u))
    taylor = sympy.series(shifted, u, 0, order + 1).removeO() if not shifted.is_polynomial(u) else shifted
    poly = sympy.Poly(sympy.expand(taylor), u)
    kept = sum((c * u ** k for (k,), c in zip(poly.monoms(), poly.coeffs()) if k <= order), sympy.Integer(0))
    return sympy.expand(kept.subs(u, symbol - point))


def _degree(term: sympy.Expr, symbol: sympy.Symbol) -> int:
    """The degree in `symbol` of one term of an expanded polynomial: read off its factors when the symbol
    enters only as a power of itself (the usual case, no Poly built), else sympy.degree."""
    powers = term.as_powers_dict()
    if all(base == symbol or symbol not in base.free_symbols for base in powers):
        exponent = sympy.sympify(powers.get(symbol, 0))
        if exponent.is_Integer:
            return int(exponent)
    return sympy.degree(term, symbol)


def truncate(value: sympy.Expr, limits: dict) -> sympy.Expr:
    """value as a polynomial in the truncated symbols with every power at or beyond its limit dropped,
    plus the O term that says so."""
    value = sympy.expand(value)
    for symbol, k in sorted(limits.items(), key=lambda item: item[0].name):
        if any(symbol in m.free_symbols for m in value.atoms(sympy.Mod, sympy.floor, PeriodicPart)):
            raise ValueError(f"cannot truncate a periodic (piecewise) dependence on {symbol}")
        if not value.is_polynomial(symbol):
            value = sympy.expand(sympy.series(value, symbol, 0, k).removeO())
        value = sympy.Add(*(term for term in sympy.Add.make_args(value) if _degree(term, symbol) < k))
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
    def heading(self) -> str:
        return f"{self.variable} about {self.point} through order {self.known}"

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


@dataclass(frozen=True)
class TotalDegree:
    """The remainder of a joint series: every monomial of total degree `degree` in the deviations
    (p - p0, q - q0, ...) and beyond. `expr` is the sum of the monomials of that degree (printed inside
    O(...) in text and LaTeX)."""

    degree: int
    deviations: tuple

    @property
    def expr(self) -> sympy.Expr:
        from itertools import combinations_with_replacement
        return sympy.Add(*(sympy.Mul(*c) for c in combinations_with_replacement(self.deviations, self.degree)))

    def __str__(self) -> str:
        return f"O({sympy.sstr(self.expr)})"


@dataclass(frozen=True)
class JointSeriesPiece(SeriesPiece):
    """A joint series in several parameters through total degree `known` (`expand p, q about ...`):
    `variables` ((symbol, point, side), ...), the first repeated in variable/point/side."""

    variables: tuple = ()

    @property
    def heading(self) -> str:
        names = ", ".join(str(v) for v, _, _ in self.variables)
        points = ", ".join(str(p) for _, p, _ in self.variables)
        return f"{names} about {points} through total degree {self.known}"

    @property
    def description(self) -> str:
        parts = []
        for v, p, s in self.variables:
            if s is not None:
                parts.append(f"{v} from {s}")
        text = "joint Taylor series" + (f"; one-sided: {', '.join(parts)}" if parts else "")
        if self.known < self.order:
            text += f"; the given series stop at total degree {self.known}"
        for note in self.notes:
            text += f"; {note}"
        return text


def _at_point(label, exact, limits, symbol, point, known, system, span):
    """What a series in `symbol` about `point` can be: (highest known order, kinked there, which end of
    the declared range the point is or None, the side inside the range or None); refuses a point
    outside the range and a series of a value known only about 0 taken elsewhere."""
    from .errors import InputError
    from .pieces import any_kink
    _check_point(label, exact, symbol, point, system.parameters, span)
    if symbol in limits:
        if point != 0:
            raise InputError(f"{label} is known only as a series about {symbol} = 0 (to O({symbol}^{limits[symbol]})); "
                             f"it cannot be expanded about {symbol} = {point}", span)
        known = min(known, limits[symbol] - 1)
    kinked = kinks(exact, symbol, point) or any_kink(system, exact, symbol, point)
    edge = _range_edge(symbol, point, system.parameters)
    return known, kinked, edge, {"lower": "above", "upper": "below", None: None}[edge]


def _polynomial_part(frozen, variables, known):
    """The Taylor polynomial through total degree `known` when the frozen value is a polynomial (with
    rational coefficients) in the variables and its other symbols: ring arithmetic, then a filter on the
    total degree in the shifts. Irrational numbers in the coefficients (the sqrt(D) ln u of the closed
    forms, docs/perturbative.md 4k) are carried as generators of the ring and put back at the end. None
    when it is not such a polynomial."""
    from sympy.polys.rings import ring
    from sympy import QQ
    from .piece_taylor import carried
    shifts = [sympy.Dummy(f"u_{v.name}") for v, _, _ in variables]
    numbers: dict = {}   # irrational numeric factors -> generators
    shifted = carried(frozen, numbers).xreplace({v: p + u for (v, p, _), u in zip(variables, shifts)})
    others = sorted(shifted.free_symbols - set(shifts), key=lambda x: x.name)
    try:
        R, *gens = ring(shifts + others, QQ)
        element = R(shifted)
    except Exception:  # noqa: BLE001 - not a polynomial over QQ: the caller takes the series route
        return None
    m = len(shifts)
    kept = R({monomial: c for monomial, c in element.items() if sum(monomial[:m]) <= known})
    back = {u: v - p for (v, p, _), u in zip(variables, shifts)}
    back.update({g: number for number, g in numbers.items()})
    return sympy.expand(kept.as_expr().xreplace(back))


def _series_part(frozen, variables, sign, known, label, span):
    """The Taylor polynomial through total degree `known` by one series in a common scale eps
    (each deviation = its side's sign * eps * a positive symbol)."""
    from .errors import InputError
    eps = sympy.Symbol("eps_joint", positive=True)
    scale = {v: sympy.Symbol(f"u_{v.name}", positive=True) for v, _, _ in variables}
    shifted = sympy.expand(frozen.subs({v: p + sign[v] * eps * scale[v] for v, p, _ in variables}))
    try:
        if not shifted.is_polynomial(eps):
            shifted = sympy.expand(sympy.series(shifted, eps, 0, known + 1).removeO())
        poly = sympy.Poly(shifted, eps)
    except (sympy.PolynomialError, NotImplementedError, ValueError, TypeError) as error:
        raise InputError(f"{label} has no joint Taylor series there ({type(error).__name__}: a pole or a branch "
                         "point)", span) from None
    kept = sum((c for (k,), c in zip(poly.monoms(), poly.coeffs()) if k <= known), sympy.Integer(0))
    back = {scale[v]: sign[v] * (v - p) for v, p, _ in variables}
    return sympy.expand(kept.subs(back))


def joint_expansion_of(label: str, value: sympy.Expr, expansion, system, index=None) -> list[SeriesPiece]:
    """The joint series of one coefficient in the parameters of `expand p, q, ... about p0, q0, ... to k`:
    the Taylor polynomial through total degree k, one-sided in each parameter that has a kink there
    (side from the declared range where the point ends it, else from `from above/below`). Named many-body pieces are expanded with
    the perturbative route's Taylor coefficients where derived and named unknowns beyond."""
    from .errors import InputError
    from .pieces import any_kink, expand_pieces
    parameters, span = system.parameters, expansion.span
    exact, limits = split_truncation(value)
    known = expansion.order
    variables = []
    for symbol, point in expansion.variables:
        known, kinked, edge, inside = _at_point(label, exact, limits, symbol, point, known, system, span)
        side = expansion.side   # for the parameters whose declared range does not end at the point
        if kinked and edge is None and side is None:
            raise InputError(f"{label} is not analytic at {symbol} = {point} (a kink, |{symbol}| term): declare the "
                             f"range of {symbol} on one side of {point}, or say `from above` or `from below`", span)
        variables.append((symbol, point, inside or (side if kinked or edge else None)))
    derived: list[str] = []
    expanded, unknowns = expand_pieces(system, exact, [(v, p, known, s) for v, p, s in variables], derived)
    sign = {v: -1 if s == "below" else 1 for v, _, s in variables}
    probes = {v: p + sign[v] * sympy.Rational(1, 10 ** 9) for v, p, _ in variables}
    frozen, undecided = frozen_at(expanded, probes)
    if undecided is not None:
        raise InputError(f"{label}: its periodic part {sympy.sstr(undecided)} depends on parameters outside the joint "
                         "series, so whether it jumps there is not decided; declare their ranges inside one period "
                         "or add them to the series", span)
    polynomial = _polynomial_part(frozen, variables, known)
    if polynomial is None:
        polynomial = _series_part(frozen, variables, sign, known, label, span)
    unknowns = [u for u in unknowns if polynomial.has(u.symbol)]
    remainder = (TotalDegree(known + 1, tuple(v - p for v, p, _ in variables)),)
    others = tuple(sympy.Order(s ** k) for s, k in sorted(limits.items(), key=lambda item: item[0].name)
                   if s not in sign)
    first, point, side = variables[0]
    kinked = any(kinks(exact, v, p) or any_kink(system, exact, v, p) for v, p, _ in variables)
    edge = any(_range_edge(v, p, parameters) for v, p, _ in variables)
    return [JointSeriesPiece(first, point, expansion.order, known, side, kinked, edge, polynomial,
                             remainder + others, tuple(unknowns), tuple(derived), tuple(variables))]


def expansion_of(label: str, value: sympy.Expr, expansion, system, index=None) -> list[SeriesPiece]:
    """The series of one coefficient for one `expand` request (one piece per side); refuses a kinked
    expansion asked as if analytic, a side outside the declared range, and a series about another
    point than that of a given truncated series. Named many-body pieces that depend on the variable
    are expanded too, with named Taylor coefficients (`pieces.expand_pieces`)."""
    from .errors import InputError
    from .pieces import expand_pieces
    if expansion.others:
        return joint_expansion_of(label, value, expansion, system, index)
    symbol, point, order, side, span = (expansion.symbol, expansion.point, expansion.order, expansion.side,
                                        expansion.span)
    exact, limits = split_truncation(value)
    known, kinked, edge, inside = _at_point(label, exact, limits, symbol, point, order, system, span)
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
