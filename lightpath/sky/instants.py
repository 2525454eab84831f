"""Instants written by people → Julian dates, and back.

Accepted forms (a date alone means 00:00)::

    2027-02-03T07:40            UT (no offset means UT)
    2027-02-03 07:40:30.5       UT, with seconds
    2027-02-03T07:40Z           UT
    2027-02-03T09:40+02:00      civil time with a UTC offset (also +0200, -07, -0700)
    -2599-03-19T06:10           astronomical year (0 = 1 BC, -2599 = 2600 BC)
    2600 BC-03-19T06:10         the same instant, written with BC (also BCE, AD, CE)
    1500 BC-02-16T18:00 LAT     local apparent solar time at the site
    2027-02-03T07:40 TT         Terrestrial Time (also " UT" / " UTC")
    JD2451545.0                 Julian date in UT
    JDE2451545.0                Julian ephemeris date (TT)

Dates are read in the proleptic Julian calendar before 1582 October 15 and the
Gregorian calendar from then on, unless a calendar is forced.

>>> p = parse_instant("2600 BC-03-19T06:10")
>>> p.scale, p.calendar, round(p.jd, 5)
('UT', 'julian', 771850.75694)
>>> parse_instant("2027-02-03T09:40+02:00").jd == parse_instant("2027-02-03T07:40").jd
True
>>> format_instant(parse_instant("2600 BC-03-19T06:10").jd)
'-2599-03-19T06:10:00'

References
----------
Meeus, J. (1998). *Astronomical Algorithms*, 2nd ed., chapter 7 (Julian day) and
chapter 28 (equation of time; apparent solar time).
ISO 8601-1:2019, *Date and time — Representations for information interchange*
(expanded years with a sign, UTC offsets).
"""

from __future__ import annotations

import math
import re
from dataclasses import dataclass
from typing import Literal

import numpy as np
from numpy.typing import ArrayLike, NDArray

from lightpath.errors import InputError
from lightpath.sky import deltat as _deltat
from lightpath.sky.calendar import (
    Calendar,
    _check_calendar,
    _format_ymd,
    calendar_date,
    calendar_for,
    format_date,
    julian_day,
    validate_date,
    year_from_label,
)

__all__ = [
    "ACCEPTED_FORMS",
    "ParsedInstant",
    "format_instant",
    "format_local_apparent",
    "format_time_of_day",
    "local_apparent_day_number",
    "parse_instant",
    "resolve_instant",
    "tt_from_lat",
]

Scale = Literal["UT", "TT", "LAT"]

#: One line listing the accepted forms (used in error messages and help texts).
ACCEPTED_FORMS = (
    "YYYY-MM-DD[THH:MM[:SS]][Z|+HH:MM] (UT unless an offset is given), '2600 BC-03-19T06:10', "
    "'-2599-03-19', JD2451545.0 (UT), JDE2451545.0 (TT); end with ' LAT' for local apparent solar time "
    "or ' TT' for Terrestrial Time"
)

_JD_RE = re.compile(r"^(?P<kind>JDE|JD)\s*(?P<num>[+-]?(\d+(\.\d*)?|\.\d+)([eE][+-]?\d+)?)$", re.IGNORECASE)
_DATE_RE = re.compile(
    r"""^(?P<year>(?:AD|CE)\s*\d+|[+-]?\d+(?:\s*(?:BCE|BC|AD|CE))?)
        -(?P<month>\d{1,2})-(?P<day>\d{1,2})
        (?:(?:T|\s+)(?P<hour>\d{1,2}):(?P<minute>\d{2})(?::(?P<second>\d{2}(?:\.\d*)?))?)?
        \s*(?P<offset>Z|[+-]\d{2}(?::?\d{2})?)?$""",
    re.IGNORECASE | re.VERBOSE,
)
_SUFFIX_RE = re.compile(r"\s+(?P<scale>LAT|TT|UTC|UT)$", re.IGNORECASE)


@dataclass(frozen=True)
class ParsedInstant:
    """An instant as written, read but not yet placed on TT.

    Attributes
    ----------
    jd : Julian date (days) on ``scale``: JD UT for ``"UT"``, JDE for ``"TT"``; for
        ``"LAT"`` the local apparent solar date and clock reading written as a Julian
        date (its fraction of day + 0.5 is the apparent solar time / 24 h).
    scale : ``"UT"``, ``"TT"`` or ``"LAT"``.
    calendar : calendar the date was read in (``"julian"`` or ``"gregorian"``; for a
        Julian date, the calendar its date is shown in).
    text : the text as given.
    """

    jd: float
    scale: Scale
    calendar: str
    text: str


def _fail(what: str, text: str, problem: str) -> InputError:
    return InputError(f"{what}: {text!r} {problem}; accepted: {ACCEPTED_FORMS}")


def parse_instant(text: str, calendar: Calendar = "auto", what: str = "instant") -> ParsedInstant:
    """Read an instant in one of the accepted forms (see the module notes).

    Parameters
    ----------
    text : the instant as written.
    calendar : ``"auto"`` (Julian before 1582-10-15, Gregorian after), ``"julian"`` or ``"gregorian"``.
    what : name of the input for error messages (e.g. ``"--at"``).

    Raises
    ------
    InputError : malformed text, a date that does not exist (31 April, month 13,
        "0 BC"), hour 24 or more, minute or second 60 or more, an offset with LAT.

    Examples
    --------
    >>> parse_instant("JDE2451545.0")
    ParsedInstant(jd=2451545.0, scale='TT', calendar='gregorian', text='JDE2451545.0')
    >>> parse_instant("2027-02-03T07:40").jd
    2461439.8194444445
    """
    _check_calendar(calendar)
    raw = str(text)
    body = " ".join(raw.split())
    scale: Scale = "UT"
    suffix = _SUFFIX_RE.search(body)
    if suffix:
        word = suffix.group("scale").upper()
        scale = "LAT" if word == "LAT" else "TT" if word == "TT" else "UT"
        body = body[: suffix.start()].strip()

    jd_match = _JD_RE.match(body)
    if jd_match:
        if suffix:
            raise _fail(what, raw, "mixes a JD/JDE number with a time-scale word")
        jd = float(jd_match.group("num"))
        if not math.isfinite(jd):
            raise _fail(what, raw, "is not a finite Julian date")
        kind_scale: Scale = "TT" if jd_match.group("kind").upper() == "JDE" else "UT"
        return ParsedInstant(jd=jd, scale=kind_scale, calendar=str(calendar_for(jd, calendar)), text=raw)

    m = _DATE_RE.match(body)
    if not m:
        raise _fail(what, raw, "is not a date and time")
    year = year_from_label(m.group("year"), what=f"{what}: {raw!r}")
    month, day = int(m.group("month")), int(m.group("day"))
    hour = int(m.group("hour") or 0)
    minute = int(m.group("minute") or 0)
    second = float(m.group("second") or 0.0)
    if hour > 23 or minute > 59 or second >= 60.0:
        raise _fail(what, raw, f"has no such time of day {hour:02d}:{minute:02d}:{second:02g} (00:00..23:59:59)")
    used = validate_date(year, month, day, calendar, what=f"{what}: {raw!r}")
    offset_h = 0.0
    off = m.group("offset")
    if off and off.upper() != "Z":
        if scale != "UT":
            raise _fail(what, raw, f"gives a UTC offset together with {scale}")
        sign = -1.0 if off[0] == "-" else 1.0
        digits = off[1:].replace(":", "")
        oh, om = int(digits[:2]), int(digits[2:] or 0)
        if oh > 18 or om > 59:
            raise _fail(what, raw, f"has an offset {off} beyond ±18:00")
        offset_h = sign * (oh + om / 60.0)
    elif off and scale != "UT":
        raise _fail(what, raw, f"gives Z (UT) together with {scale}")
    fraction = (hour + minute / 60.0 + second / 3600.0 - offset_h) / 24.0
    # The calendar is fixed by the written date, so an offset that crosses 1582-10-15 cannot switch it.
    jd = float(julian_day(year, month, day + fraction, calendar=used))
    return ParsedInstant(jd=jd, scale=scale, calendar=used, text=raw)


def format_time_of_day(fraction_of_day: ArrayLike, seconds: bool = False):
    """Fraction of a day (0 = midnight) → ``"HH:MM"`` (or ``"HH:MM:SS"``), rounded to the nearest unit.

    Fractions outside 0..1 wrap around midnight.  Returns a ``str`` for a scalar and
    an array of ``str`` otherwise; nan gives ``"--:--"``.

    >>> format_time_of_day(0.5), format_time_of_day(0.99999), format_time_of_day(7 / 24 + 40 / 1440, seconds=True)
    ('12:00', '00:00', '07:40:00')
    """
    f = np.asarray(fraction_of_day, dtype=np.float64)
    unit = 86400.0 if seconds else 1440.0
    n = np.round(np.nan_to_num(f) * unit).astype(np.int64) % int(unit)
    hh = n // (3600 if seconds else 60)
    mm = (n // 60) % 60 if seconds else n % 60
    ss = n % 60

    def one(h: int, mi: int, s: int, bad: bool) -> str:
        if bad:
            return "--:--:--" if seconds else "--:--"
        return f"{h:02d}:{mi:02d}:{s:02d}" if seconds else f"{h:02d}:{mi:02d}"

    bad = ~np.isfinite(f)
    if f.ndim == 0:
        return one(int(hh), int(mm), int(ss), bool(bad))
    flat = [one(*v) for v in zip(hh.ravel(), mm.ravel(), ss.ravel(), bad.ravel(), strict=True)]
    return np.array(flat).reshape(f.shape)


def format_instant(jd: ArrayLike, calendar: Calendar = "auto", seconds: bool = True):
    """Julian date(s) → ``"YYYY-MM-DDTHH:MM:SS"`` (astronomical year), rounded to the second (or minute).

    The scale is that of ``jd``; the caller says which (UT, TT, LAT).  Returns a ``str``
    for a scalar and an array of ``str`` otherwise.

    >>> format_instant(2451545.0), format_instant(2451545.0 - 1e-7, seconds=False)
    ('2000-01-01T12:00:00', '2000-01-01T12:00')
    >>> format_instant([0.0, 2451544.5 - 0.4 / 86400]).tolist()
    ['-4712-01-01T12:00:00', '2000-01-01T00:00:00']
    """
    x = np.asarray(jd, dtype=np.float64)
    unit = 86400 if seconds else 1440
    # Round first, on whole units counted from midnight, so 23:59:59.7 becomes the next day's 00:00:00.
    jd0 = np.floor(x + 0.5) - 0.5
    units = np.round((x - jd0) * unit).astype(np.int64)
    carry = units >= unit
    jd0 = jd0 + carry
    units = units - carry * unit
    y, m, d = calendar_date(np.atleast_1d(jd0 + 0.5), calendar)  # noon of the civil day: no rounding doubt
    clock = np.atleast_1d(format_time_of_day(units / unit, seconds=seconds))
    flat = [
        f"{_format_ymd(a, b, int(c))}T{t}"
        for a, b, c, t in zip(
            y.ravel().tolist(), m.ravel().tolist(), np.floor(d).ravel().tolist(), clock.ravel().tolist(), strict=True
        )
    ]
    if x.ndim == 0:
        return flat[0]
    return np.array(flat).reshape(x.shape)


def local_apparent_day_number(jd_ut: ArrayLike, longitude_deg: ArrayLike, local_apparent_time_h: ArrayLike) -> NDArray:
    """Integer Julian day number of the local apparent day holding each instant (its date is that of D at noon).

    The local apparent day starts at local apparent midnight: the instant whose local
    apparent time is 0 h.  With ``m = jd_ut + longitude/360`` (local mean time) and the
    instant's local apparent time t, D − 0.5 + t/24 = m + E where the equation of time E
    is under 17 min, so D = round(m + 0.5 − t/24).  The local mean date can differ: an
    instant at 00:02 LAT is 23:50 local mean time of the day before when E = +12 min.

    >>> int(local_apparent_day_number(2461671.5 + 5.9 / 24, -91.7, 0.033))  # 00:02 LAT, 05:54 UT at 91.7° W
    2461672

    References
    ----------
    Meeus (1998), ch. 28 (equation of time: apparent = mean solar time + E).
    """
    local = np.asarray(jd_ut, float) + np.asarray(longitude_deg, float) / 360.0 + 0.5
    out = np.rint(local - np.asarray(local_apparent_time_h, float) / 24.0).astype(np.int64)
    return out[()] if out.ndim == 0 else out


def format_local_apparent(
    day_number: ArrayLike, local_apparent_time_h: ArrayLike, calendar: Calendar = "auto", seconds: bool = False
):
    """Local apparent date and clock (``"YYYY-MM-DD"``, ``"HH:MM"``), the clock rounded to the nearest minute.

    A time that rounds up to 24:00 is shown as 00:00 of the next day, so the date and the
    clock always name the same rounded instant (23:59:40 LAT on the 22nd → 2027-09-23 00:00).
    ``day_number`` comes from :func:`local_apparent_day_number`.  Returns two ``str`` for
    scalars and two arrays of ``str`` otherwise.

    >>> format_local_apparent(2461671, 23 + 59 / 60 + 40 / 3600, "gregorian")
    ('2027-09-23', '00:00')
    >>> format_local_apparent(2461671, 8 + 54 / 60 + 55 / 3600, "gregorian")
    ('2027-09-22', '08:55')
    """
    d = np.asarray(day_number, dtype=np.int64)
    h = np.asarray(local_apparent_time_h, dtype=np.float64)
    unit = 86400 if seconds else 1440
    units = np.round(np.nan_to_num(h) / 24.0 * unit).astype(np.int64)
    day = d + units // unit  # 24:00 (or 23:59:59.5 to the second) belongs to the next day
    clock = format_time_of_day(np.where(np.isfinite(h), (units % unit) / unit, np.nan), seconds=seconds)
    dates = format_date(day.astype(np.float64), calendar)
    return dates, clock


def _wrap_hours(h: NDArray) -> NDArray:
    """Hours wrapped into -12..12."""
    return (h + 12.0) % 24.0 - 12.0


def tt_from_lat(
    jd_lat: ArrayLike,
    observer,
    *,
    source: str = "auto",
    delta_t_s: ArrayLike | None = None,
    iterations: int = 4,
) -> NDArray:
    """JD TT of instants given in local apparent solar time (LAT) at a site.

    LAT t on a local date is the instant when the Sun's local (apparent) hour angle
    equals (t − 12 h)·15°.  The first guess uses local mean time, UT = LAT − λ/15°;
    each pass corrects by the difference in apparent solar time reported by
    :func:`lightpath.sky.sun.sun_position` (which carries the equation of time).
    The apparent Sun's hour angle runs at 1 turn per day to within ~3·10⁻⁴, so four
    passes reach far below a millisecond.

    Parameters
    ----------
    jd_lat : local apparent date and clock reading written as Julian dates (days).
    observer : :class:`lightpath.sky.observer.Observer` (its longitude is used).
    source : Sun position source, as for ``sun_position``.
    delta_t_s : ΔT override in seconds (scalar or array), or None for the model.

    Returns
    -------
    JD TT, float64 array of the shape of ``jd_lat`` (0-d for a scalar).

    References
    ----------
    Meeus (1998), chapter 28: apparent solar time = mean solar time + equation of time.
    """
    from lightpath.sky.sun import sun_position

    target = np.asarray(jd_lat, dtype=np.float64)
    target_h = ((target + 0.5) % 1.0) * 24.0
    jd_ut = target - observer.longitude_deg / 360.0  # local mean time → UT
    jd_tt = np.asarray(_deltat.tt_from_ut(jd_ut, delta_t_s))
    for _ in range(iterations):
        pos = sun_position(jd_tt, observer, source=source, delta_t_s=delta_t_s)
        err_h = _wrap_hours(target_h - np.asarray(pos.local_apparent_time_h, dtype=np.float64))
        jd_tt = jd_tt + err_h / 24.0
    return jd_tt[()] if jd_tt.ndim == 0 else jd_tt


def resolve_instant(
    parsed: ParsedInstant,
    observer=None,
    source: str = "auto",
    delta_t_s: float | None = None,
) -> float:
    """Place a parsed instant on TT: JD TT (days).

    UT becomes TT through ΔT (the model, or ``delta_t_s`` seconds if given); LAT needs
    the site (``observer``) and the Sun (see :func:`tt_from_lat`).

    >>> resolve_instant(parse_instant("JDE2451545.0"))
    2451545.0
    >>> round((resolve_instant(parse_instant("JD2451545.0"), delta_t_s=64.0) - 2451545.0) * 86400.0, 3)
    64.0
    """
    if parsed.scale == "TT":
        return float(parsed.jd)
    if parsed.scale == "UT":
        return float(_deltat.tt_from_ut(parsed.jd, delta_t_s))
    if observer is None:
        raise InputError(f"{parsed.text!r}: local apparent time (LAT) needs a site (latitude, longitude)")
    return float(tt_from_lat(parsed.jd, observer, source=source, delta_t_s=delta_t_s))
