"""`sample` with static flux tubes: the named tube pieces estimated and composed into the coefficients.

    tubes flux 1/2 coverage n
    sample a[2] at n = 1/10 seed 7 with 20000 loops        # bose/fermi: T_two_tubes
    sample b[2], a[2] over alpha = [0, 1/2] seed 7          # anyons: B_anyon_tube_A
    sample a[1,1] over nu = [1/4, 1/2] seed 7               # braiding species A, B: B_braid_tube_A_B

Among tubes the exact coefficients of `clusters pairphase` hold two named pieces (routes/tube_pieces.py,
docs/tubes.md): T_two_tubes (one mobile loop and two tubes; in every b_l of a bose/fermi species at
n^2), B_anyon_tube_<species> (two identical anyons and one tube; in b_2 at n^1) and
B_braid_tube_<A>_<B> (two braiding particles of any masses and one tube; in b_11 at n^1).  A `sample`
statement estimates the pieces its coefficients contain with `tube_estimates` (T2 at the point (gamma,
gamma), B at (alpha, gamma), the braid piece with kind="distinct" at (alpha_AB, gamma, gamma)) and
composes them into the coefficients with the first-order error propagation of `tube_virial.compose`
(exact: the coefficients are linear in each piece).  The truncation
in the coverage stays: with the coverage given a value (`at n = ...`, or declared as a number) a
coefficient prints as one number + O(n^k); with the coverage left free, as its terms n^0 ... n^(k-1),
each a number with its error.

Seeds: piece P of a statement with seed S runs with the estimator seed SeedSequence([S, 2, P's number])
(T_two_tubes 1, B_anyon_tube of the species with index i: 2 + i), and the braid piece of the species
with indices i < j SeedSequence([S, 3, i, j]), so every piece has its own random numbers and the
statement alone repeats them.

`table "f.csv"` and `map "f.png"` write these numbers as the other `sample` statements do (loops/report.py,
loops/figures.py): a column, or a row of panels, per coefficient or per term in a free coverage, the
truncation in the head and the caption.

Build-time validation (`tube_request`) is called by `request._sampling`; the run (`tube_statement`) by
`sampled._statement`.  This module imports neither of them (no import cycle).
"""
from __future__ import annotations

import numpy as np
import sympy

from ..errors import InputError, NotSupportedYet
from ..naming import bracket_label
from ..routes.tube_pieces import anyon_tube_symbol, braid_tube_symbol, tube_piece, two_tubes_symbol
from .estimator import Estimate
from .runner import LoopsError, TargetNotReachable
from .sampled_records import SampledCluster, SampledPoint, SampledRun, SampledStatement, SampledValue, label
from .tube_estimates import DEFAULT_BATCH, estimate_anyons_tube, estimate_two_tubes
from .tube_virial import compose

WORKERS = 2
SUPPORTED = ("supported with flux tubes: `sample` of b[l], a[l] (l >= 1 for b, l >= 2 for a) of a bose or fermi "
             "species (the piece T_two_tubes: one mobile particle and two tubes; also b[1] of an anyonic species "
             "with `to order 2`) and of b[2], a[2] of an anyonic species (the piece B_anyon_tube_<species>: two "
             "anyons and one tube), and of b[1,1], a[1,1] of two braiding species (the piece B_braid_tube_<A>_<B>: "
             "two braiding particles and one tube), these two without `to order 2`")
_FAMILIES = {"two_tubes": 1, "anyons_tube": 2, "braid_tube": 1}   # families per round: loops per round / DEFAULT_BATCH


def _refuse(message: str, span, unsupported: bool = False):
    raise (NotSupportedYet if unsupported else InputError)(f"{message}; {SUPPORTED}", span)


def tube_request(builder, statement, names: list[str]):
    """The coefficients of a `sample` statement among tubes, checked at their lines: (coefficients,
    needed parameters {name: (message, span) or None when optional}, least loops, estimator runs)."""
    from ..exact.periods import species_statistics
    params = builder.by_symbol()
    species = list(builder.species.values())
    flux = sympy.sympify(builder.tubes.flux)
    coefficients, needed, pieces = [], {}, {}
    for ref in (c for c in statement.tree.children if c.data == "coef_ref"):
        letter, ref_span = str(ref.children[0]), builder.span(ref)
        if letter not in ("a", "b"):
            _refuse(f"`sample` takes cluster (b[...]) and virial (a[...]) coefficients, not {letter}[...]",
                    builder.span(ref.children[0]))
        index = builder.multi_index(ref, names)
        name = f"{letter}{bracket_label(index)}"
        occupied = [i for i, n in enumerate(index) if n]
        if flux.is_integer is True and (len(occupied) == 1 or len(occupied) == sum(index) == 2):
            _refuse(f"{name} contains no tube piece: the flux {flux} is an integer, the tubes have no effect "
                    "(period 1)", ref_span)
        if len(occupied) > 1:
            piece = _braid_request(builder, index, name, ref_span)
            pieces[piece] = None
            first, second = (species[k] for k in occupied)
            mutual = next(m.value for m in builder.mutuals if {m.first, m.second} == {first.name, second.name})
            _needed(needed, name, piece, [("flux", flux), ("mutual", mutual),
                                          ("mass ratio", sympy.sympify(first.mass) / second.mass)], ref_span)
            coefficients.append(("cluster" if letter == "b" else "virial", index, ref_span))
            continue
        i = occupied[0]
        l, mobile = index[i], species[i]
        ideal = species_statistics(mobile, params) in ("bose", "fermi")
        squares = builder.tubes.order == 2
        if letter == "a" and l == 1:
            _refuse(f"{name} = 1 contains no tube piece", ref_span)
        if not ideal and l == 1 and not squares:
            _refuse(f"{name} contains no tube piece: for anyons among tubes it is known through the first order in "
                    "the coverage, where it is exact (the coverage-squared term is beyond the anyonic results' "
                    "O(coverage^2); `tubes ... to order 2` keeps it)", ref_span)
        if not ideal and l >= 3:
            _refuse(f"{name}: more than two mobile particles with a tube ({l} anyons of {mobile.name} and one tube) "
                    "is a many-body piece the loop estimator does not sample", ref_span, unsupported=True)
        if not ideal and l == 2 and squares:
            _refuse(f"{name}: with `to order 2` it holds {anyon_tube_symbol(mobile.name, 2)} (two anyons and two "
                    "tubes), which the loop estimator does not sample yet; sample it from an input without `to order "
                    "2`", ref_span, unsupported=True)
        one = ideal or l == 1      # one mobile particle (or an ideal species): the two-tube integral T2
        piece = two_tubes_symbol() if one else anyon_tube_symbol(mobile.name)
        pieces[piece] = None
        _needed(needed, name, piece, [("flux", flux)] + ([] if one else [("exchange", mobile.exchange)]), ref_span)
        coefficients.append(("cluster" if letter == "b" else "virial", index, ref_span))
    gas = [s.mass for s in species] + [builder.tubes.coverage] + [m.exchange for m in species] \
        + [m.value for m in builder.mutuals]
    for symbol in set().union(*(sympy.sympify(x).free_symbols for x in gas)):
        needed.setdefault(symbol.name, None)     # allowed: the coverage, masses, other exchange parameters
    per_round = max(DEFAULT_BATCH * _FAMILIES[_family(p)] for p in pieces)
    return coefficients, needed, 2 * per_round, len(pieces)


def _needed(needed: dict, name: str, piece, roles, span) -> None:
    """Every parameter of what the piece depends on needs a value (`at`) or a scan (`over`)."""
    for role, expr in roles:
        for symbol in sorted(sympy.sympify(expr).free_symbols, key=lambda s: s.name):
            needed.setdefault(symbol.name, (
                f"{name} contains {piece}, a function of the {role} {expr}: give {symbol.name} a value with "
                f"`at {symbol.name} = ...` or scan it with `over {symbol.name} = [...]`", span))


def _braid_request(builder, index, name: str, span) -> sympy.Symbol:
    """The braid-tube piece a mixed coefficient holds, or its refusal at the coefficient."""
    from ..exact.periods import braids
    species = list(builder.species.values())
    occupied = [k for k, n in enumerate(index) if n]
    first, second = species[occupied[0]], species[occupied[1]]
    mutual = next((m.value for m in builder.mutuals if {m.first, m.second} == {first.name, second.name}), 0)
    if len(occupied) > 2:
        _refuse(f"{name}: more than two mobile particles with a tube ({len(occupied)} species) is not sampled by the "
                "loop estimator (a named many-body piece, or exactly 0 where the species do not all braid)", span,
                unsupported=True)
    if braids(mutual, builder.by_symbol()) is False:
        _refuse(f"{name} contains no tube piece: species that do not braid have no mixed coefficients (exactly 0)",
                span)
    if sum(index) > 2:
        _refuse(f"{name}: more than two mobile particles with a tube ({sum(index)} particles of braiding species "
                f"{first.name}, {second.name} and one tube) is a many-body piece the loop estimator does not sample",
                span, unsupported=True)
    if builder.tubes.order == 2:
        _refuse(f"{name}: with `to order 2` it holds {braid_tube_symbol(first.name, second.name, 2)} (two braiding "
                "particles and two tubes), which the loop estimator does not sample yet; sample it from an input "
                "without `to order 2`", span, unsupported=True)
    return braid_tube_symbol(first.name, second.name)


def _family(piece: sympy.Symbol) -> str:
    found = tube_piece(piece)
    return "braid_tube" if found.pair is not None else "two_tubes" if found.species is None else "anyons_tube"


def piece_seed(seed: int, system, piece: sympy.Symbol) -> int:
    """The estimator seed of one piece of a statement (module docstring)."""
    found = tube_piece(piece)
    if found.pair is not None:
        key = [seed, 3, *sorted(system.species_names.index(name) for name in found.pair_of(system))]
    else:
        key = [seed, 2, 1 if found.species is None else 2 + system.species_names.index(found.species)]
    return int(np.random.SeedSequence(key).generate_state(1, dtype=np.uint64)[0] >> 1)


def piece_statistics(system, piece: sympy.Symbol) -> dict[str, sympy.Expr] | None:
    """What a tube piece depends on ({"flux": ..., "exchange": ...}), None for a symbol that is none."""
    found = tube_piece(piece) if isinstance(piece, sympy.Symbol) and system.tubes is not None else None
    return None if found is None else dict(found.definitions(system))


def sampled_pieces(system) -> dict[sympy.Symbol, sympy.Symbol]:
    """{piece: piece} for every tube piece some `sample` statement of the system estimates."""
    if system.tubes is None:
        return {}
    from ..exact.periods import species_statistics
    params = {p.symbol: p for p in system.parameters}
    out = {}
    for sampling in system.samplings:
        for _, index, _ in sampling.coefficients:
            occupied = [k for k, n in enumerate(index) if n]
            mobile = system.species[occupied[0]]
            ideal = species_statistics(mobile, params) in ("bose", "fermi") or index[occupied[0]] == 1
            piece = two_tubes_symbol() if ideal else anyon_tube_symbol(mobile.name)
            if len(occupied) == 2:
                piece = braid_tube_symbol(*(system.species_names[k] for k in occupied))
            out[piece] = piece
    return out


def tube_statement(system, sampling, exact, points: list[dict]) -> SampledStatement:
    """Run one `sample` statement among tubes: every piece its coefficients contain over every point,
    composed into the coefficients (`exact(kind, index)` gives the derived coefficient)."""
    from ..routes.tube_pieces import coverage_truncation
    coverage = system.tubes.coverage
    exprs, orders, notes = {}, {}, {}
    for kind, index, span in sampling.coefficients:
        value = sympy.sympify(exact(kind, index))
        cut = coverage_truncation(system, value)
        if cut is not None and cut[1] is not None:   # the table's and map's words for the O(coverage^k) left out
            notes[label(kind, index)] = cut[1]
        order = value.getO()
        value = value.removeO() if order is not None else value
        held = sorted((s for s in value.free_symbols if tube_piece(s) is not None), key=lambda s: s.name)
        if not held:
            first_order = order is not None and sympy.Poly(order.expr, coverage).total_degree() == 2
            why = "`to order 1`" if system.tubes.order == 1 else "its anyonic or braiding species"
            raise InputError(f"{label(kind, index)} = {value} contains no tube piece here"
                             + (f" (its coverage-squared term is beyond this input's O({coverage}^2), set by "
                                f"{why})" if first_order else "") + ": nothing to sample; "
                             + SUPPORTED, span)
        exprs[(kind, index)] = value
        orders[(kind, index)] = None if order is None else sympy.Poly(order.expr, coverage).total_degree()
    pieces = sorted({s for e in exprs.values() for s in e.free_symbols if tube_piece(s) is not None},
                    key=lambda s: s.name)
    estimates, runs = {}, []
    for piece in pieces:
        values, records = _run(system, sampling, piece, points, exprs, len(pieces))
        estimates[piece] = values
        runs += records
    names = [s.name for s, _ in sampling.axes] + [s.name for s, _ in sampling.fixed]
    out_points = []
    for k, point in enumerate(points):
        row = [SampledValue(p.name, "piece", (), *estimates[p][k]) for p in pieces]
        for kind, index, span in sampling.coefficients:
            expr = exprs[(kind, index)]
            row += _composed(label(kind, index), kind, index, expr, point, coverage, orders[(kind, index)],
                             {p: Estimate(*estimates[p][k]) for p in pieces if p in expr.free_symbols}, span)
        shown = tuple((name, point[next(s for s in point if s.name == name)]) for name in names)
        out_points.append(SampledPoint(shown, tuple(row)))
    clusters = tuple(SampledCluster((), tuple(point.items()), *estimates[p][k], piece=p)
                     for p in pieces for k, point in enumerate(points))
    return SampledStatement(sampling, tuple(runs), tuple(out_points), clusters, tuple(notes.items()))


def _remainder(coverage, order, point) -> str:
    if order is None:
        return ""
    where = f" at {coverage} = {sympy.sstr(point[coverage])}" if coverage in point else ""
    return f"O({coverage}^{order}){where}"


def _composed(name, kind, index, expr, point, coverage, order, estimates, span) -> list[SampledValue]:
    """The coefficient at the point: one number (coverage given), else one number per power of it."""
    at_point = sympy.expand(expr.xreplace(point))
    rest = at_point.free_symbols - set(estimates) - {coverage}
    if rest:
        raise InputError(f"{name} at this point still depends on {', '.join(sorted(s.name for s in rest))}: give "
                         "values with `at` or `over`", span)
    remainder = _remainder(coverage, order, point)
    if coverage not in at_point.free_symbols:
        return [SampledValue(name, kind, index, *_pair(compose(at_point, estimates, {})), remainder=remainder)]
    terms = sympy.Poly(at_point, coverage).all_coeffs()[::-1]
    out = []
    for power, term in enumerate(terms):
        if term == 0:
            continue
        part = f"{name} [{coverage}^{power}]"
        out.append(SampledValue(part, kind, index, *_pair(compose(term, {s: e for s, e in estimates.items()
                                                                           if s in term.free_symbols}, {}))))
    return out[:-1] + [SampledValue(*[getattr(out[-1], f) for f in ("label", "kind", "index", "value", "error")],
                                    remainder=remainder)]


def _pair(estimate: Estimate) -> tuple[float, float]:
    return estimate.value, estimate.error


def _run(system, sampling, piece, points, exprs, runs: int):
    """One estimator scan for one piece over every point: [(value, error)] per point, and its records (one
    per mass ratio of the pair: loops of other masses are other loops)."""
    definitions = piece_statistics(system, piece)
    family = _family(piece)
    params, ratios = [], []
    for point in points:
        gamma = float(sympy.sympify(definitions["flux"]).xreplace(point))
        if family == "braid_tube":   # both particles feel the tubes' flux; the first one's mass over the second's
            params.append((float(sympy.sympify(definitions["mutual"]).xreplace(point)), gamma, gamma))
            ratios.append(float(sympy.sympify(definitions["smooth"]).xreplace(point)))
        else:
            params.append((gamma, gamma) if family == "two_tubes" else
                          (float(sympy.sympify(definitions["exchange"]).xreplace(point)), gamma))
            ratios.append(1.0)
    seed = piece_seed(sampling.seed, system, piece)
    by_ratio = list(dict.fromkeys(ratios))   # loops of other masses: one estimator run per mass ratio
    cap = None if sampling.time_cap is None else sampling.time_cap / runs / len(by_ratio)
    target = _piece_target(sampling, piece, points, exprs, system.tubes.coverage)
    estimate = {"two_tubes": estimate_two_tubes, "anyons_tube": estimate_anyons_tube,
                "braid_tube": lambda *args, **kw: estimate_anyons_tube(*args, kind="distinct", **kw)}[family]
    name = {"two_tubes": "connected", "anyons_tube": "b2_coverage1", "braid_tube": "b11_coverage1"}[family]
    values, records = {}, []
    for ratio in by_ratio:
        distinct = list(dict.fromkeys(p for p, r in zip(params, ratios) if r == ratio))
        result = _estimated(estimate, distinct, sampling, cap, target, seed, piece,
                            {} if family != "braid_tube" or ratio == 1.0 else {"mass_ratio": ratio})
        values.update({(p, ratio): _pair(point.values[name]) for p, point in zip(distinct, result.points)})
        records.append(SampledRun((), piece.name, family, sampling.seed, seed, result.samples, result.rounds,
                                  result.seconds, result.slices))
    return [values[(p, r)] for p, r in zip(params, ratios)], records


def _estimated(estimate, distinct, sampling, cap, target, seed, piece, options):
    """One estimator run over the distinct points, its failures as errors at the statement's clauses."""
    try:
        return estimate(distinct, samples=sampling.loops, time_cap=cap, target_error=target, seed=seed,
                        workers=WORKERS, slices=sampling.slices, **options)
    except TargetNotReachable as error:
        raise InputError(f"target {sampling.target:g} is out of reach for {piece} with "
                         + (f"{cap:g} s" if cap else f"{sampling.loops} loops")
                         + f": at the measured variance the run would need about {error.needed_samples:.3g} loops, "
                         f"about {error.needed_seconds:.3g} s; raise `within` (or `with ... loops`) or the target",
                         sampling.clause_span("target")) from None
    except LoopsError as error:
        raise InputError(f"{piece}: {error}", sampling.clause_span("within" if cap else "loops")) from None


def _piece_target(sampling, piece, points, exprs, coverage) -> float | None:
    """The error bar the piece must reach so that every listed coefficient (or each of its terms in the
    coverage, when the coverage has no value) meets the statement's target at every point."""
    if sampling.target is None:
        return None
    steepest = 0.0
    for expr in exprs.values():
        for point in points:
            slope = sympy.expand(sympy.diff(expr, piece).xreplace(point))
            if slope.free_symbols - {coverage}:
                continue
            terms = sympy.Poly(slope, coverage).coeffs() if coverage in slope.free_symbols else [slope]
            steepest = max([steepest] + [abs(float(t)) for t in terms])
    return sampling.target / max(steepest, 1e-300)
