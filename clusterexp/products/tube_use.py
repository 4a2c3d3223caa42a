"""Coefficients among static flux tubes in the statements that use results: `evaluate`, `tabulate`,
`plot` and `claim ... within k errors` (docs/tubes.md, "In the input language").

Every coefficient among tubes is a series in the tube coverage known to a finite order: a table or a
figure of it states the O(coverage^k) left out (`coverage_truncation`), as `evaluate` does.  Its tube
pieces (routes/tube_pieces.py) are taken at each point from, in this order: their exact value where
`TubePiece.exactly` knows it (integer flux, bose/fermi points, an integer mutual parameter), the
estimate of a `sample` statement of the input at the same statistics parameters, else the statement is
refused with the piece, the point and the `sample` statement to add (`resolved`).  Only the sampled
pieces carry an error, so a point where every piece is exact has none.
"""
from __future__ import annotations

import sympy

from ..errors import InputError
from ..naming import bracket_label
from ..routes.tube_pieces import tube_piece
from .exact_pieces import filled


def tube_pieces_in(expr) -> list[sympy.Symbol]:
    """The tube pieces an expression holds, by name."""
    return sorted((s for s in sympy.sympify(expr).free_symbols if tube_piece(s) is not None), key=lambda s: s.name)


def coverage_truncation(system, value) -> tuple[sympy.Expr, str | None]:
    """(value without its O term, the note that says what is left out) for a series truncated in the
    tube coverage alone; (value, None) for a closed form; None for a series truncated in anything else
    (a given series in a statistics parameter: a table of it would be a polynomial in disguise)."""
    order = value.getO() if hasattr(value, "getO") else None
    if order is None:
        return value, None
    tubes = getattr(system, "tubes", None)
    if tubes is None or order.expr.free_symbols != {tubes.coverage}:
        return None
    note = f"truncated series, {sympy.sstr(order)} left out"
    if tubes.value is not None:
        note += f", {tubes.coverage} = {sympy.sstr(tubes.value)}"
    return value.removeO(), note


def _point_text(point: dict) -> str:
    return ", ".join(f"{s.name} = {sympy.sstr(v)}" for s, v in sorted(point.items(), key=lambda kv: kv[0].name))


def _sampled_in(system, piece) -> str:
    """A coefficient that holds the piece and that `sample` takes: b[l e_i] of the first bose/fermi
    species (T_two_tubes), b[2 e_i] of the anyons (B_anyon_tube_<i>), b[e_A + e_B] of the pair."""
    from ..exact.periods import species_statistics
    found = tube_piece(piece)
    names = system.species_names
    index = [0] * len(names)
    if found.pair is not None:
        for name in found.pair_of(system):
            index[names.index(name)] = 1
    elif found.species is not None:
        index[names.index(found.species)] = 2
    else:
        params = {p.symbol: p for p in system.parameters}
        ideal = [k for k, s in enumerate(system.species) if species_statistics(s, params) in ("bose", "fermi")]
        index[ideal[0] if ideal else 0] = 1
    return f"b{bracket_label(tuple(index))}"


def _exact_where(piece) -> str:
    found = tube_piece(piece)
    if found.pair is not None:
        return "at an integer flux or an integer mutual parameter"
    if found.species is not None:
        return f"at an integer flux or where {found.species} is a boson or a fermion"
    return "at an integer flux"


def missing_piece(system, piece, point: dict) -> str:
    """Why `piece` has no value at `point`, and the `sample` statement that would give it one."""
    definitions = tube_piece(piece).definitions(system)
    depends = sorted(set().union(*(sympy.sympify(e).free_symbols for _, e in definitions)), key=lambda s: s.name)
    unset = [s.name for s in depends if s not in point]
    if unset:
        return (f"{piece} depends on {', '.join(unset)} (through the "
                f"{', '.join(kind for kind, e in definitions if sympy.sympify(e).free_symbols)}): give "
                f"{'it a value' if len(unset) == 1 else 'them values'}")
    at = ", ".join(f"{s.name} = {sympy.sstr(point[s])}" for s in depends)
    statement = f"sample {_sampled_in(system, piece)}" + (f" at {at}" if at else "")
    return (f"no value for {piece} at {_point_text(point) or 'this point'}: it is known exactly only "
            f"{_exact_where(piece)}, and no `sample` statement of this input estimates it there; add "
            f"`{statement}` (or put the point into a `sample ... over` list)")


def resolved(derivation, expr, point: dict, span) -> tuple[sympy.Expr, dict]:
    """(expr with the pieces exactly known at `point` put in, {sampled piece: (value, error)}) at a
    point ({symbol: exact number}); a piece neither exact nor sampled there is refused at `span`."""
    from .sampled_use import _estimates, _statistics_key
    system = derivation.system
    expr, _ = filled(system, sympy.sympify(expr), point)
    table = _estimates(derivation)
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
    from .sampled_use import sample_points
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

    from .check_result import MISMATCH, UNDECIDED
    from .sampled_use import compared_at_points, sample_points
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
