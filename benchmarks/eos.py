"""The exact equation of state at finite density: a table of 200 densities to 15 digits for a 3 x 3
statistics matrix on one level (target: well under a second), plus, for scale, single points of the
continuum exclusion gas (numerical momentum-cell integral, densities inverted).

The same table through the input language: a `tabulate` statement of 200 fillings (pressure, the
three fugacities, compressibility, 15 digits) for the same matrix, timed in process (build, derive,
run the statement, render the CSV) and as a whole `python -m clusterexp run` (interpreter start-up and
imports included), beside the same run without the `tabulate` line.

Run:  python benchmarks/eos.py          (about a minute; writes benchmarks/eos-last-run.txt)
      python benchmarks/eos.py --quick  (the 200-density table only, not written)

The table evaluates, at each of 200 densities along a ray up to 0.98 of close packing, the pressure, the
three fugacities and the compressibility (5 quantities x 200 points), through the public API
(`equation_of_state(system).table`), with exact densities and a private mpmath context at 15 digits.
"""
from __future__ import annotations

import argparse
import os
import statistics
import subprocess
import sys
import tempfile
import time
from fractions import Fraction
from pathlib import Path

sys.path.insert(0, str(Path(__file__).resolve().parent.parent))

from clusterexp.language.build import build_system  # noqa: E402
from clusterexp.eos import equation_of_state  # noqa: E402
from clusterexp.products.numbers import format_number  # noqa: E402

MATRIX = ("dimension 2 species A species B species C statistics matrix [[1/2, 1/3, 0], [1/5, 2/3, 1/7], "
          "[1/4, 0, 1/3]] clusters exclusion level")
RAY = (Fraction(1), Fraction(2), Fraction(1))
CONTINUUM = [("2D, one species, g = 1/3, rho lambda^2 = 2",
              "dimension 2 species A exchange 1/3 clusters exclusion", {"A": 2}),
             ("3D, two species, non-symmetric g, m_B = 2 m_A, rho = (1/2, 1/4)",
              "dimension 3 species A species B mass 2 statistics matrix [[1/2, 1/3], [1/5, 2/3]] clusters exclusion",
              {"A": "1/2", "B": "1/4"})]


def median_seconds(fn, repeats=5):
    times = []
    for _ in range(repeats):
        start = time.process_time()
        result = fn()
        times.append(time.process_time() - start)
    return statistics.median(times), result


def table_case():
    eos = equation_of_state(build_system(MATRIX))
    total = sum(RAY)
    close = eos.ray_boundary(RAY).at  # exact total density of close packing along the ray
    points = [[Fraction(k, 200) * Fraction(str(close)) * Fraction(98, 100) * r / total for r in RAY]
              for k in range(1, 201)]

    def run():
        return [eos.table(q, points, 15) for q in ("pressure", "fugacity", "compressibility")]
    return eos, close, points, run


STATEMENT = ("\ntabulate pressure, fugacity, compressibility over filling A from 0 to 199/104 step 1/104 "
             "at filling B = 1/10, filling C = 1/20 digits 15 into \"table.csv\"\n")


def statement_case():
    """In process: the statement from text to CSV bytes (build, derive, run, render)."""
    from clusterexp.derivation import derive_system
    from clusterexp.products.numbers import csv_bytes

    def run():
        derivation = derive_system(build_system(MATRIX + STATEMENT))
        (result,) = derivation.states
        return csv_bytes(result.rows), result.rows
    return run


def cli_seconds(text: str, repeats: int = 3) -> float:
    """Median wall seconds of `python -m clusterexp run` on `text` (files into a temporary folder)."""
    root = Path(__file__).resolve().parent.parent
    env = dict(os.environ, PYTHONPATH=str(root) + os.pathsep + os.environ.get("PYTHONPATH", ""))
    times = []
    with tempfile.TemporaryDirectory() as folder:
        source = Path(folder) / "input.gas"
        source.write_text(text)
        for _ in range(repeats):
            start = time.perf_counter()
            subprocess.run([sys.executable, "-m", "clusterexp", "run", str(source), "--files-into", folder,
                            "--overwrite"], check=True, capture_output=True, env=env)
            times.append(time.perf_counter() - start)
    return statistics.median(times)


def main() -> None:
    parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    parser.add_argument("--quick", action="store_true")
    args = parser.parse_args()
    eos, close, points, run = table_case()
    seconds, (pressure, fugacity, kappa) = median_seconds(run)
    lines = [f"{'case':66} {'seconds':>8} {'target':>7}",
             f"{'3x3 one level: 200 densities x (P, z_A, z_B, z_C, kappa), 15 digits':66} {seconds:8.3f} "
             f"{1.0:7.1f}  {'ok' if seconds < 1 else 'SLOW'}",
             f"  close packing along (1:2:1) at total n = {close}; last point {float(sum(points[-1])):.4f}: "
             f"beta P/(states) = {format_number(pressure[-1]['beta P / (states)'], 15)}"]
    statement = statement_case()
    first, _ = median_seconds(statement, repeats=1)   # sympy's caches still cold for this input
    seconds, (data, rows) = median_seconds(statement)
    lines.append(f"{'the same through `tabulate` (build, derive, run, CSV), in process':66} {seconds:8.3f} {1.0:7.1f}  "
                 f"{'ok' if seconds < 1 else 'SLOW'}  ({len(rows) - 1} rows, {len(data)} bytes; first run {first:.3f} s)")
    if not args.quick:
        with_table, without = cli_seconds(MATRIX + STATEMENT), cli_seconds(MATRIX)
        lines.append(f"{'  whole CLI run with the tabulate line (wall, start-up included)':66} {with_table:8.3f} {'-':>7}")
        lines.append(f"{'  whole CLI run without it (wall)':66} {without:8.3f} {'-':>7}  "
                     f"difference {with_table - without:.3f} s")
        for label, text, density in CONTINUUM:
            ceos = equation_of_state(build_system(text))
            s, value = median_seconds(lambda: ceos.evaluate("pressure", density, 15), repeats=1)
            lines.append(f"{'continuum ' + label:66} {s:8.3f} {'-':>7}  "
                         f"beta P lambda^d = {format_number(next(iter(value.values())), 15)}")
    text = "\n".join(lines)
    print(text)
    if not args.quick:
        (Path(__file__).resolve().parent / "eos-last-run.txt").write_text(
            text + "\n(process CPU seconds, median of 5 runs for the tables, one run per continuum point; the CLI lines "
                   "are wall seconds, median of 3)\n")


if __name__ == "__main__":
    main()
