"""Heat map of a sampled coefficient over two scanned parameters (e.g. alpha_1 and alpha_12).

Built like `clusterexp.products.plots.plot_map` (a `Figure` without pyplot, the same style, files
and metadata, byte-stable files; the caption in the metadata, a footer only with `figures footer`), but from Monte Carlo values on the statement's grid instead of an
expression: each grid point is one cell, and the caption gives the largest error bar.
"""
from __future__ import annotations

import textwrap
from pathlib import Path
from types import SimpleNamespace

import sympy

from ..errors import InputError
from ..products.figure_style import style
from ..products.plots import _figure, _format, _matplotlib, axis_latex, coefficient_latex, conventions_caption, finish
from .quoting import METHOD, PLUS_MINUS_LATEX, plus_minus


def sampled_map(statement, system, path: Path, into=None) -> Path:
    options = system.presentation.figure_options
    with style(options):
        return _draw(statement, system, path, into, options)


def map_caption_latex(statement, system) -> str:
    """The LaTeX caption of a sampled map (written beside it and used by the document)."""
    from ..export.quantities import conventions_latex
    sampling = statement.sampling
    (first, _), (second, _) = sampling.axes
    v = max((p.values[0] for p in statement.points), key=lambda value: value.error)
    item = SimpleNamespace(kind=v.kind, index=v.index, species=system.species_names, component=None)
    fixed = ", ".join(f"${axis_latex(s.name, system)}={sympy.latex(value)}$" for s, value in sampling.fixed)
    return (f"Sampled ${coefficient_latex(item, system)}$ over ${axis_latex(first.name, system)}$ and "
            f"${axis_latex(second.name, system)}$, one cell per grid point ({METHOD}, seed "
            f"{sampling.seed}); largest error bar ${plus_minus(v.value, v.error, PLUS_MINUS_LATEX)}$."
            + (f" Fixed: {fixed}." if fixed else "") + " " + conventions_latex(system, system.typesetting.wavelength))


def _draw(statement, system, path: Path, into, options) -> Path:
    _, Figure, numpy = _matplotlib()
    sampling = statement.sampling
    (first, xs), (second, ys) = sampling.axes
    x = numpy.array([float(v) for v in xs])
    y = numpy.array([float(v) for v in ys])
    values = numpy.array([p.values[0].value for p in statement.points]).reshape(len(x), len(y)).T
    errors = [p.values[0].error for p in statement.points]
    worst = max(range(len(errors)), key=errors.__getitem__)
    v = statement.points[worst].values[0]
    fixed = ", ".join(f"{s.name} = {value}" for s, value in sampling.fixed)
    caption = (f"{conventions_caption(system)}; {METHOD}, seed {sampling.seed}; largest error bar "
               f"{plus_minus(v.value, v.error)}" + (f"; fixed: {fixed}" if fixed else ""))
    caption = "\n".join(textwrap.wrap(caption, 95))
    figure = _figure(Figure, caption.count("\n") + 1 if "footer" in options else 0)
    axes = figure.add_subplot()
    low, high = float(values.min()), float(values.max())
    if low < 0 < high:
        bound = max(-low, high)
        mesh = axes.pcolormesh(x, y, values, shading="nearest", cmap="RdBu_r", vmin=-bound, vmax=bound)
    else:
        mesh = axes.pcolormesh(x, y, values, shading="nearest", cmap="viridis")
    item = SimpleNamespace(kind=v.kind, index=v.index, species=system.species_names, component=None)
    figure.colorbar(mesh, ax=axes).set_label(f"${coefficient_latex(item, system)}$ (sampled)")
    axes.set_xlabel(f"${axis_latex(first.name, system)}$")
    axes.set_ylabel(f"${axis_latex(second.name, system)}$")
    _format(path)
    try:
        return finish(figure, path, caption, into, options, map_caption_latex(statement, system),
                      f"{v.label} sampled over {first.name}, {second.name}")
    except OSError as error:
        raise InputError(f"cannot write {path}: {error.strerror}", sampling.clause_span("map")) from None
