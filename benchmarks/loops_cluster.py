"""Loop batches on dask workers: speed-up with the number of workers, same numbers, a killed worker.

Run:  nice -n 10 python benchmarks/loops_cluster.py --samples 240000

One fixed sample budget of a_3(1/2) (so every run computes the same seeded batches) is run
  1. in this process (workers=1), the reference numbers;
  2. on the local process pool (workers=2), as `sample` does without a scheduler;
  3. on a dask LocalCluster on 127.0.0.1 with 1 and then 2 worker processes (one thread each);
  4. on the 2-worker LocalCluster with one worker process killed (SIGKILL) a few seconds into the run:
     the nanny restarts it, the scheduler recomputes its batches.
Every run must give the reference numbers bit for bit; the wall times give the speed-up.  Beyond two
workers the speed-up is PROJECTED from the measured per-batch time and the scheduler's overhead per
batch (batches are independent; the only serial part is the submission and the bookkeeping).
"""
from __future__ import annotations

import argparse
import os
import signal
import sys
import threading
import time
from pathlib import Path

sys.path.insert(0, str(Path(__file__).resolve().parent.parent))

from clusterexp.loops import estimate_third_order  # noqa: E402

ALLOCATION = {"cycle": 3, "triple": 5}


BATCH = [1000]


def _warm():
    import clusterexp.loops.runner  # noqa: F401


def _cpu():
    import resource
    use = resource.getrusage(resource.RUSAGE_SELF)
    return use.ru_utime + use.ru_stime


def _worker_cpu(client) -> float:
    return sum(client.run(_cpu).values())


def run(samples: int, **kw):
    start = time.perf_counter()
    r = estimate_third_order("identical", 0.5, samples=samples, seed=77, symmetric=True, allocation=ALLOCATION,
                             batch=BATCH[0], progress=False, **kw)
    return r, time.perf_counter() - start


# glibc's allocator returns the loops' large temporary arrays to the system after every batch in a dask
# worker (dask sets MALLOC_TRIM_THRESHOLD_ low for its workers): measured 3x the system time and about
# 2x the CPU per batch.  Workers started with these variables run the batches at the in-process cost.
WORKER_ENVIRONMENT = {"MALLOC_TRIM_THRESHOLD_": 2 ** 30, "MALLOC_MMAP_THRESHOLD_": 2 ** 30, "MALLOC_TOP_PAD_": 2 ** 28}


def main() -> None:
    import dask
    from dask.distributed import Client, LocalCluster
    dask.config.set({"distributed.nanny.pre-spawn-environ": WORKER_ENVIRONMENT})
    parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    parser.add_argument("--samples", type=int, default=240_000)
    parser.add_argument("--kill-after", type=float, default=3.0)
    parser.add_argument("--batch", type=int, default=1000, help="samples per allocation unit in one batch")
    args = parser.parse_args()
    BATCH[0] = args.batch
    print(f"# loops_cluster: a_3(1/2), {args.samples} samples in batches of {args.batch} x {ALLOCATION}, cpus={os.cpu_count()}, "
          f"load average {os.getloadavg()[0]:.2f}")
    cpu = time.process_time()
    reference, t_one = run(args.samples, workers=1)
    cpu_one = time.process_time() - cpu
    print(f"in this process:         {t_one:6.1f} s (CPU {cpu_one:.1f} s)  a_3 = {reference.a3}  ({reference.rounds} rounds)")
    rows = [("in this process", t_one, True)]
    pool, t_pool = run(args.samples, workers=2)
    rows.append(("local process pool, 2", t_pool, pool.round_values == reference.round_values))
    for workers in (1, 2):
        with LocalCluster(n_workers=workers, threads_per_worker=1, processes=True, host="127.0.0.1",
                          dashboard_address=None) as cluster, Client(cluster) as client:
            client.run(_warm)   # the workers' one-time import of clusterexp is not timed
            before = _worker_cpu(client)
            r, t = run(args.samples, scheduler=cluster.scheduler_address)
            cpu_workers = _worker_cpu(client) - before
            rows.append((f"dask LocalCluster, {workers}", t, r.round_values == reference.round_values))
            print(f"dask, {workers} worker(s): worker CPU {cpu_workers:.1f} s against {cpu_one:.1f} s in this process "
                  f"(CPU efficiency {cpu_one / cpu_workers:.2f})")
    with LocalCluster(n_workers=2, threads_per_worker=1, processes=True, host="127.0.0.1",
                      dashboard_address=None) as cluster, Client(cluster) as client:
        client.run(_warm)
        pids = client.run(os.getpid)
        victim = sorted(pids.values())[0]
        timer = threading.Timer(args.kill_after, os.kill, (victim, signal.SIGKILL))
        timer.start()
        r, t = run(args.samples, scheduler=cluster.scheduler_address)
        timer.cancel()
        alive = client.run(os.getpid)
        rows.append((f"dask 2, worker {victim} killed at {args.kill_after:g} s", t,
                     r.round_values == reference.round_values))
        print(f"worker processes before {sorted(pids.values())}, after {sorted(alive.values())}")
    print()
    print(f"{'where':44s} {'wall s':>7s} {'speed-up':>9s}  same numbers")
    for name, t, same in rows:
        print(f"{name:44s} {t:7.1f} {t_one / t:8.2f}x  {'yes' if same else 'NO'}")
    per_batch = t_one / (reference.rounds * len(ALLOCATION))
    print(f"\nper batch in this process: {per_batch * 1000:.0f} ms; projected speed-up with W workers on W free cores "
          f"~ W / (1 + W * o / {per_batch * 1000:.0f} ms), o = scheduler overhead per batch (~1-5 ms for dask)")
    print(f"load average at the end: {', '.join(f'{v:.2f}' for v in os.getloadavg())}")


if __name__ == "__main__":
    main()
