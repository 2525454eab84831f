"""Run a study's independent tasks: serially, on a local process pool, or on a dask cluster.

One interface, three back ends, identical results.  ``run_draws(func, tasks)`` returns
``[func(t) for t in tasks]`` in task order whatever the back end:

- ``workers=1`` and no cluster: a plain loop in this process;
- ``workers=N > 1``: N processes started once (``spawn``), each running its numerical libraries on one
  thread (:data:`WORKER_THREAD_ENV`);
- a dask cluster (:func:`open_execution` with ``cluster=ADDRESS``, see :mod:`lightpath.study.cluster`).

How the work is cut (:func:`plan_chunks`): tasks travel in **chunks**, sized from the measured cost of
one task (a few are run here first and kept) to take about :data:`CHUNK_TARGET_S` seconds, and counted
from the total threads of the back end so that every thread gets several; tasks of different kinds
(survey draws and null orientations cost differently) never share a chunk, and within a kind they are
grouped (by year, so that a worker computes each year's Sun track once).  The heavy callable (a
window) is a **shared** object sent once per worker: scattered to every dask worker, or written once to
a temporary file that each pool worker reads once.  Finished chunks are taken as they complete, so a
progress bar moves.

Determinism comes from the tasks, not from the back end: each task carries everything its draw needs
(its own random-number stream, see :mod:`lightpath.study.uncertainty`), so a result does not depend on
which worker ran it or how the tasks were cut into chunks.

>>> run_draws(abs, [-3, 1, -2])
[3, 1, 2]
>>> seen = []
>>> run_draws(abs, [-1, -2], progress=seen.append)
[1, 2]
>>> sum(seen)
2

References
----------
Rocklin, M. (2015). Dask: parallel computation with blocked algorithms and task scheduling.
*Proceedings of the 14th Python in Science Conference*, 130-136.
Hummel, S. F., Schonberg, E. & Flynn, L. E. (1992). Factoring: a method for scheduling parallel loops.
*Communications of the ACM* 35(8), 90-101 (chunks several per processor to absorb uneven costs).
"""

from __future__ import annotations

import math
import multiprocessing
import os
import pickle
import tempfile
import time
from collections import OrderedDict
from collections.abc import Callable, Hashable, Sequence
from concurrent.futures import FIRST_COMPLETED, ProcessPoolExecutor, wait
from concurrent.futures.process import BrokenProcessPool
from dataclasses import dataclass, field
from pathlib import Path
from typing import Any

from lightpath.errors import InputError

__all__ = [
    "CHUNK_TARGET_S",
    "Chunk",
    "ClusterError",
    "Execution",
    "WORKER_THREAD_ENV",
    "chunk_ranges",
    "chunk_size",
    "connect_cluster",
    "describe_backend",
    "open_execution",
    "plan_chunks",
    "prepare_process",
    "run_chunks",
    "run_draws",
]

#: What one chunk should cost, seconds: long against a task's overhead (~1-10 ms), short against the run.
CHUNK_TARGET_S = 2.0
#: Chunks are never cut below this cost, seconds (overhead would show).
CHUNK_MIN_S = 0.25
#: At least this many chunks per thread when there are enough tasks (uneven costs even out).
CHUNKS_PER_THREAD = 4
#: Chunks submitted ahead per thread (bounds what waits on the workers, and the shared objects alive).
IN_FLIGHT_PER_THREAD = 3

#: Thread counts of the numerical libraries in pool workers: one each, as dask's workers have by default.
#: Two workers on two cores that each start a multi-threaded BLAS fight over the cores (measured: the
#: engine's look-up took twice the CPU time for the same wall time with OpenBLAS's default threads).
WORKER_THREAD_ENV = {
    "OMP_NUM_THREADS": "1",
    "OPENBLAS_NUM_THREADS": "1",
    "MKL_NUM_THREADS": "1",
    "LIGHTPATH_THREADS": "1",  # lightpath.threads
}


class ClusterError(InputError):
    """A back end that cannot run the study (unreachable, no workers, a worker without lightpath); one line."""


@dataclass(frozen=True)
class Chunk:
    """Tasks that travel and run together, applied to the shared callable ``shared``."""

    label: str  # readable part of the task's name, e.g. "survey-y-1499"
    shared: str  # key of the callable in the ``shared`` mapping of :func:`run_chunks`
    tasks: tuple


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


def chunk_size(cost_s: float, n_tasks: int, threads: int) -> int:
    """Tasks per chunk: about :data:`CHUNK_TARGET_S` of work, fewer when the threads need more chunks.

    A chunk is cut smaller than the target so that every thread gets :data:`CHUNKS_PER_THREAD` chunks,
    but never below :data:`CHUNK_MIN_S` of work.

    >>> chunk_size(0.008, 10_000, 2)  # 8 ms draws: 250 draws (2 s) a chunk
    250
    >>> chunk_size(0.008, 1_000, 2)  # fewer draws: 8 chunks of 125
    125
    >>> chunk_size(0.5, 40, 100)  # a big cluster: one task a chunk at least 0.25 s
    1
    """
    cost = max(float(cost_s), 1e-6) if math.isfinite(cost_s) else 1e-3
    by_time = max(1, round(CHUNK_TARGET_S / cost))
    by_threads = max(1, math.ceil(n_tasks / (CHUNKS_PER_THREAD * max(1, threads))))
    floor = max(1, math.ceil(CHUNK_MIN_S / cost))
    return max(1, min(by_time, max(by_threads, floor), max(1, n_tasks)))


def plan_chunks(
    n_tasks: int,
    size: int | dict[Hashable, int],
    kinds: Sequence[Hashable] | None = None,
    group: Sequence[Any] | None = None,
) -> list[tuple[Hashable, list[int]]]:
    """Cut task indices into chunks of ``size``: one kind per chunk, sorted by ``group`` within a kind.

    Returns (kind, indices) pairs in submission order.  ``size`` may depend on the kind.

    >>> plan_chunks(6, 2, kinds=["a", "b", "a", "b", "a", "a"], group=[3, 0, 1, 0, 2, 1])
    [('a', [2, 5]), ('a', [4, 0]), ('b', [1, 3])]
    """
    kinds = list(kinds) if kinds is not None else [None] * n_tasks
    group = list(group) if group is not None else [0] * n_tasks
    order: dict[Hashable, list[int]] = {}
    for i in range(n_tasks):
        order.setdefault(kinds[i], []).append(i)
    out = []
    for kind, members in order.items():
        members.sort(key=lambda i: group[i])  # stable: task order within a group
        k = size[kind] if isinstance(size, dict) else size
        out += [(kind, members[a : a + k]) for a in range(0, len(members), max(1, int(k)))]
    return out


# --------------------------------------------------------------------------------------------------
# worker side


_PREPARED = False
_SHARED_CACHE: OrderedDict[str, Any] = OrderedDict()  # pool workers: shared objects read from disk
_SHARED_KEEP = 2


def prepare_process() -> None:
    """Once per worker process: one thread for lightpath's arrays, and glibc's trimming relaxed.

    dask's nanny starts workers with ``MALLOC_TRIM_THRESHOLD_=65536``; glibc then stops raising its
    mmap threshold, so every large array is a fresh mapping (measured: a framing draw's CPU doubled,
    8.2 → 16.4 ms).  When that variable is set, lightpath's tasks set the threshold back to glibc's
    dynamic maximum (:func:`lightpath.study.cluster.relax_malloc_trim`).  Results do not change.
    """
    global _PREPARED
    if _PREPARED:
        return
    from lightpath.study.cluster import relax_malloc_trim
    from lightpath.threads import set_thread_count

    set_thread_count(1)  # a worker runs one chunk per thread: no threads inside the chunk as well
    relax_malloc_trim()
    _PREPARED = True


def apply_chunk(func: Callable[[Any], Any], tasks: Sequence[Any]) -> list[Any]:
    """``[func(t) for t in tasks]``, or ``func.run_chunk(tasks)`` when the callable does a chunk at once."""
    prepare_process()
    batch = getattr(func, "run_chunk", None)
    if batch is not None:
        return list(batch(list(tasks)))
    return [func(task) for task in tasks]


def _init_pool_worker() -> None:
    for key, value in WORKER_THREAD_ENV.items():  # before numpy loads
        os.environ.setdefault(key, value)


def _pool_chunk(key: str, path: str, tasks: Sequence[Any]) -> list[Any]:
    func = _SHARED_CACHE.get(key)
    if func is None:
        with open(path, "rb") as f:
            func = pickle.load(f)
        _SHARED_CACHE[key] = func
        while len(_SHARED_CACHE) > _SHARED_KEEP:
            _SHARED_CACHE.popitem(last=False)
    _SHARED_CACHE.move_to_end(key)
    return apply_chunk(func, tasks)


# --------------------------------------------------------------------------------------------------
# back ends


def _check_workers(workers: int) -> int:
    if isinstance(workers, bool) or not isinstance(workers, int) or workers < 1:
        raise InputError(f"--workers: {workers!r} is not a whole number of worker processes (1 or more)")
    return workers


@dataclass
class Execution:
    """Where a study's tasks run: this process, ``workers`` local processes, or a dask ``client``.

    Use :func:`open_execution` (it checks the cluster first) and close it (or use ``with``).

    >>> Execution(3).describe()
    'local process pool, 3 workers (spawn)'
    """

    workers: int = 1
    client: Any = None
    owns_client: bool = False
    no_workers_timeout_s: float = 60.0  # a cluster left without workers this long ends the run
    retries: int = 2  # resubmissions of a chunk whose workers were lost
    _stats: dict = field(default_factory=dict, repr=False)

    def __post_init__(self) -> None:
        if self.client is None:
            _check_workers(self.workers)

    @property
    def threads(self) -> int:
        """Total threads that run chunks (a dask cluster's sum over its workers, as it is now)."""
        if self.client is None:
            return self.workers
        return max(1, sum(self.client.nthreads().values()))

    @property
    def serial(self) -> bool:
        return self.client is None and self.workers == 1

    def describe(self) -> str:
        """A short description of where tasks run, for reports."""
        if self.client is not None:
            n = self.client.nthreads()
            where = self.client.scheduler.address
            return f"dask.distributed cluster at {where}, {len(n)} workers, {sum(n.values())} threads"
        if self.workers <= 1:
            return "serial (this process)"
        return f"local process pool, {self.workers} workers (spawn)"

    def close(self) -> None:
        if self.client is not None and self.owns_client:
            self.client.close()
            self.client = None

    def __enter__(self) -> Execution:
        return self

    def __exit__(self, *exc) -> None:
        self.close()


def open_execution(workers: int = 1, cluster: str | None = None, timeout_s: float = 10.0) -> Execution:
    """An :class:`Execution` for ``--workers N`` or ``--cluster ADDRESS`` (checked: reachable, workers, versions)."""
    if cluster:
        return Execution(1, connect_cluster(cluster, timeout_s), owns_client=True)
    return Execution(_check_workers(workers))


def connect_cluster(address: str, timeout_s: float = 10.0):
    """A ``dask.distributed.Client`` for the scheduler at ``address``; see :func:`lightpath.study.cluster.connect`."""
    from lightpath.study.cluster import connect

    return connect(address, timeout_s)


def describe_backend(workers: int = 1, client: Any = None) -> str:
    """A short description of where draws run, for reports.

    >>> describe_backend(1)
    'serial (this process)'
    >>> describe_backend(2)
    'local process pool, 2 workers (spawn)'
    """
    return Execution(workers if client is None else 1, client).describe()


def run_chunks(
    shared: dict[str, Any],
    chunks: Sequence[Chunk],
    on_done: Callable[[int, list[Any]], Any],
    execution: Execution,
    name: str = "study",
) -> None:
    """Run every chunk; ``on_done(i, results)`` in this process as chunk ``i`` completes (any order).

    ``shared[chunk.shared]`` is the callable applied to the chunk's tasks; it is sent once per worker
    and dropped once its last chunk is done.
    """
    if not chunks:
        return
    if execution.client is not None:
        from lightpath.study.cluster import run_on_dask

        run_on_dask(shared, chunks, on_done, execution, name)
    elif execution.workers == 1:
        for i, chunk in enumerate(chunks):
            on_done(i, apply_chunk(shared[chunk.shared], chunk.tasks))
    else:
        _run_pool(shared, chunks, on_done, execution.workers)


def _run_pool(shared, chunks, on_done, workers) -> None:
    remaining = {key: 0 for key in shared}
    for chunk in chunks:
        remaining[chunk.shared] += 1
    context = multiprocessing.get_context("spawn")
    limit = IN_FLIGHT_PER_THREAD * workers
    with tempfile.TemporaryDirectory(prefix="lightpath-") as tmp:
        paths: dict[str, str] = {}

        def path_of(key: str) -> str:
            if key not in paths:  # written once, read once by each worker that needs it
                paths[key] = str(Path(tmp) / f"shared-{len(paths)}.pickle")
                with open(paths[key], "wb") as f:
                    pickle.dump(shared[key], f, protocol=pickle.HIGHEST_PROTOCOL)
            return paths[key]

        with ProcessPoolExecutor(max_workers=min(workers, len(chunks)), mp_context=context,
                                 initializer=_init_pool_worker) as pool:  # fmt: skip
            pending: dict = {}
            todo = iter(enumerate(chunks))
            try:
                for i, chunk in todo:
                    pending[pool.submit(_pool_chunk, chunk.shared, path_of(chunk.shared), chunk.tasks)] = i
                    if len(pending) >= limit:
                        break
                while pending:
                    done, _ = wait(pending, return_when=FIRST_COMPLETED)
                    for future in done:
                        i = pending.pop(future)
                        on_done(i, future.result())
                        key = chunks[i].shared
                        remaining[key] -= 1
                        if remaining[key] == 0 and key in paths:
                            os.unlink(paths[key])
                    for i, chunk in todo:
                        pending[pool.submit(_pool_chunk, chunk.shared, path_of(chunk.shared), chunk.tasks)] = i
                        if len(pending) >= limit:
                            break
            except BrokenProcessPool:
                raise ClusterError(
                    "--workers: a worker process died (out of memory, or killed); run again with fewer --workers"
                ) from None
            except BaseException:  # Ctrl-C: drop what has not started
                pool.shutdown(wait=False, cancel_futures=True)
                raise


def measure(func: Callable[[Any], Any], tasks: Sequence[Any], indices: Sequence[int]) -> tuple[dict[int, Any], float]:
    """Run ``tasks[i]`` for ``indices`` here; (results by index, seconds of the last one: a warm task)."""
    out, last = {}, float("nan")
    for i in indices:
        t0 = time.perf_counter()
        out[i] = func(tasks[i])
        last = time.perf_counter() - t0
    return out, last


def run_draws(
    func: Callable[[Any], Any],
    tasks: Sequence[Any],
    *,
    workers: int = 1,
    client: Any = None,
    execution: Execution | None = None,
    progress: Callable[[int], Any] | None = None,
    kinds: Sequence[Hashable] | None = None,
    group: Sequence[Any] | None = None,
    name: str = "draws",
) -> list[Any]:
    """Evaluate ``func`` on every task and return the results in task order.

    Parameters
    ----------
    func : a picklable callable of one argument (a module-level function or an instance of a
        module-level class); it is sent once per worker.
    tasks : the arguments, one per draw; each must be picklable.
    workers, client : local worker processes (1: this process), or a ``dask.distributed.Client``;
        ignored when ``execution`` is given.
    progress : called with the number of tasks just finished (``progress(n)``), in this process.
    kinds : a label per task; tasks of different kinds never share a chunk (their costs differ),
        and each kind's cost per task is measured on two of its tasks run here.
    group : a sort key per task (the year); tasks of one kind are chunked in this order.
    name : readable part of the names of the cluster's tasks.

    Returns
    -------
    list, ``results[i] == func(tasks[i])``.
    """
    tasks = list(tasks)
    report = progress if progress is not None else (lambda n: None)
    ex = execution if execution is not None else Execution(workers if client is None else 1, client)
    results: list[Any] = [None] * len(tasks)
    if ex.serial or len(tasks) <= 1:
        order = [i for _, idx in plan_chunks(len(tasks), max(1, len(tasks)), kinds, group) for i in idx]
        for i in order:  # grouped by year: each year's sky computed once
            results[i] = func(tasks[i])
            report(1)
        return results
    kind_of = list(kinds) if kinds is not None else [None] * len(tasks)
    first: dict[Hashable, list[int]] = {}
    for i, k in enumerate(kind_of):
        if len(first.setdefault(k, [])) < 2:
            first[k].append(i)
    sizes, done_here = {}, set()
    for k, idx in first.items():  # the cost per task of each kind, on tasks kept in the results
        values, cost = measure(func, tasks, idx)
        for i, v in values.items():
            results[i] = v
            done_here.add(i)
        report(len(values))
        sizes[k] = chunk_size(cost, kind_of.count(k), ex.threads)
    rest = [i for i in range(len(tasks)) if i not in done_here]
    sub_kinds = [kind_of[i] for i in rest]
    sub_group = None if group is None else [group[i] for i in rest]
    plan = [(k, [rest[j] for j in idx]) for k, idx in plan_chunks(len(rest), sizes, sub_kinds, sub_group)]
    chunks = [Chunk(_label(k, group, idx), "func", tuple(tasks[i] for i in idx)) for k, idx in plan]
    ex._stats = {"chunks": len(chunks), "sizes": {str(k): v for k, v in sizes.items()}}

    def place(c: int, values: list[Any]) -> None:
        for i, v in zip(plan[c][1], values, strict=True):
            results[i] = v
        report(len(values))

    run_chunks({"func": func}, chunks, place, ex, name)
    return results


def _label(kind: Hashable, group: Sequence[Any] | None, idx: list[int]) -> str:
    text = "task" if kind is None else str(kind)
    if group is not None and idx:
        lo, hi = group[idx[0]], group[idx[-1]]
        text += f"-y{lo}" if lo == hi else f"-y{lo}..{hi}"
    return text
