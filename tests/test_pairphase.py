"""Pair phases in the plane: exact two-body coefficients, kinks, composition with given many-body parts."""
import pytest
import sympy

import clusterexp
from clusterexp.errors import InputError
from conftest import run_cli


def values(text, kind="virial"):
    return {c.index: c.value for c in clusterexp.derive(text) if c.kind == kind}


def symbol(d, name):
    return next(s for v in d.values() for s in v.free_symbols if s.name == name)


def test_second_virial_of_anyons_on_the_whole_line():
    """a_2(alpha) = -1/4 + alpha - alpha^2/2 on [0, 2], period 2, even; a_2(0) = -1/4, a_2(1/2) = 1/8,
    a_2(1) = 1/4 [published: Arovas, Schrieffer, Wilczek, Zee, Nucl. Phys. B 251 (1985) 117]."""
    a = values("dimension 2 parameter alpha species A exchange alpha clusters pairphase derive virial up to 2")
    alpha = symbol(a, "alpha")
    a2 = a[(2,)]
    for x, expected in ((0, sympy.Rational(-1, 4)), (sympy.Rational(1, 2), sympy.Rational(1, 8)), (1, sympy.Rational(1, 4))):
        assert a2.subs(alpha, x) == expected
    for x in (sympy.Rational(k, 7) for k in range(-20, 21)):
        s = x % 2
        assert a2.subs(alpha, x) == -sympy.Rational(1, 4) + s - s ** 2 / 2     # period 2 on [0, 2]
        assert a2.subs(alpha, x) == a2.subs(alpha, 2 - x)                       # alpha -> 2 - alpha
        assert a2.subs(alpha, x) == a2.subs(alpha, -x)                          # even
    # sympy can evaluate, differentiate and print it
    assert sympy.diff(a2, alpha).subs(alpha, sympy.Rational(1, 2)) == sympy.Rational(1, 2)
    assert sympy.latex(a2)


def test_restricted_range_gives_the_polynomial_branch():
    a = values("dimension 2 parameter alpha in [0, 1] species A exchange alpha clusters pairphase derive virial up to 2")
    alpha = symbol(a, "alpha")
    assert sympy.expand(a[(2,)] - (-sympy.Rational(1, 4) + alpha - alpha ** 2 / 2)) == 0


@pytest.mark.parametrize("point, word", [(0, "bose"), (1, "fermi")])
def test_boson_and_fermion_points_agree_with_the_ideal_route(point, word):
    """Independent route: alpha = 0 and 1 against `clusters ideal` (route R1) for b_1, b_2 and a_2."""
    pair = values(f"dimension 2 species A exchange {point} clusters pairphase derive cluster up to 3", "cluster")
    ideal = values(f"dimension 2 species A {word} clusters ideal derive cluster up to 3", "cluster")
    assert pair == ideal


def test_mixed_coefficient_of_two_species_vanishes_at_integer_mutual_parameter():
    """b_11 = -delta(1 - delta), delta = frac(alpha_12) (equal masses); zero at alpha_12 = 0 and 1 (fact of the
    trade: integer braiding is no statistical coupling)."""
    b = values("dimension 2 parameter nu species A species B mutual A B = nu clusters pairphase derive cluster up to 2",
               "cluster")
    nu = symbol(b, "nu")
    for x in (0, 1, 2, -1):
        assert b[(1, 1)].subs(nu, x) == 0
    assert b[(1, 1)].subs(nu, sympy.Rational(1, 3)) == -sympy.Rational(2, 9)
    assert b[(1, 1)].subs(nu, sympy.Rational(4, 3)) == -sympy.Rational(2, 9)  # period 1


def test_unequal_masses_against_an_independent_derivation():
    """Independent derivation written here: in free space the two-particle trace factorises into the
    centre of mass (mass M = m_A + m_B: A/lambda_M^2 = (M/m_ref) A/lambda^2) and the relative motion,
    whose Aharonov-Bohm change Tr[e^{-beta H}(delta) - e^{-beta H}(0)] = -delta(1 - delta)/2 does not depend
    on the reduced mass [Comtet, Georgelin, Ouvry, J. Phys. A 22 (1989) 3917, from memory]. So
    b_11 = -(M/m_ref) delta(1 - delta)/2. Second route: the declared-spectrum machinery (R2) with the trapped
    Z_11 = Z_cm Z_rel written out, Z_rel = x(x^d + x^(1-d))/((1-x)(1-x^2))."""
    b = values("dimension 2 parameter mu positive species A species B mass mu mutual A B = 1/3 clusters pairphase "
               "derive cluster up to 2", "cluster")
    mu = symbol(b, "mu")
    assert sympy.simplify(b[(1, 1)] - (-(1 + mu) * sympy.Rational(1, 3) * sympy.Rational(2, 3) / 2)) == 0
    # the harmonic regulator with mass ratio 3 and the relative spectrum summed by hand
    trapped = ("dimension 2 species A species B mass 3 clusters spectrum { "
               "trapped Z[1,1] = x/(1 - x)^2 * x*(x^(1/3) + x^(2/3))/((1 - x)*(1 - x^2)) } derive cluster b[1,1]")
    spectral = values(trapped, "cluster")[(1, 1)]
    exact = values("dimension 2 species A species B mass 3 mutual A B = 1/3 clusters pairphase derive cluster b[1,1]",
                   "cluster")[(1, 1)]
    assert spectral == exact == -sympy.Rational(4, 9)


def test_flux_tube_shift():
    """One particle and one flux tube: Z(gamma) - Z(0) = -gamma(1 - gamma)/2 on [0, 1], period 1
    [derived with R3; attributed to Comtet, Georgelin, Ouvry 1989, from memory]: the first-order tube term of
    b_1 per unit coverage."""
    b = values("dimension 2 parameter f, n species A bose tubes flux f coverage n clusters pairphase "
               "derive cluster up to 2", "cluster")
    f, n = symbol(b, "f"), symbol(b, "n")
    first = sympy.expand(b[(1,)].removeO()).coeff(n, 1)
    for x in (sympy.Rational(1, 4), sympy.Rational(1, 2), sympy.Rational(5, 4)):
        s = x % 1
        assert first.subs(f, x) == -s * (1 - s) / 2
    assert b[(1,)].has(sympy.Order)  # honest: multi-tube terms unknown


def test_published_third_virial_series_as_given_input():
    """The published a_3 = 1/36 + sin^2(pi alpha)/(12 pi^2) + ... [Myrheim & Olaussen, cond-mat/9210028;
    Mashkevich, Myrheim, Olaussen, hep-th/9602171] near bosons is 1/36 + alpha^2/12 + O(alpha^4); given to
    second order it comes back to second order with an honest O term, and b_3 follows from it."""
    d = clusterexp.derive("dimension 2 parameter alpha in [0, 1] species A exchange alpha clusters pairphase "
                          "{ a[3] = 1/36 + alpha^2/12 + O(alpha^3) } derive virial up to 3 derive cluster up to 3")
    a3 = d.value("virial", (3,))
    alpha = next(iter(a3.removeO().free_symbols))
    assert a3.removeO() == sympy.Rational(1, 36) + alpha ** 2 / 12
    assert a3.getO() == sympy.Order(alpha ** 3)
    b2, b3 = d.value("cluster", (2,)), d.value("cluster", (3,)).removeO()
    # a_3 = 4 b_2^2 - 2 b_3 (single-species inversion), to second order
    check = sympy.expand(4 * b2 ** 2 - 2 * b3 - (sympy.Rational(1, 36) + alpha ** 2 / 12))
    assert all(sympy.degree(t, alpha) >= 3 for t in sympy.Add.make_args(check) if t != 0)


def test_unknown_many_body_parts_stay_named():
    a = values("dimension 2 parameter alpha in [0, 1] species A exchange alpha clusters pairphase derive virial up to 3")
    assert sympy.Symbol("b_3") in a[(3,)].free_symbols


def test_kinked_expansion_needs_a_side(cli):
    base = "dimension 2 parameter alpha species A exchange alpha clusters pairphase derive virial up to 2 "
    result = cli("run", "-e", base + "expand alpha about 0 to 2")
    assert result.returncode == 2 and "not analytic at alpha = 0" in result.stderr and "^" in result.stderr
    result = cli("run", "-e", base + "expand alpha about 0 to 2 from both")
    assert result.returncode == 0
    assert "non-analytic at alpha = 0, from above): -alpha**2/2 + alpha - 1/4" in result.stdout
    assert "non-analytic at alpha = 0, from below): -alpha**2/2 - alpha - 1/4" in result.stdout


@pytest.mark.parametrize("text, message", [
    ("dimension 3 species A clusters pairphase", "pair phases are a property of the plane"),
    ("dimension 2 species A clusters pairphase { b[2] = 1 }", "the two-body coefficients of pair phases are exact"),
    ("dimension 2 species A tubes flux 1/3 coverage 1/10 clusters ideal", "flux tubes are used with"),
    ("dimension 2 species A exchange sqrt(-1) clusters pairphase", "the exchange parameter must be real"),
    ("dimension 2 species A species B mutual A A = 1/2 clusters pairphase", "a mutual parameter needs two distinct"),
    ("dimension 2 species A clusters pairphase expand beta about 0 to 2", "`expand` needs a declared parameter"),
])
def test_pairphase_bad_input(text, message):
    with pytest.raises((InputError, clusterexp.NotSupportedYet)) as caught:
        clusterexp.derive(text)
    assert str(caught.value).split("error: ", 1)[-1].startswith(message) or message in str(caught.value)


# -- several species: truncated many-body pieces composed into the mixed virial coefficients -------------

from conftest import virial_by_iteration  # noqa: E402

NU, W, X, Y, Z = sympy.symbols("nu w X Y Z")
HALF, THIRD = sympy.Rational(1, 2), sympy.Rational(1, 3)


def _by_name(value):
    """The project's symbols carry assumptions; compare by name with the plain symbols used here."""
    plain = {s: sympy.Symbol(s.name) for s in value.free_symbols}
    orders = [sympy.Order(o.expr.subs(plain)) for o in sympy.Add.make_args(value.getO() or sympy.Integer(0))
              if isinstance(o, sympy.Order)]
    return sympy.Add(value.removeO().subs(plain, simultaneous=True), *orders)


def _two_body(mass_a, alpha_a, mass_b, alpha_b, nu):
    """Exact two-body b written here from the closed forms (physics.md, route R3; a_2 of
    Arovas-Schrieffer-Wilczek-Zee 1985 for one species, -(M/2 m_ref) nu(1 - nu) for the pair), nu in [0, 1)."""
    b2 = lambda m, a: m * (sympy.Rational(1, 4) - a + sympy.sympify(a) ** 2 / 2)
    return {(1, 0): mass_a, (0, 1): mass_b, (2, 0): b2(mass_a, alpha_a), (0, 2): b2(mass_b, alpha_b),
            (1, 1): -sympy.Integer(mass_a + mass_b) * nu * (1 - nu) / 2}


def _assert_honest(got, reference, tails, limits):
    """`got` = reference through the claimed orders, with exactly the O terms `limits` ({symbol: k});
    `reference` carries the unknown tails (symbols in `tails`) of the inputs, and each claimed O term is
    needed: the reference's coefficient of symbol^k does depend on a tail."""
    got = _by_name(got)
    assert set(sympy.Add.make_args(got.getO() or sympy.Integer(0))) - {0} == {sympy.Order(s ** k) for s, k in limits.items()}
    difference = sympy.expand(reference - got.removeO())
    for term in sympy.Add.make_args(difference):
        assert any(sympy.degree(term, s) >= k for s, k in limits.items()), term
    for s, k in limits.items():
        assert sympy.expand(reference).coeff(s, k).free_symbols & tails, (s, k)


def test_two_species_three_body_series_give_mixed_virials_to_the_honest_order():
    """b[2,1] given to O(nu^2) and b[1,2] to O(nu^3): a_{2,1} comes to O(nu^2), a_{1,2} to O(nu^3), a_{1,1}
    exact; checked against a plain-sympy b -> a iteration in which the unknown tails are symbols. (The
    given values vanish at nu = 0, as every mixed b of species that do not braid must.)"""
    d = clusterexp.derive("dimension 2 parameter nu in [0, 1) species A exchange 1/2 species B mass 2 fermi "
                          "mutual A B = nu clusters pairphase { b[2,1] = nu/3 + O(nu^2) "
                          "b[1,2] = 2*nu/5 - nu^2 + O(nu^3) } derive virial up to 3")
    b = _two_body(1, HALF, 2, 1, NU)
    b.update({(3, 0): sympy.Symbol("b_3_0"), (0, 3): 2 * sympy.Rational(1, 9),   # B: ideal Fermi, b_3 = (m/m_ref)/9
              (2, 1): NU / 3 + X * NU ** 2, (1, 2): 2 * NU / 5 - NU ** 2 + Y * NU ** 3})
    reference = virial_by_iteration(b, 3)
    _assert_honest(d.value("virial", (2, 1)), reference[(2, 1)], {X}, {NU: 2})
    _assert_honest(d.value("virial", (1, 2)), reference[(1, 2)], {Y}, {NU: 3})
    assert sympy.expand(_by_name(d.value("virial", (1, 1))) - reference[(1, 1)]) == 0
    assert sympy.expand(_by_name(d.value("virial", (3, 0))) - reference[(3, 0)]) == 0


def test_mixed_exact_and_series_inputs_keep_the_lowest_order_of_what_each_coefficient_uses():
    """b[2,1] exact, b[1,2] a series in w, b[2,2] a series in nu: a_{2,1} stays exact, a_{1,2} carries
    O(w^2) only, a_{2,2} (which uses all three) O(nu^2) + O(w^2)."""
    d = clusterexp.derive("dimension 2 parameter nu in [0, 1) parameter w species A bose species B mass 2 fermi "
                          "mutual A B = nu clusters pairphase { b[2,1] = nu^3/5  b[1,2] = w/3 + O(w^2) "
                          "b[2,2] = 3*nu/8 + O(nu^2) } derive virial a[2,1], a[1,2], a[2,2], a[3,1]")
    b = _two_body(1, 0, 2, 1, NU)
    b.update({(3, 0): sympy.Rational(1, 9), (0, 3): 2 * sympy.Rational(1, 9), (4, 0): sympy.Rational(1, 16),
              (0, 4): -2 * sympy.Rational(1, 16), (2, 1): NU ** 3 / 5, (1, 2): W / 3 + Y * W ** 2,
              (2, 2): 3 * NU / 8 + X * NU ** 2, (3, 1): sympy.Symbol("b_3_1"), (1, 3): sympy.Symbol("b_1_3")})
    reference = virial_by_iteration(b, 4)
    a21 = d.value("virial", (2, 1))
    assert not a21.has(sympy.Order) and sympy.expand(_by_name(a21) - reference[(2, 1)]) == 0
    _assert_honest(d.value("virial", (1, 2)), reference[(1, 2)], {Y}, {W: 2})
    _assert_honest(d.value("virial", (2, 2)), reference[(2, 2)], {X, Y}, {NU: 2, W: 2})
    a31 = d.value("virial", (3, 1))
    assert not a31.has(sympy.Order) and sympy.expand(_by_name(a31) - reference[(3, 1)]) == 0


def test_given_mixed_virial_series_gives_the_cluster_coefficients_to_the_same_order():
    """a[2,1] given to O(nu^2): the derived b[2,1] carries O(nu^2) and, fed back through the independent
    b -> a iteration (with an unknown nu^2 tail), returns the given a[2,1]; b[1,2] stays exact in a_1_2."""
    d = clusterexp.derive("dimension 2 parameter nu in [0, 1) species A exchange 1/2 species B exchange 1/3 "
                          "mutual A B = nu clusters pairphase { a[2,1] = 1/5 + nu/2 + O(nu^2) } "
                          "derive cluster up to 3")
    b21, b12 = d.value("cluster", (2, 1)), d.value("cluster", (1, 2))
    assert _by_name(b21).getO() == sympy.Order(NU ** 2) and not b12.has(sympy.Order)
    b = _two_body(1, HALF, 1, THIRD, NU)
    b.update({n: _by_name(d.value("cluster", n)).removeO() for n in ((3, 0), (0, 3), (1, 2))})
    b[(2, 1)] = _by_name(b21).removeO() + Z * NU ** 2
    reference = virial_by_iteration(b, 3)
    tail = sympy.expand(reference[(2, 1)] - (sympy.Rational(1, 5) + NU / 2))
    assert all(sympy.degree(t, NU) >= 2 for t in sympy.Add.make_args(tail))
    assert sympy.expand(reference[(1, 2)] - sympy.Symbol("a_1_2")) == 0


# -- series output: text, JSON, LaTeX -----------------------------------------------------------------

import json  # noqa: E402
import os  # noqa: E402
import shutil  # noqa: E402
import subprocess  # noqa: E402

from clusterexp.export import latex_document, latex_snippet, to_json  # noqa: E402

KINKED = ("dimension 2 parameter alpha species A exchange alpha clusters pairphase derive virial up to 2 "
          "expand alpha about 0 to 2 from both expand alpha about 1/2 to 1")
ALPHA = sympy.Symbol("alpha")


def test_json_series_of_a_kinked_coefficient_parse_back():
    """Both sides at the boson point against a_2 = -1/4 + alpha - alpha^2/2 on [0, 2], even in alpha
    [Arovas, Schrieffer, Wilczek, Zee 1985]: from below it is a_2(-alpha). About alpha = 1/2 the same
    branch is analytic; its Taylor polynomial to first order is written out here by hand."""
    data = json.loads(to_json(clusterexp.derive(KINKED)))
    a2 = next(c for c in data["coefficients"] if c["index"] == [2])
    assert [(s["side"], s["one_sided"], s["non_analytic"], s["point"], s["order"]) for s in a2["series"]] == [
        ("above", True, True, "0", 2), ("below", True, True, "0", 2), (None, False, False, "1/2", 1)]
    above, below, middle = (sympy.sympify(s["value"]) for s in a2["series"])
    assert above.removeO() == -sympy.Rational(1, 4) + ALPHA - ALPHA ** 2 / 2 and above.getO() == sympy.Order(ALPHA ** 3)
    assert below.removeO() == -sympy.Rational(1, 4) - ALPHA - ALPHA ** 2 / 2
    taylor = sympy.Rational(1, 8) + sympy.Rational(1, 2) * (ALPHA - sympy.Rational(1, 2))
    assert sympy.expand(middle.removeO() - taylor) == 0
    assert middle.getO() == sympy.Order((ALPHA - sympy.Rational(1, 2)) ** 2, (ALPHA, sympy.Rational(1, 2)))


def test_series_about_a_nonzero_point_print_in_powers_of_the_shift(cli):
    # a_2 = -1/4 + alpha - alpha^2/2 on [0, 2] [Arovas, Schrieffer, Wilczek, Zee 1985]: about the
    # fermion point its Taylor polynomial is 1/4 - (alpha - 1)^2/2 (value 1/4, slope 0, curvature -1;
    # by hand), printed as such rather than re-expanded in powers of alpha
    result = cli("run", "-e", "dimension 2 parameter alpha species A exchange alpha clusters pairphase "
                 "derive virial up to 2 expand alpha about 1 to 3")
    assert result.returncode == 0, result.stderr
    line, = [l for l in result.stdout.splitlines() if "series in alpha" in l]
    assert line.endswith("(analytic): 1/4 - (alpha - 1)**2/2 + O((alpha - 1)**4, (alpha, 1))")
    latex = cli("run", "-e", "dimension 2 parameter alpha species A exchange alpha clusters pairphase "
                "derive virial up to 2 expand alpha about 1 to 3", "--format", "latex").stdout
    assert r"\frac{1}{4} - \frac{\left(\alpha - 1\right)^{2}}{2} + O\left(" in latex


def test_latex_series_rows_in_snippet_and_document():
    d = clusterexp.derive(KINKED)
    snippet = latex_snippet(d)
    assert r"&= - \frac{\alpha^{2}}{2} + \alpha - \frac{1}{4} + O\left(\alpha^{3}\right)" in snippet
    assert r"\alpha\to 0^{+},\ \text{non-analytic at }\alpha=0" in snippet
    assert r"\alpha\to 0^{-}" in snippet and r"\text{series about }\alpha=\frac{1}{2}" in snippet
    # rows: a_1 (free of alpha: no series rows); a_2 with two sides at 0 and one series about 1/2
    assert snippet.count(r"\\") == 5 - 1
    document = latex_document(d)   # each series under its coefficient, named by its side
    assert "one-sided expansions" in document
    assert r"Series of $a_{2}$ \eqref{a:A2} ($\alpha\to 0^{+},\ \text{non-analytic at }\alpha=0$):" in document
    assert document.count("Series of $a_{2}$") == 3


@pytest.mark.skipif(shutil.which("pdflatex") is None and not os.environ.get("CI"),
                    reason="pdflatex not installed (CI installs it)")
def test_document_with_series_compiles(tmp_path):
    (tmp_path / "series.tex").write_text(latex_document(clusterexp.derive(KINKED)))
    result = subprocess.run(["pdflatex", "-interaction=nonstopmode", "-halt-on-error", "series.tex"],
                            cwd=tmp_path, capture_output=True, text=True, timeout=120)
    assert result.returncode == 0, result.stdout[-2000:]


def test_series_of_a_truncated_coefficient_stops_at_its_known_order():
    """a_3 known to O(alpha^3) (the published 1/36 + alpha^2/12 near bosons, Myrheim & Olaussen,
    cond-mat/9210028): asked through alpha^4 the series honestly stops at alpha^2. alpha = 0 ends the
    declared range [0, 1], so the expansion is one-sided from above without being asked."""
    d = clusterexp.derive("dimension 2 parameter alpha in [0, 1] species A exchange alpha clusters pairphase "
                          "{ a[3] = 1/36 + alpha^2/12 + O(alpha^3) } derive virial a[3] expand alpha about 0 to 4")
    (piece,) = json.loads(to_json(d))["coefficients"][0]["series"]
    assert (piece["known_through"], piece["side"], piece["range_edge"], piece["non_analytic"]) == (2, "above", True, False)
    assert sympy.sympify(piece["value"]) == sympy.Rational(1, 36) + ALPHA ** 2 / 12 + sympy.Order(ALPHA ** 3)
    assert "the given series stop at order 2" in clusterexp.export.to_text(d)


@pytest.mark.parametrize("text, message", [
    ("dimension 2 parameter g species A exchange g*sqrt(-1) clusters pairphase derive virial up to 2",
     "the exchange parameter must be real"),
    ("dimension 2 parameter g species A species B mutual A B = sqrt(g) clusters pairphase derive virial up to 2",
     "the mutual parameter of A and B must be real"),
    ("dimension 2 parameter g in [0, 1] species A exchange g clusters pairphase { a[3] = 1 + g + O(1/g) } "
     "derive virial up to 3", "cannot read O(1/g) as a truncation order"),
    ("dimension 2 parameter g, h in [0, 1] species A exchange g clusters pairphase { a[3] = 1 + O(g*h) } "
     "derive virial up to 3", "cannot read O(g*h) as a truncation order"),
    ("dimension 2 parameter g in [0, 1] species A exchange g clusters pairphase { a[3] = 1 + g + O(g^2) } "
     "derive virial up to 3 expand g about 1/2 to 2", "a[3] is known only as a series about g = 0"),
    ("dimension 2 parameter g in [0, 1] species A exchange g clusters pairphase derive virial up to 2 "
     "expand g about 0 to 2 from below", "g = 0 ends the declared range of g: only `from above`"),
    ("dimension 2 parameter g species A exchange g clusters pairphase derive virial up to 2 expand g about 2 to 1",
     "a[2] is not analytic at g = 2"),
])
def test_series_and_statistics_bad_input(text, message, cli):
    result = cli("run", "-e", text)
    assert result.returncode == 2 and "Traceback" not in result.stderr
    assert message in result.stderr and "^" in result.stderr, result.stderr


def test_truncation_orders_of_several_parameters():
    from clusterexp.expansions import split_truncation, truncation_problem
    g, h = sympy.symbols("g h")
    value = 1 + g + h + sympy.Order(g ** 2) + sympy.Order(h ** 3)
    assert split_truncation(value) == (1 + g + h, {g: 2, h: 3}) and truncation_problem(value) is None


def test_tube_coverage_truncated_in_the_kernel_agrees_with_series_of_the_exact_rational_functions():
    """A Bose and a heavier Fermi species among flux tubes of symbolic coverage n, to total order 4: the kernel divides by
    b_(e_i) = m_i/m_ref - n f(1-f)/2 as a truncated series in n. Reference: the plain-sympy fixed-point
    iteration (conftest.virial_by_iteration, rational functions in n, no project code) with each
    coefficient then expanded by sympy.series in n (independent route)."""
    from conftest import virial_by_iteration
    text = ("dimension 2 parameter n nonnegative species T bose species U fermi mass 3 "
            "tubes flux 1/3 coverage n clusters pairphase derive cluster up to 4 derive virial up to 4 "
            "derive fugacity up to 3")
    d = clusterexp.derive(text)
    got = {(c.kind, c.index, c.component): c.value for c in d}
    n = next(s for v in got.values() for s in v.free_symbols if s.name == "n")
    b = {index: got[("cluster", index, None)].removeO() for index in
         [k[1] for k in got if k[0] == "cluster"]}
    expected = virial_by_iteration(b, 4)
    for index, value in expected.items():
        if sum(index) < 2:
            continue
        mine = got[("virial", index, None)]
        assert mine.getO() == sympy.Order(n ** 3), index   # bose/fermi: through the coverage squared
        reference = sympy.expand(sympy.series(value, n, 0, 3).removeO())
        assert sympy.expand(mine.removeO() - reference) == 0, index
    # z_T = w_T / b_(e_T) through n^2: 1/b_1 with b_1 = 1 + n F + n^2 T2/2, F = -f(1-f)/2 = -1/9
    zT = got[("fugacity", (1, 0), "T")]
    T2 = next(s for s in zT.free_symbols if s.name == "T_two_tubes")
    assert sympy.expand(zT.removeO() - (1 + n / 9 + n ** 2 * (sympy.Rational(1, 81) - T2 / 2))) == 0


def test_truncation_with_a_value_not_polynomial_in_the_symbol_stays_exact():
    """cluster_to_virial(truncation=...) with b_3 not polynomial in n (n^2/sin(n) = n + n^3/6 + ...):
    it must not be cut term by term. Reference: a_3 = (4 b_2^2 - 2 b_3 b_1)/b_1^4 (the textbook
    inversion formula with b_1 != 1, common practice) expanded by sympy.series to first order."""
    from clusterexp.exact.virial import cluster_to_virial
    n = sympy.Symbol("n")
    b1, b2, b3 = 1 - n / 8, sympy.Rational(1, 4) - n / 16, n ** 2 / sympy.sin(n)
    result = cluster_to_virial({(1,): b1, (2,): b2, (3,): b3}, 3, truncation={n: 2})
    a3 = result.virial[(3,)]
    reference = sympy.series((4 * b2 ** 2 - 2 * b3 * b1) / b1 ** 4, n, 0, 2).removeO()
    assert sympy.expand(sympy.series(a3, n, 0, 2).removeO() - reference) == 0
    assert reference.coeff(n, 1) != 0
    # the polynomial part alone is truncated in the ring: exact below n^2, nothing at or above
    poly = cluster_to_virial({(1,): b1, (2,): b2, (3,): n ** 3 + n}, 3, truncation={n: 2}).virial[(3,)]
    exact = sympy.series((4 * b2 ** 2 - 2 * (n ** 3 + n) * b1) / b1 ** 4, n, 0, 2).removeO()
    assert sympy.expand(poly - exact) == 0


def test_truncation_is_decided_for_the_whole_input():
    """One b with a pole in n (x/n) forbids cutting any other b term by term: the cut of beta_2 would be
    carried below the limit by the 1/n. Reference: the exact rational function of the plain-sympy
    iteration (conftest.virial_by_iteration), expanded by sympy.series. Also the Legendre self-check
    of a truncated result agrees with its pressure."""
    from conftest import virial_by_iteration
    from clusterexp.exact.virial import cluster_to_virial
    n, x = sympy.symbols("n x")
    b = {(1,): 1 - n / 8, (2,): sympy.Rational(1, 4) - n / 16, (3,): x / n, (4,): sympy.Rational(1, 7)}
    got = cluster_to_virial(b, 4, truncation={n: 2}).virial[(4,)]
    exact = virial_by_iteration(b, 4)[(4,)]
    assert sympy.expand(sympy.series(got - exact, n, 0, 2).removeO()) == 0
    polynomial = {(1,): 1 - n / 8, (2,): sympy.Rational(1, 4) - n / 16, (3,): x * n + 1, (4,): n ** 2 + x}
    result = cluster_to_virial(polynomial, 5, truncation={n: 2})
    assert [result.ring.to_expr(p, ["r"]) for p in result.legendre_pressure().parts] == \
        [result.ring.to_expr(p, ["r"]) for p in result.pressure_series.parts]


@pytest.mark.parametrize("word,sign", [("bose", 1), ("fermi", -1)])
@pytest.mark.parametrize("flux", ["1/2", "1/3"])
def test_numeric_tube_coverage_stays_first_order_and_leaves_every_virial_coefficient_unchanged(word, sign, flux):
    """Derived here: one tube shifts a particle's partition function by c = -s(1 - s)/2, s = flux mod 1
    [Comtet, Georgelin, Ouvry, J. Phys. A 22 (1989) 3917, from memory]; each l-cycle of an ideal species
    feels it once, so at fixed fugacity beta P lambda^2 gains n c sum_l (+-1)^(l+1) z^l / l = n c rho_0
    lambda^2, n the coverage and rho_0 the density of the free gas. At first order the shift of the free
    energy at fixed density is minus that at fixed fugacity, -n c rho; then beta P = rho f' - f changes by
    rho (-n c) + n c rho = 0: every a_l is the free gas's to O(n^2) (2D Bose and Fermi a_l from the
    Bernoulli numbers [Viefers, Ravndal, Haugset, Am. J. Phys. 63 (1995) 369]). At n^2 the named
    T_two_tubes enters; with T2 = c^2 (a deterministic winding area, only z -> z e^{n c}) the a_l stay
    free through n^2 (docs/tubes.md). A numeric coverage used to give rational functions of it
    (a_2 = 159600/638401 for fermions) with no O term."""
    d = clusterexp.derive(f"dimension 2 species A {word} tubes flux {flux} coverage 1/100 clusters pairphase "
                          "derive virial up to 5 derive cluster up to 3")
    c = -sympy.Rational(flux) * (1 - sympy.Rational(flux)) / 2
    for l in range(1, 6):
        a = d.value("virial", (l,))
        # a_l = B_(l-1)/l! with B_1 = -1/2 for bosons; fermions differ only in a_2 = +1/4
        free = {1: 1, 2: sympy.Rational(-sign, 4)}.get(l, sympy.bernoulli(l - 1) / sympy.factorial(l))
        T2 = [s for s in a.free_symbols if s.name == "T_two_tubes"]
        assert sympy.expand(a.removeO().subs({t: c ** 2 for t in T2})) == free, (l, a)
        if l > 1:
            assert T2 and a.getO() is not None and str(a.getO().expr) == "rho_tubes**3"
    for l in range(1, 4):
        b = d.value("cluster", (l,))
        T2 = next(s for s in b.free_symbols if s.name == "T_two_tubes")
        expected = sign ** (l + 1) * (sympy.Rational(1, l ** 2) + c * sympy.Rational(1, 100) / l
                                      + T2 / (2 * 100 ** 2))
        assert sympy.expand(b.removeO() - expected) == 0 and b.getO() is not None
    text = clusterexp.export.to_text(d)
    assert "rho_tubes = 1/100 (as declared)" in text and "O(rho_tubes**3)" in text


@pytest.mark.parametrize("given, message", [
    # b_3(0) is the ideal Bose 1/9 [Viefers, Ravndal, Haugset, Am. J. Phys. 63 (1995) 369]
    ("parameter alpha in [0, 1] species A exchange alpha clusters pairphase { b[3] = 1/8 + O(alpha) }",
     "the value equal to 1/8, but the tool knows it is 1/9"),
    # from below the boson point b_3 = 1/9 + alpha + ... (b_3 even in alpha; first order -(2/3) H_2 = -1
    # from above: physics.md section 5, derived from Dasnieres de Veigy & Ouvry 1992)
    ("parameter alpha in [-1, 0] species A exchange alpha clusters pairphase { b[3] = 1/9 - alpha + O(alpha^2) }",
     "coefficient of alpha equal to -1, but the tool knows it is 1"),
    # a mixed b of species that do not braid at nu = 0 vanishes there (a fact of the trade)
    ("parameter nu in [0, 1] species A bose species B bose mutual A B = nu clusters pairphase "
     "{ b[2,1] = 1/7 + O(nu) }", "the value equal to 1/7, but the tool knows it is 0"),
])
def test_a_given_series_that_contradicts_what_the_tool_knows_is_refused(given, message):
    with pytest.raises(InputError, match=message):
        clusterexp.derive("dimension 2 " + given + " derive virial up to 3")
