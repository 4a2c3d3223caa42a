"""Printers: deterministic, parsable, compilable."""
import os
import shutil
import subprocess

import pytest
import sympy

import clusterexp
from clusterexp.export import latex_document, latex_snippet, to_json, to_text
from conftest import ROOT

TEXT = """dimension 2 parameter nu in [0, 1] species A species B mass 2 mutual A B = nu
clusters given { b[1,1] = -nu*(1 - nu) } derive virial up to 3 derive fugacity up to 2"""


def test_json_values_parse_back_to_the_same_sympy_values():
    import json
    d = clusterexp.derive(TEXT)
    data = json.loads(to_json(d))
    nu = sympy.Symbol("nu", real=True, nonnegative=True)
    for entry, c in zip(data["coefficients"], d):
        parsed = sympy.sympify(entry["value"], locals={"nu": nu})
        assert sympy.simplify(parsed - c.value) == 0


def test_text_lists_every_coefficient_once():
    d = clusterexp.derive(TEXT)
    text = to_text(d)
    assert text.count(" = ") >= len(d)
    assert "# conventions:" in text


def test_latex_without_alignment():
    d = clusterexp.derive(TEXT + " output align off")
    assert "&=" not in latex_snippet(d)


@pytest.mark.skipif(shutil.which("pdflatex") is None and not os.environ.get("CI"),
                    reason="pdflatex not installed (CI installs it)")
def test_standalone_documents_of_worked_examples_compile(tmp_path):
    for folder in sorted((ROOT / "worked").iterdir()):
        if not (folder / "input.gas").is_file():
            continue
        source = tmp_path / f"{folder.name}.tex"
        source.write_text(latex_document(clusterexp.derive_file(folder / "input.gas")))
        result = subprocess.run(["pdflatex", "-interaction=nonstopmode", "-halt-on-error", source.name],
                                cwd=tmp_path, capture_output=True, text=True, timeout=120)
        assert result.returncode == 0, result.stdout[-2000:]
        assert (tmp_path / f"{folder.name}.pdf").stat().st_size > 1000
