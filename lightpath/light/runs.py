"""Days of light, runs of days and the one rule that gives each run its division of the year.

The day convention of every result is the **local apparent day** at the site: the day
number D (an integer Julian day number, whose noon is local apparent noon) of the local
apparent solar day that contains an instant
(:func:`lightpath.sky.instants.local_apparent_day_number`, re-exported here).

A **light run** is a maximal stretch of consecutive local apparent days with light
(:func:`runs_of_days`).  Each run belongs to one division of the year (:func:`assign_runs`):
the division whose day lies inside the run (the one nearest the run's middle when several do),
or else the division whose day is nearest the run's middle (the earlier one on a tie).  Every
day of the run then carries that division and its own offset in days from the division's day.
``docs/divisions.md`` states the rule.

>>> runs_of_days([10, 11, 12, 20, 21]).tolist()
[[10, 12], [20, 21]]
>>> assign_runs([[10, 12], [20, 21]], [11, 28]).tolist()
[0, 1]
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np
from numpy.typing import ArrayLike, NDArray

from lightpath.sky.instants import local_apparent_day_number

__all__ = ["DivisionRuns", "assign_runs", "division_runs", "local_apparent_day_number", "runs_of_days"]


def runs_of_days(days: ArrayLike) -> NDArray:
    """(R, 2) int64: first and last day of each maximal run of consecutive days, in order."""
    d = np.unique(np.asarray(days, dtype=np.int64))
    if d.size == 0:
        return np.zeros((0, 2), np.int64)
    breaks = np.flatnonzero(np.diff(d) > 1)
    first = np.concatenate([[0], breaks + 1])
    last = np.concatenate([breaks, [d.size - 1]])
    return np.stack([d[first], d[last]], axis=1)


def assign_runs(runs: ArrayLike, division_days: ArrayLike) -> NDArray:
    """(R,) index of the division each run belongs to (see the module notes); −1 when there are no divisions.

    Parameters
    ----------
    runs : (R, 2) first and last day of each run (integer day numbers).
    division_days : (K,) the divisions' local apparent days.
    """
    r = np.asarray(runs, dtype=np.int64).reshape(-1, 2)
    dd = np.asarray(division_days, dtype=np.int64).reshape(-1)
    if dd.size == 0 or r.shape[0] == 0:
        return np.full(r.shape[0], -1, np.int64)
    middle2 = (r[:, 0] + r[:, 1])[:, None]  # twice the middle, to stay in integers
    distance2 = np.abs(2 * dd[None, :] - middle2)
    inside = (dd[None, :] >= r[:, :1]) & (dd[None, :] <= r[:, 1:])
    # inside beats outside; then the nearest to the middle; argmin takes the earlier division on a tie
    score = distance2 + np.where(inside, 0, 4 * (int(np.ptp(dd)) + int(r.max() - r.min()) + 2))
    return np.argmin(score, axis=1).astype(np.int64)


@dataclass(frozen=True)
class DivisionRuns:
    """The light runs of each division, as day numbers and offsets from the division's day.

    Arrays have one row per division: ``first_day``/``last_day`` are the first and last lit day of
    its runs (−1 when none), ``days`` the count of lit days in them, ``nearest_offset`` the offset of
    its lit day nearest the division's day (the earlier on a tie; nan when none), ``first_offset``
    and ``last_offset`` the offsets of the first and last day (nan when none).
    """

    division_day: NDArray
    first_day: NDArray
    last_day: NDArray
    days: NDArray
    nearest_offset: NDArray
    first_offset: NDArray
    last_offset: NDArray

    def offsets(self) -> NDArray:
        """(K, 3) float: nearest, first and last offsets in days (nan where a division has no light)."""
        return np.stack([self.nearest_offset, self.first_offset, self.last_offset], axis=1)


def division_runs(runs: ArrayLike, owner: ArrayLike, division_days: ArrayLike) -> DivisionRuns:
    """Gather runs per division.

    Parameters
    ----------
    runs : (R, 2) first and last days of the runs.
    owner : (R,) division index of each run (:func:`assign_runs`).
    division_days : (K,) the divisions' local apparent days.
    """
    r = np.asarray(runs, dtype=np.int64).reshape(-1, 2)
    own = np.asarray(owner, dtype=np.int64).reshape(-1)
    dd = np.asarray(division_days, dtype=np.int64).reshape(-1)
    k = dd.size
    first = np.full(k, -1, np.int64)
    last = np.full(k, -1, np.int64)
    days = np.zeros(k, np.int64)
    nearest = np.full(k, np.nan)
    for i in range(k):  # a handful of divisions and runs: clearer than a scatter
        mine = r[own == i]
        if mine.size == 0:
            continue
        first[i], last[i] = mine[:, 0].min(), mine[:, 1].max()
        days[i] = int((mine[:, 1] - mine[:, 0] + 1).sum())
        closest = np.clip(dd[i], mine[:, 0], mine[:, 1]) - dd[i]  # per run: offset of its day nearest the division
        score = np.abs(closest) * 2 + (closest > 0)
        nearest[i] = float(closest[np.argmin(score)])
    has = days > 0
    first_off = np.where(has, first - dd, np.nan)
    last_off = np.where(has, last - dd, np.nan)
    return DivisionRuns(dd, first, last, days, nearest, first_off.astype(float), last_off.astype(float))
