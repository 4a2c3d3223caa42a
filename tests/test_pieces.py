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
    """b_3 = 1/9 - alpha + (59/24) alpha^2 + O(alpha^3) for alpha -> 0+: derived (physics.md, section 5)
    from a_3 = 1/36 + alpha^2/12 [published: Myrheim & Olaussen, Phys. Lett. B 299 (1993) 267] and the
    exact b_2 = 1/4 - alpha + alpha^2/2 [published: Arovas, Schrieffer, Wilczek, Zee, Nucl. Phys. B 251
    (1985) 117] through a_3 = 4 b_2^2 - 2 b_3."""
    return {1: sympy.Integer(-1), 2: sympy.Rational(59, 24)}


def test_third_virial_series_names_the_taylor_coefficients_of_b3():
    """The series of a_3 about the boson point used to treat b_3 as a constant (a spurious linear term
    -2 alpha); now b_3's coefficients are named per side, its value at alpha = 0 is the ideal Bose
    1/9, and with the published b_3 series both sides give a_3 = 1/36 + alpha^2/12 (Myrheim &
    Olaussen 1993; b_3 is even in alpha, so the coefficients from below are the mirrored ones)."""
    d = clusterexp.derive(ANYONS + "expand alpha about 0 to 2 from both")
    above, below = _series(d, "virial", (3,))
    assert (above.side, below.side) == ("above", "below")
    assert not any(s.name == "b_3" for s in above.polynomial.free_symbols | below.polynomial.free_symbols)
    a, b = _named(above), _named(below)
    assert set(a) == {"b_3_alpha_1_above", "b_3_alpha_2_above"}
    assert set(b) == {"b_3_alpha_1_below", "b_3_alpha_2_below"}
    k = _b3_near_bosons()
    ALPHA = above.variable
    from_above = above.polynomial.subs({a["b_3_alpha_1_above"]: k[1], a["b_3_alpha_2_above"]: k[2]})
    from_below = below.polynomial.subs({b["b_3_alpha_1_below"]: -k[1], b["b_3_alpha_2_below"]: k[2]})
    assert sympy.expand(from_above - (sympy.Rational(1, 36) + ALPHA ** 2 / 12)) == 0
    assert sympy.expand(from_below - (sympy.Rational(1, 36) + ALPHA ** 2 / 12)) == 0


def test_third_virial_series_near_fermions():
    """About alpha = 1 (analytic): a_3 = 1/36 + (1 - alpha)^2/12 [published: Myrheim & Olaussen 1993; Sen,
    Phys. Rev. Lett. 68 (1992) 2977] with b_2 = -1/4 + (alpha - 1)^2/2 means b_3 = 1/9 - (13/24)(alpha - 1)^2
    [derived]; b_3(1) is the ideal Fermi 1/9 [published: Viefers, Ravndal, Haugset, Am. J. Phys. 63 (1995)
    369], so only the first and second coefficients are named."""
    d = clusterexp.derive(ANYONS + "expand alpha about 1 to 2")
    (piece,) = _series(d, "virial", (3,))
    assert piece.side is None and not piece.kink
    ALPHA = piece.variable
    n = _named(piece)
    assert set(n) == {"b_3_alpha_1_about_1", "b_3_alpha_2_about_1"}
    value = piece.polynomial.subs({n["b_3_alpha_1_about_1"]: 0, n["b_3_alpha_2_about_1"]: sympy.Rational(-13, 24)})
    assert sympy.expand(value - (sympy.Rational(1, 36) + (1 - ALPHA) ** 2 / 12)) == 0
    record = json.loads(to_json(d))
    (a3,) = [c for c in record["coefficients"] if c["kind"] == "virial" and c["index"] == [3]]
    assert a3["series"][0]["unknowns"] == ["b_3_alpha_1_about_1", "b_3_alpha_2_about_1"]
    assert set(record["unknowns"]) == {"b_3_alpha_1_about_1", "b_3_alpha_2_about_1"}
    assert "b[3]" in record["unknowns"]["b_3_alpha_2_about_1"]


def test_a_named_piece_alone_gets_its_series():
    """b[3] = b_3 has no visible alpha, but it is a function of alpha: its series is printed."""
    d = clusterexp.derive("dimension 2 parameter alpha species A exchange alpha clusters pairphase "
                          "derive cluster up to 3 expand alpha about 0 to 1 from above")
    (piece,) = _series(d, "cluster", (3,))
    b31 = _named(piece)["b_3_alpha_1_above"]
    assert sympy.expand(piece.polynomial - (sympy.Rational(1, 9) + b31 * piece.variable)) == 0
    text = to_text(d)
    assert "b_3_alpha_1_above = coefficient of alpha in b[3] about alpha = 0 from above" in text


def test_truncated_claim_through_a_named_piece_is_undecided_with_the_conditions():
    """The published a_3 = 1/36 + alpha^2/12 + O(alpha^3) (Myrheim & Olaussen 1993) is not refuted: it
    holds exactly when b_3 = 1/9 - alpha + (59/24) alpha^2 + O(alpha^3), which the check states."""
    d = clusterexp.derive("dimension 2 parameter alpha in [0, 1] species A exchange alpha clusters pairphase "
                          "derive virial up to 3 claim a[3] = 1/36 + alpha^2/12 + O(alpha^3)")
    (result,) = d.checks
    assert result.status == "undecided" and result.ok
    solved = {e.lhs.name: e.rhs for e in result.conditions}
    k = _b3_near_bosons()
    assert solved == {"b_3_alpha_1_above": k[1], "b_3_alpha_2_above": k[2]}


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
    a fact of the trade), so a truncated claim is decided by b_2_1's first coefficient only; before,
    b_2_1 was taken as a constant."""
    d = clusterexp.derive("dimension 2 parameter nu in [0, 1] species A bose species B bose mutual A B = nu "
                          "clusters pairphase derive virial up to 3 claim a[2,1] = -nu + O(nu^2)")
    (result,) = d.checks
    assert result.status == "undecided"
    assert [(e.lhs.name, e.rhs) for e in result.conditions] == [("b_2_1_nu_1_above", 0)]


def test_given_series_truncates_higher_pieces_through_their_taylor_coefficients():
    """b[3] given to O(alpha^2): a[4] is known to O(alpha^2) and b_4 enters as its value at alpha = 0
    (the ideal Bose 1/16) plus a named first coefficient; at alpha = 0 this is the 2D Bose a_4 = 0
    [published: Viefers, Ravndal, Haugset 1995, a_n = B_(n-1)/n!]."""
    d = clusterexp.derive("dimension 2 parameter alpha in [0, 1] species A exchange alpha clusters pairphase "
                          "{ b[3] = 1/9 - alpha + O(alpha^2) } derive virial up to 4")
    a4 = d.value("virial", (4,))
    assert a4.getO() is not None
    polynomial = a4.removeO()
    symbols = {s.name: s for s in polynomial.free_symbols}
    assert set(symbols) == {"alpha", "b_4_alpha_1_above"}
    assert polynomial.subs(symbols["alpha"], 0) == 0
    # first order about bosons only a_2 changes [published: Dasnieres de Veigy & Ouvry, Nucl. Phys. B 388
    # (1992) 715]; with b_n^(1) = -(2/n) H_(n-1) [derived, physics.md section 5], b_4^(1) = -11/12 and the
    # given b_3^(1) = -1, the tool's a_4 has no first-order term
    assert sympy.expand(polynomial.subs(symbols["b_4_alpha_1_above"], sympy.Rational(-11, 12))) == 0
    assert "b_4_alpha_1_above = coefficient of alpha in b[4]" in to_text(d)


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
                          + "expand alpha about 0 to 2 from above claim a[3] = 1/36 + alpha^2/12 + O(alpha^3)")
    tex = latex_document(d)
    assert r"{b_{3}}^{[\alpha^{2}]+}" in tex and "holds if and only if" in tex
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
    path = tmp_path / "a3.gas"
    path.write_text("dimension 2\nparameter alpha in [0, 1]\nspecies A exchange alpha\nclusters pairphase\n"
                    "derive virial up to 3\nclaim a[3] = 1/36 + alpha^2/12 + O(alpha^3)\n")
    out = run_cli("run", str(path), "--no-files")
    assert out.returncode == 0
    assert "a3.gas:6:1: check undecided: a[3] up to O(alpha^3) holds only if" in out.stderr
    assert "b_3_alpha_2_above = 59/24" in out.stdout
