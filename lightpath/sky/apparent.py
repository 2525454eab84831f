"""The apparent place of date of any body, from its GCRS vector to topocentric azimuth and altitude.

The steps after the ephemeris, shared by the Sun (:mod:`lightpath.sky.sun`) and the Moon
(:mod:`lightpath.sky.moon`):

1. to the true equator and equinox of date with the long-term bias-precession-nutation matrix
   (Vondrák et al. 2011 + IAU 2000B, long-term far from J2000, :mod:`lightpath.sky.orientation`),
   with the equation of the origins and the true obliquity (:func:`apparent_columns`);
2. right ascension, declination, distance and ecliptic longitude/latitude of date (:func:`angles_of_date`);
3. UT1 = TT − ΔT with ΔT's σ (:func:`delta_t_with_sigma`);
4. Earth rotation, the observer's WGS84 place (diurnal parallax), diurnal aberration and refraction
   (:func:`topocentric_columns`).

References
----------
Meeus, J. (1998). *Astronomical Algorithms*, 2nd ed., chapters 13 (alt/az), 28 (equation of time), 40 (parallax).

Urban, S. E., & Seidelmann, P. K. (eds.) (2013). *Explanatory Supplement to the
Astronomical Almanac*, 3rd ed., ch. 7 (diurnal aberration and parallax).

Vondrák, J., Capitaine, N., & Wallace, P. (2011). New precession expressions, valid for long time intervals.
*Astronomy & Astrophysics* 534, A22.
"""

from __future__ import annotations

import erfa
import numpy as np
from numpy.typing import ArrayLike, NDArray

from lightpath.sky import cio, orientation
from lightpath.sky.nodes import chebyshev_blocks
from lightpath.sky.nutation import nutation_rad
from lightpath.sky.observer import Observer
from lightpath.sky.refraction import apparent_altitude
from lightpath.sky.sources import SunSource
from lightpath.threads import split_map

__all__ = ["angles_of_date", "apparent_columns", "delta_t_with_sigma", "topocentric_columns"]

_AU_M = erfa.DAU  # metres per au (IAU 2012)
_C_M_S = erfa.CMPS  # speed of light, m/s
_OMEGA_EARTH_RAD_S = 7.292115e-5  # mean angular velocity of the Earth (IERS Conventions 2010, Table 1.1)
_SLOW_BLOCK_DAYS = 512.0
_SLOW_DEGREE = 6
_NUTATION_BLOCK_DAYS = 32.0
_NUTATION_DEGREE = 20
_R2D = 180.0 / np.pi


def _slow_orientation(jd: NDArray) -> NDArray:
    """(n, 11): bias-precession matrix (9), mean obliquity and s + XY/2 (radians)."""
    pb = orientation.bias_precession_matrix(jd).reshape(-1, 9)  # Vondrák et al. (2011)
    eps_mean = orientation.mean_obliquity_deg(jd) / _R2D  # angle between the long-term poles
    return np.column_stack([pb, eps_mean, cio.s_plus_half_xy_rad(jd)])  # CIO locator: integrated, long-term


def _nutation_columns(jd: NDArray) -> NDArray:
    """(n, 2): Δψ, Δε (radians): IAU 2000B over 1900–2100, its long-term form far from J2000 (sky.nutation)."""
    return split_map(lambda t: np.column_stack(nutation_rad(t)), jd)


def apparent_columns(src: SunSource, jd: NDArray) -> NDArray:
    """(n, 5) for TT Julian dates ``jd`` (n,) and a source of GCRS apparent vectors.

    Columns: true-of-date apparent vector (au, 3), equation of the origins (rad), true obliquity (rad).
    """
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


def angles_of_date(cols: NDArray) -> tuple[NDArray, ...]:
    """Right ascension, declination (rad), distance (au), ecliptic longitude and latitude of date (rad)."""
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


def delta_t_with_sigma(jd: NDArray, delta_t_s: ArrayLike | None) -> tuple[NDArray, NDArray]:
    """ΔT and its σ (s) at TT Julian dates: the model (:mod:`lightpath.sky.deltat`), or a given ΔT with σ = 0."""
    if delta_t_s is None:
        from lightpath.sky import deltat

        return np.asarray(deltat.delta_t_s(jd), dtype=float), np.asarray(deltat.delta_t_sigma_s(jd), dtype=float)
    dt = np.broadcast_to(np.asarray(delta_t_s, dtype=float), jd.shape).copy()
    return dt, np.zeros_like(dt)


def topocentric_columns(cols: NDArray, jd_ut: NDArray, observer: Observer) -> NDArray:
    """(n, 11) topocentric columns from :func:`apparent_columns` (n, 5) at UT1 instants (n,).

    Columns: azimuth, apparent and geometric altitude, right ascension, declination, hour angle, ecliptic
    longitude (deg), geocentric and topocentric distance (au), equation of time (min), local apparent time (h);
    see :func:`lightpath.sky.sun.sun_position`.
    """
    ra, dec, dist, lon_ecl, _ = angles_of_date(cols)
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
