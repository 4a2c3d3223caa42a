"""Names of the symbols clusterexp itself introduces, and their LaTeX forms.

Generic cluster coefficients are sympy symbols `b_2_1` (species in declaration order), virial ones
`a_2_1`; single species: `b_3`, `a_3`. The names parse back with `sympy.sympify`. LaTeX labels use
the species names as subscripts: b_{A^2 B}; a single species keeps the number: b_{3}.
"""
from __future__ import annotations

from typing import Sequence

import re

import sympy

Index = tuple[int, ...]


def index_label(index: Index) -> str:
    return "_".join(str(n) for n in index)


def cluster_symbol(index: Index) -> sympy.Symbol:
    return sympy.Symbol(f"b_{index_label(index)}")


def virial_symbol(index: Index) -> sympy.Symbol:
    return sympy.Symbol(f"a_{index_label(index)}")


def bracket_label(index: Index) -> str:
    """The plain-text multi-index, e.g. [2,1]; for one species [3]."""
    return "[" + ",".join(str(n) for n in index) + "]"


_GROUP = r"\{(?:[^{}]|\{[^{}]*\})*\}"
_ATOM = rf"(?:[A-Za-z0-9]|\\[A-Za-z]+(?:{_GROUP})*)"
_SIMPLE_LATEX = re.compile(rf"{_ATOM}(?:_(?:[A-Za-z0-9]|{_GROUP}))?")


def is_single_atom(latex: str) -> bool:
    """Whether a LaTeX name reads as one symbol that can take a power: `A`, `\\nu_{AB}`,
    `\\tilde{\\nu}`, `\\mathrm{He}` yes; `\\hbar\\omega`, `m_B/m_A`, `e^-` no."""
    return bool(_SIMPLE_LATEX.fullmatch(latex.strip()))


KIND_LETTERS = {"cluster": "b", "virial": "a", "density": "rho", "fugacity": "z"}


def coefficient_label(kind: str, index: Index, component: str | None = None) -> str:
    """The plain-text name of a coefficient: b[2,1], a[3], rho_A[1,1], z_B[0,2]."""
    return f"{KIND_LETTERS[kind]}{'_' + component if component else ''}{bracket_label(index)}"


def latex_subscript(index: Index, species_latex: Sequence[str]) -> str:
    """Species labels as subscripts: (2, 1) with A, B -> A^{2} B; one species: (3,) -> 3. A label
    that is not a single symbol is put in parentheses before it takes a power; upright names of
    several letters are separated by commas (a_{top,mid}, not a_{topmid})."""
    if len(index) == 1:
        return str(index[0])
    parts = []
    for n, label in zip(index, species_latex):
        if n == 1:
            parts.append(label)
        elif n > 1:
            base = label if is_single_atom(label) else rf"\left({label}\right)"
            parts.append(f"{base}^{{{n}}}")
    # upright names of several letters would run together (a_{topmid}): a comma between them
    wordy = any(re.match(r"\\mathrm\{[^}]{2,}\}", label) for n, label in zip(index, species_latex) if n)
    return ("," if wordy else " ").join(parts)


def species_latex(name: str) -> str:
    """A species name as LaTeX: single letters stay, longer names go upright."""
    if len(name) == 1:
        return name
    return r"\mathrm{" + name.replace("_", r"\_") + "}"


def generated_latex_names(indices: Sequence[Index], species: Sequence[str],
                          labels: Sequence[str] | None = None) -> dict[sympy.Symbol, str]:
    """LaTeX names for every generated b/a symbol of the given multi-indices (`labels`: the species'
    LaTeX, default from their names)."""
    labels = list(labels) if labels is not None else [species_latex(s) for s in species]
    names = {}
    for index in indices:
        sub = latex_subscript(index, labels)
        names[cluster_symbol(index)] = f"b_{{{sub}}}"
        names[virial_symbol(index)] = f"a_{{{sub}}}"
    return names
