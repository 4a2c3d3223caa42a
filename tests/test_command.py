"""The command line: formats, exit codes, messages without tracebacks, files written safely."""
import json
import os

import pytest
import sympy

from conftest import ROOT


def test_run_expression_text(cli):
    result = cli("run", "-e", "dimension 2 species A bose clusters generic derive virial up to 3")
    assert result.returncode == 0, result.stderr
    assert "a[3] = -2*b_3 + 4*b_2**2" in result.stdout or "a[3] = 4*b_2**2 - 2*b_3" in result.stdout


def test_json_lists_kind_index_species_and_parsable_value(cli):
    result = cli("run", "-e", "dimension 2 species A species B clusters generic derive virial a[1,1]"
                 " derive cluster b[1,0]", "--format", "json")
    assert result.returncode == 0, result.stderr
    data = json.loads(result.stdout)
    kinds = [(c["kind"], c["index"], c["species"]) for c in data["coefficients"]]
    assert kinds == [("cluster", [1, 0], {"A": 1, "B": 0}), ("virial", [1, 1], {"A": 1, "B": 1})]
    assert sympy.sympify(data["coefficients"][1]["value"]) == -sympy.Symbol("b_1_1")


def test_latex_snippet_uses_species_subscripts_and_align(cli):
    result = cli("run", "-e", "dimension 2 species A species B clusters generic derive virial a[2,1]",
                 "--format", "latex")
    assert result.returncode == 0, result.stderr
    assert result.stdout.startswith("\\begin{align}")
    assert "a_{A^{2} B} &=" in result.stdout
    assert "b_{A B}" in result.stdout


def test_syntax_error_exit_two_with_caret_and_no_traceback(cli):
    result = cli("run", "-e", "dimension 2 species A bose derive virial up to")
    assert result.returncode == 2
    assert "Traceback" not in result.stderr
    assert "<command line>:1:" in result.stderr
    assert "^" in result.stderr


def test_semantic_error_points_at_the_line(cli, tmp_path):
    path = tmp_path / "bad.gas"
    path.write_text("dimension 2\nspecies A\nmutual A A = 1/2\n")
    result = cli("run", str(path))
    assert result.returncode == 2
    assert f"{path}:3:" in result.stderr
    assert "Traceback" not in result.stderr


def test_not_supported_regime_is_an_input_error(cli):
    result = cli("run", "-e", "dimension 2 species A exchange 1/2 tubes flux 1/3 coverage 1/10 clusters pairphase derive virial up to 2")
    assert result.returncode == 2
    assert "not supported yet" in result.stderr
    assert "Traceback" not in result.stderr


def test_missing_file(cli):
    result = cli("run", "no/such/file.gas")
    assert result.returncode == 2 and "no such input file" in result.stderr


def test_output_file_written_and_not_overwritten(cli, tmp_path):
    target = tmp_path / "out.tex"
    args = ("run", "-e", "dimension 2 species A derive virial up to 2", "--format", "latex", "-o", str(target))
    assert cli(*args).returncode == 0
    first = target.read_text()
    assert "\\begin{align}" in first
    target.write_text("my notes")
    refused = cli(*args)
    assert refused.returncode == 2 and "exists" in refused.stderr
    assert target.read_text() == "my notes"
    assert cli(*args, "--overwrite").returncode == 0
    assert target.read_text() == first
    assert not [p for p in os.listdir(tmp_path) if p.endswith(".part")]


def test_demo_runs(cli):
    result = cli("run", "demo")
    assert result.returncode == 0, result.stderr
    assert "virial coefficients" in result.stdout and "nu" in result.stdout


def test_output_is_identical_across_hash_seeds(cli):
    args = ("run", str(ROOT / "worked" / "film_mixture" / "input.gas"), "--format", "json")
    outputs = {cli(*args, env_extra={"PYTHONHASHSEED": seed}).stdout for seed in ("1", "2", "12345")}
    assert len(outputs) == 1


def test_expression_text_starting_with_a_dash_is_read_as_input(cli):
    # found by the long fuzz run: argparse took '-dimension' for an option and refused without a caret
    for args in (["-e", "-dimension 2"], ["--expression", "- 2"]):
        result = cli("run", *args)
        assert result.returncode == 2
        assert result.stderr.startswith("<command line>:1:1: error:") and "^" in result.stderr
        assert "Traceback" not in result.stderr
    assert cli("run", "-e", "dimension 2 species A bose derive virial up to 2", "--format", "json").returncode == 0
