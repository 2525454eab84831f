"""Magnetic declination for a survey date and place, from the International Geomagnetic Reference Field.

A compass survey gives bearings from magnetic north; true azimuth = magnetic bearing + declination (east
positive).  When a scene names a survey date but no declination, the declination comes from the IGRF's
spherical-harmonic model (the ``ppigrf`` package, which ships the IGRF-14 coefficients) as D = atan2(B_east,
B_north) at the site's latitude, longitude and elevation.  The model spans 1900-01-01 to 2030-01-01 (its last
five years are a predicted secular variation); a date outside it is refused.

>>> import datetime
>>> d = magnetic_declination_deg(41.62, -8.05, 0.0, datetime.date(2024, 5, 3))
>>> -3.0 < d < 1.0   # north-west Iberia, 2024: about 1 deg W (from memory)
True

References
----------
Alken, P. et al. (2021). International Geomagnetic Reference Field: the thirteenth generation. *Earth, Planets
and Space* 73, 49.  IAGA Working Group V-MOD (2024). IGRF-14, doi:10.5281/zenodo.14012302.
Laundal, K. M. ``ppigrf``: a pure-Python IGRF (MIT licence).
"""

from __future__ import annotations

import datetime
import math
from functools import lru_cache

from lightpath.errors import InputError

__all__ = ["IGRF_MODEL", "igrf_span", "magnetic_declination_deg", "survey_date"]

#: The model used, for messages and reports.
IGRF_MODEL = "IGRF-14"


@lru_cache(maxsize=1)
def igrf_span() -> tuple[datetime.date, datetime.date]:
    """First and last date the IGRF coefficients cover."""
    import ppigrf

    g, _ = ppigrf.ppigrf.read_shc(ppigrf.ppigrf.shc_fn_igrf14)
    return g.index[0].date(), g.index[-1].date()


def survey_date(value, key: str = "site.survey_date") -> datetime.date:
    """A survey date from a TOML date (``2024-05-03``) or a string ``"2024-05-03"``; InputError naming ``key``."""
    if isinstance(value, datetime.datetime):
        return value.date()
    if isinstance(value, datetime.date):
        return value
    if isinstance(value, str):
        try:
            return datetime.date.fromisoformat(value.strip())
        except ValueError:
            pass
    raise InputError(f"{key}: not a date; accepted: YYYY-MM-DD, e.g. 2024-05-03 (with or without quotes)")


def magnetic_declination_deg(
    latitude_deg: float, longitude_deg: float, elevation_m: float, date: datetime.date, key: str = "site.survey_date"
) -> float:
    """Magnetic declination (degrees, east positive) at a place (WGS 84 degrees, metres) on ``date``.

    Raises InputError naming ``key`` for a date outside the IGRF's span.
    """
    import ppigrf

    first, last = igrf_span()
    if not first <= date <= last:
        raise InputError(
            f"{key}: {date.isoformat()} is outside the geomagnetic model {IGRF_MODEL} "
            f"({first.isoformat()}..{last.isoformat()}); give model.declination_deg instead"
        )
    when = datetime.datetime(date.year, date.month, date.day, 12)
    east, north, _ = ppigrf.igrf(longitude_deg, latitude_deg, elevation_m / 1000.0, when)
    return math.degrees(math.atan2(float(east.ravel()[0]), float(north.ravel()[0])))
