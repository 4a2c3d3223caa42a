"""Breaking a long LaTeX sum over several lines of an `align` environment, so that a coefficient with
many terms fits the page of a manuscript. Only top-level `+` and `-` (outside braces, brackets and
parentheses) are break points; the text of each term is kept as printed.
"""
from __future__ import annotations

import re

_EVENTS = re.compile(r"\\[{}]|[{(\[]|[})\]]| [+-] ")


def top_level_terms(latex: str) -> list[str]:
    """The terms of a printed sum, each with its sign: "a + b - c" -> ["a", "+ b", "- c"]. Only the
    characters that matter are visited (a printed coefficient can run to megabytes)."""
    terms, depth, start = [], 0, 0
    for match in _EVENTS.finditer(latex):
        token = match.group()
        if token[0] == "\\":
            continue  # an escaped brace is no group
        if token in "{([":
            depth += 1
        elif token in "})]":
            depth -= 1
        elif depth == 0:
            piece = latex[start:match.start()].strip()
            if piece:
                terms.append(piece)
            start = match.start() + 1
    terms.append(latex[start:].strip())
    return [t for t in terms if t]


def aligned_rows(lhs: str, latex: str | list[str], per_line: int = 4) -> str:
    """`lhs &= ...` over as many lines as needed, `per_line` terms each; every line but the last is
    unnumbered so the coefficient keeps one equation number. `latex` is the printed sum, or its terms
    with their signs when the printer has them already."""
    terms = top_level_terms(latex) if isinstance(latex, str) else latex
    if len(terms) <= per_line + 1:
        return f"  {lhs} &= {latex if isinstance(latex, str) else ' '.join(terms)}"
    chunks = [terms[k:k + per_line] for k in range(0, len(terms), per_line)]
    lines = [f"  {lhs} &= {' '.join(chunks[0])}"]
    for chunk in chunks[1:]:
        lines.append(r"  &\quad " + " ".join(chunk))
    return " \\nonumber \\\\\n".join(lines)


def escape_text(text: str) -> str:
    for char, replacement in (("\\", r"\textbackslash{}"), ("_", r"\_"), ("%", r"\%"), ("&", r"\&"), ("#", r"\#"),
                              ("$", r"\$"), ("{", r"\{"), ("}", r"\}"), ("^", r"\^{}"), ("~", r"\~{}")):
        text = text.replace(char, replacement) if char != "\\" else text.replace(char, "\0")
    return text.replace("\0", r"\textbackslash{}")
