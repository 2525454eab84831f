"""Directions in the site frame: azimuth/altitude ↔ East-North-Up unit vectors.

Azimuth from true north, clockwise (east = 90°); altitude above the horizon
(degrees).  Vectors are arrays of shape (..., 3) in the site's East-North-Up
frame, as the engine uses them.

>>> enu_from_azalt(90.0, 0.0).round(12)
array([1., 0., 0.])
>>> az, alt = azalt_from_enu([[0.0, 1.0, 1.0]])
>>> float(az[0]), round(float(alt[0]), 9)
(0.0, 45.0)
"""

from __future__ import annotations

import numpy as np
from numpy.typing import ArrayLike, NDArray

__all__ = ["azalt_from_enu", "enu_from_azalt"]


def enu_from_azalt(azimuth_deg: ArrayLike, altitude_deg: ArrayLike) -> NDArray:
    """Unit vectors (..., 3) East-North-Up pointing at azimuth/altitude (degrees); nan in → nan out."""
    az = np.radians(np.asarray(azimuth_deg, dtype=float))
    alt = np.radians(np.asarray(altitude_deg, dtype=float))
    az, alt = np.broadcast_arrays(az, alt)
    ca = np.cos(alt)
    return np.stack([ca * np.sin(az), ca * np.cos(az), np.sin(alt)], axis=-1)


def azalt_from_enu(v: ArrayLike) -> tuple[NDArray, NDArray]:
    """(azimuth_deg in [0, 360), altitude_deg) of East-North-Up vectors (..., 3), any length."""
    a = np.asarray(v, dtype=float)
    e, n, u = a[..., 0], a[..., 1], a[..., 2]
    az = np.degrees(np.arctan2(e, n)) % 360.0
    alt = np.degrees(np.arctan2(u, np.hypot(e, n)))
    return az, alt
