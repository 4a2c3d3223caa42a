"""Named many-body pieces are functions of the statistics parameters: series and truncated claims
through them name their Taylor coefficients instead of treating them as constants."""
import json

import pytest
import sympy

import clusterexp
from clusterexp.errors import InputError
from clusterexp.export import latex_document, to_json, to_text
from conftest import run_cli

ALPHA = sympy.Symbol("alpha")
ANYONS = "dimension 2 parameter alpha species A exchange alpha clusters pairphase derive virial up to 3 "


def _series(d, kind, index):
    c = d.coefficient(kind, index)
    return d.series_of(c)


def _named(piece):
    return {u.symbol.name: u.symbol for u in piece.unknowns}


def _b3_near_bosons():
    """b_3 = 1/9 - alpha + (59/24) alpha^2 + O(alpha^3) for alpha -> 0+: from a_3 = 1/36 + alpha^2/12
    [published: Myrheim & Olaussen, Phys. Lett. B 299 (1993) 267] and the exact b_2 = 1/4 - alpha +
    alpha^2/2 [published: Arovas, Schrieffer, Wilczek, Zee, Nucl. Phys. B 251 (1985) 117] through
    a_3 = 4 b_2^2 - 2 b_3 (textbook cluster-virial relation, b_1 = 1)."""
    return {1: sympy.Integer(-1), 2: sympy.Rational(59, 24)}


def _a4_condition(a4_second_order, side_sign=1):
    """The alpha^2 coefficient of b_4 that a claimed a_4 = a4_second_order alpha^2 + O(alpha^3) needs, by
    the textbook relation a_4 = -20 b_2^3 + 18 b_2 b_3 - 3 b_4 (one species, b_1 = 1) with the exact b_2, the
    published b_3 above and the first order b_4^(1) = -(2/4) H_3 = -11/12 [derived from Dasnieres de Veigy &
    Ouvry 1992: only a_2 changes at first order]; independent of the tool's virial machinery."""
    x, B = sympy.symbols("x B")
    k = _b3_near_bosons()
    b2 = sympy.Rational(1, 4) - x + x ** 2 / 2
    b3 = sympy.Rational(1, 9) + k[1] * x + k[2] * x ** 2
    b4 = sympy.Rational(1, 16) - sympy.Rational(11, 12) * x + B * x ** 2
    a4 = sympy.expand(-20 * b2 ** 3 + 18 * b2 * b3 - 3 * b4)
    assert a4.coeff(x, 0) == 0 and a4.coeff(x, 1) == 0
    (value,) = sympy.solve(a4.coeff(x, 2) - a4_second_order, B)
    return value


def test_third_virial_series_from_the_perturbative_route_and_a4_names_b4():
    """The series of a_3 about the boson point used to treat b_3 as a constant (a spurious linear term
    -2 alpha); now b_3 comes from the perturbative route through alpha^2 (docs/perturbative.md, 4d) and
    both sides give the published a_3 = 1/36 + alpha^2/12 (Myrheim & Olaussen 1993; even in alpha) with
    nothing named. b_4's alpha^2 coefficient is derived too (docs 4k, 4l): a_4's series names nothing on
    either side, and differs from the textbook relation's value 1/16 (the closure of section 4b (iv),
    which would need b_4^(2) = 35/8) by (sqrt 3/48) ln(2 + sqrt 3)."""
    d = clusterexp.derive(ANYONS.replace("up to 3", "up to 4") + "expand alpha about 0 to 2 from both")
    above, below = _series(d, "virial", (3,))
    assert (above.side, below.side) == ("above", "below")
    assert not above.unknowns and not below.unknowns
    assert any("perturbative route" in note for note in above.notes)
    for piece in (above, below):
        assert sympy.expand(piece.polynomial - (sympy.Rational(1, 36) + piece.variable ** 2 / 12)) == 0
    above, below = _series(d, "virial", (4,))
    closed = sympy.Rational(35, 8) - sympy.sqrt(3) / 144 * sympy.log(2 + sympy.sqrt(3))
    for piece in (above, below):
        assert not piece.unknowns
        second = sympy.expand(piece.polynomial).coeff(piece.variable, 2)
        assert sympy.simplify(second - (sympy.Rational(1, 16) + sympy.sqrt(3) / 48 * sympy.log(2 + sympy.sqrt(3)))) == 0
    # the textbook relation's a_4^(2) = 1/16 needs b_4^(2) = 35/8 (section 4b (iv)): the logarithm is the difference
    assert _a4_condition(sympy.Rational(1, 16)) == sympy.Rational(35, 8)


def test_third_virial_series_near_fermions():
    """About alpha = 1 (analytic): the route gives b_3 = 1/9 - (13/24)(alpha - 1)^2, so a_3 = 1/36 +
    (1 - alpha)^2/12 [published: Myrheim & Olaussen 1993; Sen, Phys. Rev. Lett. 68 (1992) 2977], with
    b_2 = -1/4 + (alpha - 1)^2/2 and b_3(1) the ideal Fermi 1/9 [published: Viefers, Ravndal, Haugset,
    Am. J. Phys. 63 (1995) 369]. a_4 names nothing: [-1/16 + (sqrt 3/48) ln(2 + sqrt 3)] (alpha - 1)^2
    (docs 4k, 4l)."""
    d = clusterexp.derive(ANYONS.replace("up to 3", "up to 4") + "expand alpha about 1 to 2")
    (piece,) = _series(d, "virial", (3,))
    assert piece.side is None and not piece.kink and not piece.unknowns
    assert sympy.expand(piece.polynomial - (sympy.Rational(1, 36) + (1 - piece.variable) ** 2 / 12)) == 0
    (piece,) = _series(d, "virial", (4,))
    assert not piece.unknowns
    x = piece.variable
    second = sympy.expand(piece.polynomial.subs(x, x + 1)).coeff(x, 2)
    assert sympy.simplify(second - (-sympy.Rational(1, 16) + sympy.sqrt(3) / 48 * sympy.log(2 + sympy.sqrt(3)))) == 0
    record = json.loads(to_json(d))
    assert "unknowns" not in record


def test_a_named_piece_alone_gets_its_series():
    """b[4] = b_4 has no visible alpha, but it is a function of alpha: its series is printed, with the
    first order b_4^(1) = -(2/4) H_3 = -11/12 [derived from Dasnieres de Veigy & Ouvry 1992, physics.md
    section 5] and the ideal Bose 1/16, and the alpha^2 coefficient in closed form (docs 4k, 4l)."""
    d = clusterexp.derive("dimension 2 parameter alpha species A exchange alpha clusters pairphase "
                          "derive cluster up to 4 expand alpha about 0 to 2 from above")
    (piece,) = _series(d, "cluster", (4,))
    assert not piece.unknowns
    x = piece.variable
    closed = sympy.Rational(35, 8) - sympy.sqrt(3) / 144 * sympy.log(2 + sympy.sqrt(3))
    assert sympy.expand(piece.polynomial - (sympy.Rational(1, 16) - sympy.Rational(11, 12) * x + closed * x ** 2)) == 0
    assert "unknown Taylor coefficients" not in to_text(d)
    (b3,) = _series(d, "cluster", (3,))
    assert sympy.expand(b3.polynomial - (sympy.Rational(1, 9) - x + sympy.Rational(59, 24) * x ** 2)) == 0


def test_published_third_virial_coefficient_is_proven_and_a4_claim_is_refuted():
    """The published a_3 = 1/36 + alpha^2/12 + O(alpha^3) (Myrheim & Olaussen 1993) is proven by the
    derived b_3; a claimed a_4 = alpha^2/16 + O(alpha^3) (the textbook relation's value, which needs
    b_4^(2) = 35/8) is refuted by the derived b_4^(2) = 35/8 - (sqrt 3/144) ln(2 + sqrt 3) (docs 4k, 4l;
    the whole coefficient 4.35916 is checked by sampled loops in section 4g), with nothing left to solve."""
    d = clusterexp.derive("dimension 2 parameter alpha in [0, 1] species A exchange alpha clusters pairphase "
                          "derive virial up to 4 claim a[3] = 1/36 + alpha^2/12 + O(alpha^3) "
                          "claim a[4] = alpha^2/16 + O(alpha^3)")
    third, fourth = d.checks
    assert third.status == "proven"
    assert fourth.status == "mismatch" and not fourth.ok and not fourth.conditions
    difference = sympy.sqrt(3) / 48 * sympy.log(2 + sympy.sqrt(3)) * sympy.Symbol("alpha", nonnegative=True) ** 2
    assert sympy.simplify(fourth.difference + difference) == 0, fourth.difference
    (wrong,) = clusterexp.derive("dimension 2 parameter alpha in [0, 1] species A exchange alpha clusters "
                                 "pairphase derive virial up to 3 claim a[3] = 1/36 + alpha^2/10 + O(alpha^3)").checks
    assert wrong.status == "mismatch"


def test_exact_claim_through_a_named_piece_is_solved_for_it():
    d = clusterexp.derive("dimension 2 parameter alpha in [0, 1] species A exchange alpha clusters pairphase "
                          "derive virial up to 3 claim a[3] = 1/36 + alpha^2/12")
    (result,) = d.checks
    assert result.status == "undecided"
    (equation,) = result.conditions
    ALPHA = next(s for s in equation.rhs.free_symbols if s.name == "alpha")
    b2 = sympy.Rational(1, 4) - ALPHA + ALPHA ** 2 / 2
    assert equation.lhs.name == "b_3"
    assert sympy.expand(equation.rhs - (4 * b2 ** 2 - sympy.Rational(1, 36) - ALPHA ** 2 / 12) / 2) == 0


def test_a_claim_wrong_whatever_the_pieces_is_still_a_mismatch(tmp_path):
    path = tmp_path / "wrong.gas"
    path.write_text("dimension 2\nparameter nu in [0, 1]\nspecies A bose\nspecies B bose\nmutual A B = nu\n"
                    "clusters pairphase\nderive virial up to 3\nclaim a[2,1] = 3*nu/2 - 2*b_2_1 + O(nu^2)\n")
    out = run_cli("run", str(path), "--no-files")
    assert out.returncode == 1 and "mismatch" in out.stdout and "5*nu/2" in out.stdout


def test_mixed_truncated_claim_names_the_braiding_coefficient():
    """a[2,1] near nu = 0 for two Bose species: b_2_1(0) = 0 (no braiding: the species are independent,
    a fact of the trade) and its first order is derived, so a claim through O(nu^2) is decided, and one
    through O(nu^4) depends on the named third-order coefficient only; before, b_2_1 was a constant."""
    base = ("dimension 2 parameter nu in [0, 1] species A bose species B bose mutual A B = nu "
            "clusters pairphase derive virial up to 3 ")
    (first,) = clusterexp.derive(base + "claim a[2,1] = -nu + O(nu^2)").checks
    assert first.status == "mismatch"     # a[2,1] has no first-order term: only a_(e_i+e_j) changes
    # the second order of b_2_1 is derived too (29/24, docs/perturbative.md section 4c), so a[2,1] =
    # -2 b_2_1 + 2 nu^2 + O(nu^3) = -5 nu^2/12 + O(nu^3) is decided, and the third order stays named
    (second,) = clusterexp.derive(base + "claim a[2,1] = -5*nu^2/12 + O(nu^3)").checks
    assert second.status == "proven"
    (third,) = clusterexp.derive(base + "claim a[2,1] = -5*nu^2/12 + O(nu^4)").checks
    assert third.status == "undecided"
    assert [(e.lhs.name, e.rhs) for e in third.conditions] == [("b_2_1_nu_3_above", -1)]


def test_given_series_truncates_higher_pieces_through_their_taylor_coefficients():
    """b[3] given to O(alpha^2): a[4] is known to O(alpha^2) and b_4 enters as its value at alpha = 0
    (the ideal Bose 1/16) plus a named first coefficient; at alpha = 0 this is the 2D Bose a_4 = 0
    [published: Viefers, Ravndal, Haugset 1995, a_n = B_(n-1)/n!]."""
    d = clusterexp.derive("dimension 2 parameter alpha in [0, 1] species A exchange alpha clusters pairphase "
                          "{ b[3] = 1/9 - alpha + O(alpha^2) } derive virial up to 4")
    a4 = d.value("virial", (4,))
    assert a4.getO() is not None
    polynomial = a4.removeO()
    # b_4's first order comes from the perturbative route: with the given b_3^(1) = -1 the tool's a_4
    # has no first-order term, as published [Dasnieres de Veigy & Ouvry, Nucl. Phys. B 388 (1992) 715:
    # at first order about bosons only a_2 changes]; and at alpha = 0 it is the 2D Bose a_4 = 0
    assert polynomial == 0


def test_a_piece_with_a_kink_inside_the_range_is_refused_in_a_truncated_claim():
    with pytest.raises(InputError, match="not analytic at alpha = 0"):
        clusterexp.derive("dimension 2 parameter alpha species A exchange alpha clusters pairphase "
                          "derive cluster up to 3 claim b[3] = 1/9 + O(alpha)").checks


def test_document_with_named_coefficients_compiles(tmp_path):
    import shutil
    import subprocess
    if shutil.which("pdflatex") is None:
        pytest.skip("pdflatex not installed")
    d = clusterexp.derive(ANYONS.replace("alpha species", "alpha in [0, 1] species")
                          .replace("up to 3", "up to 4")
                          + "expand alpha about 0 to 2 from above claim a[4] = alpha^2/16 + O(alpha^3) "
                          "claim a[3] = 1/36 + alpha^2/12 + O(alpha^4)")
    tex = latex_document(d)
    assert r"{b_{3}}^{[\alpha^{3}]+}" in tex and "holds if and only if" in tex and "mismatch" in tex
    (tmp_path / "doc.tex").write_text(tex)
    run = subprocess.run(["pdflatex", "-interaction=nonstopmode", "-halt-on-error", "doc.tex"], cwd=tmp_path,
                         capture_output=True, text=True, timeout=120)
    assert run.returncode == 0, run.stdout[-2000:]


def test_a_given_exact_piece_free_of_the_variable_is_flagged_in_the_series():
    """b[2,1] given as nu/5 says nothing about alpha although b[2,1] depends on the exchange parameter of
    A: the series in alpha takes it as given and says so (text and JSON)."""
    d = clusterexp.derive("dimension 2 parameter alpha in [0, 1] parameter nu in [0, 1] species A exchange alpha "
                          "species B bose mutual A B = nu clusters pairphase { b[2,1] = nu/5 } derive virial up to 3 "
                          "expand alpha about 0 to 1")
    (piece,) = _series(d, "virial", (2, 1))
    assert piece.notes == ("b[2,1] as given, taken as independent of alpha",)
    record = json.loads(to_json(d))
    (a21,) = [c for c in record["coefficients"] if c["index"] == [2, 1]]
    assert a21["series"][0]["notes"] == ["b[2,1] as given, taken as independent of alpha"]


def test_an_undecided_claim_exits_0_and_says_so_on_stderr(tmp_path):
    """Through third order the published a_3 = 1/36 + alpha^2/12 (Myrheim & Olaussen 1993) holds exactly
    when b_3's alpha^3 coefficient makes the alpha^3 term of 4 b_2^2 - 2 b_3 vanish: with the exact
    b_2 = 1/4 - alpha + alpha^2/2 (Arovas et al. 1985), [alpha^3] 4 b_2^2 = -4, so b_3's is -2."""
    path = tmp_path / "a3.gas"
    path.write_text("dimension 2\nparameter alpha in [0, 1]\nspecies A exchange alpha\nclusters pairphase\n"
                    "derive virial up to 4\nclaim a[3] = 1/36 + alpha^2/12 + O(alpha^4)\n")
    out = run_cli("run", str(path), "--no-files")
    assert out.returncode == 0
    assert "a3.gas:6:1: check undecided: a[3] up to O(alpha^4) holds only if" in out.stderr
    assert "b_3_alpha_3_above = -2" in out.stdout


@pytest.mark.parametrize("side", ["above", "below"])
def test_no_first_order_term_in_any_virial_coefficient_beyond_the_second_about_bosons(side):
    """First order in the exchange parameter about bosons: only a_2 changes [published: Dasnieres de
    Veigy & Ouvry, Nucl. Phys. B 388 (1992) 715]. The tool's a_3..a_6 series, built from the exact b_2
    and the perturbative route's b_n^(1) = -(2/n) H_(n-1) (values -1, -11/12, -5/6, -137/180 for n = 3..6:
    physics.md section 5, derived), must show no linear term on either side of the kink."""
    d = clusterexp.derive("dimension 2 parameter alpha species A exchange alpha clusters pairphase "
                          f"derive virial up to 6 derive cluster up to 6 expand alpha about 0 to 1 from {side}")
    for n in range(3, 7):
        (piece,) = _series(d, "virial", (n,))
        assert sympy.Poly(piece.polynomial, piece.variable).coeff_monomial(piece.variable) == 0, n
    sign = 1 if side == "above" else -1
    for n, h in zip(range(3, 7), [sympy.Rational(-1), sympy.Rational(-11, 12), sympy.Rational(-5, 6),
                                   sympy.Rational(-137, 180)]):
        (piece,) = _series(d, "cluster", (n,))
        assert sympy.Poly(piece.polynomial, piece.variable).coeff_monomial(piece.variable) == sign * h, n


def test_no_first_order_term_about_fermions():
    """About the fermion point a_3 has no first-order term [published: Myrheim & Olaussen, Phys. Lett. B
    299 (1993) 267, introduction]; the expansion there is analytic."""
    d = clusterexp.derive("dimension 2 parameter alpha species A exchange alpha clusters pairphase "
                          "derive virial up to 4 expand alpha about 1 to 1")
    for n in (3, 4):
        (piece,) = _series(d, "virial", (n,))
        assert piece.side is None and not piece.unknowns
        shifted = sympy.expand(piece.polynomial.subs(piece.variable, 1 + sympy.Symbol("u")))
        assert shifted.coeff(sympy.Symbol("u"), 1) == 0, n


def test_first_order_in_two_parameters_at_once_leaves_only_the_cross_term():
    """A truncation in the exchange parameter of A and the mutual parameter at once (unequal masses,
    B fermions): every first-order term of the mixed a[2,1] is known (at first order the statistical
    coupling is a contact whose only effect on a is in a_(2 e_i) and a_(e_i + e_j): docs/perturbative.md,
    checked there against the Monte Carlo), and a[2,1](0, 0) = 0 (species that do not braid: a fact of
    the trade); what is left in the box O(alpha^2) + O(nu^2) is the alpha*nu term, of total degree 2,
    which the route derives (the whole of b_{2,1} at second order): the box claim must use it, the same
    number as the joint series through total degree 2, not name it as an unknown."""
    head = ("dimension 2 parameter alpha in [0, 1] parameter nu in [0, 1] species A exchange alpha "
            "species B mass 2 fermi mutual A B = nu clusters pairphase derive virial up to 3 ")
    d = clusterexp.derive(head + "claim a[2,1] = O(alpha^2) + O(nu^2) expand alpha, nu about 0, 0 to 2 from above")
    (result,) = d.checks
    assert result.status == "mismatch", result.render()
    alpha, nu = sympy.symbols("alpha nu", real=True)
    difference = sympy.expand(result.difference.subs({s: {"alpha": alpha, "nu": nu}[s.name]
                                                      for s in result.difference.free_symbols}))
    cross = difference.coeff(alpha, 1).coeff(nu, 1)
    assert cross != 0 and sympy.expand(difference - cross * alpha * nu) == 0, difference
    (series,) = d.series_of(d.coefficient("virial", (2, 1)))
    joint = sympy.expand(series.polynomial.subs({s: {"alpha": alpha, "nu": nu}.get(s.name, s)
                                                 for s in series.polynomial.free_symbols}))
    assert joint.coeff(alpha, 1).coeff(nu, 1) == -cross
    d = clusterexp.derive(head + f"claim a[2,1] = ({-cross})*alpha*nu + O(alpha^2) + O(nu^2)")
    assert d.checks[0].status == "proven", d.checks[0].render()


@pytest.mark.parametrize("text, message", [
    # the printed branch holds on the declared range only: a[2] about 5/2 is 1/8 + (alpha - 5/2)/2 by the
    # period 2, not the [0, 1] branch continued
    ("parameter alpha in [0, 1] species A exchange alpha clusters pairphase derive virial up to 2 "
     "expand alpha about 5/2 to 1", "lies outside the declared range"),
    # whether Mod(alpha + beta, 1) jumps at alpha = 0 depends on beta
    ("parameter alpha, beta species A exchange alpha species B exchange beta mutual A B = alpha + beta "
     "clusters pairphase derive virial up to 3 expand alpha about 0 to 1 from above", "not decided"),
    # a[0,2] = -1/(4 m): a pole, not a traceback
    ("parameter m positive species A bose species B bose mass m clusters pairphase derive virial up to 2 "
     "expand m about 0 to 1", "has no Taylor series"),
])
def test_series_that_cannot_be_printed_honestly_are_refused(text, message):
    out = run_cli("run", "--no-files", "-e", "dimension 2 " + text)
    assert out.returncode == 2 and message in out.stderr and "Traceback" not in out.stderr


def test_a_numeric_tube_coverage_cannot_refute_a_claim_that_differs_at_second_order():
    """With the coverage a number, the O(coverage^2) terms left out are numbers too: a claim that differs
    from the first-order value only there (here by rho^2 g^2 (1 - g)^2) is undecided, not wrong."""
    d = clusterexp.derive("dimension 2 parameter g in [0, 1] species A bose tubes flux g coverage 1/10 "
                          "clusters pairphase derive cluster up to 2 "
                          "claim b[1] = 1 - g/20 + g^2/20 + g^2*(1-g)^2/100")
    (result,) = d.checks
    assert result.status == "undecided" and result.ok


def test_generic_coefficients_are_not_sampled_in_a_truncated_claim():
    """`clusters generic` with an exchange parameter: a truncated claim names the b's Taylor coefficients
    and states the equations on them, instead of sampling them as if they were parameters."""
    d = clusterexp.derive("dimension 2 parameter alpha in [0, 1] species A exchange alpha clusters generic "
                          "derive virial up to 3 claim a[3] = 1/36 + O(alpha^2)")
    (result,) = d.checks
    assert result.status == "undecided"
    assert not any("sampled" in note for note in result.notes)
