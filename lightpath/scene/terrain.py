"""A horizon profile from terrain in the mesh or an elevation model: the site layer's skyline arrays as a
:class:`HorizonProfile`.

:func:`lightpath.site.terrain.skyline_from_terrain` casts the rays and :func:`lightpath.site.dem.dem_skyline`
walks an elevation model; both return plain arrays (geometry alone); this wraps them into the
:class:`~lightpath.sky.horizon.HorizonProfile` the engine compares the Sun with.

>>> import trimesh
>>> wall = trimesh.creation.box(extents=(1.0, 400.0, 20.0)); _ = wall.apply_translation((100.0, 0.0, 10.0))
>>> h, notes = horizon_from_terrain(wall, (0.0, 0.0, 0.0), step_deg=30.0, curvature=False)
>>> round(float(h.altitude_at(90.0)), 2)   # atan(20 / 99.5)
11.37

References
----------
Brunner, F. K. (ed.) (1984). *Geodetic Refraction*, Springer (terrestrial refraction k ≈ 0.13, from memory).
"""

from __future__ import annotations

from lightpath.site.dem import dem_skyline
from lightpath.site.terrain import TERRESTRIAL_REFRACTION_K, skyline_from_terrain
from lightpath.sky.horizon import EARTH_RADIUS_M, HorizonProfile

__all__ = ["horizon_from_dem", "horizon_from_terrain"]


def horizon_from_terrain(
    terrain,
    from_m,
    *,
    step_deg: float = 1.0,
    max_altitude_deg: float = 60.0,
    curvature: bool = True,
    refraction_k: float = TERRESTRIAL_REFRACTION_K,
) -> tuple[HorizonProfile, list[str]]:
    """Horizon profile (apparent altitudes, degrees) of ``terrain`` seen from ``from_m`` (E, N, U metres).

    Returns the profile and the notes of :func:`~lightpath.site.terrain.skyline_from_terrain` (azimuths with
    no terrain get altitude 0).  Raises InputError for a ``step_deg`` outside (0, 30] or an empty terrain.
    """
    skyline = skyline_from_terrain(
        terrain,
        from_m,
        step_deg=step_deg,
        max_altitude_deg=max_altitude_deg,
        curvature=curvature,
        refraction_k=refraction_k,
        earth_radius_m=EARTH_RADIUS_M,
    )
    profile = HorizonProfile(skyline.azimuth_deg, skyline.altitude_deg, source=skyline.label)
    return profile, list(skyline.notes)


def horizon_from_dem(
    files,
    latitude_deg: float,
    longitude_deg: float,
    *,
    observer_height_m: float = 1.6,
    eye_elevation_m: float | None = None,
    step_deg: float = 0.5,
    max_distance_m: float = 30_000.0,
    min_distance_m: float | None = None,
    refraction_k: float = TERRESTRIAL_REFRACTION_K,
    cache_dir=None,
) -> tuple[HorizonProfile, list[str]]:
    """Horizon profile (apparent altitudes, degrees) of the elevation model ``files`` seen from a place.

    The arguments are those of :func:`lightpath.site.dem.dem_skyline` (the Earth's radius is
    :data:`~lightpath.sky.horizon.EARTH_RADIUS_M`); returns the profile and the skyline's notes.
    """
    skyline = dem_skyline(
        files,
        latitude_deg,
        longitude_deg,
        observer_height_m=observer_height_m,
        eye_elevation_m=eye_elevation_m,
        step_deg=step_deg,
        max_distance_m=max_distance_m,
        min_distance_m=min_distance_m,
        refraction_k=refraction_k,
        earth_radius_m=EARTH_RADIUS_M,
        cache_dir=cache_dir,
    )
    profile = HorizonProfile(skyline.azimuth_deg, skyline.altitude_deg, source=skyline.label)
    return profile, list(skyline.notes)
