"""Run one function over many work items: in this process, in worker processes, or on a Dask
distributed cluster, behind one interface; results come back in the items' order.

``--jobs N`` uses :class:`concurrent.futures.ProcessPoolExecutor`; ``--cluster ADDRESS`` uses the
concurrent.futures-compatible executor of a ``distributed.Client``. Either way the parent sees
each item finish (``on_done``) in completion order, while the results it returns are in item
order, so the output never depends on which worker was quicker."""

from __future__ import annotations

import concurrent.futures as cf
import multiprocessing
import os
from collections.abc import Callable, Iterator, Sequence
from contextlib import contextmanager
from dataclasses import dataclass
from typing import TypeVar

from .errors import ConfigError, UsageError

__all__ = ["CLUSTER_CONNECT_SECONDS", "Workers", "default_jobs", "run_in_order", "worker_pool"]

T = TypeVar("T")
R = TypeVar("R")

CLUSTER_CONNECT_SECONDS = 5  # a scheduler that does not answer in this time is reported, not awaited
# Imported once in the process workers are forked from, so no worker pays for numpy, pandas,
# igraph and matplotlib again.
_WORKER_PRELOAD = ["generator.build"]


def default_jobs() -> int:
    """The cores this process may run on."""
    try:
        return max(1, len(os.sched_getaffinity(0)))
    except AttributeError:  # pragma: no cover - platforms without sched_getaffinity
        return max(1, os.cpu_count() or 1)


@dataclass(frozen=True, kw_only=True)
class Workers:
    """Where per-network work runs: ``jobs`` local processes (1: this process, no pool; None:
    one per core) or the Dask scheduler at ``cluster``; ``cluster_source`` names the option or
    key that asked for it, for error messages (``--cluster`` or ``build.cluster``)."""

    jobs: int | None = None
    cluster: str | None = None
    cluster_source: str = "--cluster"

    def __post_init__(self) -> None:
        if self.jobs is not None and self.jobs < 1:
            raise UsageError(f"--jobs must be 1 or more, got {self.jobs}")

    @property
    def processes(self) -> int:
        """Local processes to use (the cluster decides its own)."""
        return self.jobs if self.jobs is not None else default_jobs()

    def describe(self) -> str:
        if self.cluster is not None:
            return f"on the cluster at {self.cluster}"
        return "in this process" if self.processes == 1 else f"in {self.processes} worker processes"


def _local_pool(jobs: int) -> cf.Executor:
    method = "forkserver" if "forkserver" in multiprocessing.get_all_start_methods() else "spawn"
    context = multiprocessing.get_context(method)
    if method == "forkserver":
        # A forked copy of a process running threads (the preview's server and file watcher)
        # can deadlock; the fork server is a fresh, single-threaded process.
        context.set_forkserver_preload(_WORKER_PRELOAD)
    return cf.ProcessPoolExecutor(max_workers=jobs, mp_context=context)


def _cluster_error(workers: Workers, message: str) -> ConfigError:
    if workers.cluster_source.startswith("--"):
        return ConfigError(f"{workers.cluster_source} {workers.cluster}: {message}")
    return ConfigError(f"'{workers.cluster}': {message}", key=workers.cluster_source)


@contextmanager
def _cluster_pool(workers: Workers) -> Iterator[cf.Executor]:
    try:
        from distributed import Client
    except ImportError:
        raise _cluster_error(workers, "building on a cluster needs the optional Dask packages: "
                             "pip install 'netfolio[cluster]'") from None
    try:
        client = Client(workers.cluster, timeout=CLUSTER_CONNECT_SECONDS,
                        set_as_default=False)
    except (OSError, TimeoutError, ValueError) as exc:
        raise _cluster_error(workers, f"no Dask scheduler answered within "
                             f"{CLUSTER_CONNECT_SECONDS} s ({type(exc).__name__}: {exc}); check "
                             "the address and that the scheduler is running") from None
    try:
        # pure=False: items are not hashed (they are whole networks) and never deduplicated.
        with client.get_executor(pure=False) as executor:
            yield executor
    finally:
        client.close()


@contextmanager
def worker_pool(workers: Workers, items: int) -> Iterator[cf.Executor | None]:
    """An executor for ``items`` work items, or None when they run in this process (one job, or
    fewer than two items for local processes)."""
    if workers.cluster is not None:
        if items == 0:
            yield None
            return
        with _cluster_pool(workers) as executor:
            yield executor
        return
    jobs = min(workers.processes, items)
    if jobs <= 1:
        yield None
        return
    pool = _local_pool(jobs)
    try:
        yield pool
    finally:
        pool.shutdown(wait=True, cancel_futures=True)


def run_in_order(function: Callable[[T], R], items: Sequence[T], *,
                 executor: cf.Executor | None,
                 on_done: Callable[[int, R], None] | None = None) -> list[R]:
    """``[function(item) for item in items]``, on ``executor`` when given; ``on_done(index,
    result)`` runs in this process as each item finishes. The first failure is raised once the
    items submitted so far are cancelled."""
    if executor is None:
        results = []
        for index, item in enumerate(items):
            result = function(item)
            if on_done is not None:
                on_done(index, result)
            results.append(result)
        return results
    futures: dict[cf.Future[R], int] = {executor.submit(function, item): index
                                        for index, item in enumerate(items)}
    found: dict[int, R] = {}
    try:
        for future in cf.as_completed(futures):
            index = futures[future]
            found[index] = future.result()
            if on_done is not None:
                on_done(index, found[index])
    except BaseException:
        for future in futures:
            future.cancel()
        raise
    return [found[i] for i in range(len(items))]
