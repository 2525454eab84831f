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

import erfa
import numpy as np
from numpy.typing import ArrayLike, NDArray

from lightpath.sky import cio, orientation
from lightpath.sky.nodes import chebyshev_blocks, lagrange_on_grid
from lightpath.sky.nutation import nutation_rad
from lightpath.sky.observer import Observer
from lightpath.sky.refraction import apparent_altitude
from lightpath.sky.sources import SunSource, choose_source, warn_if_unverified
from lightpath.sky.vectors import azalt_from_enu, enu_from_azalt
from lightpath.threads import split_map

__all__ = [
    "GeocentricSun",
    "SUN_SEMIDIAMETER_1AU_ARCSEC",
    "SunPosition",
    "azalt_from_enu",
    "enu_from_azalt",
    "geocentric_sun",
    "sun_position",
]

#: Semi-diameter of the Sun at 1 au: 959.63″ (Auwers 1891, as used by Meeus 1998 ch. 55; from memory).
SUN_SEMIDIAMETER_1AU_ARCSEC = 959.63
_DAY_S = 86400.0
_AU_M = erfa.DAU  # metres per au (IAU 2012)
_C_M_S = erfa.CMPS  # speed of light, m/s
_OMEGA_EARTH_RAD_S = 7.292115e-5  # mean angular velocity of the Earth (IERS Conventions 2010, Table 1.1)
_NODE_STEP_DAYS = 0.5
_SLOW_BLOCK_DAYS = 512.0
_SLOW_DEGREE = 6
_NUTATION_BLOCK_DAYS = 32.0
_NUTATION_DEGREE = 20
_CORE_BLOCK_DAYS = 32.0
_CORE_DEGREE = 18
_R2D = 180.0 / np.pi


@dataclass(frozen=True)
class GeocentricSun:
    """Geocentric apparent Sun, true equator/ecliptic and equinox of date; arrays shaped like ``jd_tt``.

    ecliptic_longitude_deg, ecliptic_latitude_deg : apparent, ecliptic of date, true equinox (degrees).
    right_ascension_deg, declination_deg : apparent, true equator and equinox of date (degrees).
    distance_au : Earth–Sun distance (au). source : where the positions came from.
    """

    jd_tt: NDArray
    ecliptic_longitude_deg: NDArray
    ecliptic_latitude_deg: NDArray
    right_ascension_deg: NDArray
    declination_deg: NDArray
    distance_au: NDArray
    source: str


@dataclass(frozen=True)
class SunPosition:
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


def _slow_orientation(jd: NDArray) -> NDArray:
    """(n, 11): bias-precession matrix (9), mean obliquity and s + XY/2 (radians)."""
    pb = orientation.bias_precession_matrix(jd).reshape(-1, 9)  # Vondrák et al. (2011)
    eps_mean = orientation.mean_obliquity_deg(jd) / _R2D  # angle between the long-term poles
    return np.column_stack([pb, eps_mean, cio.s_plus_half_xy_rad(jd)])  # CIO locator: integrated, long-term


def _nutation_columns(jd: NDArray) -> NDArray:
    """(n, 2): Δψ, Δε (radians): IAU 2000B over 1900–2100, its long-term form far from J2000 (sky.nutation)."""
    return split_map(lambda t: np.column_stack(nutation_rad(t)), jd)


def _core(src: SunSource, jd: NDArray) -> NDArray:
    """(n, 5): true-of-date apparent vector (au), equation of the origins (rad), true obliquity (rad)."""
    gcrs = src.gcrs_apparent_au(jd)
    # precession, obliquity and the CIO locator change over centuries: 512-day Chebyshev blocks of degree 6
    slow = chebyshev_blocks(_slow_orientation, jd, _SLOW_BLOCK_DAYS, _SLOW_DEGREE)
    pb = slow[:, :9].reshape(-1, 3, 3)
    eps_mean, s_plus = slow[:, 9], slow[:, 10]
    # IAU 2000B (McCarthy & Luzum 2003): 32-day Chebyshev blocks of degree 20 when that saves work
    # (its fastest sizeable term, 9.13 days and 0.03″, is held to 0.0002″)
    nut = chebyshev_blocks(_nutation_columns, jd, _NUTATION_BLOCK_DAYS, _NUTATION_DEGREE)
    dpsi, deps = nut[:, 0], nut[:, 1]
    rnpb = np.matmul(erfa.numat(eps_mean, dpsi, deps), pb)
    tod = np.einsum("nij,nj->ni", rnpb, gcrs)
    s = s_plus - rnpb[:, 2, 0] * rnpb[:, 2, 1] / 2.0
    eo = erfa.eors(rnpb, s)
    return np.column_stack([tod, eo, eps_mean + deps])


def _core_at(src: SunSource, jd_tt: NDArray) -> NDArray:
    """The core at every instant: from 0.5-day nodes or 32-day blocks when that saves work."""

    def blocked(t: NDArray) -> NDArray:
        # moderately dense sets (≥ 0.6 instants per day): the whole core on 32-day Chebyshev blocks
        return chebyshev_blocks(lambda u: _core(src, u), t, _CORE_BLOCK_DAYS, _CORE_DEGREE)

    # dense sets (≥ 2 instants per day): cubic Lagrange from 0.5-day nodes
    return lagrange_on_grid(blocked, np.asarray(jd_tt, dtype=float), _NODE_STEP_DAYS)


def _geocentric_angles(cols: NDArray) -> tuple[NDArray, ...]:
    x, y, z, _, eps = np.moveaxis(cols, -1, 0)
    dist = np.sqrt(x * x + y * y + z * z)
    ra = np.arctan2(y, x) % (2.0 * np.pi)
    dec = np.arcsin(z / dist)
    # ecliptic of date: rotate about x by the true obliquity (Meeus 1998 eq. 13.1, vector form)
    ye = y * np.cos(eps) + z * np.sin(eps)
    ze = -y * np.sin(eps) + z * np.cos(eps)
    lon = np.arctan2(ye, x) % (2.0 * np.pi)
    lat = np.arcsin(ze / dist)
    return ra, dec, dist, lon, lat


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
    ra, dec, dist, lon, lat = _geocentric_angles(_core_at(src, jd))
    return GeocentricSun(
        jd_tt=jd,
        ecliptic_longitude_deg=lon * _R2D,
        ecliptic_latitude_deg=lat * _R2D,
        right_ascension_deg=ra * _R2D,
        declination_deg=dec * _R2D,
        distance_au=dist,
        source=src.name,
    )


def _delta_t(jd: NDArray, delta_t_s: ArrayLike | None) -> tuple[NDArray, NDArray]:
    if delta_t_s is None:
        from lightpath.sky import deltat

        return np.asarray(deltat.delta_t_s(jd), dtype=float), np.asarray(deltat.delta_t_sigma_s(jd), dtype=float)
    dt = np.broadcast_to(np.asarray(delta_t_s, dtype=float), jd.shape).copy()
    return dt, np.zeros_like(dt)


def _topocentric(cols: NDArray, jd_ut: NDArray, observer: Observer) -> NDArray:
    """(n, 11) topocentric columns from the core (n, 5) at UT1 instants (n,); see :func:`sun_position`."""
    ra, dec, dist, lon_ecl, _ = _geocentric_angles(cols)
    with np.errstate(invalid="ignore"):  # nan instants stay nan quietly
        era = erfa.era00(jd_ut, 0.0)  # IERS Conventions (2010) eq. 5.15
    gast = era - cols[..., 3]  # GAST = ERA − EO (ERFA gst06)

    lat = np.radians(observer.latitude_deg)
    lon = np.radians(observer.longitude_deg)
    obs_itrs_au = erfa.gd2gc(1, lon, lat, observer.elevation_m) / _AU_M  # WGS84
    # Sun in the terrestrial frame (polar motion ignored): longitude α − GAST
    theta = ra - gast
    cd = np.cos(dec)
    sun_ter = dist[..., None] * np.stack([cd * np.cos(theta), cd * np.sin(theta), np.sin(dec)], axis=-1)
    topo = sun_ter - obs_itrs_au  # diurnal parallax
    r_topo = np.linalg.norm(topo, axis=-1)
    u = topo / r_topo[..., None]
    # diurnal aberration: observer velocity ω × r (first order, Explanatory Supplement ch. 7)
    v = _OMEGA_EARTH_RAD_S * _AU_M / _C_M_S * np.array([-obs_itrs_au[1], obs_itrs_au[0], 0.0])
    u = u + v - np.sum(u * v, axis=-1)[..., None] * u
    u = u / np.linalg.norm(u, axis=-1)[..., None]

    sl, cl, sp, cp = np.sin(lon), np.cos(lon), np.sin(lat), np.cos(lat)
    east = u[..., 0] * -sl + u[..., 1] * cl
    north = u[..., 0] * (-sp * cl) + u[..., 1] * (-sp * sl) + u[..., 2] * cp
    up = u[..., 0] * (cp * cl) + u[..., 1] * (cp * sl) + u[..., 2] * sp
    az = np.degrees(np.arctan2(east, north)) % 360.0
    alt_geo = np.degrees(np.arcsin(np.clip(up, -1.0, 1.0)))
    alt_app = apparent_altitude(alt_geo, observer.refraction, observer.pressure_mbar, observer.temperature_c)

    # local apparent time from the geocentric hour angle; mean time from UT1 and longitude (Meeus 1998 ch. 28)
    ha = (np.degrees(gast + lon - ra) + 180.0) % 360.0 - 180.0
    lat_h = (12.0 + ha / 15.0) % 24.0
    lmt_h = ((jd_ut + 0.5) % 1.0) * 24.0 + observer.longitude_deg / 15.0
    eot_min = ((lat_h - lmt_h + 12.0) % 24.0 - 12.0) * 60.0
    columns = (az, alt_app, alt_geo, ra * _R2D, dec * _R2D, ha, lon_ecl * _R2D, dist, r_topo, eot_min, lat_h)
    return np.stack(columns, axis=-1)


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
    cols = _core_at(src, jd)
    dt_s, dt_sigma = _delta_t(jd, delta_t_s)
    jd_ut = jd - dt_s / _DAY_S
    out = split_map(functools.partial(_topocentric, observer=observer), cols.reshape(-1, 5), jd_ut.reshape(-1))
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
