"""The bound on the loops' slicing bias beside every sampled number (`ThirdOrderResult.slice_bound`,
docs/loops.md "Slicing bias"), and the `in N slices` clause of `sample`.

The outside check: at 4 time slices the raw estimate of a_3 is visibly biased (several standard errors
from the published value), and the extrapolated estimate lies within three standard errors plus the
bound.  Published a_3(alpha) = 1/36 + sin^2(pi alpha)/(12 pi^2) + c sin^4(pi alpha) (Myrheim & Olaussen,
Phys. Lett. B 299 (1993) 267; c = -1.65e-5 from Mashkevich, Myrheim & Olaussen, Phys. Lett. B 382 (1996)
124); the virial relation a_3 = 4 b_2^2 - 2 b_3 is textbook (from memory).
"""
from __future__ import annotations

import json
import math

import pytest

from clusterexp import derive
from clusterexp.export.latex import number_latex
from clusterexp.loops import estimate_third_order, scan_third_order
from clusterexp.loops.estimator import DEFAULT_UNIT
from clusterexp.loops.report import latex_block, table_rows
from clusterexp.loops.sampled import WORKERS, run_seed
from clusterexp.loops import request, tube_estimates
from clusterexp.loops.estimator import DEFAULT_SLICES
from clusterexp.model import Sampling

from conftest import run_cli


def published_a3(alpha: float) -> float:
    s = math.sin(math.pi * alpha) ** 2
    return 1 / 36 + s / (12 * math.pi ** 2) - 1.65e-5 * s * s


@pytest.mark.parametrize("alpha,samples", [(0.5, 3_000_000), (0.25, 600_000)])
def test_bound_covers_the_bias_at_four_slices(alpha, samples):
    r = estimate_third_order("identical", alpha, samples=samples, seed=3, slices=4, progress=False)
    shift = r.extrapolation_shift
    families = r.family_shifts
    assert sum(f.value for f in families.values()) == pytest.approx(shift.value)
    assert r.slice_bound == pytest.approx(2 * (sum(abs(f.value) for f in families.values())
                                               + 2 * math.sqrt(sum(f.error ** 2 for f in families.values()))))
    raw = r.virial.value - 2 * shift.value            # a_3 = 4 b_2^2 - 2 b_3, b_3 raw = extrapolated + shift
    published = published_a3(alpha)
    assert abs(raw - published) > 3 * r.virial.error    # the slicing bias is there to be bounded
    assert abs(r.virial.value - published) <= 3 * r.virial.error + 2 * r.slice_bound


def test_no_bound_without_the_extrapolation():
    r = estimate_third_order("identical", 0.5, samples=20_000, seed=3, extrapolate=False, progress=False)
    assert r.slice_bound is None


def test_the_default_slice_number_is_one_number():
    assert request.DEFAULT_SLICES == DEFAULT_SLICES == tube_estimates.DEFAULT_SLICES
    assert Sampling((), None).slices == DEFAULT_SLICES


SEMION = "dimension 2\nspecies A exchange 1/2\nclusters pairphase\nderive virial a[3]\n"


@pytest.fixture(scope="module")
def sampled():
    d = derive(SEMION + "sample a[3], b[3] seed 5 with 24000 loops in 8 slices\n")
    (statement,) = d.sampled
    (point,) = statement.points
    return d, statement, {v.label: v for v in point.values}


def test_the_bound_is_carried_to_the_virial_coefficient(sampled):
    _, statement, values = sampled
    (run,) = statement.runs
    assert run.slices == 8
    a, b = values["a[3]"], values["b[3]"]
    assert b.slice_bound > 0
    assert a.slice_bound == pytest.approx(2 * b.slice_bound)      # |d a_3 / d b_3| = 2
    assert a.error == pytest.approx(2 * b.error)


def _claims(values, *offsets):
    a = values["a[3]"]
    return "".join(f"claim a[3] = {a.value + x:.12f} within 3 errors\n" for x in offsets)


def test_claims_outside_the_errors_but_within_the_bound_are_undecided(sampled):
    _, _, values = sampled
    a = values["a[3]"]
    inside, covered, beyond = a.error, 3 * a.error + a.slice_bound / 2, 3 * a.error + 2 * a.slice_bound
    d = derive(SEMION + "sample a[3], b[3] seed 5 with 24000 loops in 8 slices\n" + _claims(values, inside, covered,
                                                                                            beyond))
    first, second, third = d.checks
    assert first.status == "consistent within the sampling errors, not proven"
    assert second.status == "undecided" and "slicing" in second.method
    assert third.status == "mismatch" and "slicing bias too" in third.method


def test_text_json_and_repetition_show_the_slices(tmp_path):
    path = tmp_path / "s.gas"
    path.write_text(SEMION + "sample a[3] seed 5 with 24000 loops in 8 slices\nevaluate a[3]\n")
    done = run_cli("run", str(path))
    assert done.returncode == 0, done.stderr
    assert "8 slices; alone `sample b[3] ... with 24000 loops in 8 slices seed 5` repeats it" in done.stdout
    assert "(Monte Carlo; slicing bias below " in done.stdout
    assert "a[3] = " in done.stdout and "(slicing bias below " in done.stdout
    done = run_cli("run", str(path), "--format", "json")
    item, = json.loads(done.stdout)["sampled"]
    assert item["runs"][0]["slices"] == 8
    assert item["points"][0]["values"][0]["slice_bound"] > 0


@pytest.mark.parametrize("slices", [2, 7, 258])
def test_bad_slice_numbers_are_refused_at_the_clause(slices, tmp_path):
    path = tmp_path / "bad.gas"
    path.write_text(SEMION + f"sample a[3] seed 5 with 24000 loops in {slices} slices\n")
    done = run_cli("run", str(path))
    assert done.returncode == 2 and "Traceback" not in done.stderr
    assert "bad.gas:5:37: error: the loops take an even number of time slices from 4 to 256" in done.stderr
    assert "^" in done.stderr


def test_more_slices_raise_the_loop_budget_estimate():
    assert request.loop_seconds(1, 40_000, 1, 64) == pytest.approx(4 * request.loop_seconds(1, 40_000, 1))


def test_tube_pieces_take_the_slices_and_carry_no_bound():
    d = derive("dimension 2\nparameter n\nparameter g\nspecies A bose\ntubes flux g coverage n\nclusters pairphase\n"
               "sample b[1] at g = 1/2 seed 13 with 4000 loops in 8 slices\n")
    (statement,) = d.sampled
    assert [run.slices for run in statement.runs] == [8]
    assert all(v.slice_bound is None for p in statement.points for v in p.values)


def test_a_claim_beyond_the_bound_at_one_point_is_a_mismatch():
    text = ("dimension 2\nparameter alpha in [0, 1]\nspecies A exchange alpha\nclusters pairphase\n"
            "derive virial a[3]\nsample a[3] over alpha = [1/4, 1/2] seed 5 with 24000 loops in 8 slices\n")
    statement, = derive(text).sampled
    (low,), (high,) = (p.values for p in statement.points)
    inside = low.value + 3 * low.error + low.slice_bound / 2           # undecided alone
    outside = high.value + 3 * high.error + 2 * high.slice_bound      # a mismatch alone
    slope = (outside - inside) / (1 / 2 - 1 / 4)                       # the line through both claimed values
    claim = f"claim a[3] = {inside - slope / 4:.12f} + {slope:.12f}*alpha within 3 errors\n"
    check, = derive(text + claim).checks
    assert check.status == "mismatch" and "alpha = 1/2" in check.method and "slicing bias too" in check.method
    claim = f"claim a[3] = {inside - slope / 4:.12f} + {slope:.12f}*alpha - {1.5 * high.slice_bound:.12f}*(4*alpha - 1)"
    check, = derive(text + claim + " within 3 errors\n").checks                # now both points inside their bound
    assert check.status == "undecided" and "slicing" in check.method


def test_the_bound_follows_the_mass_ratio():
    """b of a species of mass 2 in the units of a reference of mass 1 is twice the unit-mass b (in the
    plane b scales like the area in units of lambda^2), and so is its bound."""
    d = derive("dimension 2\nspecies B bose\nspecies A mass 2 exchange 1/2\nclusters pairphase\n"
               "sample b[0,3] seed 5 with 24000 loops\n")
    (cluster,) = d.sampled.statements[0].clusters
    (r,) = scan_third_order("identical", [0.5], samples=24000, seed=run_seed(5, (0, 3)), workers=WORKERS,
                            batch=DEFAULT_UNIT, progress=False)
    assert cluster.value == pytest.approx(2 * r.cluster.value, rel=1e-12)
    assert cluster.slice_bound == pytest.approx(2 * r.slice_bound, rel=1e-12)


def test_latex_and_tables_carry_the_bound(sampled):
    d, statement, values = sampled
    block = latex_block(d.sampled, d.system)
    assert block.count(r"\ \text{(slicing bias below ") == 2
    header, row = table_rows(statement)
    assert header == ["a[3]", "a[3] error", "a[3] slicing bias bound", "b[3]", "b[3] error", "b[3] slicing bias bound"]
    assert float(row[2]) >= values["a[3]"].slice_bound and float(row[2]) <= 1.05 * values["a[3]"].slice_bound
    latex = number_latex("0.0362 +- 0.0013 (Monte Carlo; slicing bias below 0.0009)")
    assert latex == r"0.0362 \pm 0.0013\ \text{(Monte Carlo; slicing bias below 0.0009)}"
