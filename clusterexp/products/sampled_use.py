"""Monte Carlo numbers in the statements that use results: `claim`, `evaluate`, `tabulate`, `plot`.

A coefficient that contains a sampled b (b_3, b_2_1 of `clusters pairphase`, estimated by a `sample`
statement of the same input) is evaluated at a point only where some `sample` statement estimated that
b at the same statistics parameters (exact equality of alpha, and alpha_12 for b_21); the parameters are
substituted exactly, the b by its estimate, and the error is propagated to first order
(`loops.sampled.propagate`).  Nothing is sampled here: a point no `sample` statement covers is refused
with the statement to add.  Among flux tubes the sampled b's are the tube pieces, and each is first put
in exactly where `TubePiece.exactly` knows it (`resolved`): a point where every piece is exact
needs no `sample`, and a mixed point carries the error of its sampled pieces only.

A claim on such a coefficient is compared at every point of the `sample` statements: it is "consistent
within k standard errors" (k = 3 unless the claim says `within k errors`) when |claimed - value| < k
error at every point, never "proven"; undecided where it misses by less than k errors plus the bound
on the loops' slicing bias (`ThirdOrderResult.slice_bound`); otherwise a mismatch shown with the numbers.

Flux tubes (the second half; the two halves call each other): every coefficient among tubes is a series
in the coverage, and a table or figure states the O(coverage^k) left out; a piece is exact where it can
be, else a `sample` estimate at the same statistics, else refused with the `sample` statement to add.
"""
from __future__ import annotations

import math

import sympy

from ..errors import InputError
from ..naming import bracket_label, cluster_symbol
from ..routes.tube_pieces import tube_piece
from .check_result import MISMATCH, SAMPLED, UNDECIDED, CheckResult
from .exact_pieces import filled
from .tube_missing import missing_piece
from .tube_missing import point_text as _point_text
from .tube_missing import sampled_in as _sampled_in

DEFAULT_ERRORS = 3


def sampled_symbols(system) -> dict[sympy.Symbol, tuple]:
    """{symbol of a b some `sample` statement estimates: its multi-index} (among tubes: {piece: piece})."""
    if system.tubes is not None:   # the named tube pieces (loops/tube_sampling.py)
        from ..loops.tube_sampling import sampled_pieces
        return sampled_pieces(system)
    return {cluster_symbol(n): n for s in system.samplings for _, n, _ in s.coefficients}


def uses_sampled(derivation, expr) -> bool:
    """Whether `expr` contains a b that a `sample` statement of the input estimates."""
    system = derivation.system
    if not system.samplings:
        return False
    return bool(set(sampled_symbols(system)) & set(sympy.sympify(expr).free_symbols))


_TUBE_PERIODS = {"flux": 1, "exchange": 2, "mutual": 1}   # the periods of the phases a tube piece depends on


def _statistics_key(system, index, point: dict):
    from ..loops.request import statistics_of
    from ..loops.tube_sampling import piece_statistics
    pieces = piece_statistics(system, index)
    stats = pieces or statistics_of(system.species, system.mutual, index)
    key = []
    for name in sorted(stats):
        value = sympy.sympify(stats[name]).xreplace(point)
        if value.free_symbols:
            return None
        value = sympy.nsimplify(value)
        if pieces and name in _TUBE_PERIODS:   # a tube piece at flux 3/2 is the one at 1/2 (period 1)
            value = sympy.Mod(value, _TUBE_PERIODS[name])
        key.append((name, value))
    return tuple(key)


def _tables(derivation) -> tuple[dict, dict]:
    """{(index, statistics key): (value, error)}, the smallest error where several statements agree,
    and {same key: slice bound or None} of the chosen estimates."""
    cache = derivation.__dict__.get("_sampled_estimates")
    if cache is not None:
        return cache
    table, bounds = {}, {}
    for statement in derivation.sampled or ():
        for c in statement.clusters:
            which = c.index if c.piece is None else c.piece
            key = (which, _statistics_key(derivation.system, which, dict(c.point)))
            if key not in table or c.error < table[key][1]:
                table[key] = (c.value, c.error)
                bounds[key] = c.slice_bound
    derivation.__dict__["_sampled_estimates"] = (table, bounds)
    return table, bounds


def sampled_value(derivation, expr, point: dict, span) -> tuple[float, float]:
    """(value, error) of `expr` at `point` ({symbol: exact value}) with the sampled b's estimates; among
    tubes the pieces exactly known at the point are put in first (`resolved`), so only the
    sampled ones carry an error."""
    return sampled_number(derivation, expr, point, span)[:2]


def sampled_number(derivation, expr, point: dict, span) -> tuple[float, float, float | None]:
    """`sampled_value` and the bound on what the loops' slicing may leave in it
    (`loops.sampled.propagated_bound`; None where not assessed: the tube pieces)."""
    from ..loops.sampled import propagated_bound
    system = derivation.system
    expr = sympy.sympify(expr)
    if system.tubes is not None:   # the pieces exact at the point first, then the sampled ones
        expr, estimates = resolved(derivation, expr, point, span)
        return (*_propagated(expr, point, estimates, span), None)
    table, bounds = _tables(derivation)
    estimates, slicing = {}, {}
    for symbol, index in sampled_symbols(system).items():
        if symbol not in expr.free_symbols:
            continue
        key = _statistics_key(system, index, point)
        if key is None or (index, key) not in table:
            where = _point_text(point) or "this point"
            raise InputError(f"b{bracket_label(index)} has no closed form and no `sample` statement of this input "
                             f"estimates it at {where}; add one there, e.g. `sample b{bracket_label(index)} at "
                             f"{_point_text(point)}` (or put the point into a `sample ... over` list)", span)
        estimates[symbol] = table[(index, key)]
        slicing[symbol] = bounds[(index, key)]
    value, error = _propagated(expr, point, estimates, span)
    return value, error, propagated_bound(expr, point, estimates, slicing)


def _propagated(expr, point: dict, estimates: dict, span) -> tuple[float, float]:
    from ..loops.sampled import propagate
    rest = expr.xreplace(point).free_symbols - set(estimates)
    if rest:
        raise InputError(f"no value for {', '.join(sorted(s.name for s in rest))} at {_point_text(point)}", span)
    return propagate(expr, point, estimates)


def quoted(value: float, error: float) -> str:
    from ..loops.quoting import plus_minus
    return plus_minus(value, error)


def sample_points(derivation, expr) -> list[dict]:
    """The points of the input's `sample` statements at which every sampled b of `expr` is estimated
    (among tubes: each tube piece exactly known or estimated)."""
    table = _tables(derivation)[0]
    wanted = {i for s, i in sampled_symbols(derivation.system).items() if s in sympy.sympify(expr).free_symbols}
    tubes = derivation.system.tubes is not None
    out, seen = [], set()
    for statement in derivation.sampled or ():
        for c in statement.clusters:
            point = dict(c.point)
            marker = tuple(sorted((s.name, v) for s, v in point.items()))
            if marker in seen:
                continue
            if tubes:   # each piece exact there or sampled there
                if known_at(derivation, expr, point):
                    seen.add(marker)
                    out.append(point)
                continue
            keys = [(i, _statistics_key(derivation.system, i, point)) for i in wanted]
            if all(k in table for k in keys):
                seen.add(marker)
                out.append(point)
    return out


def check_sampled_claim(derivation, claim, claimed, derived, label, limits) -> CheckResult | None:
    """The claim against the Monte Carlo numbers, or None when its coefficient holds no sampled b."""
    errors = getattr(claim, "errors", None)
    if errors is not None and derivation.system.tubes is not None:
        if tube_pieces_in(derived):   # a series in the coverage, compared term by term (below)
            return tube_claim(derivation, claim, claimed, derived, label, limits)
        raise InputError(f"`within {errors:g} errors` is for claims on coefficients with sampled parts; "
                         f"{claim.target.label} holds no tube piece here", claim.span)
    if limits:
        if errors is not None:
            raise InputError("a truncated claim (O(...)) is compared term by term, not with Monte Carlo numbers; "
                             "drop `within ... errors` or the O(...)", claim.span)
        return None
    if not uses_sampled(derivation, derived):
        if errors is not None:
            raise InputError(f"`within {errors:g} errors` is for claims on coefficients with sampled parts; "
                             f"{claim.target.label} holds none here", claim.span)
        return None
    k = DEFAULT_ERRORS if errors is None else errors
    points = sample_points(derivation, derived)
    if not points:
        return None
    return compared_at_points(derivation, claim, (claimed, derived), [("", claimed, derived)], points, k, label)


def compared_at_points(derivation, claim, sides, parts, points, k, label, note: str = "") -> CheckResult:
    """The claim's verdict at every point: `parts` are (name, claimed, derived) compared apart (the
    coefficient, or each power of the tube coverage in it), each number from `sampled_value`; `sides`
    (claimed, derived) are the whole values the result shows; `note` ends the method."""
    from ..loops.quoting import settled_bound   # a bound is rounded up in print
    worst, rows = None, []
    for point in points:
        for part, claimed, derived in parts:
            value, error, bound = sampled_number(derivation, derived, point, claim.span)
            try:
                mine = complex(sympy.N(sympy.sympify(claimed).xreplace(point), 30))
            except TypeError:
                left = sympy.sympify(claimed).xreplace(point).free_symbols
                raise InputError(f"the claim needs values for {', '.join(sorted(s.name for s in left))}"
                                 f" at {_point_text(point)}", claim.span) from None
            if abs(mine.imag) > 1e-12 * max(1.0, abs(mine.real)):
                deviation = math.inf
            elif error < 1e-12:
                deviation = 0.0 if abs(mine.real - value) < 1e-12 else math.inf
            else:
                deviation = abs(mine.real - value) / error
            rows.append((point, part, mine.real, value, error, deviation, bound))
            if worst is None or deviation > worst[5]:
                worst = rows[-1]
    where = "; ".join(dict.fromkeys(_point_text(p) for p, *_ in rows))
    count = len(points)
    claimed, derived = sides
    if worst[5] < k:
        method = (f"within {k:g} standard errors of the Monte Carlo numbers of the `sample` statements at "
                  f"{count} point{'s' if count != 1 else ''}{f' ({where})' if where else ''}; largest deviation "
                  f"{worst[5]:.2g} standard errors; sampled, not proven{note}")
        return CheckResult(SAMPLED, claimed, derived, method, label=label, points=count)
    beyond = [r for r in rows if r[5] >= k and not _within_slicing(r, k)]
    if not beyond:   # every miss is within the bound on the loops' slicing bias: no verdict
        point, part, mine, value, error, deviation, bound = worst
        method = (f"{deviation:.2g} standard errors from the Monte Carlo number at {_point_text(point)}"
                  f"{' in ' + part if part else ''}: claimed {mine:.10g}, derived {quoted(value, error)}; outside "
                  f"{k:g} standard errors, but the loops' time slicing may shift that number by up to "
                  f"{settled_bound(bound):.2g} (docs/loops.md), which covers the difference{note}")
        return CheckResult(UNDECIDED, claimed, derived, method, label=label, points=count)
    point, part, mine, value, error, deviation, bound = max(beyond, key=lambda r: r[5])
    away = "infinitely many" if math.isinf(deviation) else f"{deviation:.2g}"
    what = "the exact value" if error == 0 else "the Monte Carlo number"
    if bound:
        note = f"; beyond the bound {settled_bound(bound):.2g} on the loops' slicing bias too" + note
    method = (f"{away} standard errors away from {what} at {_point_text(point)}"
              f"{' in ' + part if part else ''}: claimed {mine:.10g}, derived {quoted(value, error)}; a claim "
              f"{k:g} or more standard errors away is a mismatch{note}")
    return CheckResult(MISMATCH, claimed, derived, method, label=label, witness=tuple(
        (s.name, v) for s, v in sorted(point.items(), key=lambda kv: kv[0].name)),
        claimed_value=f"{mine:.10g}", derived_value=quoted(value, error), points=count)


def _within_slicing(row, k) -> bool:
    """A claim k or more standard errors from the number, but within k standard errors plus the bound
    on the slicing bias."""
    _, _, mine, value, error, deviation, bound = row
    return bound is not None and bound > 0 and math.isfinite(deviation) and abs(mine - value) <= k * error + bound


def sampled_number_text(derivation, expr, point: dict, span) -> str:
    """`evaluate`: the value with its error (two significant digits), marked as a Monte Carlo number, and
    the bound on the loops' slicing bias where it is assessed."""
    from ..loops.quoting import slice_text
    value, error, bound = sampled_number(derivation, expr, point, span)
    bias = slice_text(bound)
    return quoted(value, error) + " (Monte Carlo" + (f"; {bias})" if bias else ")")


def sampled_table(derivation, table, items) -> list[list[str]]:
    """`tabulate` with sampled parts: a value column for each coefficient and an error column after
    each one that used a sampled number (full precision: the CSV is for further work; 0.0 where the
    point needed none), every grid point covered by a `sample` statement or exactly known (tube
    pieces, below). A coefficient known only to some order in the tube coverage says so in its
    header (`truncation` of the item)."""
    import itertools

    from ..loops.quoting import settled_bound
    from .numbers import grid_text
    axes = [(s, list(values)) for s, values in table.axes] + [(s, [v]) for s, v in table.fixed]
    points = [{s: v for (s, _), v in zip(axes, combination)}
              for combination in itertools.product(*(values for _, values in axes))]
    columns = [[_table_cell(derivation, item.value, point, table) for point in points] for item in items]
    errors = [any(error is not None for _, error, _ in cells) for cells in columns]
    bounded = [any(bound is not None for _, _, bound in cells) for cells in columns]
    header = [s.name for s, _ in axes]
    for item, with_error, with_bound in zip(items, errors, bounded):
        label = item.label + (f" ({item.truncation})" if getattr(item, "truncation", None) else "")
        header += [label, f"{item.label} error"] if with_error else [label]
        header += [f"{item.label} slicing bias bound"] if with_bound else []
    rows = [header]
    for k, point in enumerate(points):
        row = [grid_text(point[s], table.digits) for s, _ in axes]
        for cells, with_error, with_bound in zip(columns, errors, bounded):
            text, error, bound = cells[k]
            row += [text, repr(0.0 if error is None else error)] if with_error else [text]
            row += [repr(settled_bound(bound) or 0.0)] if with_bound else []
        rows.append(row)
    return rows


def _table_cell(derivation, expr, point: dict, table) -> tuple[str, float | None, float | None]:
    """(text of the value, its error or None when exact, its slicing bias bound or None) of one
    coefficient at one grid point."""
    from .numbers import evaluate, format_number
    expr, _ = filled(derivation.system, expr, point)
    if uses_sampled(derivation, expr) or tube_pieces_in(expr):
        value, error, bound = sampled_number(derivation, expr, point, table.span)
        return repr(value), error, bound
    own = {s.name: point[s] for s in expr.free_symbols if s in point}
    return format_number(evaluate(expr, own, table.digits), table.digits), None, None


def plot_sampled_line(derivation, figure, items, path, into, options=(), caption_tex=None, caption=None) -> None:
    """`plot` over one axis with sampled parts: the exact coefficients as curves, the sampled ones as
    points with error bars at every `sample` point on the axis (the other parameters at the figure's
    values).  Among tubes (below) a coefficient whose pieces do not change along the axis (the
    coverage, a mass) is a curve, with a one-standard-error band where a piece is sampled; otherwise
    it is drawn as points where each piece is exact or sampled; over two parameters it is a heat map
    (`tube_map`).  A heat map of another sampled coefficient is the `map` clause of `sample`.
    Drawn in the figure style of `options` and written by `plots.finish` (PDF, PNG, caption beside;
    `caption` replaces the conventions line)."""
    from . import plots
    from .figure_style import style
    plots._matplotlib()
    with style(options):
        _plot_sampled_line(derivation, figure, items, path, into, options, caption_tex, caption)


def _plot_sampled_line(derivation, figure, items, path, into, options, caption_tex, conventions) -> None:
    from ..loops.quoting import settled_bound
    from . import plots
    if len(figure.axes) != 1 and derivation.system.tubes is not None:   # a heat map, point by point (below)
        return tube_map(derivation, figure, items[0], path, into, options, caption_tex, conventions)
    if len(figure.axes) != 1:
        raise InputError("a heat map of a coefficient with Monte Carlo parts is drawn by the `map` clause of its "
                         "`sample` statement; `plot` draws it over one parameter", figure.span)
    (symbol, interval), = figure.axes
    system = derivation.system
    fixed = dict(figure.fixed)
    span = plots._interval(symbol.name, interval, system, system.parameters)
    _, Figure, numpy = plots._matplotlib()
    exact = [i for i in items if not uses_sampled(derivation, i.value) and not tube_pieces_in(i.value)]
    prepared, other = plots._prepare(exact, [symbol.name], {s.name: v for s, v in fixed.items()}, system,
                                     system.parameters) if exact else ([], {s.name: v for s, v in fixed.items()})
    caption = plots._caption_text(conventions, system, other, {symbol.name: span}) + \
        "\nPoints: Brownian-loop Monte Carlo (`sample`), error bars one standard error."
    tubes = "" if system.tubes is None else " Tube pieces exactly known at a point carry no error."
    caption += tubes
    drawing = plots._figure(Figure, caption.count("\n") + 1)
    axes = drawing.add_subplot()
    x = plots._samples(span, 401, numpy)
    bounds = []
    for item, expr in zip(exact, prepared):
        axes.plot(x, plots._evaluator(expr, [symbol.name], numpy)(x), label=f"${plots.coefficient_latex(item)}$",
                  linewidth=1.5)
    for item in items:
        if item in exact:
            continue
        if system.tubes is not None:
            if tube_curve(derivation, item, symbol, fixed, axes, x, figure.span):
                continue
            along = tube_points(derivation, item, symbol, span, fixed, figure.span)
        else:
            along = sorted({p[symbol] for p in sample_points(derivation, item.value) if symbol in p
                            and span.contains(p[symbol])}, key=float)
        if not along:
            raise InputError(f"no `sample` statement estimates the sampled part of {item.label} on {symbol.name} "
                             f"in {span}; add one, e.g. `sample {item.label} over {symbol.name} = [...]`", figure.span)
        numbers = [sampled_number(derivation, item.value, {**fixed, symbol: v}, figure.span) for v in along]
        bounds += [n[2] for n in numbers if n[2]]
        axes.errorbar([float(v) for v in along], [n[0] for n in numbers], yerr=[n[1] for n in numbers], fmt="o",
                      markersize=3, capsize=3, label=f"${plots.coefficient_latex(item)}$ (Monte Carlo)")
    axes.set_xlim(float(span.lower), float(span.upper))
    axes.set_xlabel(f"${plots.axis_latex(symbol.name, system)}$")
    axes.legend(loc="best", fontsize=8)
    axes.grid(True, linewidth=0.3, alpha=0.5)
    plots._format(path)
    unseen = (f" Not drawn: the bound on the loops' slicing bias, at most {settled_bound(max(bounds)):.2g}."
              if bounds else "")
    caption += unseen
    if caption_tex is not None:
        caption_tex += (r" Points: Brownian-loop Monte Carlo (\texttt{sample}), error bars one standard error."
                        + tubes + unseen)
    plots.finish(drawing, path, caption, into, options, caption_tex=caption_tex,
                 title=", ".join(i.label for i in items) + f" against {symbol.name}")


# ------------------------------------------------------------------ among static flux tubes


def tube_pieces_in(expr) -> list[sympy.Symbol]:
    """The tube pieces an expression holds, by name."""
    return sorted((s for s in sympy.sympify(expr).free_symbols if tube_piece(s) is not None), key=lambda s: s.name)


def resolved(derivation, expr, point: dict, span) -> tuple[sympy.Expr, dict]:
    """(expr with the pieces exactly known at `point` put in, {sampled piece: (value, error)}) at a
    point ({symbol: exact number}); a piece neither exact nor sampled there is refused at `span`."""
    system = derivation.system
    expr, _ = filled(system, sympy.sympify(expr), point)
    table = _tables(derivation)[0]
    estimates = {}
    for piece in tube_pieces_in(expr):
        key = _statistics_key(system, piece, point)
        if key is None or (piece, key) not in table:
            raise InputError(missing_piece(system, piece, point), span)
        estimates[piece] = table[(piece, key)]
    return expr, estimates


def known_at(derivation, expr, point: dict) -> bool:
    """Whether every tube piece of `expr` is exact or sampled at `point`."""
    try:
        resolved(derivation, expr, point, None)
    except InputError:
        return False
    return True


def tube_curve(derivation, item, axis, fixed: dict, axes, x, span) -> bool:
    """Draw `item` as a curve on `axes` when none of its tube pieces changes along `axis` at the
    figure's `fixed` values (the axis is the coverage or a mass, or the pieces are exact on the whole
    axis): a sampled piece gives a one-standard-error band. False (nothing drawn) otherwise."""
    from . import plots
    system = derivation.system
    expr, _ = filled(system, sympy.sympify(item.value).xreplace(fixed), fixed)
    for piece in tube_pieces_in(expr):
        definitions = tube_piece(piece).definitions(system)
        if axis in set().union(*(sympy.sympify(e).xreplace(fixed).free_symbols for _, e in definitions)):
            return False
    expr, estimates = resolved(derivation, expr, fixed, span)
    values = {p: sympy.Float(v, 17) for p, (v, _) in estimates.items()}
    curve = expr.xreplace(values)
    rest = sorted(s.name for s in curve.free_symbols - {axis})
    if rest:
        raise InputError(f"{item.label} depends on {', '.join(rest)}: fix {'it' if len(rest) == 1 else 'them'} with "
                         f"`at {rest[0]} = ...`", span)
    numpy = plots._matplotlib()[2]
    y = plots._evaluator(curve, [axis.name], numpy)(x)
    label = f"${plots.coefficient_latex(item)}$"
    if not estimates:
        axes.plot(x, y, label=label, linewidth=1.5)
        return True
    variance = numpy.zeros_like(y)
    for piece, (_, error) in estimates.items():
        slope = sympy.diff(expr, piece).xreplace(values)
        variance = variance + (plots._evaluator(slope, [axis.name], numpy)(x) * error) ** 2
    line, = axes.plot(x, y, label=label + " (Monte Carlo pieces)", linewidth=1.5)
    axes.fill_between(x, y - numpy.sqrt(variance), y + numpy.sqrt(variance), color=line.get_color(), alpha=0.25,
                      linewidth=0, label="one standard error")
    return True


def tube_points(derivation, item, axis, interval, fixed: dict, span) -> list:
    """The values of `axis` in `interval` at which every tube piece of `item` is exact or sampled: the
    points of the `sample` statements and the integers (where the pieces are exact); refused when
    there is none, with the piece and the `sample` statement to add at the interval's middle."""
    along = [v for v in _candidates(derivation, item.value, axis, interval)
             if known_at(derivation, item.value, {**fixed, axis: v})]
    if not along:
        middle = (interval.lower + interval.upper) / 2
        try:
            resolved(derivation, item.value, {**fixed, axis: middle}, span)
        except InputError as error:
            raise InputError(f"{item.label} has no point on {axis.name} in {interval} where its tube pieces are known "
                             f"(a figure over {axis.name} draws it where they are); {error.message}", span) from None
    return along


def _candidates(derivation, expr, axis, interval) -> list:
    """The values of `axis` in `interval` where a tube piece of `expr` may be known: those of the input's
    `sample` points and the integers (every piece is exact at an integer flux, the anyon piece at the
    bose/fermi points, the braid piece at an integer mutual parameter), in increasing order."""
    candidates = {p[axis] for p in sample_points(derivation, expr) if axis in p}
    low, high = int(sympy.ceiling(interval.lower)), int(sympy.floor(interval.upper))
    if high - low < 1000:
        candidates |= {sympy.Integer(k) for k in range(low, high + 1)}
    return sorted((v for v in candidates if interval.contains(v)), key=float)


def tube_grid(derivation, item, figure, resolution: int = 121):
    """(x, y, values, errors or None) of `item` on the grid of a `plot` over two parameters, the arrays
    with a row per y.  An axis that a tube piece depends on (at the figure's fixed values) takes the
    values where the pieces may be known (`_candidates`: the `sample` points on it and the integers), an
    axis none depends on (the coverage, a mass) `resolution` points of its interval; every grid point
    needs each piece exact or sampled (`resolved`), else the statement is refused at the first point
    without one, with the `sample` statement to add.  Errors are those of the sampled pieces (None
    when no point needed one)."""
    import itertools

    from . import plots
    system = derivation.system
    numpy = plots._matplotlib()[2]
    fixed = dict(figure.fixed)
    expr, _ = filled(system, sympy.sympify(item.value).xreplace(fixed), fixed)
    moving = set()
    for piece in tube_pieces_in(expr):
        for _, definition in tube_piece(piece).definitions(system):
            moving |= sympy.sympify(definition).xreplace(fixed).free_symbols
    axes, values = [], []
    for symbol, interval in figure.axes:
        span = plots._interval(symbol.name, interval, system, system.parameters)
        along = _candidates(derivation, item.value, symbol, span) if symbol in moving else \
            list(plots._samples(span, resolution, numpy))
        if len(along) < 2:
            raise InputError(f"a heat map of {item.label} takes {symbol.name} where its tube pieces may be known (the "
                             f"`sample` points and the integers), and {span} holds {len(along)}: add a `sample "
                             f"{_sampled_in(system, tube_pieces_in(expr)[0])} over {symbol.name} = [...]`", figure.span)
        axes.append(symbol)
        values.append(along)
    grid = numpy.meshgrid(*(numpy.array([float(v) for v in along]) for along in values))
    z, errors, sampled = numpy.full(grid[0].shape, numpy.nan), numpy.zeros(grid[0].shape), False
    sparse = [k for k in (0, 1) if axes[k] in moving]
    dense = [k for k in (0, 1) if k not in sparse]
    names = [axes[k].name for k in dense]
    for combination in itertools.product(*(values[k] for k in sparse)):
        point = {**fixed, **{axes[k]: v for k, v in zip(sparse, combination)}}
        try:
            exact, estimates = resolved(derivation, expr, point, figure.span)
        except InputError as error:
            raise InputError(f"a heat map of {item.label} needs its tube pieces at every point of its grid ("
                             + "; ".join(f"{s.name} in {{{', '.join(sympy.sstr(v) for v in along)}}}"
                                         for s, along, k in zip(axes, values, (0, 1)) if k in sparse)
                             + f"); {error.message}", figure.span) from None
        sampled = sampled or bool(estimates)
        numbers = {p: sympy.Float(v, 17) for p, (v, _) in estimates.items()}
        at = exact.xreplace(point)
        value = at.xreplace(numbers)
        variance = sum((sympy.diff(at, p).xreplace(numbers) * e) ** 2 for p, (_, e) in estimates.items())
        rest = sorted(s.name for s in value.free_symbols if s not in {axes[k] for k in dense})
        if rest:
            raise InputError(f"{item.label} depends on {', '.join(rest)}: fix {'it' if len(rest) == 1 else 'them'} "
                             f"with `at {rest[0]} = ...`", figure.span)
        where = [slice(None), slice(None)]
        for k, v in zip(sparse, combination):
            where[1 - k] = values[k].index(v)    # rows run along the second axis
        where = tuple(where)
        if dense:
            cells = [grid[k][where] for k in dense]
            z[where] = plots._evaluator(value, names, numpy)(*cells)
            errors[where] = numpy.sqrt(plots._evaluator(sympy.sympify(variance), names, numpy)(*cells))
        else:
            z[where], errors[where] = float(sympy.N(value, 17)), float(sympy.sqrt(variance))
    x, y = (numpy.array([float(v) for v in along]) for along in values)
    return x, y, z, errors if sampled else None


def tube_map(derivation, figure, item, path, into, options, caption_tex, conventions) -> None:
    """`plot` of a coefficient with tube pieces over two parameters: its heat map on `tube_grid` and,
    when a point used a sampled piece, the one-standard-error map beside it (`plots.value_and_error_maps`,
    as a `sample ... map`); the caption says where the numbers come from (`conventions` replaces the
    conventions line, with the truncation in the coverage)."""
    from . import plots
    system = derivation.system
    x, y, z, errors = tube_grid(derivation, item, figure)
    label = f"${plots.coefficient_latex(item, system)}$"
    how = ("Each cell: tube pieces exact where known, else Brownian-loop Monte Carlo ({}); right: one standard "
           "error." if errors is not None else "Tube pieces exact at every grid point.")
    caption = plots._caption_text(conventions, system, {s.name: v for s, v in figure.fixed}, {}) \
        + "\n" + how.format("`sample`")
    labels = tuple(f"${plots.axis_latex(s.name, system)}$" for s, _ in figure.axes)
    plots._format(path)
    drawing = plots.value_and_error_maps([(label, z, errors)], x, y, labels,
                                         caption.count("\n") + 1 if "footer" in options else 0)
    if caption_tex is not None:
        caption_tex += " " + how.format(r"\texttt{sample}")
    plots.finish(drawing, path, caption, into, options, caption_tex=caption_tex,
                 title=f"{item.label} against {', '.join(s.name for s, _ in figure.axes)}")


def tube_claim(derivation, claim, claimed, derived, label, limits):
    """`claim ... within k errors` on a coefficient with tube pieces, at every point of the input's
    `sample` statements where each piece is exact or sampled: with the coverage a parameter, each
    power of it below the truncation is compared on its own (the terms left out are unknown, not
    zero); with the coverage a number, the value through that order, and a claim k or more standard
    errors away is undecided (the difference may lie in the terms left out), never a mismatch.
    `claimed` and `derived` come truncated to `limits` (`run.run_checks`)."""
    from dataclasses import replace

    system = derivation.system
    coverage = system.tubes.coverage
    other = sorted(s.name for s in limits if s != coverage)
    if other:
        raise InputError(f"a claim truncated in {', '.join(other)} is compared term by term, not with Monte Carlo "
                         "numbers; drop `within ... errors` or that O(...) (an O term in the tube coverage is "
                         "fine)", claim.span)
    order = limits.get(coverage)
    left_out = f"O({coverage}^{order})" + (f" at {coverage} = {sympy.sstr(system.tubes.value)}"
                                          if system.tubes.value is not None else "")
    claimed, derived = sympy.expand(sympy.sympify(claimed)), sympy.expand(derived)
    if coverage in derived.free_symbols | claimed.free_symbols:
        powers = range(order if order is not None else 1 + max(sympy.degree(derived, coverage),
                                                                sympy.degree(claimed, coverage)))
        parts = [(f"the {coverage}^{p} term", claimed.coeff(coverage, p), derived.coeff(coverage, p)) for p in powers]
    else:
        parts = [("", claimed, derived)]
    points = [{s: v for s, v in p.items() if s != coverage} for p in sample_points(derivation, derived)]
    points = list({tuple(sorted(p.items(), key=lambda kv: kv[0].name)): p for p in points}.values())
    if not points:
        pieces = ", ".join(s.name for s in tube_pieces_in(derived))
        raise InputError(f"`within {claim.errors:g} errors` compares the claim with the numbers of the input's `sample` "
                         f"statements, and none estimates {pieces} of {claim.target.label}; add one, e.g. "
                         f"`sample {_sampled_in(system, tube_pieces_in(derived)[0])} at ...` with the parameters of "
                         "the point", claim.span)
    note = f"; the terms of {left_out} are unknown and left out of the comparison"
    result = compared_at_points(derivation, claim, (claimed, derived), parts, points, claim.errors, label, note)
    if result.status == MISMATCH and system.tubes.value is not None:
        result = replace(result, status=UNDECIDED, method=result.method.replace(
            "is a mismatch", "would be a mismatch, but the coverage is a number here and the difference may lie in "
            "the terms left out (declare the coverage as a parameter to compare term by term)"))
    return result
