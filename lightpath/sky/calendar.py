"""Julian day numbers and calendar dates, proleptic Julian and Gregorian.

Years use astronomical numbering: year 0 is 1 BC and year -2599 is 2600 BC.
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
    "MONTH_NAMES",
    "calendar_date",
    "calendar_for",
    "calendar_of_date",
    "date_label",
    "day_of_year",
    "days_in_month",
    "format_date",
    "is_leap_year",
    "julian_day",
    "validate_date",
    "year_from_label",
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


def _reform_gap_error(what: str, day: float):
    """The one-line InputError for a day of 1582 October 5-14 read in the default calendar."""
    from lightpath.errors import InputError

    return InputError(
        f"{what}: 1582-10-{int(day):02d} does not exist in the default calendar (Julian to October 4, "
        "Gregorian from October 15); force the julian or gregorian calendar"
    )


def julian_day(year: ArrayLike, month: ArrayLike, day: ArrayLike, calendar: Calendar = "auto") -> NDArray:
    """Julian day of a calendar date (``day`` may carry a fraction of a day).

    Parameters
    ----------
    year : int or array, astronomical numbering (0 = 1 BC).
    month : int or array, 1-12.
    day : float or array, day of the month with its fraction (1.5 = noon of the 1st).
    calendar : ``"auto"`` (Julian before 1582-10-15, Gregorian after), ``"julian"`` or ``"gregorian"``.
        With ``"auto"`` the ten days 1582 October 5-14 that the reform skipped raise
        :class:`~lightpath.errors.InputError` with the same one-line message as :func:`validate_date`.

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
    if calendar == "auto":
        gap = (y == 1582) & (m == 10) & (d >= 5.0) & (d < 15.0)
        if np.any(gap):
            raise _reform_gap_error("date", float(np.broadcast_to(d, gap.shape)[gap].flat[0]))
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
    """A year in astronomical numbering written for people: ``-2599`` → ``"2600 BC"``.

    >>> year_label(-2599), year_label(0), year_label(2027)
    ('2600 BC', '1 BC', '2027')
    """
    year = int(year)
    return f"{1 - year} BC" if year <= 0 else str(year)


#: English month names, January first.
MONTH_NAMES = (
    "January",
    "February",
    "March",
    "April",
    "May",
    "June",
    "July",
    "August",
    "September",
    "October",
    "November",
    "December",
)

_MONTH_DAYS = np.array([31, 28, 31, 30, 31, 30, 31, 31, 30, 31, 30, 31], dtype=np.int64)


def is_leap_year(year: ArrayLike, calendar: Literal["julian", "gregorian"] = "gregorian") -> NDArray:
    """True for leap years (astronomical numbering: 1 BC = year 0 is a leap year in both calendars).

    >>> [bool(is_leap_year(y, "gregorian")) for y in (1900, 2000, 2024)]
    [False, True, True]
    >>> [bool(is_leap_year(y, "julian")) for y in (1900, 0, -4, -2599)]
    [True, True, True, False]

    References
    ----------
    Meeus (1998), chapter 7: every fourth year in the Julian calendar; centurial years only
    when divisible by 400 in the Gregorian one.
    """
    if calendar not in ("julian", "gregorian"):
        _check_calendar(calendar)
        raise ValueError("is_leap_year needs calendar 'julian' or 'gregorian'")
    y = np.asarray(year, dtype=np.int64)
    leap = y % 4 == 0
    if calendar == "gregorian":
        leap = leap & ((y % 100 != 0) | (y % 400 == 0))
    return leap[()] if leap.ndim == 0 else leap


def calendar_of_date(year: int, month: int, day: float, calendar: Calendar = "auto") -> str:
    """Which calendar a written date is read in: the forced one, or for ``"auto"`` Gregorian
    from 1582 October 15 on and Julian before.

    >>> calendar_of_date(1582, 10, 4), calendar_of_date(1582, 10, 15)
    ('julian', 'gregorian')
    """
    _check_calendar(calendar)
    if calendar != "auto":
        return calendar
    return "gregorian" if (int(year), int(month), float(day)) >= (1582, 10, 15.0) else "julian"


def days_in_month(year: ArrayLike, month: ArrayLike, calendar: Literal["julian", "gregorian"] = "gregorian") -> NDArray:
    """Number of days in a month (28-31).

    >>> int(days_in_month(2024, 2)), int(days_in_month(1900, 2)), int(days_in_month(1900, 2, "julian"))
    (29, 28, 29)
    """
    m = np.asarray(month, dtype=np.int64)
    if np.any((m < 1) | (m > 12)):
        from lightpath.errors import InputError

        raise InputError(f"month {month!r} is outside 1..12")
    n = _MONTH_DAYS[m - 1] + ((m == 2) & is_leap_year(year, calendar))
    return n[()] if np.ndim(n) == 0 else n


def validate_date(year: int, month: int, day: float, calendar: Calendar = "auto", what: str = "date") -> str:
    """Check that a written date exists; return the calendar it is read in.

    Rejects month 13, day 0, 31 April, 29 February of a common year and, with
    ``calendar="auto"``, the ten days 1582 October 5-14 that the Gregorian reform
    skipped.  ``what`` names the input in the one-line :class:`InputError`.

    >>> validate_date(2024, 2, 29)
    'gregorian'
    >>> validate_date(2027, 4, 31)
    Traceback (most recent call last):
    ...
    lightpath.errors.InputError: date: 2027-04-31 does not exist: April has 30 days in the gregorian calendar
    """
    from lightpath.errors import InputError

    year, month = int(year), int(month)
    if not 1 <= month <= 12:
        raise InputError(f"{what}: month {month} is outside 1..12")
    if not (np.isfinite(day) and day >= 1.0):
        raise InputError(f"{what}: day {day:g} is outside 1..31")
    used = calendar_of_date(year, month, day, calendar)
    if calendar == "auto" and (year, month) == (1582, 10) and 5.0 <= day < 15.0:
        raise _reform_gap_error(what, day)
    n = int(days_in_month(year, month, used))
    if day >= n + 1:
        raise InputError(
            f"{what}: {_format_ymd(year, month, int(day))} does not exist: {MONTH_NAMES[month - 1]} has {n} days "
            f"in the {used} calendar"
        )
    return used


def year_from_label(text: str, what: str = "year") -> int:
    """A written year → astronomical year: ``"2600 BC"`` → -2599, ``"AD 1200"`` / ``"1200"`` → 1200,
    ``"-2599"`` → -2599.  There is no year "0 BC" (1 BC is followed by AD 1).

    >>> year_from_label("2600 BC"), year_from_label("1 BC"), year_from_label("AD 33"), year_from_label("-44")
    (-2599, 0, 33, -44)
    """
    from lightpath.errors import InputError

    t = " ".join(str(text).upper().replace("B.C.", "BC").replace("A.D.", "AD").split())
    era = None
    for word in ("BCE", "BC", "CE", "AD"):
        if t.endswith(" " + word) or t.startswith(word + " "):
            era = word
            t = t.removesuffix(" " + word).removeprefix(word + " ").strip()
            break
    if not (t.lstrip("+-").isdigit()):
        raise InputError(f"{what}: {text!r} is not a year (e.g. 2027, -2599, 2600 BC, AD 33)")
    number = int(t)
    if era is None:
        return number
    if number < 1 or t.startswith(("+", "-")):
        raise InputError(f"{what}: {text!r} has no such year; {era} years start at 1 (1 BC is followed by AD 1)")
    return 1 - number if era in ("BC", "BCE") else number


def _format_ymd(year: int, month: int, day: int) -> str:
    # ISO 8601 expanded years: a sign and at least four digits before year 0.
    y = f"{year:05d}" if year < 0 else f"{year:04d}"
    return f"{y}-{month:02d}-{day:02d}"


def format_date(jd: ArrayLike, calendar: Calendar = "auto"):
    """Calendar date of a Julian day written ``YYYY-MM-DD`` with astronomical years.

    The day is the civil day on the same time scale as ``jd`` (fractions are dropped).
    Returns a ``str`` for a scalar and an array of ``str`` otherwise.

    >>> format_date(julian_day(-2599, 3, 19.25)), format_date(julian_day(2027, 2, 3.6))
    ('-2599-03-19', '2027-02-03')
    """
    y, m, d = calendar_date(jd, calendar)
    if np.ndim(y) == 0:
        return _format_ymd(int(y), int(m), int(np.floor(d)))
    days = np.floor(d).astype(np.int64).ravel().tolist()
    out = np.array([_format_ymd(a, b, c) for a, b, c in zip(y.ravel().tolist(), m.ravel().tolist(), days, strict=True)])
    return out.reshape(np.shape(jd))


def date_label(jd: float, calendar: Calendar = "auto") -> str:
    """A date for people, with its calendar named: ``"2600 BC March 19 (Julian)"``.

    >>> date_label(julian_day(-2599, 3, 19.5)), date_label(julian_day(2027, 2, 3.0))
    ('2600 BC March 19 (Julian)', '2027 February 3 (Gregorian)')
    """
    y, m, d = calendar_date(float(jd), calendar)
    used = str(calendar_for(float(jd), calendar))
    return f"{year_label(y)} {MONTH_NAMES[m - 1]} {int(np.floor(d))} ({used.capitalize()})"


def day_of_year(jd: ArrayLike, calendar: Calendar = "auto") -> NDArray:
    """Day number within the calendar year, 1 on January 1 (1-365, or 366 in leap years).

    With ``calendar="auto"`` the year 1582 counts the days that actually passed, so
    October 15 is day 278.

    >>> int(day_of_year(julian_day(1978, 11, 14.0))), int(day_of_year(julian_day(1988, 4, 22.5)))
    (318, 113)

    References
    ----------
    Meeus (1998), chapter 7, "Day of the year", Examples 7.f (1978 Nov 14 → 318) and
    7.g (1988 Apr 22 → 113).
    """
    y, _, _ = calendar_date(jd, calendar)
    start = julian_day(y, 1, 1.0, calendar)
    n = np.floor(np.asarray(jd, dtype=np.float64) + 0.5) - np.floor(np.asarray(start) + 0.5) + 1
    n = np.asarray(n, dtype=np.int64)
    return n[()] if n.ndim == 0 else n
