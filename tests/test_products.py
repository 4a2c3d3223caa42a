"""The statements that use derived coefficients: claim, evaluate, tabulate, plot, typeset.

Physics values here come from outside the project (named beside each check); the checks module's
own decisions are tested in test_checks.py.
"""
import csv
import io
import json
import re
import os
import shutil
import subprocess

import mpmath
import pytest
import sympy

import clusterexp
from clusterexp.language.build import build_system
from clusterexp.errors import InputError
from clusterexp.export import latex_document, latex_snippet, to_json
from clusterexp.progress import Progress
from conftest import ROOT, run_cli

ANYONS = """dimension 2
parameter alpha in [0, 1]
species A exchange alpha
clusters pairphase { a[3] = 1/36 + alpha^2/12 + O(alpha^3) }
derive virial up to 3
"""
MIXTURE = """dimension 2
parameter alpha in [0, 2]
parameter nu in [0, 1]
species A exchange alpha
species B mass 1/2 bose
mutual A B = nu
clusters pairphase { }
derive virial up to 2
"""


def test_claim_of_the_published_second_virial_coefficient_is_proven():
    # a_2 = -1/4 + alpha - alpha^2/2 on [0, 2] (Arovas, Schrieffer, Wilczek, Zee, Nucl. Phys. B 251
    # (1985) 117)
    d = clusterexp.derive(ANYONS + "claim a[2] = -1/4 + alpha - alpha^2/2")
    (result,) = d.checks
    assert result.status == "proven" and result.ok


def test_claim_with_a_wrong_coefficient_fails_with_the_difference_and_exit_code_1(tmp_path):
    path = tmp_path / "hand.gas"
    path.write_text(ANYONS + "claim a[2] = -1/4 + alpha - alpha^2/3\n")
    result = run_cli("run", str(path), "--files-into", str(tmp_path))
    assert result.returncode == 1
    assert f"{path}:6:1: check failed: a[2]" in result.stderr
    assert "claimed - derived = alpha**2/6" in result.stdout
    assert "leading term about alpha = 0: alpha**2/6" in result.stdout


def test_truncated_claim_is_compared_below_its_order():
    # a_3 = 1/36 + alpha^2/12 + O(alpha^4) near bosons (derived from the series of Myrheim &
    # Olaussen, cond-mat/9210028): given as input, claimed back through alpha^2.
    d = clusterexp.derive(ANYONS + "claim a[3] = 1/36 + alpha^2/12 + O(alpha^3)\n"
                                   "claim a[3] = 1/36 + alpha^2/10 + O(alpha^3)")
    good, bad = d.checks
    assert good.status == "proven" and "O(alpha^3)" in good.label
    assert bad.status == "mismatch"


def test_claim_beyond_what_is_known_says_so():
    # the derived a_3 is known through alpha^2 only; a claim through alpha^3 is compared through
    # alpha^2 and carries a note
    d = clusterexp.derive(ANYONS + "claim a[3] = 1/36 + alpha^2/12 + 5*alpha^3")
    (result,) = d.checks
    assert result.status == "proven"
    assert any("known only up to O(alpha^3)" in n for n in result.notes)


def test_claim_in_generated_symbols_the_textbook_inversion():
    # a_3 = 4 b_2^2 - 2 b_3, a_4 = -20 b_2^3 + 18 b_2 b_3 - 3 b_4 (Pathria & Beale, Statistical
    # Mechanics, 3rd ed., section on the virial expansion; equation numbers from memory)
    d = clusterexp.derive("dimension 3 species A bose clusters generic derive virial up to 4 "
                          "claim a[3] = 4*b_2^2 - 2*b_3  claim a[4] = -20*b_2^3 + 18*b_2*b_3 - 3*b_4")
    assert [c.status for c in d.checks] == ["proven", "proven"]


def test_claim_of_density_and_fugacity_coefficients():
    # one species, generic b: rho lambda^d = z + 2 b_2 z^2 + ..., and z = rho - 2 b_2 rho^2 + ...
    # (first step of the textbook reversion)
    d = clusterexp.derive("dimension 2 species A bose derive virial up to 2 "
                          "claim rho_A[2] = 2*b_2  claim z[2] = -2*b_2  claim rho[1] = 1")
    assert [c.status for c in d.checks] == ["proven", "proven", "proven"]


def test_claim_of_an_irrational_value_is_proven():
    # 3D ideal Bose a_3 = 1/8 - 2/(9 sqrt 3) (Pathria & Beale 3rd ed., sec. 7.1: -0.0033001)
    d = clusterexp.derive("dimension 3 species A bose clusters ideal derive virial up to 3 "
                          "claim a[3] = 1/8 - 2/(9*sqrt(3))  claim a[2] = -0.17678")
    proven, rounded = d.checks
    assert proven.status == "proven"
    assert rounded.status == "numerically consistent, not proven"  # five digits, not the exact value
    assert rounded.digits == 5


def test_decimal_claims_against_the_textbook_table():
    # 3D ideal Bose a_2..a_5 = -0.17678, -0.0033001, -0.00011129, -0.0000035405 (Pathria & Beale,
    # Statistical Mechanics, 3rd ed., sec. 7.1): each rounds the exact value, so each is accepted at
    # its written digits; the same numbers one unit off in the last digit are refused
    table = ["-0.17678", "-0.0033001", "-0.00011129", "-0.0000035405"]
    claims = " ".join(f"claim a[{n}] = {v}" for n, v in zip(range(2, 6), table))
    off = ["-0.17677", "-0.0033002", "-1.1128e-4", "-3.5406e-6"]
    claims += " " + " ".join(f"claim a[{n}] = {v}" for n, v in zip(range(2, 6), off))
    d = clusterexp.derive("dimension 3 species A bose clusters ideal derive virial up to 5 " + claims)
    statuses = [c.status for c in d.checks]
    assert statuses == ["numerically consistent, not proven"] * 4 + ["mismatch"] * 4
    assert [c.digits for c in d.checks] == [5] * 8
    assert "does not round to it" in d.checks[4].method and "-0.17677" in d.checks[4].render()


def test_decimal_claim_rounding_edges_and_exact_decimals():
    # 2D ideal Fermi a_2 = +1/4 (a_n = B_{n-1}/n!, physics.md; sign from the Fermi point): 0.25 is the
    # exact value; 0.2 and 0.3 are the two roundings at one decimal (0.25 lies half a unit from
    # each: a rounding tie, neither consistent nor refuted); 0.35 is not; 2.5e-1 is exact too
    d = clusterexp.derive("dimension 2 species A fermi clusters ideal derive virial up to 2 "
                          "claim a[2] = 0.25  claim a[2] = 0.2  claim a[2] = 0.3  claim a[2] = 0.35 "
                          "claim a[2] = 2.5e-1  claim a[2] = -0.25")
    assert [c.status for c in d.checks] == ["proven", "rounding tie, undecided", "rounding tie, undecided",
                                            "mismatch", "proven", "mismatch"]


def test_a_decimal_zero_claims_that_the_value_vanishes():
    # 3D Bose a_2 = -2^(-5/2) (Pathria & Beale 3rd ed., sec. 7.1) is not zero: 0.0 and 0e3 are exact
    # zeros, not the loose roundings +-0.05 and +-500 their last digits would allow
    d = clusterexp.derive("dimension 3 species A bose clusters ideal derive virial up to 2 "
                          "claim a[2] = 0.0  claim a[2] = 0e3  claim a[2] = -0.2")
    assert [c.status for c in d.checks] == ["mismatch", "mismatch", "numerically consistent, not proven"]


def test_decimal_claim_in_json_names_both_values(tmp_path):
    path = tmp_path / "t.gas"
    path.write_text("dimension 3 species A bose clusters ideal derive virial up to 3 claim a[3] = -0.0034")
    run = run_cli("run", str(path), "--format", "json")
    assert run.returncode == 1
    record, = json.loads(run.stdout)["checks"]
    assert record["status"] == "mismatch" and record["compared_as_decimal"] == "-0.0034"
    assert record["claimed_value"] == "-0.0034" and record["derived_value"].startswith("-0.00330005")


def test_decimals_inside_expressions_stay_exact_fractions():
    # a decimal against a value with parameters, or inside a longer expression, is an exact fraction,
    # and a mismatch says so (ASWZ a_2(alpha) is not the constant 1/8)
    d = clusterexp.derive(ANYONS + "claim a[2] = 0.125\nclaim a[2] = -0.25 + alpha - 0.5*alpha^2")
    constant, polynomial = d.checks
    assert constant.status == "mismatch"
    assert any("0.125 = 1/8" in n for n in constant.notes)
    assert polynomial.status == "proven"


def test_evaluate_against_textbook_decimals():
    # 3D Bose a_2, a_3 = -0.17678, -0.0033001 (Pathria & Beale 3rd ed., sec. 7.1); the exact values
    # -2^(-5/2) and 1/8 - 2/(9 sqrt 3) evaluated here with mpmath
    d = clusterexp.derive("dimension 3 species A bose clusters ideal derive virial up to 3 "
                          "evaluate a[2], a[3] digits 25")
    (evaluation, rows), = d.evaluations
    values = dict(rows)
    with mpmath.workdps(40):
        assert abs(mpmath.mpf(values["a[2]"]) - (-mpmath.mpf(2) ** mpmath.mpf(-2.5))) < mpmath.mpf(10) ** -24
        exact = mpmath.mpf(1) / 8 - 2 / (9 * mpmath.sqrt(3))
        assert abs(mpmath.mpf(values["a[3]"]) - exact) < mpmath.mpf(10) ** -26
    assert round(float(values["a[3]"]), 7) == -0.0033001


def test_evaluate_at_a_point_and_refuses_unused_names():
    d = clusterexp.derive(ANYONS + "evaluate a[2] at alpha = 1/2")
    # a_2(1/2) = 1/8 (Arovas, Schrieffer, Wilczek, Zee 1985)
    assert d.evaluations[0][1] == [("a[2]", "0.125")]
    d = clusterexp.derive(ANYONS + "parameter g\nevaluate a[2] at alpha = 1/2, g = 1")
    with pytest.raises(InputError, match="does not depend on g") as error:
        d.evaluations
    assert error.value.span.line == 7


def test_table_csv_against_the_closed_form(tmp_path):
    # mutual parameter nu, equal masses: mixed virial coefficient nu (1 - nu), zero at 0 and 1
    # (physics.md, derived; vanishing at integer nu is a fact of the trade)
    d = clusterexp.derive("dimension 2 parameter nu in [0, 1] species A bose species B bose mutual A B = nu "
                          "clusters pairphase {} derive virial up to 2 "
                          "tabulate a[1,1], a[2,0] over nu from 0 to 1 step 1/10 digits 12 into \"mixed.csv\"")
    written = d.write_files(tmp_path)
    assert written == [tmp_path / "mixed.csv"]
    rows = list(csv.reader(io.StringIO((tmp_path / "mixed.csv").read_text())))
    assert rows[0] == ["nu", "a[1,1]", "a[2,0]"]
    assert len(rows) == 12
    for nu, a11, a20 in rows[1:]:
        x = sympy.Rational(nu)
        assert abs(float(a11) - float(x * (1 - x))) < 1e-12
        assert float(a20) == -0.25  # 2D Bose a_2 (Viefers, Ravndal, Haugset 1995)
    assert rows[1][1] in ("0", "0.0") and rows[-1][1] in ("0", "0.0")


def test_table_over_two_axes_with_a_fixed_parameter(tmp_path):
    d = clusterexp.derive("dimension 2 parameter g in [0, 1] parameter h in [0, 1] parameter k in [0, 1] "
                          "species A exchange g species B exchange h statistics A B = k clusters exclusion level "
                          "derive cluster up to 2 "
                          "tabulate b[1,1], b[2,0], b[0,2] over g in [0, 1/2], k from 0 to 1 step 1/2 at h = 1 "
                          "into \"t.csv\"")
    d.write_files(tmp_path)
    rows = list(csv.reader(io.StringIO((tmp_path / "t.csv").read_text())))
    assert rows[0] == ["g", "k", "h", "b[1,1]", "b[2,0]", "b[0,2]"] and len(rows) == 7
    # two species on one level: b_11 = -(g_12 + g_21) (physics.md, derived), here g_21 = 0; one
    # species: b_2 = (1 - 2g)/2 (Desbois, Heinemann, Ouvry, cond-mat/9407059; Wu 1994)
    for g, k, h, b11, b20, b02 in rows[1:]:
        assert float(b11) == -float(sympy.Rational(k))
        assert float(b20) == float((1 - 2 * sympy.Rational(g)) / 2)
        assert float(b02) == -0.5


def test_plot_writes_real_images(tmp_path):
    pytest.importorskip("matplotlib")
    d = clusterexp.derive(MIXTURE + "plot a[A:2], b[A:2] over alpha into \"line.png\"\n"
                          "parameter r in [1/2, 2]\nspecies C mass r bose\nmutual A C = nu\n"
                          "plot a[1,0,1] over nu, r into \"map.pdf\"")
    paths = d.write_files(tmp_path)
    # each figure as vector PDF and PNG, with its caption beside it
    assert sorted(p.name for p in paths) == ["line.caption.tex", "line.pdf", "line.png",
                                             "map.caption.tex", "map.pdf", "map.png"]
    for name in ("line", "map"):
        png, pdf = (tmp_path / f"{name}.png").read_bytes(), (tmp_path / f"{name}.pdf").read_bytes()
        assert png.startswith(b"\x89PNG") and len(png) > 10_000
        assert pdf.startswith(b"%PDF") and len(pdf) > 5_000


@pytest.mark.parametrize("text, message, column", [
    ("claim q[2] = 1", "unknown coefficient 'q[...]'", 7),
    ("claim a[5] = 1", "a[5] has total order 5 but `order 3` is declared", 7),
    ("claim rho_C[2] = 1", "unknown species 'C' in rho_C", 7),
    ("claim a[2] = nu", "unknown name 'nu'", 14),
    ("claim a[2] = 1 + O(2)", "a claim ends in O(p^k)", 14),
    ("evaluate a[2] at beta = 1", "'beta' is not a declared parameter", 18),
    ("evaluate a[2] at alpha = 1, alpha = 2", "alpha is given twice", 29),
    ("evaluate a[2] at alpha = 1 digits 0", "digits must be between 1 and 1000", 35),
    ("tabulate a[2] over alpha from 1 to 0 step 1/4 into \"t.csv\"", "must go from the lower end", 20),
    ("tabulate a[2] over alpha from 0 to 1 step 0 into \"t.csv\"", "the step must be positive", 43),
    ("tabulate a[2] over alpha in [0, 0] into \"t.csv\"", "listed twice", 20),
    ("plot a[2] over alpha into \"x.jpg\"", "a figure is written as .png, .pdf, .svg", 27),
    ("plot a[2], a[3] over alpha, alpha into \"x.png\"", "a map over two parameters shows one coefficient", 6),
    ("typeset alpha as \"\\foo\"", "this LaTeX would not compile: \\foo is not a command", 18),
    ("typeset alpha as \"x^\"", "'^' needs something after it", 18),
    ("typeset alpha as \"{x\"", "a '{' is never closed", 18),
    ("typeset alpha as \"50%\"", "'%' is special in LaTeX", 18),
    ("typeset beta as \"\\beta\"", "'beta' is neither a declared parameter nor a species", 9),
])
def test_bad_product_statements_point_at_the_line(text, message, column):
    source = ANYONS + "order 3\n" + text + "\n"
    with pytest.raises(InputError) as error:
        build_system(source, "hand.gas")
    assert message in error.value.message
    assert (error.value.span.line, error.value.span.column) == (7, column)
    assert "^" in error.value.render()


@pytest.mark.parametrize("text, message", [
    ("plot a[2] over nu into \"x.png\"", "a[2] does not depend on it"),
    ("evaluate a[3] at nu = 1/2", "does not depend on nu"),
    ("tabulate a[3] over alpha from 0 to 1 step 1/2 into \"t.csv\"", "known only as a series"),
])
def test_product_statements_refused_when_run(text, message, tmp_path):
    result = run_cli("run", "-e", ANYONS + "parameter nu\n" + text, "--files-into", str(tmp_path))
    assert result.returncode == 2 and "Traceback" not in result.stderr
    assert "<command line>:7:1: error:" in result.stderr and message in result.stderr


def test_typeset_names_reach_the_latex():
    d = clusterexp.derive(MIXTURE.replace("B", "Bee") + "typeset nu as \"\\nu_{AB}\"  typeset Bee as \"\\mathrm{B}\"  typeset wavelength as \"\\Lambda\"\n"
                          "derive density up to 2")
    snippet = latex_snippet(d)
    assert r"\nu_{AB}" in snippet and r"z_{\mathrm{B}}" in snippet and r"{\Lambda}^{2}" in snippet
    assert r"\lambda" not in snippet


@pytest.mark.skipif(shutil.which("pdflatex") is None and not os.environ.get("CI"),
                    reason="pdflatex not installed (CI installs it)")
def test_document_with_checks_values_and_tables_compiles(tmp_path):
    d = clusterexp.derive(MIXTURE + "typeset nu as \"\\tilde{\\nu}_{AB}\"  typeset wavelength as \"\\lambda_{T}\"\n"
                          "claim a[1,1] = nu*(1 - nu)  claim a[2,0] = 0\n"
                          "evaluate a[1,1], a[2,0] at alpha = 1/3, nu = 1/4 digits 20\n"
                          "tabulate a[1,1] over nu from 0 to 1 step 1/4 into \"t.csv\"")
    source = latex_document(d)
    assert r"\section{Checks of hand results}" in source and "mismatch" in source
    assert r"\begin{tabular}" in source and r"\tilde{\nu}_{AB}" in source
    (tmp_path / "doc.tex").write_text(source)
    result = subprocess.run(["pdflatex", "-interaction=nonstopmode", "-halt-on-error", "doc.tex"],
                            cwd=tmp_path, capture_output=True, text=True, timeout=120)
    assert result.returncode == 0, result.stdout[-2000:]
    assert (tmp_path / "doc.pdf").stat().st_size > 1000


def test_json_lists_checks_values_and_files():
    import json
    d = clusterexp.derive(ANYONS + "claim a[2] = 0  evaluate a[2] at alpha = 1\n"
                          "tabulate a[2] over alpha in [0, 1] into \"t.csv\"")
    data = json.loads(to_json(d))
    assert data["checks"][0]["status"] == "mismatch" and data["checks"][0]["at"]
    # a_2(1) = 1/4: the 2D Fermi gas (Viefers, Ravndal, Haugset 1995)
    assert data["values"] == [{"at": {"alpha": "1"}, "digits": 15, "values": {"a[2]": "0.25"}}]
    assert data["files"] == ["t.csv"]


def test_progress_reports_each_coefficient():
    stream = io.StringIO()
    d = clusterexp.derive(ANYONS + "claim a[2] = -1/4 + alpha - alpha^2/2")
    d.compute_all(Progress(stream=stream, enabled=True, min_interval=0))
    shown = stream.getvalue()
    assert "deriving virial coefficients: order 3/3 (a[3])" in shown
    assert "checking the claim" in shown
    assert shown.endswith("\r")  # the line is erased at the end


def test_progress_is_quiet_when_not_a_terminal(tmp_path):
    result = run_cli("run", "-e", ANYONS.replace("pairphase { a[3] = 1/36 + alpha^2/12 + O(alpha^3) }",
                                                 "generic"), "--files-into", str(tmp_path))
    assert result.returncode == 0 and result.stderr == ""


def test_files_are_written_only_when_asked(tmp_path):
    text = ANYONS + "tabulate a[2] over alpha in [0, 1] into \"t.csv\""
    assert run_cli("run", "-e", text, "--no-files", cwd=tmp_path).returncode == 0
    assert not (tmp_path / "t.csv").exists()
    assert run_cli("run", "-e", text, cwd=tmp_path).returncode == 0
    assert (tmp_path / "t.csv").is_file()


def test_notebook_display_is_latex():
    d = clusterexp.derive(ANYONS + "claim a[2] = -1/4 + alpha - alpha^2/2")
    shown = d._repr_latex_()
    assert shown.startswith("$$\\begin{aligned}") and "a_{2}" in shown
    assert d.checks[0]._repr_latex_().startswith("$$\\text{proven}")


def test_progress_shows_on_a_terminal(tmp_path):
    import pty
    import sys
    master, slave = pty.openpty()
    env = dict(os.environ, PYTHONPATH=str(ROOT))
    text = "dimension 2 species A bose species B bose derive virial up to 3"
    process = subprocess.run([sys.executable, "-m", "clusterexp", "run", "-e", text, "--no-files"], cwd=tmp_path,
                             stdout=subprocess.PIPE, stderr=slave, env=env, timeout=300)
    os.close(slave)
    shown = b""
    while True:
        try:
            chunk = os.read(master, 65536)
        except OSError:
            break
        if not chunk:
            break
        shown += chunk
    os.close(master)
    assert process.returncode == 0
    assert b"deriving virial coefficients: order 2/3 (reversion of rho(z))" in shown
    assert b"deriving virial coefficients: order 3/3 (a[3,0])" in shown
    assert b"deriving" not in process.stdout


# -- found in review ---------------------------------------------------------------------------------

@pytest.mark.parametrize("text, message", [
    ("evaluate a[2] at alpha = 3", "alpha = 3 is outside its declared range [0, 1]"),
    ("tabulate a[2] over alpha from -1 to 1 step 1/2 into \"t.csv\"", "alpha = -1 is outside its declared range"),
    ("tabulate a[2] over alpha in [0, 2] into \"t.csv\"", "alpha = 2 is outside its declared range"),
    ("plot a[2] over alpha from 0 to 3 into \"p.png\"", "alpha = 3 is outside its declared range"),
    ("claim a[2] = abs(sin(alpha) - alpha) + O(alpha^3)", "O(...) needs the other terms to be series in its variable"),
    ("tabulate a[2] over alpha in [0, 1] into \"t.csv\"  tabulate a[3] over alpha in [0, 1] into \"t.csv\"",
     "t.csv is also written by the statement at line 6"),
])
def test_values_outside_the_declared_range_and_other_refusals(text, message):
    # the pair-phase a_2 is a single polynomial only inside the declared range: a value outside it
    # would silently use the wrong branch (a_2(3) = a_2(1) = 1/4, not -7/4)
    with pytest.raises(InputError, match=re.escape(message)) as error:
        build_system(ANYONS + text, "hand.gas")
    assert error.value.span.line == 6


def test_periodic_closed_forms_plot_over_several_periods(tmp_path):
    pytest.importorskip("matplotlib")
    d = clusterexp.derive("dimension 2 parameter alpha species A exchange alpha clusters pairphase {} "
                          "derive virial up to 2 plot a[2] over alpha from -1 to 3 into \"p.png\" "
                          "evaluate a[2] at alpha = 3 claim a[2] = -1/4 + Mod(alpha, 2) - Mod(alpha, 2)^2/2")
    d.write_files(tmp_path)
    assert (tmp_path / "p.png").read_bytes().startswith(b"\x89PNG")
    # period 2 (Arovas, Schrieffer, Wilczek, Zee 1985): a_2(3) = a_2(1) = 1/4
    assert d.evaluations[0][1] == [("a[2]", "0.25")]
    assert d.checks[0].ok


def test_mismatch_values_are_shown_with_the_digits_that_tell_them_apart():
    d = clusterexp.derive("dimension 2 species A bose derive virial up to 2 claim a[2] = -b_2 + 10^(-40)")
    (result,) = d.checks
    assert result.status == "mismatch"
    assert result.claimed_value != result.derived_value
    assert result.claimed_value.rstrip("0").endswith("1")


def test_composite_typeset_names_stay_one_factor():
    d = clusterexp.derive("dimension 3 parameter r positive species A bose species B mass r bose clusters ideal "
                          "derive cluster up to 2 typeset r as \"\\hbar\\omega\" typeset B as \"e^-\"")
    snippet = latex_snippet(d)
    assert r"\left(\hbar\omega\right)^{\frac{3}{2}}" in snippet
    assert r"b_{\left(e^-\right)^{2}}" in snippet


def test_files_section_says_whether_they_were_written(tmp_path):
    text = ANYONS + "tabulate a[2] over alpha in [0, 1] into \"t.csv\""
    skipped = run_cli("run", "-e", text, "--no-files", cwd=tmp_path)
    assert "files asked for (not written in this run):" in skipped.stdout
    written = run_cli("run", "-e", text, cwd=tmp_path)
    assert "files written:" in written.stdout
    again = run_cli("run", "-e", text, cwd=tmp_path)
    assert again.returncode == 2 and "t.csv exists; pass --overwrite to replace it" in again.stderr
    assert run_cli("run", "-e", text, "--overwrite", cwd=tmp_path).returncode == 0


def test_evaluate_a_coefficient_that_does_not_depend_on_a_parameter_of_the_gas(cli):
    """a[2,0] does not depend on the mutual parameter nu, which the gas does depend on: evaluated (a_2 of
    bosons = -1/4: Viefers, Ravndal, Haugset, Am. J. Phys. 63 (1995) 369)."""
    text = ("dimension 2 parameter nu in [0, 1] species A species B mutual A B = nu clusters pairphase "
            "evaluate a[2,0], a[1,1] at nu = 1/2")
    d = clusterexp.derive(text)
    # a[1,1] = nu (1 - nu) (physics.md, derived)
    assert d.evaluations[0][1] == [("a[2,0]", "-0.25"), ("a[1,1]", "0.25")]
    result = cli("run", "-e", text.replace(", a[1,1]", ""), "--no-files")
    assert result.returncode == 0 and "a[2,0] = -0.25" in result.stdout
