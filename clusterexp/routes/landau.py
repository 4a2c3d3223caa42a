"""Lowest-Landau-level anyons of K species (route R4), by two independent routes: exclusion statistics
with the statistics matrix g_ii = alpha_i, g_ij = alpha_ij (Isakov, Mashkevich, Ouvry, Nucl. Phys. B 448
(1995) 457), or the harmonic regulator on the declared LLL spectrum (bosonic LLL levels 1/(1 - x) shifted
by sum_i alpha_i N_i (N_i - 1)/2 + sum_{i<j} alpha_ij N_i N_j, weight |n|)."""
from __future__ import annotations

import sympy

from ..errors import InputError
from ..model import System
from .base import Clusters, Quantities, Regime, ring_native
from .exclusion import level_clusters, wu_latex, wu_text
from .spectrum import SpeciesSpectrum, trapped_clusters

LANDAU = Quantities(
    pressure="beta P / rho_L", density="nu_{i}", variable="nu",
    single="nu_i = rho_i / rho_L, rho_L = eB/h the degeneracy of the lowest Landau level per area (the same "
           "for every species: equal charges); b_(single particle) = 1, a_(single particle) = 1",
    unit="rho_L", pressure_latex=r"\beta P/\rho_L", density_latex=r"\nu_{{{label}}}", variable_latex=r"\nu",
    single_latex=r"$\nu_i=\rho_i/\rho_L$ with $\rho_L=eB/h$ the degeneracy per area of the lowest Landau level "
                 r"(equal charges); single-particle $b=1$")


def landau_matrix(system: System) -> tuple[tuple[sympy.Expr, ...], ...]:
    """Statistics matrix of lowest-Landau-level anyons: g_ii = alpha_i, g_ij = alpha_ij (symmetric)."""
    names = system.species_names
    return tuple(tuple(system.species[i].exchange if i == j else system.mutual(names[i], names[j])
                       for j in range(len(names))) for i in range(len(names)))


def landau_spectrum(system: System):
    """The declared-spectrum form of the same gas: bosonic LLL levels 1/(1 - x) shifted by
    sum_i alpha_i N_i (N_i - 1)/2 + sum_{i<j} alpha_ij N_i N_j, weight |n|."""
    g = landau_matrix(system)
    K = len(g)

    def shift(n):
        total = sum(g[i][i] * sympy.Rational(n[i] * (n[i] - 1), 2) for i in range(K))
        return total + sum(g[i][j] * n[i] * n[j] for i in range(K) for j in range(i + 1, K))
    species = [SpeciesSpectrum(1 / (1 - sympy.Symbol("x")), "bose", sympy.Integer(1)) for _ in range(K)]
    return species, shift


def landau_clusters(system: System, order: int, route: str | None = None) -> Clusters:
    route = route or system.source.form
    if route == "spectrum":
        species, shift = landau_spectrum(system)
        ring, b = trapped_clusters(species, shift, order, 0, 2, area="count")
        return ring_native(ring, b, lambda n: sum(n))
    ring, b = level_clusters(landau_matrix(system), order)
    return ring_native(ring, b, lambda n: 1)


def _range_warnings(builder) -> None:
    """Warn where the linear lowest-Landau-level interpolation is not the physics: exchange
    parameters outside [0, 1]; mutual parameters outside [0, 1), since a mutual parameter 1 is
    no coupling (period 1) while the interpolated states at 1 are the left limit (the relative
    state l = -1 joins the lowest level exactly there)."""
    values = [(f"exchange parameter of {s.name}", s.exchange, s.span, False) for s in builder.species.values()]
    values += [(f"mutual parameter of {m.first} and {m.second}", m.value, m.span, True) for m in builder.mutuals]
    for what, value, span, mutual in values:
        if value.is_number:
            if mutual and value == 1:
                builder.warnings.append((f"the {what} is 1, which means no braiding (period 1), but the "
                                      "lowest-Landau-level interpolation holds on [0, 1) only: the results are "
                                      "its left limit, not the uncoupled gas (declare 0 for that)", span))
            elif not (0 <= value <= 1):
                builder.warnings.append((f"the {what} is {value}, outside [0, 1] where the lowest-Landau-level "
                                      "states interpolate linearly; results there are the linear continuation",
                                      span))
            continue
        poly = sympy.Poly(value, *value.free_symbols) if value.is_polynomial() else None
        inside = poly is not None and poly.total_degree() <= 1 and all(c >= 0 for c in poly.coeffs()) \
            and all(builder.within_unit(symbol) for symbol in value.free_symbols) and sum(poly.coeffs()) <= 1
        if inside and mutual and sum(poly.coeffs()) == 1:
            # the value reaches 1 when every parameter is at its upper end: open there, or not inside
            inside = any(builder.parameters[sym.name].upper_open or builder.parameters[sym.name].upper < 1
                         for sym in value.free_symbols if poly.coeff_monomial(sym) != 0)
        if not inside:
            interval = "[0, 1)" if mutual else "[0, 1]"
            builder.warnings.append((f"the lowest-Landau-level states interpolate linearly only for the {what} in "
                                  f"{interval}; declare a range that keeps {value} inside {interval} to say so",
                                  span))


class LandauRegime(Regime):
    """`clusters landau [spectrum]`: anyons in the lowest Landau level, per rho_L."""

    kind = "landau"
    forms = ("exclusion", "spectrum")

    takes_matrix_hint = "; the lowest Landau level takes it from the exchange and mutual parameters"

    def check(self, builder, source, names):
        if builder.dimension != 2:
            raise InputError(f"the lowest Landau level lives in the plane; declare `dimension 2`, "
                             f"not {builder.dimension}", source.span)
        _range_warnings(builder)
        masses = {sympy.srepr(s.mass) for s in builder.species.values()}
        if len(masses) > 1:
            builder.warnings.append(("masses do not enter the lowest Landau level (all species are taken to "
                                     "carry the same charge, hence the same degeneracy per area)", source.span))
        return source

    def refuse_boltzmann(self, species):
        raise InputError(f"species {species.name} is boltzmann (distinguishable particles), which the lowest "
                         "Landau level does not describe; declare it bose, fermi or with an exchange parameter",
                         species.span)

    def clusters(self, plan) -> Clusters:
        return landau_clusters(plan.system, plan.order)

    def quantities(self, system) -> Quantities:
        return LANDAU

    def regulator_work(self, system, order):
        if system.source.form != "spectrum":
            return None
        from .spectrum import regulator_operations
        # the shifts carry the exchange and mutual parameters (not `landau_matrix`: K^2 look-ups)
        values = [s.exchange for s in system.species] + [m.value for m in system.mutuals]
        symbols = set().union(*(sympy.sympify(v).free_symbols for v in values))
        return regulator_operations([1] * len(system.species), order, 0, len(symbols))

    def matrix(self, system):
        return landau_matrix(system)

    def equation_of_state(self, system, span=None):
        """The one-level closed form with the exchange matrix (Isakov, Mashkevich, Ouvry, Nucl. Phys. B
        448 (1995) 457), in the fillings nu_i = rho_i / rho_L; both routes of the regime give it."""
        from ..eos.level import LevelEquationOfState
        return LevelEquationOfState(system, landau_matrix(system), landau=True)

    def text_lines(self, system) -> list[str]:
        head = ["regime: lowest Landau level, beta P / rho_L = sum_n b_n z^n, virial coefficients in "
                "nu = rho / rho_L (rho_L = eB/h, all species with the same charge); route: "
                + ("harmonic regulator on the declared LLL spectrum" if system.source.form == "spectrum"
                   else "exclusion statistics with g_ii = alpha_i, g_ij = alpha_ij")]
        return head + wu_text(landau_matrix(system), system.species_names, True, "beta P / rho_L = ")

    def latex_paragraphs(self, system, labels) -> list[str]:
        text = (r"Lowest Landau level (all species with the same charge, degeneracy $\rho_L=eB/h$ per area): "
                r"$\beta P/\rho_L=\sum_n b_n z^n$ and the virial coefficients are those of $\nu=\rho/\rho_L$. "
                r"Statistics matrix $g_{ii}=\alpha_i$, $g_{ij}=\alpha_{ij}$.")
        return wu_latex(landau_matrix(system), labels, True, text, lambda logs: rf"\beta P/\rho_L={logs}")
