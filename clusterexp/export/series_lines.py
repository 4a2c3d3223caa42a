"""How the `expand` series of a coefficient print: one text line, one JSON record or one LaTeX row per
series piece (`Derivation.series_of` computes them; nothing is computed here)."""
from __future__ import annotations

from typing import TYPE_CHECKING

if TYPE_CHECKING:  # the results import the printers for their notebook display, not the other way
    from ..results import Coefficient, Derivation

import sympy




def _remainder_text(piece) -> str:
    return " + ".join(sympy.sstr(o) for o in piece.remainder)


def about_point(piece) -> sympy.Expr:
    """The polynomial of a series piece in powers of (p - p0), lowest power first when printed: a
    series about p0 = 1 reads 1/4 - (alpha - 1)**2/2, not -alpha**2/2 + alpha - 1/4 (the same value)."""
    polynomial, variable, point = piece.polynomial, piece.variable, piece.point
    if getattr(piece, "variables", ()):
        return _about_joint_point(piece)
    if (point == 0 and not piece.unknowns and _rational(piece)) or not polynomial.has(variable):
        return polynomial
    shift = sympy.Dummy("u")
    coefficients = sympy.Poly(sympy.expand(polynomial.subs(variable, shift + point)), shift).all_coeffs()[::-1]
    base = variable - point if point != 0 else variable
    terms = [sympy.expand(c) if k == 0 else
             sympy.Mul(sympy.expand(c), base ** k if k > 1 else base, evaluate=False)
             for k, c in enumerate(coefficients) if c != 0]
    return sympy.Add(*terms, evaluate=False)


def _about_joint_point(piece) -> sympy.Expr:
    """A joint series' polynomial in powers of the deviations (p - p0, q - q0, ...), lowest total
    degree first."""
    variables = [(v, p) for v, p, _ in piece.variables]
    if all(p == 0 for _, p in variables) and not piece.unknowns and _rational(piece):
        return piece.polynomial
    bases, powered = _in_powers(piece.polynomial, variables)
    terms = []
    for powers, c in powered:
        factors = [b ** k if k > 1 else b for b, k in zip(bases, powers) if k]
        coefficient = sympy.expand(c)
        terms.append(sympy.Mul(coefficient, *factors, evaluate=False) if factors else coefficient)
    return sympy.Add(*terms, evaluate=False) if terms else sympy.Integer(0)


def _in_powers(polynomial, variables) -> tuple[list, list]:
    """(the bases p - p0, [(powers, coefficient)] lowest total degree first) of a polynomial in the
    deviations from the points of `variables` [(p, p0)]."""
    shifts = [sympy.Dummy(f"u_{v.name}") for v, _ in variables]
    shifted = sympy.expand(polynomial.subs({v: p + u for (v, p), u in zip(variables, shifts)}))
    poly = sympy.Poly(shifted, *shifts)
    bases = [v - p if p != 0 else v for v, p in variables]
    return bases, sorted(zip(poly.monoms(), poly.coeffs()), key=lambda item: (sum(item[0]), item[0][::-1]))


def series_value_text(piece) -> str:
    """Polynomial (in powers of p - p0) plus its O terms, sympy-parsable (the O terms printed apart so
    that sympy's own addition cannot reorder or swallow the known terms)."""
    return f"{_ordered_text(about_point(piece), piece)} + {_remainder_text(piece)}"


def _rational(piece) -> bool:
    """Whether every number in the series' polynomial is rational (else its powers are grouped, so that a
    closed-form coefficient with logarithms prints as one factor of its power)."""
    return not any(a.is_number and not a.is_Rational for a in sympy.preorder_traversal(piece.polynomial)
                   if isinstance(a, (sympy.log, sympy.Pow)) and not a.free_symbols)


def _ordered_text(expr, piece) -> str:
    joint_at_zero = getattr(piece, "variables", ()) and all(p == 0 for _, p, _ in piece.variables)
    if ((piece.point == 0 and not piece.unknowns and not getattr(piece, "variables", ())) or joint_at_zero
            and not piece.unknowns) and _rational(piece) or not isinstance(expr, sympy.Add):
        return sympy.sstr(expr, order="lex")
    return _joined([sympy.sstr(term, order="lex") for term in expr.args])


def _joined(texts: list[str]) -> str:
    """Terms joined by signs: a term printed with a leading minus takes the place of the plus."""
    out = texts[0]
    for text in texts[1:]:
        out += f" - {text[1:].lstrip()}" if text.startswith("-") else f" + {text}"
    return out


def series_text_lines(derivation: Derivation, c: Coefficient) -> list[str]:
    lines = []
    for p in derivation.series_of(c):
        lines.append(f"series in {p.heading} ({p.description}): {series_value_text(p)}")
    return lines


def series_json(derivation: Derivation, c: Coefficient) -> dict:
    """{"series": [...]} for a coefficient that has expansions, else {}."""
    pieces = derivation.series_of(c)
    if not pieces:
        return {}
    return {"series": [{
        "variable": p.variable.name,
        "point": sympy.sstr(p.point),
        **({"joint": [{"variable": v.name, "point": sympy.sstr(q), "side": s} for v, q, s in p.variables]}
           if getattr(p, "variables", ()) else {}),
        "order": p.order,
        "known_through": p.known,
        "side": p.side,
        "one_sided": p.one_sided,
        "non_analytic": p.kink,
        "range_edge": p.edge,
        "value": series_value_text(p),
        "remainder": _remainder_text(p),
        **({"unknowns": [u.symbol.name for u in p.unknowns]} if p.unknowns else {}),
        **({"notes": list(p.notes)} if p.notes else {}),
    } for p in derivation.series_of(c)]}


def _side_latex(p) -> str:
    if getattr(p, "variables", ()):
        sides = [rf"{sympy.latex(v)}\to {sympy.latex(q)}^{{{'+' if s == 'above' else '-'}}}" if s else
                 rf"{sympy.latex(v)}\to {sympy.latex(q)}" for v, q, s in p.variables]
        return r"\text{joint series through total degree }" + f"{p.known}" + r":\ " + r",\ ".join(sides)
    var, point = sympy.latex(p.variable), sympy.latex(p.point)
    if p.side is None:
        return rf"\text{{series about }}{var}={point}"
    arrow = rf"{var}\to {point}^{{{'+' if p.side == 'above' else '-'}}}"
    why = r"\text{non-analytic at }" if p.kink else r"\text{end of the declared range }"
    return rf"{arrow},\ {why}{var}={point}"


def _body_latex(p, symbol_names) -> str:
    shifted = about_point(p)
    if (p.point != 0 or p.unknowns) and isinstance(shifted, sympy.Add):
        return _joined([sympy.latex(t, symbol_names=symbol_names or {}) for t in shifted.args])
    return sympy.latex(shifted, symbol_names=symbol_names or {}, order="lex")


def series_latex_rows(derivation: Derivation, c: Coefficient, amp: str, symbol_names=None) -> list[str]:
    """Extra rows under a coefficient: `&= polynomial + O(...) \\qquad (side)`."""
    rows = []
    for p in derivation.series_of(c):
        orders = " + ".join(_order_latex(o) for o in p.remainder)
        rows.append(rf"  {amp}= {_body_latex(p, symbol_names)} + {orders} \qquad \left({_side_latex(p)}\right)")
    return rows


def series_document_pieces(derivation: Derivation, c: Coefficient, symbol_names=None) -> list[tuple[str, str]]:
    """For the document: (what the series is, in math: variable, point, side; its LaTeX with the O terms)
    per series of coefficient c; the document breaks the value over lines."""
    out = []
    for p in derivation.series_of(c):
        out.append((_side_latex(p), _body_latex(p, symbol_names) + " + " + " + ".join(_order_latex(o) for o in p.remainder)))
    return out


def _order_latex(o) -> str:
    return rf"O\left({sympy.latex(o.expr)}\right)"


def series_latex_paragraphs(derivation: Derivation) -> list[str]:
    """For the standalone document, when there are series rows: how to read them."""
    if not derivation.system.expansions:
        return []
    return [r"Below a coefficient, each further line is its series in a statistics parameter through "
            r"the stated order; $O(\cdot)$ marks the first unknown power (from the expansion or from a "
            r"given truncated many-body part). At a kink (the $|\alpha|$ term at the boson point) the "
            r"coefficient is not analytic and the one-sided expansions $\alpha\to\alpha_0^{\pm}$ are "
            r"printed, each marked."]
