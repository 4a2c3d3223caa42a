"""Long fuzz run of the input language: the properties of tests/test_fuzz.py on many more inputs.

    python benchmarks/fuzz_long.py                      # 6,000 inputs per property: >= 10,000 in all
    python benchmarks/fuzz_long.py --examples 20000
    python benchmarks/fuzz_long.py --only hostile --examples 3000   # issue 14's shapes only

Each property (inputs generated from the grammar file; mutations of the worked examples; the
command line in-process on both kinds; hostile shapes: thousands of species, the harmonic regulator
at high order, absurd loop budgets; special output targets: symbolic links, FIFOs, devices, folders,
the input itself) runs with hypothesis at the given number of examples (the last three at a third
of it), a fresh random seed each run, and the hang guard of the quick profile. It prints pytest's
summary with hypothesis' statistics (the counts of each outcome: refused, accepted and derived, exit
codes per output target) and the wall time; exit code 0 means no input made clusterexp fail in an
unplanned way. A failure prints the smallest falsifying input hypothesis found.
"""
import argparse
import os
import subprocess
import sys
import time
from pathlib import Path

ROOT = Path(__file__).resolve().parent.parent
LANGUAGE = ["test_grammar_inputs_parse_and_derive_or_are_refused", "test_mutated_examples_derive_or_are_refused",
            "test_command_line_exit_codes_on_fuzz"]
HOSTILE = ["test_hostile_shapes_are_decided_quickly", "test_special_output_targets"]


def main() -> int:
    parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    parser.add_argument("--examples", type=int, default=6000, help="inputs per property (default 6000)")
    parser.add_argument("--only", choices=("language", "hostile"), default=None,
                        help="run only the language properties or only the hostile ones")
    args = parser.parse_args()
    properties = {"language": LANGUAGE, "hostile": HOSTILE}.get(args.only, LANGUAGE + HOSTILE)
    env = dict(os.environ, CLUSTEREXP_FUZZ_EXAMPLES=str(args.examples),
               PYTHONPATH=str(ROOT) + os.pathsep + os.environ.get("PYTHONPATH", ""))
    selection = " or ".join(properties)
    start = time.perf_counter()
    # -W: hypothesis' failure report imports a module that warns; the suite treats warnings as errors
    result = subprocess.run([sys.executable, "-m", "pytest", "-q", "-p", "no:cacheprovider",
                             "-W", "ignore::DeprecationWarning", "--hypothesis-show-statistics",
                             str(ROOT / "tests" / "test_fuzz.py"), "-k", selection], cwd=ROOT, env=env)
    per_property = {name: args.examples // 3 if name in (LANGUAGE[2], *HOSTILE) else args.examples
                    for name in properties}
    total = sum(per_property.values())
    print(f"fuzz_long: up to {total:,} inputs (a finite space stops early) in {time.perf_counter() - start:.0f} s, "
          f"exit code {result.returncode}")
    return result.returncode


if __name__ == "__main__":
    sys.exit(main())
