"""End to end: `clusterexp run` on a two-species input to total order 10 with LaTeX output,
process start included. Run: python benchmarks/end_to_end.py"""
import os
import statistics
import subprocess
import sys
import tempfile
import time
from pathlib import Path

ROOT = Path(__file__).resolve().parent.parent
INPUT = """# two species, symbolic mass ratio and braiding parameter, b's partly given
dimension 2
parameter mu positive
parameter nu in [0, 1]
species A bose
species B mass mu fermi
mutual A B = nu
clusters given { b[1,1] = -nu*(1 - nu)  b[2,0] = 1/4  b[0,2] = -mu/4 }
derive virial up to 10
output format latex
"""


def main() -> None:
    with tempfile.TemporaryDirectory() as folder:
        path = Path(folder) / "mixture.gas"
        path.write_text(INPUT)
        env = dict(os.environ, PYTHONPATH=str(ROOT))
        times = []
        for _ in range(3):
            start = time.perf_counter()
            result = subprocess.run([sys.executable, "-m", "clusterexp", "run", str(path)], env=env,
                                    capture_output=True, text=True)
            times.append(time.perf_counter() - start)
            assert result.returncode == 0, result.stderr
        print(f"clusterexp run, K=2, total order 10, LaTeX: median {statistics.median(times):.2f} s "
              f"over 3 runs ({len(result.stdout)} characters of LaTeX)")


if __name__ == "__main__":
    main()
