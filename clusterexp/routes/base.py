"""What every regime provides, in one small interface (`Regime`), and the shared pieces of the routes.

A regime is one module under `routes/` with one `Regime` subclass and one line in the registry
(`routes.REGIMES`). The stages ask the registry and never name a regime:

- `build` calls `check` (the regime's own validation of its part of the input, with spans);
- `limits` calls `estimate` (the size of what the regime will form);
- `derivation` calls `clusters` (and `virials` where the input gives virial coefficients), and
  `truncation`/`known_zero` for what is known only to some order or exactly zero;
- the printers call `quantities` (per lambda^d, rho_L, state or Z_1), `statistics` (how a species'
  statistics is stated), `text_lines` and `latex_paragraphs` (closed forms, implicit equation of state);
- the equation-of-state statements (`evaluate pressure at density A = ...`, `eos/`) call
  `equation_of_state` (the exact pressure at finite density, or a refusal pointing to the virial series).

Contributor guide, "How to add a regime" (DEVELOPERS.md), walks through a new one.
"""
from __future__ import annotations

from dataclasses import dataclass
from fractions import Fraction
from typing import Mapping

import sympy

from ..exact.series import PolynomialRing

Index = tuple[int, ...]


@dataclass
class Clusters:
    """b_n for 1 <= |n| <= order: `values` (sympy) always; `ring`/`elements` when every b_n is an
    exact ring element and every b_{e_i} = 1 (the fast path, fed straight to the virial kernel)."""

    values: Mapping[Index, sympy.Expr]
    ring: PolynomialRing | None = None
    elements: dict | None = None


def ring_native(ring, elements, weight) -> Clusters:
    """Multiply by rational weights in the ring; the values convert lazily."""
    from ..exact.virial import CoefficientTable
    scaled = {n: e * ring.rational(weight(n)) for n, e in elements.items()}
    order = max(sum(n) for n in scaled)
    return Clusters(CoefficientTable(ring, scaled, order), ring, scaled)


def sympy_values(ring, elements, factor) -> Clusters:
    return Clusters({n: ring.to_expr(e) * factor(n) for n, e in elements.items()})


def rational_weight(value) -> Fraction:
    return Fraction(int(value.p), int(value.q))


@dataclass(frozen=True)
class Quantities:
    """What a regime's numbers are numbers of. `pressure`/`density` in plain text (density with `{i}`
    for the species), `variable` the density variable of the virial series, `unit` what densities are
    measured against; the LaTeX forms take the wavelength (`w`), a species label and d."""

    pressure: str
    density: str
    variable: str
    single: str
    unit: str
    pressure_latex: str
    density_latex: str
    variable_latex: str = ""
    single_latex: str = ""

    def density_of(self, name: str) -> str:
        return self.density.format(i=name)

    def density_tex(self, label: str, wavelength: str, d: int) -> str:
        return self.density_latex.format(label=label, w="{" + wavelength + "}", d=d)


THERMAL = Quantities(
    pressure="beta P lambda^d", density="rho_{i} lambda^d", variable="(rho lambda^d)",
    single="lambda = thermal wavelength of the reference species; "
           "b_(single particle of i) = (m_i/m_ref)^(d/2), a_(single particle) = 1",
    unit="lambda^d", pressure_latex=r"\beta P{w}^d", density_latex=r"\rho_{{{label}}}{w}^{{{d}}}",
    variable_latex=r"(\rho{w}^d)", single_latex=r"single-particle $b=(m_i/m_{{\mathrm{{ref}}}})^{{d/2}}$")


class Regime:
    """One physical regime (the word after `clusters`). Subclasses override what differs."""

    kind: str = ""
    # many-body pieces the regime cannot compute are unknown functions of the statistics parameters
    # (named symbols whose Taylor coefficients get names in series), not free symbols
    named_pieces: bool = False
    # its many-body pieces can be sampled by the Brownian-loop Monte Carlo (`sample`, loops/)
    sampled_by_loops: bool = False

    # --- input ------------------------------------------------------------------------------------
    forms: tuple = (None,)    # the words allowed after `clusters <kind>` (first: the default; None: none)
    takes_given_block = False  # `clusters <kind> { b[...] = ... }` gives some of its pieces
    takes_matrix = False      # a `statistics` matrix belongs to the regime
    takes_matrix_hint = ""    # said when a matrix is given to a regime that does not take one
    takes_tubes = False       # static flux tubes enter the regime

    def check(self, builder, source, names: list[str]):
        """Validate the regime's part of the input (InputError with spans, warnings appended to
        `builder.warnings`); return the source, completed (matrix, spectrum) where the regime needs."""
        return source

    def check_given_index(self, index, span) -> None:
        """Refuse a given coefficient the regime computes itself."""

    def check_given_value(self, value, span) -> None:
        """Refuse a given value the regime cannot read (e.g. an O term that is no truncation order)."""

    def refuse_boltzmann(self, species) -> None:
        """Raise when a boltzmann (distinguishable) species has no place in the regime."""

    def check_system(self, system) -> None:
        """Checks that need the whole validated system (e.g. refusing a given value the regime knows)."""

    # --- size (limits.estimate) -------------------------------------------------------------------
    computed = True   # exact coefficients, no unknown symbols: counted as functions of the parameters

    def stated_for_estimate(self, system, order: int, detailed: bool) -> tuple[dict, int]:
        """({multi-index: value} the regime states exactly, like given values; a number of pairs
        counted as known without forming them, when not `detailed`) for the size estimate."""
        return {}, 0

    def regulator_work(self, system, order: int) -> tuple[int, int] | None:
        """(coefficient products, term products) of the harmonic regulator when the regime uses it."""
        return None

    # --- coefficients -----------------------------------------------------------------------------
    def clusters(self, plan) -> Clusters:
        """b_n for 1 <= |n| <= plan.order (a `Clusters`)."""
        raise NotImplementedError

    def virials(self, plan) -> Mapping[Index, sympy.Expr] | None:
        """a_n when the input gives virial coefficients (None: from the cluster coefficients)."""
        return None

    def truncation(self, system) -> dict:
        """{symbol: first unknown power} that every coefficient of the regime carries."""
        return {}

    def known_zero(self, system, index: Index) -> bool:
        """Whether b_n and a_n vanish exactly at this multi-index (no truncation applies to them)."""
        return False

    # --- how it is stated ---------------------------------------------------------------------------
    def quantities(self, system) -> Quantities:
        return THERMAL

    def statistics(self, system, i: int) -> tuple[str, sympy.Expr]:
        """How species i's statistics is stated: ("exchange", alpha_i) unless the regime decides it
        otherwise (exclusion: ("g", g_ii))."""
        return "exchange", system.species[i].exchange

    def matrix(self, system):
        """The statistics matrix in force, or None."""
        return None

    def text_lines(self, system) -> list[str]:
        """The regime's closed forms or implicit equation of state (text header lines)."""
        return []

    def latex_paragraphs(self, system, labels: list[str]) -> list[str]:
        """The same for the LaTeX document."""
        return []

    # --- the exact equation of state at finite density (clusterexp.eos) ----------------------------
    # what the regime is, said when it has no exact equation of state
    no_equation_of_state = "this regime"

    def equation_of_state(self, system, span=None):
        """The exact equation of state (`eos.base.EquationOfState`) of the system, or an InputError at
        `span` (default: the `clusters` line) that says why there is none and points to the virial
        series."""
        from ..errors import InputError
        raise InputError(f"no exact equation of state for {self.no_equation_of_state}; use the virial series "
                         "instead (derive virial up to N, then evaluate, tabulate or plot its coefficients a[..])",
                         span or system.source.span)
