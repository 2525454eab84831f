"""Instants and years as a notebook holds them → Julian dates and astronomical years.

An instant may be given as

- a Julian date (a number, or an array of numbers) on the time scale the function names (UT for
  :func:`to_jd_ut`, TT for :func:`to_jd_tt`);
- a :class:`datetime.datetime` (a ``pandas.Timestamp`` too) with a time zone, or without one meaning UT, or a
  :class:`datetime.date` (00:00 UT); Python's dates are proleptic Gregorian;
- a :class:`numpy.datetime64` (or an array of them): UT, proleptic Gregorian;
- a skyfield ``Time`` (its UT1);
- a string in one of the forms of :mod:`lightpath.sky.instants`, e.g. ``"2500 BC-02-20T07:10 LAT"``
  (local apparent time needs the site: pass ``observer``).

UT becomes TT through the ΔT model (Morrison & Stephenson 2004 beyond the tabulated span) unless
``delta_t_s`` fixes it.  UTC is taken as UT1 (they differ by less than 0.9 s).  A year may be an integer
(astronomical numbering, 0 = 1 BC) or a string such as ``"2500 BC"``.

>>> import datetime as dt
>>> to_jd_ut(dt.datetime(2000, 1, 1, 12, tzinfo=dt.UTC))
2451545.0
>>> to_jd_ut(np.datetime64("2000-01-01T12:00")) == to_jd_ut("2000-01-01T12:00")
True
>>> to_year("2500 BC"), to_year(2027)
(-2499, 2027)

References
----------
Meeus, J. (1998). *Astronomical Algorithms*, 2nd ed., ch. 7 (Julian day).
Morrison, L. V. & Stephenson, F. R. (2004). Historical values of the Earth's clock error ΔT. *J. Hist. Astron.* 35, 327.
"""

from __future__ import annotations

import datetime as _dt
from typing import Any

import numpy as np
from numpy.typing import NDArray

from lightpath.errors import InputError
from lightpath.sky import deltat as _deltat
from lightpath.sky.calendar import year_from_label
from lightpath.sky.instants import ACCEPTED_FORMS, parse_instant, resolve_instant

__all__ = ["to_jd_tt", "to_jd_ut", "to_year"]

_ORDINAL_JD = 1721424.5  # JD of 0001-01-01 00:00 (proleptic Gregorian), date.toordinal() == 1
_UNIX_EPOCH_JD = 2440587.5  # 1970-01-01 00:00
_FORMS = f"a Julian date, a datetime/date, numpy.datetime64, a skyfield Time or a string ({ACCEPTED_FORMS})"


def _from_datetime(value: _dt.date) -> float:
    if isinstance(value, _dt.datetime):
        if value.tzinfo is not None and value.utcoffset() is not None:
            value = value.astimezone(_dt.UTC)
        seconds = value.hour * 3600 + value.minute * 60 + value.second + value.microsecond / 1e6
        nanos = getattr(value, "nanosecond", 0)  # pandas.Timestamp
        return value.toordinal() + _ORDINAL_JD + (seconds + nanos * 1e-9) / 86400.0
    return value.toordinal() + _ORDINAL_JD


def _from_datetime64(value) -> float | NDArray:
    ns = np.asarray(value).astype("datetime64[ns]").astype(np.int64)
    jd = _UNIX_EPOCH_JD + ns / 86_400e9
    return float(jd) if np.ndim(jd) == 0 else jd


def _instant(value: Any, scale: str, observer, source: str, delta_t_s: float | None, what: str):
    """(JD, scale of that JD: "UT" or "TT")."""
    if isinstance(value, str):
        parsed = parse_instant(value, what=what)
        if parsed.scale == "LAT":
            return resolve_instant(parsed, observer, source=source, delta_t_s=delta_t_s), "TT"
        return parsed.jd, parsed.scale
    if isinstance(value, _dt.date):
        return _from_datetime(value), "UT"
    if isinstance(value, np.datetime64) or (isinstance(value, np.ndarray) and value.dtype.kind == "M"):
        return _from_datetime64(value), "UT"
    if hasattr(value, "ut1") and hasattr(value, "tt") and hasattr(value, "ts"):  # skyfield Time
        return value.ut1, "UT"
    if isinstance(value, bool):
        raise InputError(f"{what}: {value!r} is not an instant; accepted: {_FORMS}")
    try:
        jd = np.asarray(value, dtype=np.float64)
    except (TypeError, ValueError):
        raise InputError(f"{what}: {value!r} is not an instant; accepted: {_FORMS}") from None
    if not np.all(np.isfinite(jd)):
        raise InputError(f"{what}: {value!r} is not a finite Julian date")
    return (float(jd) if jd.ndim == 0 else jd), scale


def to_jd_tt(
    value: Any, observer=None, *, source: str = "auto", delta_t_s: float | None = None, what: str = "instant"
) -> float | NDArray:
    """The instant ``value`` (see the module notes; a number is a JD in TT) as JD TT, days.

    >>> import datetime as dt
    >>> round((to_jd_tt(dt.datetime(2000, 1, 1, 12, tzinfo=dt.UTC), delta_t_s=64.0) - 2451545.0) * 86400.0, 3)
    64.0
    """
    jd, scale = _instant(value, "TT", observer, source, delta_t_s, what)
    if scale == "TT":
        return jd
    tt = _deltat.tt_from_ut(jd, delta_t_s)
    return float(tt) if np.ndim(tt) == 0 else np.asarray(tt)


def to_jd_ut(
    value: Any, observer=None, *, source: str = "auto", delta_t_s: float | None = None, what: str = "instant"
) -> float | NDArray:
    """The instant ``value`` (see the module notes; a number is a JD in UT) as JD UT1, days.

    >>> to_jd_ut(2451545.0), to_jd_ut("JD2451545.0")
    (2451545.0, 2451545.0)
    """
    jd, scale = _instant(value, "UT", observer, source, delta_t_s, what)
    if scale == "UT":
        return jd
    ut = _deltat.ut_from_tt(jd, delta_t_s)
    return float(ut) if np.ndim(ut) == 0 else np.asarray(ut)


def to_year(value: Any, what: str = "year") -> int:
    """A year as an integer (astronomical numbering) or a label (``"2500 BC"``, ``"AD 33"``) → astronomical year."""
    if isinstance(value, bool):
        raise InputError(f"{what}: {value!r} is not a year (e.g. 2027, -2599, '2600 BC')")
    if isinstance(value, int | np.integer):
        return int(value)
    if isinstance(value, str):
        return year_from_label(value, what=what)
    if isinstance(value, float | np.floating) and float(value).is_integer():
        return int(value)
    raise InputError(f"{what}: {value!r} is not a year (e.g. 2027, -2599, '2600 BC')")
