"""Plain-text printer."""
from __future__ import annotations

from typing import TYPE_CHECKING

if TYPE_CHECKING:  # the results import the printers for their notebook display, not the other way
    from ..results import Derivation

from .common import product_lines, regime_lines, summary_lines
from .quantities import conventions, kind_titles
from .series_lines import series_text_lines


def to_text(derivation: Derivation) -> str:
    """One line per coefficient, grouped by kind, after a commented header with the conventions."""
    lines = ["# clusterexp"] + [f"# {line}" for line in summary_lines(derivation.system)]
    lines.append(f"# conventions: {conventions(derivation.system)}")
    lines += [f"# {line}" for line in regime_lines(derivation.system)]
    kind = None
    titles = kind_titles(derivation.system)
    for c in derivation:
        if c.kind != kind:
            kind = c.kind
            lines.append("")
            lines.append(titles[kind] + ":")
        shaped = derivation.shaped(c)
        lines.append(f"  {c.label} = {shaped.text(c)}")
        lines += [f"    ({shaped.note})"] if shaped.note else []
        lines += [f"    {line}" for line in series_text_lines(derivation, c)]
    lines += product_lines(derivation)
    unknowns = derivation.unknowns()
    if unknowns:
        lines += ["", "unknown Taylor coefficients of the named many-body pieces (pieces are continuous; at a kink "
                  "each side has its own):"] + [f"  {u.symbol} = {u.description}" for u in unknowns]
    if derivation.system.samplings:
        from ..loops.report import text_lines
        lines += text_lines(derivation.sampled)
    return "\n".join(lines) + "\n"
