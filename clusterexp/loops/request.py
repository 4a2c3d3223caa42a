"""The `sample` statement: validation of a request for Monte Carlo numbers, at build time.

    sample a[3] at alpha = 1/2 seed 7 within 120 seconds target 5e-4
    sample a[2,1] at alpha = 1/3 over nu = [0, 1/4, 1/2] with 50000 loops table "mixed.csv"

Only the coefficients the Brownian-loop estimator reaches are accepted (docs/loops.md): third order,
the plane, one species of anyons (b[3]) or two identical anyons plus one particle of another species
(b[2,1], b[1,2]), equal masses, `clusters pairphase`. Every refusal points at the user's line and says
what is supported. The run itself happens in the derivation stage (`clusterexp.loops.sampled`).
"""
from __future__ import annotations

import itertools
import math

import sympy

from ..errors import InputError
from ..language.hints import did_you_mean
from ..model import Sampling
from ..naming import bracket_label
from ..exact.periods import braids, exchange_statistics

SUPPORTED = ("supported: third-order coefficients of `clusters pairphase` in `dimension 2` with equal masses, "
             "b[3] and a[3] of one species of anyons, or b[2,1], a[2,1] (and b[1,2], a[1,2]) of two identical "
             "anyons plus one particle of another species")
DEFAULT_TIME_CAP = 60.0          # seconds, when the statement gives neither `within` nor `with N loops`
MAX_TIME_CAP = 7 * 24 * 3600.0
MAX_AXIS_VALUES = 50
MAX_POINTS = 400
MAP_SUFFIXES = (".png", ".pdf", ".svg")
MAP_ROWS = 4                     # coefficients in one `map` figure, a row of (value, error) panels each
INSTALL_HINT = "maps need matplotlib: pip install 'clusterexp[plot]'"
# Loop samples per second assumed when a budget is given as a number of loops (both cores, measured
# 25-35 thousand on the development machine; the lower figure, so that estimates are not optimistic).
SAMPLES_PER_SECOND = 20_000.0
# Each further point of an `over` grid evaluates every loop again (measured: about 200 thousand
# loop-points per second on both cores; half of it assumed).
POINT_SAMPLES_PER_SECOND = 100_000.0
MAX_UNTIMED_SECONDS = 600.0      # a loop budget estimated longer than this needs an explicit `within`
DEFAULT_SLICES = 16              # time slices per loop without `in N slices` (the estimators' default)
MAX_SLICES = 256


def estimator_kind(index: tuple[int, ...]) -> tuple[str, int, int | None]:
    """("identical", i, None) for 3 e_i; ("pair_plus_one", i, j) for 2 e_i + e_j; the estimator's kind and
    the species of the identical particles and of the other one."""
    occupied = [k for k, n in enumerate(index) if n]
    if len(occupied) == 1:
        return "identical", occupied[0], None
    pair = next(k for k in occupied if index[k] == 2)
    other = next(k for k in occupied if index[k] == 1)
    return "pair_plus_one", pair, other


def round_samples(index: tuple[int, ...]) -> int:
    """Loop samples in one round of the estimator for this coefficient (two rounds give an error bar)."""
    from .estimator import ALLOCATION, DEFAULT_UNIT
    return DEFAULT_UNIT * sum(ALLOCATION[estimator_kind(index)[0]].values())


def statistics_of(species, mutual, index) -> dict[str, sympy.Expr]:
    """The statistics parameters the sampled b depends on: `alpha` (exchange of the identical
    particles) and, for two species, `alpha_12` (their mutual parameter with the other particle).
    `species` in declaration order; `mutual(first, second)` gives alpha_ij (0 when undeclared)."""
    kind, pair, other = estimator_kind(index)
    out = {"alpha": species[pair].exchange}
    if kind == "pair_plus_one":
        out["alpha_12"] = mutual(species[pair].name, species[other].name)
    return out


def _builder_statistics(builder, index) -> dict[str, sympy.Expr]:
    def mutual(first, second):
        return next((m.value for m in builder.mutuals if {m.first, m.second} == {first, second}), sympy.Integer(0))
    return statistics_of(list(builder.species.values()), mutual, index)


class _Statement:
    """Collects one `sample` statement's clauses with their spans."""

    def __init__(self, builder, tree):
        self.builder = builder
        self.tree = tree
        self.span = builder.span(tree)
        self.clauses: dict[str, object] = {}
        for clause in tree.children:
            if clause.data == "coef_ref":
                continue
            name = clause.data[len("sample_"):]
            if name in self.clauses:
                raise InputError(f"`{_WORDS[name]}` is given twice in one `sample` statement", builder.span(clause))
            self.clauses[name] = clause

    def clause_span(self, name: str):
        return self.builder.span(self.clauses[name])


_WORDS = {"at": "at", "over": "over", "seed": "seed", "within": "within ... seconds", "target": "target",
          "loops": "with ... loops", "slices": "in ... slices", "table": "table", "map": "map"}


def build_samplings(builder, source, names: list[str], order: int) -> tuple[Sampling, ...]:
    """Validate every `sample` statement the builder collected; called before the regime checks so
    that a request outside the estimator's domain is reported at the `sample` line."""
    out = []
    for tree, file in builder.samplings:
        builder.file = file
        out.append(_sampling(builder, _Statement(builder, tree), source, names, order))
    builder.file = builder.main
    return tuple(out)


def _sampling(builder, statement: _Statement, source, names, order) -> Sampling:
    span = statement.span
    if builder.dimension != 2:
        raise InputError(f"the Brownian-loop estimator works in the plane only (`dimension 2`), not in dimension "
                         f"{builder.dimension}; {SUPPORTED}", span)
    if builder.tubes is not None:   # the named tube pieces (loops/tube_sampling.py)
        from .tube_sampling import tube_request
        coefficients, needed, least, runs = tube_request(builder, statement, names)
        return _budgeted(builder, statement, coefficients, *_parameter_values(builder, statement, coefficients, needed),
                         least, runs)
    refs = [c for c in statement.tree.children if c.data == "coef_ref"]
    coefficients = [_coefficient(builder, ref, names) for ref in refs]
    from ..routes import REGIMES
    if not REGIMES[source.kind].sampled_by_loops:
        raise InputError("sampled numbers enter the pair-phase regime: declare `clusters pairphase` "
                         f"(the coefficients come from `clusters {source.kind}` here); {SUPPORTED}", span)
    if order < 3:
        raise InputError(f"sampled coefficients are of total order 3, beyond the declared `order {order}`",
                         coefficients[0][2])
    given = getattr(builder, "_pending_given", None)
    for kind, index, ref_span in coefficients:
        _check_species(builder, index, names, ref_span)
        if given:
            given_kind, entries = given
            if given_kind == "virial":
                raise InputError("sampling together with given virial coefficients (a[...] in the pairphase block) "
                                 "is not supported; give b[...] values there instead", span)
            for ref, _, file in entries:
                builder.file, here = file, builder.file
                stated = builder.multi_index(ref, names)
                builder.file = here
                if stated == index:
                    raise InputError(f"b{bracket_label(index)} is both given in the pairphase block and sampled "
                                     "here; keep one", ref_span)
    fixed, axes = _parameter_values(builder, statement, coefficients)
    least = max(2 * round_samples(index) for _, index, _ in coefficients)
    return _budgeted(builder, statement, coefficients, fixed, axes, least, len({index for _, index, _ in coefficients}))


def _budgeted(builder, statement: _Statement, coefficients, fixed, axes, least: int, runs: int) -> Sampling:
    """The statement's seed, budget (`within`, `target`, `with N loops`: at least `least` loops, `runs`
    estimator runs) and files, checked, with the validated coefficients and points."""
    span = statement.span
    seed = int(str(statement.clauses["seed"].children[0])) if "seed" in statement.clauses else 0
    if seed >= 2 ** 63:
        raise InputError("the seed must be below 2^63", statement.clause_span("seed"))
    time_cap = _positive(statement, "within", MAX_TIME_CAP, "seconds")
    target = _positive(statement, "target", None, "error bar")
    loops = None
    if "loops" in statement.clauses:
        loops = int(str(statement.clauses["loops"].children[0]))
        if loops < least:
            raise InputError(f"{loops} loops is less than two rounds of the estimator (an error bar needs two); "
                             f"ask for at least {least}", statement.clause_span("loops"))
    slices = _slices(statement)
    if time_cap is None and loops is None:
        time_cap = DEFAULT_TIME_CAP
    if loops is not None and time_cap is None:
        points = math.prod(len(values) for _, values in axes) if axes else 1
        seconds = loop_seconds(runs, loops, points, slices)
        if seconds > MAX_UNTIMED_SECONDS:
            from ..limits import duration_text
            raise InputError(f"{loops:,} loops would take about {duration_text(seconds)} ({runs} estimator run"
                             f"{'s' if runs > 1 else ''}, {points} point{'s' if points > 1 else ''}, at the assumed "
                             f"{SAMPLES_PER_SECOND:,.0f} loops per second at {DEFAULT_SLICES} slices, proportionally "
                             f"fewer with more, here {slices}); a loop budget without `within` may take "
                             f"at most {MAX_UNTIMED_SECONDS / 60:g} minutes", statement.clause_span("loops"),
                             hint=f"ask for at most {_affordable(runs, points, slices):,} loops, or add `within T seconds` "
                                  f"(at most {MAX_TIME_CAP:g}), which stops the run at T seconds")
    table = _file_name(statement, "table")
    figure = _file_name(statement, "map")
    if figure is not None:
        _check_map(statement, figure, coefficients, axes)
    spans = tuple((name, statement.clause_span(name)) for name in statement.clauses)
    return Sampling(tuple(coefficients), span, fixed, axes, seed, time_cap, target, loops, table, figure, spans,
                    slices)


def _slices(statement: _Statement) -> int:
    """`in N slices`: an even number (the estimator extrapolates from N/2 slices) from 4 to MAX_SLICES."""
    if "slices" not in statement.clauses:
        return DEFAULT_SLICES
    slices = int(str(statement.clauses["slices"].children[0]))
    if slices % 2 or not 4 <= slices <= MAX_SLICES:
        raise InputError(f"the loops take an even number of time slices from 4 to {MAX_SLICES}, not {slices}",
                         statement.clause_span("slices"))
    return slices


def _coefficient(builder, ref, names):
    letter = str(ref.children[0])
    ref_span = builder.span(ref)
    if letter not in ("a", "b"):
        raise InputError(f"`sample` takes cluster (b[...]) and virial (a[...]) coefficients, not {letter}[...]",
                         builder.span(ref.children[0]))
    index = builder.multi_index(ref, names)
    label = f"{letter}{bracket_label(index)}"
    total = sum(index)
    occupied = sum(1 for n in index if n)
    if total <= 2:
        raise InputError(f"{label} is exact in this regime (the two-body phases are summed in closed form): ask for "
                         "it with `derive`; sampling is for the three-body parts", ref_span)
    if total > 3:
        raise InputError(f"{label} is a {total}-body coefficient: the loop estimator gives third-order coefficients "
                         f"only ({SUPPORTED}); a {total}-body run would need loops of {total} particles, which are "
                         "not implemented", ref_span)
    if occupied == 3:
        raise InputError(f"{label} couples three species: not supported ({SUPPORTED})", ref_span)
    return ("cluster" if letter == "b" else "virial", index, ref_span)


def _check_species(builder, index, names, ref_span):
    kind, pair, other = estimator_kind(index)
    species = list(builder.species.values())
    involved = [species[pair]] + ([species[other]] if other is not None else [])
    label = bracket_label(index)
    if len(involved) == 2:
        difference = sympy.simplify(involved[0].mass - involved[1].mass)
        if difference != 0:
            raise InputError(f"b{label}: {involved[0].name} has mass {involved[0].mass} and {involved[1].name} "
                             f"{involved[1].mass}; the loop estimator assumes equal masses ({SUPPORTED})", ref_span)
    reference = builder.species[builder.reference] if builder.reference else species[0]
    ratio = sympy.simplify(involved[0].mass / reference.mass)
    if not ratio.is_number:
        raise InputError(f"b{label}: the mass ratio {involved[0].name}/{reference.name} = {ratio} must be a number "
                         "for a numeric estimate", ref_span)
    statistics = _builder_statistics(builder, index)
    alpha = statistics["alpha"]
    params = {p.symbol: p for p in builder.parameters.values()}
    ideal_pair = exchange_statistics(alpha, params)   # modulo the exchange period 2
    if kind == "identical" and ideal_pair:
        raise InputError(f"b{label} is exact for {species[pair].name} ({dict(bose='bosons', fermi='fermions')[ideal_pair]} modulo the period 2: "
                         "an ideal gas); nothing to sample", ref_span)
    mutual = statistics.get("alpha_12")
    if kind == "pair_plus_one" and braids(mutual, params) is False:
        raise InputError(f"b{label} is exactly 0 here (no statistical coupling between {species[pair].name} and "
                         f"{species[other].name}); nothing to sample", ref_span)


def _parameter_values(builder, statement, coefficients, needed=None):
    """(fixed, axes) of `at` and `over`, checked against the declared parameters and what the
    sampled coefficients depend on (`needed`: {name: (message, span) if a value is required, None if
    allowed}; by default the statistics parameters of third-order b's)."""
    values: dict[str, tuple] = {}
    fixed, axes = [], []
    for clause_name in ("at", "over"):
        clause = statement.clauses.get(clause_name)
        if clause is None:
            continue
        for item in clause.children:
            token, *exprs = item.children
            name = str(token)
            if name not in builder.parameters:
                raise InputError(f"`{clause_name}` needs a declared parameter; '{name}' is not one", builder.span(token),
                                 did_you_mean(name, builder.parameters))
            if name in values:
                raise InputError(f"a value for {name} is given twice", builder.span(token))
            parameter = builder.parameters[name]
            numbers = tuple(_number(builder, parameter, e) for e in exprs)
            if len(numbers) > MAX_AXIS_VALUES:
                raise InputError(f"at most {MAX_AXIS_VALUES} values per scanned parameter", builder.span(token))
            values[name] = (token, numbers)
            if clause_name == "at":
                fixed.append((parameter.symbol, numbers[0]))
            else:
                axes.append((parameter.symbol, numbers))
    points = math.prod(len(v) for _, v in axes) if axes else 1
    if points > MAX_POINTS:
        raise InputError(f"the grid has {points} points; at most {MAX_POINTS} in one statement",
                         statement.clause_span("over"))
    given = needed is not None
    for name, missing in (needed or {}).items():
        if missing is not None and name not in values:
            raise InputError(*missing)
    needed = needed if given else {}
    for _, index, ref_span in (() if given else coefficients):
        for role, expr in _builder_statistics(builder, index).items():
            for symbol in sorted(expr.free_symbols, key=lambda s: s.name):
                needed.setdefault(symbol.name, role)
                if symbol.name not in values:
                    what = "exchange parameter" if role == "alpha" else "mutual parameter"
                    raise InputError(f"b{bracket_label(index)} depends on {symbol.name} (through the {what} {expr}): "
                                     f"give it a value with `at {symbol.name} = ...` or scan it with "
                                     f"`over {symbol.name} = [...]`", ref_span)
    for name, (token, _) in values.items():
        if name not in needed:
            raise InputError(f"the sampled coefficients do not depend on {name}"
                             + (f"; they depend on {', '.join(sorted(needed))}" if needed else ""), builder.span(token))
    return tuple(fixed), tuple(axes)


def _number(builder, parameter, tree) -> sympy.Expr:
    value = builder.expr(tree)
    if not value.is_number or value.is_real is not True:
        raise InputError(f"a value of {parameter.name} must be a real number", builder.span(tree))
    low, high = parameter.lower, parameter.upper
    outside = (low is not None and (value < low or (parameter.lower_open and value == low))) or \
        (high is not None and (value > high or (parameter.upper_open and value == high)))
    if bool(outside):
        raise InputError(f"{parameter.name} = {value} is outside its declared range", builder.span(tree))
    return value


def _positive(statement, name, largest, what):
    if name not in statement.clauses:
        return None
    text = str(statement.clauses[name].children[0])
    value = float(text)
    span = statement.clause_span(name)
    if not value > 0 or not math.isfinite(value):
        raise InputError(f"the {what} must be positive, not {text}", span)
    if largest is not None and value > largest:
        raise InputError(f"at most {largest:g} {what}", span)
    return value


def _file_name(statement, name):
    if name not in statement.clauses:
        return None
    text = str(statement.clauses[name].children[0])[1:-1]
    if not text.strip() or "\x00" in text:
        raise InputError(f"`{name}` needs a file name", statement.clause_span(name))
    return text


def _check_map(statement, figure, coefficients, axes):
    span = statement.clause_span("map")
    if not figure.lower().endswith(MAP_SUFFIXES):
        raise InputError(f"a map file name ends in {', '.join(MAP_SUFFIXES)}", span)
    if len(coefficients) > MAP_ROWS:
        raise InputError(f"a map draws at most {MAP_ROWS} coefficients (a row of panels each): list fewer in this "
                         "`sample` statement", span)
    if len(axes) != 2 or any(len(values) < 2 for _, values in axes):
        raise InputError("a map needs two scanned parameters with at least two values each "
                         "(`over alpha = [...], nu = [...]`)", span)
    try:
        import matplotlib  # noqa: F401
    except ImportError:
        raise InputError(INSTALL_HINT, span) from None


def grid_points(sampling: Sampling) -> list[dict[sympy.Symbol, sympy.Expr]]:
    """Every point of a statement: the `over` grid (first axis slowest) with the `at` values."""
    fixed = dict(sampling.fixed)
    if not sampling.axes:
        return [fixed]
    symbols = [s for s, _ in sampling.axes]
    return [{**fixed, **dict(zip(symbols, combo))} for combo in itertools.product(*(v for _, v in sampling.axes))]


def loop_seconds(runs: int, loops: int, points: int = 1, slices: int = DEFAULT_SLICES) -> float:
    """Estimated wall time of `runs` estimator runs of `loops` loops each over `points` grid points,
    at conservative rates (an upper estimate; the cost of a loop grows with its slices)."""
    return (runs * loops * (1 / SAMPLES_PER_SECOND + (points - 1) / POINT_SAMPLES_PER_SECOND)
            * max(1.0, slices / DEFAULT_SLICES))


def _affordable(runs: int, points: int, slices: int = DEFAULT_SLICES) -> int:
    loops = int(MAX_UNTIMED_SECONDS / loop_seconds(runs, 1, points, slices))
    return int(float(f"{loops:.2g}"))


def expected_seconds(system) -> float:
    """An upper estimate of the wall time of every `sample` statement of a system (the time caps, or
    the loop budget at a conservative rate): lets fuzzers and tools skip long runs."""
    total = 0.0
    for sampling in system.samplings:
        runs = len({index for _, index, _ in sampling.coefficients})
        points = math.prod(len(values) for _, values in sampling.axes) if sampling.axes else 1
        by_loops = loop_seconds(runs, sampling.loops, points, sampling.slices) if sampling.loops else math.inf
        total += min(sampling.time_cap or math.inf, by_loops)
    return total
