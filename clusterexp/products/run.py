"""What an input asks of its derived coefficients: checks of the user's claims, numbers at points,
CSV tables and figures. Each error points at the statement that asked for it.

The work itself is done by `checks`, `numbers` and `plots`; this module picks the coefficients out of
a `Derivation`, handles truncated series (a claim ending in O(alpha^3), or a value known only to some
order) and attaches spans.
"""
from __future__ import annotations

from dataclasses import replace
from pathlib import Path

import sympy

from .check_result import MISMATCH, UNDECIDED, CheckList
from .checks import check_claim, check_decimal_claim, check_with_pieces
from .exact_pieces import filled, noted
from ..errors import InputError
from ..expansions import TotalDegree
from .numbers import csv_bytes, evaluate, format_number, grid_table
from ..routes.tube_pieces import coverage_truncation
from .sampled_use import (check_sampled_claim, plot_sampled_line, sampled_number_text, sampled_table, tube_pieces_in,
                          uses_sampled)


def _coefficient(derivation, name):
    return derivation.coefficient(name.kind, name.index, name.component)


def _limits_text(limits: dict) -> str:
    return ", ".join(f"O({s.name}^{k})" for s, k in sorted(limits.items(), key=lambda kv: kv[0].name))


def _at(error: InputError, span) -> InputError:
    """The same message, placed at the statement when it had no place of its own."""
    return error if error.span is not None else InputError(error.message, span, error.hint)


def run_checks(derivation) -> list:
    """One `checks.CheckResult` per `claim`, in input order.

    A claim ending in O(p^k), or a derived value known only below some power (given truncated
    series), is compared below the lower of the two limits in each parameter."""
    from ..pieces import truncate_pieces, unknowns_in
    from ..routes import regime_of
    from ..expansions import split_truncation, truncate
    from ..export.latex import claim_latex_name, latex_symbol_names
    system = derivation.system
    results = []
    symbols = tuple(latex_symbol_names(derivation).items()) if system.claims else ()
    for claim in system.claims:
        derived, known = split_truncation(_coefficient(derivation, claim.target).value)
        limits = dict(known)
        for symbol, k in claim.limits:
            limits[symbol] = min(k, limits.get(symbol, k))
        claimed = claim.value
        label = claim.target.label
        notes = []
        if limits:
            try:
                claimed, derived = (truncate_pieces(system, v, limits)[0] for v in (claimed, derived))
            except InputError as error:
                raise _at(error, claim.span) from None
            try:
                claimed = truncate(claimed, limits).removeO()
                derived = truncate(derived, limits).removeO()
            except ValueError as error:
                raise InputError(f"{error}: declare the parameter's range inside one period so that the "
                                 "coefficient has a single polynomial branch", claim.span) from None
            except (NotImplementedError, TypeError, sympy.PolynomialError) as error:
                # e.g. abs(alpha) has no Taylor series at 0: a truncated claim must be analytic there
                raise InputError(f"cannot expand this claim as a series in {_limits_text(limits)[2:-1].split('^')[0]}"
                                 f" ({type(error).__name__}: {error}); a truncated claim must be a polynomial or an "
                                 "analytic function of its parameters", claim.span) from None
            label += f" up to {_limits_text(limits)}"
            if set(known) - {s for s, _ in claim.limits} or any(known[s] < k for s, k in claim.limits if s in known):
                notes.append(f"the derived value is known only up to {_limits_text(known)}")
        as_decimal = bool(claim.rounded) and not limits and not derived.free_symbols
        try:
            # named pieces are unknown functions in this regime (and named Taylor coefficients are unknown
            # numbers in any regime), not free symbols to sample
            result = check_sampled_claim(derivation, claim, claimed, derived, label, limits) or (
                check_with_pieces(claimed, derived, system, label=label)
                if regime_of(system).named_pieces or unknowns_in([claimed, derived]) else None)
            if result is not None:
                pass
            elif as_decimal:
                result = check_decimal_claim(claim.rounded, derived, label=label)
            else:
                result = check_claim(claimed, derived, system.parameters, label=label)
        except InputError as error:
            raise _at(error, claim.span) from None
        tubes = system.tubes
        if result.status == MISMATCH and tubes is not None and tubes.value is not None and tubes.coverage in known:
            # the coverage is a number here, so the terms of order coverage^2 left out are numbers too: a
            # difference in them cannot be told from a wrong claim
            result = replace(result, status=UNDECIDED, method=(
                f"the derived value is known only to a finite order in the tube coverage {tubes.coverage} = {tubes.value} "
                "only, and the difference may lie in the terms left out; declare the coverage as a parameter "
                "to decide"))
        if not result.ok and claim.decimals and not as_decimal:
            exact = ", ".join(f"{d} = {sympy.Rational(d)}" for d in claim.decimals[:3])
            notes.append(f"decimals inside a claim are read as exact fractions ({exact}); a claim that is one "
                         "decimal number is compared at its written digits only against a derived value that is "
                         "an exact number (no parameters, not a truncated series)")
        result = replace(result, notes=result.notes + tuple(notes),
                         latex_name=claim_latex_name(derivation, claim.target),
                         latex_symbols=symbols + _unknown_names(result, dict(symbols)))
        results.append(result)
    return CheckList(results)


def run_evaluations(derivation) -> list:
    """[(Evaluation, [(label, text of the number)])] for every `evaluate` statement."""
    out = []
    for evaluation in derivation.system.evaluations:
        point = {s: v for s, v in evaluation.point}
        values = [_coefficient(derivation, t).value for t in evaluation.targets]
        used = set().union(*(v.free_symbols for v in values))
        idle = [s.name for s in point if s not in used and s not in _gas_symbols(derivation.system)]
        if idle:   # a parameter the gas does not depend on at all: most likely a slip
            raise InputError(f"{', '.join(t.label for t in evaluation.targets)} "
                             f"{'does' if len(values) == 1 else 'do'} not depend on {', '.join(idle)}",
                             evaluation.span)
        rows = []
        for target, value in zip(evaluation.targets, values):
            # a parameter of the gas that this coefficient does not depend on is harmless: the value holds
            # for every value of it (the label stays the coefficient's, which JSON uses as a key)
            label = target.label
            order = value.getO() if hasattr(value, "getO") else None
            if order is not None:
                value = value.removeO()
                label += f" (truncated series, {sympy.sstr(order)} left out)"
            value, notes = filled(derivation.system, value, point)   # tube pieces exact at this point
            label = noted(label, notes)
            through = None
            if not uses_sampled(derivation, value):   # named pieces: the `expand` series of the input, if it reaches the point
                through = _through_series(derivation, _coefficient(derivation, target), value, point, evaluation.digits,
                                           label)
            if through is None and _with_numbers(derivation, value):   # Monte Carlo parts: value +- error
                rows.append((label, sampled_number_text(derivation, value, point, evaluation.span)))
                continue
            if through is not None:
                rows.append((f"{label} ({through[0]})", through[1]))
                continue
            try:
                number = evaluate(value, point, evaluation.digits, allowed=[s.name for s in point])
            except InputError as error:
                raise InputError(f"{target.label}: {error.message}", evaluation.span) from None
            rows.append((label, format_number(number, evaluation.digits)))
        out.append((evaluation, rows))
    return out


NEAR = sympy.Rational(1, 4)   # how far from its point `evaluate` takes an `expand` series for the value


def _through_series(derivation, coefficient, value, point: dict, digits: int, stated: str = ""):
    """For a value with named many-body pieces: (how, number text) from the `expand` series of the input
    nearest to the point among those that reach it (one variable or a joint series: the point on each side and
    within NEAR of it, every other parameter given, no named Taylor coefficient in it), else None. The
    number is the truncated series at the point; `how` says which series, the O term left out and its
    size there."""
    from ..pieces import pieces_in
    if not pieces_in(value, len(derivation.system.species)):
        return None
    candidates = []
    for piece in derivation.series_of(coefficient):
        axes = getattr(piece, "variables", ()) or ((piece.variable, piece.point, piece.side),)
        shifts = _shifts_within(axes, point)
        if shifts is None or piece.unknowns:
            continue
        number = sympy.expand(piece.polynomial).subs(point)
        if not number.free_symbols:
            candidates.append((max(shifts), piece, axes, number))
    if not candidates:
        return None
    reach, piece, axes, number = min(candidates, key=lambda c: c[0])
    size = format_number(evaluate(reach ** (piece.known + 1), {}, 3), 3)
    names = [v for v, _, _ in axes]
    bases = [f"{v}" if p == 0 else f"({v} - {p})" for v, p, _ in axes]
    others = [sympy.sstr(o.expr) for o in piece.remainder
              if not any(v in o.expr.free_symbols for v in names) and not isinstance(o, TotalDegree)
              and f"O({sympy.sstr(o.expr)})" not in stated]   # not again what the label already says
    if len(axes) == 1:
        v, p, side = axes[0]
        how = (f"truncated series about {v} = {p}" + (f" from {side}" if side else "")
               + f" through order {piece.known}; O({bases[0]}^{piece.known + 1}) left out, "
               f"{bases[0]}^{piece.known + 1} = {size} here")
    else:
        sides = [f"{v} from {s}" for v, _, s in axes if s]
        how = (f"truncated joint series about ({', '.join(map(str, names))}) = ({', '.join(str(p) for _, p, _ in axes)})"
               + (f" ({', '.join(sides)})" if sides else "")
               + f" through total degree {piece.known}; terms of total degree {piece.known + 1} left out, "
               f"each up to {size} here (largest deviation {format_number(evaluate(reach, {}, 3), 3)})")
    how += f"; also O({'), O('.join(others)})" if others else ""
    return how, format_number(evaluate(number, {}, digits), digits)


def _shifts_within(axes, point: dict):
    """|deviation| of each series variable at `point` when every one is given, on its series' side and
    within NEAR of its expansion point; else None."""
    shifts = []
    for variable, centre, side in axes:
        if variable not in point:
            return None
        shift = sympy.sympify(point[variable] - centre)
        if abs(shift) > NEAR or (side == "above" and shift < 0) or (side == "below" and shift > 0):
            return None
        shifts.append(abs(shift))
    return shifts


def _gas_symbols(system) -> set:
    """The parameters the declared gas depends on (masses, statistics, tubes, given values, matrix)."""
    exprs = [x for s in system.species for x in (s.mass, s.exchange)] + [m.value for m in system.mutuals]
    exprs += [v.value for v in system.source.values] + [g for row in system.source.matrix or () for g in row]
    if system.tubes is not None:
        exprs += [system.tubes.flux, system.tubes.coverage]
    spectrum = system.source.spectrum
    if spectrum is not None:
        exprs += list(spectrum.levels) + [spectrum.shift] + [z for _, z in spectrum.trapped]
    return set().union(*(sympy.sympify(x).free_symbols for x in exprs))


class _Named:
    """A coefficient under the label the user wrote (rho_A[1,1]), as `numbers`/`plots` expect;
    `truncation` says what a series in the tube coverage leaves out (None for a closed form)."""

    def __init__(self, name, coefficient, value=None, truncation=None):
        self.kind, self.index, self.label = coefficient.kind, coefficient.index, name.label
        self.component, self.species = coefficient.component, coefficient.species
        self.value = coefficient.value if value is None else value
        self.truncation = truncation


def _plain(derivation, name, span):
    """The coefficient for a table or figure: a closed form, or a series truncated in the tube coverage
    (its O term stated beside it, `routes.tube_pieces.coverage_truncation`); any other truncated series is
    refused (a table or figure of it would hide the O(...))."""
    coefficient = _coefficient(derivation, name)
    cut = coverage_truncation(derivation.system, coefficient.value)
    if cut is None:
        raise InputError(f"{name.label} is known only as a series ({sympy.sstr(coefficient.value.getO())} left out); "
                         "tables and figures need a closed form", span)
    value, truncation = cut
    return _Named(name, coefficient, value, truncation)


def _with_numbers(derivation, value) -> bool:
    """Whether a value needs the Monte Carlo numbers of `sample` statements (or, among tubes, holds a
    tube piece that is exact or sampled point by point)."""
    return uses_sampled(derivation, value) or bool(tube_pieces_in(value))


def run_tables(derivation) -> list:
    """[(Table, rows)] with the header row first, for every `tabulate` statement."""
    out = []
    for table in derivation.system.tables:
        items = [_plain(derivation, t, table.span) for t in table.targets]
        try:
            if any(_with_numbers(derivation, i.value) for i in items):   # value and error columns
                out.append((table, sampled_table(derivation, table, items)))
                continue
            rows = grid_table(items, {s.name: values for s, values in table.axes}, table.digits,
                              fixed={s.name: v for s, v in table.fixed})
            rows[0] = rows[0][:len(rows[0]) - len(items)] + [
                i.label + (f" ({i.truncation})" if i.truncation else "") for i in items]
        except InputError as error:
            raise _at(error, table.span) from None
        out.append((table, rows))
    return out


def check_files(system, directory=".", overwrite: bool = False, protected: dict | None = None,
                seen: dict | None = None) -> None:
    """Refuse, before anything is computed, a file the input would write that may not be written
    (`clusterexp.products.files`: it exists and `overwrite` is not given, it is a folder, FIFO or device, it is
    the input or a file the input includes, or another result of the run goes there): `tabulate`,
    `plot` and the `sample` tables and maps. Missing folders are fine: they are created on writing.
    `seen` ({real path: name}) collects the run's targets (the CLI puts its `-o` file in first)."""
    from .files import claimed, protected_files, resolve
    directory = Path(directory)
    protected = protected_files(system) if protected is None else protected
    seen = {} if seen is None else seen
    if (system.tables or system.figures or any(s.table or s.map for s in system.samplings)
            or any(s.path for s in system.states)) \
            and directory.exists() and not directory.is_dir():
        raise InputError(f"cannot write the tables and figures into {directory}: it is not a folder")
    from .figure_style import figure_paths   # a figure is written as PDF, PNG and its caption
    for item, path in [(t, directory / t.path) for t in system.tables] + \
            [(f, p) for f in system.figures for p in figure_paths(directory / f.path)]:
        claimed(seen, resolve(path, overwrite, protected, item.span, folder_may_be_missing=True), str(path), item.span)
    from .states import check_state_files
    check_state_files(system, directory, overwrite, protected, seen)
    if system.samplings:
        from ..loops.report import check_files as check_sampled_files
        check_sampled_files(system, overwrite, directory, protected, seen)


def stage_files(derivation, batch, directory=".", overwrite: bool = False) -> None:
    """Render every table (CSV) and figure of the input, the `sample` ones included, into `batch`
    (a `files.Batch`): nothing is written until the batch is committed, so an input that fails
    anywhere leaves no file behind. Missing folders are created on commit."""
    from . import plots
    directory = Path(directory)
    system = derivation.system
    check_files(system, directory, overwrite, batch.protected)
    derivation.__dict__["_files_folder"] = directory   # where the document finds the figures

    def collector(span):
        return lambda path, data: batch.add(path, data, overwrite, span, make_folder=True)
    for table, rows in derivation.tables:
        try:
            collector(table.span)(directory / table.path, csv_bytes(rows))
        except InputError as error:
            raise _at(error, table.span) from None
    from ..export.captions import figure_caption_latex
    from ..export.latex_lines import escape_text
    for figure in system.figures:
        items = [_plain(derivation, t, figure.span) for t in figure.targets]
        path = directory / figure.path
        style = {"other_values": {s.name: v for s, v in figure.fixed}, "system": system, "parameters": system.parameters,
                 "into": collector(figure.span), "options": system.presentation.figure_options,
                 "caption_tex": figure_caption_latex(derivation, figure)}
        truncations = "; ".join(f"{i.label}: {i.truncation}" for i in items if i.truncation)
        if truncations:   # a series in the tube coverage: what it leaves out goes under the figure
            style["caption"] = f"{plots.conventions_caption(system)}; {truncations}"
            style["caption_tex"] += f" {escape_text(truncations)}."
        try:
            if any(_with_numbers(derivation, i.value) for i in items):   # error bars
                plot_sampled_line(derivation, figure, items, path, collector(figure.span), options=style["options"],
                                  caption_tex=style["caption_tex"], caption=style.get("caption"))
            elif len(figure.axes) == 1:
                (symbol, interval), = figure.axes
                plots.plot_line(items, symbol.name, interval, path, **style)
            else:
                first, second = ((s.name, interval) for s, interval in figure.axes)
                plots.plot_map(items[0], first, second, path, **style)
        except InputError as error:
            raise _at(error, figure.span) from None
    from .states import stage_state_files
    stage_state_files(derivation, batch, directory, overwrite)
    if system.samplings:
        from ..loops.report import write_files as write_sampled_files
        write_sampled_files(derivation.sampled, system, overwrite, directory, batch=batch)


def write_files(derivation, directory=".", overwrite: bool = False) -> list[Path]:
    """Write every table (CSV) and figure of the input into `directory` (created when missing), the
    `sample` ones included; an existing file is replaced only with `overwrite`, and nothing is
    written unless every file could be made. Returns the paths."""
    from .files import Batch, protected_files
    batch = Batch(protected_files(derivation.system))
    stage_files(derivation, batch, directory, overwrite)
    return batch.commit()


def _unknown_names(result, names) -> tuple:
    """(symbol, LaTeX) of the named Taylor coefficients a check's equations or difference use."""
    from ..pieces import unknowns_in
    used = [e for e in (result.difference, result.condition) if e is not None]
    return tuple((u.symbol, u.latex(names)) for u in unknowns_in(used))
