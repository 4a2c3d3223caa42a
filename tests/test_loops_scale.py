"""Loop Monte Carlo at scale: batches on a dask cluster and randomized quasi-Monte Carlo.

A dask LocalCluster on the loopback interface stands in for a real cluster; its numbers must equal
the single-process run bit for bit (seeded batches), also when a batch fails once and is retried.
Budgets are small: the file runs in seconds.
"""
from __future__ import annotations

import math

import numpy as np
import pytest

from clusterexp.loops import estimate_second_order, estimate_third_order, runner
from clusterexp.loops.distributed import ENVIRONMENT
from clusterexp.loops.quasi import bisection_order, bridge_from_normals
from clusterexp.loops.sampler import brownian_loops

distributed = pytest.importorskip("dask.distributed")

KW = dict(samples=9_600, seed=21, slices=8, batch=100, progress=False)


@pytest.fixture(scope="module")
def local_cluster():
    cluster = distributed.LocalCluster(n_workers=2, threads_per_worker=1, processes=False, protocol="tcp", host="127.0.0.1",
                                       dashboard_address=None)
    yield cluster.scheduler_address
    cluster.close()


def _same(a, b):
    assert a.round_values == b.round_values
    assert a.b3.value == b.b3.value and a.b3.error == b.b3.error and a.rounds == b.rounds


def test_cluster_gives_the_single_process_numbers_bit_for_bit(local_cluster):
    single = estimate_third_order("identical", 0.3, workers=1, **KW)
    on_cluster = estimate_third_order("identical", 0.3, scheduler=local_cluster, **KW)
    _same(single, on_cluster)


def test_scheduler_from_the_environment(local_cluster, monkeypatch):
    single = estimate_third_order("pair_plus_one", 0.2, 0.4, workers=1, **KW)
    monkeypatch.setenv(ENVIRONMENT, local_cluster)
    on_cluster = estimate_third_order("pair_plus_one", 0.2, 0.4, **KW)
    assert single.round_values == on_cluster.round_values and single.b21.error == on_cluster.b21.error


FAILED = []


def _fails_once(*task):
    # the batch (triple, round 3) raises the first time it runs, as on a worker that is lost
    if task[1] == "triple" and task[2] == 3 and not FAILED:
        FAILED.append(task[:3])
        raise RuntimeError("worker lost")
    return ORIGINAL(*task)


ORIGINAL = runner.run_batch


def test_a_failed_batch_is_recomputed_once_not_lost_nor_counted_twice(local_cluster, monkeypatch):
    single = estimate_third_order("identical", 0.6, workers=1, **KW)
    monkeypatch.setattr(runner, "run_batch", _fails_once)
    FAILED.clear()
    on_cluster = estimate_third_order("identical", 0.6, scheduler=local_cluster, **KW)
    assert FAILED == [("identical", "triple", 3)]
    _same(single, on_cluster)


def test_unreachable_scheduler_is_a_clear_error(monkeypatch):
    from clusterexp.loops import LoopsError, distributed as on_cluster
    monkeypatch.setattr(on_cluster, "CONNECT_TIMEOUT", "1s")
    with pytest.raises(LoopsError, match="cannot reach the dask scheduler"):
        estimate_third_order("identical", 0.3, scheduler="tcp://127.0.0.1:9", samples=2_000, slices=8,
                             progress=False)


# ---------------------------------------------------------------------------- quasi-Monte Carlo


def test_bisection_covers_every_inner_point_once():
    for segments in (2, 7, 16, 48):
        middles = [m for m, _, _, _ in bisection_order(segments)]
        assert sorted(middles) == list(range(1, segments))


def test_bridge_construction_has_the_brownian_bridge_covariance():
    # Textbook Brownian bridge on [0, T] pinned at 0: Cov(X_s, X_t) = s (T - t) / T per unit diffusion
    # (s <= t); here the per-component diffusion is 1/(2 pi) (lambda = 1 units, docs/loops.md).  The Levy
    # construction and the increment construction of sampler.brownian_loops must both give it.
    rng = np.random.default_rng(4)
    segments, duration, count = 12, 3.0, 200_000
    times = np.arange(segments + 1) * duration / segments
    s, t = np.minimum.outer(times, times), np.maximum.outer(times, times)
    expected = s * (duration - t) / duration / (2 * np.pi)
    for paths in (bridge_from_normals(rng.standard_normal((count, segments - 1, 2)), segments, duration),
                  brownian_loops(rng, count, segments, duration)):
        assert np.all(paths[:, 0] == 0) and np.allclose(paths[:, -1], 0)
        cov = (paths.real.T @ paths.real) / count
        assert np.max(np.abs(cov - expected)) < 0.006 * expected.max() * 5, np.max(np.abs(cov - expected))


def test_scrambled_sobol_reproduces_exact_two_body_values():
    # b_2 = 1/4 - a + a^2/2 (Arovas, Schrieffer, Wilczek, Zee, Nucl. Phys. B 251 (1985) 117) and
    # b_11 = -d(1-d) (docs/loops.md, rederived by an independent route there): the quasi-Monte Carlo
    # batches must be unbiased, with an honest error from independent scrambles.
    for kind, a in (("identical", 0.3), ("distinct", 0.5)):
        r = estimate_second_order(kind, a, samples=40_000, seed=6, sequence="sobol")
        assert r.estimate.error < 5e-3
        assert abs(r.estimate.value - r.exact) < 4 * r.estimate.error, (kind, a, r)


def test_scrambled_sobol_a3_against_the_published_value():
    # a_3(1/2) = 1/36 + 1/(12 pi^2) - 1.65e-5: Myrheim & Olaussen, Phys. Lett. B 299 (1993) 267; c_2 from
    # Mashkevich, Myrheim & Olaussen, Phys. Lett. B 382 (1996) 124
    r = estimate_third_order("identical", 0.5, samples=60_000, seed=3, workers=1, slices=8, sequence="sobol",
                             allocation={"cycle": 2, "exchange": 1, "triple": 6}, progress=False)
    published = 1 / 36 + 1 / (12 * math.pi ** 2) - 1.65e-5
    assert r.a3.error < 3e-3
    assert abs(r.a3.value - published) < 4 * r.a3.error, r
    assert r.samples_per_family["cycle"] % 256 == 0     # power-of-two batches


def test_command_line_sample_cluster_option(local_cluster):
    # the same `sample` statement on this machine and on the cluster: the same bytes
    from conftest import run_cli
    text = ("dimension 2 parameter alpha in [0, 1] species A exchange alpha clusters pairphase "
            "derive virial a[3] sample a[3] at alpha = 1/3 seed 4 with 4800 loops")
    here = run_cli("run", "-e", text, "--format", "json", "--no-files")
    there = run_cli("run", "-e", text, "--format", "json", "--no-files", "--sample-cluster", local_cluster)
    assert here.returncode == 0, here.stderr
    assert there.returncode == 0, there.stderr
    assert here.stdout == there.stdout and '"sampled"' in here.stdout


# ---------------------------------------------------------------------------- variance reduction


@pytest.mark.parametrize("pair_parameters", [(0.3, 0.3, 0.3), (0.5, 0.7, 0.7), (1.25, 0.4, 0.4)])
def test_triple_control_has_its_exact_mean(pair_parameters):
    # Each pair term integrates to (1/2) int d^2c E[Re(Phi - 1)] = -d(1-d)/2, d = frac(a): b_11 of two
    # particles with mutual parameter a (docs/loops.md; the harmonic-regulator value of Comtet, Georgelin,
    # Ouvry, J. Phys. A 22 (1989) 3917, from memory).  The control subtracts it, so its mean must be 0.
    from clusterexp.loops.sampler import TripleSamples
    rng = np.random.default_rng(12)
    samples = TripleSamples(rng, 60_000, 8)
    c = samples.control(*pair_parameters)
    assert abs(c.mean()) < 4 * c.std() / math.sqrt(c.size), (c.mean(), c.std() / math.sqrt(c.size))
    assert c.std() > 0.05     # not identically zero: the test can fail


def test_reduced_estimator_agrees_with_the_plain_one_and_the_published_value():
    from clusterexp.loops import BEFORE
    published = 1 / 36 + 1 / (12 * math.pi ** 2) - 1.65e-5   # Myrheim & Olaussen 1993; Mashkevich et al. 1996
    kw = dict(samples=150_000, seed=13, workers=2, slices=8, allocation={"cycle": 2, "exchange": 1, "triple": 6},
              progress=False)
    plain = estimate_third_order("identical", 0.5, reduction=BEFORE, **kw)
    reduced = estimate_third_order("identical", 0.5, **kw)
    # the cycle family is untouched (the same loops; the slice factor's closed form at alpha = 1/2 agrees
    # with the quadrature to 1e-10 per slice)
    assert plain.parts["cycle"].value == pytest.approx(reduced.parts["cycle"].value, abs=1e-9)
    for r in (plain, reduced):
        assert abs(r.a3.value - published) < 4 * r.a3.error, r
    # the triple family is the one reduced (fixed seeds: a statement about these numbers, not a timing)
    assert reduced.parts["triple"].error < 0.85 * plain.parts["triple"].error


def test_sen_symmetry_replaces_the_exchange_family():
    # a_3(alpha) = a_3(1 - alpha) (Sen, Phys. Rev. Lett. 68 (1992) 2977) makes the exchange family exactly
    # b_2(alpha)^2 - b_2(1 - alpha)^2 = -alpha(1-alpha)(1-2alpha)/2: -0.046875 at alpha = 1/4.
    r = estimate_third_order("identical", 0.25, samples=60_000, seed=14, workers=1, slices=8, symmetric=True,
                             progress=False)
    assert r.parts["exchange"].value == pytest.approx(-0.046875, abs=1e-15) and r.parts["exchange"].error == 0
    s = math.sin(math.pi * 0.25) ** 2
    published = 1 / 36 + s / (12 * math.pi ** 2) - 1.65e-5 * s * s
    assert abs(r.a3.value - published) < 4 * r.a3.error, r
    from clusterexp.loops import LoopsError
    with pytest.raises(LoopsError, match="Sen's symmetry"):
        estimate_third_order("pair_plus_one", 0.25, 0.5, samples=1_000, symmetric=True)


@pytest.mark.parametrize("alpha", [0.5, 1.5, -0.5])
def test_half_integer_closed_form_equals_the_bessel_sum(alpha):
    # R(1/2; x, phi) = e^{i phi/2} erf(sqrt(2x) cos(phi/2)) against the partial-wave Bessel sum evaluated with
    # mpmath (test_loops.bessel_sum_factor: Aharonov & Bohm 1959 partial waves), and against the quadrature
    from clusterexp.loops.pairfactor import PRECISE, pair_factor
    from test_loops import bessel_sum_factor
    import mpmath
    for x, phi in ((1e-3, 1.0), (0.4, -2.9), (3.0, math.pi), (9.0, 0.2), (2.0, -0.5)):
        got = pair_factor(alpha, np.array([x]), np.array([phi]), PRECISE)[0]
        with mpmath.workdps(15):   # the reference sets mpmath's global precision: restore it afterwards
            reference = bessel_sum_factor(alpha, x, phi)
        assert abs(got - reference) < 1e-10, (x, phi)
    rng = np.random.default_rng(1)
    x, phi = rng.exponential(3.0, 2000) + 1e-3, rng.uniform(-math.pi, math.pi, 2000)
    from clusterexp.loops import pairfactor
    closed = pair_factor(alpha, x, phi, PRECISE)
    pairfactor.SETTINGS.closed_half = False
    try:
        quadrature = pair_factor(alpha, x, phi, PRECISE)
    finally:
        pairfactor.SETTINGS.closed_half = True
    assert np.max(np.abs(closed - quadrature)) < 1e-10


def test_workers_do_not_outlive_a_killed_owner(tmp_path):
    """Workers ignore SIGINT/SIGTERM (their owner handles them); an owner killed without cleaning up
    (SIGKILL here, or SIGTERM without a handler) must not leave them behind, idle for good."""
    import os
    import signal
    import subprocess
    import sys
    import time

    from conftest import ROOT
    script = ("import os, sys, time\n"
              "from clusterexp.loops.runner import worker_pool\n"
              "def pid(_):\n"
              "    time.sleep(0.2)\n"
              "    return os.getpid()\n"
              "if __name__ == '__main__':\n"
              "    pool = worker_pool(2)\n"
              "    print(' '.join(str(p) for p in set(pool.map(pid, range(8)))), flush=True)\n"
              "    time.sleep(60)\n")
    (tmp_path / "owner.py").write_text(script)
    env = dict(os.environ, PYTHONPATH=str(ROOT) + os.pathsep + os.environ.get("PYTHONPATH", ""))
    owner = subprocess.Popen([sys.executable, "owner.py"], cwd=tmp_path, env=env, stdout=subprocess.PIPE, text=True)
    workers = [int(p) for p in owner.stdout.readline().split()]
    assert workers, "the owner started no workers"

    def alive(pid):
        try:
            os.kill(pid, 0)
        except ProcessLookupError:
            return False
        with open(f"/proc/{pid}/stat") as f:         # a zombie is gone for our purpose
            return f.read().split(") ")[1][0] != "Z"

    assert all(alive(p) for p in workers)
    owner.send_signal(signal.SIGKILL)
    owner.wait(timeout=10)
    owner.stdout.close()
    deadline = time.time() + 10
    while time.time() < deadline and any(alive(p) for p in workers):
        time.sleep(0.2)
    left = [p for p in workers if alive(p)]
    for p in left:
        os.kill(p, signal.SIGKILL)
    assert not left, f"workers {left} outlived their owner"
