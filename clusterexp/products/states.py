"""Running the equation-of-state statements: numbers at given densities (`evaluate pressure at ...`),
CSV tables over density grids, figures of the exact curves with the truncated virial series of chosen
orders overlaid and the boundary marked, and the `equation of state` record (formula, boundary, the
radius of the virial series estimated from the tool's own coefficients).

The exact numbers come from the regime's `eos.EquationOfState` (mpmath at the requested digits); the
virial series from the derivation's own coefficients a_n (the cluster -> virial machinery), so a
figure compares two independent routes to the same pressure.
"""
from __future__ import annotations

import textwrap
from dataclasses import dataclass, field
from pathlib import Path

import sympy

from ..eos.axes import axis_points, plot_interval
from ..eos.requests import StateRequest
from ..errors import InputError
from ..exact.series import indices_up_to
from .numbers import csv_bytes, format_number, grid_text

PLOT_DIGITS = 12


@dataclass
class StateResult:
    """What one statement produced: `rows` ([(label, text)] for evaluate; header + rows for a table),
    `record` (the `equation of state` statement: formula lines, LaTeX, JSON, radius)."""

    request: StateRequest
    eos: object
    rows: list = field(default_factory=list)
    record: dict = field(default_factory=dict)


def density_label(eos, species: str) -> str:
    """The column / axis name of a density: nu_A, n_A (per state) or rho_A lambda^d."""
    symbol = eos.density_symbols[eos.names.index(species)].name
    return symbol if eos.density_word == "filling" else f"{symbol} lambda^{eos.system.dimension}"


def quantity_labels(eos, quantity) -> list[str]:
    labels = eos.labels(quantity.quantity)
    if quantity.species is None or len(labels) == 1:
        return labels
    return [labels[eos.names.index(quantity.species)]]


def _values(eos, request: StateRequest, points: list[dict], digits: int) -> list[list]:
    """One row of numbers per point: every quantity's labels, in the statement's order."""
    parameters = request.parameter_values()
    columns = []
    for quantity in request.quantities:
        table = eos.table(quantity.quantity, points, digits, parameters, request.span)
        for label in quantity_labels(eos, quantity):
            columns.append([row[label] for row in table])
    return [list(row) for row in zip(*columns)] if columns else [[] for _ in points]


def _labels(eos, request: StateRequest) -> list[str]:
    return [label for q in request.quantities for label in quantity_labels(eos, q)]


def run_states(derivation) -> list[StateResult]:
    """Every equation-of-state statement of the input, in input order."""
    from ..routes import regime_of
    system = derivation.system
    out = []
    for request in getattr(system, "states", ()):
        eos = regime_of(system).equation_of_state(system, request.span)
        result = StateResult(request, eos)
        if request.kind == "evaluate":
            numbers = _values(eos, request, [request.fixed()], request.digits)[0]
            result.rows = [(label, format_number(x, request.digits)) for label, x in zip(_labels(eos, request), numbers)]
        elif request.kind == "tabulate":
            points = axis_points(request)
            names = [a.species for a in request.axes] + [d.species for d in request.densities]
            header = [density_label(eos, n) for n in names] + _labels(eos, request)
            numbers = _values(eos, request, points, request.digits)
            result.rows = [header] + [[grid_text(sympy.sympify(p[n]), request.digits) for n in names]
                                      + [format_number(x, request.digits) for x in row]
                                      for p, row in zip(points, numbers)]
        elif request.kind == "formula":
            result.record = formula_record(derivation, eos, request)
        out.append(result)
    return out


def formula_record(derivation, eos, request: StateRequest) -> dict:
    """The formula (text, LaTeX, JSON), where it ends and the radius of the virial series along the
    composition `along` (default: equal densities), estimated from a_1..a_N of the derivation."""
    record = {"lines": eos.formula_lines(), "latex": eos.latex_lines(), "json": eos.as_json()}
    parameters = request.parameter_values()
    missing = sorted(set(eos.free_parameters()) - {s.name for s in parameters})
    order = derivation.system.order
    if missing:
        record["radius_note"] = (f"radius of convergence of the virial series: give {', '.join(missing)} "
                                 f"(`at {missing[0]} = ...`) to estimate it")
        return record
    if order < 3:
        record["radius_note"] = "radius of convergence of the virial series: needs coefficients to order 3 or more"
        return record
    K = len(eos.names)
    virials = {n: derivation.coefficient("virial", n).value for n in indices_up_to(K, order)}
    composition = request.fixed()
    direction = [composition[n] for n in eos.names] if composition else None
    estimate = eos.series_radius(virials, direction, parameters)
    record["radius"] = estimate
    return record


# -- files ---------------------------------------------------------------------------------------------
def check_state_files(system, directory, overwrite, protected, seen) -> None:
    """The tables and figures of the equation-of-state statements, checked like every other output."""
    from .files import claimed, resolve
    for request in getattr(system, "states", ()):
        if request.path is not None:
            path = Path(directory) / request.path
            claimed(seen, resolve(path, overwrite, protected, request.span, folder_may_be_missing=True), str(path),
                    request.span)


def stage_state_files(derivation, batch, directory=".", overwrite: bool = False) -> None:
    """Render the equation-of-state tables (CSV) and figures into `batch`."""
    directory = Path(directory)
    for result in derivation.states:
        request = result.request
        if request.path is None:
            continue

        def into(path, data, span=request.span):
            batch.add(path, data, overwrite, span, make_folder=True)
        try:
            if request.kind == "tabulate":
                into(directory / request.path, csv_bytes(result.rows))
            else:
                draw_figure(derivation, result.eos, request, directory / request.path, into)
        except InputError as error:
            raise (error if error.span is not None else InputError(error.message, request.span, error.hint)) from None


def virial_polynomial(derivation, eos, request: StateRequest, order: int, t: sympy.Symbol) -> sympy.Expr:
    """sum_{|n| <= order} a_n prod_i density_i^n_i along the figure's axis (density of the axis species
    t, the others fixed), from the derivation's own virial coefficients."""
    axis = request.axes[0].species
    fixed = request.fixed()
    values = [t if n == axis else sympy.sympify(fixed.get(n, 0)) for n in eos.names]
    parameters = request.parameter_values()
    total = sympy.Integer(0)
    for index in indices_up_to(len(eos.names), order):
        if any(k and v == 0 for k, v in zip(index, values)):
            continue
        a = sympy.sympify(derivation.coefficient("virial", index).value).xreplace(parameters)
        total += a * sympy.Mul(*(v ** k for v, k in zip(values, index)))
    return sympy.expand(total)


def draw_figure(derivation, eos, request: StateRequest, path: Path, into) -> None:
    from .figure_style import style
    from .plots import _matplotlib
    options = derivation.system.presentation.figure_options
    _matplotlib()
    with style(options):
        _draw_figure(derivation, eos, request, path, into, options)


def figure_caption(eos, request: StateRequest, interval=None) -> str:
    """The caption of an equation-of-state figure (what its footer says when asked, and the text beside it);
    `interval`: the figure's (low, high, boundary) when the caller has it."""
    parameters = request.parameter_values()
    axis = request.axes[0]
    low, high, boundary = interval or plot_interval(eos, request, parameters)
    shown_boundary = boundary is not None and boundary <= sympy.Rational(3, 2) * high
    caption_bits = [f"{eos.regime}; exact equation of state ({eos.plot_samples} points)"]
    if request.densities:
        caption_bits.append("fixed: " + ", ".join(f"{density_label(eos, d.species)} = {sympy.sstr(d.value)}"
                                                  for d in request.densities))
    if parameters:
        caption_bits.append(", ".join(f"{s.name} = {sympy.sstr(v)}" for s, v in request.parameters))
    if request.series:
        caption_bits.append(f"virial series of order N: {eos.pressure_unit} = sum over |n| <= N of a_n "
                            "(densities)^n, the tool's own coefficients")
    if boundary is not None and not shown_boundary:
        caption_bits.append(f"{eos.boundary.kind} at {axis.word} {axis.species} = {sympy.sstr(boundary)}, beyond "
                            "the plotted range")
    return "\n".join(textwrap.wrap("; ".join(caption_bits), 95))


def _draw_figure(derivation, eos, request: StateRequest, path: Path, into, options) -> None:
    from ..export.latex import escape_text
    from .plots import PlotError, _figure, _format, _matplotlib, finish
    _, Figure, numpy = _matplotlib()
    _format(path)
    parameters = request.parameter_values()
    axis = request.axes[0]
    low, high, boundary = plot_interval(eos, request, parameters)
    count = eos.plot_samples
    xs = [low + (high - low) * sympy.Rational(k, count - 1) for k in range(count)]
    points = [{**request.fixed(), axis.species: x} for x in xs]
    digits = PLOT_DIGITS if count > 50 else 8
    numbers = _values(eos, request, points, digits)
    x = numpy.array([float(v) for v in xs])
    labels = _labels(eos, request)
    exact = numpy.array([[float(v) if abs(v) != float("inf") else numpy.nan for v in row] for row in numbers])
    shown_boundary = boundary is not None and boundary <= sympy.Rational(3, 2) * high
    caption = figure_caption(eos, request, (low, high, boundary))
    figure = _figure(Figure, caption.count("\n") + 1)
    axes = figure.add_subplot()
    for k, label in enumerate(labels):
        axes.plot(x, exact[:, k], label=_latex_label(eos, label), linewidth=1.8)
    finite = exact[numpy.isfinite(exact)]
    if not finite.size:
        raise PlotError("the equation of state is not finite anywhere on the plotted range")
    t = sympy.Symbol("t")
    for order in request.series:
        polynomial = virial_polynomial(derivation, eos, request, order, t)
        y = sympy.lambdify(t, polynomial, "numpy")(x) * numpy.ones_like(x)
        axes.plot(x, y, linestyle="--", linewidth=1.0, label=f"virial series, order {order}")
    spread = max(float(finite.max() - finite.min()), 1e-12)
    axes.set_ylim(float(finite.min()) - 0.15 * spread, float(finite.max()) + 0.15 * spread)
    right = float(high)
    if shown_boundary:
        right = max(right, 1.03 * float(boundary))
        axes.axvline(float(boundary), color="0.3", linestyle=":", linewidth=1.2,
                     label=f"{eos.boundary.kind} ({axis.species} at {sympy.sstr(boundary)})")
    axes.set_xlim(float(low), right)
    axes.set_xlabel(f"${_density_latex(eos, axis.species)}$")
    if len(labels) == 1 and not request.series and not shown_boundary:
        axes.set_ylabel(_latex_label(eos, labels[0]))
    else:
        axes.legend(loc="best", fontsize=8)
    axes.grid(True, linewidth=0.3, alpha=0.5)
    finish(figure, path, caption, into, options, caption_tex=escape_text(caption.replace("\n", " ")) + ".",
           title=f"equation of state: {', '.join(labels)}")


def _density_latex(eos, species: str) -> str:
    i = eos.names.index(species)
    latex = getattr(eos, "density_latex", None)
    if latex:
        return latex[i]
    return rf"\rho_{{{species}}}\lambda^{{{eos.system.dimension}}}"


def _latex_label(eos, label: str) -> str:
    if label == eos.pressure_unit:
        return f"${eos.pressure_latex}$"
    if label == "rho k_B T kappa_T":
        return r"$\rho k_B T \kappa_T$"
    if label.startswith("z_"):
        return f"$z_{{{label[2:]}}}$"
    return rf"$\beta\mu_{{{label[len('beta mu_'):]}}}$"
