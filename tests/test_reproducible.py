"""Output is byte-identical across runs and across hash seeds: text, LaTeX (snippet and document) and
JSON of every worked example, written by the command line in separate processes."""
import os
import subprocess
import sys
from pathlib import Path

import pytest

from conftest import ROOT, run_cli

EXAMPLES = sorted((ROOT / "worked").glob("*/input.gas"))
FORMATS = [("text",), ("latex",), ("latex", "--document"), ("json",)]
HASH_SEEDS = ("0", "1", "4242")

# One process per hash seed runs the command-line entry point on every example and format, writing
# each output with -o (so the bytes on disk are compared, newline translation included).
DRIVER = """
import sys
from clusterexp.command import main
out, examples, formats = sys.argv[1], sys.argv[2].split("|"), [f.split(",") for f in sys.argv[3].split("|")]
for k, example in enumerate(examples):
    for j, fmt in enumerate(formats):
        args = ["run", example, "--format", fmt[0], *fmt[1:], "-o", f"{out}/{k}-{j}.out", "--no-files"]
        code = main(args)
        if code != 0:
            sys.exit(f"exit {code} for {args}")
"""


def outputs_with_hash_seed(seed: str, folder: Path) -> dict[str, bytes]:
    folder.mkdir()
    env = dict(os.environ, PYTHONHASHSEED=seed, PYTHONPATH=str(ROOT) + os.pathsep + os.environ.get("PYTHONPATH", ""))
    result = subprocess.run([sys.executable, "-c", DRIVER, str(folder), "|".join(map(str, EXAMPLES)),
                             "|".join(",".join(f) for f in FORMATS)], env=env, capture_output=True, text=True,
                            timeout=600)
    assert result.returncode == 0, result.stderr
    return {p.name: p.read_bytes() for p in sorted(folder.iterdir())}


def test_every_worked_example_and_format_is_byte_identical_across_hash_seeds(tmp_path):
    runs = [outputs_with_hash_seed(seed, tmp_path / f"seed-{seed}") for seed in HASH_SEEDS]
    assert len(runs[0]) == len(EXAMPLES) * len(FORMATS)
    assert all(len(content) > 0 for content in runs[0].values())
    for other, seed in zip(runs[1:], HASH_SEEDS[1:]):
        differing = [name for name in runs[0] if runs[0][name] != other.get(name)]
        assert not differing, f"PYTHONHASHSEED=0 and {seed} differ in {differing}"


@pytest.mark.parametrize("fmt", ["text", "latex", "json"])
def test_real_command_gives_the_same_bytes_twice(fmt):
    """Through `python -m clusterexp` itself, on the example with most symbols (two species)."""
    example = ROOT / "worked" / "film_mixture" / "input.gas"
    first = run_cli("run", str(example), "--format", fmt, env_extra={"PYTHONHASHSEED": "7"})
    second = run_cli("run", str(example), "--format", fmt, env_extra={"PYTHONHASHSEED": "123456"})
    assert first.returncode == 0 and second.returncode == 0, first.stderr + second.stderr
    assert first.stdout.encode() == second.stdout.encode()
    assert "a" in first.stdout


def test_same_process_twice_is_identical():
    """Caches (sympy's, ours) must not change the second printing."""
    import clusterexp
    from clusterexp.export import FORMATTERS
    text = (ROOT / "worked" / "film_mixture" / "input.gas").read_text()
    once = {f: FORMATTERS[f](clusterexp.derive(text)) for f in FORMATTERS}
    twice = {f: FORMATTERS[f](clusterexp.derive(text)) for f in FORMATTERS}
    assert once == twice
