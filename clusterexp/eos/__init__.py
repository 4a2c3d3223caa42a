"""The exact equation of state at finite density, for the regimes where it is known.

Regimes (from a validated `model.System`):

- `clusters ideal`: polylogarithms, d = 1, 2, 3, mixtures with masses (`ideal.py`); densities
  rho_i lambda^d, pressure beta P lambda^d; a closed formula in d = 2, the parametric form otherwise.
- `clusters exclusion level` and `clusters landau`: the closed form for any K x K statistics matrix
  (`level.py`, derived in docs/equation_of_state.md); densities n_i per single-particle state or
  nu_i = rho_i / rho_L, pressure beta P / (states) or beta P / rho_L; close packing where the pressure
  diverges.
- `clusters exclusion` (continuum, d = 1, 2, 3): the integral over momentum cells, each cell solving
  Wu's equations, evaluated numerically (`continuum.py`); densities inverted for the fugacities.

Other regimes (pair phases, generic, given, declared spectra) have no exact equation of state here:
`equation_of_state` refuses them with an InputError that points to the virial series.

API (what the `evaluate` / `tabulate` / `plot` statements are to call):

    eos = equation_of_state(system)          # -> EquationOfState (raises InputError: no exact EOS)
    eos.quantities                           # ("pressure", "fugacity", "chemical_potential",
                                             #  "compressibility")
    eos.density_symbols, eos.density_unit    # sympy symbols of the densities, their units in words
    eos.pressure_unit                        # "beta P lambda^2", "beta P / rho_L", ...
    eos.pressure_formula                     # sympy expression in the densities, or None
    eos.fugacity_formulas                    # sympy expressions per species, or None
    eos.parametric                           # text lines of the parametric form (ideal d = 1, 3)
    eos.formula_lines(), eos.latex_lines(), eos.as_json()   # printed forms
    eos.evaluate(quantity, densities, digits=15, parameters=None, span=None)
        # {label: mpmath number}; densities: {species: value} or a sequence in species order,
        # values exact ("1/3", "0.25", Fraction, int); parameters: {name: value} for declared
        # parameters the EOS depends on; span: where errors point (the user's statement)
    eos.table(quantity, points, digits=15, parameters=None, span=None)   # many points, one context
    eos.labels(quantity)                     # the column labels of evaluate's result
    eos.boundary                             # Boundary: kind, text, relations (sympy), latex
    eos.ray_boundary(direction, parameters)  # RayBoundary: total density where the ray meets it
    eos.check_point(densities, span, parameters)   # the checked exact point; InputError for negative
                                             # densities or beyond the boundary (says where it is)
    check_densities(system, densities, span, parameters)   # the same from a System (InputError also
                                             # for a regime without an exact equation of state)
    eos.exact_radius(direction, parameters)  # exact radius of the virial series where known
    eos.series_radius(virials, direction=None, parameters=None, digits=15)
        # RadiusEstimate from the tool's virial coefficients {multi-index: a_n} (ratio and root
        # tests along the ray of density ratios), with the exact radius and boundary beside it

Quantities: the pressure in the regime's units; the fugacities z_i; the chemical potentials
beta mu_i = ln z_i (-inf for an absent species); the reduced isothermal compressibility
rho k_B T kappa_T = [d(beta P)/d rho]^(-1) at fixed composition (1 for a Boltzmann gas).

    >>> from clusterexp.language.build import build_system
    >>> eos = equation_of_state(build_system("dimension 2 species A exchange 1/2 clusters landau"))
    >>> eos.pressure_formula
    log(nu_A/(1 - nu_A/2) + 1)
    >>> from clusterexp.products.numbers import format_number
    >>> format_number(eos.evaluate("pressure", {"A": "1/2"}, 12)["beta P / rho_L"], 12)
    '0.510825623766'
"""
from __future__ import annotations

from ..errors import InputError, NotSupportedYet
from ..model import System
from .base import QUANTITIES, Boundary, EquationOfState, RayBoundary
from .radius import RadiusEstimate

NO_EXACT_EOS = {
    "pairphase": "two-body pair phases (anyons in the continuum): the many-body problem is not exactly solved",
    "generic": "generic cluster coefficients (symbols)",
    "given": "given cluster or virial coefficients",
    "spectrum": "a declared trapped spectrum",
}


def equation_of_state(system: System, span=None) -> EquationOfState:
    """The exact equation of state of the system's regime (InputError when there is none)."""
    kind = system.source.kind
    if kind == "ideal":
        from .ideal import IdealEquationOfState
        return IdealEquationOfState(system)
    if kind == "landau":
        from ..routes import landau_matrix
        from .level import LevelEquationOfState
        return LevelEquationOfState(system, landau_matrix(system), landau=True)
    if kind == "exclusion":
        if system.source.form == "level":
            from .level import LevelEquationOfState
            return LevelEquationOfState(system, system.source.matrix, landau=False)
        from .continuum import ContinuumEquationOfState
        return ContinuumEquationOfState(system)
    what = NO_EXACT_EOS.get(kind)
    if what is None:
        raise NotSupportedYet(f"an equation of state for the regime {kind!r}", span or system.source.span)
    raise InputError(f"no exact equation of state for {what}; use the virial series instead "
                     "(derive virial up to N, then evaluate or plot its coefficients)",
                     span or system.source.span)


def check_densities(system: System, densities, span=None, parameters=None):
    """Check a density point of the system against its exact equation of state (InputError at `span`:
    no exact equation of state, negative densities, beyond close packing); returns the exact point."""
    return equation_of_state(system, span).check_point(densities, span, parameters)


__all__ = ["QUANTITIES", "Boundary", "EquationOfState", "RadiusEstimate", "RayBoundary", "check_densities",
           "equation_of_state"]
