"""What a derivation returns: coefficients with their kind, multi-index and lazily computed value."""
from __future__ import annotations

from dataclasses import dataclass, field
from typing import Callable, Iterator

import sympy

from .model import System
from .naming import bracket_label, coefficient_label

KINDS = ("cluster", "virial", "density", "fugacity")
Index = tuple[int, ...]


@dataclass(frozen=True)
class Coefficient:
    """One derived coefficient.

    kind "cluster": b_n; "virial": a_n; "density": coefficient of z^n in rho_c lambda^d;
    "fugacity": coefficient of (rho lambda^d)^n in z_c. `component` names c for the last two.
    """

    kind: str
    index: Index
    species: tuple[str, ...]
    compute: Callable[[], sympy.Expr] = field(repr=False, compare=False)
    component: str | None = None
    compute_terms: Callable[[], object] | None = field(default=None, repr=False, compare=False)

    @property
    def value(self) -> sympy.Expr:
        cache = self.__dict__.setdefault("_value_cache", [])
        if not cache:
            cache.append(self.compute())
        return cache[0]

    @property
    def terms(self):
        """The value as a `TermSum` when it is a sum of power products of symbols (printers use it
        to avoid building large sympy expressions), else None."""
        cache = self.__dict__.setdefault("_terms_cache", [])
        if not cache:
            from .exact.terms import TermSum
            found = self.compute_terms() if self.compute_terms is not None else None
            if found is None and self.compute_terms is None:
                found = TermSum.from_expr(self.value)
            cache.append(found)
        return cache[0]

    @property
    def text(self) -> str:
        """The value as sympy-parsable text."""
        terms = self.terms
        return terms.text() if terms is not None else sympy.sstr(self.value, order="lex")

    def latex(self, symbol_names=None) -> str:
        terms = self.terms
        if terms is not None:
            return terms.latex(symbol_names)
        return sympy.latex(self.value, symbol_names=symbol_names or {}, order="lex")

    def latex_terms(self, symbol_names=None) -> list[str] | None:
        """The printed terms with their signs when the value is a `TermSum`, else None."""
        terms = self.terms
        return terms.latex_terms(symbol_names) if terms is not None else None

    @property
    def label(self) -> str:
        return coefficient_label(self.kind, self.index, self.component)

    @property
    def order(self) -> int:
        return sum(self.index)


@dataclass
class Derivation:
    """All coefficients derived from one input, in a deterministic order, and what the input asks
    of them: checks of the user's claims, numbers at points, tables and figures (computed on first
    use; files are written only by `write_files`)."""

    system: System
    coefficients: list[Coefficient]
    make: Callable[..., Coefficient] | None = field(default=None, repr=False, compare=False)
    _series: dict = field(default_factory=dict, repr=False, compare=False)

    def series_of(self, c: Coefficient) -> list:
        """The `expand` series of coefficient c (a list of `SeriesPiece`, one per request and side),
        computed once and shared by every printer."""
        key = (c.kind, c.index, c.component)
        if key not in self._series:
            from .expansions import expansion_of
            # a coefficient free of the variable is its own series: no line for it
            from .pieces import depends_through_pieces
            self._series[key] = [piece for e in self.system.expansions
                                 if any(c.value.has(v) or depends_through_pieces(self.system, c.value, v)
                                        for v, _ in e.variables)
                                 for piece in expansion_of(c.label, c.value, e, self.system, c.index)]
        return self._series[key]

    compute_sampled: Callable[[], object] | None = field(default=None, repr=False, compare=False)
    truncated: bool = field(default=False, repr=False, compare=False)  # values truncated by given series

    @property
    def sampled(self):
        """The Monte Carlo numbers of the input's `sample` statements (`loops.sampled.SampledNumbers`),
        run on first use; None when there are none."""
        if self.compute_sampled is None:
            return None
        cache = self.__dict__.setdefault("_sampled_cache", [])
        if not cache:
            cache.append(self.compute_sampled())
        return cache[0]

    def __iter__(self) -> Iterator[Coefficient]:
        return iter(self.coefficients)

    def __len__(self) -> int:
        return len(self.coefficients)

    def of_kind(self, kind: str) -> list[Coefficient]:
        return [c for c in self.coefficients if c.kind == kind]

    def value(self, kind: str, index: Index, component: str | None = None) -> sympy.Expr:
        """The value of one coefficient, e.g. `d.value("virial", (1, 1))`."""
        index = tuple(index)
        for c in self.coefficients:
            if c.kind == kind and c.index == index and c.component == component:
                return c.value
        raise KeyError(f"no {kind} coefficient {bracket_label(index)}"
                       + (f" of {component}" if component else "") + " in this derivation")

    def coefficient(self, kind: str, index: Index, component: str | None = None) -> Coefficient:
        """One coefficient, derived on demand when the input did not request it (for claims, numbers
        and figures). The multi-index must lie within the derivation's order."""
        index = tuple(index)
        for c in self.coefficients:
            if c.kind == kind and c.index == index and c.component == component:
                return c
        extra = self.__dict__.setdefault("_extra", {})
        key = (kind, index, component)
        if key not in extra:
            if self.make is None:
                raise KeyError(f"no {kind} coefficient {bracket_label(index)} in this derivation")
            extra[key] = self.make(kind, index, component)
        return extra[key]

    def shaped(self, c: Coefficient):
        """Coefficient c as the input's `values` statement writes it (`forms.Shaped`); the values of
        one derivation are rearranged together, each within its time bound."""
        from .forms import Shaped, shape_all
        if self.system.presentation.form == "expanded":
            return Shaped(None, "expanded")
        cache = self.__dict__.setdefault("_shaped", {})
        key = (c.kind, c.index, c.component)
        if key not in cache:
            todo = [d for d in self.coefficients if (d.kind, d.index, d.component) not in cache]
            cache.update(shape_all(self.system, todo if c in todo else [c]))
        return cache[key]

    @property
    def checks(self):
        """The outcome of every `claim`, in input order (`checks.CheckResult`)."""
        from .products.run import run_checks
        return self._cached("_checks", run_checks)

    @property
    def evaluations(self):
        """Every `evaluate` statement with its numbers: [(Evaluation, [(label, text)])]."""
        from .products.run import run_evaluations
        return self._cached("_evaluations", run_evaluations)

    @property
    def tables(self):
        """Every `tabulate` statement with its rows (header first): [(Table, rows)]."""
        from .products.run import run_tables
        return self._cached("_tables", run_tables)

    @property
    def states(self):
        """Every equation-of-state statement with its numbers (`products.states.StateResult`)."""
        from .products.states import run_states
        return self._cached("_states", run_states)

    def unknowns(self) -> list:
        """The named Taylor coefficients of many-body pieces (`pieces.Unknown`) that the printed
        values, series and checks use, sorted by name."""
        from .pieces import unknowns_in
        values = [p.polynomial for c in self.coefficients for p in self.series_of(c)]
        if self.truncated:
            values += [c.value for c in self.coefficients]
        if "_checks" in self.__dict__:  # (the checks' own LaTeX names are made while they run)
            values += [e for r in self.checks for e in (r.difference, r.condition) if e is not None]
        return unknowns_in(values)

    @property
    def failed_checks(self) -> list:
        return [c for c in self.checks if not c.ok]

    def write_files(self, directory=".", overwrite: bool = False) -> list:
        """Write the tables (CSV) and figures the input asks for, relative to `directory` (created when
        missing); an existing file is replaced only with `overwrite`, and nothing is written unless
        every file could be made. Returns the paths written."""
        from .products.run import write_files
        written = write_files(self, directory, overwrite)
        self.__dict__["_written"] = True
        return written

    def stage_files(self, batch, directory=".", overwrite: bool = False) -> None:
        """Render the tables and figures into `batch` (a `files.Batch`) and count them as written: the
        caller commits the batch, or fails the run, before any output that says so is shown."""
        from .products.run import stage_files
        stage_files(self, batch, directory, overwrite)
        self.__dict__["_written"] = True

    @property
    def files_written(self) -> bool:
        """Whether `write_files` has written the input's tables and figures."""
        return self.__dict__.get("_written", False)

    def compute_all(self, progress=None) -> None:
        """Compute every value now (printers then only read), reporting each coefficient to
        `progress` (a `progress.Progress`) when given."""
        top = max((c.order for c in self.coefficients), default=0)
        for c in self.coefficients:
            if progress is not None:
                progress.step(f"{c.kind} {c.label}", order=c.order, total=top)
            c.terms  # noqa: B018 -- the exact value, as printers read it
        for claim in self.system.claims:
            if progress is not None:
                progress.step(f"check {claim.target.label}")
            self.coefficient(claim.target.kind, claim.target.index, claim.target.component).value  # noqa: B018
        self.checks, self.evaluations, self.tables  # noqa: B018
        self.states  # noqa: B018
        if self.system.presentation.form != "expanded":   # the written forms, each within its bound
            from .forms import shape_all
            self.__dict__.setdefault("_shaped", {}).update(shape_all(self.system, self.coefficients, progress))
        if progress is not None:
            progress.done()

    def _cached(self, key: str, compute):
        if key not in self.__dict__:
            self.__dict__[key] = compute(self)
        return self.__dict__[key]

    def _repr_latex_(self) -> str:
        from .export.latex import latex_snippet
        return "$$" + latex_snippet(self, environment="aligned") + "$$"
