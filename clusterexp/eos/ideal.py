"""Ideal Bose, Fermi and Boltzmann gases in d = 1, 2, 3 (mixtures, masses): polylogarithms.

Species i with c_i = (m_i/m_ref)^(d/2) (its b_1, physics notes section 1) and s = d/2:

    rho_i lambda^d = c_i g_s(z_i),      beta P lambda^d = sum_i c_i g_(s+1)(z_i),

g_s(z) = Li_s(z) for bosons, -Li_s(-z) for fermions, z for Boltzmann species. The densities are
inverted for the fugacities with mpmath's bracketing root finder in ln z. In d = 2 everything is closed: z = 1 - exp(-rho/c) (Bose), exp(rho/c) - 1 (Fermi).

The reduced compressibility uses d(beta P lambda^d)/d(rho_i lambda^d) = g_s(z_i)/g_(s-1)(z_i).

In d = 3 a Bose species condenses at rho_i lambda^3 = c_i zeta(3/2): beyond it z_i = 1 and its pressure
stays c_i zeta(5/2) (the condensate carries no pressure; textbook, e.g. Pathria & Beale, Statistical
Mechanics, 3rd ed., section 7.1); the compressibility is infinite there.
"""
from __future__ import annotations

from typing import Mapping, Sequence

import sympy

from ..errors import InputError
from ..model import System
from .base import Boundary, EquationOfState, Point, RayBoundary, substitute, to_mpf


def species_statistics(system: System) -> tuple[str, ...]:
    return tuple(s.statistics or ("fermi" if s.exchange == 1 else "bose") for s in system.species)


class IdealEquationOfState(EquationOfState):
    """`clusters ideal`: any d in {1, 2, 3}, mixtures with masses."""

    def __init__(self, system: System):
        super().__init__(system)
        d = system.dimension
        self.d = d
        self.order = sympy.Rational(d, 2)
        self.statistics = species_statistics(system)
        m_ref = system.reference_mass
        self.weights = tuple(sympy.powsimp((s.mass / m_ref) ** self.order) for s in system.species)
        self.regime = f"ideal gases in d = {d}"
        self.density_unit = f"rho_i lambda^{d}"
        self.pressure_unit = f"beta P lambda^{d}"
        self.pressure_latex = rf"\beta P \lambda^{d}"
        self.density_symbols = tuple(sympy.Symbol("rho_" + n, nonnegative=True) for n in self.names)
        z = [sympy.Symbol("z_" + n, positive=True) for n in self.names]
        closed = d == 2 or all(k == "boltzmann" for k in self.statistics)
        if closed:
            fug, pressure = [], []
            for rho, c, kind in zip(self.density_symbols, self.weights, self.statistics):
                if kind == "boltzmann":
                    fug.append(rho / c)
                    pressure.append(rho)
                elif kind == "bose":
                    fug.append(1 - sympy.exp(-rho / c))
                    pressure.append(c * sympy.polylog(2, fug[-1]))
                else:
                    fug.append(sympy.exp(rho / c) - 1)
                    pressure.append(-c * sympy.polylog(2, -fug[-1]))
            self.fugacity_formulas = tuple(fug)
            self.pressure_formula = sympy.Add(*pressure)
        s = self.order
        terms = [self._g(s + 1, zi, c, kind) for zi, c, kind in zip(z, self.weights, self.statistics)]
        self.parametric_pressure = sympy.Add(*terms)
        self.parametric_densities = tuple(self._g(s, zi, c, kind) for zi, c, kind in zip(z, self.weights, self.statistics))
        if not closed:
            self.parametric = (f"{self.pressure_unit} = {sympy.sstr(self.parametric_pressure)}",) + tuple(
                f"rho_{n} lambda^{d} = {sympy.sstr(r)}" for n, r in zip(self.names, self.parametric_densities))

    @staticmethod
    def _g(s, z, c, kind):
        if kind == "boltzmann":
            return c * z
        return c * sympy.polylog(s, z) if kind == "bose" else -c * sympy.polylog(s, -z)

    def free_parameters(self) -> dict[str, sympy.Symbol]:
        symbols = set().union(*(w.free_symbols for w in self.weights))
        return {x.name: x for x in symbols}

    # -- numbers ------------------------------------------------------------------------------------
    def _species_state(self, ctx, kind: str, c, rho, digits: int):
        """(ln z, pressure term, d(beta P)/d rho or None when infinite) of one species."""
        s = self.order
        if kind == "boltzmann":
            return ctx.log(rho / c), rho, ctx.one
        sign = 1 if kind == "bose" else -1

        def g(order, log_z):
            return sign * ctx.re(ctx.polylog(order, sign * ctx.exp(log_z)))
        if kind == "bose" and self.d == 3 and rho >= c * ctx.zeta(s):
            return ctx.zero, c * ctx.zeta(s + 1), None
        if self.d == 2:
            log_z = ctx.log(-ctx.expm1(-rho / c)) if kind == "bose" else ctx.log(ctx.expm1(rho / c))
        else:
            target = ctx.log(rho / c)

            def f(log_z):
                return ctx.log(g(s, log_z)) - target
            if kind == "bose":  # g_s(z) >= z: ln z <= ln(rho/c), and z < 1 (never z = 1 itself: g_s diverges
                hi = min(target, -ctx.one)  # for s <= 1, and mpmath's polylog(s, 1) is zeta(s) continued)
                while f(hi) <= 0:
                    hi = hi / 16
                lo = hi - 1
                while f(lo) >= 0:
                    lo = 2 * lo
            else:  # -Li_s(-z) <= z: ln z >= ln(rho/c)
                lo = target
                hi = lo + 1
                while f(hi) <= 0:
                    hi = hi + 2 * (hi - lo)
            # mpmath's bracketing root finder (Anderson-Bjoerk) on the increasing ln g_s(e^eta) - ln(rho/c)
            log_z = ctx.findroot(f, (lo, hi), solver="anderson")
        slope = g(s, log_z) / g(s - 1, log_z)
        return log_z, c * g(s + 1, log_z), slope

    def _values(self, ctx, quantity: str, point: Point, digits: int, span) -> dict:
        labels = self.labels(quantity)
        weights = [to_mpf(ctx, substitute(c, point.parameters)) for c in self.weights]
        states = []
        for name, kind, c, rho in zip(self.names, self.statistics, weights, point.densities):
            states.append(None if rho == 0 else self._species_state(ctx, kind, c, to_mpf(ctx, rho), digits))
        if quantity == "pressure":
            return {labels[0]: ctx.fsum(st[1] for st in states if st)}
        if quantity == "compressibility":
            if any(st and st[2] is None for st in states):
                raise InputError("the compressibility is infinite beyond Bose-Einstein condensation "
                                 f"({self.boundary.text})", span)
            total = to_mpf(ctx, point.total)
            if total == 0:
                return {labels[0]: ctx.one}
            slope = ctx.fsum(to_mpf(ctx, rho) * st[2] for rho, st in zip(point.densities, states) if st)
            return {labels[0]: total / slope}
        out = {}
        for label, st in zip(labels, states):
            if st is None:
                out[label] = ctx.zero if quantity == "fugacity" else ctx.ninf
            else:
                out[label] = ctx.exp(st[0]) if quantity == "fugacity" else st[0]
        return out

    # -- where it ends ------------------------------------------------------------------------------
    def _condensing(self) -> list[int]:
        return [i for i, kind in enumerate(self.statistics) if kind == "bose" and self.d == 3]

    @property
    def boundary(self) -> Boundary:
        bose = self._condensing()
        if not bose:
            return Boundary("none", "nowhere: the ideal gas takes any density")
        zeta = sympy.zeta(sympy.Rational(3, 2))
        relations = tuple(sympy.StrictLessThan(self.density_symbols[i], self.weights[i] * zeta) for i in bose)
        text = ("Bose-Einstein condensation at " + ", ".join(
            f"rho_{self.names[i]} lambda^3 = {sympy.sstr(self.weights[i] * zeta)} = "
            f"{sympy.N(self.weights[i] * zeta, 8) if not self.weights[i].free_symbols else '...'}" for i in bose)
            + "; beyond it the fugacity stays 1 and the pressure flat (the compressibility is infinite)")
        return Boundary("condensation", text, relations, tuple(sympy.latex(r) for r in relations))

    def ray_boundary(self, direction: Sequence, parameters: Mapping | None = None) -> RayBoundary:
        parameters = self._parameters(parameters or {}, None)
        x = self.composition(direction)
        zeta = sympy.zeta(sympy.Rational(3, 2))
        candidates = [(substitute(self.weights[i], parameters) * zeta / x[i], self.names[i])
                      for i in self._condensing() if x[i] > 0]
        if not candidates:
            return RayBoundary(None)
        at = min(c for c, _ in candidates)
        return RayBoundary(at, tuple(n for c, n in candidates if c == at), "condensation")

    def exact_radius(self, direction: Sequence, parameters: Mapping | None = None) -> sympy.Expr | None:
        """d = 2: beta P lambda^2 = sum_i c_i f(rho_i / c_i) with f' = t/(e^t - 1) (+ t for fermions), whose
        poles at t = +-2 pi i give the radius 2 pi c_i / x_i along the ray [derived: the 2D virial
        coefficients are B_(n-1)/n!]; only Boltzmann species present: the series ends (infinite radius)."""
        parameters = self._parameters(parameters or {}, None)
        x = self.composition(direction)
        quantum = [i for i, kind in enumerate(self.statistics) if kind != "boltzmann" and x[i] > 0]
        if not quantum:
            return sympy.oo
        if self.d != 2:
            return None
        return min(2 * sympy.pi * substitute(self.weights[i], parameters) / x[i] for i in quantum)
