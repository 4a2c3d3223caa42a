"""The standalone LaTeX document (`--document`): a title, the declared system (tables of species,
mutual parameters and parameters with their ranges; tubes; given pieces with their O terms; the regime
and its equation of state; the conventions), then the coefficients grouped by kind and order under
subsections (vanishing ones listed in one sentence, long values broken over lines), the checks with
claimed and derived value and verdict, the values, tables and figures the input asks for.

Only packages of texlive-latex-base and texlive-latex-recommended are used (geometry, amsmath,
booktabs, graphicx); long sums are broken by `latex_width.fitting_rows` into `align` lines, so no
breqn is needed. Printers compute nothing: every value comes from the derivation.
"""
from __future__ import annotations

from typing import TYPE_CHECKING

if TYPE_CHECKING:  # the results import the printers for their notebook display, not the other way
    from ..results import Derivation

import sympy

from .common import form_line, species_statistics
from .document_results import checks_section, coefficient_sections, figures_section, values_section
from .latex import escape_text, latex_symbol_names, regime_latex, species_labels, unknowns_latex
from .state_lines import state_latex
from .latex_width import fitting_rows
from .latex_lines import top_level_terms
from .quantities import conventions_latex
from .series_lines import series_latex_paragraphs

PREAMBLE = [
    r"\documentclass[11pt]{article}",
    r"\usepackage[a4paper,margin=2.5cm]{geometry}",
    r"\usepackage{amsmath}",
    r"\usepackage{booktabs}",
    r"\usepackage{graphicx}",
    r"\allowdisplaybreaks",
    r"\setlength{\emergencystretch}{2em}",
]


def latex_document(derivation: Derivation) -> str:
    """The whole document as LaTeX source (compiles with pdflatex)."""
    system = derivation.system
    derivation.checks  # noqa: B018 -- first: their equations may name Taylor coefficients of pieces
    names = latex_symbol_names(derivation)
    labels = species_labels(system)
    lines = PREAMBLE + [rf"\title{{{_title(system, labels)}}}", r"\author{}", r"\date{}",
                        r"\begin{document}", r"\maketitle"]
    lines += system_section(derivation, names, labels)
    lines += coefficient_sections(derivation, names)
    lines += unknowns_latex(derivation, names)
    lines += checks_section(derivation, names)
    lines += values_section(derivation, names)
    lines += figures_section(derivation)
    state = state_latex(derivation, escape_text)
    if state:
        lines += [r"\section{Equation of state}", *state]
    if system.samplings:
        from ..loops.report import latex_block
        lines += [r"\section{Sampled three-body parts}", latex_block(derivation.sampled, system).rstrip("\n")]
    lines.append(r"\end{document}")
    return "\n".join(lines) + "\n"


def _title(system, labels) -> str:
    chosen = system.presentation.title
    if chosen is None:
        return "Cluster and virial coefficients of " + ", ".join(f"${label}$" for label in labels)
    parts = chosen.split("$")
    return "".join(f"${part}$" if k % 2 else escape_text(part) for k, part in enumerate(parts))


def _math(names):
    def math(expr) -> str:
        return sympy.latex(sympy.sympify(expr), symbol_names=names)
    return math


def system_section(derivation: Derivation, names: dict, labels: list[str]) -> list[str]:
    """The declared system: dimension and reference, tables, tubes, given pieces, regime, conventions."""
    system = derivation.system
    math = _math(names)
    w = "{" + system.typesetting.wavelength + "}"
    reference = labels[system.species_names.index(system.reference)]
    out = [r"\section{The system}",
           rf"Space dimension $d={system.dimension}$; the thermal wavelength ${w}$ is that of the reference "
           rf"species ${reference}$. Table~\ref{{tab:species}} lists the species in index order."]
    out += _table("species", "The species, in the order of the multi-indices.", "llll",
                  ["Species", "Mass", "Statistics", "Parameter"],
                  [[f"${label}$", f"${math(s.mass)}$", *_statistics(system, i, label, math)]
                   for i, (label, s) in enumerate(zip(labels, system.species))])
    if system.mutuals:
        pairs = [(labels[system.species_names.index(m.first)], labels[system.species_names.index(m.second)], m.value)
                 for m in system.mutuals]
        rows = [[f"${i}$, ${j}$", rf"$\alpha_{{{i} {j}}}={math(value)}$", "$1$"] for i, j, value in pairs]
        out += _table("mutual", r"Mutual (braiding) parameters: a particle taken once around the other picks up "
                      r"$e^{2\pi i\alpha_{ij}}$.", "lll", ["Pair", "Mutual parameter", "Period"], rows)
    if system.parameters:
        out += _table("parameters", "Parameters; every coefficient holds on these ranges only (a periodic "
                      "closed form is printed as its branch on the declared range).", "lll",
                      ["Parameter", "Range", "Assumptions"],
                      [[f"${math(p.symbol)}$", f"${_range(p, math)}$", ", ".join(p.assumptions) or "none"]
                       for p in system.parameters])
    if system.tubes is not None:
        t = system.tubes
        value = f" (declared value ${math(t.value)}$)" if t.value is not None else ""
        out.append(rf"Static flux tubes: flux ${math(t.flux)}$ flux quanta, ${math(t.coverage)}$ tubes per "
                   rf"${w}^2$ of the reference species{value}; every coefficient is known to first order in the "
                   rf"coverage and carries $O({math(t.coverage)}^2)$.")
    out += _given(system, math)
    form = form_line(system)
    out += [f"The values below are {form[7:]} (a value the algebra does not reach within its time bound is "
            "printed expanded, and said so)."] if form else []
    out += [r"\subsection*{Regime and equation of state}", *regime_latex(system),
            conventions_latex(system, system.typesetting.wavelength), *series_latex_paragraphs(derivation)]
    return out


def _statistics(system, i, label, math) -> list[str]:
    word, value = species_statistics(system, i)
    if word == "exchange":
        what = {0: "boson", 1: "fermion"}.get(value, "anyon") if value.is_number else "anyon"
        return [what, rf"$\alpha_{{{label}}}={math(value)}$"]
    return ["exclusion", rf"$g_{{{label} {label}}}={math(value)}$"]


def _range(p, math) -> str:
    if p.lower is None and p.upper is None:   # the assumptions are the range
        return {"positive": r"(0,\infty)", "nonnegative": r"[0,\infty)"}.get(
            next((a for a in p.assumptions if a in ("positive", "nonnegative")), ""), r"(-\infty,\infty)")
    low = r"-\infty" if p.lower is None else math(p.lower)
    high = r"\infty" if p.upper is None else math(p.upper)
    return (f"{'(' if p.lower_open or p.lower is None else '['}{low},{high}"
            f"{')' if p.upper_open or p.upper is None else ']'}")


def _table(label: str, caption: str, columns: str, header: list[str], rows: list[list[str]]) -> list[str]:
    """A booktabs table in a float with caption and label `tab:<label>`."""
    return [r"\begin{table}[htbp]", r"\centering", rf"\caption{{{caption}}}\label{{tab:{label}}}",
            rf"\begin{{tabular}}{{{columns}}}", r"\toprule", " & ".join(header) + r" \\", r"\midrule",
            *[" & ".join(row) + r" \\" for row in rows], r"\bottomrule", r"\end{tabular}", r"\end{table}"]


def _given(system, math) -> list[str]:
    """The given pieces with their O terms, one broken equation each."""
    if not system.source.values:
        return []
    rows = []
    for v in system.source.values:
        value = sympy.sympify(v.value)
        orders = [t for t in sympy.Add.make_args(value) if isinstance(t, sympy.Order)]
        terms = top_level_terms(math(value.removeO())) + [rf"+ O\left({sympy.latex(o.expr)}\right)" for o in orders]
        letter = "b" if v.kind == "cluster" else "a"
        rows.append(fitting_rows(f"{letter}_{{{','.join(str(n) for n in v.index)}}}", terms))
    return ["Given as input (the multi-index in species order; $O(p^k)$: terms from $p^k$ on unknown):",
            r"\begin{align*}", " \\\\\n".join(rows), r"\end{align*}"]
