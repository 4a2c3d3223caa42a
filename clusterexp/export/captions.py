"""The caption of a `plot` figure in LaTeX: what is drawn against what over which interval, the fixed
values and the conventions, in the input's `typeset` names. The same text goes into the file beside
the figure (`<name>.caption.tex`) and under the figure in the standalone document.
"""
from __future__ import annotations

import sympy

from .quantities import conventions_latex


def figure_caption_latex(derivation, figure) -> str:
    """The caption of `figure` (a `model.Figure`) of `derivation`."""
    from ..products.plots import default_interval
    from .latex import claim_latex_name, latex_symbol_names
    system = derivation.system
    names = latex_symbol_names(derivation)

    def math(expr) -> str:
        return sympy.latex(expr, symbol_names=names)
    drawn = ", ".join(f"${claim_latex_name(derivation, t)}$" for t in figure.targets)
    ranges = []
    for symbol, interval in figure.axes:
        if interval is None:
            found = default_interval(symbol.name, system, system.parameters)
            interval, origin = (found.lower, found.upper), f" ({found.origin})" if found.origin != "given" else ""
        else:
            origin = ""
        ranges.append(rf"${math(symbol)}\in[{math(interval[0])},{math(interval[1])}]${origin}")
    if len(figure.axes) == 1:
        text = f"{drawn} against {ranges[0]}."
    else:
        text = (f"{drawn} over {ranges[0]} and {ranges[1]}; where it changes sign the colours are centred on "
                "zero and the line where it vanishes is drawn.")
    if figure.fixed:
        text += " Fixed: " + ", ".join(f"${math(s)}={math(v)}$" for s, v in figure.fixed) + "."
    return f"{text} {conventions_latex(system, system.typesetting.wavelength)}"
