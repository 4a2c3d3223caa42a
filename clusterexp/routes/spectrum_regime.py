"""The regime of declared trapped spectra (`clusters spectrum { ... }`): its block (one-body levels per
species, their filling, the energy shift in the particle numbers N_X, explicit trapped partition
functions, the area weight) validated with spans, its quantities and statements; the computation is
`routes.spectrum` (harmonic regulator, route R2)."""
from __future__ import annotations

import sympy

from ..errors import InputError, Span
from ..model import Spectrum
from ..exact.periods import species_statistics
from .base import THERMAL, Clusters, Quantities, Regime, rational_weight, ring_native, sympy_values
from .spectrum import SpeciesSpectrum, SpectrumError, area_weight, harmonic_levels, trapped_clusters

TRAP = sympy.Symbol("x")   # x = exp(-beta hbar omega) in a declared spectrum


def declared_spectrum(builder, names: list[str], span: Span) -> Spectrum:
    K = len(names)
    species = list(builder.species.values())
    if "x" in builder.parameters:
        raise InputError("`x` stands for exp(-beta hbar omega) in a declared spectrum; rename the parameter x",
                         builder.parameters["x"].span)
    counts = tuple(sympy.Symbol(f"N_{n}", integer=True, nonnegative=True) for n in names)
    count_of = dict(zip(names, counts))
    levels: list = [None] * K
    fill: list = [None] * K
    shift = None
    trapped = {}
    area = None
    for item, file in builder.spectrum_items:
        builder.file = file
        kind = item.data
        if kind == "levels":
            i = names.index(builder.known_species(item.children[0]))
            if levels[i] is not None:
                raise InputError(f"levels of {names[i]} are given twice", builder.span(item.children[0]))
            levels[i] = _trap_expr(builder, item.children[1])
        elif kind in ("fill_bose", "fill_fermi"):
            i = names.index(builder.known_species(item.children[0]))
            if fill[i] is not None:
                raise InputError(f"the filling of {names[i]} is given twice", builder.span(item.children[0]))
            fill[i] = kind[len("fill_"):]
        elif kind == "shift":
            if shift is not None:
                raise InputError("`shift` is given twice", builder.span(item))
            shift = builder.expr(item.children[0], extra=count_of)
            if shift.is_real is False:
                raise InputError("the energy shift must be real", builder.span(item.children[0]))
        elif kind == "trapped":
            ref, value = item.children
            if str(ref.children[0]) != "Z":
                raise InputError(f"write trapped Z[...] = ..., not {ref.children[0]}[...]", builder.span(ref.children[0]))
            index = builder.multi_index(ref, names)
            if index in trapped:
                raise InputError(f"Z{list(index)} is given twice", builder.span(ref))
            trapped[index] = _trap_expr(builder, value)
        else:
            word = "mass" if kind == "area_mass" else str(item.children[0])
            if word not in ("mass", "count", "one"):
                raise InputError(f"`area` is mass, count or one, not '{word}'", builder.span(item.children[0]))
            if area is not None:
                raise InputError("`area` is given twice", builder.span(item))
            area = word
    builder.file = builder.main
    for i, s in enumerate(species):
        if levels[i] is None:
            levels[i] = harmonic_levels(builder.dimension)
        if fill[i] is None:
            statistics = species_statistics(s, builder.by_symbol())
            if statistics not in ("bose", "fermi"):
                raise InputError(f"say how {s.name} fills the levels (`fill {s.name} bose` or `fill {s.name} fermi`): "
                                 "its statistics is neither bose nor fermi (modulo the exchange period 2)", s.span)
            fill[i] = statistics
    builder.no_mutuals("declared spectra carry their pair phases in `shift`; they")
    return Spectrum(tuple(levels), tuple(fill), shift if shift is not None else sympy.Integer(0), counts,
                    tuple(sorted(trapped.items())), area or "mass", span)



def _trap_expr(builder, tree) -> sympy.Expr:
    value = builder.expr(tree, extra={"x": TRAP})
    if not value.has(TRAP):
        raise InputError("this function of x = exp(-beta hbar omega) does not contain x", builder.span(tree))
    return value


# --- the regime -----------------------------------------------------------------------------------

COUNT = Quantities(
    pressure="beta P / rho_0", density="nu_{i}", variable="nu",
    single="nu_i = rho_i / rho_0, rho_0 the one-body degeneracy per area of the declared levels (weight |n|, "
           "as in the lowest Landau level); b_(single particle) = 1, a_(single particle) = 1",
    unit="rho_0", pressure_latex=r"\beta P/\rho_0", density_latex=r"\nu_{{{label}}}", variable_latex=r"\nu",
    single_latex=r"$\nu_i=\rho_i/\rho_0$, $\rho_0$ the one-body degeneracy per area of the declared levels "
                 r"(weight $|n|$); single-particle $b=1$")

TRAPPED = Quantities(
    pressure="ln Xi_trap / Z_1", density="N_{i} / Z_1", variable="(N / Z_1)",
    single="the trapped gas itself: every quantity per one-body partition function Z_1 of the reference "
           "species; b_(single particle) = 1, a_(single particle) = 1",
    unit="Z_1", pressure_latex=r"\ln\Xi_{{\mathrm{{trap}}}}/Z_1", density_latex=r"N_{{{label}}}/Z_1",
    variable_latex=r"(N/Z_1)", single_latex=r"the trapped gas itself, every quantity per one-body partition "
                                            r"function $Z_1$ of the reference species; single-particle $b=1$")


class SpectrumRegime(Regime):
    """`clusters spectrum { ... }`: a declared trapped spectrum, thermodynamic limit taken exactly with
    the harmonic regulator (route R2) and the declared area weight."""

    kind = "spectrum"
    no_equation_of_state = "a declared trapped spectrum"
    forms = ()   # `clusters spectrum { ... }`: a grammar block of its own

    def check(self, builder, source, names):
        from ..model import Source
        return Source("spectrum", source.span, spectrum=declared_spectrum(builder, names, source.span))

    def clusters(self, plan) -> Clusters:
        system = plan.system
        spec = system.source.spectrum
        species = [SpeciesSpectrum(levels, fill, s.mass) for levels, fill, s in
                   zip(spec.levels, spec.fill, system.species)]
        counts = spec.counts

        def shift(n):
            return spec.shift.subs(dict(zip(counts, n)))
        reference = system.species_index(system.reference)
        try:
            ring, b = trapped_clusters(species, shift, plan.order, reference, system.dimension, spec.area,
                                       trapped=dict(spec.trapped))
        except SpectrumError as error:
            raise InputError(str(error), spec.span) from None
        masses = [s.mass for s in system.species]
        m_ref = system.reference_mass
        weights = {n: area_weight(n, masses, m_ref, system.dimension, spec.area) for n in b}
        if all(w.is_Rational for w in weights.values()) and all(weights[n] == 1 for n in b if sum(n) == 1):
            return ring_native(ring, b, lambda n: rational_weight(weights[n]))
        return sympy_values(ring, b, weights.__getitem__)

    def regulator_work(self, system, order):
        from .spectrum import X, pole_orders, regulator_operations
        spectrum = system.source.spectrum
        try:
            poles = pole_orders(spectrum.levels)
        except SpectrumError:
            return None                                  # the route reports it, at once
        symbols = set(sympy.sympify(spectrum.shift).free_symbols) - set(spectrum.counts)
        for level in spectrum.levels:
            symbols |= sympy.sympify(level).free_symbols - {X}
        return regulator_operations(poles, order, system.species_index(system.reference), len(symbols))

    def quantities(self, system) -> Quantities:
        return {"count": COUNT, "one": TRAPPED}.get(system.source.spectrum.area, THERMAL)

    def text_lines(self, system) -> list[str]:
        spec = system.source.spectrum
        names = system.species_names
        weight = {"count": "|n| ", "one": ""}.get(spec.area, "(M_n/m_ref)^(d/2) ")
        return ["regime: declared trapped spectrum, x = exp(-beta hbar omega); "
                f"b_n = {weight}lim_(omega->0) [z^n] ln Xi_trap / Z_1,ref(x)",
                "levels: " + "; ".join(f"{n}: {lv} ({fill})" for n, lv, fill in zip(names, spec.levels, spec.fill)),
                f"energy shift / hbar omega: {spec.shift} (N_X = number of particles of species X)"]

    def latex_paragraphs(self, system, labels) -> list[str]:
        spec = system.source.spectrum
        weight = {"count": r"|n|", "one": ""}.get(spec.area, r"(M_n/m_{\mathrm{ref}})^{d/2}")
        rows = ", ".join(f"${l}$: $L(x)={sympy.latex(lv)}$ ({fill})" for l, lv, fill in zip(labels, spec.levels, spec.fill))
        return [r"Declared trapped spectrum, $x=e^{-\beta\hbar\omega}$: "
                rf"$b_n={weight}\lim_{{\omega\to0}}[z^n]\ln\Xi_{{\mathrm{{trap}}}}/Z_{{1,\mathrm{{ref}}}}(x)$; "
                rf"one-body levels {rows}; energy shift $\hbar\omega\,({sympy.latex(spec.shift)})$ "
                r"with $N_X$ the number of particles of species $X$."]
