"""LaTeX printer: a snippet (align environment) for pasting, or a standalone document."""
from __future__ import annotations

from typing import TYPE_CHECKING

if TYPE_CHECKING:  # the results import the printers for their notebook display, not the other way
    from ..results import Coefficient, Derivation

import sympy

from ..routes import regime_of
from .common import species_statistics
from .quantities import assumptions_latex, conventions_latex, quantities
from .latex_lines import aligned_rows
from ..naming import generated_latex_names, is_single_atom, latex_subscript, species_latex
from ..exact.series import indices_up_to
from .series_lines import series_latex_paragraphs, series_latex_rows
from .state_lines import state_latex

LETTERS = {"cluster": "b", "virial": "a"}


def species_labels(system) -> list[str]:
    """The LaTeX of each species: the user's `typeset` choice, else the name."""
    return [system.typesetting.symbol(s) or species_latex(s) for s in system.species_names]


def _symbol_names(derivation: Derivation) -> dict:
    system = derivation.system
    order = max([system.order] + [c.order for c in derivation])
    names = generated_latex_names(indices_up_to(len(system.species), order), system.species_names,
                                  species_labels(system))
    for p in system.parameters:
        chosen = system.typesetting.symbol(p.name)
        if chosen:  # a name of several symbols (\hbar\omega, m_B/m_A) stays one factor in products and powers
            names[p.symbol] = chosen if is_single_atom(chosen) else rf"\left({chosen}\right)"
    from ..pieces import tube_latex_names
    names.update(tube_latex_names(system))
    for unknown in derivation.unknowns():
        names[unknown.symbol] = unknown.latex(names)
    return names


def _lhs(c: Coefficient, labels: list[str], d: int, wavelength: str = r"\lambda", q=None) -> str:
    """The LaTeX name of a coefficient (also of a `model.CoefficientName`); densities in the regime's
    quantities `q` (`quantities.Quantities`; default per lambda^d)."""
    q = q or quantities(None)
    sub = latex_subscript(c.index, labels)
    if c.kind in LETTERS:
        return f"{LETTERS[c.kind]}_{{{sub}}}"
    k = labels[c.species.index(c.component)] if c.component else ""
    if c.kind == "density":
        return rf"\left[{q.density_tex(k, wavelength, d)}\right]_{{{_monomial(c.index, labels, lambda l: f'z_{{{l}}}')}}}"
    thermal = q.unit == "lambda^d"
    monomial = _monomial(c.index, labels, lambda l: f"({q.density_tex(l, wavelength, d)})" if thermal
                         else q.density_tex(l, wavelength, d))
    return rf"\left[z_{{{k}}}\right]_{{{monomial}}}"


def _monomial(index, labels, factor) -> str:
    factors = []
    for n, label in zip(index, labels):
        if not n:
            continue
        base = factor(label)
        factors.append(base if n == 1 else f"{base}^{{{n}}}")
    return " ".join(factors)


def latex_snippet(derivation: Derivation, environment: str = "align", align: bool | None = None) -> str:
    """The coefficients as one LaTeX environment (`align`, `align*` or `aligned`)."""
    system = derivation.system
    names = _symbol_names(derivation)
    labels = species_labels(system)
    use_align = system.output.align if align is None else align
    amp = "&" if use_align else ""
    q = quantities(system)
    wavelength = system.typesetting.wavelength
    rows = [row for c in derivation for row in
            [aligned_rows(_lhs(c, labels, system.dimension, wavelength, q), c.latex_terms(names) or c.latex(names))
             if use_align else
             f"  {_lhs(c, labels, system.dimension, wavelength, q)} = {c.latex(names)}",
             *series_latex_rows(derivation, c, amp, names)]]
    body = " \\\\\n".join(rows)
    snippet = f"\\begin{{{environment}}}\n{body}\n\\end{{{environment}}}\n"
    if system.samplings and environment != "aligned":  # (aligned: inline display in notebooks)
        from ..loops.report import latex_block
        snippet += latex_block(derivation.sampled, system)
    if system.states and environment != "aligned":
        snippet += "".join(line + "\n" for line in state_latex(derivation, _escape))
    return snippet


def regime_latex(system) -> list[str]:
    """Paragraphs stating the regime's closed forms and, where there is one, its equation of state."""
    return regime_of(system).latex_paragraphs(system, species_labels(system))


def latex_document(derivation: Derivation) -> str:
    """A standalone document that compiles with pdflatex: conventions, the declared system, each
    coefficient as a numbered equation, then the checks of the user's claims, the values asked for
    and small tables."""
    system = derivation.system
    derivation.checks  # noqa: B018 -- first: their equations may name Taylor coefficients of pieces
    names = _symbol_names(derivation)
    labels = species_labels(system)
    w = "{" + system.typesetting.wavelength + "}"

    def math(expr) -> str:
        return sympy.latex(expr, symbol_names=names)

    def statistics(i, label) -> str:
        word, value = species_statistics(system, i)
        return (f"exchange parameter ${math(value)}$" if word == "exchange" else
                f"exclusion statistics $g_{{{label}{label}}}={math(value)}$")
    species = ", ".join(f"${label}$ (mass ${math(s.mass)}$, {statistics(i, label)})"
                        for i, (label, s) in enumerate(zip(labels, system.species)))
    lines = [
        r"\documentclass{article}",
        r"\usepackage{amsmath}",
        r"\allowdisplaybreaks",
        r"\begin{document}",
        r"\section*{Cluster and virial coefficients}",
        rf"Dimension $d={system.dimension}$; species {species}; reference species "
        rf"${labels[system.species_names.index(system.reference)]}$ with thermal wavelength ${w}$.",
    ]
    if system.mutuals:
        lines.append("Mutual (braiding) parameters: " + ", ".join(
            rf"$\alpha_{{{labels[system.species_names.index(m.first)]}{labels[system.species_names.index(m.second)]}}}"
            rf"={math(m.value)}$" for m in system.mutuals) + r" (period $1$).")
    lines += [
        *assumptions_latex(system, math),
        conventions_latex(system, system.typesetting.wavelength),
        *regime_latex(system),
        *series_latex_paragraphs(derivation),
        latex_snippet(derivation).rstrip("\n"),
        *_unknowns_latex(derivation, names),
        *_checks_latex(derivation, labels, w, names),
        *_values_latex(derivation, labels, w, names),
        *state_latex(derivation, _escape),
        r"\end{document}",
    ]
    return "\n".join(lines) + "\n"


def _name(derivation, target, labels, w) -> str:
    c = derivation.coefficient(target.kind, target.index, target.component)
    return _lhs(c, labels, derivation.system.dimension, w.strip("{}"), quantities(derivation.system))


def _unknowns_latex(derivation: Derivation, names) -> list[str]:
    """What each named Taylor coefficient of a many-body piece stands for."""
    unknowns = derivation.unknowns()
    if not unknowns:
        return []
    return [r"Unknown Taylor coefficients of the named many-body pieces (the pieces are continuous; at a kink "
            r"each side has its own coefficients):", r"\begin{itemize}"] + \
        [rf"\item ${names[u.symbol]}$: {u.latex_description(names)}." for u in unknowns] + [r"\end{itemize}"]


def claim_latex_name(derivation: Derivation, target) -> str:
    """The LaTeX name of a claimed coefficient (`typeset` choices included), for the display of a check."""
    system = derivation.system
    return _name(derivation, target, species_labels(system), system.typesetting.wavelength)


def latex_symbol_names(derivation: Derivation) -> dict:
    """{symbol: LaTeX} for the generated names and the `typeset` parameters."""
    return _symbol_names(derivation)


def _checks_latex(derivation: Derivation, labels, w, names) -> list[str]:
    system = derivation.system
    if not system.claims:
        return []
    out = [r"\subsection*{Checks of hand results}", r"\begin{itemize}"]
    for claim, result in zip(system.claims, derivation.checks):
        line = rf"\item ${_name(derivation, claim.target, labels, w)}$"
        if claim.limits or result.label != claim.target.label:
            line += " (compared below " + ", ".join(rf"${sympy.latex(s)}^{{{k}}}$" for s, k in
                                                     sorted(dict(claim.limits).items(), key=lambda kv: kv[0].name)) \
                if claim.limits else " (compared as a truncated series"
            line += ")"
        line += f": {result.status} ({_escape(result.method)})"
        if result.status == "mismatch" and result.difference is not None:
            difference = aligned_rows(r"\Delta", sympy.latex(result.difference, symbol_names=names))
            line += "; claimed minus derived:\n" + "\\begin{align*}\n" + difference + "\n\\end{align*}"
        elif result.conditions:
            rows = r" \\ ".join(f"{sympy.latex(e.lhs, symbol_names=names)} &= {sympy.latex(e.rhs, symbol_names=names)}"
                                for e in result.conditions)
            line += "; it holds if and only if\n\\begin{align*}\n" + rows + "\n\\end{align*}"
        else:
            line += "."
        out.append(line)
    out.append(r"\end{itemize}")
    return out


def _values_latex(derivation: Derivation, labels, w, names) -> list[str]:
    system = derivation.system
    out = []
    for evaluation, rows in derivation.evaluations:
        at = ", ".join(rf"${sympy.latex(s, symbol_names=names)}={sympy.latex(v)}$" for s, v in evaluation.point)
        out += [rf"\subsection*{{Values{' at ' + at if at else ''}}}", r"\begin{tabular}{ll}"]
        out += [rf"${_name(derivation, t, labels, w)}$ & ${number}$ \\" for t, (_, number) in zip(evaluation.targets, rows)]
        out.append(r"\end{tabular}")
    for table, rows in derivation.tables:
        header = [rf"${sympy.latex(s, symbol_names=names)}$" for s, _ in table.axes] + \
                 [rf"${sympy.latex(s, symbol_names=names)}$" for s, _ in table.fixed] + \
                 [rf"${_name(derivation, t, labels, w)}$" for t in table.targets]
        out.append(rf"\subsection*{{Table ({_escape(table.path)})}}")
        if len(rows) > TABLE_ROWS_SHOWN + 1:
            where = "written to" if derivation.files_written else "for"
            out.append(f"{len(rows) - 1} rows, {where} the file {_escape(table.path)}.")
            continue
        out += [r"\begin{tabular}{" + "r" * len(header) + "}", " & ".join(header) + r" \\ \hline"]
        out += [" & ".join(f"${_number_latex(cell)}$" for cell in row) + r" \\" for row in rows[1:]]
        out.append(r"\end{tabular}")
    return out


TABLE_ROWS_SHOWN = 40


def _number_latex(text: str) -> str:
    if "/" in text:
        p, q = text.lstrip("-").split("/", 1)
        return ("-" if text.startswith("-") else "") + rf"\tfrac{{{p}}}{{{q}}}"
    return text.replace("j", "i").replace("e", r"\times10^{") + ("}" if "e" in text else "")


def _escape(text: str) -> str:
    for char, replacement in (("\\", r"\textbackslash{}"), ("_", r"\_"), ("%", r"\%"), ("&", r"\&"), ("#", r"\#"),
                              ("$", r"\$"), ("{", r"\{"), ("}", r"\}"), ("^", r"\^{}"), ("~", r"\~{}")):
        text = text.replace(char, replacement) if char != "\\" else text.replace(char, "\0")
    return text.replace("\0", r"\textbackslash{}")
