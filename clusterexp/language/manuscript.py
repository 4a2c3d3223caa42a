"""Validation of the statements that say how results are written: `values <form>`, `title "..."`,
`snippet a[1,1], ...` and `figures <option>, ...` (the model's `Presentation`). Each is allowed once;
every error points at the user's word.
"""
from __future__ import annotations

from ..errors import InputError
from ..forms import FORMS
from ..model import Presentation
from .hints import did_you_mean

PIECES = "pieces"
FIGURE_OPTIONS = ("latex_engine", "footer")
STATEMENTS = ("values_form", "document_title", "snippet", "figure_options")


def presentation(products, trees, latex_problem) -> Presentation:
    """The `Presentation` of the collected (tree, file) pairs; `products` is the `ProductBuilder`
    (spans, coefficient names, the declared parameters), `latex_problem` says why math would not
    compile (`statements.latex_problem`)."""
    b = products.b
    fields, seen = {}, {}
    for tree, file in trees:
        b.file = file
        if tree.data in seen:
            raise InputError(f"`{_keyword(tree.data)}` is given twice (first at line {seen[tree.data].line})",
                             b.span(tree))
        seen[tree.data] = b.span(tree)
        if tree.data == "values_form":
            fields.update(_form(b, tree))
        elif tree.data == "document_title":
            fields["title"] = _title(b, tree.children[0], latex_problem)
        elif tree.data == "snippet":
            fields["snippet"] = products.coefficients(tree.children[0])
        else:
            fields["figure_options"] = _figure_options(b, tree)
    b.file = b.main
    return Presentation(**fields)


def _keyword(data: str) -> str:
    return {"values_form": "values", "document_title": "title", "snippet": "snippet"}.get(data, "figures")


def _title(b, token, latex_problem) -> str:
    """The title as LaTeX: text with `$...$` math (each part checked to compile with amsmath alone);
    the text's special characters are escaped when printed."""
    text = str(token)[1:-1]
    if not text.strip():
        raise InputError("give the title's words", b.span(token))
    if text.count("$") % 2:
        raise InputError("a `$` is not closed: math in a title goes between two `$`", b.span(token))
    for math in text.split("$")[1::2]:
        problem = latex_problem(math)
        if problem:
            raise InputError(f"this LaTeX would not compile: {problem}", b.span(token))
    return text


def _form(b, tree) -> dict:
    word, names = tree.children[0], tree.children[1:]
    if str(word) not in FORMS:
        raise InputError(f"unknown form '{word}'; expected {', '.join(FORMS)}", b.span(word),
                         did_you_mean(str(word), FORMS))
    if str(word) == "collected":
        if not names:
            raise InputError("say what to collect in: `values collected in nu, r` (parameters) or "
                             "`values collected in pieces` (the generated symbols)", b.span(word))
        chosen = []
        for token in names:
            name = str(token)
            if name != PIECES and name not in b.parameters:
                raise InputError(f"'{name}' is neither a declared parameter nor `pieces`", b.span(token),
                                 did_you_mean(name, [*b.parameters, PIECES]))
            if name in chosen:
                raise InputError(f"{name} is named twice", b.span(token))
            chosen.append(name)
        if PIECES in chosen and len(chosen) > 1:
            raise InputError("collect either in parameters or in `pieces`, not both", b.span(names[0]))
        return {"form": "collected", "collect_in": tuple(chosen)}
    if names:
        raise InputError(f"only `values collected` takes `in ...`; `values {word}` stands alone", b.span(names[0]))
    return {"form": str(word)}


def _figure_options(b, tree) -> tuple[str, ...]:
    out = []
    for token in tree.children:
        if str(token) not in FIGURE_OPTIONS:
            raise InputError(f"unknown figure option '{token}'; expected {' or '.join(FIGURE_OPTIONS)}",
                             b.span(token), did_you_mean(str(token), FIGURE_OPTIONS))
        if str(token) in out:
            raise InputError(f"{token} is named twice", b.span(token))
        out.append(str(token))
    return tuple(out)
