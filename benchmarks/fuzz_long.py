"""Long fuzz run of the input language: the properties of tests/test_fuzz.py on many more inputs.

    python benchmarks/fuzz_long.py              # 6,000 inputs per property: >= 10,000 in all
    python benchmarks/fuzz_long.py --examples 20000

Each property (inputs generated from the grammar file; mutations of the worked examples; the
command line in-process on both kinds) runs with hypothesis at the given number of examples, a fresh
random seed each run, and the hang guard of the quick profile. It prints pytest's summary and the
wall time; exit code 0 means no input made clusterexp fail in an unplanned way. A failure prints
the smallest falsifying input hypothesis found.
"""
import argparse
import os
import subprocess
import sys
import time
from pathlib import Path

ROOT = Path(__file__).resolve().parent.parent
PROPERTIES = ["test_grammar_inputs_parse_and_derive_or_are_refused", "test_mutated_examples_derive_or_are_refused",
              "test_command_line_exit_codes_on_fuzz"]


def main() -> int:
    parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    parser.add_argument("--examples", type=int, default=6000, help="inputs per property (default 6000)")
    args = parser.parse_args()
    env = dict(os.environ, CLUSTEREXP_FUZZ_EXAMPLES=str(args.examples),
               PYTHONPATH=str(ROOT) + os.pathsep + os.environ.get("PYTHONPATH", ""))
    selection = " or ".join(PROPERTIES)
    start = time.perf_counter()
    # -W: hypothesis' failure report imports a module that warns; the suite treats warnings as errors
    result = subprocess.run([sys.executable, "-m", "pytest", "-q", "-p", "no:cacheprovider",
                             "-W", "ignore::DeprecationWarning", "--hypothesis-show-statistics",
                             str(ROOT / "tests" / "test_fuzz.py"), "-k", selection], cwd=ROOT, env=env)
    total = args.examples * 2 + args.examples // 3
    print(f"fuzz_long: about {total:,} inputs in {time.perf_counter() - start:.0f} s, exit code {result.returncode}")
    return result.returncode


if __name__ == "__main__":
    sys.exit(main())
