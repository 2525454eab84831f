"""Projected survey coordinates (an EPSG code, easting and northing in metres) → the site frame, with pyproj.

A survey on a national grid gives the site and its points as eastings and northings.  The grid's north is not
true north: the **grid convergence** γ (the true azimuth of grid north, degrees, east positive; for a Transverse
Mercator grid ≈ (λ − λ₀)·sin φ, Snyder 1987 eq. 8-15 to first order) and the **point scale factor** k (grid
metres per ground metre) come from the projection itself (``pyproj.Proj.get_factors``), so nothing is typed by
hand.  A grid offset (ΔE, ΔN) from the site's reference point becomes the site frame's (East, North) by turning
it through γ and dividing by k; elevations stay as they are (metres above the same datum as the site's).

>>> lat, lon = grid_to_geographic("EPSG:25829", 574_000.0, 4_608_000.0)
>>> 41 < lat < 42 and -9 < lon < -8
True
>>> gamma = grid_convergence_deg("EPSG:25829", lat, lon)   # east of the zone's central meridian (9° W)
>>> bool(abs(gamma - (lon + 9.0) * np.sin(np.radians(lat))) < 0.01)    # Snyder (1987) eq. 8-15, first order
True

References
----------
Snyder, J. P. (1987). *Map Projections — A Working Manual*, USGS Professional Paper 1395, ch. 8 (Transverse
Mercator: convergence and scale factor).
PROJ contributors, *PROJ coordinate transformation software* (``proj_factors``), through pyproj.
"""

from __future__ import annotations

import numpy as np

from lightpath.errors import InputError
from lightpath.site.frames import azimuth_turn_matrix

__all__ = ["projected_crs", "grid_to_geographic", "grid_convergence_deg", "grid_scale_factor", "grid_to_site_m"]


def projected_crs(text: str, key: str = "crs"):
    """A ``pyproj.CRS`` for ``text`` (``"EPSG:25829"``, any form pyproj reads) that is projected in metres.

    Raises InputError naming ``key`` when pyproj does not know it, or it is not projected, or not in metres.
    """
    from pyproj import CRS
    from pyproj.exceptions import CRSError

    if not isinstance(text, str) or not text.strip():
        raise InputError(f'{key}: give a coordinate reference system as a quoted code, e.g. "EPSG:25829"')
    try:
        crs = CRS.from_user_input(text.strip())
    except CRSError:
        raise InputError(
            f"{key}: {text!r} is not a coordinate reference system pyproj knows (accepted: an EPSG code such as "
            '"EPSG:25829", a PROJ string or WKT)'
        ) from None
    if not crs.is_projected:
        raise InputError(f"{key}: {text!r} is not a projected CRS (eastings and northings in metres are expected)")
    factor = crs.axis_info[0].unit_conversion_factor if crs.axis_info else 1.0
    if abs(factor - 1.0) > 1e-12:
        raise InputError(f"{key}: {text!r} is not in metres (its unit is {crs.axis_info[0].unit_name})")
    return crs


def grid_to_geographic(crs, easting_m, northing_m) -> tuple[np.ndarray | float, np.ndarray | float]:
    """(latitude_deg, longitude_deg) on WGS 84 of grid points (metres) of ``crs`` (a CRS or its code)."""
    from pyproj import Transformer

    crs = projected_crs(crs) if isinstance(crs, str) else crs
    lon, lat = Transformer.from_crs(crs, "EPSG:4326", always_xy=True).transform(easting_m, northing_m)
    if not (np.all(np.isfinite(lat)) and np.all(np.isfinite(lon))):
        raise InputError(f"easting_m, northing_m: outside the area where {crs.name} can be projected back")
    if np.ndim(lat) == 0:
        return float(lat), float(lon)
    return np.asarray(lat), np.asarray(lon)


def _factors(crs, latitude_deg: float, longitude_deg: float):
    from pyproj import CRS, Proj, Transformer

    crs = projected_crs(crs) if isinstance(crs, str) else CRS.from_user_input(crs)
    # get_factors takes longitude and latitude on the CRS's own geodetic datum
    lon, lat = Transformer.from_crs("EPSG:4326", crs.geodetic_crs, always_xy=True).transform(
        longitude_deg, latitude_deg
    )
    return Proj(crs).get_factors(lon, lat)


def grid_convergence_deg(crs, latitude_deg: float, longitude_deg: float) -> float:
    """Grid convergence at a place: the true azimuth of grid north, degrees, east positive.

    The same angle and sign as ``pyproj.Proj(crs).get_factors(lon, lat).meridian_convergence`` and as the scene
    key ``model.convergence_deg`` (true azimuth = grid bearing + convergence).
    """
    return float(_factors(crs, latitude_deg, longitude_deg).meridian_convergence)


def grid_scale_factor(crs, latitude_deg: float, longitude_deg: float) -> float:
    """Point scale factor k of the grid at a place along the meridian (grid metres per ground metre)."""
    return float(_factors(crs, latitude_deg, longitude_deg).meridional_scale)


def grid_to_site_m(points, origin, convergence_deg: float, scale_factor: float = 1.0) -> np.ndarray:
    """Grid points (N, 3) = (easting, northing, elevation) metres → site frame ENU metres.

    ``origin`` is the site's (easting, northing, elevation); the horizontal offsets are turned through the
    convergence (true azimuth = grid bearing + convergence) and divided by the scale factor.

    >>> grid_to_site_m([[110.0, 200.0, 5.0]], (100.0, 200.0, 2.0), convergence_deg=90.0).round(9).tolist()
    [[0.0, -10.0, 3.0]]
    """
    p = np.asarray(points, dtype=float).reshape(-1, 3) - np.asarray(origin, dtype=float).reshape(3)
    horizontal = p.copy()
    horizontal[:, :2] /= float(scale_factor)
    horizontal[:, 2] = 0.0
    out = horizontal @ azimuth_turn_matrix(convergence_deg).T
    out[:, 2] = p[:, 2]
    return out
