"""What the equation-of-state statements ask for (`evaluate pressure at density A = 1/5`, `tabulate`,
`plot`, `equation of state`): validated model objects with the spans of the user's words, built by
`language/state_statements.py` and run by `products/states.py`.

Densities are keyed by species name and measured in the regime's units (rho_i lambda^d, or the
filling nu_i = rho_i / rho_L / particles per state where `density_word` is "filling").
"""
from __future__ import annotations

from dataclasses import dataclass

import sympy

from ..errors import Span

QUANTITY_WORDS = {"pressure": "pressure", "compressibility": "compressibility", "fugacity": "fugacity",
                  "chemical potential": "chemical_potential"}
PER_SPECIES = ("fugacity", "chemical_potential")


@dataclass(frozen=True)
class StateQuantity:
    """One quantity of the equation of state: `quantity` in eos.QUANTITIES; `species` for a fugacity or
    chemical potential of one species (None: every species)."""

    quantity: str
    species: str | None
    span: Span

    @property
    def text(self) -> str:
        word = self.quantity.replace("_", " ")
        return word + (f" {self.species}" if self.species else "")


@dataclass(frozen=True)
class DensityValue:
    """`density A = 1/5` (or `filling A = 1/5`): the word written, the species and the exact value."""

    word: str
    species: str
    value: sympy.Expr
    span: Span


@dataclass(frozen=True)
class DensityAxis:
    """A density axis of a table (`values`) or a figure (`interval`, None: the default range)."""

    word: str
    species: str
    span: Span
    values: tuple[sympy.Expr, ...] = ()
    interval: tuple[sympy.Expr, sympy.Expr] | None = None


@dataclass(frozen=True)
class StateRequest:
    """One equation-of-state statement. `kind`: "evaluate", "tabulate", "plot" or "formula"
    (`equation of state`); `densities` the fixed densities (for "formula": the composition of the
    ray along which the virial series' radius is estimated); `parameters` ((symbol, value), ...)."""

    kind: str
    span: Span
    quantities: tuple[StateQuantity, ...] = ()
    densities: tuple[DensityValue, ...] = ()
    parameters: tuple[tuple[sympy.Symbol, sympy.Expr], ...] = ()
    axes: tuple[DensityAxis, ...] = ()
    digits: int = 15
    path: str | None = None
    series: tuple[int, ...] = ()
    series_span: Span | None = None

    @property
    def order(self) -> int:
        """The highest virial order the statement needs derived (0: none beyond the input's)."""
        return max(self.series, default=0)

    def fixed(self) -> dict[str, sympy.Expr]:
        return {d.species: d.value for d in self.densities}

    def parameter_values(self) -> dict:
        return dict(self.parameters)
