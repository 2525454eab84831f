"""From intervals of light to the events and per-division summaries people read.

Each :class:`~lightpath.light.sweep.LightInterval` becomes a
:class:`~lightpath.light.results.LightEvent`: its day at the site in local
apparent solar time (meaningful however uncertain ΔT is), its start and end in
UT and local apparent time, civil times in the site's time zone for 1900-2100,
the Sun at the peak, the nearest division of the year and ΔT with its σ.

Days of light are grouped in runs of consecutive local apparent days; each run
belongs to the division of the year nearest to it (distance 0 when the
division's day falls inside the run), and each division reports the span of
the runs that belong to it (:class:`~lightpath.light.results.DivisionLight`).

>>> int(local_day_number(2451545.0, 0.0, 12.0))    # noon at Greenwich, 2000-01-01
2451545
"""

from __future__ import annotations

import datetime as dt
from collections.abc import Sequence

import numpy as np
from numpy.typing import ArrayLike, NDArray

from lightpath.light.results import DivisionLight, LightEvent
from lightpath.light.sweep import LightInterval
from lightpath.sky.calendar import calendar_for, format_date
from lightpath.sky.instants import format_time_of_day

__all__ = ["CIVIL_YEARS", "civil_time", "division_runs", "light_events", "local_day_number", "nearest_division"]

#: Years for which civil times in the site's zone are given (the IANA database's rules are not history before).
CIVIL_YEARS = (1900, 2100)
_UNIX_EPOCH_JD = 2440587.5


def local_day_number(jd_ut: ArrayLike, longitude_deg: float, local_apparent_time_h: ArrayLike) -> NDArray:
    """Integer Julian day number of the local apparent solar day containing each instant.

    The day number D is the one whose local apparent midnight (D − 0.5 + LAT/24 = local instant) is nearest:
    D = round(jd_ut + longitude/360 + 0.5 − LAT/24), exact to within the equation of time (≤ 17 min).
    """
    local = np.asarray(jd_ut, float) + longitude_deg / 360.0 + 0.5 - np.asarray(local_apparent_time_h, float) / 24.0
    out = np.rint(local).astype(np.int64)
    return out[()] if out.ndim == 0 else out


def civil_time(jd_ut: float, timezone: str | None) -> str | None:
    """ISO 8601 civil time (minutes, with UTC offset) in ``timezone`` for 1900-2100, else None (UT1 ≈ UTC)."""
    if not timezone:
        return None
    from zoneinfo import ZoneInfo

    years = (float(jd_ut) - 2451545.0) / 365.25 + 2000.0
    if not CIVIL_YEARS[0] - 1 <= years <= CIVIL_YEARS[1] + 1:
        return None
    stamp = (float(jd_ut) - _UNIX_EPOCH_JD) * 86400.0
    utc = dt.datetime(1970, 1, 1, tzinfo=dt.UTC) + dt.timedelta(seconds=round(stamp))
    if not CIVIL_YEARS[0] <= utc.year <= CIVIL_YEARS[1]:
        return None
    return utc.astimezone(ZoneInfo(timezone)).isoformat(timespec="minutes")


def nearest_division(jd_tt: float, divisions: Sequence) -> tuple[str, float]:
    """(name, offset in days) of the division whose instant is nearest to ``jd_tt`` (offset = event − division)."""
    if not divisions:
        return "", float("nan")
    instants = np.array([d.jd_tt for d in divisions])
    i = int(np.argmin(np.abs(instants - jd_tt)))
    return divisions[i].name, float(jd_tt - instants[i])


def light_events(
    intervals: Sequence[LightInterval],
    sun,
    observer,
    divisions: Sequence,
    total_area_m2: float,
    calendar: str = "auto",
    ut_date_uncertain=None,
) -> list[LightEvent]:
    """LightEvents for ``intervals``: one call to ``sun`` for every start, end and peak."""
    if not intervals:
        return []
    n = len(intervals)
    t = np.array([[x.start_jd_tt, x.end_jd_tt, x.peak_jd_tt] for x in intervals]).ravel()
    pos = sun(t)
    jd_ut = np.asarray(pos.jd_ut).reshape(n, 3)
    lat_h = np.asarray(pos.local_apparent_time_h).reshape(n, 3)
    az = np.asarray(pos.azimuth_deg).reshape(n, 3)
    alt = np.asarray(pos.altitude_deg).reshape(n, 3)
    dts = np.asarray(pos.delta_t_s).reshape(n, 3)
    sig = np.asarray(pos.delta_t_sigma_s).reshape(n, 3)
    peak_day = local_day_number(jd_ut[:, 2], observer.longitude_deg, lat_h[:, 2])
    noon = peak_day.astype(float)  # JD of local apparent noon's day number (the date is that of D)
    dates = np.atleast_1d(format_date(noon, calendar))
    calendars = np.atleast_1d(calendar_for(noon, calendar))
    uncertain = np.zeros(n, bool) if ut_date_uncertain is None else np.atleast_1d(ut_date_uncertain(t[2::3]))
    starts = np.atleast_1d(format_time_of_day(lat_h[:, 0] / 24.0))
    ends = np.atleast_1d(format_time_of_day(lat_h[:, 1] / 24.0))
    out = []
    for i, x in enumerate(intervals):
        name, offset = nearest_division(x.peak_jd_tt, divisions)
        out.append(
            LightEvent(
                date=str(dates[i]),
                calendar=str(calendars[i]),
                start_jd_ut=float(jd_ut[i, 0]),
                end_jd_ut=float(jd_ut[i, 1]),
                peak_jd_ut=float(jd_ut[i, 2]),
                start_local_apparent=str(starts[i]),
                end_local_apparent=str(ends[i]),
                duration_min=float((x.end_jd_tt - x.start_jd_tt) * 1440.0),
                peak_area_m2=float(x.peak_area_m2),
                peak_fraction=float(x.peak_area_m2 / total_area_m2) if total_area_m2 > 0 else 0.0,
                sun_azimuth_deg=float(az[i, 2]),
                sun_altitude_deg=float(alt[i, 2]),
                nearest_division=name,
                offset_days=float(offset),
                delta_t_s=float(dts[i, 2]),
                delta_t_sigma_s=float(sig[i, 2]),
                start_civil=civil_time(jd_ut[i, 0], observer.timezone),
                end_civil=civil_time(jd_ut[i, 1], observer.timezone),
                ut_date_uncertain=bool(uncertain[i]),
            )
        )
    return out


def _runs(days: NDArray) -> list[tuple[int, int]]:
    days = np.unique(np.asarray(days, dtype=np.int64))
    if days.size == 0:
        return []
    breaks = np.flatnonzero(np.diff(days) > 1)
    first = np.concatenate([[0], breaks + 1])
    last = np.concatenate([breaks, [days.size - 1]])
    return [(int(days[a]), int(days[b])) for a, b in zip(first, last, strict=True)]


def division_runs(
    light_days: ArrayLike,
    divisions: Sequence,
    division_days: ArrayLike,
    report: Sequence[int],
    calendar: str = "auto",
) -> list[DivisionLight]:
    """Per-division runs of light days.

    Parameters
    ----------
    light_days : local apparent day numbers (integers) with at least one event, the sweep's margins included.
    divisions : every candidate division (this year's and its neighbours'), with ``name``, ``jd_tt``, ``date``.
    division_days : their local day numbers.
    report : indices into ``divisions`` to report (those of this year), in order.
    """
    runs = _runs(light_days)
    ddays = np.asarray(division_days, dtype=np.int64)
    owned: dict[int, list[tuple[int, int]]] = {}
    for a, b in runs:
        dist = np.where(ddays < a, a - ddays, np.where(ddays > b, ddays - b, 0))
        owned.setdefault(int(np.argmin(dist)), []).append((a, b))
    out = []
    for i in report:
        d = divisions[i]
        mine = owned.get(i, [])
        if mine:
            first = min(a for a, _ in mine)
            last = max(b for _, b in mine)
            days = sum(b - a + 1 for a, b in mine)
            out.append(
                DivisionLight(
                    d.scheme,
                    d.index,
                    d.name,
                    d.jd_tt,
                    d.date,
                    str(format_date(float(first), calendar)),
                    str(format_date(float(last), calendar)),
                    int(days),
                    float(first - ddays[i]),
                    float(last - ddays[i]),
                )
            )
        else:
            out.append(DivisionLight(d.scheme, d.index, d.name, d.jd_tt, d.date, None, None, 0))
    return out
