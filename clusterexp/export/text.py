"""Plain-text printer."""
from __future__ import annotations

import sympy

from ..results import Derivation
from ..routes.pairphase import expansion_of
from .common import CONVENTIONS, KIND_TITLES, regime_lines, summary_lines


def to_text(derivation: Derivation) -> str:
    """One line per coefficient, grouped by kind, after a commented header with the conventions."""
    lines = ["# clusterexp"] + [f"# {line}" for line in summary_lines(derivation.system)]
    lines.append(f"# conventions: {CONVENTIONS}")
    lines += [f"# {line}" for line in regime_lines(derivation.system)]
    kind = None
    for c in derivation:
        if c.kind != kind:
            kind = c.kind
            lines.append("")
            lines.append(KIND_TITLES[kind] + ":")
        lines.append(f"  {c.label} = {c.text}")
        for e in derivation.system.expansions:
            for side, series in expansion_of(c.label, c.value, e):
                lines.append(f"    series in {e.symbol} about {e.point} through order {e.order} ({side}): "
                             f"{sympy.sstr(series, order='lex')}")
    if derivation.system.samplings:
        from ..loops.report import text_lines
        lines += text_lines(derivation.sampled)
    return "\n".join(lines) + "\n"
