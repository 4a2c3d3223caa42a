"""The installed (non-editable) package finds its grammar and demo; the README's promises hold."""
import os
import subprocess
import sys
from pathlib import Path

ROOT = Path(__file__).resolve().parent.parent


def test_wheel_ships_grammar_and_runs_demo(tmp_path):
    # build and install a real (non-editable) copy into a private folder, then run it from elsewhere
    target = tmp_path / "site"
    subprocess.run([sys.executable, "-m", "pip", "install", "--quiet", "--no-deps", "--no-build-isolation",
                    "--target", str(target), str(ROOT)], check=True, capture_output=True)
    assert (target / "clusterexp" / "grammar" / "clusterexp.lark").is_file()
    code = ("import clusterexp, clusterexp.resources as r; "
            "assert r.grammar_origin() == 'package', r.grammar_origin(); "
            "assert clusterexp.__file__.startswith(%r), clusterexp.__file__; "
            "d = clusterexp.derive('dimension 2 species A bose derive virial up to 2'); "
            "print(d.value('virial', (2,)))") % str(target)
    out = subprocess.run([sys.executable, "-c", code], cwd=tmp_path, env={"PYTHONPATH": str(target), "PATH": ""},
                         check=True, capture_output=True, text=True)
    assert out.stdout.strip() == "-b_2"
    demo = subprocess.run([sys.executable, "-m", "clusterexp", "run", "demo"], cwd=tmp_path,
                          env={"PYTHONPATH": str(target), "PATH": ""}, capture_output=True, text=True)
    assert demo.returncode == 0, demo.stderr
    assert "virial coefficients" in demo.stdout


def test_readme_commands_and_ci_agree():
    readme = (ROOT / "README.md").read_text()
    ci = (ROOT / ".ci" / "run").read_text()
    test_command = "pip install '.[test]' && python -m pytest -q"
    assert test_command in readme
    assert "pip install --quiet '.[test]' && python3 -m pytest -q" in ci
    assert "pip install . && clusterexp run demo" in readme


def test_readme_example_commands_run(tmp_path):
    """Every `clusterexp run ...` line in the README's fenced blocks works (exit 0), run from a scratch
    folder (the files a line writes land there) with the repository's paths made absolute."""
    import shlex
    lines, fenced = [], False
    for line in (ROOT / "README.md").read_text().splitlines():
        if line.startswith("```"):
            fenced = not fenced
        elif fenced and line.startswith("clusterexp run"):
            lines.append(line)
    assert any("pairphase" in line for line in lines)
    for line in lines:
        words = [str(ROOT / w) if (ROOT / w).exists() and "/" in w else w for w in shlex.split(line)[1:]]
        result = subprocess.run([sys.executable, "-m", "clusterexp", *words], cwd=tmp_path,
                                env={**os.environ, "PYTHONPATH": str(ROOT)}, capture_output=True, text=True,
                                timeout=300)
        assert result.returncode == 0, (line, result.stderr)
