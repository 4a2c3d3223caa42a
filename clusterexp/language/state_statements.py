"""Validation of the equation-of-state statements: `evaluate`, `tabulate` and `plot` of the pressure,
fugacities, chemical potentials and compressibility as functions of the densities, and `equation of
state` (the formula, where it ends, the radius of the virial series).

Two passes, each error at the user's words: `build_states` reads the trees while the input is built
(quantity words, species, parameters, numbers, grids, files); `check_states` runs once the `System`
exists and asks the regime for its exact equation of state (`Regime.equation_of_state`): the regime
must have one, define the quantity, use the density word written (`density` per lambda^d, `filling`
per state or per rho_L), and every point must lie inside the region reached from zero density.
"""
from __future__ import annotations

import sympy

from ..eos.axes import axis_points, check_axis_ends
from ..eos.requests import PER_SPECIES, QUANTITY_WORDS, DensityAxis, DensityValue, StateQuantity, StateRequest
from ..errors import InputError
from .hints import did_you_mean
from .statements import FIGURE_SUFFIXES, MAX_AXIS_POINTS, MAX_TABLE_ROWS, ProductBuilder

DENSITY_WORDS = ("density", "filling")
MAX_SERIES_ORDER = 40
MAX_TABLE_SECONDS = 600
STATE_STATEMENTS = ("evaluate_state", "tabulate_state", "plot_state", "equation_of_state")


def _tokens(tree):
    """The NAME tokens that open a state_value / state_axis (one or two), and the rest."""
    names = []
    rest = list(tree.children)
    while rest and getattr(rest[0], "type", None) == "NAME" and len(names) < 2:
        names.append(rest.pop(0))
    return names, rest


class StateBuilder:
    """Reads the statement trees (`builder` is the input's `_Builder`)."""

    def __init__(self, builder, names: list[str]):
        self.b = builder
        self.names = names
        self.products = ProductBuilder(builder, names)

    # -- words ----------------------------------------------------------------------------------------
    def quantity(self, item) -> StateQuantity:
        words = [str(t) for t in item.children]
        span = self.b.span(item)
        for phrase, quantity in QUANTITY_WORDS.items():
            size = len(phrase.split())
            if words[:size] != phrase.split():
                continue
            rest = words[size:]
            if quantity not in PER_SPECIES:
                if rest:
                    raise InputError(f"the {phrase} is one number for the whole mixture; write `{phrase}` alone", span)
                return StateQuantity(quantity, None, span)
            if len(rest) > 1:
                break
            if rest and rest[0] not in self.names:
                token = item.children[size]
                raise InputError(f"unknown species '{rest[0]}'", self.b.span(token), did_you_mean(rest[0], self.names))
            return StateQuantity(quantity, rest[0] if rest else None, span)
        first = words[0]
        known = ", ".join(["pressure", "fugacity A", "chemical potential A", "compressibility"])
        if first in ("a", "b", "rho", "z") or first.startswith(("rho_", "z_")):
            message = (f"'{' '.join(words)}' is neither a quantity of the equation of state ({known}) nor a "
                       f"coefficient (coefficients carry brackets: {first}[2])")
        else:
            message = f"unknown quantity '{' '.join(words)}'; the equation of state gives {known}"
        raise InputError(message, span, did_you_mean(first, ["pressure", "fugacity", "chemical", "compressibility"]))

    def species_word(self, names, span):
        """(word, species) of `density A`, `filling A` or, with one species, `density` alone."""
        word = str(names[0])
        if word not in DENSITY_WORDS:
            raise InputError(f"'{word} {names[1]}' is not a density: write `density {names[1]}` (per lambda^d) or "
                             f"`filling {names[1]}` (per state, lowest Landau level)", span,
                             did_you_mean(word, DENSITY_WORDS))
        if len(names) == 1:
            if len(self.names) > 1:
                raise InputError(f"say whose {word}: `{word} {self.names[0]} = ...`", span)
            return word, self.names[0]
        species = str(names[1])
        if species not in self.names:
            raise InputError(f"unknown species '{species}'", self.b.span(names[1]), did_you_mean(species, self.names))
        return word, species

    def values(self, clause, taken_species=(), allow_parameters=True):
        """(densities, parameters) of an `at` / `along` clause."""
        densities, parameters, seen = [], [], set(taken_species)
        for value in (clause.children if clause is not None else ()):
            names, (expr,) = _tokens(value)
            span = self.b.span(value)
            if len(names) == 1 and str(names[0]) not in DENSITY_WORDS:
                token = names[0]
                if str(token) not in self.b.parameters:
                    raise InputError(f"'{token}' is neither a declared parameter nor a density (`density A = ...`, "
                                     "`filling A = ...`)", self.b.span(token),
                                     did_you_mean(str(token), list(self.b.parameters) + list(DENSITY_WORDS)))
                if not allow_parameters:
                    raise InputError("a parameter belongs in `at`, not in `along`", span)
                symbol = self.b.parameters[str(token)].symbol
                if symbol in seen:
                    raise InputError(f"{token} is given twice", self.b.span(token))
                seen.add(symbol)
                number = self.products.number(expr, f"the value of {token}")
                parameters.append((symbol, self.products.within_range(token, number, expr)))
                continue
            word, species = self.species_word(names, span)
            if species in seen:
                raise InputError(f"the {word} of {species} is given twice (or is also an axis)", span)
            seen.add(species)
            number = self.products.number(expr, f"the {word} of {species}")
            if number.is_negative:
                raise InputError(f"the {word} of {species} is negative ({number}); densities are >= 0",
                                 self.b.span(expr))
            densities.append(DensityValue(word, species, number, span))
        return tuple(densities), tuple(parameters)

    def _axis_head(self, axis, what: str):
        names, rest = _tokens(axis)
        span = self.b.span(axis)
        if len(names) == 1 and str(names[0]) not in DENSITY_WORDS:
            raise InputError(f"a {what} of the equation of state runs over a density (`over density A ...` or `over "
                             f"filling A ...`); a parameter such as {names[0]} is fixed with `at {names[0]} = ...` "
                             "(coefficients a[..] over parameters go in a statement of their own)",
                             self.b.span(names[0]))
        word, species = self.species_word(names, span)
        return word, species, rest, span

    # -- statements -----------------------------------------------------------------------------------
    def request(self, tree) -> StateRequest:
        kind = {"evaluate_state": "evaluate", "tabulate_state": "tabulate", "plot_state": "plot",
                "equation_of_state": "formula"}[tree.data]
        children = list(tree.children)
        by_data = {getattr(c, "data", None): c for c in children}
        span = self.b.span(tree)
        quantities = tuple(self.quantity(i) for i in by_data["state_list"].children) if "state_list" in by_data else ()
        for k, q in enumerate(quantities):
            if any((p.quantity, p.species) == (q.quantity, q.species) for p in quantities[:k]):
                raise InputError(f"the {q.text} is listed twice", q.span)
        if kind == "formula":
            along, _ = self.values(by_data.get("state_along"), allow_parameters=False)
            _, parameters = self.values(by_data.get("state_at"))
            return StateRequest("formula", span, densities=along, parameters=parameters)
        axes = tuple(self._axis(c, kind) for c in children
                     if getattr(c, "data", None) in ("state_axis_steps", "state_axis_values", "state_plot_axis"))
        taken = []
        for axis in axes:
            if axis.species in taken:
                raise InputError(f"{axis.species} is an axis twice", axis.span)
            taken.append(axis.species)
        densities, parameters = self.values(by_data.get("state_at"), taken)
        rows = 1
        for axis in axes:
            rows *= max(1, len(axis.values))
        if rows > MAX_TABLE_ROWS:
            raise InputError(f"the grid has more than {MAX_TABLE_ROWS:,} rows; use fewer points", span)
        digits = self.products.digits(by_data.get("digits"))
        path = None
        if kind in ("tabulate", "plot"):
            path = self.products.path(children[-1], FIGURE_SUFFIXES if kind == "plot" else ())
        series, series_span = (), None
        overlay = by_data.get("series_overlay")
        if overlay is not None:
            series_span = self.b.span(overlay)
            series = tuple(int(t) for t in overlay.children)
            for token in overlay.children:
                if not 1 <= int(token) <= MAX_SERIES_ORDER:
                    raise InputError(f"a virial series of order {token}: give orders from 1 to {MAX_SERIES_ORDER}",
                                     self.b.span(token))
            if len(set(series)) != len(series):
                raise InputError("an order of the virial series is listed twice", series_span)
            if not any(q.quantity == "pressure" for q in quantities):
                raise InputError("the virial series is the series of the pressure: list `pressure` among the "
                                 "quantities to overlay it", series_span)
            declared = getattr(self.b, "order", None)
            if declared and max(series) > declared[0]:
                raise InputError(f"the virial series of order {max(series)} needs total order {max(series)} but "
                                 f"`order {declared[0]}` is declared", series_span)
        return StateRequest(kind, span, quantities, densities, parameters, axes, digits, path, series, series_span)

    def _axis(self, axis, kind: str) -> DensityAxis:
        word, species, rest, span = self._axis_head(axis, "table" if kind == "tabulate" else "plot")
        label = f"{word} {species}"
        if axis.data == "state_plot_axis":
            if not rest:
                return DensityAxis(word, species, span)
            low, high = (self.products.number(e, f"the plot range of {label}") for e in rest)
            if not 0 <= low < high:
                raise InputError(f"the plot range of {label} must go from a lower end >= 0 to a larger upper end", span)
            return DensityAxis(word, species, span, interval=(low, high))
        if axis.data == "state_axis_values":
            values = [self.products.number(v, f"a grid value of {label}") for v in rest]
            if len(set(values)) != len(values):
                raise InputError(f"a grid value of {label} is listed twice", span)
        else:
            start, stop, step = (self.products.number(v, f"the grid of {label}") for v in rest)
            if not step > 0:
                raise InputError("the step must be positive", self.b.span(rest[2]))
            if not stop >= start:
                raise InputError(f"the grid of {label} must go from the lower end to the upper", span)
            count = int(sympy.floor((stop - start) / step)) + 1
            if count > MAX_AXIS_POINTS:
                raise InputError(f"{count:,} points on the axis {label} (at most {MAX_AXIS_POINTS:,})", span)
            values = [start + k * step for k in range(count)]
            values = [v if v.is_Rational else sympy.nsimplify(v) for v in values]
        if any(v.is_negative for v in values):
            raise InputError(f"the grid of {label} reaches a negative {word}; densities are >= 0", span)
        return DensityAxis(word, species, span, values=tuple(values))


def build_states(builder, trees, names: list[str]) -> tuple[StateRequest, ...]:
    """The equation-of-state statements of the input, read (checked against the regime later)."""
    states = StateBuilder(builder, names)
    out, paths = [], {}
    for tree, file in trees:
        builder.file = file
        request = states.request(tree)
        if request.path is not None:
            if request.path in paths:
                raise InputError(f"{request.path} is also written by the statement at line {paths[request.path].line}; "
                                 "give each table and figure its own file", request.span)
            paths[request.path] = request.span
        out.append(request)
    builder.file = builder.main
    return tuple(out)


def check_states(system) -> None:
    """Each statement against the regime's exact equation of state (InputError at the user's words)."""
    if not getattr(system, "states", ()):
        return
    from ..routes import regime_of
    for request in system.states:
        eos = regime_of(system).equation_of_state(system, request.span)
        check_request(eos, system, request)


def check_request(eos, system, request: StateRequest) -> None:
    for item in (*request.densities, *request.axes):
        if item.word != eos.density_word:
            raise InputError(f"the densities of the {eos.regime} are {eos.density_unit}: write `{eos.density_word} "
                             f"{item.species}` instead of `{item.word} {item.species}`", item.span)
    for q in request.quantities:
        if q.quantity not in eos.quantities:
            raise InputError(f"the {eos.regime} does not define the {q.quantity.replace('_', ' ')}; it defines "
                             + ", ".join(x.replace("_", " ") for x in eos.quantities), q.span)
    needed = eos.free_parameters()
    for symbol, _ in request.parameters:
        if symbol.name not in needed:
            raise InputError(f"the equation of state does not depend on {symbol.name}; it depends on "
                             f"{', '.join(sorted(needed)) or 'no parameter'}", request.span)
    given = {s.name for s, _ in request.parameters}
    missing = sorted(set(needed) - given)
    if request.kind == "formula":
        if request.densities:
            composition = {d.species: d.value for d in request.densities}
            if set(composition) != set(system.species_names) or not any(v != 0 for v in composition.values()):
                raise InputError(f"`along` gives the composition of the ray: a {eos.density_word} (ratio) for every "
                                 f"species ({', '.join(system.species_names)}), not all zero", request.span)
        return
    if missing:
        raise InputError(f"the equation of state depends on {', '.join(missing)}: give "
                         f"{'its value' if len(missing) == 1 else 'their values'} (`at {missing[0]} = ...`)",
                         request.span)
    present = {d.species for d in request.densities} | {a.species for a in request.axes}
    absent = [n for n in system.species_names if n not in present]
    if absent:
        raise InputError(f"give the {eos.density_word} of every species: {', '.join(absent)} "
                         f"{'has' if len(absent) == 1 else 'have'} none (`at {eos.density_word} {absent[0]} = 0` for "
                         "an absent one)", request.span)
    parameters = request.parameter_values()
    if request.kind == "evaluate":
        eos.check_point(request.fixed(), request.span, parameters)
    elif request.kind == "tabulate":
        points = axis_points(request)
        seconds = len(points) * len(request.quantities) * eos.seconds_per_point
        if seconds > MAX_TABLE_SECONDS:
            raise InputError(f"this table of the {eos.regime} would take about {seconds / 60:.0f} minutes ({len(points):,} "
                             f"rows x {len(request.quantities)} quantities, about {eos.seconds_per_point:g} s each): "
                             f"use fewer points (at most about {MAX_TABLE_SECONDS / 60:.0f} minutes)", request.span)
        for point in points:
            try:
                eos.check_point(point, None, parameters)
            except InputError as error:
                shown = ", ".join(f"{eos.density_word} {k} = {sympy.sstr(v)}" for k, v in point.items())
                where = request.axes[0].span if len(request.axes) == 1 else request.span
                raise InputError(f"the grid reaches {shown}: {error.message}", where) from None
    else:
        check_axis_ends(eos, request, parameters)


def expected_seconds(system) -> float:
    """A generous estimate of the time the equation-of-state statements take (the fuzz tests only build
    inputs above a few seconds)."""
    from ..routes import regime_of
    total = 0.0
    for request in getattr(system, "states", ()):
        eos = regime_of(system).equation_of_state(system, request.span)
        points = {"evaluate": 1, "tabulate": len(axis_points(request)), "plot": eos.plot_samples}.get(request.kind, 0)
        total += points * max(1, len(request.quantities)) * eos.seconds_per_point
    return total
