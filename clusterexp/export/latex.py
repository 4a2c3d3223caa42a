"""LaTeX printer: a snippet (align environment) for pasting, or a standalone document."""
from __future__ import annotations

import sympy

from .common import eos_exponents, statistics_matrix
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
    snippet = f"\\begin{{{environment}}}\n{body}\n\\end{{{environment}}}\n"
    if system.samplings and environment != "aligned":  # (aligned: inline display in notebooks)
        from ..loops.report import latex_block
        snippet += latex_block(derivation.sampled, system)
    return snippet


def regime_latex(system) -> list[str]:
    """Paragraphs stating the regime's conventions and, where there is one, its equation of state."""
    kind = system.source.kind
    labels = [species_latex(s) for s in system.species_names]
    if kind == "ideal":
        return [r"Ideal gases: $b_{l\,e_i}=(m_i/m_{\mathrm{ref}})^{d/2}(\pm1)^{l+1}l^{-1-d/2}$ "
                r"(upper sign bosons, lower fermions; Boltzmann species have $b_{e_i}$ only); no mixed coefficients."]
    if kind == "spectrum":
        spec = system.source.spectrum
        weight = r"|n|" if spec.area == "count" else r"(M_n/m_{\mathrm{ref}})^{d/2}"
        rows = ", ".join(f"${l}$: $L(x)={sympy.latex(lv)}$ ({fill})" for l, lv, fill in zip(labels, spec.levels, spec.fill))
        return [r"Declared trapped spectrum, $x=e^{-\beta\hbar\omega}$: "
                rf"$b_n={weight}\lim_{{\omega\to0}}[z^n]\ln\Xi_{{\mathrm{{trap}}}}/Z_{{1,\mathrm{{ref}}}}(x)$; "
                rf"one-body levels {rows}; energy shift $\hbar\omega\,({sympy.latex(spec.shift)})$ "
                r"with $N_X$ the number of particles of species $X$."]
    g = statistics_matrix(system)
    if g is None:
        return []
    level = kind == "landau" or system.source.form == "level"
    equations = []
    for i, label in enumerate(labels):
        factors = [rf"(1+u_{{{labels[j]}}})" + ("" if e == 1 else rf"^{{{sympy.latex(e)}}}")
                   for j, e in eos_exponents(g, i)]
        argument = rf"z_{{{label}}}" if level else rf"z_{{{label}}}e^{{-\beta\varepsilon_{{{label}}}(k)}}"
        equations.append(rf"u_{{{label}}}={argument}" + "".join(factors))
    logs = "+".join(rf"\ln(1+u_{{{l}}})" for l in labels)
    if kind == "landau":
        text = (r"Lowest Landau level (all species with the same charge, degeneracy $\rho_L=eB/h$ per area): "
                r"$\beta P/\rho_L=\sum_n b_n z^n$ and the virial coefficients are those of $\nu=\rho/\rho_L$. "
                r"Statistics matrix $g_{ii}=\alpha_i$, $g_{ij}=\alpha_{ij}$.")
        pressure = rf"\beta P/\rho_L={logs}"
    elif level:
        text = (r"Exclusion statistics on one single-particle level, Haldane's $g_{ij}=-\partial d_i/\partial N_j$: "
                r"$\beta P/(\text{states})=\sum_n b_n z^n$.")
        pressure = rf"\beta P/(\text{{states}})={logs}"
    else:
        text = (rf"Exclusion statistics in the continuum, $d={system.dimension}$, Haldane's "
                r"$g_{ij}=-\partial d_i/\partial N_j$; the levels are momentum cells shared by all species, "
                r"$\varepsilon_i(k)=\hbar^2k^2/2m_i$.")
        pressure = rf"\beta P\lambda^d=\int\frac{{d^dk\,\lambda^d}}{{(2\pi)^d}}\,\bigl[{logs}\bigr]"
    return [text + " Equation of state:",
            r"\begin{gather*}", r" \\ ".join(equations) + r" \\", pressure, r"\end{gather*}"]


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
        *regime_latex(system),
        latex_snippet(derivation).rstrip("\n"),
        r"\end{document}",
    ]
    return "\n".join(lines) + "\n"
