"""How wide a piece of display math prints, estimated from its LaTeX (no TeX run), and breaking a sum
into `align` lines that fit the text width of the standalone document.

The estimate errs on the wide side (glyph widths of Computer Modern at 10 pt rounded up, fractions as
wide as their wider part, scripts at 70 %); the document's compile test (tests/test_document.py) reads
pdflatex's log for any overfull line, so an estimate that errs on the narrow side is caught.

>>> round(math_width(r"\\frac{7 \\nu}{10}"))
16
"""
from __future__ import annotations

import re

from .latex_lines import top_level_terms

TEXT_WIDTH_PT = 455.0            # a4paper with 2.5 cm margins (the document's geometry)
FONT_SCALE = 1.1                 # the document is set at 11 pt; the widths below are those at 10 pt
EQUATION_NUMBER_PT = 30.0        # room kept for the number at the end of the last line
GLYPH_PT = 5.6
_TOKEN = re.compile(r"\\[A-Za-z]+\*?|\\.|[{}^_]|[^\\{}^_]")
_WIDE = {"quad": 10.0, "qquad": 20.0, ",": 1.7, ";": 2.8, ":": 2.2, "!": -1.7, " ": 3.3}
_GROWING = {"left", "right"}    # a delimiter that grows around a fraction: wider than the plain one
_ZERO = {"nonumber", "displaystyle", "textstyle", "limits", "notag", "mathrm", "mathit",
         "mathbf", "mathsf", "mathtt", "mathcal", "boldsymbol", "operatorname", "hat", "bar", "tilde",
         "widetilde", "widehat", "vec", "dot", "ddot", "overline", "underline", "check", "breve"}
_DELIMITER = {"bigl", "bigr", "Bigl", "Bigr", "biggl", "biggr", "big", "Big"}
_BINARY = set("+-=<>") | {"pm", "mp", "times", "cdot", "to", "leq", "geq", "approx", "equiv", "sim"}
_TEXT = {"text", "textrm", "textit", "mathrm", "operatorname"}


def math_width(latex: str) -> float:
    """Estimated width in points of `latex` typeset in display math at 10 pt."""
    tokens = _TOKEN.findall(latex)
    width, _ = _group_width(tokens, 0, 1.0)
    return width * FONT_SCALE


def _group_width(tokens, k, scale, stop="}"):
    width = 0.0
    while k < len(tokens):
        token = tokens[k]
        k += 1
        if token == stop:
            return width, k
        if token == "{":
            inner, k = _group_width(tokens, k, scale)
            width += inner
        elif token in "^_":
            inner, k = _argument(tokens, k, scale * 0.7)
            width += inner
        elif token.startswith("\\") and len(token) > 1:
            name = token[1:]
            if name in ("frac", "dfrac", "tfrac", "cfrac"):
                top, k = _argument(tokens, k, scale)
                bottom, k = _argument(tokens, k, scale)
                width += max(top, bottom) + 2.4 * scale
            elif name in _TEXT and k < len(tokens) and tokens[k] == "{":
                inner, k = _argument(tokens, k, scale)
                width += inner * 0.95
            elif name in ("sqrt",):
                inner, k = _argument(tokens, k, scale)
                width += inner + 8.4 * scale
            elif name in _DELIMITER:
                width += 5.0 * scale
            elif name in _GROWING:
                width += 3.5 * scale
            elif name in _ZERO:
                continue
            elif name in ("bmod", "mod"):
                width += 26.0 * scale
            elif name in _WIDE:
                width += _WIDE[name] * scale
            elif name in _BINARY:
                width += 12.2 * scale if scale == 1.0 else 7.8 * scale
            elif name in ("{", "}", "|"):
                width += 5.0 * scale
            else:
                width += 6.4 * scale   # a Greek letter or a symbol
        elif token == " ":
            continue
        elif token in _BINARY:
            width += 12.8 * scale if scale == 1.0 else 7.8 * scale
        elif token in "()[]|":
            width += 3.9 * scale
        elif token in ",;.!":
            width += 2.8 * scale
        elif token == "&":
            continue
        else:
            width += GLYPH_PT * scale
    return width, k


def _argument(tokens, k, scale):
    if k >= len(tokens):
        return 0.0, k
    if tokens[k] == "{":
        return _group_width(tokens, k + 1, scale)
    return _group_width([tokens[k], "}"], 0, scale)[0], k + 1


def broken_lines(lhs: str, terms: list[str], continuation_indent: float = 10.0) -> list[str]:
    """The terms (each with its sign) grouped into lines of `lhs &= ...` that fit the text width:
    the first line after `lhs =`, the others indented by a quad under it."""
    lhs_width = math_width(lhs) + 13.0
    first_room = TEXT_WIDTH_PT - lhs_width - EQUATION_NUMBER_PT
    room = TEXT_WIDTH_PT - lhs_width - continuation_indent - EQUATION_NUMBER_PT
    terms = [part for term in terms for part in opened(term, room)]
    lines, current, used = [], [], 0.0
    for term in terms:
        w = math_width(term) + 2.0
        limit = first_room if not lines else room
        if current and used + w > limit:
            lines.append(" ".join(current))
            current, used = [], 0.0
        current.append(term)
        used += w
    if current:
        lines.append(" ".join(current))
    return lines


def opened(term: str, room: float) -> list[str]:
    """A term `c \\left(t_1 + t_2 + ...\\right)` wider than `room` as the pieces `c \\biggl(t_1`, `+ t_2`,
    ..., `+ t_n\\biggr)`, which may go on separate lines (a series coefficient of many terms); any
    other term as it is."""
    group = _last_group(term) if math_width(term) > room else None
    if group is None:
        return [term]
    head, inner = group
    parts = [part for piece in top_level_terms(inner) for part in opened(piece, room)]
    if len(parts) < 2:
        return [term]
    return [rf"{head}\biggl({parts[0]}", *parts[1:-1], rf"{parts[-1]}\biggr)"]


def _last_group(term: str):
    """(what precedes, what is inside) of the `\\left( ... \\right)` that ends `term`, else None."""
    if not term.endswith(r"\right)"):
        return None
    depth = 0
    for match in reversed(list(re.finditer(r"\\left\b|\\right\b", term))):
        depth += 1 if match.group() == r"\right" else -1
        if depth == 0:
            start = match.start()
            if not term.startswith(r"\left(", start):
                return None
            return term[:start], term[start + len(r"\left("):-len(r"\right)")]
    return None


def fitting_rows(lhs: str, terms: list[str], label: str | None = None, relation: str = "=") -> str:
    """`lhs &= ...` over as many `align` lines as the width needs; only the last line is numbered
    (and labelled with `label` when given)."""
    lines = broken_lines(lhs, terms)
    rows = [f"  {lhs} &{relation} {lines[0]}"] + [rf"  &\quad {line}" for line in lines[1:]]
    if label:
        rows[-1] += rf" \label{{{label}}}"
    return " \\nonumber \\\\\n".join(rows)


def widest_term(terms: list[str]) -> float:
    return max((math_width(t) for t in terms), default=0.0)
