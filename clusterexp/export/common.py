"""Pieces every printer shares: the conventions sentence and the system summary."""
from __future__ import annotations

import sympy

from ..model import System
from .quantities import given_line, parameter_line

def species_statistics(system: System, i: int) -> tuple[str, sympy.Expr]:
    """("exchange", alpha_i), or in the exclusion regime ("g", g_ii): there the statistics matrix, not the
    exchange parameter, decides the statistics (an undeclared species is not "exchange 0")."""
    if system.source.kind == "exclusion":
        return "g", system.source.matrix[i][i]
    return "exchange", system.species[i].exchange


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
    lines += [line for line in (parameter_line(system), given_line(system)) if line]
    return lines


def statistics_matrix(system: System):
    """The statistics matrix in force (exclusion and lowest Landau level), else None."""
    if system.source.kind == "landau":
        from ..routes import landau_matrix
        return landau_matrix(system)
    return system.source.matrix if system.source.kind == "exclusion" else None


def eos_exponents(g, i: int) -> list[tuple[int, object]]:
    """Wu's equation for species i, u_i = z_i prod_j (1 + u_j)^(delta_ij - g_ji): the nonzero exponents."""
    out = []
    for j in range(len(g)):
        exponent = (1 if i == j else 0) - g[j][i]
        if exponent != 0:
            out.append((j, exponent))
    return out


def regime_lines(system: System) -> list[str]:
    """What the coefficients mean in the system's regime, and the implicit equation of state where
    there is one (plain text)."""
    kind = system.source.kind
    names = system.species_names
    if kind == "ideal":
        return ["regime: ideal gases, b_(l of species i) = (m_i/m_ref)^(d/2) (+-1)^(l+1) l^(-1-d/2) "
                "(+ bose, - fermi; boltzmann: b_1 only); no mixed coefficients"]
    if kind == "spectrum":
        spec = system.source.spectrum
        weight = {"count": "|n| ", "one": ""}.get(spec.area, "(M_n/m_ref)^(d/2) ")
        return ["regime: declared trapped spectrum, x = exp(-beta hbar omega); "
                f"b_n = {weight}lim_(omega->0) [z^n] ln Xi_trap / Z_1,ref(x)",
                "levels: " + "; ".join(f"{n}: {lv} ({fill})" for n, lv, fill in zip(names, spec.levels, spec.fill)),
                f"energy shift / hbar omega: {spec.shift} (N_X = number of particles of species X)"]
    if kind == "pairphase":
        return pairphase_lines(system)
    if kind not in ("exclusion", "landau"):
        return []
    g = statistics_matrix(system)
    if kind == "landau":
        head = ["regime: lowest Landau level, beta P / rho_L = sum_n b_n z^n, virial coefficients in "
                "nu = rho / rho_L (rho_L = eB/h, all species with the same charge); route: "
                + ("harmonic regulator on the declared LLL spectrum" if system.source.form == "spectrum"
                   else "exclusion statistics with g_ii = alpha_i, g_ij = alpha_ij")]
        pressure = "beta P / rho_L = " + " + ".join(f"ln(1 + u_{n})" for n in names)
    else:
        level = system.source.form == "level"
        head = ["regime: exclusion statistics (Haldane's g_ij = -d(states of i)/d(particles of j)), "
                + ("one single-particle level: beta P / (states) = sum_n b_n z^n" if level else
                   f"continuum in d = {system.dimension}, levels = momentum cells shared by all species, "
                   "eps_i(k) = hbar^2 k^2 / 2 m_i")]
        pressure = ("beta P / (states) = " if level else "beta P lambda^d = integral d^dk lambda^d/(2 pi)^d of ") \
            + " + ".join(f"ln(1 + u_{n})" for n in names)
    equations = []
    for i, n in enumerate(names):
        factors = [f"(1 + u_{names[j]})" if e == 1 else f"(1 + u_{names[j]})^({e})" for j, e in eos_exponents(g, i)]
        argument = f"z_{n}" if kind == "landau" or system.source.form == "level" else f"z_{n} exp(-beta eps_{n}(k))"
        equations.append(f"u_{n} = {argument} " + " ".join(factors))
    return head + ["equation of state: " + "; ".join(equations), pressure]


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
    files = [(t.path, "table of " + ", ".join(n.label for n in t.targets)) for t in system.tables]
    files += [(f.path, ("map of " if len(f.axes) == 2 else "plot of ") + ", ".join(n.label for n in f.targets))
              for f in system.figures]
    if files:
        title = "files written:" if derivation.files_written else "files asked for (not written in this run):"
        lines += ["", title] + [f"  {path}: {what}" for path, what in files]
    return lines


def pairphase_lines(system: System) -> list[str]:
    """The pair-phase closed forms and what stays unknown (plain text)."""
    lines = ["regime: pair phases in the plane (harmonic regulator on the relative motion): "
             "b_(2 e_i) = (m_i/m_ref)(1/4 - s + s^2/2), s = alpha_i mod 2; "
             "b_(e_i + e_j) = -((m_i + m_j)/(2 m_ref)) s(1 - s), s = alpha_ij mod 1; kinks where s = 0",
             "many-body pieces (|n| >= 3 of anyonic or braiding species) are named symbols unless given; "
             "O(p^k): terms from p^k on are unknown"]
    tubes = system.tubes
    if tubes is not None:
        if tubes.value is not None:
            lines.append(f"tube coverage {tubes.coverage} = {tubes.value} (as declared); the values below are first "
                         f"order in it, O({tubes.coverage}^2) unknown")
        lines.append(f"flux tubes: flux {tubes.flux} (flux quanta), {tubes.coverage} tubes per lambda^2; b_(l e_i) gains "
                     f"(+-1)^(l+1) ({tubes.coverage})/l (-s(1 - s)/2), s = ({tubes.flux}) mod 1, first order in "
                     "the coverage")
    return lines
