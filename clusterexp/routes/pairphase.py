"""Pair phases in the plane (route R3): exact two-body cluster coefficients, the pieces known exactly
(ideal species modulo the exchange period, species that do not braid), and the regime itself; the
many-body pieces stay named (`pieces`) unless given, and truncated series are kept honest
(`expansions`).

Harmonic regulator (x = e^{-beta hbar omega}): the relative motion of two particles has energies
hbar omega (2 n_r + |l + s| + 1). Summing the channels in closed form for s in its fundamental interval:

    identical (l even, s = alpha in [0, 2)):   Z_rel = x (x^s + x^{2-s}) / (1 - x^2)^2,
    distinct  (all l,  s = alpha_ij in [0, 1)): Z_rel = x (x^s + x^{1-s}) / ((1 - x)(1 - x^2)).

The centre of mass (mass M = m_i + m_j, same omega) has the one-body spectrum, so with the R2 weight
(M/m_ref)^{d/2}, d = 2,

    b_2(alpha)  - b_2(0)  = 2 lim [Z_rel(s) - Z_rel(0)] = s^2/2 - s,
    b_11(alpha) - b_11(0) = (M/m_ref) lim [Z_rel(s) - Z_rel(0)] = -(M/2 m_ref) s (1 - s).

Hence b_2 = (m_i/m_ref)(1/4 - s + s^2/2) with s = alpha mod 2 (even, period 2, kink at the boson
points), b_11 = -((m_i + m_j)/(2 m_ref)) s(1 - s) with s = alpha_ij mod 1. A static flux tube of flux
gamma (in flux quanta) shifts a mobile particle's partition function by -s(1 - s)/2, s = gamma mod 1,
independently of temperature and mass; each l-cycle of an ideal mobile species feels it once.
"""
from __future__ import annotations

import sympy

from ..exact.periods import PeriodicPart, braids, coupled_groups, reduced, species_statistics
from .base import Clusters, Regime
from .tube_pieces import (anyon_tube_symbol, braid_tube_symbol, braiding_pairs, pieces_of, tube_piece,
                          two_tubes_symbol)


def exchange_b2(alpha: sympy.Expr, mass_ratio: sympy.Expr, parameters) -> sympy.Expr:
    """b_{2 e_i} of identical anyons with exchange parameter alpha (period 2)."""
    s = reduced(alpha, 2, parameters)
    return _tidy(mass_ratio * (sympy.Rational(1, 4) - s + s ** 2 / 2))


def mutual_b11(alpha_ij: sympy.Expr, total_mass_ratio: sympy.Expr, parameters) -> sympy.Expr:
    """b_{e_i + e_j} of two distinct species with mutual parameter alpha_ij (period 1)."""
    s = reduced(alpha_ij, 1, parameters)
    return _tidy(-total_mass_ratio * s * (1 - s) / 2)


def flux_shift(gamma: sympy.Expr, parameters) -> sympy.Expr:
    """Z(gamma) - Z(0) for one particle around one flux tube: -s(1 - s)/2, s = gamma mod 1."""
    s = reduced(gamma, 1, parameters)
    return _tidy(-s * (1 - s) / 2)


def _tidy(expr: sympy.Expr) -> sympy.Expr:
    """Expanded when polynomial in the parameters; the periodic (Mod) form is kept factored."""
    return expr if expr.has(PeriodicPart) else sympy.expand(expr)


def two_body_clusters(system, order: int) -> dict:
    """b_n for the pair-phase regime: b_{e_i} (with the first-order flux-tube shift), the exact
    |n| = 2 coefficients, the ideal-gas b_{l e_i} of species that are bosons or fermions modulo the
    exchange period 2 (with their tube shift), zero for every n whose species fall into groups that do
    not braid with each other (mutual parameters that are integers, period 1: the Hamiltonian
    separates and ln Xi is additive), and for everything else None (a many-body piece: a named symbol
    unless given)."""
    from ..exact.series import indices_up_to
    params = {p.symbol: p for p in system.parameters}
    species = system.species
    K = len(species)
    m_ref = system.reference_mass
    tubes = system.tubes
    shift = flux_shift(tubes.flux, params) * tubes.coverage if tubes is not None else sympy.Integer(0)
    # the coverage-squared term of every l-cycle (docs/tubes.md): n^2 T2 m_ref / (2 m_i), T2 named
    no_tube = tubes is None or sympy.sympify(tubes.flux).is_integer is True   # integer flux: no phase at all
    second = sympy.Integer(0) if no_tube or tubes.order == 1 else tubes.coverage ** 2 * two_tubes_symbol() / 2
    # `to order 2`: the coverage-squared parts of b_2 of anyons and b_11 of braiding pairs, four-body pieces
    squares = not no_tube and tubes.order == 2
    ideal = [species_statistics(s, params) for s in species]
    coupled = braiding_relation(system)
    out = {}
    for n in indices_up_to(K, order):
        occupied = [i for i in range(K) if n[i]]
        if len(occupied) == 1:
            i = occupied[0]
            l = n[i]
            ratio = species[i].mass / m_ref
            if l == 1:
                out[n] = sympy.expand(ratio + shift + second / ratio)
            elif ideal[i] in ("bose", "fermi"):  # ideal within the species: every l-cycle exact
                sign = 1 if ideal[i] == "bose" or l % 2 else -1
                out[n] = sympy.expand(sign * (ratio / sympy.Integer(l) ** 2 + shift / l + second / ratio))
            elif l == 2:   # identical anyons: the one-tube term of b_2 is the sampled piece B_anyon_tube_<name>
                tube = 0 if no_tube else tubes.coverage * anyon_tube_symbol(species[i].name)
                if squares:
                    tube += tubes.coverage ** 2 * anyon_tube_symbol(species[i].name, 2)
                out[n] = exchange_b2(species[i].exchange, ratio, params) + tube
            else:
                out[n] = None
        elif len(coupled_groups(occupied, coupled)) > 1:
            out[n] = sympy.Integer(0)  # species that do not braid with each other: no mixed b
        elif len(occupied) == 2 and sum(n) == 2:
            i, j = occupied
            name_i, name_j = system.species_names[i], system.species_names[j]
            # two braiding particles and one tube: the sampled piece B_braid_tube_<i>_<j> (docs/tubes.md)
            tube = 0 if no_tube else tubes.coverage * braid_tube_symbol(name_i, name_j)
            if squares:
                tube += tubes.coverage ** 2 * braid_tube_symbol(name_i, name_j, 2)
            total = (species[i].mass + species[j].mass) / m_ref
            out[n] = mutual_b11(system.mutual(name_i, name_j), total, params) + tube
        else:
            out[n] = None
    return out


def _anyonic(system) -> bool:
    params = {p.symbol: p for p in system.parameters}
    return any(species_statistics(s, params) not in ("bose", "fermi") for s in system.species)


def _first_order_only(system) -> bool:
    """Among tubes, results stop at the first order in the coverage when a two-body coefficient has a
    sampled one-tube piece (anyons: b_2; braiding species: b_11), whose coverage-squared term is a
    four-body piece (two mobile particles and two tubes), unless the input asks `to order 2` (then that
    term is a named piece); `to order 1` stops every species there."""
    if system.tubes.order is not None:
        return system.tubes.order == 1
    return _anyonic(system) or bool(braiding_pairs(system))


def braiding_relation(system):
    """coupled(i, j): False when species i and j surely do not braid (mutual parameter an integer,
    undeclared counts as 0), True otherwise (a braiding or undecided mutual parameter)."""
    params = {p.symbol: p for p in system.parameters}
    names = system.species_names

    def coupled(i: int, j: int) -> bool:
        return braids(system.mutual(names[i], names[j]), params) is not False
    return coupled


def separates(system, index) -> bool:
    """True when the species of `index` fall into groups that do not braid with each other: every
    coefficient (b, a, density, fugacity) at that multi-index vanishes exactly, whatever is given."""
    occupied = [i for i in range(len(index)) if index[i]]
    return len(occupied) > 1 and len(coupled_groups(occupied, braiding_relation(system))) > 1


ADJECTIVE = {"bose": "bosonic", "fermi": "fermionic"}
TUBES_SUPPORTED = ("supported in the input language: `tubes flux gamma coverage n` with `clusters pairphase` in "
                   "`dimension 2`: bose or fermi species that do not braid through the coverage squared (the piece "
                   "T_two_tubes), anyonic species through the first order (the piece B_anyon_tube_<species>), two "
                   "braiding species through the first order (the piece B_braid_tube_<A>_<B> in b_11), and with "
                   "`to order 2` through the coverage squared (the pieces B_anyon_two_tubes_<species>, "
                   "B_braid_two_tubes_<A>_<B>); more than two mobile particles with a tube stay named many-body pieces")


def known_piece(system, index) -> str | None:
    """Why b_index (|index| >= 3) of the pair-phase regime is known exactly, or None for a genuine
    many-body piece: the words of an error message refusing a given value for it."""
    params = {p.symbol: p for p in system.parameters}
    occupied = [i for i in range(len(index)) if index[i]]
    names = system.species_names
    if len(occupied) == 1:
        s = system.species[occupied[0]]
        stats = species_statistics(s, params)
        if stats in ("bose", "fermi") and not s.statistics:
            return (f"species {s.name} has exchange parameter {s.exchange}, which is {ADJECTIVE[stats]} modulo the "
                    f"period 2: an ideal {stats.capitalize()} gas, every b_l known exactly")
        if stats in ("bose", "fermi"):
            return f"species {s.name} is an ideal {stats.capitalize()} gas: every b_l is known exactly"
        return None
    if separates(system, index):
        groups = coupled_groups(occupied, braiding_relation(system))
        parts = " | ".join(", ".join(names[i] for i in sorted(g)) for g in groups)
        return (f"the species in it fall into groups that do not braid with each other ({parts}; a mutual "
                "parameter that is an integer, or undeclared, means no coupling, period 1): the Hamiltonian "
                "separates, ln Xi is additive and this mixed coefficient vanishes exactly")
    return None


def refuse_known_given(system) -> None:
    """A given b or a of the pair-phase regime must be a genuine many-body piece: refuse one whose value
    is known exactly (ideal species modulo the exchange period, species that do not braid)."""
    from ..errors import InputError
    for v in system.source.values:
        why = known_piece(system, v.index)
        if why:
            letter = "b" if v.kind == "cluster" else "a"
            raise InputError(f"{letter}{list(v.index)} is known exactly here, do not give it: {why}", v.span)


def virials_with_known_clusters(pieces: dict, given: dict, order: int, K: int, truncation=None) -> dict:
    """a_n for `clusters pairphase { a[...] = ... }` when some b_n with |n| >= 3 are known exactly (ideal
    species, species that do not braid) and the others are many-body pieces named or given as a_n.

    a_n = c_n b_n + (b_m with m < n) with c_n a nonzero constant, so the relations are triangular:
    every unknown b_n is a placeholder, solved (in increasing total order) from its a_n, which is the
    given value or the named a_n symbol; a known b_n gives its a_n through the reversion."""
    from ..naming import virial_symbol
    from ..exact.virial import cluster_to_virial
    placeholders = {n: sympy.Symbol(f"placeholder_b_{'_'.join(map(str, n))}") for n, v in pieces.items() if v is None}
    b = {n: placeholders.get(n, v) for n, v in pieces.items()}
    a = dict(cluster_to_virial(b, order, K, truncation=truncation).virial)
    solved: dict = {}
    for n in sorted(placeholders, key=lambda n: (sum(n), tuple(-k for k in n))):
        target = given.get(n, virial_symbol(n))
        expr = sympy.expand(sympy.sympify(a[n]).subs(solved))
        slope = sympy.diff(expr, placeholders[n])
        if slope == 0 or slope.has(*placeholders.values()):
            raise ValueError(f"a{list(n)} does not determine b{list(n)} linearly")
        solved[placeholders[n]] = sympy.expand((target - (expr - slope * placeholders[n])) / slope)
        a[n] = target
    for n, value in a.items():
        if n not in placeholders:
            a[n] = sympy.expand(sympy.sympify(value).subs(solved))
    return a


# --- the regime -----------------------------------------------------------------------------------

def _real_statistics(builder) -> None:
    """Pair phases need real statistics parameters for every allowed value of the declared parameters
    (the per-declaration checks only refuse what is surely complex, such as sqrt(-1))."""
    from ..errors import InputError
    entries = [(s.exchange, "the exchange parameter", s.span) for s in builder.species.values()]
    entries += [(m.value, f"the mutual parameter of {m.first} and {m.second}", m.span) for m in builder.mutuals]
    if builder.tubes is not None:
        entries.append((builder.tubes.flux, "the tube flux", builder.tubes.span))
    for value, what, span in entries:
        if builder.decide(lambda: value.is_real, span, f"{what} is real") is not True:
            raise InputError(f"{what} must be real: {value} is not real for every value of its parameters "
                             "(a phase e^(i pi alpha) needs real alpha)", span)


def _refuse_colliding_pieces(builder) -> None:
    """Among tubes each braiding pair has the piece B_braid_tube_<first>_<second>; species names with
    underscores could give two pairs one name (A_B with C, A with B_C): refused at the mutual line."""
    from ..errors import InputError
    from .tube_pieces import pair_splits
    names = list(builder.species)
    for m in builder.mutuals:
        if braids(m.value, builder.by_symbol()) is False:
            continue
        first, second = sorted((m.first, m.second), key=names.index)
        splits = pair_splits(names, f"{first}_{second}")
        if len(splits) > 1:
            raise InputError(f"species {first} and {second} braid among tubes, and their piece name "
                             f"{braid_tube_symbol(first, second)} would also name the pair "
                             f"{' and '.join(next(p for p in splits if p != (first, second)))}: rename a species "
                             "(fewer underscores)", m.span)


class PairPhaseRegime(Regime):
    """`clusters pairphase [{ given pieces }]` with optional `tubes`: exact two-body coefficients on the
    whole real line; many-body pieces named (unknown functions of the statistics parameters) or given,
    as cluster or as virial coefficients."""

    kind = "pairphase"
    no_equation_of_state = ("two-body pair phases (anyons in the continuum): the many-body problem is not "
                            "exactly solved")
    named_pieces = True
    sampled_by_loops = True
    takes_tubes = True
    takes_given_block = True
    computed = False   # like `given`: the exact two-body values are stated, the many-body pieces unknown

    def stated_for_estimate(self, system, order, detailed):
        from math import comb
        if detailed:
            return {n: v for n, v in two_body_clusters(system, order).items() if v is not None and sum(n) >= 2}, 0
        # beyond the detailed size, the pairs are counted as known and their terms as one (forming every
        # exact value costs sympy work per multi-index: 300 species to order 3 took five minutes)
        return {}, comb(len(system.species) + 1, 2) if order >= 2 else 0

    def check_given_index(self, index, span) -> None:
        from ..errors import InputError
        if sum(index) == 2:
            raise InputError("the two-body coefficients of pair phases are exact here; give only three-body "
                             "and higher ones", span)

    def check_given_value(self, value, span) -> None:
        from ..errors import InputError
        from ..exact.orders import truncation_problem
        problem = truncation_problem(value)
        if problem:
            raise InputError(problem, span)

    def check(self, builder, source, names):
        from ..errors import InputError
        if builder.dimension != 2 and builder.tubes is not None:
            raise InputError(f"flux tubes thread the plane (their Aharonov-Bohm phases are windings): declare "
                             f"`dimension 2`, not {builder.dimension}; {TUBES_SUPPORTED}", builder.tubes.span)
        if builder.dimension != 2:
            raise InputError(f"pair phases are a property of the plane; declare `dimension 2`, not {builder.dimension}",
                             source.span)
        _real_statistics(builder)
        if builder.tubes is not None:
            for p in builder.parameters.values():
                if tube_piece(p.symbol) is not None:   # it would be read as the unknown tube piece
                    raise InputError(f"the parameter name {p.name} is the name of a tube piece here (T_two_tubes, "
                                     "B_anyon_tube_<species>, B_braid_tube_<A>_<B>, B_anyon_two_tubes_<species>, "
                                     "B_braid_two_tubes_<A>_<B>); choose another name", p.span)
            _refuse_colliding_pieces(builder)
        return source

    def check_system(self, system) -> None:
        refuse_known_given(system)

    def refuse_boltzmann(self, species):
        from ..errors import NotSupportedYet
        raise NotSupportedYet(f"a boltzmann species ({species.name}) with `clusters pairphase`: its own b_l vanish "
                              "for l >= 2 but its braiding with other species is not yet derived; declare "
                              "it bose, fermi or with an exchange parameter", species.span)

    def _pieces(self, plan) -> dict:
        return plan.memo("pairphase", lambda: two_body_clusters(plan.system, plan.order))

    def clusters(self, plan) -> Clusters:
        from ..errors import InputError
        from ..naming import cluster_symbol
        from ..exact.virial import virial_to_cluster
        pieces = self._pieces(plan)
        given = plan.given_exact
        if plan.given_kind == "virial":
            from ..exact.virial import unit_index
            linear = [pieces[unit_index(plan.K, i)] for i in range(plan.K)]
            return Clusters(virial_to_cluster(plan.virial, plan.order, plan.K, linear=linear))
        out = {}
        for n, value in pieces.items():
            if n in given:
                if value is not None:
                    raise InputError(f"b{list(n)} is known exactly in this regime ({value}); do not give it",
                                     next(v.span for v in plan.system.source.values if v.index == n))
                value = given[n]
            out[n] = cluster_symbol(n) if value is None else value
        return Clusters(out)

    def virials(self, plan):
        if plan.given_kind != "virial":
            return None
        from ..errors import InputError
        from ..naming import virial_symbol
        from ..exact.virial import cluster_to_virial
        pieces = self._pieces(plan)
        exact = {n: v for n, v in pieces.items() if v is not None and sum(n) <= 2}
        a = dict(cluster_to_virial(exact, 2, plan.K, truncation=plan.shared_truncation).virial)
        given = plan.given_exact
        for n, value in pieces.items():
            if sum(n) <= 2:
                continue
            if n in given:
                if value is not None:
                    raise InputError(f"b{list(n)} is known exactly in this regime; give a{list(n)} only for "
                                     "many-body pieces", next(v.span for v in plan.system.source.values
                                                              if v.index == n))
                a[n] = given[n]
            else:
                a[n] = virial_symbol(n) if value is None else None
        if any(v is None for v in a.values()):  # some b_n with |n| >= 3 known exactly: solve triangularly
            return virials_with_known_clusters(pieces, given, plan.order, plan.K, truncation=plan.shared_truncation)
        return a

    def truncation(self, system) -> dict:
        tubes = system.tubes
        if tubes is None:
            return {}
        # bose/fermi species: every b_l through the coverage squared; anyons (b_2) and braiding pairs (b_11)
        # only through the first order unless `to order 2` (named coverage-squared pieces)
        return {tubes.coverage: 3 if not _first_order_only(system) else 2}

    def known_zero(self, system, index) -> bool:
        return separates(system, index)

    def text_lines(self, system) -> list[str]:
        lines = ["regime: pair phases in the plane (harmonic regulator on the relative motion): "
                 "b_(2 e_i) = (m_i/m_ref)(1/4 - s + s^2/2), s = alpha_i mod 2; "
                 "b_(e_i + e_j) = -((m_i + m_j)/(2 m_ref)) s(1 - s), s = alpha_ij mod 1; kinks where s = 0",
                 "many-body pieces (|n| >= 3 of anyonic or braiding species) are named symbols unless given; "
                 "O(p^k): terms from p^k on are unknown"]
        tubes = system.tubes
        if tubes is not None:
            k = self.truncation(system)[tubes.coverage]
            if tubes.value is not None:
                lines.append(f"tube coverage {tubes.coverage} = {tubes.value} (as declared); the values below are "
                             f"exact through {tubes.coverage}^{k - 1}, O({tubes.coverage}^{k}) unknown")
            lines.append(f"flux tubes: flux {tubes.flux} (flux quanta), {tubes.coverage} tubes per lambda^2, Poisson "
                         f"placed; b_(l e_i) of a bose/fermi species gains (+-1)^(l+1) [({tubes.coverage})/l (-s(1 - s)/2) + "
                         f"({tubes.coverage})^2 T_two_tubes m_ref/(2 m_i)], s = ({tubes.flux}) mod 1"
                         + (f"; an anyonic species gains the same terms in b_(e_i), and ({tubes.coverage}) "
                            "B_anyon_tube_<species>" + (f" + ({tubes.coverage})^2 B_anyon_two_tubes_<species>"
                                                        if tubes.order == 2 else "")
                            + " in b_(2 e_i)" if _anyonic(system) else "")
                         + (f"; two braiding species gain ({tubes.coverage}) B_braid_tube_<A>_<B>"
                            + (f" + ({tubes.coverage})^2 B_braid_two_tubes_<A>_<B>" if tubes.order == 2 else "")
                            + " in b_(e_A + e_B)" if braiding_pairs(system) else "")
                         + f"; O({tubes.coverage}^{k})")
            lines += [piece.text(system) for piece in pieces_of(system)]
        return lines

    def latex_paragraphs(self, system, labels) -> list[str]:
        text = (r"Pair phases in the plane (harmonic regulator on the relative motion): "
                r"$b_{2e_i}=\frac{m_i}{m_{\mathrm{ref}}}\bigl(\tfrac14-s+\tfrac{s^2}{2}\bigr)$ with "
                r"$s=\alpha_i\bmod 2$, and $b_{e_i+e_j}=-\frac{m_i+m_j}{2m_{\mathrm{ref}}}\,s(1-s)$ with "
                r"$s=\alpha_{ij}\bmod 1$; both have a kink where $s=0$. Many-body pieces are named symbols "
                r"unless given; $O(p^k)$ marks the first unknown power of $p$.")
        if system.tubes is not None:
            flux, coverage = sympy.latex(system.tubes.flux), sympy.latex(system.tubes.coverage)
            k = self.truncation(system)[system.tubes.coverage]
            text += (rf" Static flux tubes of flux ${flux}$ (flux quanta), ${coverage}$ tubes per $\lambda^2$ "
                     r"(Poisson placed): $b_{l e_i}$ of a bose/fermi species gains "
                     rf"$(\pm1)^{{l+1}}\frac{{{coverage}}}{{l}}\bigl(-\tfrac{{s(1-s)}}{{2}}\bigr)$, "
                     rf"$s=({flux})\bmod 1$, plus the coverage-squared term below; an anyonic species has these "
                     rf"terms in $b_{{e_i}}$ and its $b_{{2e_i}}$ gains ${coverage}$ times its anyon-tube piece; "
                     rf"the $b_{{e_i+e_j}}$ of two braiding species gains ${coverage}$ times their braid-tube piece; "
                     rf"$O({coverage}^{k})$. " + " ".join(piece.latex(system) for piece in pieces_of(system)))
            if system.tubes.value is not None:
                text += (rf" The coverage is declared as ${coverage}={sympy.latex(system.tubes.value)}$; the values "
                         rf"are exact through ${coverage}^{{{k - 1}}}$, $O({coverage}^{k})$ unknown.")
        return [text]
