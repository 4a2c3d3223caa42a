"""Figures of derived coefficients: against one parameter (`plot_line`) or two (`plot_map`).

matplotlib is an optional extra (`pip install 'clusterexp[plot]'`) and is imported only when a
figure is drawn. Figures are built on `matplotlib.figure.Figure` without pyplot, so no global
backend is chosen or changed; PNG goes through Agg, PDF through matplotlib's PDF backend, picked by
the file extension. Files are written atomically and without a creation date, so the same input
gives the same bytes.

Values are evaluated in floating point (numpy through `sympy.lambdify`) after the fixed parameters
have been substituted exactly; a coefficient that is not finite at a point leaves a gap there.
Axis labels and legends are LaTeX (matplotlib mathtext, Computer Modern) in the `typeset` names, else
made from the symbol names: alpha -> \\alpha, nu_AB -> \\nu_{AB}. The conventions go into the
caption written beside the figure and into the file's metadata (`figure_style`); a text footer only
with `figures footer`.
"""
from __future__ import annotations

import functools
import io
import re
import textwrap
from pathlib import Path
from typing import Mapping, Sequence

import sympy

from ..errors import InputError
from ..naming import bracket_label, latex_subscript, species_latex
from .figure_style import save_all, style
from .numbers import Interval, atomic_write_bytes, exact_number, parameter_interval

FORMATS = {".png": "png", ".pdf": "pdf", ".svg": "svg"}
EXCHANGE_PERIOD = (sympy.Integer(0), sympy.Integer(2))  # alpha = 0 bosons, 1 fermions, period 2
MUTUAL_PERIOD = (sympy.Integer(0), sympy.Integer(1))    # braiding parameter, period 1
INSTALL_HINT = "plots need matplotlib: pip install 'clusterexp[plot]'"

GREEK = {"alpha", "beta", "gamma", "delta", "epsilon", "varepsilon", "zeta", "eta", "theta", "vartheta",
         "iota", "kappa", "lambda", "mu", "nu", "xi", "pi", "rho", "sigma", "tau", "upsilon", "phi",
         "varphi", "chi", "psi", "omega", "Gamma", "Delta", "Theta", "Lambda", "Xi", "Pi", "Sigma",
         "Upsilon", "Phi", "Psi", "Omega"}


class PlotError(InputError):
    """A figure that cannot be drawn as asked (also: matplotlib missing)."""


def _matplotlib():
    """The pieces of matplotlib a figure needs, imported on first use."""
    try:
        import matplotlib
        from matplotlib.figure import Figure
        import numpy
    except ImportError:
        raise PlotError(INSTALL_HINT) from None
    return matplotlib, Figure, numpy


# ---------------------------------------------------------------------------------------------
# labels and captions


def axis_latex(name: str, system=None) -> str:
    """The axis label of a parameter: the user's `typeset` LaTeX when matplotlib's mathtext can draw
    it, else `symbol_latex(name)`."""
    chosen = getattr(getattr(system, "typesetting", None), "symbol", lambda _: None)(name)
    if chosen:
        try:
            from matplotlib.mathtext import MathTextParser
            MathTextParser("path").parse(f"${chosen}$")
            return chosen
        except Exception:  # noqa: BLE001 -- mathtext knows less than LaTeX; fall back to the plain name
            pass
    return symbol_latex(name)


def symbol_latex(name: str) -> str:
    """mathtext for a symbol name: alpha -> \\alpha, nu_AB -> \\nu_{AB}, g2 -> g_{2},
    alpha_top_mid -> \\alpha_{\\mathrm{top},\\mathrm{mid}}."""
    base, _, rest = name.partition("_")
    parts = [p for p in rest.split("_") if p]
    match = re.fullmatch(r"([A-Za-z]+?)(\d+)", base)
    if match:
        base, digits = match.groups()
        parts.insert(0, digits)
    head = _word(base, upright_long=True)
    if not parts:
        return head
    return head + "_{" + ",".join(_word(p, upright_long=not (p.isupper() or len(p) <= 2)) for p in parts) + "}"


def _word(word: str, upright_long: bool) -> str:
    if word == "lamda":
        word = "lambda"
    if word in GREEK:
        return "\\" + word
    if word.isdigit() or len(word) == 1 or not upright_long:
        return word
    return r"\mathrm{" + word + "}"


def coefficient_latex(coefficient, system=None) -> str:
    """mathtext for a coefficient: a_{A^{2} B}, b_{3}; density / fugacity: rho_A[2,1], z_A[2,1]; the
    species in their `typeset` LaTeX where mathtext can draw it."""
    if not hasattr(coefficient, "kind"):
        return sympy.latex(sympy.sympify(coefficient))
    labels = [_species_mathtext(s, system) for s in coefficient.species]
    if coefficient.kind in ("cluster", "virial"):
        letter = "b" if coefficient.kind == "cluster" else "a"
        return f"{letter}_{{{latex_subscript(coefficient.index, labels)}}}"
    letter = r"\rho" if coefficient.kind == "density" else "z"
    return f"{letter}_{{{_species_mathtext(coefficient.component or '', system)}}}{bracket_label(coefficient.index)}"


def _species_mathtext(name: str, system) -> str:
    chosen = axis_latex(name, system)
    return chosen if chosen != symbol_latex(name) else species_latex(name)


def conventions_caption(system=None) -> str:
    """The conventions a figure of coefficients needs, in one or two plain-text lines."""
    from ..export.quantities import quantities
    d = "d" if system is None else str(system.dimension)
    statistics = "exchange alpha = 0 bosons, 1 fermions (period 2); mutual alpha_ij period 1"
    q = quantities(system)
    expansion = f"{q.pressure} = sum_n b_n z^n = sum_n a_n {q.variable}^n".replace("^d", f"^{d}")
    if q.unit == "rho_L":
        expansion += ", nu = rho / rho_L (lowest Landau level)"
    elif q.unit != "lambda^d":
        expansion += f" ({q.single.split(';')[0]})"
    return f"{statistics}; {expansion}"


# ---------------------------------------------------------------------------------------------
# parameters, intervals and values


def _symbol_name(parameter) -> str:
    if isinstance(parameter, str):
        return parameter
    return getattr(parameter, "name", None) or str(parameter)


def _declared(system, parameters) -> dict:
    declared = {p.name: p for p in (getattr(system, "parameters", ()) or ())}
    declared.update({p.name: p for p in parameters})
    return declared


def default_interval(name: str, system=None, parameters: Sequence = ()) -> Interval:
    """One period for an exchange parameter ([0, 2]) or a mutual one ([0, 1]) (within the declared
    range when it has one), else the declared range (open ends completed as in
    `numbers.parameter_interval`)."""
    declared = _declared(system, parameters)
    symbol = declared[name].symbol if name in declared else sympy.Symbol(name, real=True)
    base = parameter_interval(declared.get(name, symbol))
    role = _role(name, system)
    if role is None:
        return base
    lower, upper = EXCHANGE_PERIOD if role == "exchange" else MUTUAL_PERIOD
    origin = f"one period of the {role} parameter"
    if name in declared and declared[name].lower is not None and declared[name].upper is not None:
        lo, hi = max(lower, base.lower), min(upper, base.upper)
        if lo >= hi:
            return base
        return Interval(lo, hi, base.lower_open and lo == base.lower, base.upper_open and hi == base.upper,
                        origin + " within the declared range")
    return Interval(lower, upper, False, False, origin)


def _role(name: str, system) -> str | None:
    if system is None:
        return None
    for species in system.species:
        if isinstance(species.exchange, sympy.Symbol) and species.exchange.name == name:
            return "exchange"
    for mutual in system.mutuals:
        if isinstance(mutual.value, sympy.Symbol) and mutual.value.name == name:
            return "mutual"
    return None


def _interval(name, interval, system, parameters) -> Interval:
    if interval is None:
        return default_interval(name, system, parameters)
    try:
        lower, upper = interval
    except (TypeError, ValueError):
        raise PlotError(f"the interval of {name} must be a pair (lower, upper), not {interval!r}") from None
    lower, upper = exact_number(lower, f"lower end for {name}"), exact_number(upper, f"upper end for {name}")
    if not lower < upper:
        raise PlotError(f"the interval of {name} must have its lower end first: got [{lower}, {upper}]")
    return Interval(lower, upper, False, False, "given")


def _items(coefficients) -> list:
    if hasattr(coefficients, "kind") or isinstance(coefficients, (sympy.Basic, str)):
        return [coefficients]
    items = list(coefficients)
    if not items:
        raise PlotError("no coefficients to plot")
    return items


def _value(item) -> sympy.Expr:
    return item.value if hasattr(item, "kind") else sympy.sympify(item)


def _label(item) -> str:
    return getattr(item, "label", None) or sympy.sstr(item)


def _names(symbols) -> list[str]:
    return sorted({s.name for s in symbols})


def _depends(names) -> str:
    return ", ".join(names) if names else "no parameters (it is a number)"


def _prepare(items, axes: list[str], other_values, system, parameters) -> tuple[list, dict]:
    """Each coefficient with the fixed parameters substituted exactly; checks every name."""
    other = {}
    for key, value in (other_values or {}).items():
        other[_symbol_name(key)] = exact_number(value, _symbol_name(key))
    values = [_value(i) for i in items]
    occurring = set().union(*(_names(v.free_symbols) for v in values))
    declared = set(_declared(system, parameters))
    for axis in axes:
        if axis not in occurring:
            what = (f"{_label(items[0])} does not depend on it" if len(items) == 1
                    else "none of " + ", ".join(_label(i) for i in items) + " depends on it")
            raise PlotError(f"cannot plot against {axis}: {what}; "
                            f"{'it depends' if len(items) == 1 else 'they depend'} on {_depends(sorted(occurring))}")
        if axis in other:
            raise PlotError(f"{axis} is plotted along an axis and cannot also have a fixed value")
    unknown = sorted(set(other) - occurring - declared)
    if unknown:
        raise PlotError(f"values given for {', '.join(unknown)}, which the plotted coefficients do not depend on; "
                        f"they depend on {_depends(sorted(occurring))}")
    prepared = []
    for item, value in zip(items, values):
        fixed = value.xreplace({s: other[s.name] for s in value.free_symbols if s.name in other})
        missing = [n for n in _names(fixed.free_symbols) if n not in axes]
        if missing:
            declared_missing = [n for n in missing if n in declared]
            how = (f"fix {', '.join(declared_missing)} with `at {declared_missing[0]} = ...`" if declared_missing else
                   f"{', '.join(missing)} {'is' if len(missing) == 1 else 'are'} not known here (give "
                   f"{'it' if len(missing) == 1 else 'them'} in the coefficient source)")
            raise PlotError(f"{_label(item)} depends on {_depends(_names(value.free_symbols))}: {how}")
        prepared.append(fixed)
    return prepared, other


def _evaluator(expr: sympy.Expr, axes: list[str], numpy):
    from ..exact.periods import PeriodicPart
    # periodic closed forms (pair phases) hold x mod p; numpy knows Mod, not our differentiable wrapper
    expr = expr.replace(PeriodicPart, lambda x, period: sympy.Mod(x, period, evaluate=False))
    symbols = {s.name: s for s in expr.free_symbols}
    arguments = [symbols.get(a, sympy.Symbol(a)) for a in axes]
    function = sympy.lambdify(arguments, expr, modules="numpy")

    def evaluate(*grids):
        with numpy.errstate(all="ignore"):
            result = numpy.asarray(function(*grids))
            result = numpy.broadcast_to(result, numpy.shape(grids[0])).astype(complex)
            real = result.real.copy()
            scale = numpy.maximum(1.0, numpy.abs(real))
            real[~(numpy.abs(result.imag) <= 1e-12 * scale)] = numpy.nan
            real[~numpy.isfinite(real)] = numpy.nan
        return real

    return evaluate


def _samples(interval: Interval, count: int, numpy):
    """`count` equally spaced points; an open end is left out."""
    lower, upper = float(interval.lower), float(interval.upper)
    if not (interval.lower_open or interval.upper_open):
        return numpy.linspace(lower, upper, count)
    points = numpy.linspace(lower, upper, count + 2)
    return points[(1 if interval.lower_open else 0):(-1 if interval.upper_open else None)]


def _format(path: Path) -> str:
    fmt = FORMATS.get(path.suffix.lower())
    if fmt is None:
        raise PlotError(f"cannot tell the figure format from {path.name!r}: use a name ending in "
                        + ", ".join(sorted(FORMATS)))
    return fmt


def _caption_text(caption, system, other: dict, intervals: dict) -> str:
    text = conventions_caption(system) if caption is None else str(caption)
    extra = []
    if other:
        extra.append("fixed: " + ", ".join(f"{n} = {v}" for n, v in sorted(other.items())))
    return "\n".join(textwrap.wrap(text + ("; " + "; ".join(extra) if extra else ""), 95))


def styled(draw):
    """Draw (and save) a figure in the figure style of `options` (`figure_style.style`)."""
    @functools.wraps(draw)
    def wrapped(*args, options=(), **kwargs):
        _matplotlib()
        with style(options):
            return draw(*args, options=options, **kwargs)
    return wrapped


def finish(figure, path: Path, caption: str, into=None, options=(), caption_tex=None, title: str = "") -> Path:
    """The footer when `options` ask for it, then every file of the figure (`figure_style.save_all`),
    handed to `into` or written at once."""
    if path.is_dir():
        raise PlotError(f"{path} is a folder; give a file name")
    if "footer" in options:
        _place_caption(figure, caption)
    else:
        figure.tight_layout()
    save_all(figure, path, title, caption.replace("\n", " "), into or atomic_write_bytes, options, caption_tex)
    return path


def _title(items, axes) -> str:
    return ", ".join(_label(i) for i in items) + " against " + ", ".join(axes)


def _figure(Figure, caption_lines: int):
    return Figure(figsize=(6.4, 4.8 + 0.18 * caption_lines))


def _place_caption(figure, caption: str):
    lines = caption.count("\n") + 1
    figure.subplots_adjust(bottom=0.13 + 0.035 * lines, top=0.92)
    figure.text(0.02, 0.02, caption, fontsize=7, ha="left", va="bottom", family="sans-serif")


# ---------------------------------------------------------------------------------------------
# the figures


@styled
def plot_line(coefficients, parameter, interval=None, path="coefficients.png", *, other_values: Mapping | None = None,
              caption: str | None = None, system=None, parameters: Sequence = (), samples: int = 401,
              title: str | None = None, into=None, options=(), caption_tex: str | None = None) -> Path:
    """One or several coefficients against `parameter` over `interval` (default: one period of an
    exchange [0, 2] or mutual [0, 1] parameter of `system`, else the declared range); every other
    parameter they depend on needs a value in `other_values`. Returns the path written (`into`: a
    callable given (path, bytes) instead, which writes them)."""
    _, Figure, numpy = _matplotlib()
    items = _items(coefficients)
    name = _symbol_name(parameter)
    prepared, other = _prepare(items, [name], other_values, system, parameters)
    span = _interval(name, interval, system, parameters)
    path = Path(path)
    _format(path)
    x = _samples(span, max(2, int(samples)), numpy)
    caption_text = _caption_text(caption, system, other, {name: span})
    figure = _figure(Figure, caption_text.count("\n") + 1 if "footer" in options else 0)
    axes = figure.add_subplot()
    drawn = 0
    for item, expr in zip(items, prepared):
        y = _evaluator(expr, [name], numpy)(x)
        if numpy.isfinite(y).any():
            drawn += 1
        axes.plot(x, y, label=f"${coefficient_latex(item, system)}$", linewidth=1.5)
    if not drawn:
        raise PlotError(f"no coefficient is finite anywhere on {name} in {span}")
    low, high = axes.get_ylim()
    if low < 0 < high:
        axes.axhline(0.0, color="0.6", linewidth=0.6, zorder=0)
    axes.set_xlim(float(span.lower), float(span.upper))
    axes.set_xlabel(f"${axis_latex(name, system)}$")
    kinds = {getattr(i, "kind", None) for i in items}
    if len(items) == 1:
        axes.set_ylabel(f"${coefficient_latex(items[0], system)}$")
    else:
        axes.set_ylabel({"virial": "virial coefficients", "cluster": "cluster coefficients"}.get(
            kinds.pop() if len(kinds) == 1 else None, "coefficients"))
        axes.legend(loc="best", fontsize=8)
    if title:
        axes.set_title(title)
    axes.grid(True, linewidth=0.3, alpha=0.5)
    return finish(figure, path, caption_text, into, options, caption_tex, _title(items, [name]))


@styled
def plot_map(coefficient, first, second, path="coefficient_map.png", *, other_values: Mapping | None = None,
             caption: str | None = None, system=None, parameters: Sequence = (), resolution: int = 121,
             title: str | None = None, into=None, options=(), caption_tex: str | None = None) -> Path:
    """A heat map of one coefficient against two parameters: `first` and `second` are names or
    (name, interval) pairs (interval None: the default of `plot_line`). Where the coefficient changes
    sign the colours are centred on 0 and its zero line is drawn. Returns the path written (`into`:
    as for `plot_line`)."""
    _, Figure, numpy = _matplotlib()
    items = _items(coefficient)
    if len(items) != 1:
        raise PlotError("a map shows one coefficient; use plot_line for several")
    (name1, interval1), (name2, interval2) = _axis(first), _axis(second)
    if name1 == name2:
        raise PlotError(f"a map needs two different parameters, got {name1} twice")
    prepared, other = _prepare(items, [name1, name2], other_values, system, parameters)
    span1 = _interval(name1, interval1, system, parameters)
    span2 = _interval(name2, interval2, system, parameters)
    path = Path(path)
    _format(path)
    count = max(2, int(resolution))
    x, y = _samples(span1, count, numpy), _samples(span2, count, numpy)
    grid_x, grid_y = numpy.meshgrid(x, y)
    z = _evaluator(prepared[0], [name1, name2], numpy)(grid_x, grid_y)
    if not numpy.isfinite(z).any():
        raise PlotError(f"{_label(items[0])} is not finite anywhere on the map")
    caption_text = _caption_text(caption, system, other, {name1: span1, name2: span2})
    figure = _figure(Figure, caption_text.count("\n") + 1 if "footer" in options else 0)
    axes = figure.add_subplot()
    heat_map(figure, axes, grid_x, grid_y, z, f"${coefficient_latex(items[0], system)}$")
    axes.set_xlabel(f"${axis_latex(name1, system)}$")
    axes.set_ylabel(f"${axis_latex(name2, system)}$")
    if title:
        axes.set_title(title)
    return finish(figure, path, caption_text, into, options, caption_tex, _title(items, [name1, name2]))


def heat_map(figure, axes, x, y, z, label: str, shading: str = "auto", error: bool = False, zero_line: bool = True):
    """One heat map of `z` (a row per y) on `axes` with its colour bar named `label`: a value, in colours
    centred on 0 where it changes sign (with the line where it vanishes, `zero_line`), or (`error`) a
    standard error, from 0 up."""
    numpy = _matplotlib()[2]
    masked = numpy.ma.masked_invalid(z)
    if error:
        mesh = axes.pcolormesh(x, y, masked, shading=shading, cmap="Greys", vmin=0.0)
    else:
        low, high = float(masked.min()), float(masked.max())
        noise = 1e-9 * max(abs(low), abs(high), 1e-300)  # rounding at exact zeros (e.g. integer mutual parameter)
        if low < -noise and high > noise:
            bound = max(-low, high)
            mesh = axes.pcolormesh(x, y, masked, shading=shading, cmap="RdBu_r", vmin=-bound, vmax=bound)
            if zero_line:
                axes.contour(x, y, masked, levels=[0.0], colors="k", linewidths=0.8)
        else:
            mesh = axes.pcolormesh(x, y, masked, shading=shading, cmap="viridis")
    figure.colorbar(mesh, ax=axes).set_label(label)
    return mesh


def value_and_error_maps(rows, x, y, labels: tuple[str, str], caption_lines: int = 0, zero_line: bool = True):
    """A figure of one row of panels per quantity in `rows` ((colour-bar label, values, errors or None),
    arrays with a row per y), one cell per point: the values' heat map and, where there are errors, the
    one-standard-error map beside it (numbers with Monte Carlo parts: `sample ... map`, `plot` over two
    parameters); `zero_line` as in `heat_map`."""
    _, Figure, _ = _matplotlib()
    columns = 2 if any(errors is not None for _, _, errors in rows) else 1
    figure = Figure(figsize=(6.4 * columns, 4.8 * len(rows) + 0.18 * caption_lines))
    for r, (label, values, errors) in enumerate(rows):
        panels = [(values, label, False)] + ([] if errors is None else [(errors, f"error of {label}", True)])
        for c, (z, name, error) in enumerate(panels):
            axes = figure.add_subplot(len(rows), columns, r * columns + c + 1)
            heat_map(figure, axes, x, y, z, name, "nearest", error, zero_line)
            axes.set_xlabel(labels[0])
            axes.set_ylabel(labels[1])
    return figure


def _axis(spec) -> tuple[str, object]:
    if isinstance(spec, (tuple, list)) and len(spec) == 2 and not isinstance(spec[0], (int, float)):
        return _symbol_name(spec[0]), spec[1]
    return _symbol_name(spec), None
