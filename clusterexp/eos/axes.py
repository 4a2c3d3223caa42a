"""Density axes of the equation-of-state tables and figures: the grid points, where the boundary of the
equation of state (close packing, condensation) lies on an axis, and the default plot range.

An axis varies the density of one species, t, with the others fixed. Every boundary the regimes know
is linear in the densities (one level and the LLL: D_i = 1 - sum_j g_ij n_j > 0 for each species
present; the ideal Bose gas in d = 3: rho_i lambda^3 < c_i zeta(3/2)), so its place on the axis is the
root of a linear function of t, found exactly.
"""
from __future__ import annotations

from itertools import product

import sympy

from ..errors import InputError
from .base import substitute
from .requests import StateRequest

DEFAULT_END = sympy.Integer(2)          # plot range where the equation of state has no end
CLOSE_PACKING_SHARE = sympy.Rational(19, 20)


def axis_points(request: StateRequest) -> list[dict]:
    """Every row of a table: {species: exact density}, the first axis varying slowest."""
    fixed = request.fixed()
    names = [a.species for a in request.axes]
    return [{**fixed, **dict(zip(names, values))} for values in product(*(a.values for a in request.axes))]


def axis_boundary(eos, species: str, fixed: dict, parameters: dict) -> sympy.Expr | None:
    """The exact density of `species` at which the axis (others fixed) meets the boundary of the equation
    of state, or None when it never does."""
    t = sympy.Symbol("t", positive=True)
    k = eos.names.index(species)
    values = {s: (t if i == k else sympy.sympify(fixed.get(n, 0)))
              for i, (s, n) in enumerate(zip(eos.density_symbols, eos.names))}
    if hasattr(eos, "available"):   # one level / LLL: the constraint of each species present
        conditions = [D for i, D in enumerate(eos.available) if i == k or fixed.get(eos.names[i], 0) > 0]
    else:
        conditions = [r.rhs - r.lhs for r in eos.boundary.relations]
    roots = []
    for condition in conditions:
        c = sympy.expand(substitute(condition, parameters).xreplace(values))
        if not c.has(t):
            continue
        slope = c.coeff(t, 1)
        if sympy.expand(c - slope * t).has(t):
            return None   # not linear: no exact place (no regime has such a boundary today)
        if slope.is_negative:
            roots.append(sympy.nsimplify(-(c - slope * t) / slope))
    return min(roots, key=lambda r: float(r)) if roots else None


def plot_interval(eos, request: StateRequest, parameters: dict):
    """(low, high, boundary on the axis or None) of a figure: the range written, else 0 to 19/20 of
    close packing, 3/2 of the condensation density, or 0 to 2 where the equation of state has no end."""
    axis = request.axes[0]
    boundary = axis_boundary(eos, axis.species, request.fixed(), parameters)
    if axis.interval is not None:
        return axis.interval[0], axis.interval[1], boundary
    if boundary is None:
        return sympy.Integer(0), DEFAULT_END, None
    share = CLOSE_PACKING_SHARE if eos.boundary.kind == "close packing" else sympy.Rational(3, 2)
    return sympy.Integer(0), sympy.nsimplify(share * boundary), boundary


def check_axis_ends(eos, request: StateRequest, parameters: dict) -> None:
    """Both ends of a figure's range must be densities the equation of state takes."""
    axis = request.axes[0]
    low, high, boundary = plot_interval(eos, request, parameters)
    for end in (low, high):
        point = {**request.fixed(), axis.species: end}
        try:
            eos.check_point(point, None, parameters)
        except InputError as error:
            where = f" ({eos.boundary.kind} at {axis.word} {axis.species} = {sympy.sstr(boundary)})" \
                if boundary is not None else ""
            raise InputError(f"the plot range reaches {axis.word} {axis.species} = {sympy.sstr(end)}{where}: "
                             f"{error.message}; end the range before it", axis.span) from None
