"""The `sample` statement: Monte Carlo numbers for third-order coefficients inside the language.

Physics expectations name their sources; Monte Carlo values are compared within their own error bars.
Runs are short (a few thousand loops) so that the module stays within about half a minute.
"""
from __future__ import annotations

import csv
import importlib.util
import json
import math

import pytest
import sympy

from clusterexp import InputError, NotSupportedYet, build_system, derive
from clusterexp.export import FORMATTERS
from clusterexp.loops import scan_third_order
from clusterexp.loops.report import plus_minus
from clusterexp.loops.request import DEFAULT_TIME_CAP
from clusterexp.loops.sampled import run_seed

from conftest import run_cli
from test_loops import published_a3

SEMIONS = "dimension 2\nparameter alpha in [0, 1]\nspecies A exchange alpha\nclusters pairphase\n"
MIXTURE = ("dimension 2\nparameter alpha in [0, 1]\nparameter nu in [0, 1]\nspecies A exchange alpha\n"
           "species B exchange alpha\nmutual A B = nu\nclusters pairphase\n")


def sampled(text: str):
    """{(label, point text): (value, error)} of every sampled number of an input."""
    out = {}
    for statement in derive(text).sampled:
        for point in statement.points:
            where = ", ".join(f"{n} = {v}" for n, v in point.point)
            for v in point.values:
                out[(v.label, where)] = (v.value, v.error)
    return out


# ---------------------------------------------------------------------------- the statement


def test_statement_is_read_with_every_clause():
    system = build_system(MIXTURE + 'sample a[2,1], b[2,1] at alpha = 1/3 over nu = [0, 1/4, 1/2] seed 7 '
                          'within 30 seconds target 5e-3 with 20000 loops table "x.csv"')
    (s,) = system.samplings
    assert [(k, n) for k, n, _ in s.coefficients] == [("virial", (2, 1)), ("cluster", (2, 1))]
    assert [(p.name, v) for p, v in s.fixed] == [("alpha", sympy.Rational(1, 3))]
    assert [(p.name, list(v)) for p, v in s.axes] == [("nu", [0, sympy.Rational(1, 4), sympy.Rational(1, 2)])]
    assert (s.seed, s.time_cap, s.target, s.loops, s.table, s.map) == (7, 30.0, 5e-3, 20000, "x.csv", None)
    assert s.span.line == 8 and s.clause_span("target").column == 87


def test_default_budget_is_a_time_cap():
    (s,) = build_system(SEMIONS + "sample a[3] at alpha = 1/2").samplings
    assert s.time_cap == DEFAULT_TIME_CAP and s.loops is None and s.seed == 0
    (s,) = build_system(SEMIONS + "sample a[3] at alpha = 1/2 with 5000 loops").samplings
    assert s.time_cap is None  # a loop budget alone is a complete budget


BAD = [
    # (input, message start, line:column) -- requests outside the estimator's domain first
    (SEMIONS.replace("dimension 2", "dimension 3") + "sample a[3] at alpha = 1/2",
     "the Brownian-loop estimator works in the plane only (`dimension 2`), not in dimension 3; supported:", "5:1"),
    (SEMIONS + "sample a[4] at alpha = 1/2", "a[4] is a 4-body coefficient: the loop estimator gives third-order", "5:8"),
    ("dimension 2 species A exchange 1/2 species B species C mutual A B = 1/2 clusters pairphase\nsample b[1,1,1]",
     "b[1,1,1] couples three species: not supported (supported:", "2:8"),
    ("dimension 2 species A exchange 1/2 sample a[3]", "sampled numbers enter the pair-phase regime", "1:36"),
    (SEMIONS + "sample a[2] at alpha = 1/2", "a[2] is exact in this regime", "5:8"),
    ("dimension 2 species A exchange 1/2 species B mass 2 mutual A B = 1/3 clusters pairphase sample a[2,1]",
     "b[2,1]: A has mass 1 and B 2; the loop estimator assumes equal masses", "1:96"),
    ("dimension 2 species A fermi clusters pairphase sample b[3]", "b[3] is exact for A (fermions", "1:55"),
    ("dimension 2 species A species B clusters pairphase sample b[2,1]", "b[2,1] is exactly 0 here", "1:59"),
    (SEMIONS + "sample a[3]", "b[3] depends on alpha (through the exchange parameter alpha): give it a value", "5:8"),
    (MIXTURE + "sample a[2,1] at alpha = 1/2", "b[2,1] depends on nu (through the mutual parameter nu)", "8:8"),
    (MIXTURE + "sample a[3,0] at alpha = 1/2, nu = 1/2", "the sampled coefficients do not depend on nu", "8:31"),
    (SEMIONS + "sample a[3] at beta = 1/2", "`at` needs a declared parameter; 'beta' is not one", "5:16"),
    (SEMIONS + "sample a[3] at alpha = 3/2", "alpha = 3/2 is outside its declared range", "5:24"),
    (SEMIONS + "sample a[3] at alpha = 1/2, alpha = 1/3", "a value for alpha is given twice", "5:29"),
    (SEMIONS + "sample a[3] at alpha = 1/2 seed 1 seed 2", "`seed` is given twice in one `sample` statement", "5:35"),
    (SEMIONS + "sample a[3] at alpha = 1/2 with 100 loops", "100 loops is less than two rounds", "5:28"),
    (SEMIONS + "sample a[3] at alpha = 1/2 within 0 seconds", "the seconds must be positive", "5:28"),
    (SEMIONS + "sample a[3] at alpha = 1/2 target 0", "the error bar must be positive", "5:28"),
    (SEMIONS + 'sample a[3] over alpha = [0, 1/2] map "m.png"', "a map needs two scanned parameters", "5:35"),
    (MIXTURE + 'sample a[2,1] over alpha = [0, 1], nu = [0, 1] map "m.txt"', "a map file name ends in", "8:48"),
    (SEMIONS + "sample a[3] over alpha = [" + ", ".join(["1/2"] * 51) + "]", "at most 50 values", "5:18"),
    (SEMIONS + "order 2\nsample a[3] at alpha = 1/2", "sampled coefficients are of total order 3", "6:8"),
    (SEMIONS.replace("clusters pairphase", "clusters pairphase { b[3] = 1/9 }") + "sample a[3] at alpha = 1/2",
     "b[3] is both given in the pairphase block and sampled here", "5:8"),
    ("dimension 2 species A exchange 1/2 clusters pairphase sample c[3]", "`sample` takes cluster (b[...]) and virial",
     "1:62"),
]


@pytest.mark.parametrize("text,message,place", BAD, ids=[b[1][:40] for b in BAD])
def test_bad_requests_point_at_the_line(text, message, place):
    with pytest.raises((InputError, NotSupportedYet)) as caught:
        build_system(text, "in.gas")
    error = caught.value
    assert error.message.startswith(message) if isinstance(error, InputError) else message in str(error), str(error)
    assert f"{error.span.line}:{error.span.column}" == place, error.render()


def test_bad_request_through_the_command_line(tmp_path):
    path = tmp_path / "four.gas"
    path.write_text(SEMIONS + "sample a[4] at alpha = 1/2\n")
    result = run_cli("run", str(path))
    assert result.returncode == 2 and "Traceback" not in result.stderr
    lines = result.stderr.splitlines()
    assert lines[0].startswith(f"{path}:5:8: error: a[4] is a 4-body coefficient") and "supported:" in lines[0]
    assert lines[1].strip() == "sample a[4] at alpha = 1/2" and lines[2].strip() == "^^^^"


def test_unreachable_target_says_what_the_run_would_need():
    # +-1e-6 on a_3 needs ~1e11 loops; the run stops early on the projection and says so at `target`.
    text = SEMIONS + "sample a[3] at alpha = 1/2 seed 1 within 3 seconds target 1e-6\n"
    result = run_cli("run", "-e", text)
    assert result.returncode == 2 and "Traceback" not in result.stderr, result.stderr
    first = result.stderr.splitlines()[0]
    assert first.startswith("<command line>:5:52: error: target 1e-06 on a[3] is out of reach with the time cap of 3 s")
    assert "the run would need about" in first and "loops, about" in first


# ---------------------------------------------------------------------------- the numbers


def test_a3_of_semions_against_the_published_fourier_form_and_the_inversion():
    values = sampled(SEMIONS + "sample a[3], b[3] at alpha = 1/2 seed 11 with 48000 loops\n")
    a3, a3_error = values[("a[3]", "alpha = 1/2")]
    b3, b3_error = values[("b[3]", "alpha = 1/2")]
    # Myrheim & Olaussen, Phys. Lett. B 299 (1993) 267; Mashkevich, Myrheim & Olaussen (1996) for c_2
    assert abs(a3 - published_a3(0.5)) < 4 * a3_error and a3_error < 4e-3
    # propagation through the exact composition: a_3 = 4 b_2^2 - 2 b_3 (textbook inversion, physics.md)
    # with b_2(1/2) = 1/4 - 1/2 + 1/8 (Arovas, Schrieffer, Wilczek & Zee 1985)
    assert a3 == pytest.approx(4 * (-1 / 8) ** 2 - 2 * b3, abs=1e-15)
    assert a3_error == pytest.approx(2 * b3_error, rel=1e-12)


def test_language_run_equals_the_estimator_with_the_derived_seed():
    text = SEMIONS + "sample b[3] over alpha = [1/4, 1/2] seed 5 with 4800 loops\n"
    values = sampled(text)
    direct = scan_third_order("identical", [0.25, 0.5], samples=4800, seed=run_seed(5, (3,)), batch=200)
    for r, where in zip(direct, ("alpha = 1/4", "alpha = 1/2")):
        assert values[("b[3]", where)] == (r.cluster.value, r.cluster.error)


def test_mixed_coefficients_vanish_at_integer_mutual_parameter_and_agree_under_relabelling():
    text = MIXTURE + "sample a[2,1], a[1,2] at alpha = 1/3 over nu = [0, 1/2, 1] seed 2 with 8400 loops\n"
    values = sampled(text)
    for nu in ("0", "1"):  # no statistical coupling at integer mutual parameter (fact of the trade)
        for label in ("a[2,1]", "a[1,2]"):
            value, error = values[(label, f"nu = {nu}, alpha = 1/3")]
            assert abs(value) < 1e-12 and error < 1e-12  # exactly 0 up to rounding of the phases
    # A and B have the same exchange parameter and mass: b[2,1] and b[1,2] are the same quantity,
    # estimated here from independent seeds, so they agree within their errors.
    (v1, e1), (v2, e2) = values[("a[2,1]", "nu = 1/2, alpha = 1/3")], values[("a[1,2]", "nu = 1/2, alpha = 1/3")]
    assert e1 > 0 and e2 > 0 and v1 != v2
    assert abs(v1 - v2) < 4 * math.hypot(e1, e2)


def test_mass_ratio_scales_the_sampled_cluster_coefficient():
    # b_n in units of the reference wavelength: (lambda_ref / lambda_i)^2 = m_i / m_ref in the plane
    # (physics.md, section 1); the same seed gives the same loops, so the ratio is exact.
    base = "dimension 2 species R species A mass 3 exchange 1/2 clusters pairphase\n"
    heavy = sampled(base + "sample b[0,3] seed 4 with 4800 loops\n")[("b[0,3]", "")]
    unit = sampled(base.replace("mass 3", "mass 1") + "sample b[0,3] seed 4 with 4800 loops\n")[("b[0,3]", "")]
    assert heavy[0] == pytest.approx(3 * unit[0], rel=1e-12) and heavy[1] == pytest.approx(3 * unit[1], rel=1e-12)


def test_target_error_is_met_on_the_requested_coefficient():
    values = sampled(SEMIONS + "sample a[3] at alpha = 1/4 seed 3 within 60 seconds target 6e-3\n")
    value, error = values[("a[3]", "alpha = 1/4")]
    assert error <= 6e-3
    assert abs(value - published_a3(0.25)) < 4 * error  # Myrheim & Olaussen (1993), as above


# ---------------------------------------------------------------------------- output and files


def test_outputs_carry_value_and_error(tmp_path):
    text = MIXTURE + ("derive virial a[2,1]\nsample a[2,1] over alpha = [0, 1/2], nu = [0, 1/2] seed 9 "
                      'with 2800 loops table "grid.csv" map "grid.png"\n')
    path = tmp_path / "in.gas"
    path.write_text(text)
    has_plots = importlib.util.find_spec("matplotlib") is not None
    if not has_plots:
        path.write_text(text.replace(' map "grid.png"', ""))
    result = run_cli("run", str(path), cwd=tmp_path)
    assert result.returncode == 0, result.stderr
    assert "sampled values (Brownian-loop Monte Carlo" in result.stdout
    assert "at alpha = 1/2, nu = 1/2: a[2,1] = " in result.stdout and " +- " in result.stdout
    rows = list(csv.reader((tmp_path / "grid.csv").read_text().splitlines()))
    assert rows[0] == ["alpha", "nu", "a[2,1]", "a[2,1] error", "a[2,1] slicing bias bound"] and len(rows) == 5
    assert [r[:2] for r in rows[1:]] == [["0", "0"], ["0", "0.5"], ["0.5", "0"], ["0.5", "0.5"]]  # no dates
    assert not has_plots or (tmp_path / "grid.png").read_bytes()[:4] == b"\x89PNG"
    again = run_cli("run", str(path), cwd=tmp_path)  # refuses to replace the files, before running
    assert again.returncode == 2 and "grid.csv exists; pass --overwrite" in again.stderr
    # the other printers, on one derivation (the run happens once, on first use)
    derivation = derive(text.replace(' table "grid.csv" map "grid.png"', ""))
    latex = FORMATTERS["latex"](derivation)
    assert r"a_{A^{2} B}\big|_{\alpha=\frac{1}{2}, \nu=\frac{1}{2}} &= " in latex and r" \pm " in latex
    (statement,) = json.loads(FORMATTERS["json"](derivation))["sampled"]
    assert statement["seed"] == 9 and statement["runs"][0]["loops"] == 2800
    point = statement["points"][-1]
    assert point["at"] == {"alpha": "1/2", "nu": "1/2"} and point["values"][0]["error"] > 0
    # the text table agrees with the file (same seed and budget)
    value, error, bound = (point["values"][0][k] for k in ("value", "error", "slice_bound"))
    assert rows[-1][2:] == [repr(value), repr(error), repr(bound)]


@pytest.mark.parametrize("value,error,text", [
    (0.0362049, 0.00131, "0.0362 +- 0.0013"), (0.1111111111, 0.0, "0.1111111 +- 0"), (-1e-17, 5e-17, "0 +- 0"),
    (-0.01403, 9.7e-05, "-0.014030 +- 0.000097"), (1234.5, 56.0, "1234 +- 56"), (98765.0, 4321.0, "98800 +- 4300"),
])
def test_value_and_error_are_rounded_to_the_error(value, error, text):
    assert plus_minus(value, error) == text


def test_the_loop_budget_rounded_up_to_whole_rounds_is_said(tmp_path):
    """`with 5000 loops` runs whole rounds (one batch of every family): the text says that the budget was
    rounded up and to what, and JSON gives the round size."""
    text = MIXTURE + "derive virial up to 2\nsample a[2,1] at alpha = 0 over nu = [0, 1] with 5000 loops seed 3 " \
                     "table \"t.csv\"\n"
    result = run_cli("run", "-e", text, "--files-into", str(tmp_path))
    assert result.returncode == 0, result.stderr
    assert ("b[2,1]: 5600 loops in 4 rounds (the budget of 5000 loops rounded up to whole rounds of 1400)"
            in result.stdout)
    # zero variance at alpha = 0 and integer nu (no phases: bosons, and a mutual parameter 0 or 1 is no
    # coupling, common practice): the file shows what the text shows, 0 +- 0, not rounding residue
    assert result.stdout.count("a[2,1] = 0 +- 0") == 2
    with open(tmp_path / "t.csv", newline="") as stream:
        rows = list(csv.reader(stream))
    assert [row[2:] for row in rows[1:]] == [["0.0", "0.0", "0.0"], ["0.0", "0.0", "0.0"]]
    data = json.loads(run_cli("run", "-e", text, "--format", "json", "--no-files").stdout)
    sampled_json = next(v for k, v in data.items() if isinstance(v, list) and v and isinstance(v[0], dict)
                        and "runs" in v[0])[0]
    assert sampled_json["runs"][0]["loops_per_round"] == 1400
    assert all(v["error"] == 0.0 and v["value"] == 0.0 for p in sampled_json["points"] for v in p["values"])
