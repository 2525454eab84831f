"""The Moon's geocentric position over millennia: ELP/MPP02 mean arguments with Meeus's periodic series.

A compact long-term lunar theory for the epochs JPL DE421 does not cover:

* **mean arguments** — the Moon's mean longitude W1, its perigee W2 and node W3, the Earth–Moon
  barycentre's mean longitude T and perihelion ϖ′, as polynomials of degree 4 in time — from ELP/MPP02
  in its "DE405" form (Chapront & Francou 2003, Tables 1, 3 and 4 line 2): the constants and secular
  coefficients fitted to JPL DE405 and, for the quadratic and higher terms, to the long ephemeris DE406.
  These carry the Moon's tidal secular acceleration, which dominates the error of any lunar theory far
  from J2000 (1″/cy² of acceleration is 0.7° at 3000 BC);
* **periodic terms** — the 60 + 60 largest terms of ELP-2000/82 in longitude, distance and latitude as
  abridged by Meeus (1998, ch. 47, Tables 47.A and 47.B, with his additive terms for Venus, Jupiter and
  the Earth's flattening), evaluated with the Delaunay arguments D = W1 − T + 180°, l = W1 − W2,
  l′ = T − ϖ′, F = W1 − W3;
* the longitude from the **equinox of date**: ELP's W1 counts from the departure point γ′2000 on the
  ecliptic of date, so the general precession in longitude p_A of the long-term model (Vondrák et al.
  2011, :func:`lightpath.sky.orientation.general_precession_vondrak2011_rad`) is added, and the
  position turned into the GCRS with the same long-term ecliptic matrix (``erfa.ltecm``) as the Sun.

Accuracy, measured against JPL DE406 (``tests/test_moon_elp.py``, ``docs/moon.md``): the abridged series
sets the floor near J2000 (Meeus: about 10″ in longitude, 4″ in latitude); far from J2000 the error grows
with the remaining secular error of the mean arguments.  The full ELP/MPP02 series (some 35,000 terms,
distributed as data files by the Paris Observatory, not on a package registry) would lower the floor.

The **apparent** geocentric direction of the Moon is its geometric direction at t − τ (τ = r/c, 1.3 s):
the annual aberration of the Earth's motion and the barycentric light-time shift cancel for a body that
travels with the Earth, leaving the Moon's own geocentric motion during τ (≈ 0.7″).

>>> lon, lat, dist = moon_ecliptic_of_date(2448724.5)  # Meeus (1998) Example 47.a, 1992 April 12, 0h TD
>>> f"{np.degrees(lon):.3f} {np.degrees(lat):.3f} {dist:.0f}"  # Meeus: 133.162655°, −3.229126°, 368409.7 km
'133.163 -3.229 368410'

References
----------
Chapront, J., & Francou, G. (2003). The lunar theory ELP revisited. Introduction of new planetary
perturbations. *A&A* 404, 735–742 (ELP/MPP02; mean arguments and their DE405/DE406 fit).

Chapront-Touzé, M., & Chapront, J. (1983). The lunar ephemeris ELP 2000. *A&A* 124, 50–62.

Meeus, J. (1998). *Astronomical Algorithms*, 2nd ed., Willmann-Bell, ch. 47 (Tables 47.A, 47.B).

Vondrák, J., Capitaine, N., & Wallace, P. (2011). New precession expressions, valid for long time
intervals. *A&A* 534, A22.
"""

from __future__ import annotations

import functools
from importlib import resources

import erfa
import numpy as np
from numpy.typing import ArrayLike, NDArray

from lightpath.sky import orientation
from lightpath.sky.nodes import chebyshev_blocks
from lightpath.threads import split_map

__all__ = [
    "ELP_NAME",
    "mean_arguments_rad",
    "mean_node_of_date_deg",
    "moon_ecliptic_of_date",
    "moon_gcrs_apparent_au",
]

ELP_NAME = "ELP/MPP02 mean arguments + Meeus (1998) ch. 47 series"

_AS2R = np.pi / (180.0 * 3600.0)
_KM_PER_AU = erfa.DAU / 1000.0
_LIGHT_DAYS_PER_KM = 1.0 / (erfa.CMPS / 1000.0 * 86400.0)
_J2000 = 2451545.0

# ELP/MPP02 with the DE405 corrections and the DE406 secular corrections (Chapront & Francou 2003, Tables 1,
# 3 and 4 line 2; the corrections to the mean motions of W2 and W3 inferred from those of the constants as in
# the authors' code), arcseconds, T in Julian centuries of TDB (≈ TT) from J2000: constant, T, T², T³, T⁴.
_W1 = (785939.88563, 1732559343.38498, -6.84583, 0.00641535, -0.00004193)  # Moon's mean longitude
_W2 = (300071.88269, 14643420.3931715, -38.25839398, -0.04529913, 0.00021301)  # mean longitude of perigee
_W3 = (450160.32601, -6967919.58146906, 6.3563893, 0.00751788, -0.00003586)  # mean longitude of the node
_T = (361679.13852, 129597742.30032, -0.0202, 0.000009, 0.00000015)  # EMB mean longitude
_PERI = (370574.45017, 1161.24342, 0.529265, -0.00011814, 0.000011379)  # EMB mean longitude of perihelion
_MEAN_DISTANCE_KM = 385000.56  # Meeus (1998) ch. 47: Δ = 385000.56 km + Σr

_SLOW_BLOCK_DAYS = 512.0
_SLOW_DEGREE = 6


def _poly_rad(coeffs: tuple[float, ...], t: NDArray) -> NDArray:
    return np.polyval(coeffs[::-1], t) * _AS2R


def mean_arguments_rad(jd_tt: ArrayLike) -> dict[str, NDArray]:
    """ELP/MPP02 (DE405/DE406 fit) mean arguments, radians (not reduced), J2000 departure point.

    Keys: ``W1``, ``W2``, ``W3``, ``T``, ``peri`` and the Delaunay arguments ``D``, ``l`` (the Moon's mean
    anomaly), ``lp`` (the Sun's), ``F``.

    >>> a = mean_arguments_rad(2451545.0)
    >>> round(float(np.degrees(a["W1"])) % 360.0, 6)  # 218°18′59.88563″
    218.316635
    """
    t = (np.asarray(jd_tt, dtype=float) - _J2000) / 36525.0
    w1, w2, w3 = _poly_rad(_W1, t), _poly_rad(_W2, t), _poly_rad(_W3, t)
    te, peri = _poly_rad(_T, t), _poly_rad(_PERI, t)
    return {
        "W1": w1,
        "W2": w2,
        "W3": w3,
        "T": te,
        "peri": peri,
        "D": w1 - te + np.pi,
        "l": w1 - w2,
        "lp": te - peri,
        "F": w1 - w3,
    }


@functools.cache
def _tables() -> tuple[NDArray, NDArray, NDArray, NDArray, NDArray]:
    """Meeus (1998) Tables 47.A and 47.B: multipliers (n, 4), sine and cosine coefficients, per table."""
    text = resources.files("lightpath.sky").joinpath("data/moon_meeus47.csv").read_text()
    rows = [line.split(",") for line in text.splitlines() if line and not line.startswith("#")]
    a = np.array([[float(v) for v in r[1:]] for r in rows if r[0] == "A"])
    b = np.array([[float(v) for v in r[1:]] for r in rows if r[0] == "B"])
    return a[:, :4], a[:, 4] * 1e-6, a[:, 5] * 1e-3, b[:, :4], b[:, 4] * 1e-6


def _slow_columns(jd: NDArray) -> NDArray:
    """(n, 10): GCRS → mean ecliptic of date matrix (9) and general precession p_A (rad), long-term model."""
    ecm = orientation.ecliptic_matrix(jd).reshape(-1, 9)
    return np.column_stack([ecm, orientation.general_precession_vondrak2011_rad(jd)])


def _lbr(jd: NDArray, p_a: NDArray) -> tuple[NDArray, NDArray, NDArray]:
    """Geometric λ, β (rad, mean ecliptic and equinox of date) and distance (km) at 1-D ``jd``."""
    arg = mean_arguments_rad(jd)
    t = (jd - _J2000) / 36525.0
    mult_a, sin_a, cos_a, mult_b, sin_b = _tables()
    delaunay = np.stack([arg["D"], arg["lp"], arg["l"], arg["F"]], axis=-1)  # Meeus's D, M, M′, F
    ecc = 1.0 - 0.002516 * t - 0.0000074 * t * t  # Meeus (1998) eq. 47.6
    fa = ecc[:, None] ** np.abs(mult_a[:, 1])[None, :]
    fb = ecc[:, None] ** np.abs(mult_b[:, 1])[None, :]
    phase_a = delaunay @ mult_a.T
    phase_b = delaunay @ mult_b.T
    lp_date = arg["W1"] + p_a  # mean longitude from the equinox of date (Meeus's L′)
    f = arg["F"]
    a1 = np.radians(119.75 + 131.849 * t)  # Meeus (1998) ch. 47: Venus
    a2 = np.radians(53.09 + 479264.290 * t)  # Jupiter
    a3 = np.radians(313.45 + 481266.484 * t)
    sum_l = (fa * np.sin(phase_a)) @ sin_a
    sum_l += 1e-6 * (3958.0 * np.sin(a1) + 1962.0 * np.sin(lp_date - f) + 318.0 * np.sin(a2))
    sum_r = (fa * np.cos(phase_a)) @ cos_a
    sum_b = (fb * np.sin(phase_b)) @ sin_b
    sum_b += 1e-6 * (
        -2235.0 * np.sin(lp_date)
        + 382.0 * np.sin(a3)
        + 175.0 * np.sin(a1 - f)
        + 175.0 * np.sin(a1 + f)
        + 127.0 * np.sin(lp_date - arg["l"])
        - 115.0 * np.sin(lp_date + arg["l"])
    )
    lon = (lp_date + np.radians(sum_l)) % (2.0 * np.pi)
    return lon, np.radians(sum_b), _MEAN_DISTANCE_KM + sum_r


def moon_ecliptic_of_date(jd_tt: ArrayLike) -> tuple[NDArray, NDArray, NDArray]:
    """Geometric geocentric Moon: ecliptic longitude and latitude (radians, mean ecliptic and equinox of
    date, long-term precession) and distance (km), shaped like ``jd_tt`` (nan propagates).
    """
    jd = np.asarray(jd_tt, dtype=float)
    slow = chebyshev_blocks(_slow_columns, jd, _SLOW_BLOCK_DAYS, _SLOW_DEGREE)
    flat = split_map(lambda t, p: np.stack(_lbr(t, p), axis=-1), jd.reshape(-1), slow.reshape(-1, 10)[:, 9])
    lon, lat, dist = (np.ascontiguousarray(c).reshape(jd.shape) for c in np.moveaxis(flat, -1, 0))
    return lon[()], lat[()], dist[()]


def mean_node_of_date_deg(jd_tt: ArrayLike) -> NDArray:
    """Longitude of the Moon's mean ascending node from the mean equinox of date, degrees in [0, 360).

    0° puts the node at the March equinox: the Moon's monthly declination swing is widest (major
    standstill, ±(ε + i)); 180°: narrowest (minor standstill, ±(ε − i)).

    >>> round(float(mean_node_of_date_deg(2451545.0)), 4)  # J2000: 125°02′40.3″ (Chapront & Francou 2003)
    125.0445
    """
    jd = np.asarray(jd_tt, dtype=float)
    node = mean_arguments_rad(jd)["W3"] + orientation.general_precession_vondrak2011_rad(jd)
    return np.degrees(node) % 360.0


def _gcrs_geometric_au(jd: NDArray) -> NDArray:
    slow = chebyshev_blocks(_slow_columns, jd, _SLOW_BLOCK_DAYS, _SLOW_DEGREE)

    def one(t: NDArray, s: NDArray) -> NDArray:
        lon, lat, dist = _lbr(t, s[:, 9])
        r = dist / _KM_PER_AU
        ecl = np.stack([r * np.cos(lat) * np.cos(lon), r * np.cos(lat) * np.sin(lon), r * np.sin(lat)], axis=-1)
        return np.einsum("nji,nj->ni", s[:, :9].reshape(-1, 3, 3), ecl)  # v_gcrs = Eᵀ v_ecliptic

    return split_map(one, jd.reshape(-1), slow.reshape(-1, 10)).reshape(jd.shape + (3,))


def moon_gcrs_apparent_au(jd_tt: ArrayLike) -> NDArray:
    """Apparent geocentric GCRS position of the Moon (au), shape ``jd_tt.shape + (3,)``: the geometric
    position at t − τ, τ the light time (see the module notes).

    >>> p = moon_gcrs_apparent_au(2451545.0)
    >>> round(float(np.linalg.norm(p)) * 149597870.7)  # km; JPL DE421: 402,449 km
    402445
    """
    jd = np.asarray(jd_tt, dtype=float)
    first = _gcrs_geometric_au(jd)
    tau_days = np.linalg.norm(first, axis=-1) * _KM_PER_AU * _LIGHT_DAYS_PER_KM
    return _gcrs_geometric_au(jd - tau_days)
