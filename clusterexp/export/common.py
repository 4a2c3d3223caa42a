"""Pieces every printer shares: the conventions sentence and the system summary."""
from __future__ import annotations

import sympy

from ..model import System
from ..routes import regime_of
from .quantities import given_line, parameter_line
from .state_lines import state_text_lines

def species_statistics(system: System, i: int) -> tuple[str, sympy.Expr]:
    """How species i's statistics is stated in its regime: ("exchange", alpha_i) or ("g", g_ii)."""
    return regime_of(system).statistics(system, i)


def summary_lines(system: System) -> list[str]:
    words = [species_statistics(system, i) for i in range(len(system.species))]
    species = ", ".join(
        f"{s.name} (mass {s.mass}, {word if word == 'exchange' else word + '_' + s.name + s.name + ' ='} {value})"
        for s, (word, value) in zip(system.species, words))
    lines = [f"dimension {system.dimension}; species in index order: {species}",
             f"reference species {system.reference}; total order {system.order}; "
             f"cluster coefficients: {system.source.kind}"]
    if system.mutuals:
        lines.append("mutual parameters: " + ", ".join(
            f"{m.first}-{m.second} = {m.value}" for m in system.mutuals))
    lines += [line for line in (parameter_line(system), given_line(system), form_line(system)) if line]
    return lines


def form_line(system: System) -> str | None:
    """How the values are written, when the input chose a form (`values ...`)."""
    p = system.presentation
    if p.form == "expanded":
        return None
    return f"values written {p.form.replace('_', ' ')}" + (f" in {', '.join(p.collect_in)}" if p.collect_in else "")


def regime_lines(system: System) -> list[str]:
    """What the coefficients mean in the system's regime, and the implicit equation of state where
    there is one (plain text)."""
    return regime_of(system).text_lines(system)


def check_record(result) -> dict:
    """One check as plain data (JSON and the LaTeX document read it)."""
    record = {"claim": result.label, "status": result.status, "method": result.method}
    if result.difference is not None and result.status == "mismatch":
        record["difference"] = sympy.sstr(result.difference, order="lex")
    if result.leading_term is not None:
        record["leading_term"] = sympy.sstr(result.leading_term, order="lex")
        record["about"] = {n: sympy.sstr(v) for n, v in result.expansion_point}
    if result.rounding:
        record["compared_as_decimal"] = result.rounding
    if result.witness:
        record["at"] = {n: sympy.sstr(v) for n, v in result.witness}
    if result.claimed_value is not None:
        record["claimed_value"], record["derived_value"] = result.claimed_value, result.derived_value
    if result.points:
        record["points"] = result.points
    if result.notes:
        record["notes"] = list(result.notes)
    if result.conditions:
        record["holds_if"] = [f"{sympy.sstr(e.lhs, order='lex')} = {sympy.sstr(e.rhs, order='lex')}"
                              for e in result.conditions]
    return record


def point_text(point) -> str:
    return ", ".join(f"{s.name} = {sympy.sstr(v)}" for s, v in point)


def product_lines(derivation) -> list[str]:
    """Plain-text sections for the checks, numbers and files an input asks for."""
    system = derivation.system
    lines = []
    if system.claims:
        lines += ["", "checks of the claims:"]
        for result in derivation.checks:
            lines += ["  " + line for line in result.render().splitlines()]
    if system.evaluations:
        lines += ["", "values:"]
        for evaluation, rows in derivation.evaluations:
            where = f"at {point_text(evaluation.point)} " if evaluation.point else ""
            lines.append(f"  {where}({evaluation.digits} significant digits):")
            lines += [f"    {label} = {number}" for label, number in rows]
    lines += state_text_lines(derivation)
    files = [(t.path, "table of " + ", ".join(n.label for n in t.targets)) for t in system.tables]
    files += [(f.path, ("map of " if len(f.axes) == 2 else "plot of ") + ", ".join(n.label for n in f.targets))
              for f in system.figures]
    if files:
        title = "files written:" if derivation.files_written else "files asked for (not written in this run):"
        lines += ["", title] + [f"  {path}: {what}" for path, what in files]
    return lines
