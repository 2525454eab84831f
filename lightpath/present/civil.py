"""Universal Time ↔ civil clock time in an IANA time zone, daylight saving included.

Instants inside lightpath are Julian dates; people planning a visit read clocks.
This module turns a Julian date in UT into an aware :class:`datetime.datetime`
in the site's zone (via the standard library's :mod:`zoneinfo`, which reads the
IANA tz database, shipped as the ``tzdata`` package where the system has none)
and back.

UT here is UT1; civil clocks follow UTC, which stays within 0.9 s of UT1 by
definition (leap seconds), far below the minute the results are shown to.
Python's :mod:`datetime` covers the proleptic Gregorian years 1..9999 only, and
time zones before the late 19th century were local mean time, so civil time is
offered for modern dates (see :data:`CIVIL_FIRST_YEAR`); ancient results are
given in UT and local apparent solar time instead.

>>> dt = civil_datetime(2461072.5, "Europe/Dublin")   # 2026-02-01 00:00 UT
>>> dt.isoformat()
'2026-02-01T00:00:00+00:00'
>>> civil_datetime(2460857.5, "Europe/Dublin").isoformat()  # 2025-07-01 00:00 UT, summer time
'2025-07-01T01:00:00+01:00'

References
----------
IANA Time Zone Database (tz), https://www.iana.org/time-zones, read through
Python's :mod:`zoneinfo` (PEP 615, 2020).
"""

from __future__ import annotations

import datetime as _dt
import math
from zoneinfo import ZoneInfo, ZoneInfoNotFoundError

import numpy as np
from numpy.typing import ArrayLike

from lightpath.errors import InputError

__all__ = [
    "CIVIL_FIRST_YEAR",
    "UNIX_EPOCH_JD",
    "civil_datetime",
    "civil_iso",
    "has_civil_time",
    "jd_from_datetime",
    "jd_from_local_date",
    "parse_local_date",
    "time_zone",
    "utc_datetime",
]

#: Julian date of 1970-01-01 00:00 UTC.
UNIX_EPOCH_JD = 2440587.5

#: First year for which results are also given in civil time (standard time zones were adopted
#: from the 1880s on; before that the IANA database gives local mean time).
CIVIL_FIRST_YEAR = 1900

_JD_MIN = 2415020.5  # 1900-01-01 00:00 UT
_JD_MAX = 5373484.5  # 9999-12-31 00:00 UT, the end of Python's datetime range


def time_zone(name: str, option: str = "timezone") -> ZoneInfo:
    """The :class:`zoneinfo.ZoneInfo` for an IANA name, or :class:`InputError` naming ``option``.

    >>> time_zone("America/New_York").key
    'America/New_York'
    """
    try:
        return ZoneInfo(str(name))
    except (ZoneInfoNotFoundError, ValueError, TypeError):
        raise InputError(
            f"{option}: {name!r} is not an IANA time zone name (e.g. Europe/Dublin, America/New_York, UTC)"
        ) from None


def has_civil_time(jd_ut: ArrayLike) -> np.ndarray | bool:
    """True where a Julian date (UT) lies in the span given in civil time (1900 to 9999).

    >>> has_civil_time(2461072.5), has_civil_time(1000000.0)
    (True, False)
    """
    jd = np.asarray(jd_ut, dtype=np.float64)
    out = np.isfinite(jd) & (jd >= _JD_MIN) & (jd < _JD_MAX)
    return bool(out) if out.ndim == 0 else out


def utc_datetime(jd_ut: float) -> _dt.datetime:
    """An aware UTC :class:`datetime.datetime` for a Julian date in UT, rounded to the second.

    >>> utc_datetime(2451545.0).isoformat()
    '2000-01-01T12:00:00+00:00'
    """
    jd = float(jd_ut)
    if not has_civil_time(jd):
        raise InputError(f"Julian date {jd!r} is outside the civil-time span {CIVIL_FIRST_YEAR}..9999")
    seconds = round((jd - UNIX_EPOCH_JD) * 86400.0)
    return _dt.datetime(1970, 1, 1, tzinfo=_dt.UTC) + _dt.timedelta(seconds=seconds)


def civil_datetime(jd_ut: float, timezone: str | ZoneInfo) -> _dt.datetime:
    """The civil clock time in ``timezone`` (IANA name) at a Julian date in UT, daylight-saving aware."""
    zone = timezone if isinstance(timezone, ZoneInfo) else time_zone(timezone)
    return utc_datetime(jd_ut).astimezone(zone)


def civil_iso(jd_ut: ArrayLike, timezone: str | ZoneInfo | None) -> list[str | None]:
    """ISO 8601 civil times with their UTC offset, one per Julian date (UT); ``None`` outside 1900..9999.

    Without a time zone the times are given in UTC (``+00:00``).

    New York's clocks went forward at 2025-03-09 02:00 EST (07:00 UT):

    >>> civil_iso([2460743.75, 2460744.25, 1000000.0], "America/New_York")
    ['2025-03-09T01:00:00-05:00', '2025-03-09T14:00:00-04:00', None]
    """
    zone: str | ZoneInfo = timezone if timezone is not None else "UTC"
    zone = zone if isinstance(zone, ZoneInfo) else time_zone(zone)
    values = np.atleast_1d(np.asarray(jd_ut, dtype=np.float64))
    ok = np.atleast_1d(has_civil_time(values))
    return [civil_datetime(jd, zone).isoformat() if good else None for jd, good in zip(values, ok, strict=True)]


def jd_from_datetime(moment: _dt.datetime) -> float:
    """Julian date (UT) of an aware :class:`datetime.datetime` (naive ones are refused).

    >>> jd_from_datetime(_dt.datetime(2000, 1, 1, 12, tzinfo=_dt.UTC))
    2451545.0
    """
    if moment.tzinfo is None or moment.utcoffset() is None:
        raise InputError(f"time {moment.isoformat()} has no time zone")
    delta = moment.astimezone(_dt.UTC) - _dt.datetime(1970, 1, 1, tzinfo=_dt.UTC)
    return UNIX_EPOCH_JD + delta.total_seconds() / 86400.0


def parse_local_date(text: str, option: str = "date") -> _dt.date:
    """A civil date ``YYYY-MM-DD`` (Gregorian, 1900..9999), or :class:`InputError` naming ``option``.

    >>> parse_local_date("2027-02-01")
    datetime.date(2027, 2, 1)
    """
    try:
        value = _dt.date.fromisoformat(str(text).strip())
    except ValueError:
        raise InputError(f"{option}: {text!r} is not a date YYYY-MM-DD (Gregorian calendar)") from None
    if value.year < CIVIL_FIRST_YEAR:
        raise InputError(f"{option}: {text!r} is before {CIVIL_FIRST_YEAR}; civil dates are for modern visits")
    return value


def jd_from_local_date(day: _dt.date, timezone: str | ZoneInfo | None, hour: float = 0.0) -> float:
    """Julian date (UT) of ``hour`` o'clock (civil) on a civil date in ``timezone`` (UTC when None).

    A wall-clock time skipped by a spring-forward change is read with the offset before it
    (``fold=0``, as :mod:`zoneinfo` does).

    >>> round(jd_from_local_date(_dt.date(2025, 7, 1), "Europe/Dublin"), 6)  # 2025-06-30 23:00 UT
    2460857.458333
    >>> round(jd_from_local_date(_dt.date(2025, 3, 9), "America/New_York", hour=12.0), 6)  # 16:00 UT (EDT)
    2460744.166667
    """
    zone: str | ZoneInfo = timezone if timezone is not None else "UTC"
    zone = zone if isinstance(zone, ZoneInfo) else time_zone(zone)
    if not (math.isfinite(hour) and 0.0 <= hour <= 24.0):
        raise InputError(f"hour {hour!r} is outside 0..24")
    wall = _dt.datetime(day.year, day.month, day.day, tzinfo=zone) + _dt.timedelta(hours=hour)  # wall-clock sum
    return jd_from_datetime(wall)
