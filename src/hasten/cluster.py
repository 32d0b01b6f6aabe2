"""Running the simulation's chunks on a Dask cluster (``dask.distributed``).

Dask is optional (``pip install "hasten[cluster]"``) and imported here only, and only when
a cluster is asked for. The workers run the very chunk functions of
:mod:`hasten.simulation` that run in-process; the compiled model is sent to every worker
once. Since each block of runs has its own random stream, a cluster gives the same figures
as one process for the same seed.

>>> from hasten.cluster import cluster_runner                       # doctest: +SKIP
>>> from hasten.simulation import simulate                          # doctest: +SKIP
>>> with cluster_runner(workers=2) as runner:                       # doctest: +SKIP
...     result = simulate(project, ranges, 100_000, seed=1, runner=runner)
"""

from __future__ import annotations

import logging
from contextlib import contextmanager
from typing import Callable, Iterator

from .errors import HastenError, InputError

__all__ = ["DaskRunner", "cluster_runner", "simulate_on_cluster", "INSTALL_HINT"]

INSTALL_HINT = 'pip install "hasten[cluster]"'
_TRIM = "distributed.nanny.pre-spawn-environ.MALLOC_TRIM_THRESHOLD_"


def _distributed():
    try:
        from dask import distributed
    except ImportError:
        raise HastenError(f"running on a cluster needs Dask, which is not installed: {INSTALL_HINT}") from None
    return distributed


class DaskRunner:
    """Runs chunk functions on the workers of a Dask client, yielding ``(chunk index,
    result)`` as each chunk completes (the simulation merges them in chunk order)."""

    def __init__(self, client):
        self.client = client

    def __call__(self, fn: Callable, model, tasks: list) -> Iterator[tuple[int, dict]]:
        distributed = _distributed()
        shared = self.client.scatter(model, broadcast=True, hash=False)
        sent: dict[int, object] = {}

        def once(arg):  # an array shared by every task is sent to each worker once
            if getattr(arg, "nbytes", 0) > 65_536:
                if id(arg) not in sent:
                    sent[id(arg)] = self.client.scatter(arg, broadcast=True, hash=False)
                return sent[id(arg)]
            return arg

        futures = [self.client.submit(fn, shared, *map(once, task), pure=False) for task in tasks]
        where = {f.key: k for k, f in enumerate(futures)}
        try:
            for future in distributed.as_completed(futures):
                try:
                    result = future.result()
                except ImportError as exc:  # e.g. a worker of a running cluster without hasten
                    raise HastenError(f"a worker of the cluster cannot run hasten's simulation ({exc}); "
                                      f"install the same hasten on every worker") from None
                except distributed.KilledWorker as exc:
                    raise HastenError(f"the cluster lost its workers while simulating ({exc})") from None
                yield where[future.key], result
        finally:
            for future in futures:
                future.cancel()


@contextmanager
def cluster_runner(*, workers: int | None = None, scheduler: str | None = None,
                   timeout: float = 30.0) -> Iterator[DaskRunner]:
    """A runner for :func:`hasten.simulation.simulate` on Dask.

    ``workers=N`` starts a local cluster of ``N`` worker processes (one thread each) and
    closes it afterwards; ``scheduler="tcp://host:8786"`` uses a cluster already running,
    whose workers must have hasten installed.
    """
    if (workers is None) == (scheduler is None):
        raise InputError("give either a number of local workers or the address of a scheduler, not both",
                         column="workers" if workers is not None else "scheduler",
                         value=workers if workers is not None else scheduler,
                         fix="use --workers N for a cluster on this machine, or --scheduler ADDRESS")
    if workers is not None and (isinstance(workers, bool) or not isinstance(workers, int) or workers < 1):
        raise InputError("the number of workers must be a whole number, 1 or more", column="workers",
                         value=workers, fix="e.g. --workers 2")
    distributed = _distributed()
    import dask

    cluster = None
    try:
        if workers is not None:
            # Dask sets MALLOC_TRIM_THRESHOLD_ in its workers to hand memory back to the
            # system at once; glibc then maps every large array afresh, and the page faults
            # cost the simulation (whose arrays are large and short-lived) twice its time
            # (and the statistical profiler would sample every worker's stack 100 times a second)
            with dask.config.set({_TRIM: None, "distributed.worker.profile.enabled": False}):
                cluster = distributed.LocalCluster(n_workers=workers, threads_per_worker=1, processes=True,
                                                   dashboard_address=None, silence_logs=logging.ERROR)
            client = distributed.Client(cluster)
        else:
            client = distributed.Client(scheduler, timeout=timeout)
    except (OSError, TimeoutError, ValueError) as exc:
        if cluster is not None:
            cluster.close()
        where = f"the scheduler at {scheduler}" if scheduler else "a local cluster"
        raise HastenError(f"could not start or reach {where}: {exc}") from None
    try:
        yield DaskRunner(client)
    finally:
        client.close()
        if cluster is not None:
            cluster.close()


def simulate_on_cluster(network, ranges, runs: int, seed: int | None = None, *, workers: int | None = None,
                        scheduler: str | None = None, **options):
    """:func:`hasten.simulation.simulate` with its chunks run on Dask (see
    :func:`cluster_runner`); ``options`` go to ``simulate``."""
    from .simulation import simulate

    with cluster_runner(workers=workers, scheduler=scheduler) as runner:
        return simulate(network, ranges, runs, seed, runner=runner, **options)
