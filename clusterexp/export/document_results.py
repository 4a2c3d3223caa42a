"""The results part of the standalone document (`document.py`): coefficients grouped by kind and order,
the checks (claimed value, derived value, verdict), values and tables (booktabs), and the figures
(`\\includegraphics` of the PDF written beside the PNG, with the caption written beside the figure).
"""
from __future__ import annotations

import os
from pathlib import Path
from typing import TYPE_CHECKING

if TYPE_CHECKING:  # the results import the printers for their notebook display, not the other way
    from ..results import Derivation

import sympy

from .captions import figure_caption_latex
from .equations import equation_label
from .latex import claim_latex_name, coefficient_lhs, escape_text, number_latex, value_latex, TABLE_ROWS_SHOWN
from .latex_lines import top_level_terms
from .latex_width import fitting_rows
from .series_lines import series_document_pieces

SECTION_TITLES = {"cluster": "Cluster coefficients", "virial": "Virial coefficients",
                  "density": "Density expansions", "fugacity": "Fugacity expansions"}
SECTION_WORDS = {
    "cluster": r"The cluster coefficients $b_n$ of $\beta P$ in powers of the fugacities.",
    "virial": r"The virial coefficients $a_n$ of $\beta P$ in powers of the densities.",
    "density": r"The coefficients of $z^n$ in each density.",
    "fugacity": r"The coefficients of the densities' powers in each fugacity.",
}


def _is_zero(c) -> bool:
    return c.text == "0"


def coefficient_sections(derivation: Derivation, names: dict) -> list[str]:
    """One section per kind, one subsection per total order; the vanishing coefficients of an order
    in one sentence; each other coefficient a numbered, labelled equation broken to the page width;
    its series (`expand`) below it."""
    out = []
    kinds = list(dict.fromkeys(c.kind for c in derivation))
    species = derivation.system.species_names
    for kind in kinds:
        out += [rf"\section{{{SECTION_TITLES[kind]}}}", SECTION_WORDS[kind]]
        ofkind = [c for c in derivation if c.kind == kind]
        for order in sorted({c.order for c in ofkind}):
            group = [c for c in ofkind if c.order == order]
            out.append(rf"\subsection{{Order {order}}}")
            shown = [c for c in group if not _is_zero(c)]
            if shown:
                rows = [fitting_rows(coefficient_lhs(derivation, c), value_latex(derivation, c, names),
                                     equation_label(c, species)) for c in shown]
                out += [r"\begin{align}", " \\\\\n".join(rows), r"\end{align}"]
            zeros = [c for c in group if _is_zero(c)]
            if zeros:
                out.append(("Vanishing: " if shown else "All vanish: ")
                           + ", ".join(f"${coefficient_lhs(derivation, c)}$" for c in zeros) + ".")
            out += _notes(derivation, shown, names)
            for c in shown:
                out += _series(derivation, c, names)
    return out


def _notes(derivation: Derivation, shown, names) -> list[str]:
    """Which values are printed expanded although another form was asked for, and why."""
    notes = [f"${coefficient_lhs(derivation, c)}$ ({escape_text(derivation.shaped(c).note)})"
             for c in shown if derivation.shaped(c).note]
    return ["Printed expanded: " + "; ".join(notes) + "."] if notes else []


def _series(derivation: Derivation, c, names) -> list[str]:
    out = []
    for side, body in series_document_pieces(derivation, c, names):
        out += [rf"Series of ${coefficient_lhs(derivation, c)}$ \eqref{{{equation_label(c, derivation.system.species_names)}}}"
                rf" (${side}$):", r"\begin{align*}", fitting_rows(coefficient_lhs(derivation, c), top_level_terms(body)),
                r"\end{align*}"]
    return out


def checks_section(derivation: Derivation, names: dict) -> list[str]:
    """Each claim: what was claimed, what the tool derived, and the verdict."""
    system = derivation.system
    if not system.claims:
        return []
    out = [r"\section{Checks of hand results}",
           "Each claim of the input next to the derived value, and the verdict."]
    for claim, result in zip(system.claims, derivation.checks):
        name = claim_latex_name(derivation, claim.target)
        c = derivation.coefficient(claim.target.kind, claim.target.index, claim.target.component)
        claimed = ([escape_text(claim.rounded)] if claim.rounded else
                   top_level_terms(sympy.latex(claim.value, symbol_names=names)))
        where = (rf" \eqref{{{equation_label(c, system.species_names)}}}" if c in derivation.coefficients and
                 not _is_zero(c) else "")
        out += [rf"\subsection*{{Claim on ${name}$ (input line {claim.span.line})}}",
                "Claimed" + (" (compared at its written digits)" if claim.rounded else "") + ":",
                r"\begin{align*}", fitting_rows(name, claimed), r"\end{align*}",
                f"Derived{where}:", r"\begin{align*}", fitting_rows(name, value_latex(derivation, c, names)),
                r"\end{align*}"]
        limits = ", ".join(rf"${sympy.latex(s)}^{{{k}}}$" for s, k in
                           sorted(dict(claim.limits).items(), key=lambda kv: kv[0].name))
        verdict = rf"Verdict: \textbf{{{escape_text(result.status)}}} ({escape_text(result.method)})"
        verdict += f"; compared below {limits}" if limits else ""
        if result.status == "mismatch" and result.difference is not None:
            out += [verdict + "; claimed minus derived:", r"\begin{align*}",
                    fitting_rows(r"\Delta", top_level_terms(sympy.latex(result.difference, symbol_names=names))),
                    r"\end{align*}"]
        elif result.conditions:
            rows = [fitting_rows(sympy.latex(e.lhs, symbol_names=names),
                                 top_level_terms(sympy.latex(e.rhs, symbol_names=names))) for e in result.conditions]
            out += [verdict + "; it holds if and only if", r"\begin{align*}", " \\\\\n".join(rows), r"\end{align*}"]
        else:
            out.append(verdict + ".")
    return out


def values_section(derivation: Derivation, names: dict) -> list[str]:
    """`evaluate` values and `tabulate` tables as booktabs tables."""
    system = derivation.system
    out = []
    if system.evaluations or system.tables:
        out.append(r"\section{Values and tables}")
    for evaluation, rows in derivation.evaluations:
        at = ", ".join(rf"${sympy.latex(s, symbol_names=names)}={sympy.latex(v)}$" for s, v in evaluation.point)
        out += [rf"\subsection*{{Values{' at ' + at if at else ''}}}",
                rf"To {evaluation.digits} significant digits.", r"\begin{center}",
                r"\begin{tabular}{lp{0.7\textwidth}}", r"\toprule",
                r"Coefficient & Value \\", r"\midrule"]
        out += [rf"${claim_latex_name(derivation, t)}$ & ${_breakable(number_latex(number))}$ \\"
                for t, (_, number) in zip(evaluation.targets, rows)]
        out += [r"\bottomrule", r"\end{tabular}", r"\end{center}"]
        # what the text label adds (a truncation, pieces put in exactly at this point), as a remark below
        out += [rf"\noindent ${claim_latex_name(derivation, t)}$: {escape_text(label[len(t.label):].strip())}\par"
                for t, (label, _) in zip(evaluation.targets, rows) if label.startswith(t.label) and label != t.label]
    for table, rows in derivation.tables:
        header = [rf"${sympy.latex(s, symbol_names=names)}$" for s, _ in table.axes] + \
                 [rf"${sympy.latex(s, symbol_names=names)}$" for s, _ in table.fixed]
        coefficients, remarks = _table_columns(derivation, table, rows[0][len(header):])
        header += coefficients
        out.append(rf"\subsection*{{Table ({escape_text(table.path)})}}")
        out += remarks
        if len(rows) > TABLE_ROWS_SHOWN + 1:
            where = "written to" if derivation.files_written else "for"
            out.append(f"{len(rows) - 1} rows, {where} the file {escape_text(table.path)}.")
            continue
        out += [r"\begin{center}", r"\begin{tabular}{" + "r" * len(header) + "}", r"\toprule",
                " & ".join(header) + r" \\", r"\midrule"]
        out += [" & ".join(f"${number_latex(cell)}$" for cell in row) + r" \\" for row in rows[1:]]
        out += [r"\bottomrule", r"\end{tabular}", r"\end{center}"]
    return out


def _table_columns(derivation, table, cells) -> tuple[list[str], list[str]]:
    """The LaTeX heads of a table's coefficient columns from its CSV header (a coefficient, possibly with a
    note such as its truncation; the error column a sampled one adds after it), and one remark per note."""
    names = {t.label: claim_latex_name(derivation, t) for t in table.targets}
    heads, remarks = [], []
    for cell in cells:
        label = next((t for t in names if cell == t or cell.startswith(t + " (")), None)
        if label is None and cell.endswith(" error") and cell[:-len(" error")] in names:
            heads.append(rf"error of ${names[cell[:-len(' error')]]}$")
            continue
        bias = " slicing bias bound"
        if label is None and cell.endswith(bias) and cell[:-len(bias)] in names:
            heads.append(rf"slicing bias bound of ${names[cell[:-len(bias)]]}$")
            continue
        if label is None:   # not expected: keep the CSV's own text
            heads.append(escape_text(cell))
            continue
        heads.append(rf"${names[label]}$")
        if cell != label:
            remarks.append(rf"\noindent ${names[label]}$: {escape_text(cell[len(label):].strip()[1:-1])}\par")
    return heads, remarks


def _breakable(number: str, group: int = 10) -> str:
    """A long decimal may break after every `group` digits (values asked with many digits); the words
    after a Monte Carlo number (`\\ \\text{(...)}`) stay whole."""
    head, mark, words = number.partition(r"\ \text{")
    if len(head) <= 4 * group:
        return number
    return r"\allowbreak ".join(head[k:k + group] for k in range(0, len(head), group)) + mark + words


def figures_section(derivation: Derivation) -> list[str]:
    """Each `plot` as a figure: the vector PDF when the run wrote it, else a framed note."""
    system = derivation.system
    figures = [(figure.path, lambda figure=figure: figure_caption_latex(derivation, figure)) for figure in system.figures]
    if any(s.map for s in system.samplings):
        from ..loops.figures import map_caption_latex
        figures += [(statement.sampling.map, lambda statement=statement: map_caption_latex(statement, system))
                    for statement in derivation.sampled if statement.sampling.map]
    for result in derivation.states:     # equation-of-state figures
        if result.request.kind == "plot" and result.request.path is not None:
            from ..products.states import figure_caption
            figures.append((result.request.path, lambda result=result: escape_text(
                figure_caption(result.eos, result.request).replace("\n", " ")) + "."))
    if not figures:
        return []
    out = [r"\section{Figures}"]
    folder = derivation.__dict__.get("_files_folder")
    document = derivation.__dict__.get("_document_folder")
    for path, caption in figures:
        pdf = Path(path).with_suffix(".pdf")
        if derivation.files_written and folder is not None:
            where = os.path.relpath(Path(folder) / pdf, document if document is not None else ".")
            body = rf"\includegraphics[width=0.8\textwidth]{{{Path(where).as_posix()}}}"
        else:
            body = rf"\fbox{{\parbox{{0.6\textwidth}}{{\centering The figure {escape_text(str(pdf))} is not written in this run.}}}}"
        label = "fig:" + "".join(ch if ch.isalnum() else "-" for ch in Path(path).stem)
        out += [r"\begin{figure}[htbp]", r"\centering", body, rf"\caption{{{caption()}}}\label{{{label}}}",
                r"\end{figure}"]
    return out
