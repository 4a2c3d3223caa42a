"""Lark tree -> validated `model.System`. Validation happens once, here; every error points at the
user's line and column."""
from __future__ import annotations

import re
from pathlib import Path

import lark
import sympy

from ..errors import InputError, NotSupportedYet, Span
from .expressions import FUNCTIONS, ExpressionBuilder
from .hints import did_you_mean
from ..model import (FORMATS, QUANTITIES, Expansion, GivenValue, Mutual, OutputSettings, Parameter, Request, Source,
                    Species, System, Tubes)
from .statements import build_products, product_names, product_order
from .state_statements import build_states, check_states
from .parse import read_source
from .sources import MAX_INCLUDE_BYTES, SourceFile as _File, collect as _collect  # noqa: F401 (MAX_INCLUDE_BYTES: the API)
from ..routes import REGIMES

MAX_ORDER = 200
# regimes named by a word after `clusters` (with their forms); `spectrum { ... }` and `given { ... }` are
# blocks of their own in the grammar
REGIME_FORMS = {kind: regime.forms for kind, regime in REGIMES.items() if regime.forms}
RESERVED = {"b", "a", "z", "rho", "pi", "I", "E"} | set(FUNCTIONS)
GENERATED = re.compile(r"^(b|a|z|rho)_")
DEFAULT_ORDER = 4
# stands for a tube coverage declared as a number or an expression (reserved: GENERATED matches it)
TUBE_COVERAGE = sympy.Symbol("rho_tubes", nonnegative=True)


def build_system(text: str, filename: str = "<input>", base_dir: Path | None = None) -> System:
    """Parse and validate an input given as text (includes are resolved from `base_dir`, default cwd)."""
    statements = _collect(text, filename, base_dir or Path.cwd(), [])
    return _Builder(statements, filename, text).system()


def build_system_from_file(path: Path | str) -> System:
    """Read (`parse.read_source`: a file, pipe or device; UTF-8 checked at its line and column) and
    build an input file; its includes are found next to it."""
    path = Path(path)
    text = read_source(path, MAX_INCLUDE_BYTES)
    return build_system(text, str(path), path.resolve().parent)


class _Builder:
    def __init__(self, statements, filename: str, text: str):
        self.statements = statements
        self.main = _File(filename, text)
        self.files = [filename] + sorted({f.name for _, f in statements if f.name != filename})
        self.parameters: dict[str, Parameter] = {}
        self.species: dict[str, Species] = {}
        self.mutuals: list[Mutual] = []
        self.dimension = None
        self.order = None
        self.reference = None
        self.source = None
        self.requests: list[tuple[lark.Tree, _File]] = []
        self.output = OutputSettings()
        self.file = self.main
        self.statistics: list[tuple[lark.Tree, _File]] = []
        self.spectrum_items: list[tuple[lark.Tree, _File]] = []
        self.warnings: list[tuple[str, Span | None]] = []
        self.size_limit = None
        self.tubes = None
        self.expansions: list[tuple[lark.Tree, _File]] = []
        self.products: list[tuple[lark.Tree, _File]] = []
        self.samplings: list[tuple[lark.Tree, _File]] = []
        self.states: list[tuple[lark.Tree, _File]] = []   # equation-of-state statements

    def span(self, item) -> Span:
        return self.file.span(item)

    def expr(self, tree, extra: dict | None = None) -> sympy.Expr:
        symbols = {p.name: p.symbol for p in self.parameters.values()}
        symbols.update(extra or {})
        return ExpressionBuilder(symbols, self.span).build(tree)

    def system(self) -> System:
        for statement, source in self.statements:
            self.file = source
            getattr(self, "_" + statement.data)(statement)
        self.file = self.main
        if self.dimension is None:
            raise InputError("missing `dimension` statement", self.main.span(lark.Token("X", "", line=1, column=1)))
        if not self.species:
            raise InputError("no species declared; add e.g. `species A bose`", self._first_span())
        names = list(self.species)
        requests = [self._request(tree, source, names) for tree, source in self.requests]
        products = build_products(self, self.products, names)
        products["states"] = build_states(self, self.states, names)
        needed = max([_total(r) for r in requests] + [product_order(products)] + [3] * bool(self.samplings), default=0)
        order = self.order[0] if self.order else max(needed, DEFAULT_ORDER if not requests else 1)
        if self.order:
            for r in requests:
                if _total(r) > order:
                    raise InputError(f"request needs total order {_total(r)} but `order {order}` is declared", r.span)
            for name in product_names(products):
                if sum(name.index) > order:
                    raise InputError(f"{name.label} has total order {sum(name.index)} but `order {order}` is declared",
                                     name.span)
        if not requests:
            span = self._first_span()
            requests = [Request("cluster", span, up_to=order), Request("virial", span, up_to=order)]
        source = self.source or Source("generic", self._first_span())
        samplings = self._samplings(source, names, order)
        source = self._check_given(source, names, order)
        source = self._check_regime(source, names)
        system = System(dimension=self.dimension, species=tuple(self.species.values()), source=source,
                        requests=tuple(requests), order=order, reference=self.reference or names[0],
                        parameters=tuple(self.parameters.values()), mutuals=tuple(self.mutuals),
                        output=self.output, files=tuple(self.files), warnings=tuple(self.warnings),
                        size_limit=self.size_limit, tubes=self.tubes, expansions=self._expansions(),
                        samplings=samplings, **products)
        REGIMES[source.kind].check_system(system)
        check_states(system)
        if REGIMES[source.kind].named_pieces:
            from ..pieces import refuse_contradicted_given
            refuse_contradicted_given(system)
        return system

    def _first_span(self) -> Span:
        return self.main.span(self.statements[0][0]) if self.statements else Span(self.main.name, 1, 1)

    # -- statements ---------------------------------------------------------------------------------
    def _dimension(self, tree):
        token = tree.children[0]
        if self.dimension is not None:
            raise InputError("`dimension` is declared twice", self.span(token))
        if int(token) not in (1, 2, 3):
            raise InputError(f"dimension must be 1, 2 or 3, not {token}", self.span(token))
        self.dimension = int(token)

    def _order(self, tree):
        token = tree.children[0]
        if self.order is not None:
            raise InputError("`order` is declared twice", self.span(token))
        value = int(token)
        if not 1 <= value <= MAX_ORDER:
            raise InputError(f"order must be between 1 and {MAX_ORDER}, not {value}", self.span(token))
        self.order = (value, self.span(token))

    def _check_name(self, token, what: str):
        name = str(token)
        if name in RESERVED or GENERATED.match(name):
            raise InputError(f"'{name}' is a reserved name and cannot be a {what}", self.span(token))
        if name in self.parameters or name in self.species:
            kind = "parameter" if name in self.parameters else "species"
            raise InputError(f"'{name}' is already declared as a {kind}", self.span(token))

    def _parameter(self, tree):
        names = [c for c in tree.children if isinstance(c, lark.Token) and c.type == "NAME"]
        assumptions = [str(c) for c in tree.children if isinstance(c, lark.Token) and c.type == "ASSUME"]
        ranges = [c for c in tree.children if isinstance(c, lark.Tree) and c.data == "range"]
        lower = upper = None
        lower_open = upper_open = False
        if ranges:
            left, lo, hi, right = ranges[0].children
            lower, upper = self.expr(lo), self.expr(hi)
            if not (lower.is_real and upper.is_real and lower.is_number and upper.is_number) or _undecided_or(lower >= upper):
                raise InputError("a range needs two real numbers, the lower first", self.span(ranges[0]))
            lower_open, upper_open = left.data == "open_end", right.data == "open_end"
        flags = {"real": True}
        for a in assumptions:
            flags[a] = True
        if lower is not None and not _undecided_or(lower < 0) and "positive" not in flags:
            if not _undecided_or(lower <= 0) or lower_open:
                flags["positive"] = True
            else:
                flags["nonnegative"] = True
        for token in names:
            self._check_name(token, "parameter")
            symbol = sympy.Symbol(str(token), **flags)
            self.parameters[str(token)] = Parameter(str(token), symbol, self.span(token), lower, upper,
                                                    lower_open, upper_open, tuple(sorted(flags)))

    def _species(self, tree):
        token, *props = tree.children
        self._check_name(token, "species")
        mass, exchange, statistics = sympy.Integer(1), sympy.Integer(0), None
        seen = {}
        for prop in props:
            kind = "mass" if prop.data == "prop_mass" else "statistics"
            if kind in seen:
                raise InputError(f"species {token}: {'exchange/bose/fermi/boltzmann' if kind == 'statistics' else 'mass'}"
                                 " given twice", self.span(prop))
            seen[kind] = prop
            if prop.data == "prop_mass":
                mass = self.expr(prop.children[0])
                if not _decide(lambda: mass.is_positive, self.span(prop.children[0]), "the mass is positive"):
                    raise InputError("mass must be positive (a positive number, or a parameter declared positive)",
                                     self.span(prop.children[0]))
            elif prop.data == "prop_exchange":
                exchange = self.expr(prop.children[0])
                if _decide(lambda: exchange.is_real, self.span(prop.children[0]), "the exchange parameter is real") is False:
                    raise InputError("the exchange parameter must be real", self.span(prop.children[0]))
            else:
                statistics = prop.data[len("prop_"):]
                exchange = sympy.Integer(1 if statistics == "fermi" else 0)
        self.species[str(token)] = Species(str(token), mass, exchange, self.span(token), statistics)

    def known_species(self, token) -> str:
        if str(token) not in self.species:
            raise InputError(f"unknown species '{token}'", self.span(token),
                             did_you_mean(str(token), self.species))
        return str(token)

    def _mutual(self, tree):
        first, second, value = tree.children
        a, b = self.known_species(first), self.known_species(second)
        if a == b:
            raise InputError(f"a mutual parameter needs two distinct species; for {a} with itself use "
                             "`exchange` on the species", self.span(second))
        if any({m.first, m.second} == {a, b} for m in self.mutuals):
            raise InputError(f"mutual parameter of {a} and {b} is given twice", self.span(first))
        expr = self.expr(value)
        if _decide(lambda: expr.is_real, self.span(value), "the mutual parameter is real") is False:
            raise InputError("the mutual parameter must be real", self.span(value))
        self.mutuals.append(Mutual(a, b, expr, self.span(first)))

    def _reference(self, tree):
        self.reference = self.known_species(tree.children[0])

    def _set_source(self, source: Source, tree):
        if self.source is not None:
            raise InputError("the coefficient source (`clusters` or `virials given`) is given twice", self.span(tree))
        self.source = source

    def _clusters_regime(self, tree):
        token, *option_trees = tree.children
        word = str(token)
        options = [o.children[0] if o.data == "option_word" else lark.Token("NAME", "spectrum", line=o.meta.line,
                   column=o.meta.column, end_line=o.meta.end_line, end_column=o.meta.end_column)
                   for o in option_trees]
        if word not in REGIME_FORMS:
            raise InputError(f"unknown regime '{word}'; expected {', '.join(REGIME_FORMS)}, "
                             "spectrum { ... } or given { ... }", self.span(token),
                             did_you_mean(word, list(REGIME_FORMS) + ["spectrum", "given"]))
        forms = REGIME_FORMS[word]
        if len(options) > 1 or (options and str(options[0]) not in forms[1:] + forms[:1]):
            bad = options[1] if len(options) > 1 else options[0]
            allowed = " or ".join(f for f in forms if f) or "nothing"
            raise InputError(f"`clusters {word}` takes {allowed} after it, not '{bad}'", self.span(bad))
        form = str(options[0]) if options else forms[0]
        self._set_source(Source(word, self.span(token), form=form), tree)

    def _clusters_spectrum(self, tree):
        self._set_source(Source("spectrum", self.span(tree)), tree)
        self.spectrum_items = [(item, self.file) for item in tree.children]

    def _statistics_entry(self, tree):
        self.statistics.append((tree, self.file))

    def _statistics_matrix(self, tree):
        self.statistics.append((tree, self.file))

    def _given_block(self, tree, kind: str):
        values = []
        letter = "b" if kind == "cluster" else "a"
        for entry in tree.children:
            ref, value = entry.children
            name_token = ref.children[0]
            if str(name_token) != letter:
                other = "clusters given" if letter == "b" else "virials given"
                raise InputError(f"inside `{other}` write {letter}[...], not {name_token}[...]", self.span(name_token))
            values.append((ref, value, self.file))
        self._set_source(Source("given", self.span(tree)), tree)
        self._pending_given = (kind, values)

    def _clusters_given(self, tree):
        self._given_block(tree, "cluster")

    def _virials_given(self, tree):
        self._given_block(tree, "virial")

    def _derive_upto(self, tree):
        self.requests.append((tree, self.file))

    def _derive_list(self, tree):
        self.requests.append((tree, self.file))

    def _derive_named_list(self, tree):
        self.requests.append((tree, self.file))

    def _clusters_block(self, tree):
        token, *entries = tree.children
        takers = [kind for kind, regime in REGIMES.items() if regime.takes_given_block]
        if str(token) not in takers:
            raise InputError(f"only `clusters {' / '.join(takers)}` takes a block of given values, not '{token}'"
                             + ("; use `clusters given { ... }`" if str(token) == "generic" else ""), self.span(token))
        kinds = {str(e.children[0].children[0]) for e in entries}
        if not kinds <= {"a", "b"} or len(kinds) > 1:
            bad = next((e.children[0].children[0] for e in entries if str(e.children[0].children[0]) not in "ab"),
                       entries[-1].children[0].children[0] if entries else token)
            raise InputError(f"a {token} block gives either b[...] or a[...] values", self.span(bad))
        values = [(e.children[0], e.children[1], self.file) for e in entries]
        self._set_source(Source(str(token), self.span(token)), tree)
        self._pending_given = ("virial" if kinds == {"a"} else "cluster", values)

    def _tubes(self, tree):
        if self.tubes is not None:
            raise InputError("`tubes` is declared twice", self.span(tree))
        flux, coverage = (self.expr(c) for c in tree.children[:2])
        order = None
        if len(tree.children) > 2:
            order = int(tree.children[2])
            if order not in (1, 2):
                raise NotSupportedYet(f"`to order {order}`: the tubes enter through the coverage (order 1) or its "
                                      "square (order 2); three tubes and more are not derived",
                                      self.span(tree.children[2]))
        for value, child, what in ((flux, tree.children[0], "flux"), (coverage, tree.children[1], "coverage")):
            if _decide(lambda: value.is_real, self.span(child), f"the tube {what} is real") is False:
                raise InputError(f"the tube {what} must be real", self.span(child))
        if coverage.is_number and coverage < 0:
            raise InputError("the tube coverage (tubes per lambda^2) cannot be negative", self.span(tree.children[1]))
        if isinstance(coverage, sympy.Symbol):
            self.tubes = Tubes(flux, coverage, self.span(tree), order=order)
        else:  # a number or an expression: the results are still only first order in it
            self.tubes = Tubes(flux, TUBE_COVERAGE, self.span(tree), value=coverage, order=order)
        name = "coverage" if self.tubes.value is None else f"{TUBE_COVERAGE} = {sympy.sstr(coverage)}"
        symbol = "coverage" if self.tubes.value is None else TUBE_COVERAGE
        if order is None:
            how = ("k = 3 with bose/fermi mobile species that do not braid, 2 with anyonic or braiding ones (`to order "
                   "2` keeps their coverage-squared parts as named pieces)")
        else:
            how = f"k = {order + 1} (`to order {order}`)"
        self.warnings.append((f"flux tubes enter to a finite order in their coverage (independent tubes): results "
                              f"carry O({symbol}^k), {how}" + ("" if self.tubes.value is None else f", {name}"),
                              self.span(tree)))

    def _expand(self, tree):
        self.expansions.append((tree, self.file))

    _expand_joint = _expand

    def _claim(self, tree):
        self.products.append((tree, self.file))

    _evaluate = _tabulate = _plot = _typeset = _typeset_wavelength = _claim
    _values_form = _document_title = _snippet = _figure_options = _claim  # language/manuscript.py

    def _evaluate_state(self, tree):
        self.states.append((tree, self.file))

    _tabulate_state = _plot_state = _equation_of_state = _evaluate_state

    def _sample(self, tree):
        self.samplings.append((tree, self.file))

    def _samplings(self, source: Source, names: list[str], order: int) -> tuple:
        """`sample` statements, validated before the regime checks so that a request outside the loop
        estimator's domain is reported at its own line (clusterexp/loops/request.py)."""
        if not self.samplings:
            return ()
        from ..loops.request import build_samplings
        return build_samplings(self, source, names, order)

    def _size_limit(self, tree):
        token = tree.children[0]
        if self.size_limit is not None:
            raise InputError("`size limit` is declared twice", self.span(token))
        if int(token) < 1:
            raise InputError("the size limit must be at least 1", self.span(token))
        self.size_limit = int(token)

    def _output_format(self, tree):
        token = tree.children[0]
        if str(token) not in FORMATS:
            raise InputError(f"unknown output format '{token}'; expected text, latex or json", self.span(token),
                             did_you_mean(str(token), FORMATS))
        self.output = OutputSettings(str(token), self.output.align, self.span(token))

    def _output_align(self, tree):
        self.output = OutputSettings(self.output.format, str(tree.children[0]) == "on", self.span(tree))

    # -- checks after all declarations ----------------------------------------------------------------
    def multi_index(self, ref, names: list[str]) -> tuple[int, ...]:
        items = ref.children[1:]
        K = len(names)
        counts = [0] * K
        positional = [i for i in items if i.data == "index_count"]
        if positional and len(positional) != len(items):
            raise InputError("mix of counts and species names in one multi-index", self.span(ref))
        if positional:
            if len(items) != K:
                raise InputError(f"multi-index has {len(items)} entries but {K} species are declared "
                                 f"({', '.join(names)})", self.span(ref))
            counts = [int(i.children[0]) for i in items]
        else:
            for item in items:
                token = item.children[0]
                if str(token) not in names:
                    raise InputError(f"unknown species '{token}'", self.span(token), did_you_mean(str(token), names))
                counts[names.index(str(token))] += int(item.children[1]) if len(item.children) > 1 else 1
        if sum(counts) == 0:
            raise InputError("a multi-index needs at least one particle", self.span(ref))
        if sum(counts) > MAX_ORDER:
            raise InputError(f"total order {sum(counts)} is beyond the limit {MAX_ORDER}", self.span(ref))
        return tuple(counts)

    def _request(self, tree, source: _File, names: list[str]) -> Request:
        self.file = source
        try:
            if tree.data == "derive_upto":
                word, count = tree.children
                if str(word) not in QUANTITIES:
                    raise InputError(f"unknown quantity '{word}'; expected cluster, virial, density or fugacity",
                                     self.span(word), did_you_mean(str(word), QUANTITIES))
                if not 1 <= int(count) <= MAX_ORDER:
                    raise InputError(f"`up to` needs an order between 1 and {MAX_ORDER}", self.span(count))
                return Request(str(word), self.span(tree), up_to=int(count))
            refs = tree.children
            if tree.data == "derive_named_list":
                word, *refs = refs
                letter = {"cluster": "b", "virial": "a"}.get(str(word))
                if letter is None:
                    raise InputError(f"explicit indices are for cluster (b[...]) and virial (a[...]) requests, "
                                     f"not '{word}'", self.span(word))
                for r in refs:
                    if str(r.children[0]) != letter:
                        raise InputError(f"`derive {word}` lists {letter}[...], not {r.children[0]}[...]",
                                         self.span(r.children[0]))
            letters = {str(r.children[0]) for r in refs}
            if not letters <= {"a", "b"}:
                bad = next(r.children[0] for r in refs if str(r.children[0]) not in ("a", "b"))
                raise InputError("explicit indices are for cluster (b[...]) and virial (a[...]) requests",
                                 self.span(bad))
            if len(letters) > 1:
                raise InputError("one `derive` lists either b[...] or a[...]; use two statements", self.span(tree))
            quantity = "cluster" if letters == {"b"} else "virial"
            return Request(quantity, self.span(tree), indices=tuple(self.multi_index(r, names) for r in refs))
        finally:
            self.file = self.main

    def _expansions(self) -> tuple[Expansion, ...]:
        out = []
        for tree, file in self.expansions:
            self.file = file
            side = [c for c in tree.children if isinstance(c, lark.Tree) and c.data.startswith("side_")]
            rest = [c for c in tree.children if c not in side]
            order = rest[-1]
            names = [c for c in rest[:-1] if isinstance(c, lark.Token) and c.type == "NAME"]
            points = rest[len(names):-1]
            variables = []
            for name in names:
                if str(name) not in self.parameters:
                    raise InputError(f"`expand` needs a declared parameter; '{name}' is not one", self.span(name),
                                     did_you_mean(str(name), self.parameters))
                symbol = self.parameters[str(name)].symbol
                if symbol in [v for v, _ in variables]:
                    raise InputError(f"'{name}' is listed twice", self.span(name))
                variables.append((symbol, None))
            if len(points) not in (1, len(names)):
                raise InputError(f"`expand` lists {len(names)} parameters: give one point for all or one per "
                                 f"parameter, not {len(points)}", self.span(tree))
            if not 0 <= int(order) <= 40:
                raise InputError("`expand ... to k` needs 0 <= k <= 40", self.span(order))
            values = []
            for point in points:
                value = self.expr(point)
                if not value.is_number or value.is_real is False:
                    raise InputError("the expansion point must be a real number", self.span(point))
                values.append(value)
            values = values * len(names) if len(values) == 1 else values
            side = None if not side else side[0].data[len("side_"):]
            if len(names) > 1 and side == "both":
                raise InputError("a joint series takes one side per parameter, from its declared range or from "
                                 "`from above`/`from below`; `from both` is for one parameter", self.span(tree))
            out.append(Expansion(variables[0][0], values[0], int(order), side, self.span(tree),
                                 tuple((v, p) for (v, _), p in zip(variables[1:], values[1:]))))
        self.file = self.main
        return tuple(out)

    def _check_given(self, source: Source, names: list[str], order: int) -> Source:
        pending = getattr(self, "_pending_given", None)
        regime = REGIMES[source.kind]
        if not (regime.takes_given_block or source.kind == "given") or not pending:
            return source
        kind, entries = pending
        values, seen = [], {}
        for ref, value, file in entries:
            self.file = file
            index = self.multi_index(ref, names)
            regime.check_given_index(index, self.span(ref))
            if sum(index) == 1:
                fixed = ("b for a single particle is fixed by the masses ((m_i/m_ref)^(d/2)); do not give it"
                         if kind == "cluster" else "a for a single particle is 1; do not give it")
                raise InputError(fixed, self.span(ref))
            if index in seen:
                raise InputError(f"{ref.children[0]}{list(index)} is given twice", self.span(ref))
            seen[index] = True
            if sum(index) > order:
                raise InputError(f"this coefficient has total order {sum(index)}, beyond the order {order} "
                                 "derived here", self.span(ref))
            expr = self.expr(value)
            regime.check_given_value(expr, self.span(value))
            values.append(GivenValue(kind, index, expr, self.span(ref)))
        self.file = self.main
        return Source(source.kind, source.span, tuple(values))


    # -- physical regimes -------------------------------------------------------------------------------
    def _check_regime(self, source: Source, names: list[str]) -> Source:
        """What every regime shares; the rest is the regime's own `check` (routes.base.Regime)."""
        regime = REGIMES[source.kind]
        if self.statistics and not regime.takes_matrix:
            tree, file = self.statistics[0]
            self.file = file
            span = self.span(tree)
            self.file = self.main
            raise InputError("a statistics matrix is only used with `clusters exclusion`" + regime.takes_matrix_hint,
                             span)
        for s in self.species.values():
            if s.statistics == "boltzmann":
                regime.refuse_boltzmann(s)
                break
        source = regime.check(self, source, names)
        if self.tubes is not None and not regime.takes_tubes:
            takers = " / ".join(f"`clusters {kind}`" for kind, r in REGIMES.items() if r.takes_tubes)
            raise InputError(f"flux tubes are used with {takers}", self.tubes.span)
        return source

    def decide(self, question, span, what: str):
        """Ask sympy a yes/no question about an input value (for the regimes' checks)."""
        return _decide(question, span, what)

    def by_symbol(self) -> dict:
        return {p.symbol: p for p in self.parameters.values()}

    def no_mutuals(self, what: str) -> None:
        if self.mutuals:
            m = self.mutuals[0]
            raise InputError(f"{what} have no pair phases; a mutual parameter cannot be used here", m.span)

    def within_unit(self, symbol) -> bool:
        p = self.parameters.get(symbol.name)
        return bool(p and p.lower is not None and p.upper is not None and p.lower >= 0 and p.upper <= 1)

def _undecided_or(relation) -> bool:
    """bool(relation), counting "sympy cannot decide" (equal up to an unproved identity) as true."""
    try:
        return bool(relation)
    except TypeError:
        return True


def _decide(question, span, what: str):
    """Ask sympy a yes/no question about an input value; its failures become an input error."""
    try:
        return question()
    except (OverflowError, RecursionError, ValueError, TypeError):
        raise InputError(f"cannot decide whether {what}; give a simpler expression", span) from None


def _total(request: Request) -> int:
    return request.up_to if request.up_to is not None else max(sum(n) for n in request.indices)
