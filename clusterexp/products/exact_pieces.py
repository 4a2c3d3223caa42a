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
    point = {s: sympy.sympify(v) for s, v in point.items()}
    known = _exact_b_pieces(system, expr, point)
    if getattr(system, "tubes", None) is not None:
        known.update(exact_tube_values(system, expr.free_symbols, point))
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


def _exact_b_pieces(system, expr, point) -> dict:
    """{piece: (exact value, why)} for the named b pieces of `expr` (b_3, or among tubes b_3_n_0, b_3_n_1)
    that the regime knows at `point` (`pieces.value_at`: their species bosons or fermions there, or not
    braiding; among tubes the coverage parts, 0 at an integer flux), free of other pieces."""
    from ..pieces import pieces_in, value_at
    from ..routes import regime_of
    if not getattr(regime_of(system), "named_pieces", False):
        return {}
    out = {}
    for piece in pieces_in(expr, len(system.species)):
        if not piece.name.startswith("b_"):
            continue
        value = value_at(system, piece, point)
        if value is not None and not pieces_in(value, len(system.species)) \
                and not (sympy.sympify(value).free_symbols - set(point) - _free(system)):
            out[piece] = (sympy.expand(value), _why(system, piece, point))
    return out


def _why(system, piece, point) -> str:
    from ..pieces import coverage_power
    from ..routes.tube_pieces import _exactly_integer
    if (coverage_power(system, piece) or 0) >= 1 and _exactly_integer(sympy.sympify(system.tubes.flux).subs(point)):
        return "integer flux, the tubes drop out"
    return "the ideal-gas value: its species are bosons or fermions here, or do not braid"


def _free(system) -> set:
    """Symbols a value may keep: the tube coverage when the point leaves it free."""
    tubes = getattr(system, "tubes", None)
    return set() if tubes is None else set(sympy.sympify(tubes.coverage).free_symbols)
