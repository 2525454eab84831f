"""Where does a sampled quantity rise above a threshold, and where does it fall back?

Generic event search, kept apart from the physics it searches: a function of
time sampled on a grid, the runs of samples above a threshold, and bisection of
each run's start and end on the function itself (vectorized over all crossings
at once).

>>> import numpy as np
>>> f = lambda t: np.sin(t)
>>> t = np.linspace(0.0, 10.0, 101)
>>> runs = runs_above(f(t), 0.0)
>>> [(round(float(t[a]), 6), round(float(t[b]), 6)) for a, b in runs]
[(0.1, 3.1), (6.3, 9.4)]
>>> starts, ends = refine_runs(f, t, runs, 0.0, tolerance=1e-6)
>>> [round(float(x), 5) for x in ends]          # π and 3π
[3.14159, 9.42478]

References
----------
Press, W. H., Teukolsky, S. A., Vetterling, W. T. & Flannery, B. P. (2007).
*Numerical Recipes*, 3rd ed., §9.1 (bracketing and bisection).
"""

from __future__ import annotations

import math
from collections.abc import Callable

import numpy as np
from numpy.typing import ArrayLike, NDArray

__all__ = ["bisect_crossings", "refine_runs", "runs_above"]


def runs_above(values: ArrayLike, threshold: float = 0.0) -> list[tuple[int, int]]:
    """Index runs ``(first, last)`` (inclusive) where ``values > threshold``.

    >>> runs_above([0, 1, 2, 0, 0, 3], 0.5)
    [(1, 2), (5, 5)]
    """
    above = np.asarray(values) > threshold
    if above.size == 0:
        return []
    edges = np.diff(np.concatenate([[0], above.astype(np.int8), [0]]))
    starts = np.flatnonzero(edges == 1)
    ends = np.flatnonzero(edges == -1) - 1
    return list(zip(starts.tolist(), ends.tolist(), strict=True))


def bisect_crossings(
    is_above: Callable[[NDArray], NDArray],
    below_t: ArrayLike,
    above_t: ArrayLike,
    tolerance: float,
) -> NDArray:
    """Bisect brackets between a time where the condition is false and one where it is true.

    Parameters
    ----------
    is_above : vectorized condition, array of times → bool array.
    below_t, above_t : (K,) bracket ends, condition false at ``below_t`` and true at ``above_t``
        (either order in time: starts and ends alike).
    tolerance : stop when brackets are shorter than this (same unit as the times).

    Returns
    -------
    (K,) the last tested time on the true side of each bracket (so it still meets the condition).
    """
    lo = np.array(below_t, dtype=np.float64)
    hi = np.array(above_t, dtype=np.float64)
    if lo.size == 0:
        return hi
    width = float(np.max(np.abs(hi - lo)))
    steps = max(0, int(math.ceil(math.log2(width / tolerance)))) if width > tolerance else 0
    for _ in range(steps):
        mid = 0.5 * (lo + hi)
        ok = np.asarray(is_above(mid), dtype=bool)
        hi = np.where(ok, mid, hi)
        lo = np.where(ok, lo, mid)
    return hi


def refine_runs(
    f: Callable[[NDArray], NDArray],
    t: ArrayLike,
    runs: list[tuple[int, int]],
    threshold: float,
    tolerance: float,
) -> tuple[NDArray, NDArray]:
    """Refined start and end times of ``runs`` (from :func:`runs_above` on ``f(t)``).

    A run that begins at the first sample (or ends at the last) is not refined
    on that side: there is no bracket.  Returns (starts, ends), each (len(runs),).
    """
    t = np.asarray(t, dtype=np.float64)
    if not runs:
        return np.array([]), np.array([])
    first = np.array([a for a, _ in runs])
    last = np.array([b for _, b in runs])
    starts, ends = t[first].copy(), t[last].copy()

    def cond(x):
        return np.asarray(f(x)) > threshold

    s = first > 0
    if s.any():
        starts[s] = bisect_crossings(cond, t[first[s] - 1], t[first[s]], tolerance)
    e = last < len(t) - 1
    if e.any():
        ends[e] = bisect_crossings(cond, t[last[e] + 1], t[last[e]], tolerance)
    return starts, ends
