"""Exclusion statistics on one level and the lowest Landau level: the closed-form equation of state.

Index convention of the tool (Haldane's g_ij = states of i lost per particle of j): Wu's equations
u_i = z_i (1 + u_i) prod_j (1 + u_j)^(-g_ji), beta P / (states) = sum_i ln(1 + u_i). The densities
n_i = z_i d/dz_i of the pressure obey the linear relation (derived in docs/equation_of_state.md)

    n_i / u_i + sum_j g_ij n_j = 1,        i.e.  u_i = n_i / D_i,  D_i = 1 - sum_j g_ij n_j,

so that, for any K x K matrix, symmetric or not,

    beta P / (states) = sum_i ln(1 + n_i / D_i),
    z_i = n_i / (D_i + n_i) prod_j ((D_j + n_j) / D_j)^(g_ji),
    [d(beta P)/d n]^(-1) at fixed composition = (sum_i n_i) / sum_i n_i / (D_i (D_i + n_i)).

One species: beta P / rho_L = ln[1 + nu/(1 - g nu)] (Dasnieres de Veigy & Ouvry, Phys. Rev. Lett. 72
(1994) 600). The lowest Landau level is the same gas with g_ii = alpha_i, g_ij = alpha_ij, densities
nu_i = rho_i / rho_L and beta P / rho_L (Isakov, Mashkevich, Ouvry, Nucl. Phys. B 448 (1995) 457).

The region reached from zero density with the species present (n_i > 0) is {D_i > 0 for each species
present}: along a ray n = t x the pressure diverges where the first D_i (x_i > 0) reaches zero.
"""
from __future__ import annotations

from fractions import Fraction
from typing import Mapping, Sequence

import sympy

from ..errors import InputError
from ..model import System
from .base import Boundary, EquationOfState, Point, RayBoundary, fraction_of, substitute, to_mpf


class LevelEquationOfState(EquationOfState):
    """`clusters exclusion level` (per single-particle level) and `clusters landau` (per rho_L)."""

    density_word = "filling"

    def __init__(self, system: System, matrix: Sequence[Sequence[sympy.Expr]], landau: bool):
        super().__init__(system)
        self.matrix = tuple(tuple(sympy.sympify(v) for v in row) for row in matrix)
        self.landau = landau
        K = len(self.names)
        if landau:
            self.regime = "lowest Landau level"
            self.density_unit = "nu_i = rho_i / rho_L"
            self.pressure_unit = "beta P / rho_L"
            self.pressure_latex = r"\beta P / \rho_L"
            prefix, latex_prefix = "nu_", r"\nu"
        else:
            self.regime = "exclusion statistics on one level"
            self.density_unit = "n_i (particles of species i per single-particle state)"
            self.pressure_unit = "beta P / (states)"
            self.pressure_latex = r"\beta P / N_{\mathrm{states}}"
            prefix, latex_prefix = "n_", "n"
        self.prefix = prefix
        self.density_symbols = tuple(sympy.Symbol(prefix + n, nonnegative=True) for n in self.names)
        self.density_latex = tuple(f"{latex_prefix}_{{{n}}}" for n in self.names)
        n, g = self.density_symbols, self.matrix
        D = [1 - sympy.Add(*(g[i][j] * n[j] for j in range(K))) for i in range(K)]
        self.available = tuple(D)
        self.pressure_formula = sympy.Add(*(sympy.log(1 + n[i] / D[i]) for i in range(K)))
        self.fugacity_formulas = tuple(
            n[i] / (D[i] + n[i]) * sympy.Mul(*(((D[j] + n[j]) / D[j]) ** g[j][i] for j in range(K) if g[j][i] != 0))
            for i in range(K))
        total = sympy.Add(*n)
        self.compressibility_formula = total / sympy.Add(*(n[i] / (D[i] * (D[i] + n[i])) for i in range(K)))

    def free_parameters(self) -> dict[str, sympy.Symbol]:
        symbols = set().union(*(v.free_symbols for row in self.matrix for v in row))
        return {s.name: s for s in symbols}

    # -- exact pieces at a point -------------------------------------------------------------------
    def _exact(self, point: Point):
        """(matrix, densities, D) with the parameters substituted: Fractions when all are rational
        (fast, exact), else exact sympy numbers."""
        g = [[substitute(v, point.parameters) for v in row] for row in self.matrix]
        n = list(point.densities)
        fractions = [fraction_of(v) for row in g for v in row] + [fraction_of(v) for v in n]
        K = len(n)
        if all(f is not None for f in fractions):
            g = [[fractions[i * K + j] for j in range(K)] for i in range(K)]
            n = fractions[K * K:]
            D = [1 - sum((g[i][j] * n[j] for j in range(K)), Fraction(0)) for i in range(K)]
        else:
            D = [sympy.nsimplify(1 - sympy.Add(*(g[i][j] * n[j] for j in range(K)))) for i in range(K)]
        return g, n, D

    def _check(self, point: Point, span=None) -> None:
        g, n, D = self._exact(point)
        for i, name in enumerate(self.names):
            if n[i] > 0 and not D[i] > 0:
                ray = self.ray_boundary(point.densities, point.parameters)
                where = ", ".join(f"{s} = {sympy.nsimplify(ray.at * x)}" for s, x in
                                  zip(self._labels(), self.composition(point.densities))) if ray.at is not None else ""
                constraint = " - ".join(["1"] + [f"{sympy.sstr(g[i][j])}*{s}" for j, s in enumerate(self._labels())
                                                 if g[i][j] != 0])
                raise InputError(
                    f"densities beyond close packing of the {self.regime}: for species {name} the available "
                    f"fraction {constraint} is {sympy.nsimplify(D[i])} <= 0 (it must stay > 0 for every species "
                    f"present); at this composition close packing is at total density "
                    f"{sympy.nsimplify(ray.at)} ({where})", span)

    def _labels(self) -> list[str]:
        return [s.name for s in self.density_symbols]

    # -- numbers ------------------------------------------------------------------------------------
    def _values(self, ctx, quantity: str, point: Point, digits: int, span) -> dict:
        g, n, D = self._exact(point)
        K = len(n)
        labels = self.labels(quantity)
        present = [i for i in range(K) if n[i] > 0]
        # ln((D_j + n_j)/D_j) from the exact ratio: no cancellation near close packing
        growth = {j: ctx.log(to_mpf(ctx, (D[j] + n[j]) / D[j])) for j in present}
        if quantity == "pressure":
            return {labels[0]: ctx.fsum(growth.values())}
        if quantity == "compressibility":
            if not present:
                return {labels[0]: ctx.one}
            slope = ctx.fsum(to_mpf(ctx, n[i] / (D[i] * (D[i] + n[i]))) for i in present)
            return {labels[0]: to_mpf(ctx, sum(n)) / slope}
        out = {}
        for i, label in enumerate(labels):
            if n[i] == 0:
                out[label] = ctx.zero if quantity == "fugacity" else ctx.ninf
                continue
            log_z = ctx.log(to_mpf(ctx, n[i] / (D[i] + n[i]))) + ctx.fsum(
                to_mpf(ctx, g[j][i]) * growth[j] for j in present if g[j][i] != 0)
            out[label] = ctx.exp(log_z) if quantity == "fugacity" else log_z
        return out

    # -- where it ends ------------------------------------------------------------------------------
    @property
    def boundary(self) -> Boundary:
        relations = tuple(sympy.StrictLessThan(1 - d, 1) for d in self.available if d != 1)
        if not relations:
            return Boundary("none", "nowhere: with no exclusion (g = 0 in every row) any density is reached")
        parts = [f"{sympy.sstr(1 - d)} < 1 (species {name} present)" for name, d in zip(self.names, self.available)
                 if d != 1]
        text = (f"close packing: the pressure diverges where 1 - sum_j g_ij {self.prefix}j reaches 0 for a species i "
                "present; inside: " + "; ".join(parts))
        if len(self.names) == 1:
            g = self.matrix[0][0]
            value = "" if g.free_symbols else f" = {sympy.sstr(1 / g)}"
            text = (f"close packing at {self.density_symbols[0].name} = 1/g{value} (for g > 0), where the pressure "
                    "diverges" if g != 0 else text)
        latex = tuple(sympy.latex(r) for r in relations)
        return Boundary("close packing", text, relations, latex)

    def _ray_pieces(self, x, parameters):
        g = [[substitute(v, parameters) for v in row] for row in self.matrix]
        K = len(x)
        gx = [sympy.nsimplify(sympy.Add(*(g[i][j] * x[j] for j in range(K)))) for i in range(K)]
        return gx

    def ray_boundary(self, direction: Sequence, parameters: Mapping | None = None) -> RayBoundary:
        parameters = self._parameters(parameters or {}, None)
        x = self.composition(direction)
        gx = self._ray_pieces(x, parameters)
        candidates = [(1 / gx[i], self.names[i]) for i in range(len(x)) if x[i] > 0 and gx[i] > 0]
        if not candidates:
            return RayBoundary(None)
        at = min(c for c, _ in candidates)
        return RayBoundary(at, tuple(name for c, name in candidates if c == at), "close packing")

    def exact_radius(self, direction: Sequence, parameters: Mapping | None = None) -> sympy.Expr | None:
        """The pressure along n = t x is sum_i [ln(1 - ((g - 1) x)_i t) - ln(1 - (g x)_i t)] (x_i > 0): its
        singularities are the zeros of those linear factors that do not cancel between the sums."""
        parameters = self._parameters(parameters or {}, None)
        x = self.composition(direction)
        gx = self._ray_pieces(x, parameters)
        weights: dict = {}
        for i in range(len(x)):
            if x[i] == 0:
                continue
            for slope, weight in ((gx[i] - x[i], 1), (gx[i], -1)):
                if slope != 0:
                    t = sympy.nsimplify(1 / slope)
                    weights[t] = weights.get(t, 0) + weight
        singular = [abs(t) for t, w in weights.items() if w != 0]
        return min(singular) if singular else None
