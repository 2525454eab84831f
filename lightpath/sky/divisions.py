"""Divisions of the year into N parts under four definitions, with the Sun's declination and horizon azimuths.

Year ``Y`` runs from the December solstice of ``Y − 1`` (position 0) to the December solstice of ``Y``
(position 1, which is position 0 of year ``Y + 1`` and not listed).  Division ``k`` of ``N`` sits at
position ``k/N``; the schemes differ in what "equal parts" means:

``longitude``
    equal steps of the Sun's apparent geocentric longitude of date: λ = 270° + 360°·k/N.
``time``
    equal steps of time inside each solstice-to-solstice half: for k/N ≤ ½ the instant
    D + 2·(k/N)·(J − D), after it J + (2·k/N − 1)·(D′ − J), where D, J, D′ are the December solstice of
    ``Y − 1``, the June solstice of ``Y`` and the December solstice of ``Y``.  For N = 2ᵐ these are the
    recursive midpoints between the solstices; unequal halves give unequal parts.
``days``
    N whole-day parts as even as possible, counted from the day of the anchor solstice (``anchor=
    "december"``: the December solstice of ``Y − 1``; ``"june"``: the June solstice of ``Y``) to the day of
    the next one; see :func:`day_parts` for the lengths and where the extra days go.
``declination``
    equal steps of the Sun's declination between the solstice extremes, rising from δ(D) to δ(J) over
    the first half and falling to δ(D′) over the second; the instant is where the Sun has that declination.

Names are given by position and are the same in every scheme, so that one name can be compared across
definitions: 0 ``december_solstice``, ¼ ``march_equinox``, ½ ``june_solstice``, ¾ ``september_equinox``,
⅛ ``cross_quarter_feb``, ⅜ ``cross_quarter_may``, ⅝ ``cross_quarter_aug``, ⅞ ``cross_quarter_nov``; other
positions ``division_k_of_N``.  Only in the ``longitude`` scheme is ``march_equinox`` the astronomical
equinox; in ``time`` it is the time midpoint between the solstices, in ``declination`` the instant of
declination 0 (within two minutes of the equinox), in ``days`` the day a quarter of the whole-day count on.

Dates are local apparent days at the site (the day between two local apparent midnights,
:func:`lightpath.sky.instants.local_apparent_day_number`) when an ``observer`` is given, else UT days; the
``days`` scheme counts its whole days in local mean solar time (UT + longitude/15 h), at whose noons its
instants sit, which fall on the same local apparent days.  Far back ΔT's uncertainty (hours before
3000 BC) can move such a day.

>>> [d.name for d in divisions(2000, "longitude", 4)]
['december_solstice', 'march_equinox', 'june_solstice', 'september_equinox']
>>> day_parts(365, 16).tolist()
[22, 23, 23, 23, 23, 22, 23, 23, 23, 23, 22, 23, 23, 23, 23, 23]

References
----------
Meeus, J. (1998). *Astronomical Algorithms*, 2nd ed., ch. 27 (equinoxes and solstices).
Bresenham, J. E. (1965). Algorithm for computer control of a digital plotter. *IBM Systems Journal* 4(1),
25–30 (the even spread of the long parts in ``days``).
"""

from __future__ import annotations

from dataclasses import dataclass
from fractions import Fraction

import numpy as np
from numpy.typing import NDArray

from lightpath.errors import InputError
from lightpath.sky.calendar import CALENDARS, calendar_for, format_date
from lightpath.sky.deltat import tt_from_ut, ut_from_tt
from lightpath.sky.instants import local_apparent_day_number
from lightpath.sky.observer import Observer
from lightpath.sky.riseset import rise_set_azimuths
from lightpath.sky.seasons import (
    YEAR_MAX,
    _check_years,
    _opening_december,
    _quarter_days_unchecked,
    solar_longitude_instant,
    year_span_source,
)
from lightpath.sky.tables import Tabular

__all__ = ["ANCHORS", "MAX_PARTS", "SCHEMES", "Division", "day_parts", "division_name", "divisions"]

#: Division schemes, in the order ``"all"`` lists them.
SCHEMES = ("longitude", "time", "days", "declination")
#: Solstices the ``days`` scheme can be anchored at.
ANCHORS = ("december", "june")
#: Largest N accepted (the ``days`` scheme also needs N ≤ 365 so that no part is empty).
MAX_PARTS = 1000

_NAMED_POSITIONS = {
    Fraction(0): "december_solstice",
    Fraction(1, 4): "march_equinox",
    Fraction(1, 2): "june_solstice",
    Fraction(3, 4): "september_equinox",
    Fraction(1, 8): "cross_quarter_feb",
    Fraction(3, 8): "cross_quarter_may",
    Fraction(5, 8): "cross_quarter_aug",
    Fraction(7, 8): "cross_quarter_nov",
}
_SEMIDIAMETER_1AU_DEG = 959.63 / 3600.0  # Meeus (1998) ch. 55: s = 959.63″ / r(au), from memory
_BISECT_TOL_DAYS = 1e-6


@dataclass(frozen=True)
class Division(Tabular):
    """One division of the year.

    Attributes
    ----------
    scheme, index, name : the scheme, k (0 = start of the year) and the position's name.
    jd_tt, jd_ut : the instant, Julian dates in TT and UT1 (for ``days``: local mean noon of the day).
    day : the local apparent day at the site holding the instant (an integer Julian day number whose noon is
        local apparent noon), or the UT day without an observer: the day convention of every result.
    date, calendar : that day as ``YYYY-MM-DD`` (astronomical years, a label for tables) and its calendar.
    days_from_start : days from the December solstice of ``Y − 1`` (for ``days`` anchored in June: from the
        June solstice of ``Y``).
    part_days : length of the part that starts here, days (whole days in the ``days`` scheme).
    ecliptic_longitude_deg, declination_deg : the Sun's apparent geocentric longitude and declination.
    sunrise_azimuth_deg, sunset_azimuth_deg : disc centre on the skyline, degrees from north (nan without
        an observer, or if the Sun does not rise or set).
    sunrise_first_gleam_azimuth_deg, sunset_last_gleam_azimuth_deg : the upper limb on the skyline.
    sunrise_full_disc_azimuth_deg, sunset_full_disc_azimuth_deg : the lower limb on the skyline.
    """

    scheme: str
    index: int
    name: str
    jd_tt: float
    jd_ut: float
    date: str
    calendar: str
    days_from_start: float
    part_days: float
    ecliptic_longitude_deg: float
    declination_deg: float
    sunrise_azimuth_deg: float = float("nan")
    sunset_azimuth_deg: float = float("nan")
    sunrise_first_gleam_azimuth_deg: float = float("nan")
    sunset_last_gleam_azimuth_deg: float = float("nan")
    sunrise_full_disc_azimuth_deg: float = float("nan")
    sunset_full_disc_azimuth_deg: float = float("nan")
    day: int = 0


def division_name(position: Fraction) -> str:
    """The name of a position in the year (a fraction from the December solstice), see the module notes.

    >>> division_name(Fraction(2, 16)), division_name(Fraction(3, 16))
    ('cross_quarter_feb', 'division_3_of_16')
    """
    position = Fraction(position) % 1
    return _NAMED_POSITIONS.get(position, f"division_{position.numerator}_of_{position.denominator}")


def day_parts(total_days: int, parts: int) -> NDArray:
    """Split ``total_days`` whole days into ``parts`` counts as evenly as possible.

    With q, r = divmod(total_days, parts), part i has q + 1 days when ⌊(i+1)·r/N⌋ > ⌊i·r/N⌋, else q: the r
    long parts are spread evenly (Bresenham 1965), the last part is always long (when r > 0).  A 366-day
    count has one more long part than a 365-day count.

    >>> day_parts(365, 4).tolist(), day_parts(366, 4).tolist()
    ([91, 91, 91, 92], [91, 92, 91, 92])
    """
    i = np.arange(parts)
    q, r = divmod(int(total_days), int(parts))
    return q + ((i + 1) * r // parts - i * r // parts)


def _check(year, scheme, parts, anchor, calendar, observer) -> list[str]:
    schemes = list(SCHEMES) if scheme == "all" else [scheme]
    if scheme != "all" and scheme not in SCHEMES:
        raise InputError(f"scheme {scheme!r} is not one of {', '.join(SCHEMES)}, all")
    if isinstance(parts, bool) or not isinstance(parts, (int, np.integer)) or not 2 <= parts <= MAX_PARTS:
        raise InputError(f"parts {parts!r} must be a whole number from 2 to {MAX_PARTS}")
    if "days" in schemes and parts > 365:
        raise InputError(f"parts {parts} is more than the 365 days of a year (scheme days)")
    if anchor not in ANCHORS:
        raise InputError(f"anchor {anchor!r} is not one of {', '.join(ANCHORS)}")
    if calendar not in CALENDARS:
        raise InputError(f"calendar {calendar!r} is not one of {', '.join(CALENDARS)}")
    if observer is not None and not isinstance(observer, Observer):
        raise InputError("observer must be a lightpath.sky.observer.Observer")
    if np.ndim(year) != 0:
        raise InputError(f"year {year!r} must be a single whole year (astronomical numbering, 0 = 1 BC)")
    _check_years(year)
    return schemes


def _sun(jd_tt: NDArray, source: str):
    from lightpath.sky.sun import geocentric_sun

    return geocentric_sun(np.asarray(jd_tt, dtype=float), source=source)


def _declination_instants(target_deg, lo, hi, rising, source):
    """Bisection for δ(t) = target inside [lo, hi], where δ is monotonic (rising or falling)."""
    lo, hi = np.array(lo, dtype=float), np.array(hi, dtype=float)
    target = np.asarray(target_deg, dtype=float)
    while np.any(hi - lo > _BISECT_TOL_DAYS):
        mid = 0.5 * (lo + hi)
        above = np.asarray(_sun(mid, source).declination_deg) > target
        to_hi = above if rising else ~above  # the root lies before mid
        hi, lo = np.where(to_hi, mid, hi), np.where(to_hi, lo, mid)
    return 0.5 * (lo + hi)


def _local_day(jd_tt: NDArray, lon_deg: float) -> NDArray:
    # Civil day number in local mean solar time: JD 0h boundaries shifted by the longitude.
    return np.floor(np.asarray(ut_from_tt(jd_tt)) + lon_deg / 360.0 + 0.5)


def _scheme_instants(scheme, parts, anchor, solstices, source, lon_deg):
    """(jd_tt, days_from_start, part_days, positions) for one scheme.

    ``solstices`` = (December of Y − 1, June of Y, December of Y, June of Y + 1), JD TT.
    """
    d0, j, d1, j_next = solstices
    k = np.arange(parts)
    f = k / parts
    positions = [Fraction(int(i), parts) for i in k]
    start = d0
    if scheme == "longitude":
        guess = d0 + f * (d1 - d0)
        jd, _ = solar_longitude_instant(np.mod(270.0 + 360.0 * f, 360.0), guess, source)
        jd[0] = d0
    elif scheme == "time":
        jd = np.where(f <= 0.5, d0 + 2.0 * f * (j - d0), j + (2.0 * f - 1.0) * (d1 - j))
    elif scheme == "declination":
        dec_d0, dec_j, dec_d1 = (float(v) for v in _sun(np.array([d0, j, d1]), source).declination_deg)
        first = f <= 0.5
        target = np.where(first, dec_d0 + 2.0 * f * (dec_j - dec_d0), dec_j + (2.0 * f - 1.0) * (dec_d1 - dec_j))
        jd = np.empty(parts)
        inner1, inner2 = (f > 0.0) & (f < 0.5), ~first
        jd[inner1] = _declination_instants(
            target[inner1], np.full(inner1.sum(), d0), np.full(inner1.sum(), j), True, source
        )
        jd[inner2] = _declination_instants(
            target[inner2], np.full(inner2.sum(), j), np.full(inner2.sum(), d1), False, source
        )
        jd[0] = d0
        jd[f == 0.5] = j
    else:  # days
        if anchor == "june":
            start, stop = j, j_next
            positions = [(p + Fraction(1, 2)) % 1 for p in positions]
        else:
            stop = d1
        day0, day1 = _local_day(np.array([start, stop]), lon_deg)
        lengths = day_parts(int(day1 - day0), parts)
        offsets = np.concatenate([[0], np.cumsum(lengths)[:-1]])
        jd_ut_noon = day0 + offsets - lon_deg / 360.0  # local mean noon of each day (JD .0 is noon)
        jd = np.asarray(tt_from_ut(jd_ut_noon), dtype=float)
        return jd, jd - start, lengths.astype(float), positions
    following = np.append(jd[1:], d1)
    return jd, jd - start, following - jd, positions


def divisions(
    year: int,
    scheme: str,
    parts: int,
    *,
    observer: Observer | None = None,
    horizon=None,
    source: str = "auto",
    anchor: str = "december",
    calendar: str = "auto",
) -> list[Division]:
    """The divisions of year ``year`` into ``parts`` parts under ``scheme`` (see the module notes).

    Parameters
    ----------
    year : astronomical year (0 = 1 BC), −10000…+2999 (…+2998 for ``days`` anchored in June); the year
        runs from the December solstice of ``year − 1`` to that of ``year``.
    scheme : ``"longitude"``, ``"time"``, ``"days"``, ``"declination"`` or ``"all"`` (all four, in that order).
    parts : N, a whole number ≥ 2 (≤ 365 for ``days``).
    observer : the site; gives the latitude for the azimuths, the air for refraction, and local dates.
        Without it the azimuths are nan and dates are in UT.
    horizon : a :class:`~lightpath.sky.horizon.HorizonProfile` (apparent altitudes); None = flat, altitude 0.
    source : Sun position source for :func:`lightpath.sky.sun.geocentric_sun`.
    anchor : solstice the ``days`` scheme counts from, ``"december"`` or ``"june"``.
    calendar : ``"auto"``, ``"julian"`` or ``"gregorian"`` for the dates.

    Returns
    -------
    list of :class:`Division`, scheme by scheme, in order of index.

    Examples
    --------
    >>> from lightpath.sky.observer import Observer
    >>> site = Observer(latitude_deg=53.452, longitude_deg=104.637)   # the invented Larchfold demo site
    >>> d = divisions(-2599, "time", 8, observer=site)
    >>> [(x.name, x.date) for x in d[:3]]  # Julian dates, ~20 days later in the year than today's then
    [('december_solstice', '-2599-01-10'), ('cross_quarter_feb', '-2599-02-25'), ('march_equinox', '-2599-04-13')]
    >>> d[0].calendar, round(d[0].declination_deg, 2), round(d[0].sunrise_azimuth_deg, 1)
    ('julian', -23.98, 132.0)
    """
    schemes = _check(year, scheme, parts, anchor, calendar, observer)
    y = int(year)
    june_next = "days" in schemes and anchor == "june"
    if june_next and y + 1 > YEAR_MAX:
        raise InputError(
            f"year {y}: the days scheme anchored in June needs the June solstice of {y + 1}, "
            f"beyond the last supported year {YEAR_MAX}"
        )
    source = year_span_source(y, y + 1 if june_next else y, source)
    q = _quarter_days_unchecked(np.array([y, y + 1] if june_next else [y]), source)
    d0 = float(_opening_december(q, source)[0])
    dec_sol, jun_sol = q.december_solstice_jd_tt, q.june_solstice_jd_tt
    solstices = (d0, float(jun_sol[0]), float(dec_sol[0]), float(jun_sol[1]) if june_next else np.nan)
    lon = observer.longitude_deg if observer is not None else 0.0
    out: list[Division] = []
    for name in schemes:
        jd, from_start, part_days, positions = _scheme_instants(name, int(parts), anchor, solstices, source, lon)
        sun = _sun(jd, source)
        dec = np.asarray(sun.declination_deg, dtype=float)
        jd_ut = np.asarray(ut_from_tt(jd), dtype=float)
        if observer is not None:
            from lightpath.sky.sun import sun_position

            lat_h = np.asarray(sun_position(jd, observer, source=source).local_apparent_time_h, dtype=float)
            day = np.atleast_1d(local_apparent_day_number(jd_ut, lon, lat_h))
        else:
            day = np.floor(jd_ut + 0.5).astype(np.int64)  # the UT day
        dates = format_date(day.astype(float), calendar)
        cals = calendar_for(day.astype(float), calendar)
        az = {}
        if observer is not None:
            s_deg = _SEMIDIAMETER_1AU_DEG / np.asarray(sun.distance_au, dtype=float)
            common = dict(
                horizon=horizon,
                refraction=observer.refraction,
                pressure_mbar=observer.pressure_mbar,
                temperature_c=observer.temperature_c,
                semidiameter_deg=s_deg,
            )
            for limb in ("centre", "upper", "lower"):
                az[limb] = rise_set_azimuths(dec, observer.latitude_deg, limb=limb, **common)
        nan = np.full(jd.shape, np.nan)
        rise = {limb: az.get(limb, (nan, nan))[0] for limb in ("centre", "upper", "lower")}
        sets = {limb: az.get(limb, (nan, nan))[1] for limb in ("centre", "upper", "lower")}
        lon_ecl = np.asarray(sun.ecliptic_longitude_deg, dtype=float)
        for i in range(jd.size):
            out.append(
                Division(
                    scheme=name,
                    index=i,
                    name=division_name(positions[i]),
                    jd_tt=float(jd[i]),
                    jd_ut=float(jd_ut[i]),
                    date=str(dates[i]),
                    calendar=str(cals[i]),
                    days_from_start=float(from_start[i]),
                    part_days=float(part_days[i]),
                    ecliptic_longitude_deg=float(lon_ecl[i]),
                    declination_deg=float(dec[i]),
                    sunrise_azimuth_deg=float(rise["centre"][i]),
                    sunset_azimuth_deg=float(sets["centre"][i]),
                    sunrise_first_gleam_azimuth_deg=float(rise["upper"][i]),
                    sunset_last_gleam_azimuth_deg=float(sets["upper"][i]),
                    sunrise_full_disc_azimuth_deg=float(rise["lower"][i]),
                    sunset_full_disc_azimuth_deg=float(sets["lower"][i]),
                    day=int(day[i]),
                )
            )
    return out
