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

Each regime owns its equation of state (`routes.base.Regime.equation_of_state`, which builds the
classes here); the others (pair phases, generic, given, declared spectra) refuse with an InputError
that points to the virial series. The input language reaches it through `evaluate`, `tabulate`,
`plot` and `equation of state` (language/state_statements.py, products/states.py).

API (what the `evaluate` / `tabulate` / `plot` / `equation of state` statements call):

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

from ..model import System
from .base import QUANTITIES, Boundary, EquationOfState, RayBoundary
from .radius import RadiusEstimate

def equation_of_state(system: System, span=None) -> EquationOfState:
    """The exact equation of state of the system's regime (`Regime.equation_of_state`; InputError at
    `span` when the regime has none, pointing to the virial series)."""
    from ..routes import regime_of
    return regime_of(system).equation_of_state(system, span)


def check_densities(system: System, densities, span=None, parameters=None):
    """Check a density point of the system against its exact equation of state (InputError at `span`:
    no exact equation of state, negative densities, beyond close packing); returns the exact point."""
    return equation_of_state(system, span).check_point(densities, span, parameters)


__all__ = ["QUANTITIES", "Boundary", "EquationOfState", "RadiusEstimate", "RayBoundary", "check_densities",
           "equation_of_state"]
