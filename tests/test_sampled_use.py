"""Monte Carlo numbers in `claim`, `evaluate`, `tabulate` and `plot` (products/sampled_use.py).

The sampled b comes from the same seeded estimator run as the `sample` statement (loops.sampled), so
its numbers are reproduced here independently through `scan_third_order`; a_3 = 4 b_2^2 - 2 b_3 with
b_2 = 1/4 - a + a^2/2 (Arovas, Schrieffer, Wilczek, Zee, Nucl. Phys. B 251 (1985) 117; the virial
relation is textbook, e.g. Pathria & Beale, Statistical Mechanics, from memory) is composed by hand.
"""
from __future__ import annotations

import csv
import math

import pytest

from clusterexp import InputError, derive
from clusterexp.loops import scan_third_order
from clusterexp.loops.estimator import DEFAULT_UNIT
from clusterexp.loops.sampled import WORKERS, run_seed

from conftest import run_cli

SEMIONS = "dimension 2\nparameter alpha in [0, 1]\nspecies A exchange alpha\nclusters pairphase\n"
SAMPLE = "sample b[3] over alpha = [1/4, 1/2] seed 3 with 12000 loops\n"
LOOPS = 12000


def published_a3(alpha: float) -> float:
    """Myrheim & Olaussen, Phys. Lett. B 299 (1993) 267; c_2 = -1.65e-5 from Mashkevich, Myrheim &
    Olaussen, Phys. Lett. B 382 (1996) 124."""
    s = math.sin(math.pi * alpha) ** 2
    return 1 / 36 + s / (12 * math.pi ** 2) - 1.65e-5 * s * s


@pytest.fixture(scope="module")
def by_hand():
    """{alpha: (a_3, error)} composed by hand from the estimator's own b_3 at the statement's seed."""
    results = scan_third_order("identical", [0.25, 0.5], samples=LOOPS, seed=run_seed(3, (3,)), workers=WORKERS,
                               batch=DEFAULT_UNIT, progress=False)
    out = {}
    for alpha, r in zip((0.25, 0.5), results):
        b2 = 0.25 - alpha + alpha ** 2 / 2
        out[alpha] = (4 * b2 ** 2 - 2 * r.b3.value, 2 * r.b3.error)
    return out


@pytest.fixture(scope="module")
def mixed_input():
    text = SEMIONS + SAMPLE + (
        "evaluate a[3], a[2] at alpha = 1/2\n"
        "claim a[3] = 1/36 + sin(pi*alpha)^2/(12*pi^2) - 1.65e-5*sin(pi*alpha)^4\n"
        "claim a[3] = 0.05 within 2 errors\n"
        "tabulate a[3], a[2] over alpha in [1/4, 1/2] into \"t.csv\"\n"
        "plot a[3], a[2] over alpha from 0 to 1 into \"p.png\"\n")
    return derive(text)


def test_evaluate_gives_the_composed_value_and_error(mixed_input, by_hand):
    (_, rows), = mixed_input.evaluations
    value, error = by_hand[0.5]
    assert rows[0][0] == "a[3]"
    number, _, rest = rows[0][1].partition(" +- ")
    assert rest.endswith(")") and "(Monte Carlo; slicing bias below " in rest   # tests/test_slicing_bias.py
    assert float(number) == pytest.approx(value, abs=error / 20)
    assert float(rest.split()[0]) == pytest.approx(error, rel=0.05)
    assert rows[1] == ("a[2]", "0.125")       # exact coefficients stay exact (a_2(1/2) = 1/8, ASWZ 1985)


def test_claims_are_consistent_within_errors_or_a_mismatch(mixed_input, by_hand):
    published, wrong = mixed_input.checks
    assert published.status == "consistent within the sampling errors, not proven" and published.ok
    assert "within 3 standard errors" in published.method and "not proven" in published.method
    assert all(abs(published_a3(a) - v) < 3 * e for a, (v, e) in by_hand.items())   # the same decision by hand
    assert wrong.status == "mismatch" and not wrong.ok
    v, e = by_hand[0.5] if abs(0.05 - by_hand[0.5][0]) > abs(0.05 - by_hand[0.25][0]) else by_hand[0.25]
    assert abs(0.05 - v) / e >= 2
    assert "a claim 2 or more standard errors away is a mismatch" in wrong.method
    assert "+-" in wrong.derived_value


def test_table_has_value_and_error_columns(mixed_input, by_hand):
    (table, rows), = mixed_input.tables
    assert rows[0] == ["alpha", "a[3]", "a[3] error", "a[3] slicing bias bound", "a[2]"]
    for row in rows[1:]:
        value, error = by_hand[float(row[0])]
        assert float(row[1]) == pytest.approx(value, rel=1e-12) and float(row[2]) == pytest.approx(error, rel=1e-12)


def test_plot_and_table_files(tmp_path):
    pytest.importorskip("matplotlib")
    path = tmp_path / "in.gas"
    path.write_text(SEMIONS + SAMPLE + "tabulate a[3] over alpha in [1/4, 1/2] into \"t.csv\"\n"
                    "plot a[3], a[2] over alpha from 0 to 1 into \"p.png\"\n")
    done = run_cli("run", str(path), "--files-into", str(tmp_path))
    assert done.returncode == 0, done.stderr
    assert (tmp_path / "p.png").read_bytes()[:4] == b"\x89PNG"
    header, *rows = list(csv.reader((tmp_path / "t.csv").read_text().splitlines()))
    assert header == ["alpha", "a[3]", "a[3] error", "a[3] slicing bias bound"] and len(rows) == 2


@pytest.mark.parametrize("statement,message,where", [
    ("evaluate a[3] at alpha = 1/3", "b[3] has no closed form and no `sample` statement of this input estimates it "
     "at alpha = 1/3; add one there, e.g. `sample b[3] at alpha = 1/3`", "6:1"),
    ("tabulate a[3] over alpha in [1/4, 1/3] into \"t.csv\"", "estimates it at alpha = 1/3", "6:1"),
    ("claim a[2] = 1/8 within 2 errors", "`within 2 errors` is for claims on coefficients with sampled parts", "6:1"),
    ("claim a[3] = 1/36 + alpha^2/12 + O(alpha^3) within 2 errors", "a truncated claim (O(...)) is compared term",
     "6:1"),
    ("claim a[3] = 0.03 within 0 errors", "`within k errors` needs a positive number", "6:26"),
    ("plot a[3] over alpha from 0 to 1/5 into \"m.png\"", "no `sample` statement estimates the sampled part of "
     "a[3] on alpha in [0, 1/5]", "6:1"),
])
def test_refusals_point_at_the_statement(statement, message, where, tmp_path):
    path = tmp_path / "bad.gas"
    path.write_text(SEMIONS + SAMPLE + statement + "\n")
    done = run_cli("run", str(path), "--files-into", str(tmp_path / "out"))
    assert done.returncode == 2, done.stdout
    assert "Traceback" not in done.stderr
    assert f"bad.gas:{where}: error: " in done.stderr and message in done.stderr, done.stderr
    assert "^" in done.stderr


def test_truncated_claim_keeps_its_term_by_term_decision():
    d = derive(SEMIONS + SAMPLE + "claim a[3] = 1/36 + alpha^2/12 + O(alpha^3)\n")
    (check,) = d.checks
    assert check.status != "consistent within the sampling errors, not proven"
