"""Exclusion statistics (route R5): cluster coefficients from a K x K statistics matrix, exactly.

Index convention (Haldane's counting): g[i][j] = -dd_i/dN_j, the number of single-particle states of
species i lost per particle of species j added. Wu's distribution then reads, per level, with
u_i = 1/w_i and xi_i = z_i e^{-beta eps_i},

    u_i = xi_i (1 + u_i) prod_j (1 + u_j)^(-g_ji),        beta P / (states) = sum_i ln(1 + u_i).

The per-level cluster coefficients b^lev_n (coefficient of xi^n in sum_i ln(1 + u_i)) follow in
closed form from Good's multivariate Lagrange inversion with phi_i(u) = (1 + u_i) prod_j (1+u_j)^(-g_ji):

    [xi^n] F(u(xi)) = [u^n] F(u) prod_i phi_i^{n_i} det(delta_ij - u_j d_j ln phi_i).

Here prod_i phi_i^{n_i} = prod_j (1 + u_j)^{e_j}, e_j = n_j - sum_i g_ji n_i, and the determinant is
det(1 - C diag(q)), C_ij = delta_ij - g_ji, q_j = u_j/(1 + u_j), whose principal-minor expansion
sum_S (-1)^|S| det(C_SS) prod_{j in S} q_j leaves only one-variable coefficient extractions:

    b^lev_n = sum_S (-1)^|S| det(C_SS) sum_i L_i(S) prod_{j != i} binom(e_j - s_j, n_j - s_j),
    L_i(S) = sum_{k=1}^{n_i - s_i} ((-1)^(k+1)/k) binom(e_i - s_i, n_i - s_i - k),

with s_j = 1 for j in S. Binomials of polynomial tops are falling factorials; no series inversion
and no fixed point is needed, so any order and symbolic matrices cost little.

Continuum gas in d dimensions: the levels are momentum cells shared by all species, eps_i(k) =
hbar^2 k^2 / 2 m_i, so integrating over k gives b_n = b^lev_n (sum_i n_i m_ref / m_i)^(-d/2).
"""
from __future__ import annotations

from fractions import Fraction
from itertools import combinations
from typing import Sequence

import sympy

from ..errors import InputError
from ..exact.series import PolynomialRing, collect_atoms, indices_up_to
from .base import THERMAL, Clusters, Quantities, Regime, ring_native, sympy_values

Index = tuple[int, ...]


def statistics_ring(g: Sequence[Sequence[object]], extra_atoms=(), backend: str | None = None) -> PolynomialRing:
    """A ring with K expansion variables over the atoms of the matrix entries."""
    K = len(g)
    entries = [sympy.sympify(x) for row in g for x in row]
    return PolynomialRing(K, collect_atoms(entries + list(extra_atoms)), backend=backend)


def level_clusters(g: Sequence[Sequence[object]], order: int, ring: PolynomialRing | None = None,
                   indices: Sequence[Index] | None = None) -> tuple[PolynomialRing, dict[Index, object]]:
    """Per-level cluster coefficients b^lev_n for 1 <= |n| <= order as ring elements.

    >>> g = sympy.Symbol("g")
    >>> ring, b = level_clusters([[g]], 3)
    >>> sympy.factor(ring.to_expr(b[(3,)]))
    (3*g - 2)*(3*g - 1)/6
    """
    K = len(g)
    if any(len(row) != K for row in g):
        raise ValueError("the statistics matrix must be square")
    ring = ring or statistics_ring(g)
    G = [[ring.from_expr(sympy.sympify(g[i][j])) for j in range(K)] for i in range(K)]
    C = [[(ring.one if i == j else ring.zero) - G[j][i] for j in range(K)] for i in range(K)]
    minors: dict[tuple[int, ...], object] = {(): ring.one}
    out: dict[Index, object] = {}
    for n in (indices if indices is not None else indices_up_to(K, order)):
        out[tuple(n)] = _level_coefficient(ring, G, C, tuple(n), minors)
    return ring, out


def _level_coefficient(ring, G, C, n: Index, minors) -> object:
    K = len(n)
    support = [j for j in range(K) if n[j]]
    # e_j = n_j - sum_i g_ji n_i
    e = []
    for j in range(K):
        acc = ring.constant(n[j])
        for i in range(K):
            if n[i]:
                acc = acc - G[j][i] * ring.rational(n[i])
        e.append(acc)
    total = ring.zero
    for size in range(len(support) + 1):
        for S in combinations(support, size):
            det = _minor(ring, C, S, minors)
            if ring.is_zero(det):
                continue
            s = [1 if j in S else 0 for j in range(K)]
            binoms = [_binomials(ring, e[j] - ring.rational(s[j]), n[j] - s[j]) for j in range(K)]
            inner = ring.zero
            for i in support:
                if n[i] - s[i] < 1:
                    continue
                top = binoms[i]
                L = ring.zero
                for k in range(1, n[i] - s[i] + 1):
                    L = L + top[n[i] - s[i] - k] * ring.rational(Fraction((-1) ** (k + 1), k))
                prod = L
                for j in range(K):
                    if j != i:
                        prod = prod * binoms[j][n[j] - s[j]]
                inner = inner + prod
            term = det * inner
            total = total - term if size % 2 else total + term
    return total


def _binomials(ring, top, kmax: int) -> list:
    """binom(top, k) for k = 0..kmax (top a ring element): falling factorials over k!."""
    out = [ring.one]
    for k in range(1, kmax + 1):
        out.append(out[-1] * (top - ring.rational(k - 1)) * ring.rational(Fraction(1, k)))
    return out


def _minor(ring, C, S: tuple[int, ...], cache) -> object:
    """det(C_SS) by Laplace expansion along the first row (cached by S)."""
    if S in cache:
        return cache[S]
    if len(S) == 1:
        value = C[S[0]][S[0]]
    else:
        value = ring.zero
        first, rest = S[0], S[1:]
        for pos, col in enumerate(S):
            sub_cols = S[:pos] + S[pos + 1:]
            value = value + C[first][col] * _minor_cols(ring, C, rest, sub_cols, cache) * ring.rational((-1) ** pos)
    cache[S] = value
    return value


def _minor_cols(ring, C, rows, cols, cache):
    if rows == cols:
        return _minor(ring, C, rows, cache)
    key = ("rc", rows, cols)
    if key in cache:
        return cache[key]
    if len(rows) == 1:
        value = C[rows[0]][cols[0]]
    else:
        value = ring.zero
        for pos, col in enumerate(cols):
            value = value + C[rows[0]][col] * _minor_cols(ring, C, rows[1:], cols[:pos] + cols[pos + 1:], cache) \
                * ring.rational((-1) ** pos)
    cache[key] = value
    return value


def continuum_factor(index: Index, masses: Sequence[sympy.Expr], m_ref: sympy.Expr, d: int) -> sympy.Expr:
    """(sum_i n_i m_ref / m_i)^(-d/2): the k integral of prod_i e^{-beta n_i eps_i(k)} in units of
    lambda_ref^-d."""
    inverse = sympy.Add(*(n * m_ref / m for n, m in zip(index, masses) if n))
    return sympy.powsimp(sympy.Pow(inverse, -sympy.Rational(d, 2)))


def equal_masses(masses: Sequence[sympy.Expr]) -> bool:
    return all(sympy.simplify(m - masses[0]) == 0 for m in masses)


# --- the regime -----------------------------------------------------------------------------------

LEVEL = Quantities(
    pressure="beta P / (states)", density="N_{i} / (states)", variable="(N / states)",
    single="N_i / (states) = particles of species i per single-particle state (one level); "
           "b_(single particle) = 1, a_(single particle) = 1",
    unit="states", pressure_latex=r"\beta P/(\text{{states}})", density_latex=r"N_{{{label}}}/(\text{{states}})",
    variable_latex=r"(N/\text{{states}})", single_latex=r"densities are particles per single-particle state "
                                                         r"(one level); single-particle $b=1$")


def wu_exponents(g, i: int) -> list[tuple[int, object]]:
    """Wu's equation for species i, u_i = z_i prod_j (1 + u_j)^(delta_ij - g_ji): the nonzero exponents."""
    out = []
    for j in range(len(g)):
        exponent = (1 if i == j else 0) - g[j][i]
        if exponent != 0:
            out.append((j, exponent))
    return out


def wu_text(g, names, level: bool, pressure_head: str) -> list[str]:
    """Wu's equations and the pressure, plain text."""
    equations = []
    for i, n in enumerate(names):
        factors = [f"(1 + u_{names[j]})" if e == 1 else f"(1 + u_{names[j]})^({e})" for j, e in wu_exponents(g, i)]
        argument = f"z_{n}" if level else f"z_{n} exp(-beta eps_{n}(k))"
        equations.append(f"u_{n} = {argument} " + " ".join(factors))
    return ["equation of state: " + "; ".join(equations),
            pressure_head + " + ".join(f"ln(1 + u_{n})" for n in names)]


def wu_latex(g, labels, level: bool, text: str, pressure_head) -> list[str]:
    """Wu's equations and the pressure in a gather* block after `text`; `pressure_head(logs)`."""
    equations = []
    for i, label in enumerate(labels):
        factors = [rf"(1+u_{{{labels[j]}}})" + ("" if e == 1 else rf"^{{{sympy.latex(e)}}}")
                   for j, e in wu_exponents(g, i)]
        argument = rf"z_{{{label}}}" if level else rf"z_{{{label}}}e^{{-\beta\varepsilon_{{{label}}}(k)}}"
        equations.append(rf"u_{{{label}}}={argument}" + "".join(factors))
    logs = "+".join(rf"\ln(1+u_{{{l}}})" for l in labels)
    return [text + " Equation of state:",
            r"\begin{gather*}", r" \\ ".join(equations) + r" \\", pressure_head(logs), r"\end{gather*}"]


# --- its part of the input -------------------------------------------------------------------------

def exclusion_matrix(builder, names: list[str]) -> tuple[tuple[tuple[sympy.Expr, ...], ...], set]:
    """The statistics matrix from `statistics` statements (entries or a whole matrix), the diagonal
    defaulting to the exchange parameters, and the set of defaulted diagonal entries."""
    K = len(names)
    g: list[list | None] = [None] * K   # rows with no stated entry stay None until the defaults
    for tree, file in builder.statistics:
        builder.file = file
        if tree.data == "statistics_matrix":
            rows = tree.children
            widths = [len(r.children) for r in rows]
            if len(rows) != K or any(w != K for w in widths):
                shape = f"{len(rows)} x {max(widths)}" if len(set(widths)) == 1 else \
                    f"{len(rows)} rows of lengths {', '.join(map(str, widths))}"
                raise InputError(f"the statistics matrix is {shape} but {K} species are declared "
                                 f"({', '.join(names)}): it must be {K} x {K}", builder.span(tree))
            for i, row in enumerate(rows):
                for j, entry in enumerate(row.children):
                    _set_entry(builder, g, i, j, entry, tree)
        else:
            first, second, value = tree.children
            i, j = names.index(builder.known_species(first)), names.index(builder.known_species(second))
            _set_entry(builder, g, i, j, value, first)
    builder.file = builder.main
    species = list(builder.species.values())
    defaulted = {i for i in range(K) if g[i] is None or g[i][i] is None}
    zero = sympy.Integer(0)
    for i in range(K):   # row by row at list speed: thousands of species make millions of entries
        row = g[i] if g[i] is not None else [None] * K
        if row[i] is None:
            row[i] = species[i].exchange
        g[i] = [zero if entry is None else entry for entry in row] if None in row else row
    return tuple(tuple(row) for row in g), defaulted



def _set_entry(builder, g, i, j, tree, where):
    if g[i] is None:
        g[i] = [None] * len(g)
    if g[i][j] is not None:
        names = list(builder.species)
        raise InputError(f"statistics entry g[{names[i]},{names[j]}] is given twice", builder.span(where))
    value = builder.expr(tree)
    if value.is_real is False:
        raise InputError("statistics matrix entries must be real", builder.span(tree))
    g[i][j] = value



def _diagonal_warnings(builder, g, defaulted) -> None:
    """An exchange parameter taken as the diagonal g of exclusion statistics is used as written: g is
    not periodic, while the anyon's exchange parameter has period 2. Warn outside [0, 1]."""
    for i, s in enumerate(builder.species.values()):
        if i not in defaulted or s.statistics is not None or s.exchange == 0:
            continue
        value = s.exchange
        inside = (value.is_number and 0 <= value <= 1) or (value.is_Symbol and builder.within_unit(value))
        if not inside:
            builder.warnings.append((f"the exchange parameter of {s.name} ({value}) is taken as the exclusion "
                                  f"statistics g_{s.name}{s.name} = {value}, which is not periodic (the anyon's "
                                  "exchange parameter has period 2); outside [0, 1] the two differ: declare "
                                  f"`statistics {s.name} {s.name} = ...` to choose g", s.span))


class ExclusionRegime(Regime):
    """`clusters exclusion [level]`: Haldane-Wu exclusion statistics with a K x K matrix, on one level
    or in the d-dimensional continuum."""

    kind = "exclusion"
    forms = ("continuum", "level")
    takes_matrix = True

    def refuse_boltzmann(self, species):
        raise InputError(f"species {species.name} is boltzmann (distinguishable particles), which exclusion "
                         "statistics does not describe; declare it bose, fermi or with an exchange parameter",
                         species.span)

    def check(self, builder, source, names):
        from ..model import Source
        matrix, defaulted = exclusion_matrix(builder, names)
        source = Source("exclusion", source.span, form=source.form, matrix=matrix)
        _diagonal_warnings(builder, matrix, defaulted)
        if builder.mutuals:
            builder.warnings.append(("mutual (braiding) parameters do not enter exclusion statistics; "
                                     "they are ignored here (declare `statistics A B = ...`)", builder.mutuals[0].span))
        return source

    def clusters(self, plan) -> Clusters:
        system = plan.system
        g = system.source.matrix
        ring, b = level_clusters(g, plan.order)
        if system.source.form == "level":
            return ring_native(ring, b, lambda n: 1)
        masses = [s.mass for s in system.species]
        d = system.dimension
        if equal_masses(masses) and d == 2:
            return ring_native(ring, b, lambda n: Fraction(1, sum(n)))
        m_ref = system.reference_mass
        return sympy_values(ring, b, lambda n: continuum_factor(n, masses, m_ref, d))

    def quantities(self, system) -> Quantities:
        return LEVEL if system.source.form == "level" else THERMAL

    def statistics(self, system, i: int):
        # the matrix, not the exchange parameter, decides the statistics (an undeclared species is not
        # "exchange 0")
        return "g", system.source.matrix[i][i]

    def matrix(self, system):
        return system.source.matrix

    def equation_of_state(self, system, span=None):
        """One level: the closed form for any matrix; the continuum: the momentum-cell integral."""
        if system.source.form == "level":
            from ..eos.level import LevelEquationOfState
            return LevelEquationOfState(system, system.source.matrix, landau=False)
        from ..eos.continuum import ContinuumEquationOfState
        return ContinuumEquationOfState(system)

    def text_lines(self, system) -> list[str]:
        level = system.source.form == "level"
        head = ["regime: exclusion statistics (Haldane's g_ij = -d(states of i)/d(particles of j)), "
                + ("one single-particle level: beta P / (states) = sum_n b_n z^n" if level else
                   f"continuum in d = {system.dimension}, levels = momentum cells shared by all species, "
                   "eps_i(k) = hbar^2 k^2 / 2 m_i")]
        pressure = "beta P / (states) = " if level else "beta P lambda^d = integral d^dk lambda^d/(2 pi)^d of "
        return head + wu_text(system.source.matrix, system.species_names, level, pressure)

    def latex_paragraphs(self, system, labels) -> list[str]:
        if system.source.form == "level":
            text = (r"Exclusion statistics on one single-particle level, Haldane's $g_{ij}=-\partial d_i/\partial N_j$: "
                    r"$\beta P/(\text{states})=\sum_n b_n z^n$.")
            return wu_latex(system.source.matrix, labels, True, text, lambda logs: rf"\beta P/(\text{{states}})={logs}")
        text = (rf"Exclusion statistics in the continuum, $d={system.dimension}$, Haldane's "
                r"$g_{ij}=-\partial d_i/\partial N_j$; the levels are momentum cells shared by all species, "
                r"$\varepsilon_i(k)=\hbar^2k^2/2m_i$.")
        w = "{" + system.typesetting.wavelength + "}"
        return wu_latex(system.source.matrix, labels, False, text,
                        lambda logs: rf"\beta P{w}^d=\int\frac{{d^dk\,{w}^d}}{{(2\pi)^d}}\,\bigl[{logs}\bigr]")
