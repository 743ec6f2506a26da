"""Where a study's cases run: in this process, on local worker processes, on a
dask.distributed cluster, or through any ``map`` function. Each engine takes the tasks and
yields the outcomes as cases finish (in any order).

Local workers are started with ``spawn`` and one BLAS thread each: the thread variables are set
in this process's environment for the pool's lifetime, since a worker reads them when numpy
loads, before any initialiser could run. gmsh then runs in each worker's main thread.
"""

from __future__ import annotations

import os
from collections.abc import Callable, Iterable, Iterator
from contextlib import contextmanager

from .worker import CaseTask, run_study_case, warm_up

THREAD_VARIABLES = (
    "OMP_NUM_THREADS",
    "OPENBLAS_NUM_THREADS",
    "MKL_NUM_THREADS",
    "BLIS_NUM_THREADS",
    "VECLIB_MAXIMUM_THREADS",
    "NUMEXPR_NUM_THREADS",
)

WORKER_FAILED = "the worker failed"  # not the case's fault: run again on --resume
Engine = Callable[[list[CaseTask]], Iterator[dict]]


@contextmanager
def one_blas_thread() -> Iterator[None]:
    """Set every BLAS/OpenMP thread variable to 1 for the block, then restore them."""
    saved = {name: os.environ.get(name) for name in THREAD_VARIABLES}
    os.environ.update(dict.fromkeys(THREAD_VARIABLES, "1"))
    try:
        yield
    finally:
        for name, value in saved.items():
            if value is None:
                os.environ.pop(name, None)
            else:
                os.environ[name] = value


def serial(tasks: list[CaseTask]) -> Iterator[dict]:
    """Every case in this process, one after the other."""
    for task in tasks:
        yield run_study_case(task)


class LocalProcesses:
    """An engine of ``workers`` spawned processes, one BLAS thread each.

    ``start()`` spawns them and has each import the solver while the parent checks the
    study's cases; ``close()`` ends them. Called without ``start()``, the engine starts and
    closes itself.
    """

    def __init__(self, workers: int):
        self.workers = workers
        self.pool = None
        self._threads = None

    def start(self) -> None:
        import multiprocessing
        from concurrent.futures import ProcessPoolExecutor

        if self.pool is not None:
            return
        self._threads = one_blas_thread()
        self._threads.__enter__()  # the workers read it when they start, for the pool's life
        context = multiprocessing.get_context("spawn")
        self.pool = ProcessPoolExecutor(self.workers, mp_context=context)
        for _ in range(self.workers):
            self.pool.submit(warm_up)

    def close(self) -> None:
        if self.pool is not None:
            self.pool.shutdown(wait=True, cancel_futures=True)
            self.pool = None
        if self._threads is not None:
            self._threads.__exit__(None, None, None)
            self._threads = None

    def __call__(self, tasks: list[CaseTask]) -> Iterator[dict]:
        from concurrent.futures import as_completed

        own = self.pool is None
        self.start()
        futures = {self.pool.submit(run_study_case, task): task for task in tasks}
        try:
            for future in as_completed(futures):
                yield _outcome(future, futures[future])
        finally:
            for future in futures:
                future.cancel()
            if own:
                self.close()


def local_processes(workers: int) -> LocalProcesses:
    """An engine of ``workers`` spawned processes, one BLAS thread each."""
    return LocalProcesses(workers)


def executor(pool) -> Engine:
    """An engine on a ``concurrent.futures.Executor`` the caller made (and shuts down)."""

    def engine(tasks: list[CaseTask]) -> Iterator[dict]:
        from concurrent.futures import as_completed

        futures = {pool.submit(run_study_case, task): task for task in tasks}
        for future in as_completed(futures):
            yield _outcome(future, futures[future])

    return engine


def dask_cluster(client_or_address) -> Engine:
    """An engine on a dask.distributed cluster: a ``Client`` or a scheduler's address."""

    def engine(tasks: list[CaseTask]) -> Iterator[dict]:
        try:
            from distributed import Client, as_completed
        except ImportError:
            from ..errors import AdvisorError

            raise AdvisorError(
                "running on a cluster needs dask.distributed: pip install 'soakwise[studies]'"
            ) from None
        own = isinstance(client_or_address, str)
        client = Client(client_or_address) if own else client_or_address
        try:
            futures = client.map(run_study_case, tasks, pure=False)
            by_key = {future.key: task for future, task in zip(futures, tasks, strict=True)}
            for future in as_completed(futures):
                yield _outcome(future, by_key[future.key])
                future.release()
        finally:
            if own:
                client.close()

    return engine


def mapped(function: Callable[[Callable, Iterable], Iterable]) -> Engine:
    """An engine on a ``map``-like function (``map(run, tasks)`` → outcomes, in order)."""

    def engine(tasks: list[CaseTask]) -> Iterator[dict]:
        yield from function(run_study_case, tasks)

    return engine


def _outcome(future, task: CaseTask) -> dict:
    """A finished future's outcome; a worker that died is the case's failure."""
    try:
        return future.result()
    except Exception as failure:  # the worker process or its transport failed
        return {
            "case_id": task.case_id,
            "answers": None,
            "error": f"{WORKER_FAILED}: {type(failure).__name__}: {failure}",
            "wall_seconds": None,
        }


def choose(map=None, *, workers: int | None = None, cluster: str | None = None) -> Engine:  # noqa: A002
    """The engine for the API's ``map`` argument, or for ``workers`` and ``cluster``.

    ``map``: None (``cluster`` if given, else local processes, serial for one worker),
    ``"serial"``, ``"processes"``, a dask ``Client``, a scheduler address (``"tcp://..."``),
    a ``concurrent.futures.Executor``, or a ``map``-like function.
    """
    from concurrent.futures import Executor

    if map is None:
        if cluster:
            return dask_cluster(cluster)
        workers = workers or os.cpu_count() or 1
        return serial if workers == 1 else local_processes(workers)
    if map == "serial":
        return serial
    if map == "processes":
        return local_processes(workers or os.cpu_count() or 1)
    if isinstance(map, str):
        return dask_cluster(map)
    if isinstance(map, Executor):
        return executor(map)
    if hasattr(map, "gather") and hasattr(map, "submit"):
        return dask_cluster(map)
    if callable(map):
        return mapped(map)
    from ..errors import AdvisorError

    raise AdvisorError(
        f"map must be 'serial', 'processes', a dask Client or address, an Executor or a "
        f"map function, got {map!r}"
    )
