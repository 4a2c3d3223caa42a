"""LaTeX printer: a snippet (align environment) for pasting, or a standalone document."""
from __future__ import annotations

import sympy

from ..naming import generated_latex_names, latex_subscript, species_latex
from ..results import Coefficient, Derivation
from ..series import indices_up_to

LETTERS = {"cluster": "b", "virial": "a"}


def _symbol_names(derivation: Derivation) -> dict:
    system = derivation.system
    order = max([system.order] + [c.order for c in derivation])
    return generated_latex_names(indices_up_to(len(system.species), order), system.species_names)


def _lhs(c: Coefficient, labels: list[str], d: int) -> str:
    sub = latex_subscript(c.index, labels)
    if c.kind in LETTERS:
        return f"{LETTERS[c.kind]}_{{{sub}}}"
    k = species_latex(c.component)
    monomial = _monomial(c.index, labels, "z" if c.kind == "density" else r"\rho", d if c.kind == "fugacity" else None)
    head = rf"\rho_{{{k}}}\lambda^{{{d}}}" if c.kind == "density" else f"z_{{{k}}}"
    return rf"\left[{head}\right]_{{{monomial}}}"


def _monomial(index, labels, letter, d) -> str:
    factors = []
    for n, label in zip(index, labels):
        if not n:
            continue
        base = f"{letter}_{{{label}}}" if d is None else rf"({letter}_{{{label}}}\lambda^{{{d}}})"
        factors.append(base if n == 1 else f"{base}^{{{n}}}")
    return " ".join(factors)


def latex_snippet(derivation: Derivation, environment: str = "align", align: bool | None = None) -> str:
    """The coefficients as one LaTeX environment (`align`, `align*` or `aligned`)."""
    system = derivation.system
    names = _symbol_names(derivation)
    labels = [species_latex(s) for s in system.species_names]
    use_align = system.output.align if align is None else align
    amp = "&" if use_align else ""
    rows = [f"  {_lhs(c, labels, system.dimension)} {amp}= {c.latex(names)}"
            for c in derivation]
    body = " \\\\\n".join(rows)
    return f"\\begin{{{environment}}}\n{body}\n\\end{{{environment}}}\n"


def latex_document(derivation: Derivation) -> str:
    """A standalone document that compiles with pdflatex: conventions, the system, the equations."""
    system = derivation.system
    species = ", ".join(
        f"${species_latex(s.name)}$ (mass ${sympy.latex(s.mass)}$, exchange parameter ${sympy.latex(s.exchange)}$)"
        for s in system.species)
    lines = [
        r"\documentclass{article}",
        r"\usepackage{amsmath}",
        r"\begin{document}",
        r"\section*{Cluster and virial coefficients}",
        rf"Dimension $d={system.dimension}$; species {species}; reference species "
        rf"${species_latex(system.reference)}$ with thermal wavelength $\lambda$.",
        r"Conventions: $\beta P\lambda^d=\sum_n b_n z^n=\sum_n a_n(\rho\lambda^d)^n$; exchange parameter "
        r"$\alpha=0$ bosons, $\alpha=1$ fermions; single-particle $b=(m_i/m_{\mathrm{ref}})^{d/2}$.",
        latex_snippet(derivation).rstrip("\n"),
        r"\end{document}",
    ]
    return "\n".join(lines) + "\n"
