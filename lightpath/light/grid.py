"""The site-fixed equatorial grid on which sky windows are stored.

The celestial pole is fixed in a site's East-North-Up frame at
``p = (0, cos φ, sin φ)`` (φ = latitude); precession moves the equator among
the stars, not the pole relative to the ground.  So in the coordinates

* ``hour_angle_deg`` H: angle about the pole, 0 on the meridian (toward the
  equator), positive westward, −180..180;
* ``declination_deg`` δ: angle from the equator's plane, positive toward the
  pole's side,

the Sun's daily track at *any* epoch is a small circle of almost constant δ,
and one grid in (H, δ) limited to the Sun's reachable band serves 10,000 BC as
well as today.  The band half-width :data:`DECLINATION_LIMIT_DEG` = 25.5°
covers the obliquity over ±10,000 years (below 24.3°; Laskar 1986), apparent
lifting by refraction near the horizon (≤ 0.6°, which moves the apparent
direction off the geometric circle) and the disc's semidiameter (0.27°).
For moonlight the band is :data:`MOON_DECLINATION_LIMIT_DEG` = 31°: the Moon's geocentric declination
reaches ε + i plus the ±0.15° swing of the inclination (29.3° at most over −3000…+3000, when ε ≈ 24.0°),
its diurnal parallax moves the topocentric declination by up to its horizontal parallax (≤ 1.01°), and its
semidiameter is ≤ 0.28°: 30.6° at worst.

For an apparent Sun direction these are simply spherical coordinates of the
direction: they equal the true topocentric hour angle and declination only
without refraction.

>>> lat = 52.0
>>> v = enu_from_hadec(lat, 0.0, 90.0)     # the celestial pole
>>> [round(float(x), 6) for x in v]
[0.0, 0.615661, 0.788011]
>>> h, d = hadec_from_enu(lat, enu_from_hadec(lat, 30.0, -10.0))
>>> round(float(h), 9), round(float(d), 9)
(30.0, -10.0)

References
----------
Meeus, J. (1998). *Astronomical Algorithms*, 2nd ed., eqs. 13.5 and 13.6
(transformation between hour angle/declination and azimuth/altitude).
Laskar, J. (1986). Secular terms of classical planetary theories using the
results of general theory. *A&A* 157, 59-70 (obliquity over ±10,000 years).
"""

from __future__ import annotations

import math
from dataclasses import dataclass

import numpy as np
from numpy.typing import ArrayLike, NDArray

__all__ = [
    "DECLINATION_LIMIT_DEG",
    "MOON_DECLINATION_LIMIT_DEG",
    "SkyGrid",
    "enu_from_hadec",
    "hadec_from_enu",
    "site_axes",
]

#: Half-width of the declination band the Sun (disc and refraction included) can reach, degrees.
DECLINATION_LIMIT_DEG = 25.5
#: Half-width of the band for moonlight, degrees (see the module notes).
MOON_DECLINATION_LIMIT_DEG = 31.0


def site_axes(latitude_deg: float) -> tuple[NDArray, NDArray, NDArray]:
    """Unit vectors (ENU) of the site's equatorial frame: meridian-equator point q, west w, pole p."""
    phi = math.radians(latitude_deg)
    q = np.array([0.0, -math.sin(phi), math.cos(phi)])  # H = 0, δ = 0
    w = np.array([-1.0, 0.0, 0.0])  # H = +90°, δ = 0 (due west)
    p = np.array([0.0, math.cos(phi), math.sin(phi)])  # the celestial pole
    return q, w, p


def enu_from_hadec(latitude_deg: float, hour_angle_deg: ArrayLike, declination_deg: ArrayLike) -> NDArray:
    """Unit direction(s) (…, 3) in East-North-Up for site hour angle and declination, degrees."""
    q, w, p = site_axes(latitude_deg)
    h = np.radians(np.asarray(hour_angle_deg, dtype=np.float64))
    d = np.radians(np.asarray(declination_deg, dtype=np.float64))
    cd = np.cos(d)
    # Meeus (1998) eqs. 13.5-13.6 written as a rotation of (cos δ cos H, cos δ sin H, sin δ).
    return (cd * np.cos(h))[..., None] * q + (cd * np.sin(h))[..., None] * w + np.sin(d)[..., None] * p


def hadec_from_enu(latitude_deg: float, v: ArrayLike) -> tuple[NDArray, NDArray]:
    """Site hour angle (−180..180) and declination, degrees, of direction(s) ``v`` (…, 3), any length."""
    q, w, p = site_axes(latitude_deg)
    v = np.asarray(v, dtype=np.float64)
    x, y, z = v @ q, v @ w, v @ p
    h = np.degrees(np.arctan2(y, x))
    d = np.degrees(np.arctan2(z, np.hypot(x, y)))
    return h, d


@dataclass(frozen=True)
class SkyGrid:
    """Cells of the (H, δ) band: ``n_h`` × ``n_d`` cells of ``resolution_deg``.

    H cell ``k`` is centred on ``-180 + (k + 0.5) × resolution_deg`` (indices wrap
    modulo ``n_h``); δ cell ``j`` on ``-limit + (j + 0.5) × resolution_deg``.

    >>> g = SkyGrid.make(52.0, 0.05)
    >>> g.n_h, g.n_d, g.resolution_deg
    (7200, 1020, 0.05)
    >>> round(float(g.h_center(3600)), 9), round(float(g.d_center(510)), 9)
    (0.025, 0.025)
    """

    latitude_deg: float
    resolution_deg: float
    n_h: int
    n_d: int
    declination_limit_deg: float

    @classmethod
    def make(cls, latitude_deg: float, resolution_deg: float, limit_deg: float = DECLINATION_LIMIT_DEG) -> SkyGrid:
        """A grid whose H cells divide 360° exactly, as close to ``resolution_deg`` as possible."""
        if not (math.isfinite(resolution_deg) and 0.005 <= resolution_deg <= 2.0):
            from lightpath.errors import InputError

            raise InputError(f"window resolution {resolution_deg!r} is outside 0.005..2 degrees")
        n_h = int(round(360.0 / resolution_deg))
        res = 360.0 / n_h
        n_d = int(math.ceil(2.0 * limit_deg / res - 1e-9))
        return cls(float(latitude_deg), res, n_h, n_d, n_d * res / 2.0)

    def h_center(self, k: ArrayLike) -> NDArray:
        """Hour angle (degrees) of the centre of H cell(s) ``k`` (any integer, wrapped)."""
        k = np.mod(np.asarray(k), self.n_h)
        return -180.0 + (k + 0.5) * self.resolution_deg

    def d_center(self, j: ArrayLike) -> NDArray:
        """Declination (degrees) of the centre of δ cell(s) ``j``."""
        return -self.declination_limit_deg + (np.asarray(j) + 0.5) * self.resolution_deg

    def fractional_index(self, hour_angle_deg: ArrayLike, declination_deg: ArrayLike) -> tuple[NDArray, NDArray]:
        """Continuous cell coordinates (cell centres at integers) of (H, δ) in degrees; H in [0, n_h)."""
        fh = np.mod((np.asarray(hour_angle_deg) + 180.0) / self.resolution_deg - 0.5, self.n_h)
        fd = (np.asarray(declination_deg) + self.declination_limit_deg) / self.resolution_deg - 0.5
        return fh, fd

    def directions(self, k: ArrayLike, j: ArrayLike) -> NDArray:
        """ENU unit vectors (…, 3) of the centres of cells (k, j) (trigonometry tabulated per cell row/column)."""
        k = np.mod(np.asarray(k, dtype=np.int64), self.n_h)
        j = np.asarray(j, dtype=np.int64)
        h = np.radians(self.h_center(np.arange(self.n_h)))
        inside = (j >= 0) & (j < self.n_d)
        if not np.all(inside):  # rows off the band: compute directly
            return enu_from_hadec(self.latitude_deg, self.h_center(k), self.d_center(j))
        d = np.radians(self.d_center(np.arange(self.n_d)))
        q, w, p = site_axes(self.latitude_deg)
        cd, sd = np.cos(d)[j], np.sin(d)[j]
        a, b = np.cos(h)[k] * cd, np.sin(h)[k] * cd
        return a[..., None] * q + b[..., None] * w + sd[..., None] * p
