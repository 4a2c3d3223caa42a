"""Printing and files of sampled numbers: text lines, a LaTeX block, JSON items, a CSV table, a heat map.

Printers only format what `clusterexp.loops.sampled` computed. A value prints with its error bar
rounded to two significant digits and the value to the same decimal place ("0.0362 +- 0.0013"), so the
text does not depend on digits below the statistical error. Run times are left out (they vary from run
to run and output is byte-stable; `SampledRun.seconds` has them); the text says how to repeat a run.
"""
from __future__ import annotations

from pathlib import Path

import sympy

from ..naming import latex_subscript, species_latex
from ..products.numbers import grid_text
from .quoting import EXACT_BELOW, METHOD, PLUS_MINUS_LATEX, plus_minus, settled, settled_bound, slice_text  # noqa: F401 (quoted here too)
from .sampled import SampledNumbers, SampledStatement

def _point_text(point) -> str:
    return ", ".join(f"{name} = {sympy.sstr(value)}" for name, value in point)


def _budget_text(statement: SampledStatement) -> str:
    s = statement.sampling
    parts = []
    if s.loops is not None:
        parts.append(f"with {s.loops} loops")
    if s.time_cap is not None:
        parts.append(f"within {s.time_cap:g} seconds")
    if s.target is not None:
        parts.append(f"target {s.target:g}")
    return ", ".join(parts)


def text_lines(numbers: SampledNumbers) -> list[str]:
    lines = []
    for statement in numbers:
        s = statement.sampling
        lines += ["", f"sampled values ({METHOD}), `sample` at line {s.span.line}, seed {s.seed}, "
                      f"{_budget_text(statement)}:"]
        sliced = f" in {s.slices} slices" if "slices" in dict(s.spans) else ""
        for run in statement.runs:
            again = (f"alone `sample {run.label} ... with {run.samples} loops{sliced} seed {run.seed}` repeats it"
                     if run.index else
                     f"this statement with `with {s.loops or run.samples} loops{sliced} seed {run.seed}` repeats it")
            lines.append(f"  {run.label}: {run.samples} loops in {run.rounds} rounds{_rounding_text(s, run)}, "
                         f"{run.slices} slices; {again}")
        for point in statement.points:
            where = f"at {_point_text(point.point)}: " if point.point else ""
            lines.append("  " + where + "; ".join(f"{v.label} = {plus_minus(v.value, v.error)}"
                                                  + (f" + {v.remainder}" if v.remainder else "") + _bias(v.slice_bound)
                                                  for v in point.values))
    return lines


def _bias(bound) -> str:
    text = slice_text(bound)
    return f" ({text})" if text else ""


def _rounding_text(sampling, run) -> str:
    """The loops run come in whole rounds (one batch of every family): say so when that exceeds the
    `with N loops` budget."""
    if sampling.loops is None or run.samples == sampling.loops:
        return ""
    return f" (the budget of {sampling.loops} loops rounded up to whole rounds of {run.samples // run.rounds})"


def latex_block(numbers: SampledNumbers, system) -> str:
    """An `align*` environment: one row per coefficient and point, value \\pm error."""
    labels = [system.typesetting.symbol(n) or species_latex(n) for n in system.species_names]
    rows = []
    for statement in numbers:
        for point in statement.points:
            where = ", ".join(f"{system.typesetting.symbol(name) or _latex_name(name)}={sympy.latex(value)}"
                              for name, value in point.point)
            for v in point.values:
                letter = "b" if v.kind == "cluster" else "a"
                lhs = (f"{letter}_{{{latex_subscript(v.index, labels)}}}" if v.index and "[" not in v.label[2:]
                       else rf"\mathrm{{{v.label.replace('_', chr(92) + '_')}}}")   # tube pieces, terms in the coverage
                lhs += rf"\big|_{{{where}}}" if where else ""
                bias = slice_text(v.slice_bound)
                rows.append(f"  {lhs} &= " + plus_minus(v.value, v.error, PLUS_MINUS_LATEX)
                            + (f" + {v.remainder}" if v.remainder else "") + (rf"\ \text{{({bias})}}" if bias else ""))
    body = " \\\\\n".join(rows)
    return f"% sampled values: {METHOD}\n\\begin{{align*}}\n{body}\n\\end{{align*}}\n"


def _latex_name(name: str) -> str:
    from ..products.plots import symbol_latex
    return symbol_latex(name)


def json_items(numbers: SampledNumbers) -> list[dict]:
    out = []
    for statement in numbers:
        s = statement.sampling
        out.append({
            "line": s.span.line,
            "method": METHOD,
            "seed": s.seed,
            "budget": {"loops": s.loops, "seconds": s.time_cap, "target": s.target},
            "runs": [{"coefficient": r.label, "estimator": r.kind, "estimator_seed": r.run_seed, "loops": r.samples,
                      "rounds": r.rounds, "loops_per_round": r.samples // r.rounds, "slices": r.slices}
                     for r in statement.runs],
            "points": [{"at": {name: sympy.sstr(value) for name, value in p.point},
                        "values": [{"coefficient": v.label, "kind": v.kind, "index": list(v.index),
                                    **dict(zip(("value", "error"), settled(v.value, v.error))),
                                    **({"remainder": v.remainder} if v.remainder else {}),
                                    **({"slice_bound": settled_bound(v.slice_bound)} if v.slice_bound is not None
                                       else {})}
                                   for v in p.values]}
                       for p in statement.points],
        })
    return out


def table_rows(statement: SampledStatement) -> list[list[str]]:
    """Header (parameters, then each coefficient and its error), then one row per point.  Among tubes the
    columns are the coefficients (coverage given) or their terms in the coverage (`SampledStatement.columns`),
    each value column's head stating what the series leaves out, as `tabulate` does."""
    columns = statement.columns
    bounded = {c.label for c in columns if any(v.label == c.label and v.slice_bound is not None
                                                for p in statement.points for v in p.values)}
    header = list(statement.parameter_names)
    for column in columns:
        note = statement.note(column)
        header += [column.label + (f" ({note})" if note else ""), f"{column.label} error"]
        header += [f"{column.label} slicing bias bound"] if column.label in bounded else []
    rows = [header]
    for k, point in enumerate(statement.points):
        row = [grid_text(sympy.sympify(value), 15) for _, value in point.point]
        for c in columns:
            row += [repr(x) for x in settled(*statement.cell(k, c.label))]
            if c.label in bounded:
                bound = next((v.slice_bound for v in point.values if v.label == c.label), 0.0)
                row.append(repr(settled_bound(bound) or 0.0))
        rows.append(row)
    return rows


def check_files(system, overwrite: bool = False, base: Path | None = None, protected: dict | None = None,
                seen: dict | None = None) -> None:
    """Refuse, before any run, a `table` or `map` file that may not be written (`clusterexp.products.files`: it
    exists and `overwrite` is not given, it is not a regular file, it is the input, or another result
    of the run goes there)."""
    from ..products.files import claimed, resolve
    base = base or Path.cwd()
    seen = {} if seen is None else seen
    for s in system.samplings:
        for clause, name in (("table", s.table), ("map", s.map)):
            if name is None:
                continue
            span = s.clause_span(clause)
            from ..products.figure_style import figure_paths   # a map: PDF, PNG and its caption
            for path in ([base / name] if clause == "table" else figure_paths(base / name)):
                claimed(seen, resolve(path, overwrite, protected, span, folder_may_be_missing=True), str(path), span)


def write_files(numbers: SampledNumbers, system, overwrite: bool = False, base: Path | None = None,
                batch=None) -> list[Path]:
    """Write every statement's `table` (CSV) and `map` (figure); refuses to replace a file unless
    `overwrite`. Returns the paths written. With `batch` (a `files.Batch`) the files are only added
    to it, to be written with the caller's other files."""
    from ..products.files import Batch
    from ..products.numbers import csv_bytes
    base = base or Path.cwd()
    check_files(system, overwrite, base)
    own = batch is None
    batch = Batch() if own else batch
    written = []
    for statement in numbers:
        s = statement.sampling
        for clause, name in (("table", s.table), ("map", s.map)):
            if name is None:
                continue
            path = base / name
            span = s.clause_span(clause)

            def collect(where, data, span=span):
                batch.add(where, data, overwrite, span, make_folder=True)
            if clause == "table":
                collect(path, csv_bytes(table_rows(statement)))
            else:
                from .figures import sampled_map
                sampled_map(statement, system, path, into=collect)
            written.append(path)
    if own:
        batch.commit()
    return written
