"""Named pieces that are exactly known at the point an `evaluate` statement asks for.

Sampled pieces stay symbols in exact results, but some are exact at special parameter values: every
flux-tube piece at an integer flux, the braid-tube piece where its pair does not braid, the anyon-tube
piece at the bose/fermi points (`routes.tube_pieces.TubePiece.exactly`). `products.run` puts them in
here, before the exact and the Monte Carlo evaluation alike, and the label says so; a piece not known at
the point stays, and the usual refusal ("no value for ...") is unchanged. (`tabulate` and `plot` refuse
the truncated series that every result among tubes is before they reach a point.)
"""
from __future__ import annotations

import sympy


def filled(system, expr, point) -> tuple[sympy.Expr, list[str]]:
    """`expr` with the tube pieces exactly known at `point` ({parameter symbol: exact number}, possibly
    partial: the value put in then holds for every value of the parameters left free) put in, and one
    note per piece put in ("B_anyon_tube_A = 0 exactly: integer flux")."""
    from ..routes.tube_pieces import exact_tube_values
    expr = sympy.sympify(expr)
    if getattr(system, "tubes", None) is None:
        return expr, []
    point = {s: sympy.sympify(v) for s, v in point.items()}
    known = exact_tube_values(system, expr.free_symbols, point)
    if not known:
        return expr, []
    grouped: dict[tuple, list[str]] = {}   # pieces with the same value and reason share one note
    for symbol, (value, why) in known.items():
        grouped.setdefault((sympy.sstr(value), why), []).append(symbol.name)
    notes = [f"{' = '.join(names)} = {value} exactly: {why}" for (value, why), names in grouped.items()]
    return expr.xreplace({s: v for s, (v, _) in known.items()}), notes


def noted(label: str, notes: list[str]) -> str:
    """A coefficient's label with the pieces put in, as every printer shows it (like a truncation note)."""
    return label + (f" ({'; '.join(notes)})" if notes else "")

