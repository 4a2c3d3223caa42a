"""Loop batches on a dask cluster (`dask.distributed`), when the user names a scheduler.

Without a scheduler address nothing here is used: the runner keeps its worker processes on this
machine.  With one (`scheduler=` in `estimate_third_order`, `--sample-cluster` on the command line,
or the environment variable CLUSTEREXP_SAMPLE_CLUSTER), every seeded batch (family, round) is one dask
task.  A batch's numbers depend only on (seed, family, round, size, slices), so the cluster gives the
same numbers as one process, bit for bit, whatever the number of workers.  A task whose worker is
lost is recomputed by the scheduler; a task that raises is retried (`RETRIES`); the runner stores
results by (family, round), so no batch is lost or counted twice.
"""
from __future__ import annotations

import os
from contextlib import contextmanager

from .runner import LoopsError

ENVIRONMENT = "CLUSTEREXP_SAMPLE_CLUSTER"
RETRIES = 3
CONNECT_TIMEOUT = "20s"


def scheduler_address(given: str | None = None) -> str | None:
    """The scheduler to use: the given address, else the environment variable, else None (local)."""
    if given:
        return given
    return os.environ.get(ENVIRONMENT) or None


def _client(address: str):
    try:
        from dask.distributed import Client
    except ImportError:
        raise LoopsError(f"sampling on the cluster at {address} needs dask.distributed "
                         "(pip install 'clusterexp[cluster]')") from None
    try:
        return Client(address, timeout=CONNECT_TIMEOUT, set_as_default=False)
    except (OSError, TimeoutError) as error:
        raise LoopsError(f"cannot reach the dask scheduler at {address}: {error}") from None


def _batch(*task):
    # looked up at call time so that the function the worker runs is the runner's
    from . import runner
    return runner.run_batch(*task)


def cluster_pool(address: str):
    """(context manager, submit, wait for the first finished, concurrent slots) on the cluster at
    `address`, the same shape as the runner's local pool."""
    from dask.distributed import as_completed
    client = _client(address)
    with client.as_current():
        finished = as_completed()

    @contextmanager
    def context():
        try:
            with client.as_current():
                yield client
        finally:
            client.close()

    def submit(task):
        future = client.submit(_batch, *task, pure=False, retries=RETRIES)
        finished.add(future)
        return future

    def first_finished(futures):
        # at least one, then whatever else is already done
        return [next(finished)] + list(finished.next_batch(block=False))

    slots = max(1, sum(client.nthreads().values()))
    return context(), submit, first_finished, slots
