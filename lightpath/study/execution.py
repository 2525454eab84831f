"""Run many independent draws: serially, on a local process pool, or on a dask cluster.

One interface, three back ends, identical results.  ``run_draws(func, tasks)``
returns ``[func(t) for t in tasks]`` in task order whatever the back end:

- ``workers=1`` and no ``client``: a plain loop in this process;
- ``workers=N > 1``: a :class:`concurrent.futures.ProcessPoolExecutor` started with
  the ``spawn`` method (safe with threads, with embree and on every platform); ``func``
  is sent once to each worker through the pool initializer and the tasks travel in
  chunks, so a large ``func`` (a callable object holding a sky window) is not
  pickled once per task; each worker runs its numerical libraries on one thread
  (:data:`WORKER_THREAD_ENV`, unless the environment already says otherwise);
- ``client=dask.distributed.Client``: ``func`` is scattered once to every worker
  and the chunks are submitted as tasks of the cluster.

Determinism comes from the tasks, not from the back end: each task carries
everything its draw needs (its own random-number stream, see
:mod:`lightpath.study.uncertainty`), so a draw's result does not depend on which
worker ran it or how the tasks were cut into chunks.

>>> run_draws(abs, [-3, 1, -2])
[3, 1, 2]
>>> seen = []
>>> run_draws(abs, [-1, -2], progress=seen.append)
[1, 2]
>>> sum(seen)
2

References
----------
Rocklin, M. (2015). Dask: parallel computation with blocked algorithms and task
scheduling. *Proceedings of the 14th Python in Science Conference*, 130-136.
"""

from __future__ import annotations

import multiprocessing
import pickle
from collections.abc import Callable, Sequence
from concurrent.futures import FIRST_COMPLETED, ProcessPoolExecutor, wait
from typing import Any

from lightpath.errors import InputError

__all__ = ["WORKER_THREAD_ENV", "chunk_ranges", "connect_cluster", "describe_backend", "run_draws"]

#: Chunks per worker: small enough to balance uneven draws, large enough to keep overhead low.
CHUNKS_PER_WORKER = 4

_WORKER_FUNC: Callable[[Any], Any] | None = None  # set in each pool worker by _init_worker


def chunk_ranges(n_tasks: int, n_chunks: int) -> list[tuple[int, int]]:
    """Split ``range(n_tasks)`` into at most ``n_chunks`` contiguous (start, stop) ranges of near-equal size.

    >>> chunk_ranges(10, 3)
    [(0, 4), (4, 7), (7, 10)]
    >>> chunk_ranges(2, 5)
    [(0, 1), (1, 2)]
    >>> chunk_ranges(0, 4)
    []
    """
    n_chunks = max(1, min(int(n_chunks), int(n_tasks)))
    if n_tasks <= 0:
        return []
    base, extra = divmod(int(n_tasks), n_chunks)
    ranges, start = [], 0
    for i in range(n_chunks):
        stop = start + base + (1 if i < extra else 0)
        ranges.append((start, stop))
        start = stop
    return ranges


#: Thread counts of the numerical libraries in pool workers: one each, as dask's workers have by default.
#: Two workers on two cores that each start a multi-threaded BLAS fight over the cores (measured: the
#: engine's look-up took twice the CPU time for the same wall time with OpenBLAS's default threads).
WORKER_THREAD_ENV = {
    "OMP_NUM_THREADS": "1",
    "OPENBLAS_NUM_THREADS": "1",
    "MKL_NUM_THREADS": "1",
    "LIGHTPATH_THREADS": "1",  # lightpath.threads
}


def _init_worker(func_pickle: bytes) -> None:
    import os
    import pickle

    for key, value in WORKER_THREAD_ENV.items():  # before numpy loads (unpickling the function imports it)
        os.environ.setdefault(key, value)
    global _WORKER_FUNC
    _WORKER_FUNC = pickle.loads(func_pickle)


def _run_chunk_in_worker(tasks: Sequence[Any]) -> list[Any]:
    assert _WORKER_FUNC is not None, "pool worker was not initialised"
    return [_WORKER_FUNC(task) for task in tasks]


def _run_chunk_with(func: Callable[[Any], Any], tasks: Sequence[Any]) -> list[Any]:
    from lightpath.threads import set_thread_count

    set_thread_count(1)  # a dask worker runs one chunk per thread: no threads inside the chunk as well
    return [func(task) for task in tasks]


def _check_workers(workers: int) -> int:
    if isinstance(workers, bool) or not isinstance(workers, int) or workers < 1:
        raise InputError(f"--workers: {workers!r} is not a whole number of worker processes (1 or more)")
    return workers


def run_draws(
    func: Callable[[Any], Any],
    tasks: Sequence[Any],
    *,
    workers: int = 1,
    client: Any = None,
    progress: Callable[[int], Any] | None = None,
    chunks_per_worker: int = CHUNKS_PER_WORKER,
) -> list[Any]:
    """Evaluate ``func`` on every task and return the results in task order.

    Parameters
    ----------
    func : a picklable callable of one argument (a module-level function or an
        instance of a module-level class); for the pool and the cluster it is sent
        once per worker.
    tasks : the arguments, one per draw; each must be picklable.
    workers : number of local worker processes; 1 runs in this process.
    client : a ``dask.distributed.Client``; when given, ``workers`` is ignored and the
        cluster's workers run the chunks.
    progress : called with the number of tasks just finished (``progress(n)``), in this process.
    chunks_per_worker : how many chunks each worker gets on average.

    Returns
    -------
    list, ``results[i] == func(tasks[i])``.
    """
    tasks = list(tasks)
    report = progress if progress is not None else (lambda n: None)
    if client is not None:
        return _run_dask(func, tasks, client, report, chunks_per_worker)
    workers = _check_workers(workers)
    if workers == 1 or len(tasks) <= 1:
        results = []
        for task in tasks:
            results.append(func(task))
            report(1)
        return results
    return _run_pool(func, tasks, workers, report, chunks_per_worker)


def _run_pool(func, tasks, workers, report, chunks_per_worker) -> list[Any]:
    ranges = chunk_ranges(len(tasks), workers * chunks_per_worker)
    results: list[Any] = [None] * len(tasks)
    context = multiprocessing.get_context("spawn")
    with ProcessPoolExecutor(
        max_workers=min(workers, len(ranges)),
        mp_context=context,
        initializer=_init_worker,
        initargs=(pickle.dumps(func, protocol=pickle.HIGHEST_PROTOCOL),),
    ) as pool:
        pending = {pool.submit(_run_chunk_in_worker, tasks[a:b]): (a, b) for a, b in ranges}
        while pending:
            done, _ = wait(pending, return_when=FIRST_COMPLETED)
            for future in done:
                a, b = pending.pop(future)
                results[a:b] = future.result()
                report(b - a)
    return results


def _run_dask(func, tasks, client, report, chunks_per_worker) -> list[Any]:
    from distributed import as_completed

    n_workers = max(1, len(client.scheduler_info().get("workers", {})))
    ranges = chunk_ranges(len(tasks), n_workers * chunks_per_worker)
    if not ranges:
        return []
    remote_func = client.scatter(func, broadcast=True)
    pending = {client.submit(_run_chunk_with, remote_func, tasks[a:b], pure=False): (a, b) for a, b in ranges}
    results: list[Any] = [None] * len(tasks)
    for future in as_completed(list(pending)):
        a, b = pending.pop(future)
        results[a:b] = future.result()
        report(b - a)
        future.release()
    return results


def connect_cluster(address: str, timeout_s: float = 10.0):
    """A ``dask.distributed.Client`` for the scheduler at ``address`` (``"tcp://host:8786"``).

    Raises :class:`InputError` naming ``--cluster`` when dask.distributed is missing
    or the scheduler cannot be reached in ``timeout_s`` seconds.
    """
    try:
        from distributed import Client
    except ImportError:
        raise InputError("--cluster: dask.distributed is not installed (pip install 'lightpath[cluster]')") from None
    _check_reachable(address, timeout_s)
    try:
        return Client(address, timeout=timeout_s)
    except (OSError, TimeoutError, ValueError) as exc:
        raise InputError(f"--cluster: cannot reach a dask scheduler at {address!r} ({type(exc).__name__})") from None


def _check_reachable(address: str, timeout_s: float) -> None:
    """Fail fast (InputError) when a ``tcp://host:port`` scheduler address refuses connections."""
    import socket
    from urllib.parse import urlsplit

    parts = urlsplit(address if "://" in address else f"tcp://{address}")
    if parts.scheme != "tcp" or not parts.hostname or not parts.port:
        return  # other protocols (tls, ucx, inproc): let dask judge
    try:
        with socket.create_connection((parts.hostname, parts.port), timeout=min(timeout_s, 3.0)):
            pass
    except OSError as exc:
        raise InputError(f"--cluster: nothing answers at {address!r} ({type(exc).__name__})") from None


def describe_backend(workers: int = 1, client: Any = None) -> str:
    """A short description of where draws run, for reports.

    >>> describe_backend(1)
    'serial (this process)'
    >>> describe_backend(2)
    'local process pool, 2 workers (spawn)'
    """
    if client is not None:
        n = len(client.scheduler_info().get("workers", {}))
        return f"dask.distributed cluster at {client.scheduler.address}, {n} workers"
    if workers <= 1:
        return "serial (this process)"
    return f"local process pool, {workers} workers (spawn)"
