"""LaTeX printer: a snippet (align environment) for pasting, or a standalone document."""
from __future__ import annotations

from typing import TYPE_CHECKING

if TYPE_CHECKING:  # the results import the printers for their notebook display, not the other way
    from ..results import Coefficient, Derivation

import sympy

from ..routes import regime_of
from .quantities import quantities
from .equations import labelled_equations
from .latex_lines import aligned_rows, escape_text, top_level_terms  # noqa: F401  (escape_text: used here and by the document)
from ..naming import generated_latex_names, is_single_atom, latex_subscript, species_latex
from ..exact.series import indices_up_to
from .series_lines import series_latex_rows

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


def value_latex(derivation: Derivation, c: Coefficient, names) -> list[str]:
    """The LaTeX of a coefficient's value as the input's `values` statement writes it: its terms with
    their signs (the break points of a long line)."""
    return (derivation.shaped(c).latex_terms(names) or c.latex_terms(names)
            or top_level_terms(c.latex(names)) or [c.latex(names)])


def coefficient_lhs(derivation: Derivation, c: Coefficient) -> str:
    """The LaTeX name of coefficient c in the derivation's conventions and `typeset` names."""
    system = derivation.system
    return _lhs(c, species_labels(system), system.dimension, system.typesetting.wavelength, quantities(system))


def latex_snippet(derivation: Derivation, environment: str = "align", align: bool | None = None) -> str:
    """The coefficients as one LaTeX environment (`align`, `align*` or `aligned`)."""
    system = derivation.system
    names = _symbol_names(derivation)
    labels = species_labels(system)
    use_align = system.output.align if align is None else align
    amp = "&" if use_align else ""
    q = quantities(system)
    wavelength = system.typesetting.wavelength
    if system.presentation.snippet and environment != "aligned":
        chosen = [derivation.coefficient(t.kind, t.index, t.component) for t in system.presentation.snippet]
        return labelled_equations(derivation, [(c, coefficient_lhs(derivation, c), value_latex(derivation, c, names))
                                               for c in chosen])
    rows = [row for c in derivation for row in
            [aligned_rows(_lhs(c, labels, system.dimension, wavelength, q), value_latex(derivation, c, names))
             if use_align else
             f"  {_lhs(c, labels, system.dimension, wavelength, q)} = {' '.join(value_latex(derivation, c, names))}",
             *series_latex_rows(derivation, c, amp, names)]]
    body = " \\\\\n".join(rows)
    snippet = f"\\begin{{{environment}}}\n{body}\n\\end{{{environment}}}\n"
    if system.samplings and environment != "aligned":  # (aligned: inline display in notebooks)
        from ..loops.report import latex_block
        snippet += latex_block(derivation.sampled, system)
    return snippet


def regime_latex(system) -> list[str]:
    """Paragraphs stating the regime's closed forms and, where there is one, its equation of state."""
    return regime_of(system).latex_paragraphs(system, species_labels(system))


def _name(derivation, target, labels, w) -> str:
    c = derivation.coefficient(target.kind, target.index, target.component)
    return _lhs(c, labels, derivation.system.dimension, w.strip("{}"), quantities(derivation.system))


def unknowns_latex(derivation: Derivation, names) -> list[str]:
    """What each named Taylor coefficient of a many-body piece stands for."""
    unknowns = derivation.unknowns()
    if not unknowns:
        return []
    return [r"Unknown Taylor coefficients of the named many-body pieces (the pieces are continuous; at a kink "
            r"each side has its own coefficients):", r"\begin{itemize}"] + \
        [rf"\item ${names[u.symbol]}$: {u.latex_description(names)}."
         for u in unknowns] + [r"\end{itemize}"]


def claim_latex_name(derivation: Derivation, target) -> str:
    """The LaTeX name of a claimed coefficient (`typeset` choices included), for the display of a check."""
    system = derivation.system
    return _name(derivation, target, species_labels(system), system.typesetting.wavelength)


def latex_symbol_names(derivation: Derivation) -> dict:
    """{symbol: LaTeX} for the generated names and the `typeset` parameters."""
    return _symbol_names(derivation)


TABLE_ROWS_SHOWN = 40


def number_latex(text: str) -> str:
    if " +- " in text:   # a Monte Carlo value: `0.0362 +- 0.0013 (Monte Carlo; slicing bias below 0.0009)`
        value, rest = text.split(" +- ", 1)
        error, _, words = rest.partition(" (")
        words = rf"\ \text{{({escape_text(words)}}}" if words else ""
        return rf"{number_latex(value)} \pm {number_latex(error)}" + words
    if "/" in text:
        p, q = text.lstrip("-").split("/", 1)
        return ("-" if text.startswith("-") else "") + rf"\tfrac{{{p}}}{{{q}}}"
    return text.replace("j", "i").replace("e", r"\times10^{") + ("}" if "e" in text else "")

