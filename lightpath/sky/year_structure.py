"""The year's structure at a site, as numbers: quarter days, half-years, seasons and divisions of the year.

What ``lightpath year`` prints, computed here so that the command only formats it.  Days are local
apparent days at the site (:func:`lightpath.sky.instants.local_apparent_day_number`), times of day
hours of local apparent time.

>>> from lightpath.sky.observer import Observer
>>> ys = year_structure(2027, Observer(latitude_deg=38.947, longitude_deg=-98.412), parts=4, scheme="longitude")
>>> [q.name for q in ys.quarter_days][:2], len(ys.divisions)
(['december_solstice', 'march_equinox'], 4)
>>> round(ys.half_years["december_to_june_days"], 1)
181.7

References
----------
Meeus, J. (1998). *Astronomical Algorithms*, 2nd ed., ch. 27 (equinoxes and solstices), ch. 28 (equation of time).
"""

from __future__ import annotations

from collections.abc import Callable
from dataclasses import dataclass

import numpy as np

from lightpath.sky.calendar import calendar_for
from lightpath.sky.deltat import delta_t_sigma_s, ut_from_tt
from lightpath.sky.divisions import SCHEMES, Division, divisions
from lightpath.sky.instants import local_apparent_day_number
from lightpath.sky.observer import Observer
from lightpath.sky.seasons import QUARTER_NAMES, half_years, opening_december_solstice, quarter_days, season_lengths
from lightpath.sky.tables import Tabular

__all__ = ["QuarterDay", "YearStructure", "year_structure"]


@dataclass(frozen=True)
class QuarterDay(Tabular):
    """A solstice or equinox: its instant (JD TT and UT), local apparent day and time, ΔT's σ (s)."""

    _day_columns = ("local_apparent_day",)

    name: str
    of_year: int  # the year it belongs to (the opening December solstice belongs to Y − 1)
    jd_tt: float
    jd_ut: float
    local_apparent_day: int
    calendar: str
    local_apparent_time_h: float
    delta_t_sigma_s: float


@dataclass(frozen=True)
class YearStructure(Tabular):
    """The structure of one year at a site (see the module notes); lengths in days."""

    _tables = ("quarter_days", "divisions")

    year: int
    observer: Observer
    source: str
    parts: int
    anchor: str
    quarter_days: list[QuarterDay]
    half_years: dict[str, float]
    seasons_days: dict[str, float]
    divisions: list[Division]


def year_structure(
    year: int,
    observer: Observer,
    *,
    parts: int = 8,
    scheme: str = "all",
    anchor: str = "december",
    horizon=None,
    calendar: str = "auto",
    source: str = "auto",
    progress: Callable[[], None] | None = None,
) -> YearStructure:
    """Quarter days, half-years, seasons and divisions of ``year`` (astronomical) at ``observer``.

    ``scheme`` is one of :data:`lightpath.sky.divisions.SCHEMES` or ``"all"``; ``horizon`` a
    :class:`~lightpath.sky.horizon.HorizonProfile` for the rising and setting azimuths (None: flat);
    ``progress()`` is called after each scheme.
    """
    from lightpath.sky.sun import sun_position

    schemes = list(SCHEMES) if scheme == "all" else [scheme]
    divs: list[Division] = []
    for name in schemes:
        divs += divisions(
            year, name, parts, observer=observer, horizon=horizon, source=source, anchor=anchor, calendar=calendar
        )
        if progress is not None:
            progress()
    q = quarter_days(year, source=source)
    prev_dec = float(opening_december_solstice(year, source=source))  # December of year - 1
    names = ["december_solstice", *QUARTER_NAMES]
    jd_tt = np.array([prev_dec] + [float(q.jd_tt(n)) for n in QUARTER_NAMES], dtype=float)
    jd_ut = np.asarray(ut_from_tt(jd_tt), dtype=float)
    lat_h = np.asarray(sun_position(jd_tt, observer, source=source).local_apparent_time_h, dtype=float)
    sigma = np.asarray(delta_t_sigma_s(jd_tt), dtype=float)
    day = np.atleast_1d(local_apparent_day_number(jd_ut, observer.longitude_deg, lat_h))
    cals = np.atleast_1d(calendar_for(day.astype(float), calendar))
    quarter = [
        QuarterDay(
            name,
            int(year - 1 if i == 0 else year),
            float(jd_tt[i]),
            float(jd_ut[i]),
            int(day[i]),
            str(cals[i]),
            float(lat_h[i]),
            float(sigma[i]),
        )  # fmt: skip
        for i, name in enumerate(names)
    ]
    h = half_years(year, source=source)
    s = season_lengths(year, source=source)
    halves = {
        "december_to_june_days": float(h.december_to_june_days),
        "june_to_december_days": float(h.june_to_december_days),
    }
    seasons = {
        "december_to_march_days": float(s.december_to_march_days),
        "march_to_june_days": float(s.march_to_june_days),
        "june_to_september_days": float(s.june_to_september_days),
        "september_to_december_days": float(s.september_to_december_days),
    }
    return YearStructure(int(year), observer, q.source, int(parts), anchor, quarter, halves, seasons, divs)
