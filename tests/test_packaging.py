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
    code = ("import clusterexp, clusterexp.language.resources as r; "
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


def test_parser_cache_is_per_user_and_survives_damage(tmp_path):
    """lark's tables are cached under $XDG_CACHE_HOME/clusterexp; a damaged or unwritable cache
    changes nothing in the output, and CLUSTEREXP_NO_CACHE leaves no file."""
    from conftest import run_cli
    args = ("run", "-e", "dimension 2 species A bose derive virial up to 3")
    plain = run_cli(*args, env_extra={"CLUSTEREXP_NO_CACHE": "1", "XDG_CACHE_HOME": str(tmp_path / "none")})
    assert plain.returncode == 0, plain.stderr
    assert not (tmp_path / "none").exists()
    cached = tmp_path / "cache"
    for _ in range(2):
        again = run_cli(*args, env_extra={"XDG_CACHE_HOME": str(cached)})
        assert (again.returncode, again.stdout) == (0, plain.stdout), again.stderr
    files = list((cached / "clusterexp").iterdir())
    assert len(files) == 1 and files[0].stat().st_size > 1000
    files[0].write_bytes(b"not a pickle\n" * 10)
    damaged = run_cli(*args, env_extra={"XDG_CACHE_HOME": str(cached)})
    assert (damaged.returncode, damaged.stdout, damaged.stderr) == (0, plain.stdout, "")
    assert files[0].stat().st_size > 1000 and list((cached / "clusterexp").iterdir()) == files  # replaced
    caret = run_cli("run", "-e", "dimension 2 specis A bose", env_extra={"XDG_CACHE_HOME": str(cached)})
    assert caret.returncode == 2 and "1:13: error" in caret.stderr   # positions survive the cache
    blocked = tmp_path / "blocked"
    blocked.write_text("a file where the cache folder would go")
    unwritable = run_cli(*args, env_extra={"XDG_CACHE_HOME": str(blocked)})
    assert (unwritable.returncode, unwritable.stdout) == (0, plain.stdout), unwritable.stderr


def test_parser_cache_never_loads_a_file_others_could_have_written(tmp_path):
    """The cache is a pickle (loading it runs what its writer put there): a file writable by others is
    replaced, never loaded, and a folder writable by others is not used at all."""
    import pickle
    from conftest import run_cli

    class Planted:
        def __reduce__(self):
            return (print, ("PLANTED",))
    args = ("run", "-e", "dimension 2 species A bose derive virial up to 2")
    first = run_cli(*args, env_extra={"XDG_CACHE_HOME": str(tmp_path)})
    (cached,) = (tmp_path / "clusterexp").iterdir()
    cached.write_bytes(pickle.dumps(Planted()))
    cached.chmod(0o666)
    again = run_cli(*args, env_extra={"XDG_CACHE_HOME": str(tmp_path)})
    assert "PLANTED" not in again.stdout + again.stderr and again.stdout == first.stdout
    assert cached.stat().st_mode & 0o077 == 0 and cached.stat().st_size > 1000   # replaced by a private file
    shared = tmp_path / "shared"
    (shared / "clusterexp").mkdir(parents=True)
    (shared / "clusterexp").chmod(0o777)
    run = run_cli(*args, env_extra={"XDG_CACHE_HOME": str(shared)})
    assert run.stdout == first.stdout and not list((shared / "clusterexp").iterdir())
