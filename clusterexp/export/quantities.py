"""How a regime's quantities (`routes.base.Quantities`: per lambda^d, rho_L, state or one-body partition
function) and the input's assumptions are stated, the same way in every printer (text, LaTeX, JSON,
figures)."""
from __future__ import annotations

import sympy

from ..routes import THERMAL, Quantities, regime_of

STATISTICS = "exchange parameter alpha: 0 bosons, 1 fermions (period 2); mutual parameter alpha_ij: period 1"


def quantities(system) -> Quantities:
    """The quantities the system's regime computes (None: per lambda^d)."""
    return THERMAL if system is None else regime_of(system).quantities(system)


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
