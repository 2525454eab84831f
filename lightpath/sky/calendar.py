"""Julian day numbers and calendar dates, proleptic Julian and Gregorian.

Years use astronomical numbering: year 0 is 1 BC and year -3199 is 3200 BC.
The default calendar is the Julian one before 1582 October 15 (Gregorian) and
the Gregorian one from then on, as in Meeus (1998) chapter 7; either can be
forced for every date with ``calendar="julian"`` or ``calendar="gregorian"``.

All functions work on numpy arrays as well as scalars.

>>> float(julian_day(2000, 1, 1.5))
2451545.0
>>> calendar_date(2451545.0)
(2000, 1, 1.5)

References
----------
Meeus, J. (1998). *Astronomical Algorithms*, 2nd ed., Willmann-Bell,
chapter 7 (Table 7.a, Examples 7.a and 7.b).
"""

from __future__ import annotations

from typing import Literal

import numpy as np
from numpy.typing import ArrayLike, NDArray

__all__ = [
    "CALENDARS",
    "GREGORIAN_START_JD",
    "calendar_date",
    "calendar_for",
    "julian_day",
    "year_label",
]

Calendar = Literal["auto", "julian", "gregorian"]
CALENDARS = ("auto", "julian", "gregorian")

#: Julian day (at 0h) of 1582 October 15, the first day of the Gregorian calendar.
GREGORIAN_START_JD = 2299160.5

# Whole cycles used to bring any date to positive day numbers before the
# integer arithmetic: 400 Gregorian years = 146097 days, 4 Julian years = 1461 days.
_GREG_CYCLE_DAYS, _GREG_CYCLE_YEARS = 146097, 400
_JUL_CYCLE_DAYS, _JUL_CYCLE_YEARS = 1461, 4
_SHIFT_CYCLES_GREG = 100  # 40,000 years
_SHIFT_CYCLES_JUL = 10_000  # 40,000 years


def _check_calendar(calendar: str) -> None:
    if calendar not in CALENDARS:
        from lightpath.errors import InputError

        raise InputError(f"calendar {calendar!r} is not one of auto, julian, gregorian")


def julian_day(year: ArrayLike, month: ArrayLike, day: ArrayLike, calendar: Calendar = "auto") -> NDArray:
    """Julian day of a calendar date (``day`` may carry a fraction of a day).

    Parameters
    ----------
    year : int or array, astronomical numbering (0 = 1 BC).
    month : int or array, 1-12.
    day : float or array, day of the month with its fraction (1.5 = noon of the 1st).
    calendar : ``"auto"`` (Julian before 1582-10-15, Gregorian after), ``"julian"`` or ``"gregorian"``.

    Returns
    -------
    Julian day (days), float64; the same scale as the time given (UT gives JD UT, TT gives JDE).

    Examples
    --------
    Meeus (1998) Example 7.a: 1957 October 4.81 is JD 2436116.31.

    >>> round(float(julian_day(1957, 10, 4.81)), 2)
    2436116.31

    References
    ----------
    Meeus (1998), eq. 7.1, with B = 0 in the Julian calendar.
    """
    _check_calendar(calendar)
    y = np.asarray(year, dtype=np.int64)
    m = np.asarray(month, dtype=np.int64)
    d = np.asarray(day, dtype=np.float64)
    # Meeus (1998) eq. 7.1: January and February count as months 13 and 14 of the year before.
    early = m <= 2
    yy = np.where(early, y - 1, y)
    mm = np.where(early, m + 12, m)
    # Integer day count of the month start in each calendar (floor division keeps negative years right).
    base = (1461 * (yy + 4716)) // 4 + (306 * (mm + 1)) // 10
    a = yy // 100
    b_greg = 2 - a + a // 4
    jd_julian = base + d - 1524.5
    jd_greg = base + b_greg + d - 1524.5
    if calendar == "julian":
        out = jd_julian
    elif calendar == "gregorian":
        out = jd_greg
    else:
        out = np.where(jd_greg >= GREGORIAN_START_JD, jd_greg, jd_julian)
    return out[()] if out.ndim == 0 else out


def calendar_for(jd: ArrayLike, calendar: Calendar = "auto") -> NDArray:
    """Name of the calendar used for each Julian day: ``"julian"`` or ``"gregorian"``.

    >>> str(calendar_for(2299160.5)), str(calendar_for(2299160.4))
    ('gregorian', 'julian')
    """
    _check_calendar(calendar)
    jd = np.asarray(jd, dtype=np.float64)
    if calendar != "auto":
        out = np.full(jd.shape, calendar, dtype=object)
    else:
        out = np.where(jd >= GREGORIAN_START_JD, "gregorian", "julian").astype(object)
    return out[()] if out.ndim == 0 else out


def calendar_date(jd: ArrayLike, calendar: Calendar = "auto"):
    """Calendar date of a Julian day: ``(year, month, day)`` with the fraction in ``day``.

    Returns Python scalars for a scalar input and numpy arrays otherwise.  Works
    for any Julian day, negative ones included (years before 4713 BC).

    Examples
    --------
    Meeus (1998) Example 7.c: JD 2436116.31 is 1957 October 4.81.

    >>> y, m, d = calendar_date(2436116.31)
    >>> (y, m, round(d, 2))
    (1957, 10, 4.81)

    References
    ----------
    Meeus (1998), chapter 7, "Calendar date from the JD"; negative day numbers are
    first moved forward by whole 400-year (Gregorian) or 4-year (Julian) cycles.
    """
    _check_calendar(calendar)
    jd = np.asarray(jd, dtype=np.float64)
    scalar = jd.ndim == 0
    jd = np.atleast_1d(jd)
    use_greg = (jd >= GREGORIAN_START_JD) if calendar == "auto" else np.full(jd.shape, calendar == "gregorian")

    shift_days = np.where(use_greg, _SHIFT_CYCLES_GREG * _GREG_CYCLE_DAYS, _SHIFT_CYCLES_JUL * _JUL_CYCLE_DAYS)
    shift_years = np.where(use_greg, _SHIFT_CYCLES_GREG * _GREG_CYCLE_YEARS, _SHIFT_CYCLES_JUL * _JUL_CYCLE_YEARS)
    x = jd + 0.5 + shift_days
    z = np.floor(x)
    f = x - z
    z = z.astype(np.int64)
    alpha = (100 * z - 186721625) // 3652425  # Meeus: INT((Z - 1867216.25) / 36524.25)
    a = np.where(use_greg, z + 1 + alpha - alpha // 4, z)
    b = a + 1524
    c = (100 * b - 12210) // 36525  # INT((B - 122.1) / 365.25)
    d = (1461 * c) // 4
    e = ((b - d) * 10000) // 306001  # INT((B - D) / 30.6001)
    day = (b - d - (306001 * e) // 10000) + f
    month = np.where(e < 14, e - 1, e - 13)
    year = np.where(month > 2, c - 4716, c - 4715) - shift_years
    if scalar:
        return int(year[0]), int(month[0]), float(day[0])
    return year, month, day


def year_label(year: int) -> str:
    """A year in astronomical numbering written for people: ``-3199`` → ``"3200 BC"``.

    >>> year_label(-3199), year_label(0), year_label(2027)
    ('3200 BC', '1 BC', '2027')
    """
    year = int(year)
    return f"{1 - year} BC" if year <= 0 else str(year)
