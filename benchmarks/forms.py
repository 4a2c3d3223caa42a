"""How long writing values in a form takes (`values factored`, ... ; clusterexp/forms.py): every worked
example and a larger symbolic case, per form, median wall seconds of the shaping alone (the derivation
done before the clock starts), and how many values fell back to the expanded form.

Run:  python benchmarks/forms.py     (about a minute; results in benchmarks/forms-last-run.txt by hand)
"""
from __future__ import annotations

import statistics
import sys
import time
from pathlib import Path

ROOT = Path(__file__).resolve().parent.parent
sys.path.insert(0, str(ROOT))

import clusterexp  # noqa: E402

FORMS = ("values factored", "values collected in pieces", "values mass_prefactor")
LARGER = ("dimension 2 parameter alpha in [0, 1] parameter nu in [0, 1) parameter r positive "
          "species A exchange alpha species B mass r exchange alpha mutual A B = nu clusters pairphase "
          "derive virial up to 4 derive density up to 3")


def cases():
    for folder in sorted((ROOT / "worked").iterdir()):
        if (folder / "input.gas").is_file() and "sample" not in (folder / "input.gas").read_text():
            text = "\n".join(l for l in (folder / "input.gas").read_text().splitlines() if not l.startswith("values "))
            yield folder.name, text, folder
    yield "pairphase K=2 order 4", LARGER, None


def main():
    for name, text, folder in cases():
        for form in FORMS:
            times, fallbacks = [], 0
            for _ in range(3):
                d = clusterexp.derive(text + "\n" + form, base_dir=str(folder) if folder else None)
                for c in d:
                    c.value  # noqa: B018 -- derived before the clock
                start = time.perf_counter()
                shaped = [d.shaped(c) for c in d]
                times.append(time.perf_counter() - start)
                fallbacks = sum(1 for s in shaped if s.note)
            print(f"{name:28s} {form:28s} {statistics.median(times):7.3f} s  {len(d):3d} values, "
                  f"{fallbacks} printed expanded")


if __name__ == "__main__":
    main()
