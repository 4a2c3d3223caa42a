"""Flux tubes in the language beyond the first order: the named tube pieces T_two_tubes (one loop, two
tubes) and B_anyon_tube_<species> (two anyons, one tube) in the pair-phase regime (docs/tubes.md)."""
import json

import pytest
import sympy

import clusterexp
from clusterexp.export import latex_document, to_json, to_text


def values(text, kind="virial"):
    return {c.index: c.value for c in clusterexp.derive(text) if c.kind == kind}


def named(value, name):
    return next(s for s in sympy.sympify(value).free_symbols if s.name == name)


def free_bose_fermi_virial(l, fermi):
    """2D ideal gases: a_l = B_{l-1}/l! for bose, the same with a_2 = +1/4 for fermi [published:
    Viefers, Ravndal, Haugset, Am. J. Phys. 63 (1995) 369]; Bernoulli numbers from sympy, B_1 = -1/2."""
    if l == 1:
        return sympy.Integer(1)
    a = sympy.bernoulli(l - 1) / sympy.factorial(l)
    a = -sympy.Rational(1, 4) if l == 2 else a
    return -a if fermi and l == 2 else a


@pytest.mark.parametrize("word", ["bose", "fermi"])
def test_a_deterministic_winding_area_leaves_the_free_virial_coefficients(word):
    """A winding-area functional X equal to its mean F on every loop (T2 = F^2) only multiplies z by
    e^{n F}, so the equation of state in densities, hence every a_l through n^2, is the free one
    (derived, docs/tubes.md; free values published, see above). With the one-tube F = -s(1 - s)/2
    (Comtet, Georgelin, Ouvry, J. Phys. A 22 (1989) 3917, from memory)."""
    a = values(f"dimension 2 parameter n species A {word} tubes flux 1/3 coverage n clusters pairphase "
               "derive virial up to 4")
    F = -sympy.Rational(1, 3) * sympy.Rational(2, 3) / 2
    for (l,), value in a.items():
        assert value.getO() is not None or l == 1               # honest O(n^3)
        exact = sympy.expand(value.removeO())
        T2 = named(value, "T_two_tubes") if l > 1 else None
        at = exact.subs(T2, F ** 2) if T2 is not None else exact
        assert sympy.expand(at) == free_bose_fermi_virial(l, word == "fermi"), (l, value)
        if l > 1:   # the fluctuation T2 - F^2 does enter at n^2
            assert exact.coeff(named(value, "n"), 2) != 0


def test_the_coverage_squared_term_scales_with_the_inverse_mass():
    """For a species of mass ratio r the loop's winding areas are 1/r of the reference ones: with a
    deterministic X (T2 = F^2) the species' a_l are those of a free Bose gas of mass r, b_l = r/l^2,
    a_2 = -1/(4 r) (derived, docs/tubes.md; R2 weight of physics.md)."""
    a = values("dimension 2 parameter n species A bose species B bose mass 2 tubes flux 1/2 coverage n "
               "clusters pairphase derive virial up to 2")
    value = a[(0, 2)]
    at = sympy.expand(value.removeO().subs(named(value, "T_two_tubes"), sympy.Rational(1, 64)))
    assert at == -sympy.Rational(1, 8)
    assert a[(1, 1)] == 0   # species that do not braid: additive ln Xi at fixed tubes, so after the average


def test_anyons_among_tubes_compose_like_an_independent_series_inversion():
    """a_2 = -b_2/b_1^2 inverted with sympy's series in n (a general-purpose library, not the project's
    kernel), from b_1 = 1 + n F + n^2 T2/2 and b_2 = b_2(alpha) + n B: the language gives it through
    n^1 with O(n^2). b_2(alpha) = 1/4 - alpha + alpha^2/2 (Arovas, Schrieffer, Wilczek, Zee, Nucl. Phys.
    B 251 (1985) 117)."""
    a = values("dimension 2 parameter n parameter alpha in [0, 1] species A exchange alpha tubes flux 1/4 "
               "coverage n clusters pairphase derive virial up to 2")
    value = a[(2,)]
    n, alpha, B = named(value, "n"), named(value, "alpha"), named(value, "B_anyon_tube_A")
    F = -sympy.Rational(1, 4) * sympy.Rational(3, 4) / 2
    T2 = sympy.Symbol("T")
    b1 = 1 + n * F + n ** 2 * T2 / 2
    b2 = sympy.Rational(1, 4) - alpha + alpha ** 2 / 2 + n * B
    independent = sympy.series(-b2 / b1 ** 2, n, 0, 2).removeO()
    assert sympy.expand(value.removeO() - independent) == 0
    assert value.getO() == sympy.Order(n ** 2)
    # no tube: the exact free-anyon a_2 (Arovas et al. 1985)
    assert sympy.expand(value.removeO().subs(n, 0)) == -sympy.Rational(1, 4) + alpha - alpha ** 2 / 2


def test_anyon_tube_piece_at_the_boson_point_is_the_bose_cycle():
    """At alpha = 0 the piece is F/2 (the l = 2 cycle of the bose result): the series of a_2 about
    alpha = 0 starts at the free -1/4 with no term in n (the bose a_2 has none at first order;
    docs/tubes.md, derived)."""
    d = clusterexp.derive("dimension 2 parameter n parameter alpha in [0, 1] species A exchange alpha tubes flux 1/2 "
                          "coverage n clusters pairphase derive virial a[2] expand alpha about 0 to 1")
    series = d.series_of(d.coefficient("virial", (2,)))[0].polynomial
    n, alpha = named(series, "n"), named(series, "alpha")
    assert sympy.expand(series.subs(alpha, 0)) == -sympy.Rational(1, 4)
    slope = sympy.expand(series).coeff(alpha, 1)
    assert named(slope, "B_anyon_tube_A_alpha_1_above") is not None and slope.coeff(n, 0) == 1


def test_claims_involving_tube_pieces_are_undecided_with_their_condition_not_mismatched():
    d = clusterexp.derive("dimension 2 parameter n species A bose tubes flux 1/2 coverage n clusters pairphase "
                          "derive virial up to 2\n"
                          "claim a[2] = -1/4 + O(n^3)\n"
                          "claim a[2] = -1/4 + O(n^2)\n"
                          "claim a[2] = -1/3 + O(n^3)")
    undecided, proven, wrong = d.checks
    assert undecided.status == "undecided"
    assert [sympy.sstr(c) for c in undecided.conditions] == ["Eq(T_two_tubes, 1/64)"]   # T2 = F^2: C2 = 0
    assert proven.status == "proven"
    assert wrong.status == "mismatch"   # the piece-free part is wrong whatever T2 is


def test_flux_series_of_the_two_tube_piece_starts_at_zero():
    """T2 vanishes at integer flux (no tube, period 1; a fact of the trade); through g^2 it is the
    small-flux law |g1||g2|/4 - g1 g2/12 = g^2/6 at g1 = g2 (docs/tubes.md (i), from the loops' winding
    areas and Levy's area), which the perturbative route now supplies (docs/tubes.md (iii)): b_1 gains
    n^2 T2/2 = n^2 g^2/12, nothing named."""
    d = clusterexp.derive("dimension 2 parameter n parameter g in [0, 1] species A bose tubes flux g coverage n "
                          "clusters pairphase derive cluster b[1] expand g about 0 to 2")
    series = sympy.expand(d.series_of(d.coefficient("cluster", (1,)))[0].polynomial.removeO())
    n, g = named(series, "n"), named(series, "g")
    assert series.coeff(g, 0) == 1
    assert series.coeff(n, 1) == -g / 2 + g ** 2 / 2          # -g(1 - g)/2 (Comtet, Georgelin, Ouvry 1989)
    second = series.coeff(n, 2)
    assert second == g ** 2 / 12


def test_every_format_describes_the_tube_pieces():
    d = clusterexp.derive("dimension 2 parameter n species A exchange 1/2 tubes flux 1/2 coverage n clusters pairphase "
                          "derive virial up to 2")
    text = to_text(d)
    assert "T_two_tubes = T2(1/2)" in text and "B_anyon_tube_A = the coefficient of n in b[2]" in text
    record = json.loads(to_json(d))["regime"]
    assert record["tubes"]["known_to"] == "O(n^2)"
    assert any("B_anyon_tube_A" in line for line in record["statement"])
    document = latex_document(d)
    assert r"$B^{\mathrm{tube}}_{\mathrm{A}}$ is the coefficient of $n$ in $b_2$" in document
    assert r"T_{\mathrm{2\,tubes}}" in document


def test_language_coefficients_compose_with_sampled_pieces_like_the_python_composition():
    """The language's exact a_2 and tube_virial's (written separately for the Python route, checked there
    against an independent inversion) agree, and `compose` carries a sampled T2 with its error into
    both alike: error = |d a_2/d T2| sigma = (n^2/4) sigma (first-order propagation, common practice)."""
    from clusterexp.loops.estimator import Estimate
    from clusterexp.loops.tube_virial import COVERAGE, TWO_TUBES, compose, tube_coefficients
    for word in ("bose", "fermi"):
        a = values(f"dimension 2 parameter n species A {word} tubes flux 1/3 coverage n clusters pairphase "
                   "derive virial up to 4")
        python = tube_coefficients(word, sympy.Rational(1, 3), 4).virial
        for l in (2, 3, 4):
            mine = a[(l,)].removeO()
            n = named(mine, "n")
            assert sympy.expand(mine - python[(l,)].subs(COVERAGE, n)) == 0
        sampled = Estimate(0.0150, 2e-4)
        together = compose(a[(2,)].removeO(), {TWO_TUBES: sampled}, {named(a[(2,)], "n"): 0.1})
        assert abs(together.error - 0.01 / 4 * 2e-4) < 1e-15
    anyon = values("dimension 2 parameter n species A exchange 1/2 tubes flux 1/4 coverage n clusters pairphase "
                   "derive virial up to 2")[(2,)].removeO()
    python = tube_coefficients(sympy.Rational(1, 2), sympy.Rational(1, 4), 2).virial[(2,)]
    from clusterexp.loops.tube_virial import ANYON_TUBE
    n = named(anyon, "n")
    assert sympy.expand(anyon.subs(named(anyon, "B_anyon_tube_A"), ANYON_TUBE) - python.subs(COVERAGE, n)) == 0


@pytest.mark.parametrize("word, sign", [("bose", 1), ("fermi", -1)])
def test_small_flux_covariance_is_the_uniform_field_gas(word, sign):
    """Small-flux law of docs/tubes.md: the covariance of two winding areas C2 = T2 - F^2 -> -g^2/12, the
    mean field of the tubes (flux n g per lambda^2). Independent route: the ideal 2D gas in a uniform
    magnetic field (Landau levels, textbook: Z_1 lambda^2/A = (x/2)/sinh(x/2), x = beta hbar omega_c = n g
    flux quanta per lambda^2; an l-cycle has x -> l x), whose virial coefficients through x^2 must be the
    language's a_l with T_two_tubes = F^2 - g^2/12 (the a_l see only C2). Plain-sympy reversion
    (conftest.virial_by_iteration, no project code)."""
    from conftest import virial_by_iteration
    a = values(f"dimension 2 parameter n, g in [0, 1/2] species A {word} tubes flux g coverage n clusters pairphase "
               "derive virial up to 3")
    g, n = named(a[(2,)], "g"), named(a[(2,)], "n")
    x = sympy.Symbol("x")
    landau = {(l,): sign ** (l + 1) * sympy.series((l * x / 2) / sympy.sinh(l * x / 2), x, 0, 3).removeO() / l ** 2
              for l in (1, 2, 3)}
    reference = virial_by_iteration(landau, 3)
    F = -g * (1 - g) / 2
    for l in (2, 3):
        mine = a[(l,)].removeO()
        mine = sympy.expand(mine.subs(named(mine, "T_two_tubes"), F ** 2 - g ** 2 / 12))
        theirs = sympy.expand(sympy.series(reference[(l,)], x, 0, 3).removeO().subs(x, n * g))
        assert sympy.expand(mine - theirs) == 0, (l, mine, theirs)


@pytest.mark.parametrize("flux", ["1", "-2"])
def test_integer_flux_has_no_tube_terms(flux):
    """Flux 0 or 1 mod 1 has no effect (period 1, a fact of the trade): no tube piece, the free values."""
    b = values(f"dimension 2 parameter n species A exchange 1/2 species B fermi tubes flux {flux} coverage n "
               "clusters pairphase derive cluster up to 2", "cluster")
    assert sympy.expand(b[(2, 0)].removeO()) == sympy.Rational(1, 4) - sympy.Rational(1, 2) + sympy.Rational(1, 8)
    assert b[(0, 2)].removeO() == -sympy.Rational(1, 4) and b[(1, 0)].removeO() == 1
    assert not any(s.name.startswith(("T_two", "B_anyon")) for v in b.values() for s in v.free_symbols)


def test_anyon_tube_piece_at_the_fermion_point_is_the_fermi_cycle():
    """At alpha = 1 (analytic there) the piece is -F/2, the l = 2 cycle of the fermi result, so a_2 about
    alpha = 1 starts at the free +1/4 with no term in n (docs/tubes.md, derived; 2D fermi a_2 = +1/4,
    Viefers, Ravndal, Haugset 1995)."""
    d = clusterexp.derive("dimension 2 parameter n parameter alpha in [0, 2] species A exchange alpha tubes flux 1/3 "
                          "coverage n clusters pairphase derive virial a[2] expand alpha about 1 to 1")
    series = d.series_of(d.coefficient("virial", (2,)))[0].polynomial
    alpha = named(series, "alpha")
    assert sympy.expand(series.removeO().subs(alpha, 1)) == sympy.Rational(1, 4)
