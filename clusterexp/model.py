"""The validated description of a gas: frozen dataclasses that carry the source span of every piece.

Conventions (see README): exchange parameter alpha with alpha = 0 bosons and alpha = 1 fermions; mutual
(braiding) parameter alpha_ij between distinct species with period 1; masses are relative to the
reference species, whose thermal wavelength lambda is the unit of length.

A `System` is produced only by `clusterexp.language.build.build_system`, which validates once; everything
downstream may trust it.
"""
from __future__ import annotations

from dataclasses import dataclass, field

import sympy

from .errors import Span

QUANTITIES = ("cluster", "virial", "density", "fugacity")
FORMATS = ("text", "latex", "json")

Index = tuple[int, ...]


@dataclass(frozen=True)
class Parameter:
    """A symbolic parameter the user declared, e.g. `parameter nu in [0, 1]`.

    `lower`/`upper` bound the range (None: unbounded); `assumptions` are sympy assumption names
    ("real", "positive", "nonnegative", "integer") already applied to `symbol`.
    """

    name: str
    symbol: sympy.Symbol
    span: Span
    lower: sympy.Expr | None = None
    upper: sympy.Expr | None = None
    lower_open: bool = False
    upper_open: bool = False
    assumptions: tuple[str, ...] = ()


@dataclass(frozen=True)
class Species:
    """One particle species. `exchange` is alpha (0 bosons, 1 fermions); `mass` relative or absolute,
    only ratios to the reference mass matter."""

    name: str
    mass: sympy.Expr
    exchange: sympy.Expr
    span: Span
    statistics: str | None = None  # "bose" / "fermi" / "boltzmann" when given by word, else None


@dataclass(frozen=True)
class Mutual:
    """Mutual (braiding) parameter alpha_ij between two distinct species (period 1)."""

    first: str
    second: str
    value: sympy.Expr
    span: Span


@dataclass(frozen=True)
class GivenValue:
    """A coefficient the user states: kind "cluster" (b) or "virial" (a), a multi-index in species
    declaration order, and its value."""

    kind: str
    index: Index
    value: sympy.Expr
    span: Span


@dataclass(frozen=True)
class Source:
    """Where the cluster coefficients come from.

    kind "generic": every b_n with |n| >= 2 is its own symbol;
    kind "given": the user states some b_n (kind "cluster") or some a_n (kind "virial"), the rest are
    symbols;
    kind "ideal": ideal Bose/Fermi/Boltzmann species (route R1);
    kind "exclusion": exclusion statistics with `matrix` g (Haldane's g_ij = -dd_i/dN_j), `form`
    "continuum" (the declared dimension) or "level" (one single-particle level);
    kind "landau": lowest-Landau-level anyons, `form` "exclusion" (default route) or "spectrum";
    kind "spectrum": a declared trapped spectrum (`spectrum`, route R2).
    """

    kind: str
    span: Span
    values: tuple[GivenValue, ...] = ()
    form: str | None = None
    matrix: tuple[tuple[sympy.Expr, ...], ...] | None = None
    spectrum: "Spectrum | None" = None


@dataclass(frozen=True)
class Spectrum:
    """A declared trapped spectrum in units of hbar omega, x = exp(-beta hbar omega).

    `levels[i]`: one-body level generating function of species i in the symbol x; `fill[i]`: "bose"
    or "fermi" occupation of those levels; `shift`: energy shift as an expression in `counts` (one
    symbol per species standing for its particle number); `trapped`: explicit Z_n(x) for chosen n;
    `area`: "mass" (weight (M_n/m_ref)^(d/2)), "count" (weight |n|, lowest Landau level) or "one"
    (weight 1: the trapped gas itself, in units of its one-body partition function).
    """

    levels: tuple[sympy.Expr, ...]
    fill: tuple[str, ...]
    shift: sympy.Expr
    counts: tuple[sympy.Symbol, ...]
    trapped: tuple[tuple[Index, sympy.Expr], ...] = ()
    area: str = "mass"
    span: Span | None = None


@dataclass(frozen=True)
class Tubes:
    """Static flux tubes (an infinite-mass species entering through its density): flux gamma in flux
    quanta, coverage = tubes per lambda^2 of the reference species."""

    flux: sympy.Expr
    coverage: sympy.Expr  # always a symbol: the results are series in it, first order known
    span: Span
    value: sympy.Expr | None = None  # the declared coverage when it is not a bare symbol (`rho_tubes` stands for it)
    order: int | None = None  # `to order k`: results through coverage^k (None: the regime's default)

    @property
    def declared(self) -> sympy.Expr:
        """The coverage as the input declared it."""
        return self.coverage if self.value is None else self.value


@dataclass(frozen=True)
class Expansion:
    """`expand p about x0 to k [from above|below]`: print coefficients as series in p. With `others`
    ((symbol, point), ...) from `expand p, q about x0, y0 to k`: one joint series in all of them through
    total degree k."""

    symbol: sympy.Symbol
    point: sympy.Expr
    order: int
    side: str | None
    span: Span
    others: tuple = ()

    @property
    def variables(self) -> tuple:
        return ((self.symbol, self.point),) + tuple(self.others)


@dataclass(frozen=True)
class Sampling:
    """`sample a[3] at alpha = 1/2 ...`: Brownian-loop Monte Carlo numbers for third-order coefficients
    of the pair-phase regime (clusterexp.loops).

    `coefficients`: (kind "cluster"/"virial", multi-index, span) as listed; `fixed`: (parameter symbol,
    exact value) of `at`; `axes`: (symbol, exact values) of `over` (a Cartesian grid, first axis
    slowest); `seed`; budget `time_cap` (seconds), `target` (error bar of every listed coefficient),
    `loops` (total loop samples); `table` / `map` file names; `spans` of the clauses (for messages);
    `slices`: time slices per loop (`in N slices`).
    """

    coefficients: tuple[tuple[str, Index, Span], ...]
    span: Span
    fixed: tuple[tuple[sympy.Symbol, sympy.Expr], ...] = ()
    axes: tuple[tuple[sympy.Symbol, tuple[sympy.Expr, ...]], ...] = ()
    seed: int = 0
    time_cap: float | None = None
    target: float | None = None
    loops: int | None = None
    table: str | None = None
    map: str | None = None
    spans: tuple[tuple[str, Span], ...] = ()
    slices: int = 16

    def clause_span(self, clause: str) -> Span:
        return dict(self.spans).get(clause, self.span)


@dataclass(frozen=True)
class Request:
    """What to derive: a quantity ("cluster", "virial", "density", "fugacity"), either every
    multi-index up to total order `up_to`, or the explicit `indices`."""

    quantity: str
    span: Span
    up_to: int | None = None
    indices: tuple[Index, ...] = ()


@dataclass(frozen=True)
class OutputSettings:
    format: str = "text"
    align: bool = True
    span: Span | None = None


@dataclass(frozen=True)
class CoefficientName:
    """A coefficient named in a claim, evaluation, table or figure: `b[2,1]`, `a[3]`, `rho_A[1,1]`
    (kind "density", component "A") or `z_A[2,0]` (kind "fugacity")."""

    kind: str
    index: Index
    span: Span
    component: str | None = None

    @property
    def label(self) -> str:
        from .naming import coefficient_label
        return coefficient_label(self.kind, self.index, self.component)


@dataclass(frozen=True)
class Claim:
    """`claim a[3] = ...`: the user's own result for a derived coefficient. `limits` holds
    {symbol: first power not claimed} when the claim ends in O(...): it is compared below those.
    `decimals`: the decimal numbers as written in the claim (read as exact fractions in `value`);
    `rounded`: the text of the claim when it is one decimal number, compared at its written digits."""

    target: CoefficientName
    value: sympy.Expr
    span: Span
    limits: tuple[tuple[sympy.Symbol, int], ...] = ()
    decimals: tuple[str, ...] = ()
    rounded: str | None = None
    errors: float | None = None   # `within k errors`: the tolerance against sampled numbers


@dataclass(frozen=True)
class Evaluation:
    """`evaluate a[2], ... at alpha = 1/2 digits 20`: numbers at one point."""

    targets: tuple[CoefficientName, ...]
    point: tuple[tuple[sympy.Symbol, sympy.Expr], ...]
    digits: int
    span: Span


@dataclass(frozen=True)
class Table:
    """`tabulate ... over alpha from 0 to 2 step 1/4, nu in [..] at g = 1 into "t.csv"`: a CSV grid.
    `axes` holds each grid parameter with its exact values; `fixed` the parameters kept at one value."""

    targets: tuple[CoefficientName, ...]
    axes: tuple[tuple[sympy.Symbol, tuple[sympy.Expr, ...]], ...]
    fixed: tuple[tuple[sympy.Symbol, sympy.Expr], ...]
    digits: int
    path: str
    span: Span


@dataclass(frozen=True)
class Figure:
    """`plot ... over alpha [from x to y][, nu [...]] [at ...] into "f.png"`: one axis draws curves,
    two a heat map. An axis range of None means one period (exchange [0, 2], mutual [0, 1]) or the
    declared range."""

    targets: tuple[CoefficientName, ...]
    axes: tuple[tuple[sympy.Symbol, tuple[sympy.Expr, sympy.Expr] | None], ...]
    fixed: tuple[tuple[sympy.Symbol, sympy.Expr], ...]
    path: str
    span: Span


@dataclass(frozen=True)
class Typesetting:
    """LaTeX names the user chose: `symbols` maps parameter or species names to LaTeX, `wavelength`
    replaces the thermal-wavelength symbol lambda."""

    symbols: tuple[tuple[str, str], ...] = ()
    wavelength: str = r"\lambda"

    def symbol(self, name: str) -> str | None:
        return dict(self.symbols).get(name)


@dataclass(frozen=True)
class Presentation:
    """How results are written (`language/manuscript.py`): `form` of the values (`forms.FORMS`) with
    `collect_in` (parameter names, or ("pieces",) for the generated symbols), the LaTeX document's
    `title`, the coefficients of a `snippet` (each its own labelled equation), and the figures'
    `figure_options` ("latex_engine", "footer")."""

    form: str = "expanded"
    collect_in: tuple[str, ...] = ()
    title: str | None = None
    snippet: tuple[CoefficientName, ...] = ()
    figure_options: tuple[str, ...] = ()


@dataclass(frozen=True)
class System:
    """A validated gas: what the derivation stage consumes."""

    dimension: int
    species: tuple[Species, ...]
    source: Source
    requests: tuple[Request, ...]
    order: int
    reference: str
    parameters: tuple[Parameter, ...] = ()
    mutuals: tuple[Mutual, ...] = ()
    output: OutputSettings = field(default_factory=OutputSettings)
    files: tuple[str, ...] = ()
    warnings: tuple[tuple[str, Span | None], ...] = ()
    size_limit: int | None = None  # from `size limit N`; None: limits.DEFAULT_SIZE_LIMIT
    tubes: "Tubes | None" = None
    expansions: tuple["Expansion", ...] = ()
    claims: tuple[Claim, ...] = ()
    evaluations: tuple[Evaluation, ...] = ()
    tables: tuple[Table, ...] = ()
    figures: tuple[Figure, ...] = ()
    typesetting: Typesetting = field(default_factory=Typesetting)
    samplings: tuple["Sampling", ...] = ()
    states: tuple = ()  # equation-of-state statements (eos.requests.StateRequest)
    presentation: Presentation = field(default_factory=Presentation)

    @property
    def species_names(self) -> tuple[str, ...]:
        return tuple(s.name for s in self.species)

    def species_index(self, name: str) -> int:
        return self.species_names.index(name)

    @property
    def reference_mass(self) -> sympy.Expr:
        return self.species[self.species_index(self.reference)].mass

    def mutual(self, first: str, second: str) -> sympy.Expr:
        """alpha_ij for two distinct species; 0 (no statistical coupling) when undeclared."""
        for m in self.mutuals:
            if {m.first, m.second} == {first, second}:
                return m.value
        return sympy.Integer(0)
