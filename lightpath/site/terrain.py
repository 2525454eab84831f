"""The skyline of terrain in the mesh, by casting rays from the site point all round: plain arrays.

For each azimuth (every ``step_deg``) rays leave the viewpoint at altitudes 1° apart from −30° up to
``max_altitude_deg``; the highest altitude whose ray still hits the terrain brackets the skyline, which is
then refined by bisection to better than 0.01°.  All azimuths are handled together as numpy arrays, one
batch of rays per step.

The mesh is a flat local frame, so a distant skyline point appears too high: the Earth's curvature lowers it
by d/(2R) and terrestrial refraction lifts it back by k·d/(2R), so the apparent altitude is the flat-frame
altitude minus (1 − k)·d/(2R) radians, with d the horizontal distance, R the Earth's radius and k = 0.13 the
usual coefficient of terrestrial refraction (Gauss's value; common geodetic practice, e.g. Brunner 1984).
For terrain 1 km away the correction is 0.004°, for 10 km 0.039°.  Terrain already curved (geocentric
coordinates) should use ``curvature=False``.

This module is geometry alone: it returns azimuths and altitudes as arrays; the scene layer
(:func:`lightpath.scene.terrain.horizon_from_terrain`) wraps them into a horizon profile.

>>> import trimesh
>>> wall = trimesh.creation.box(extents=(1.0, 400.0, 20.0)); _ = wall.apply_translation((100.0, 0.0, 10.0))
>>> sky = skyline_from_terrain(wall, (0.0, 0.0, 0.0), step_deg=30.0, curvature=False)
>>> float(sky.azimuth_deg[3]), round(float(sky.altitude_deg[3]), 2)   # east: atan(20 / 99.5)
(90.0, 11.37)

References
----------
Brunner, F. K. (ed.) (1984). *Geodetic Refraction: Effects of Electromagnetic Wave Propagation Through the
Atmosphere*, Springer (k ≈ 0.13 for lines of sight near the ground, from memory).
"""

from __future__ import annotations

from typing import NamedTuple

import numpy as np

from lightpath.errors import InputError

__all__ = ["EARTH_RADIUS_M", "TERRESTRIAL_REFRACTION_K", "TerrainSkyline", "skyline_from_terrain", "enu_directions"]

#: Mean Earth radius, metres (IUGG mean radius R1 = 6371.0088 km; Moritz 2000, Geodetic Reference System 1980).
#: The same value as ``lightpath.sky.horizon.EARTH_RADIUS_M`` (tests/test_layers.py checks they agree).
EARTH_RADIUS_M = 6_371_008.8

#: Coefficient of terrestrial refraction (Gauss's value; common geodetic practice).
TERRESTRIAL_REFRACTION_K = 0.13

_LOWEST_DEG = -30.0


def enu_directions(azimuth_deg: np.ndarray, altitude_deg: np.ndarray) -> np.ndarray:
    """Unit vectors (…, 3) in ENU for azimuth (from north, clockwise) and altitude, degrees.

    >>> enu_directions(np.array(90.0), np.array(0.0)).round(12).tolist()
    [1.0, 0.0, 0.0]
    """
    az, alt = np.radians(azimuth_deg), np.radians(altitude_deg)
    return np.stack([np.sin(az) * np.cos(alt), np.cos(az) * np.cos(alt), np.sin(alt)], axis=-1)


def _hits(terrain, origin: np.ndarray, azimuth_deg: np.ndarray, altitude_deg: np.ndarray) -> np.ndarray:
    directions = enu_directions(azimuth_deg, altitude_deg).reshape(-1, 3)
    origins = np.broadcast_to(origin, directions.shape)
    return np.asarray(terrain.ray.intersects_any(origins, directions)).reshape(np.shape(azimuth_deg))


class TerrainSkyline(NamedTuple):
    """A skyline from terrain: plain arrays and notes (see :func:`skyline_from_terrain`)."""

    azimuth_deg: np.ndarray  # (N,) from true north, clockwise, every step_deg from 0
    altitude_deg: np.ndarray  # (N,) apparent altitude of the skyline, degrees
    notes: list[str]  # azimuths without terrain, terrain above max_altitude_deg
    label: str  # a short description for reports


def skyline_from_terrain(
    terrain,
    from_m,
    *,
    step_deg: float = 1.0,
    max_altitude_deg: float = 60.0,
    curvature: bool = True,
    refraction_k: float = TERRESTRIAL_REFRACTION_K,
    earth_radius_m: float = EARTH_RADIUS_M,
) -> TerrainSkyline:
    """Skyline of ``terrain`` (a trimesh in the site frame) seen from ``from_m`` (E, N, U metres).

    Returns azimuths (degrees from north, every ``step_deg``) and the skyline's apparent altitudes (degrees),
    with notes: azimuths where no terrain was hit at all get altitude 0 (the astronomical horizon) and are
    named in a note.  ``earth_radius_m`` and ``refraction_k`` set the curvature correction (1 − k)·d/(2R).
    Raises InputError for a ``step_deg`` outside (0, 30] degrees or an empty terrain.
    """
    if not (0 < step_deg <= 30):
        raise InputError(f"step_deg: {step_deg!r} is outside (0, 30] degrees")
    if terrain is None or len(terrain.faces) == 0:
        raise InputError("terrain: the terrain mesh has no faces")
    origin = np.asarray(from_m, dtype=float).reshape(3)
    azimuth = np.arange(0.0, 360.0, float(step_deg))
    levels = np.arange(_LOWEST_DEG, float(max_altitude_deg) + 1.0, 1.0)
    grid_az, grid_alt = np.meshgrid(azimuth, levels, indexing="ij")
    hit = _hits(terrain, origin, grid_az, grid_alt)  # (n_az, n_levels)
    any_hit = hit.any(axis=1)
    top = np.where(any_hit, hit.shape[1] - 1 - np.argmax(hit[:, ::-1], axis=1), 0)
    lo = levels[top]  # hits
    hi = np.minimum(lo + 1.0, 90.0)  # misses (or the zenith)
    for _ in range(8):  # 1/256 degree
        mid = 0.5 * (lo + hi)
        h = _hits(terrain, origin, azimuth, mid)
        lo, hi = np.where(h, mid, lo), np.where(h, hi, mid)
    altitude = 0.5 * (lo + hi)
    if curvature:
        dirs = enu_directions(azimuth, lo)
        locations, ray_index, _ = terrain.ray.intersects_location(
            np.broadcast_to(origin, dirs.shape), dirs, multiple_hits=False
        )
        distance = np.zeros(azimuth.size)
        distance[ray_index] = np.hypot(*(locations[:, :2] - origin[:2]).T)
        altitude = altitude - np.degrees((1.0 - refraction_k) * distance / (2.0 * earth_radius_m))
    notes = []
    if not np.all(any_hit):
        missing = azimuth[~any_hit]
        altitude = np.where(any_hit, altitude, 0.0)
        notes.append(
            f"horizon: no terrain seen at {missing.size} of {azimuth.size} azimuths "
            f"({missing.min():g}..{missing.max():g} deg); altitude 0 used there"
        )
    if np.any(any_hit & (lo >= max_altitude_deg)):
        notes.append(f"horizon: terrain reaches max_altitude_deg {max_altitude_deg:g} at some azimuths")
    label = f"terrain from ({', '.join(f'{c:g}' for c in origin)}) m, step {step_deg:g} deg"
    return TerrainSkyline(azimuth, np.clip(altitude, -90.0, 90.0), notes, label)
