"""The equation-of-state statements in every output format: the formula with where it ends and the
estimated radius of the virial series (`equation of state`), the numbers of `evaluate pressure at ...`,
and the tables and figures written. Printers only: the numbers come from `products.states`."""
from __future__ import annotations

import sympy

from ..products.numbers import format_number


def _where(request) -> str:
    bits = [f"{d.word} {d.species} = {sympy.sstr(d.value)}" for d in request.densities]
    bits += [f"{s.name} = {sympy.sstr(v)}" for s, v in request.parameters]
    return ", ".join(bits)


def _file_text(request) -> str:
    what = ", ".join(q.text for q in request.quantities)
    over = ", ".join(f"{a.word} {a.species}" for a in request.axes)
    text = ("table of " if request.kind == "tabulate" else "plot of ") + f"{what} over {over}"
    if request.series:
        text += ", with the virial series of order " + ", ".join(map(str, request.series))
    return text


def _radius_fields(estimate) -> dict:
    return {"composition": [sympy.sstr(x) for x in estimate.composition],
            "ratio_test_estimate": format_number(estimate.ratio, 8) if estimate.ratio is not None else None,
            "root_test_estimate": format_number(estimate.root, 8) if estimate.root is not None else None,
            "exact_radius": sympy.sstr(estimate.exact) if estimate.exact is not None else None,
            "boundary_at": sympy.sstr(estimate.boundary) if estimate.boundary is not None else None,
            "boundary_kind": estimate.boundary_kind, "note": "ratio and root tests are estimates", "text": estimate.text}


def state_text_lines(derivation) -> list[str]:
    """Plain-text sections (empty when the input has no equation-of-state statement)."""
    if not getattr(derivation.system, "states", ()):
        return []
    lines = []
    files = []
    for result in derivation.states:
        request = result.request
        if request.kind == "formula":
            record = result.record
            lines += [""] + [record["lines"][0] + ":"] + ["  " + line for line in record["lines"][1:]]
            lines.append("  " + (record["radius"].text if "radius" in record else record["radius_note"]))
        elif request.kind == "evaluate":
            lines += ["", f"equation of state at {_where(request)} ({request.digits} significant digits):"]
            lines += [f"  {label} = {number}" for label, number in result.rows]
        else:
            files.append(f"  {request.path}: {_file_text(request)}")
    if files:
        title = "files written" if derivation.files_written else "files asked for (not written in this run)"
        lines += ["", f"equation of state, {title}:"] + files
    return lines


def state_json(derivation) -> list[dict]:
    """One record per statement."""
    out = []
    for result in derivation.states:
        request = result.request
        record = {"statement": {"formula": "equation of state"}.get(request.kind, request.kind)}
        if request.densities:
            record["along" if request.kind == "formula" else "at"] = {
                f"{d.word} {d.species}": sympy.sstr(d.value) for d in request.densities}
        if request.parameters:
            record["parameters"] = {s.name: sympy.sstr(v) for s, v in request.parameters}
        if request.kind == "formula":
            record["equation_of_state"] = result.record["json"]
            record["radius"] = _radius_fields(result.record["radius"]) if "radius" in result.record else \
                {"note": result.record["radius_note"]}
        elif request.kind == "evaluate":
            record["digits"] = request.digits
            record["values"] = {label: number for label, number in result.rows}
        else:
            record["file"] = request.path
            record["what"] = _file_text(request)
        out.append(record)
    return out


def state_latex(derivation, _escape) -> list[str]:
    """LaTeX paragraphs: each formula as equations, the boundary, the radius, and the values (`_escape`:
    the printer's escaping of plain text)."""
    out = []
    for result in derivation.states:
        request = result.request
        if request.kind == "formula":
            record = result.record
            out.append(r"\subsection*{Equation of state}")
            out.append(_escape(record["lines"][0]) + ".")
            if record["latex"]:
                out += [r"\begin{align*}", " \\\\\n".join(record["latex"]), r"\end{align*}"]
            else:   # only a parametric form (an integral over momentum cells): stated in words
                out += [r"\begin{itemize}"] + [r"\item " + _escape(line) for line in record["lines"][1:-1]] + \
                    [r"\end{itemize}"]
            out.append(_escape(record["lines"][-1]) + ".")
            out.append(_escape(record["radius"].text if "radius" in record else record["radius_note"]) + ".")
        elif request.kind == "evaluate":
            out += [rf"\subsection*{{Equation of state at {_escape(_where(request))}}}", r"\begin{tabular}{ll}"]
            out += [rf"{_escape(label)} & ${_number(number)}$ \\" for label, number in result.rows]
            out.append(r"\end{tabular}")
    return out



def _number(text: str) -> str:
    return text.replace("inf", r"\infty").replace("e", r"\times10^{") + ("}" if "e" in text else "")
