"""Exclusion statistics in the continuum, d = 1, 2, 3: the integral over momentum cells, numerically.

Each momentum cell k is one level of Wu's equations with xi_i = z_i exp(-beta eps_i(k)),
beta eps_i(k) = (m_ref/m_i) x, x = lambda^2 k^2 / 4 pi (lambda of the reference species). With
d^dk lambda^d / (2 pi)^d = dx x^(d/2 - 1) / Gamma(d/2):

    beta P lambda^d   = 1/Gamma(d/2) int_0^inf dx x^(d/2-1) sum_i ln(1 + u_i(x)),
    rho_i lambda^d    = 1/Gamma(d/2) int_0^inf dx x^(d/2-1) n_i(x),
    d rho_i / d ln z_k = 1/Gamma(d/2) int_0^inf dx x^(d/2-1) h_ik(x),

with the per-cell densities n = (1 + U g)^(-1) u (U = diag(u); the linear relation of `level.py`) and
the per-cell Hessian h = A^T diag(D_j (1 + u_j)/u_j) A, A = (diag(1/u) + g^T)^(-1), D_j = n_j/u_j
(derived in docs/equation_of_state.md). Each cell is solved by Newton's method in ln u (warm-started
from the previous solution at the same node), the integrals by mpmath's tanh-sinh quadrature split at
the degenerate edge x = max ln z_i m_i/m_ref, and the densities are inverted for ln z by Newton's
method with the exact Jacobian d rho / d ln z.

One species in d = 2 has a closed form (derived in the docs, used as a check):
z = (e^rho - 1) e^((g-1) rho), beta P lambda^2 = -Li_2(1 - e^rho) + (g - 1) rho^2 / 2.
"""
from __future__ import annotations

from typing import Mapping, Sequence

import sympy

from ..errors import InputError, NotSupportedYet
from ..model import System
from .base import Boundary, EquationOfState, Point, RayBoundary, substitute, to_mpf


def solve_linear(ctx, A, b):
    """x with A x = b for small dense lists of mpmath numbers (Gaussian elimination, partial pivoting)."""
    K = len(b)
    M = [list(row) + [b[i]] for i, row in enumerate(A)]
    for c in range(K):
        p = max(range(c, K), key=lambda r: abs(M[r][c]))
        if M[p][c] == 0:
            raise ArithmeticError("singular cell Jacobian")
        M[c], M[p] = M[p], M[c]
        for r in range(c + 1, K):
            f = M[r][c] / M[c][c]
            if f:
                for k in range(c, K + 1):
                    M[r][k] -= f * M[c][k]
    x = [ctx.zero] * K
    for r in reversed(range(K)):
        x[r] = (M[r][K] - ctx.fsum(M[r][k] * x[k] for k in range(r + 1, K))) / M[r][r]
    return x


def softplus(ctx, v):
    """ln(1 + e^v) without overflow."""
    return v + ctx.log1p(ctx.exp(-v)) if v > 0 else ctx.log1p(ctx.exp(v))


class Cells:
    """The momentum-cell integrals at given ln z: one Wu solution per quadrature node, cached."""

    def __init__(self, ctx, g, ratios, d: int):
        self.ctx, self.g, self.ratios, self.K = ctx, g, ratios, len(g)
        self.half = ctx.mpf(d) / 2
        self.norm = 1 / ctx.gamma(self.half)
        self.warm: dict = {}
        self.tolerance = ctx.mpf(10) ** (-ctx.dps + 4)

    def cell(self, x, log_z):
        """(sum_i ln(1 + u_i), n, h) of the cell at x."""
        ctx, g, K = self.ctx, self.g, self.K
        log_xi = [log_z[i] - self.ratios[i] * x for i in range(K)]
        v = list(self.warm.get(x, log_xi))
        for _ in range(200):
            L = [softplus(ctx, vi) for vi in v]
            q = [ctx.exp(vi - Li) for vi, Li in zip(v, L)]  # u/(1+u)
            F = [v[i] - L[i] + ctx.fsum(g[j][i] * L[j] for j in range(K)) - log_xi[i] for i in range(K)]
            J = [[(1 - q[i] if i == k else 0) + g[k][i] * q[k] for k in range(K)] for i in range(K)]
            step = solve_linear(ctx, J, F)
            size = max(abs(s) for s in step)
            if size > 4:
                step = [s * 4 / size for s in step]
            v = [vi - s for vi, s in zip(v, step)]
            if size < self.tolerance * (1 + max(abs(vi) for vi in v)):
                break
        else:
            raise ArithmeticError("Wu's equations in a momentum cell did not converge")
        self.warm[x] = v
        u = [ctx.exp(vi) for vi in v]
        L = [softplus(ctx, vi) for vi in v]
        n = solve_linear(ctx, [[(1 if i == j else 0) + u[i] * g[i][j] for j in range(K)] for i in range(K)], u)
        if any(ni < 0 for ni in n):
            raise ArithmeticError("a momentum cell left the physical branch")
        # B = (1 + U g^T)^(-1), A = B U, h_ik = u_i u_k sum_j B_ji B_jk n_j (1 + u_j)/u_j^2
        BT = [solve_linear(ctx, [[(1 if a == b else 0) + u[b] * g[a][b] for b in range(K)] for a in range(K)],
                           [1 if a == j else 0 for a in range(K)]) for j in range(K)]
        B = BT  # solving (1 + g U) y = e_j gives column j of B^T, i.e. row j of B
        weight = [n[j] * (1 + u[j]) / u[j] ** 2 for j in range(K)]
        h = [[u[i] * u[k] * ctx.fsum(B[j][i] * B[j][k] * weight[j] for j in range(K)) for k in range(K)]
             for i in range(K)]
        return ctx.fsum(L), n, h

    def integrals(self, log_z, digits: int, want_hessian: bool):
        """(P, rho, H) at ln z; H is None unless asked for."""
        ctx, K = self.ctx, self.K
        cache: dict = {}

        def at(x):
            if x not in cache:
                cache[x] = self.cell(x, log_z)
            return cache[x]
        # x = y^2 makes dx x^(d/2-1) = 2 y^(d-1) dy smooth at the origin (d = 1: no x^(-1/2) singularity)
        edge = ctx.sqrt(max([ctx.one] + [log_z[i] / self.ratios[i] for i in range(K)]))
        points = [ctx.zero, edge, ctx.inf]
        power = int(2 * self.half) - 1

        def integral(pick):
            def f(y):
                return 2 * y ** power * pick(at(y * y))
            value, error = ctx.quad(f, points, error=True)
            if error > abs(value) * ctx.mpf(10) ** (-digits - 2) + ctx.mpf(10) ** (-ctx.dps + 2):
                value, error = ctx.quad(f, points, error=True, maxdegree=10)
                if error > abs(value) * ctx.mpf(10) ** (-digits - 1):
                    raise NotSupportedYet(f"the momentum-cell integral reached only {ctx.nstr(error, 3)} absolute "
                                          f"accuracy, short of {digits} digits")
            return self.norm * value
        pressure = integral(lambda c: c[0])
        rho = [integral(lambda c, i=i: c[1][i]) for i in range(K)]
        hessian = None
        if want_hessian:
            hessian = [[None] * K for _ in range(K)]
            for i in range(K):
                for k in range(i, K):
                    hessian[i][k] = hessian[k][i] = integral(lambda c, i=i, k=k: c[2][i][k])
        return pressure, rho, hessian


class ContinuumEquationOfState(EquationOfState):
    """`clusters exclusion` in d = 1, 2, 3 (momentum cells shared by all species)."""

    plot_samples = 21   # each point is a numerical integral (about half a second)
    seconds_per_point = 1.0

    def __init__(self, system: System):
        super().__init__(system)
        d = self.d = system.dimension
        self.matrix = system.source.matrix
        m_ref = system.reference_mass
        self.ratios = tuple(sympy.simplify(m_ref / s.mass) for s in system.species)
        self.weights = tuple(sympy.powsimp(r ** sympy.Rational(-d, 2)) for r in self.ratios)
        self.regime = f"exclusion statistics in the continuum, d = {d}"
        self.density_unit = f"rho_i lambda^{d}"
        self.pressure_unit = f"beta P lambda^{d}"
        self.pressure_latex = rf"\beta P \lambda^{d}"
        self.density_symbols = tuple(sympy.Symbol("rho_" + n, nonnegative=True) for n in self.names)
        if len(self.names) == 1 and d == 2:
            rho, g = self.density_symbols[0], self.matrix[0][0]
            self.pressure_formula = -sympy.polylog(2, 1 - sympy.exp(rho)) + (g - 1) * rho ** 2 / 2
            self.fugacity_formulas = ((sympy.exp(rho) - 1) * sympy.exp((g - 1) * rho),)
        self.parametric = (
            f"{self.pressure_unit} = 1/Gamma({sympy.Rational(d, 2)}) int_0^inf dx x^({sympy.Rational(d, 2) - 1}) "
            "sum_i ln(1 + u_i(x));  rho_i lambda^d = the same integral of n_i(x)",
            "u_i(x) = z_i exp(-(m_ref/m_i) x) (1 + u_i) prod_j (1 + u_j)^(-g_ji);  n_i/u_i + sum_j g_ij n_j = 1",
            "g = " + sympy.sstr([list(row) for row in self.matrix])
            + "; mass ratios m_ref/m_i = " + sympy.sstr(list(self.ratios)))

    def free_parameters(self) -> dict[str, sympy.Symbol]:
        symbols = set().union(*(v.free_symbols for row in self.matrix for v in row),
                              *(r.free_symbols for r in self.ratios))
        return {s.name: s for s in symbols}

    def _free_bosons(self, parameters) -> list[int]:
        """Species with no exclusion at all (row and column zero): ideal bosons, which condense in d = 3."""
        g = [[substitute(v, parameters) for v in row] for row in self.matrix]
        K = len(g)
        return [i for i in range(K) if all(g[i][j] == 0 and g[j][i] == 0 for j in range(K))]

    def _check(self, point: Point, span=None) -> None:
        if self.d != 3:
            return
        for i in self._free_bosons(point.parameters):
            limit = substitute(self.weights[i], point.parameters) * sympy.zeta(sympy.Rational(3, 2))
            if point.densities[i] >= limit:
                raise NotSupportedYet(f"species {self.names[i]} has no exclusion (ideal bosons) and condenses at "
                                      f"rho lambda^3 = {sympy.N(limit, 8)}; the condensed phase is given by "
                                      "`clusters ideal`", span)

    @property
    def boundary(self) -> Boundary:
        return Boundary("none", "no close packing in the continuum: every density is reached (ideal bosons, "
                        "with a zero row and column of g, condense in d = 3 as in `clusters ideal`)")

    def ray_boundary(self, direction: Sequence, parameters: Mapping | None = None) -> RayBoundary:
        parameters = self._parameters(parameters or {}, None)
        x = self.composition(direction)
        if self.d != 3:
            return RayBoundary(None)
        zeta = sympy.zeta(sympy.Rational(3, 2))
        candidates = [(substitute(self.weights[i], parameters) * zeta / x[i], self.names[i])
                      for i in self._free_bosons(parameters) if x[i] > 0]
        if not candidates:
            return RayBoundary(None)
        at = min(c for c, _ in candidates)
        return RayBoundary(at, tuple(n for c, n in candidates if c == at), "condensation")

    def exact_radius(self, direction: Sequence, parameters: Mapping | None = None) -> sympy.Expr | None:
        """One species in d = 2: beta P lambda^2 = (2D Bose) + g rho^2/2, radius 2 pi [derived]."""
        parameters = self._parameters(parameters or {}, None)
        return 2 * sympy.pi if len(self.names) == 1 and self.d == 2 else None

    # -- numbers ------------------------------------------------------------------------------------
    def _values(self, ctx, quantity: str, point: Point, digits: int, span) -> dict:
        labels = self.labels(quantity)
        present = [i for i, r in enumerate(point.densities) if r > 0]
        if not present:
            zero = {"pressure": ctx.zero, "fugacity": ctx.zero, "chemical_potential": ctx.ninf,
                    "compressibility": ctx.one}[quantity]
            return {label: zero for label in labels}
        g = [[to_mpf(ctx, substitute(self.matrix[i][j], point.parameters)) for j in present] for i in present]
        ratios = [to_mpf(ctx, substitute(self.ratios[i], point.parameters)) for i in present]
        target = [to_mpf(ctx, point.densities[i]) for i in present]
        cells = Cells(ctx, g, ratios, self.d)
        log_z, (pressure, rho, hessian) = self._invert(ctx, cells, target, ratios, digits, span)
        if quantity == "pressure":
            return {labels[0]: pressure}
        if quantity == "compressibility":
            if hessian is None:
                hessian = cells.integrals(log_z, digits, True)[2]
            inverse = solve_linear(ctx, hessian, rho)
            return {labels[0]: ctx.fsum(rho) / ctx.fsum(r * y for r, y in zip(rho, inverse))}
        full = {i: v for i, v in zip(present, log_z)}
        out = {}
        for i, label in enumerate(labels):
            if i not in full:
                out[label] = ctx.zero if quantity == "fugacity" else ctx.ninf
            else:
                out[label] = ctx.exp(full[i]) if quantity == "fugacity" else full[i]
        return out

    def _invert(self, ctx, cells: Cells, target, ratios, digits: int, span):
        """ln z with rho(ln z) = target: Newton on ln rho with the exact Jacobian, backtracking when a cell
        has no solution on the physical branch (e.g. bosons at z >= 1)."""
        K = len(target)
        log_z = [ctx.log(t) + ctx.mpf(self.d) / 2 * ctx.log(r) for t, r in zip(target, ratios)]
        tolerance = ctx.mpf(10) ** (-digits - 3)
        state = None
        for _ in range(60):
            try:
                state = cells.integrals(log_z, digits, True)
                break
            except ArithmeticError:
                log_z = [v - 1 for v in log_z]
        if state is None:
            raise InputError("no fugacities found for these densities in the continuum exclusion gas", span)
        for _ in range(200):
            pressure, rho, hessian = state
            residual = [ctx.log(r) - ctx.log(t) for r, t in zip(rho, target)]
            if max(abs(x) for x in residual) < tolerance:
                return log_z, (pressure, rho, hessian)
            jacobian = [[hessian[i][k] / rho[i] for k in range(K)] for i in range(K)]
            step = solve_linear(ctx, jacobian, residual)
            size = max(abs(s) for s in step)
            if size > 2:
                step = [s * 2 / size for s in step]
            for _ in range(40):
                trial = [v - s for v, s in zip(log_z, step)]
                try:
                    state = cells.integrals(trial, digits, True)
                    log_z = trial
                    break
                except ArithmeticError:
                    step = [s / 2 for s in step]
            else:
                break
        raise InputError("the densities could not be inverted for the fugacities of the continuum exclusion gas "
                         f"to {digits} digits", span)
