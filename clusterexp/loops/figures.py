"""Heat maps of sampled coefficients over two scanned parameters (e.g. alpha_1 and alpha_12).

Built like `clusterexp.products.plots.plot_map` (a `Figure` without pyplot, the same style, files
and metadata, byte-stable files; the caption in the metadata, a footer only with `figures footer`), but from Monte Carlo values on the statement's grid instead of an
expression: each grid point is one cell.  Every listed coefficient is a row of two panels, its values
and their one-standard-error map (`plots.value_and_error_maps`); among tubes with a free coverage each
term in the coverage with a sampled part is a row, the terms exact at every point are named in the
caption instead, and the caption states the O(coverage^k) each series leaves out.
"""
from __future__ import annotations

import textwrap
from pathlib import Path
from types import SimpleNamespace

import sympy

from ..errors import InputError
from ..products.figure_style import style
from ..products.plots import _format, axis_latex, coefficient_latex, conventions_caption, finish, symbol_latex, value_and_error_maps
from .quoting import METHOD, PLUS_MINUS_LATEX, plus_minus, settled, settled_bound
from .sampled_records import coverage_term, label


def sampled_map(statement, system, path: Path, into=None) -> Path:
    options = system.presentation.figure_options
    with style(options):
        return _draw(statement, system, path, into, options)


def mapped(statement) -> tuple[list, list]:
    """(columns drawn, terms left out): a column of the statement's table is drawn unless it is a term in
    the tube coverage with no error at any point (no sampled piece: exact, for `tabulate` and `plot`)."""
    drawn, exact = [], []
    for column in statement.columns:
        errors = [error for _, error in drawn_cells(statement, column)]
        (drawn if any(errors) or coverage_term(column.label) is None else exact).append(column)
    return drawn, exact


def _column_latex(column, system) -> str:
    """mathtext of a column: the coefficient, and the power of the coverage of a term ([n^1])."""
    item = SimpleNamespace(kind=column.kind, index=column.index, species=system.species_names, component=None)
    term = coverage_term(column.label)
    return coefficient_latex(item, system) + (rf"\,[{symbol_latex(term[0])}^{{{term[1]}}}]" if term else "")


def _largest(statement, columns):
    """(value, error) with the largest error bar among the drawn columns."""
    return max((cell for c in columns for cell in drawn_cells(statement, c)), key=lambda cell: cell[1])


def drawn_cells(statement, column) -> list[tuple[float, float]]:
    """(value, error) of a column at every point as the printers and the table show them (`settled`)."""
    return [settled(*statement.cell(k, column.label)) for k in range(len(statement.points))]


def _notes(statement, drawn, exact) -> list[str]:
    """What the caption adds among tubes: each series' truncation, the exact terms not drawn."""
    notes = list(dict.fromkeys(f"{label(c.kind, c.index)}: {statement.note(c)}" for c in drawn if statement.note(c)))
    labels = {c.label for c in drawn}
    bounds = [v.slice_bound for p in statement.points for v in p.values if v.label in labels and v.slice_bound]
    if bounds:
        notes.append(f"not drawn: the bound on the loops' slicing bias, at most {settled_bound(max(bounds)):.2g}")
    if exact:
        notes.append("exact at every point, not drawn: " + ", ".join(c.label for c in exact))
    return notes


def map_caption_latex(statement, system) -> str:
    """The LaTeX caption of a sampled map (written beside it and used by the document)."""
    from ..export.latex_lines import escape_text
    from ..export.quantities import conventions_latex
    sampling = statement.sampling
    (first, _), (second, _) = sampling.axes
    drawn, exact = mapped(statement)
    value, error = _largest(statement, drawn)
    fixed = ", ".join(f"${axis_latex(s.name, system)}={sympy.latex(v)}$" for s, v in sampling.fixed)
    names = ", ".join(f"${_column_latex(c, system)}$" for c in drawn)
    notes = "; ".join(_notes(statement, drawn, exact))
    return (f"Sampled {names} over ${axis_latex(first.name, system)}$ and "
            f"${axis_latex(second.name, system)}$, one cell per grid point ({METHOD}, seed "
            f"{sampling.seed}); left the values, right their one-standard-error maps; largest error bar "
            f"${plus_minus(value, error, PLUS_MINUS_LATEX)}$." + (f" Fixed: {fixed}." if fixed else "")
            + (f" {escape_text(notes)}." if notes else "") + " "
            + conventions_latex(system, system.typesetting.wavelength))


def _draw(statement, system, path: Path, into, options) -> Path:
    sampling = statement.sampling
    (first, xs), (second, ys) = sampling.axes
    x = [float(v) for v in xs]
    y = [float(v) for v in ys]
    drawn, exact = mapped(statement)
    rows = []
    for column in drawn:
        cells = drawn_cells(statement, column)
        values = [[cells[i * len(y) + j][0] for i in range(len(x))] for j in range(len(y))]
        errors = [[cells[i * len(y) + j][1] for i in range(len(x))] for j in range(len(y))]
        rows.append((f"${_column_latex(column, system)}$ (sampled)", values, errors))
    value, error = _largest(statement, drawn)
    fixed = ", ".join(f"{s.name} = {v}" for s, v in sampling.fixed)
    caption = (f"{conventions_caption(system)}; {METHOD}, seed {sampling.seed}; left the values, right their "
               f"one-standard-error maps; largest error bar {plus_minus(value, error)}"
               + (f"; fixed: {fixed}" if fixed else "") + "".join(f"; {n}" for n in _notes(statement, drawn, exact)))
    caption = "\n".join(textwrap.wrap(caption, 95))
    labels = (f"${axis_latex(first.name, system)}$", f"${axis_latex(second.name, system)}$")
    _format(path)
    # no zero line: between a few Monte Carlo cells it would be drawn through the noise
    figure = value_and_error_maps(rows, x, y, labels, caption.count("\n") + 1 if "footer" in options else 0, False)
    try:
        return finish(figure, path, caption, into, options, map_caption_latex(statement, system),
                      f"{', '.join(c.label for c in drawn)} sampled over {first.name}, {second.name}")
    except OSError as error:
        raise InputError(f"cannot write {path}: {error.strerror}", sampling.clause_span("map")) from None
