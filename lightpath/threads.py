"""Share elementwise array work between a few threads.

numpy's ufuncs and ERFA's functions release Python's global lock while they
loop over an array, so a long array cut into pieces runs on several cores at
once.  :func:`split_map` does that for functions that treat each element on
its own (a series summed at each instant, a Chebyshev series evaluated at each
instant): the result is bit-for-bit the one a single call would give, whatever
the number of threads.

How many threads: the environment variable ``LIGHTPATH_THREADS`` if set, else
the machine's cores (at most 8).  ``set_thread_count(1)`` turns threading off
in this process; pool workers (:mod:`lightpath.study.execution`) get
``LIGHTPATH_THREADS=1`` so that N workers use N cores, not N × cores.  Arrays
shorter than ``min_chunk`` per thread are done in the calling thread, and a
call made from inside a worker thread never splits again (no nested pools).

>>> import numpy as np
>>> x = np.linspace(0.0, 10.0, 100_001)
>>> bool(np.array_equal(split_map(np.cos, x, min_chunk=1000), np.cos(x)))
True
>>> split_map(lambda a, b: a + b, np.arange(3), np.arange(3)).tolist()
[0, 2, 4]
"""

from __future__ import annotations

import contextvars
import os
import threading
from collections.abc import Callable
from concurrent.futures import ThreadPoolExecutor

import numpy as np
from numpy.typing import NDArray

__all__ = ["THREAD_ENV", "set_thread_count", "split_map", "thread_count"]

#: Environment variable holding the number of threads (a positive integer).
THREAD_ENV = "LIGHTPATH_THREADS"
_MAX_DEFAULT = 8
_MIN_CHUNK = 32768

_override: int | None = None
_pool: ThreadPoolExecutor | None = None
_pool_key: tuple[int, int] | None = None  # (pid, threads) the pool was made for
_lock = threading.Lock()
_local = threading.local()


def thread_count() -> int:
    """Threads :func:`split_map` may use: ``set_thread_count``, else ``$LIGHTPATH_THREADS``, else the cores.

    A value of ``LIGHTPATH_THREADS`` that is not a positive integer counts as 1.
    """
    if _override is not None:
        return _override
    text = os.environ.get(THREAD_ENV)
    if text is not None:
        try:
            return max(1, int(text))
        except ValueError:
            return 1
    return max(1, min(os.cpu_count() or 1, _MAX_DEFAULT))


def set_thread_count(n: int | None) -> None:
    """Use ``n`` threads in this process from now on (1 = no threading; None = back to the default)."""
    global _override
    _override = None if n is None else max(1, int(n))


def _executor(threads: int) -> ThreadPoolExecutor:
    """The process's pool of ``threads`` threads (made again after a fork or a change of count)."""
    global _pool, _pool_key
    key = (os.getpid(), threads)
    with _lock:
        if _pool is None or _pool_key != key:
            # a pool inherited through fork has no live threads: never reuse it in the child
            _pool = ThreadPoolExecutor(max_workers=threads, thread_name_prefix="lightpath", initializer=_mark)
            _pool_key = key
        return _pool


def _mark() -> None:
    _local.inside = True


def split_map(func: Callable[..., NDArray], *arrays: NDArray, min_chunk: int = _MIN_CHUNK) -> NDArray:
    """``func(*arrays)`` computed on contiguous pieces of the arrays' first axis in parallel threads.

    ``func`` must treat each index of the first axis on its own and return an array whose first
    axis matches; the pieces are joined in order.  All ``arrays`` share their first length.
    """
    n = len(arrays[0])
    threads = thread_count()
    pieces = min(threads, n // max(1, int(min_chunk)))
    if pieces <= 1 or getattr(_local, "inside", False):
        return func(*arrays)
    bounds = np.linspace(0, n, pieces + 1).astype(int)
    parts = [tuple(a[lo:hi] for a in arrays) for lo, hi in zip(bounds[:-1], bounds[1:], strict=True)]
    # each piece runs in a copy of the caller's context, so numpy's errstate (a context variable) holds there too
    context = contextvars.copy_context()
    results = list(_executor(threads).map(lambda args: context.copy().run(func, *args), parts))
    return np.concatenate(results, axis=0)
