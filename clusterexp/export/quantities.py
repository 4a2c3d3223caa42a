"""What a regime's numbers are numbers of: pressure and densities per lambda^d, per rho_L, per state or
per one-body partition function, stated the same way in every printer (text, LaTeX, JSON, figures)."""
from __future__ import annotations

from dataclasses import dataclass

import sympy

STATISTICS = "exchange parameter alpha: 0 bosons, 1 fermions (period 2); mutual parameter alpha_ij: period 1"


@dataclass(frozen=True)
class Quantities:
    """`pressure`/`density` in plain text (density with `{i}` for the species); `unit` names what the
    densities are measured against; the LaTeX forms take the wavelength symbol and a species label."""

    pressure: str
    density: str
    variable: str  # the density variable of the virial series, e.g. (rho lambda^d), nu
    single: str
    unit: str
    pressure_latex: str
    density_latex: str  # format with label=, w=, d=
    variable_latex: str = ""
    single_latex: str = ""

    def density_of(self, name: str) -> str:
        return self.density.format(i=name)

    def density_tex(self, label: str, wavelength: str, d: int) -> str:
        return self.density_latex.format(label=label, w="{" + wavelength + "}", d=d)


_THERMAL = Quantities(
    pressure="beta P lambda^d", density="rho_{i} lambda^d", variable="(rho lambda^d)",
    single="lambda = thermal wavelength of the reference species; "
           "b_(single particle of i) = (m_i/m_ref)^(d/2), a_(single particle) = 1",
    unit="lambda^d", pressure_latex=r"\beta P{w}^d", density_latex=r"\rho_{{{label}}}{w}^{{{d}}}",
    variable_latex=r"(\rho{w}^d)", single_latex=r"single-particle $b=(m_i/m_{{\mathrm{{ref}}}})^{{d/2}}$")

_LANDAU = Quantities(
    pressure="beta P / rho_L", density="nu_{i}", variable="nu",
    single="nu_i = rho_i / rho_L, rho_L = eB/h the degeneracy of the lowest Landau level per area (the same "
           "for every species: equal charges); b_(single particle) = 1, a_(single particle) = 1",
    unit="rho_L", pressure_latex=r"\beta P/\rho_L", density_latex=r"\nu_{{{label}}}", variable_latex=r"\nu",
    single_latex=r"$\nu_i=\rho_i/\rho_L$ with $\rho_L=eB/h$ the degeneracy per area of the lowest Landau level "
                 r"(equal charges); single-particle $b=1$")

_LEVEL = Quantities(
    pressure="beta P / (states)", density="N_{i} / (states)", variable="(N / states)",
    single="N_i / (states) = particles of species i per single-particle state (one level); "
           "b_(single particle) = 1, a_(single particle) = 1",
    unit="states", pressure_latex=r"\beta P/(\text{{states}})", density_latex=r"N_{{{label}}}/(\text{{states}})",
    variable_latex=r"(N/\text{{states}})", single_latex=r"densities are particles per single-particle state "
                                                         r"(one level); single-particle $b=1$")

_COUNT = Quantities(
    pressure="beta P / rho_0", density="nu_{i}", variable="nu",
    single="nu_i = rho_i / rho_0, rho_0 the one-body degeneracy per area of the declared levels (weight |n|, "
           "as in the lowest Landau level); b_(single particle) = 1, a_(single particle) = 1",
    unit="rho_0", pressure_latex=r"\beta P/\rho_0", density_latex=r"\nu_{{{label}}}", variable_latex=r"\nu",
    single_latex=r"$\nu_i=\rho_i/\rho_0$, $\rho_0$ the one-body degeneracy per area of the declared levels "
                 r"(weight $|n|$); single-particle $b=1$")

_TRAPPED = Quantities(
    pressure="ln Xi_trap / Z_1", density="N_{i} / Z_1", variable="(N / Z_1)",
    single="the trapped gas itself: every quantity per one-body partition function Z_1 of the reference "
           "species; b_(single particle) = 1, a_(single particle) = 1",
    unit="Z_1", pressure_latex=r"\ln\Xi_{{\mathrm{{trap}}}}/Z_1", density_latex=r"N_{{{label}}}/Z_1",
    variable_latex=r"(N/Z_1)", single_latex=r"the trapped gas itself, every quantity per one-body partition "
                                            r"function $Z_1$ of the reference species; single-particle $b=1$")


def quantities(system) -> Quantities:
    """The quantities the system's regime computes (None: per lambda^d)."""
    if system is None:
        return _THERMAL
    source = system.source
    if source.kind == "landau":
        return _LANDAU
    if source.kind == "exclusion" and source.form == "level":
        return _LEVEL
    if source.kind == "spectrum":
        return {"count": _COUNT, "one": _TRAPPED}.get(source.spectrum.area, _THERMAL)
    return _THERMAL


def conventions(system) -> str:
    """The conventions sentence of the system's regime (text and JSON)."""
    q = quantities(system)
    return f"{q.pressure} = sum_n b_n z^n = sum_n a_n {q.variable}^n; {STATISTICS}; {q.single}"


def kind_titles(system) -> dict[str, str]:
    """Section titles per kind of coefficient, in the regime's quantities."""
    q = quantities(system)
    return {
        "cluster": "cluster coefficients b",
        "virial": "virial coefficients a",
        "density": f"density expansion {q.density_of('i')} in the fugacities z",
        "fugacity": f"fugacity expansion z_i in the densities {q.variable.strip('()')}",
    }


def parameter_records(system) -> list[dict]:
    """Each declared parameter with its range and assumptions (JSON `parameters`)."""
    out = []
    for p in system.parameters:
        record = {"name": p.name}
        if p.lower is not None or p.upper is not None:
            record["range"] = range_text(p)
        if p.assumptions:
            record["assumptions"] = list(p.assumptions)
        out.append(record)
    return out


def range_text(p) -> str:
    low = "-oo" if p.lower is None else sympy.sstr(p.lower)
    high = "oo" if p.upper is None else sympy.sstr(p.upper)
    return f"{'(' if p.lower_open or p.lower is None else '['}{low}, {high}{')' if p.upper_open or p.upper is None else ']'}"


def parameter_line(system) -> str | None:
    """`parameters: alpha in [0, 1) (positive), g` or None."""
    if not system.parameters:
        return None
    parts = []
    for p in system.parameters:
        text = p.name + (f" in {range_text(p)}" if p.lower is not None or p.upper is not None else "")
        if p.assumptions:
            text += f" ({', '.join(p.assumptions)})"
        parts.append(text)
    return "parameters: " + ", ".join(parts)


def given_records(system) -> list[dict]:
    """Each given coefficient as the user wrote it, O terms included (JSON `given`)."""
    from ..naming import coefficient_label
    kind = {"cluster": "cluster", "virial": "virial"}
    return [{"coefficient": coefficient_label(kind.get(v.kind, v.kind), v.index), "value": _given_text(v.value)}
            for v in system.source.values]


def _given_text(value) -> str:
    value = sympy.sympify(value)
    if not value.has(sympy.Order):
        return sympy.sstr(value)
    known = value.removeO()
    orders = [t for t in sympy.Add.make_args(value) if isinstance(t, sympy.Order)]
    return " + ".join([sympy.sstr(known)] + [sympy.sstr(o) for o in orders])


def given_line(system) -> str | None:
    records = given_records(system)
    if not records:
        return None
    return "given: " + "; ".join(f"{r['coefficient']} = {r['value']}" for r in records)


def conventions_latex(system, wavelength: str) -> str:
    """The conventions sentence of the system's regime for the LaTeX document."""
    q = quantities(system)
    w = "{" + wavelength + "}"
    pressure, variable = q.pressure_latex.format(w=w), q.variable_latex.format(w=w)
    return (rf"Conventions: ${pressure}=\sum_n b_n z^n=\sum_n a_n{variable}^n$; exchange parameter "
            r"$\alpha=0$ bosons, $\alpha=1$ fermions (period $2$); " + q.single_latex.format(w=w) + ".")


def assumptions_latex(system, math) -> list[str]:
    """The declared parameter ranges and the given pieces (with their O terms), for the document."""
    out = []
    if system.parameters:
        parts = []
        for p in system.parameters:
            text = f"${math(p.symbol)}"
            if p.lower is not None or p.upper is not None:
                low = r"-\infty" if p.lower is None else math(p.lower)
                high = r"\infty" if p.upper is None else math(p.upper)
                text += (rf"\in{'(' if p.lower_open or p.lower is None else '['}{low},{high}"
                         rf"{')' if p.upper_open or p.upper is None else ']'}")
            text += "$" + (f" ({', '.join(p.assumptions)})" if p.assumptions else "")
            parts.append(text)
        out.append("Parameters: " + ", ".join(parts) + ". Every coefficient below holds for these values only "
                   "(a periodic closed form is printed as its branch on the declared range).")
    if system.source.values:
        rows = []
        for v in system.source.values:
            value = sympy.sympify(v.value)
            orders = [t for t in sympy.Add.make_args(value) if isinstance(t, sympy.Order)]
            known = math(value.removeO()) if orders else math(value)
            tail = "".join(rf"+O\left({sympy.latex(o.expr)}\right)" for o in orders)
            letter = "b" if v.kind == "cluster" else "a"
            rows.append(f"${letter}_{{{','.join(str(n) for n in v.index)}}}={known}{tail}$")
        out.append("Given as input: " + ", ".join(rows) + ".")
    return out
