"""A study's chunks on a dask cluster: connect, check the workers, scatter, gather, release.

- :func:`connect` asks the address who it is before anything else (an overall timeout, so an address
  that answers but is no scheduler fails in seconds with one line), waits for a first worker, and
  compares every worker with this process (:func:`check_workers`): lightpath installed, the same
  version and code (a digest of its source files), the same numpy.  A worker that differs is named.
- :func:`run_on_dask` scatters each shared callable (a sky window) once to every worker, submits the
  chunks with readable names (``lightpath-frame-survey-y-1499-00003-<run>``), takes them as they
  complete, resubmits chunks whose workers were lost, ends with one line when every worker is gone,
  cancels what is running on Ctrl-C, and releases every key it made.

References
----------
Rocklin, M. (2015). Dask: parallel computation with blocked algorithms and task scheduling.
*Proceedings of the 14th Python in Science Conference*, 130-136.
"""

from __future__ import annotations

import hashlib
import os
import queue
import sys
import time
import uuid
from collections.abc import Callable, Sequence
from concurrent.futures import CancelledError
from functools import lru_cache
from pathlib import Path
from typing import Any

from lightpath.study.execution import IN_FLIGHT_PER_THREAD, Chunk, ClusterError, Execution

__all__ = ["check_workers", "code_digest", "connect", "relax_malloc_trim", "run_on_dask"]

#: glibc's mallopt parameters (malloc.h) and its largest dynamic mmap threshold on 64-bit systems.
_M_TRIM_THRESHOLD, _M_MMAP_THRESHOLD = -1, -3
_MMAP_THRESHOLD_MAX = 32 * 1024 * 1024


def relax_malloc_trim() -> bool:
    """When ``MALLOC_TRIM_THRESHOLD_`` is set (dask's nanny sets 65536), restore large-array reuse.

    Sets glibc's mmap threshold to its dynamic maximum (32 MiB) and the trim threshold to twice that,
    as glibc itself would after the first large free.  Returns whether it did anything (Linux, glibc).
    """
    if "MALLOC_TRIM_THRESHOLD_" not in os.environ or not sys.platform.startswith("linux"):
        return False
    try:
        import ctypes

        libc = ctypes.CDLL("libc.so.6")
        ok = libc.mallopt(_M_MMAP_THRESHOLD, _MMAP_THRESHOLD_MAX) == 1
        return ok and libc.mallopt(_M_TRIM_THRESHOLD, 2 * _MMAP_THRESHOLD_MAX) == 1
    except (OSError, AttributeError):
        return False


@lru_cache(maxsize=1)
def code_digest() -> str:
    """SHA-256 (first 16 hex digits) of lightpath's Python source files: equal code, equal digest."""
    root = Path(__file__).resolve().parents[1]
    h = hashlib.sha256()
    for path in sorted(root.rglob("*.py")):
        h.update(str(path.relative_to(root)).encode())
        h.update(path.read_bytes())
    return h.hexdigest()[:16]


def _identity(address: str, timeout_s: float) -> dict:
    """The answer of ``address`` to dask's ``identity`` call, within ``timeout_s`` seconds overall."""
    import asyncio
    from concurrent.futures import ThreadPoolExecutor
    from concurrent.futures import TimeoutError as FutureTimeout

    async def ask() -> dict:
        from distributed.comm import connect as comm_connect

        comm = await comm_connect(address, timeout=timeout_s)
        try:
            await comm.write({"op": "identity", "reply": True})
            return await comm.read()
        finally:
            await comm.close()

    async def bounded() -> dict:
        return await asyncio.wait_for(ask(), timeout_s)

    pool = ThreadPoolExecutor(1)  # its own event loop: works inside notebooks too
    try:
        return pool.submit(asyncio.run, bounded()).result(timeout_s + 2.0)
    except (FutureTimeout, TimeoutError):
        msg = f"--cluster: {address!r} did not answer as a dask scheduler within {timeout_s:g} s"
        raise ClusterError(msg) from None
    except (OSError, EOFError) as exc:
        raise ClusterError(f"--cluster: nothing answers at {address!r} ({type(exc).__name__})") from None
    except (ValueError, TypeError, KeyError) as exc:
        raise ClusterError(
            f"--cluster: {address!r} is not a dask scheduler address (tcp://host:port): {' '.join(str(exc).split())}"
        ) from None
    except Exception as exc:  # noqa: BLE001 - anything else the address answers is not a scheduler
        raise ClusterError(f"--cluster: {address!r} is not a dask scheduler ({type(exc).__name__})") from None
    finally:
        pool.shutdown(wait=False)


def connect(address: str, timeout_s: float = 10.0):
    """A checked ``dask.distributed.Client`` for the scheduler at ``address`` (``tcp://host:8786``).

    Raises :class:`~lightpath.study.execution.ClusterError` (one line naming ``--cluster``) when
    dask.distributed is missing, the address is no scheduler or does not answer in ``timeout_s``,
    no worker joins in ``timeout_s``, or a worker differs from this process (:func:`check_workers`).
    """
    try:
        from distributed import Client
    except ImportError:
        raise ClusterError("--cluster: dask.distributed is not installed (pip install 'lightpath[cluster]')") from None
    address = str(address)
    who = _identity(address if "://" in address else f"tcp://{address}", timeout_s)
    if not isinstance(who, dict) or who.get("type") != "Scheduler":
        kind = who.get("type") if isinstance(who, dict) else type(who).__name__
        raise ClusterError(f"--cluster: {address!r} answers but is not a dask scheduler (it is a {kind})")
    try:
        client = Client(address, timeout=timeout_s, set_as_default=False)
    except (OSError, TimeoutError, ValueError) as exc:
        msg = f"--cluster: cannot connect to the dask scheduler at {address!r} ({type(exc).__name__})"
        raise ClusterError(msg) from None
    try:
        try:
            client.wait_for_workers(1, timeout=timeout_s)
        except (TimeoutError, OSError):
            msg = f"--cluster: the scheduler at {address!r} has no workers (waited {timeout_s:g} s)"
            raise ClusterError(msg) from None
        check_workers(client)
    except BaseException:
        client.close()
        raise
    return client


def check_workers(client) -> None:
    """Refuse (one line naming the worker) a worker without lightpath, or with another lightpath or numpy."""
    import importlib.metadata

    import numpy

    mine = {"lightpath": importlib.metadata.version("lightpath"), "numpy": numpy.__version__}
    info = client.get_versions(packages=list(mine))
    python = ".".join(map(str, sys.version_info[:2]))
    for worker, versions in sorted(info.get("workers", {}).items()):
        packages = (versions or {}).get("packages", {})
        if not packages.get("lightpath"):
            raise ClusterError(f"--cluster: worker {worker} has no lightpath installed; install lightpath "
                               f"{mine['lightpath']} in the workers' environment or leave that worker out")  # fmt: skip
        for name, value in mine.items():
            if packages.get(name) != value:
                raise ClusterError(f"--cluster: worker {worker} has {name} {packages.get(name)}, this process "
                                   f"{value}; use the same environment on every worker")  # fmt: skip
        theirs = ".".join(str(packages.get("python", "")).split(".")[:2])
        if theirs and theirs != python:
            raise ClusterError(f"--cluster: worker {worker} runs Python {theirs}, this process {python}")
    digests = client.run(code_digest, on_error="return")
    for worker, digest in sorted(digests.items()):
        if digest != code_digest():
            theirs = digest if isinstance(digest, str) else "unavailable"
            raise ClusterError(
                f"--cluster: worker {worker} runs other lightpath code (source digest {theirs}, here {code_digest()})"
            )


def _lost(exc: BaseException) -> bool:
    """Whether a chunk failed because its worker went away (then it is worth resubmitting)."""
    from distributed import KilledWorker
    from distributed.comm import CommClosedError

    return isinstance(exc, KilledWorker | CommClosedError | ConnectionError | CancelledError)


def run_on_dask(
    shared: dict[str, Any],
    chunks: Sequence[Chunk],
    on_done: Callable[[int, list[Any]], Any],
    execution: Execution,
    name: str,
) -> None:
    """:func:`lightpath.study.execution.run_chunks` on ``execution.client``."""
    from lightpath.study.execution import apply_chunk

    finished: queue.Queue = queue.Queue()

    client = execution.client
    run = uuid.uuid4().hex[:8]
    remaining = {key: 0 for key in shared}
    for chunk in chunks:
        remaining[chunk.shared] += 1
    scattered: dict[str, Any] = {}
    pending: dict[Any, tuple[int, int]] = {}  # future → (chunk, attempt)
    limit = IN_FLIGHT_PER_THREAD * execution.threads
    todo = iter(range(len(chunks)))
    execution._stats["bytes_per_task"] = 0

    def submit(i: int, attempt: int) -> None:
        chunk = chunks[i]
        if chunk.shared not in scattered:  # once per worker, when its first chunk goes out
            scattered[chunk.shared] = client.scatter(shared[chunk.shared], broadcast=True, hash=False)
        key = f"lightpath-{name}-{chunk.label}-{i:05d}-{run}" + (f"-retry{attempt}" if attempt else "")
        future = client.submit(apply_chunk, scattered[chunk.shared], chunk.tasks, key=key)
        pending[future] = (i, attempt)
        future.add_done_callback(finished.put)  # called in the client's thread as each chunk ends

    def fill() -> None:
        for i in todo:
            submit(i, 0)
            if len(pending) >= limit:
                break

    no_workers_since: float | None = None
    try:
        fill()
        while pending:
            try:
                done = [finished.get(timeout=1.0)]
            except queue.Empty:
                done = []
            if not done:
                if client.nthreads():
                    no_workers_since = None
                elif no_workers_since is None:
                    no_workers_since = time.monotonic()
                elif time.monotonic() - no_workers_since > execution.no_workers_timeout_s:
                    raise ClusterError(f"--cluster: every worker of {client.scheduler.address} is gone "
                                       f"({len(pending)} chunks left); start workers and run again")  # fmt: skip
                continue
            while not finished.empty():
                done.append(finished.get())
            for future in done:
                if future not in pending:
                    continue
                i, attempt = pending.pop(future)
                if future.status == "finished":
                    values = future.result()
                    future.release()
                    on_done(i, values)
                    key = chunks[i].shared
                    remaining[key] -= 1
                    if remaining[key] == 0 and key in scattered:
                        scattered.pop(key).release()
                    continue
                try:
                    exc = future.exception()
                except CancelledError as cancelled:  # cancelled by someone else: run it again
                    exc = cancelled
                future.release()
                if _lost(exc) and attempt < execution.retries:
                    submit(i, attempt + 1)
                elif _lost(exc):
                    raise ClusterError(
                        f"--cluster: chunk {chunks[i].label} was lost with its workers {attempt + 1} times "
                        f"({type(exc).__name__}); check the workers' memory"
                    )
                else:
                    raise exc
            fill()
    except BaseException:  # Ctrl-C, a lost cluster, a task's error: nothing keeps computing
        if pending:
            client.cancel(list(pending), force=True)
        raise
    finally:
        for future in list(pending) + list(scattered.values()):
            future.release()
        pending.clear()
        scattered.clear()
