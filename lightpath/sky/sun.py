"""The Sun's apparent place for any epoch: geocentric and topocentric, azimuth and altitude.

Pipeline (the same for both sources, :mod:`lightpath.sky.sources`):

1. apparent geocentric GCRS vector of the Sun (light time, aberration) from
   JPL DE421/any kernel or VSOP87D;
2. to the true equator and equinox of date with the long-term
   bias-precession-nutation matrix (Vondrák et al. 2011 + IAU 2000B, long-term far from J2000,
   :mod:`lightpath.sky.orientation`) → right ascension, declination, distance;
   ecliptic longitude of date with the true obliquity;
3. Earth rotation: GAST = ERA(UT1) − equation of the origins (ERFA ``gst06``
   form, with the CIO locator integrated for the long-term pole,
   :mod:`lightpath.sky.cio`), UT1 = TT − ΔT (:mod:`lightpath.sky.deltat` or a
   given number);
4. topocentric: the observer's WGS84 position (ERFA ``gd2gc``) subtracted
   (diurnal parallax, up to 8.8″) and diurnal aberration (≤ 0.32″) applied;
   azimuth/altitude in the East-North-Up frame of the ellipsoid normal;
   polar motion ignored (< 0.5″);
5. refraction of the disc centre by the observer's model (Bennett 1982 or
   Sæmundsson 1986, scaled by pressure and temperature) or none.

Speed: steps 1–2 (the costly part) are evaluated at 0.5-day nodes and
interpolated (cubic Lagrange) when the instants are dense enough to save work,
or on 32-day Chebyshev blocks of degree 18 for sets of about one instant a day;
inside them, the slowly changing pieces (VSOP87's terms with periods over 120
days, precession, obliquity, the CIO locator and nutation) are sampled on
Chebyshev blocks (:mod:`lightpath.sky.nodes`) when that saves work.  Each
shortcut is compared with direct evaluation in ``tests/test_sun_sources.py``
and ``tests/test_sun_vsop87.py``: < 0.001″.  Long arrays run on all cores
(:mod:`lightpath.threads`), bit-for-bit as on one.

VSOP87D before 3000 BC (outside the span checked against JPL DE406) raises a
:class:`~lightpath.sky.sources.SunAccuracyWarning`.

>>> from lightpath.sky.observer import Observer
>>> obs = Observer(latitude_deg=39.742476, longitude_deg=-105.1786, elevation_m=1830.14,
...                pressure_mbar=820.0, temperature_c=11.0, refraction="saemundsson1986")
>>> p = sun_position(2452930.312847 + 67.0 / 86400, obs, delta_t_s=67.0)  # NREL SPA example
>>> f"{90.0 - float(p.altitude_deg):.4f} {float(p.azimuth_deg):.4f}"  # SPA: 50.11162, 194.34024
'50.1116 194.3400'
>>> p.source
'JPL DE421 via skyfield'

References
----------
Reda, I., & Andreas, A. (2004). *Solar Position Algorithm for Solar Radiation
Applications*. NREL/TP-560-34302 (topocentric method, parallax, worked example).

Meeus, J. (1998). *Astronomical Algorithms*, 2nd ed., chapters 13 (alt/az), 25 (Sun),
28 (equation of time), 40 (parallax).

Urban, S. E., & Seidelmann, P. K. (eds.) (2013). *Explanatory Supplement to the
Astronomical Almanac*, 3rd ed., ch. 7 (diurnal aberration and parallax).
"""

from __future__ import annotations

import functools
from dataclasses import dataclass

import numpy as np
from numpy.typing import ArrayLike, NDArray

from lightpath.sky.apparent import angles_of_date, apparent_columns, delta_t_with_sigma, topocentric_columns
from lightpath.sky.nodes import chebyshev_blocks, lagrange_on_grid
from lightpath.sky.observer import Observer
from lightpath.sky.sources import SunSource, choose_source, warn_if_unverified
from lightpath.sky.tables import Tabular
from lightpath.sky.vectors import azalt_from_enu, enu_from_azalt
from lightpath.threads import split_map

__all__ = [
    "GeocentricSun",
    "SUN_SEMIDIAMETER_1AU_ARCSEC",
    "SunPosition",
    "azalt_from_enu",
    "enu_from_azalt",
    "geocentric_sun",
    "sun_apparent_columns",
    "sun_position",
]

#: Semi-diameter of the Sun at 1 au: 959.63″ (Auwers 1891, as used by Meeus 1998 ch. 55; from memory).
SUN_SEMIDIAMETER_1AU_ARCSEC = 959.63
_DAY_S = 86400.0
_NODE_STEP_DAYS = 0.5
_CORE_BLOCK_DAYS = 32.0
_CORE_DEGREE = 18
_R2D = 180.0 / np.pi


@dataclass(frozen=True)
class GeocentricSun(Tabular):
    """Geocentric apparent Sun, true equator/ecliptic and equinox of date; arrays shaped like ``jd_tt``.

    ecliptic_longitude_deg, ecliptic_latitude_deg : apparent, ecliptic of date, true equinox (degrees).
    right_ascension_deg, declination_deg : apparent, true equator and equinox of date (degrees).
    distance_au : Earth–Sun distance (au). source : where the positions came from.
    """

    _columnar = True

    jd_tt: NDArray
    ecliptic_longitude_deg: NDArray
    ecliptic_latitude_deg: NDArray
    right_ascension_deg: NDArray
    declination_deg: NDArray
    distance_au: NDArray
    source: str


@dataclass(frozen=True)
class SunPosition(Tabular):
    """The Sun seen from a site; every array has the shape of ``jd_tt``.

    Times: jd_tt, jd_ut (UT1 Julian dates), delta_t_s and delta_t_sigma_s (seconds; σ is 0
    when ΔT was given by the user). Angles in degrees: azimuth_deg (true north, clockwise),
    altitude_deg (apparent: refracted by the observer's model; geometric if refraction is None),
    altitude_geometric_deg (topocentric, unrefracted), right_ascension_deg / declination_deg
    (geocentric apparent, true equator of date), hour_angle_deg (local, geocentric, −180..180),
    ecliptic_longitude_deg (geocentric apparent, of date), semidiameter_deg (topocentric).
    distance_au (geocentric), equation_of_time_min (apparent − mean solar time, minutes),
    local_apparent_time_h (0..24 hours), source.
    """

    _columnar = True

    jd_tt: NDArray
    jd_ut: NDArray
    delta_t_s: NDArray
    delta_t_sigma_s: NDArray
    azimuth_deg: NDArray
    altitude_deg: NDArray
    altitude_geometric_deg: NDArray
    right_ascension_deg: NDArray
    declination_deg: NDArray
    hour_angle_deg: NDArray
    ecliptic_longitude_deg: NDArray
    distance_au: NDArray
    semidiameter_deg: NDArray
    equation_of_time_min: NDArray
    local_apparent_time_h: NDArray
    source: str


def sun_apparent_columns(src: SunSource, jd_tt: NDArray) -> NDArray:
    """The Sun's :func:`~lightpath.sky.apparent.apparent_columns` at TT instants (from 0.5-day nodes or 32-day
    blocks when that saves work)."""

    def blocked(t: NDArray) -> NDArray:
        # moderately dense sets (≥ 0.6 instants per day): the whole core on 32-day Chebyshev blocks
        return chebyshev_blocks(lambda u: apparent_columns(src, u), t, _CORE_BLOCK_DAYS, _CORE_DEGREE)

    # dense sets (≥ 2 instants per day): cubic Lagrange from 0.5-day nodes
    return lagrange_on_grid(blocked, np.asarray(jd_tt, dtype=float), _NODE_STEP_DAYS)


def geocentric_sun(jd_tt: ArrayLike, source: str = "auto", ephemeris_path: str | None = None) -> GeocentricSun:
    """Geocentric apparent Sun of date for TT Julian dates (any shape; nan propagates).

    Fast for many instants (dense sets are interpolated from 0.5-day nodes).

    >>> g = geocentric_sun(2448908.5)  # Meeus (1998) Example 25.b, 1992 Oct 13.0 TD
    >>> round(float(g.declination_deg), 5)  # Meeus: −7°47′01.74″ = −7.783806° (from memory)
    -7.78381
    """
    jd = np.asarray(jd_tt, dtype=float)
    src = choose_source(jd, source, ephemeris_path)
    warn_if_unverified(src, jd)
    ra, dec, dist, lon, lat = angles_of_date(sun_apparent_columns(src, jd))
    return GeocentricSun(
        jd_tt=jd,
        ecliptic_longitude_deg=lon * _R2D,
        ecliptic_latitude_deg=lat * _R2D,
        right_ascension_deg=ra * _R2D,
        declination_deg=dec * _R2D,
        distance_au=dist,
        source=src.name,
    )


def sun_position(
    jd_tt: ArrayLike,
    observer: Observer,
    *,
    source: str = "auto",
    delta_t_s: ArrayLike | None = None,
    ephemeris_path: str | None = None,
) -> SunPosition:
    """Topocentric apparent azimuth and altitude of the Sun (and its geocentric place) at TT instants.

    Parameters
    ----------
    jd_tt : Julian dates of TT, any shape (nan propagates).
    observer : site and air (:class:`~lightpath.sky.observer.Observer`).
    source : ``"auto"``, ``"jpl"``, ``"vsop87"`` or a path to a ``.bsp`` kernel (see ``choose_source``).
    delta_t_s : ΔT = TT − UT1 in seconds (number or array) overriding the model; None uses
        :func:`lightpath.sky.deltat.delta_t_s`.
    ephemeris_path : a user JPL kernel instead of DE421.
    """
    jd = np.asarray(jd_tt, dtype=float)
    src = choose_source(jd, source, ephemeris_path)
    warn_if_unverified(src, jd)
    cols = sun_apparent_columns(src, jd)
    dt_s, dt_sigma = delta_t_with_sigma(jd, delta_t_s)
    jd_ut = jd - dt_s / _DAY_S
    out = split_map(functools.partial(topocentric_columns, observer=observer), cols.reshape(-1, 5), jd_ut.reshape(-1))
    az, alt_app, alt_geo, ra, dec, ha, lon_ecl, dist, r_topo, eot_min, lat_h = (
        np.ascontiguousarray(c).reshape(jd.shape) for c in np.moveaxis(out, -1, 0)
    )
    return SunPosition(
        jd_tt=jd,
        jd_ut=jd_ut,
        delta_t_s=dt_s,
        delta_t_sigma_s=dt_sigma,
        azimuth_deg=az,
        altitude_deg=alt_app,
        altitude_geometric_deg=alt_geo,
        right_ascension_deg=ra,
        declination_deg=dec,
        hour_angle_deg=ha,
        ecliptic_longitude_deg=lon_ecl,
        distance_au=dist,
        semidiameter_deg=SUN_SEMIDIAMETER_1AU_ARCSEC / 3600.0 / r_topo,
        equation_of_time_min=eot_min,
        local_apparent_time_h=lat_h,
        source=src.name,
    )
