"""What every exact equation of state shares: quantities, units, exact inputs, precision, boundaries.

Numbers are computed in a private `mpmath.MPContext` per call (`working_context`), never through the
global `mpmath.mp`, so no precision leaks between calls, tests or threads. Inputs (densities and
parameter values) are taken exactly (`numbers.exact_number`: "1/3", "0.25", Fractions) and only the
final transcendental steps are done in floating point with guard digits.
"""
from __future__ import annotations

from dataclasses import dataclass, field
from fractions import Fraction
from typing import Mapping, Sequence

import sympy

from ..errors import InputError, Span
from ..model import System
from ..products.numbers import exact_number
from .precision import GUARD_DIGITS, substitute, to_mpf, working_context  # noqa: F401 (the eos API)

QUANTITIES = ("pressure", "fugacity", "chemical_potential", "compressibility")
QUANTITY_TEXT = {
    "pressure": "pressure",
    "fugacity": "fugacities z_i",
    "chemical_potential": "chemical potentials beta mu_i = ln z_i",
    "compressibility": "reduced isothermal compressibility rho k_B T kappa_T = [d(beta P)/d rho]^(-1) "
                       "at fixed composition",
}
def fraction_of(value: sympy.Expr) -> Fraction | None:
    return Fraction(int(value.p), int(value.q)) if value.is_Rational else None


@dataclass(frozen=True)
class Boundary:
    """Where the equation of state ends (or changes phase) as a function of the densities.

    kind: "close packing" (the pressure diverges: one level, lowest Landau level), "condensation"
    (ideal Bose gas in d = 3: the normal phase ends, the pressure stays finite), or "none".
    `relations`: sympy inequalities in the density symbols that hold strictly inside the region
    reached from zero density (empty when there is no boundary); `text`: the same in words.
    """

    kind: str
    text: str
    relations: tuple = ()
    latex: tuple[str, ...] = ()


@dataclass(frozen=True)
class RayBoundary:
    """The boundary along the ray densities = t * composition (composition summing to 1): total
    density `at` (exact when known, None when the ray never meets it) and the species whose
    constraint is met first."""

    at: sympy.Expr | None
    species: tuple[str, ...] = ()
    kind: str = "none"


@dataclass
class Point:
    """Exact densities at one point, in species order, plus exact parameter values."""

    densities: tuple[sympy.Expr, ...]
    parameters: dict = field(default_factory=dict)

    @property
    def total(self) -> sympy.Expr:
        return sympy.Add(*self.densities)


class EquationOfState:
    """Base of the regimes: subclasses set the attributes in `__init__` and implement `_values`,
    `boundary`, `ray_boundary` and `exact_radius`.

    Attributes every regime sets: `regime` (a short phrase), `names` (species in index order),
    `density_symbols` (sympy symbols standing for the densities in the regime's units),
    `density_unit` ("rho_i lambda^d", "nu_i = rho_i / rho_L", "n_i (particles per state)"),
    `pressure_unit` ("beta P lambda^d", ...), `pressure_formula` (sympy, or None when only a
    parametric form exists), `fugacity_formulas` (per species or None), `parametric` (lines of the
    parametric form in the fugacities, or ()).
    """

    regime: str = ""
    quantities: tuple[str, ...] = QUANTITIES
    # the word the input language uses for a density of this regime (`density A = 1/5`,
    # `filling A = 1/5` where densities count particles per state: one level, the LLL)
    density_word: str = "density"
    plot_samples: int = 161   # points of a figure's exact curve (fewer where each point is an integral)
    seconds_per_point: float = 0.001   # a generous estimate of one evaluation, for refusing huge tables up front

    def __init__(self, system: System):
        self.system = system
        self.names = system.species_names
        self.parameter_symbols = {p.name: p for p in system.parameters}
        self.pressure_formula: sympy.Expr | None = None
        self.fugacity_formulas: tuple[sympy.Expr, ...] | None = None
        self.compressibility_formula: sympy.Expr | None = None
        self.parametric: tuple[str, ...] = ()

    # -- inputs ---------------------------------------------------------------------------------------
    def point(self, densities, parameters: Mapping | None = None, span: Span | None = None) -> Point:
        """Exact densities (a mapping species -> value, or a sequence in species order) and parameter
        values, checked: nonnegative, every species and every free parameter given once, inside the
        region reached from zero density (`check_point`)."""
        values = self._densities(densities, span)
        point = Point(values, self._parameters(parameters or {}, span))
        self._check(point, span)
        return point

    def _densities(self, densities, span) -> tuple[sympy.Expr, ...]:
        K = len(self.names)
        if isinstance(densities, Mapping):
            unknown = [str(k) for k in densities if str(k) not in self.names]
            if unknown:
                raise InputError(f"unknown species {', '.join(unknown)} (species: {', '.join(self.names)})", span)
            missing = [n for n in self.names if n not in {str(k) for k in densities}]
            if missing:
                raise InputError(f"no density for {', '.join(missing)}: give the density of every species "
                                 f"({self.density_unit}), 0 for an absent one", span)
            raw = [densities[n] for n in self.names]
        else:
            raw = list(densities)
            if len(raw) != K:
                raise InputError(f"{len(raw)} densities given for {K} species ({', '.join(self.names)})", span)
        out = []
        for name, value in zip(self.names, raw):
            try:
                number = exact_number(value, f"density of {name}")
            except InputError as error:
                raise InputError(error.message, span) from None
            if number.is_negative:
                raise InputError(f"the density of {name} is negative ({number}); densities are >= 0", span)
            out.append(number)
        return tuple(out)

    def _parameters(self, parameters: Mapping, span) -> dict:
        needed = self.free_parameters()
        given = {}
        for key, value in parameters.items():
            name = getattr(key, "name", str(key))
            if name not in needed:
                raise InputError(f"the equation of state does not depend on {name}; it depends on "
                                 f"{', '.join(sorted(needed)) or 'no parameters'}", span)
            try:
                number = exact_number(value, name)
            except InputError as error:
                raise InputError(error.message, span) from None
            declared = self.parameter_symbols.get(name)
            if declared is not None:
                low, high = declared.lower, declared.upper
                if (low is not None and (number < low or (declared.lower_open and number == low))) or \
                        (high is not None and (number > high or (declared.upper_open and number == high))):
                    raise InputError(f"{name} = {number} is outside its declared range", span)
            given[needed[name]] = number
        missing = sorted(set(needed) - {s.name for s in given})
        if missing:
            raise InputError(f"no value for {', '.join(missing)}: the equation of state depends on it", span)
        return given

    def free_parameters(self) -> dict[str, sympy.Symbol]:
        """{name: symbol} of the declared parameters the equation of state depends on."""
        return {}

    # -- results ---------------------------------------------------------------------------------------
    def evaluate(self, quantity: str, densities, digits: int = 15, parameters: Mapping | None = None,
                 span: Span | None = None) -> dict[str, object]:
        """{label: mpmath number} of `quantity` at the densities (per species), `digits` significant
        digits (the numbers carry guard digits; format them with `numbers.format_number`)."""
        self._known_quantity(quantity, span)
        ctx = working_context(digits)
        point = self.point(densities, parameters, span)
        return self._values(ctx, quantity, point, digits, span)

    def table(self, quantity: str, points: Sequence, digits: int = 15, parameters: Mapping | None = None,
              span: Span | None = None) -> list[dict[str, object]]:
        """`evaluate` at many density points with one working context."""
        self._known_quantity(quantity, span)
        ctx = working_context(digits)
        return [self._values(ctx, quantity, self.point(p, parameters, span), digits, span) for p in points]

    def _known_quantity(self, quantity: str, span) -> None:
        if quantity not in self.quantities:
            defined = ", ".join(self.quantities)
            raise InputError(f"the {self.regime} does not define {quantity!r}; it defines {defined}", span)

    def labels(self, quantity: str) -> list[str]:
        if quantity == "pressure":
            return [self.pressure_unit]
        if quantity == "compressibility":
            return ["rho k_B T kappa_T"]
        prefix = "z_" if quantity == "fugacity" else "beta mu_"
        return [prefix + n for n in self.names]

    def check_point(self, densities, span: Span | None = None, parameters: Mapping | None = None) -> Point:
        """The checked exact point; InputError (at `span`) for negative densities, a density beyond the
        boundary (the message says where the boundary is along this composition) or missing values."""
        return self.point(densities, parameters, span)

    def _check(self, point: Point, span: Span | None) -> None:  # regimes with a boundary override this
        """Refuse a point beyond the boundary."""

    def _values(self, ctx, quantity: str, point: Point, digits: int, span) -> dict:
        raise NotImplementedError

    # -- where it ends -------------------------------------------------------------------------------
    @staticmethod
    def composition(direction: Sequence) -> tuple[sympy.Expr, ...]:
        """Exact density ratios normalized to sum 1 (nonnegative, not all zero)."""
        x = [exact_number(v, "density ratio") for v in direction]
        if any(v < 0 for v in x) or sum(x) == 0:
            raise InputError("density ratios must be >= 0 and not all zero")
        total = sympy.Add(*x)
        return tuple(v / total for v in x)

    def ray_boundary(self, direction: Sequence, parameters: Mapping | None = None) -> RayBoundary:
        return RayBoundary(None)

    def exact_radius(self, direction: Sequence, parameters: Mapping | None = None) -> sympy.Expr | None:
        """The exact radius of convergence of the virial series along the ray, where known."""
        return None

    def series_radius(self, virials: Mapping, direction: Sequence | None = None,
                      parameters: Mapping | None = None, digits: int = 15):
        """Ratio and root estimates of the radius of convergence of the virial series (the tool's
        own coefficients {multi-index: a_n}) along the ray `direction` of density ratios (default:
        equal densities), compared with the exact radius and the boundary where known."""
        from .radius import estimate_radius
        direction = tuple(direction) if direction is not None else (1,) * len(self.names)
        values = self._parameters(parameters or {}, None)
        return estimate_radius(self, virials, self.composition(direction), values, digits)

    # -- printed forms -------------------------------------------------------------------------------
    def formula_lines(self) -> list[str]:
        """The equation of state in plain text (formula where one exists, else the parametric form)."""
        lines = [f"equation of state ({self.regime}); densities {self.density_unit}"]
        if self.pressure_formula is not None:
            lines.append(f"{self.pressure_unit} = {sympy.sstr(self.pressure_formula)}")
        if self.fugacity_formulas is not None:
            lines += [f"z_{n} = {sympy.sstr(f)}" for n, f in zip(self.names, self.fugacity_formulas)]
        if self.compressibility_formula is not None:
            lines.append(f"rho k_B T kappa_T = {sympy.sstr(self.compressibility_formula)}")
        lines += list(self.parametric)
        lines.append("ends: " + self.boundary.text)
        return lines

    def latex_lines(self) -> list[str]:
        """The same as LaTeX equations (one per line, without math delimiters)."""
        lines = []
        if self.pressure_formula is not None:
            lines.append(self.pressure_latex + " = " + sympy.latex(self.pressure_formula))
        if self.fugacity_formulas is not None:
            lines += [f"z_{{{n}}} = " + sympy.latex(f) for n, f in zip(self.names, self.fugacity_formulas)]
        if self.compressibility_formula is not None:
            lines.append(r"\rho k_B T \kappa_T = " + sympy.latex(self.compressibility_formula))
        lines += list(self.boundary.latex)
        return lines

    def as_json(self) -> dict:
        return {"regime": self.regime, "densities": self.density_unit, "pressure_unit": self.pressure_unit,
                "pressure": sympy.sstr(self.pressure_formula) if self.pressure_formula is not None else None,
                "fugacities": {n: sympy.sstr(f) for n, f in zip(self.names, self.fugacity_formulas)}
                if self.fugacity_formulas is not None else None,
                "compressibility": sympy.sstr(self.compressibility_formula)
                if self.compressibility_formula is not None else None,
                "parametric": list(self.parametric),
                "boundary": {"kind": self.boundary.kind, "text": self.boundary.text,
                             "relations": [sympy.sstr(r) for r in self.boundary.relations]}}

    @property
    def boundary(self) -> Boundary:
        return Boundary("none", "nowhere: every density is reached")


def free_parameters_of(system: System, expressions) -> dict[str, sympy.Symbol]:
    symbols = set()
    for e in expressions:
        symbols |= sympy.sympify(e).free_symbols
    return {s.name: s for s in symbols}

