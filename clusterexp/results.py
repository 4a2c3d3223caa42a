"""What a derivation returns: coefficients with their kind, multi-index and lazily computed value."""
from __future__ import annotations

from dataclasses import dataclass, field
from typing import Callable, Iterator

import sympy

from .model import System
from .naming import bracket_label

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
            from .terms import TermSum
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

    @property
    def label(self) -> str:
        letter = {"cluster": "b", "virial": "a", "density": "rho", "fugacity": "z"}[self.kind]
        if self.component is not None:
            return f"{letter}_{self.component}{bracket_label(self.index)}"
        return f"{letter}{bracket_label(self.index)}"

    @property
    def order(self) -> int:
        return sum(self.index)


@dataclass
class Derivation:
    """All coefficients derived from one input, in a deterministic order."""

    system: System
    coefficients: list[Coefficient]
    compute_sampled: Callable[[], object] | None = field(default=None, repr=False, compare=False)

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

    def _repr_latex_(self) -> str:
        from .export.latex import latex_snippet
        return "$$" + latex_snippet(self, environment="aligned") + "$$"
