"""The skyline of an elevation model (one or more GeoTIFF files) seen from a point: plain arrays.

Rays leave the viewpoint every ``step_deg`` of azimuth along geodesics of the WGS 84 ellipsoid
(``pyproj.Geod``).  Along each ray the ground is sampled every half cell from ``min_distance_m`` out to
``max_distance_m``: each sample point is carried into the raster's own coordinate reference system
(``pyproj.Transformer``; any CRS pyproj knows, projected or geographic) and its height read by bilinear
interpolation between cell centres.  Several files form a mosaic: the first file that has a value at a point
gives it.  A sample on or next to a nodata cell is skipped, and the nodata cells met are named in a note.

A point at horizontal distance d and height h, seen from an eye at height e, has the apparent altitude

    a = atan2(h − e − (1 − k)·d² / (2R), d)

where d²/(2R) is the fall of the Earth's surface below the eye's tangent plane and k·d²/(2R) the lift of the
line of sight by terrestrial refraction (k = 0.13, Gauss's coefficient, common geodetic practice; Brunner 1984).
The skyline at each azimuth is the highest such altitude; the best sample is refined by golden-section search
between its neighbours, so the skyline is not limited by the sampling step.  Heights are the raster's own
(usually above the geoid); only differences enter.

This module is geometry alone: it returns azimuths and altitudes as arrays; the scene layer
(:func:`lightpath.scene.terrain.horizon_from_dem`) wraps them into a horizon profile.  Results are cached in
``cache_dir`` (an ``.npz`` keyed by the files' bytes and every setting), like the sky windows.

References
----------
Brunner, F. K. (ed.) (1984). *Geodetic Refraction: Effects of Electromagnetic Wave Propagation Through the
Atmosphere*, Springer (k ≈ 0.13 for lines of sight near the ground, from memory).
Karney, C. F. F. (2013). Algorithms for geodesics. *Journal of Geodesy* 87, 43–55 (``pyproj.Geod``).
Kiefer, R. W. (1967) and common photogrammetric practice: curvature and refraction correction
(1 − k)·d²/(2R) (from memory).
"""

from __future__ import annotations

import hashlib
import io
import json
import math
import os
from pathlib import Path
from typing import NamedTuple

import numpy as np

from lightpath.errors import InputError
from lightpath.files import write_atomic
from lightpath.site.terrain import EARTH_RADIUS_M, TERRESTRIAL_REFRACTION_K

__all__ = ["DEM_FORMAT_VERSION", "DemSkyline", "dem_skyline", "offset_geographic", "read_dem_point"]

#: Bumped when the skyline's meaning changes, so old cache files are not reused.
DEM_FORMAT_VERSION = 1
#: Largest part of a raster read into memory, cells; a larger window is read decimated (and said in a note).
MAX_WINDOW_CELLS = 25_000_000
_GOLDEN = (math.sqrt(5.0) - 1.0) / 2.0
_CHUNK = 32  # azimuths per batch of samples


class DemSkyline(NamedTuple):
    """A skyline from an elevation model: plain arrays and notes (see :func:`dem_skyline`)."""

    azimuth_deg: np.ndarray  # (N,) from true north, clockwise, every step_deg from 0
    altitude_deg: np.ndarray  # (N,) apparent altitude of the skyline, degrees
    distance_m: np.ndarray  # (N,) horizontal distance of the skyline point, metres (nan: no ground seen)
    ground_elevation_m: float  # the model's height at the viewpoint, metres
    eye_elevation_m: float  # the eye's height, metres (same datum as the model)
    notes: list[str]  # nodata cells met, azimuths with no ground, decimated reads
    label: str  # a short description for reports


def _pixel(transform, x, y) -> tuple[np.ndarray, np.ndarray]:
    """(column, row) of CRS coordinates through the inverse of an affine geotransform (pixel corners integer)."""
    inv = ~transform
    x, y = np.asarray(x, float), np.asarray(y, float)
    return inv.a * x + inv.b * y + inv.c, inv.d * x + inv.e * y + inv.f


class _Raster:
    """One file's window around the viewpoint, read once: heights with nan for nodata and a way in."""

    def __init__(self, path: Path, lon: float, lat: float, radius_m: float) -> None:
        import rasterio
        from pyproj import CRS, Geod, Transformer
        from pyproj.exceptions import CRSError
        from rasterio.errors import RasterioIOError
        from rasterio.windows import Window

        self.path = path
        try:
            src = rasterio.open(path)
        except (RasterioIOError, OSError):
            raise InputError(f"{path}: not a raster file that can be read (a GeoTIFF is expected)") from None
        with src:
            if src.crs is None:
                raise InputError(f"{path}: the raster has no coordinate reference system (CRS); give it one")
            try:
                crs = CRS.from_user_input(src.crs.to_wkt())
            except CRSError:
                raise InputError(f"{path}: its coordinate reference system is not one pyproj knows") from None
            self.to_raster = Transformer.from_crs("EPSG:4326", crs, always_xy=True)
            ring_lon, ring_lat, _ = Geod(ellps="WGS84").fwd(
                np.full(72, lon), np.full(72, lat), np.arange(0.0, 360.0, 5.0), np.full(72, radius_m * 1.02)
            )
            xs, ys = self.to_raster.transform(np.append(ring_lon, lon), np.append(ring_lat, lat))
            cols, rows = _pixel(src.transform, xs, ys)
            c0 = max(int(np.floor(np.nanmin(cols))) - 2, 0)
            r0 = max(int(np.floor(np.nanmin(rows))) - 2, 0)
            c1 = min(int(np.ceil(np.nanmax(cols))) + 2, src.width)
            r1 = min(int(np.ceil(np.nanmax(rows))) + 2, src.height)
            self.empty = c1 <= c0 or r1 <= r0
            self.decimation = 1
            if self.empty:
                self.heights, self.transform, self.offset = np.full((1, 1), np.nan), src.transform, (0, 0)
                return
            window = Window(c0, r0, c1 - c0, r1 - r0)
            cells = window.width * window.height
            self.decimation = max(1, math.ceil(math.sqrt(cells / MAX_WINDOW_CELLS)))
            shape = (max(1, window.height // self.decimation), max(1, window.width // self.decimation))
            band = src.read(1, window=window, out_shape=shape, masked=True)
            transform = src.window_transform(window)
            sx, sy = window.width / shape[1], window.height / shape[0]
            t = transform
            self.transform = type(t)(t.a * sx, t.b * sy, t.c, t.d * sx, t.e * sy, t.f)  # window cells, decimated
            self.offset = (r0, c0)
        self.heights = np.ma.filled(band.astype(np.float64), np.nan)

    def sample(self, lon: np.ndarray, lat: np.ndarray) -> tuple[np.ndarray, np.ndarray, np.ndarray]:
        """Bilinear heights at (lon, lat) degrees: (heights with nan, inside-the-footprint mask, nodata cells)."""
        xs, ys = self.to_raster.transform(lon, lat)
        cols, rows = _pixel(self.transform, xs, ys)
        fc, fr = cols - 0.5, rows - 0.5  # cell centres at integer + 0.5
        n_r, n_c = self.heights.shape
        inside = np.isfinite(fc) & np.isfinite(fr) & (fc >= 0) & (fr >= 0) & (fc <= n_c - 1) & (fr <= n_r - 1)
        i0 = np.clip(np.floor(np.where(inside, fr, 0.0)).astype(np.int64), 0, max(n_r - 2, 0))
        j0 = np.clip(np.floor(np.where(inside, fc, 0.0)).astype(np.int64), 0, max(n_c - 2, 0))
        i1, j1 = np.minimum(i0 + 1, n_r - 1), np.minimum(j0 + 1, n_c - 1)
        tr, tc = np.where(inside, fr - i0, 0.0), np.where(inside, fc - j0, 0.0)
        h = self.heights
        z = (h[i0, j0] * (1 - tr) * (1 - tc) + h[i0, j1] * (1 - tr) * tc) + (
            h[i1, j0] * tr * (1 - tc) + h[i1, j1] * tr * tc
        )
        z = np.where(inside, z, np.nan)
        corners = np.stack([h[i0, j0], h[i0, j1], h[i1, j0], h[i1, j1]], axis=-1)
        bad = inside & np.any(np.isnan(corners), axis=-1)
        nearest = np.where(
            np.isnan(corners), np.stack([i0 * n_c + j0, i0 * n_c + j1, i1 * n_c + j0, i1 * n_c + j1], -1), -1
        )
        cells = np.unique(nearest[bad])
        return z, inside, cells[cells >= 0]

    def cell_name(self, flat: int) -> str:
        """(row, column) of a window cell in the file's own numbering."""
        r, c = divmod(int(flat), self.heights.shape[1])
        return f"(row {self.offset[0] + r * self.decimation}, column {self.offset[1] + c * self.decimation})"

    def cell_size_m(self, lat: float) -> float:
        """The smaller cell side, metres (degrees of a geographic CRS taken on the sphere at ``lat``)."""
        a, e = abs(self.transform.a), abs(self.transform.e)
        if self.to_raster.target_crs.is_geographic:
            return min(a * math.radians(1.0) * EARTH_RADIUS_M * math.cos(math.radians(lat)), e * 111_195.0)
        factor = self.to_raster.target_crs.axis_info[0].unit_conversion_factor or 1.0
        return min(a, e) * factor


class _Mosaic:
    def __init__(self, rasters: list[_Raster]) -> None:
        self.rasters = rasters
        self.nodata: dict[int, set[int]] = {i: set() for i in range(len(rasters))}
        self.nodata_azimuths: set[float] = set()

    def heights(self, lon: np.ndarray, lat: np.ndarray, azimuth: np.ndarray | None = None) -> np.ndarray:
        z = np.full(np.shape(lon), np.nan)
        for i, r in enumerate(self.rasters):
            if r.empty:
                continue
            zi, inside, cells = r.sample(lon, lat)
            z = np.where(np.isnan(z), zi, z)
            if cells.size and azimuth is not None:
                self.nodata[i].update(cells.tolist())
                missing = inside & np.isnan(zi)
                self.nodata_azimuths.update(np.unique(np.broadcast_to(azimuth, np.shape(lon))[missing]).tolist())
        return z


def offset_geographic(latitude_deg: float, longitude_deg: float, east_m: float, north_m: float) -> tuple[float, float]:
    """(latitude_deg, longitude_deg) of the point ``east_m``, ``north_m`` metres from a place, along the geodesic
    (WGS 84, ``pyproj.Geod``; Karney 2013).

    >>> lat, lon = offset_geographic(41.62, -8.05, 0.0, 1000.0)
    >>> round(lat - 41.62, 5), lon   # 1 km north is about 0.009 deg of latitude
    (0.009, -8.05)
    """
    from pyproj import Geod

    distance = math.hypot(east_m, north_m)
    if distance == 0.0:
        return float(latitude_deg), float(longitude_deg)
    azimuth = math.degrees(math.atan2(east_m, north_m))
    lon, lat, _ = Geod(ellps="WGS84").fwd(longitude_deg, latitude_deg, azimuth, distance)
    return float(lat), float(lon)


def read_dem_point(files, latitude_deg: float, longitude_deg: float) -> float:
    """The elevation model's height (metres) at one point, by bilinear interpolation; InputError if not covered."""
    rasters = [_Raster(Path(f), float(longitude_deg), float(latitude_deg), 100.0) for f in files]
    z = _Mosaic(rasters).heights(np.array([longitude_deg], float), np.array([latitude_deg], float))
    if not np.isfinite(z[0]):
        names = ", ".join(str(f) for f in files)
        raise InputError(
            f"{names}: the elevation model does not cover the site (latitude {latitude_deg:.6f}, longitude "
            f"{longitude_deg:.6f}) or has nodata there; give rasters that contain the site"
        )
    return float(z[0])


def _key(files: list[Path], settings: dict) -> str:
    digest = hashlib.sha256(f"lightpath-dem-skyline-{DEM_FORMAT_VERSION}".encode())
    for f in files:
        try:
            with f.open("rb") as handle:
                for block in iter(lambda h=handle: h.read(1 << 20), b""):
                    digest.update(block)
        except OSError:
            raise InputError(f"{f}: elevation model file not found or unreadable") from None
        digest.update(b"\0file\0")
    digest.update(json.dumps(settings, sort_keys=True).encode())
    return digest.hexdigest()


def _load_cached(path: Path, key: str) -> DemSkyline | None:
    if not path.is_file():
        return None
    try:
        with np.load(path, allow_pickle=False) as z:
            meta = json.loads(str(z["meta"]))
            if meta.get("key") != key:
                return None
            return DemSkyline(
                z["azimuth"], z["altitude"], z["distance"], meta["ground"], meta["eye"], meta["notes"], meta["label"]
            )
    except (OSError, ValueError, KeyError):
        return None


def _save(path: Path, sky: DemSkyline, key: str) -> None:
    meta = {"key": key, "ground": sky.ground_elevation_m, "eye": sky.eye_elevation_m, "notes": sky.notes}
    meta["label"] = sky.label
    buf = io.BytesIO()
    np.savez_compressed(
        buf,
        meta=np.array(json.dumps(meta)),
        azimuth=sky.azimuth_deg,
        altitude=sky.altitude_deg,
        distance=sky.distance_m,
    )
    write_atomic(path, lambda f: f.write(buf.getvalue()))


def dem_skyline(
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
    earth_radius_m: float = EARTH_RADIUS_M,
    cache_dir: str | os.PathLike | None = None,
) -> DemSkyline:
    """Skyline of the elevation model ``files`` seen from (``latitude_deg``, ``longitude_deg``), WGS 84 degrees.

    Parameters
    ----------
    files : GeoTIFF paths (any CRS pyproj knows); several form a mosaic, the first with a value wins.
    latitude_deg, longitude_deg : the viewpoint, degrees (north, east positive).
    observer_height_m : the eye's height above the model's ground at the viewpoint, metres.
    eye_elevation_m : the eye's elevation (metres, the model's datum); when given, ``observer_height_m`` is unused.
    step_deg : azimuth spacing, degrees in (0, 30].
    max_distance_m : how far the ground is searched, metres.
    min_distance_m : nearest ground taken, metres (default two cells, so the viewpoint's own cell never
        blocks the view).
    refraction_k, earth_radius_m : coefficient of terrestrial refraction and Earth radius (metres) of the
        curvature correction (1 − k)·d²/(2R).
    cache_dir : folder for a cached result keyed by the files' bytes and the settings, or None.

    Returns a :class:`DemSkyline`.  Raises InputError naming the file for a file that is not a readable raster,
    has no CRS or one pyproj does not know, or does not cover the viewpoint.
    """
    paths = [Path(f) for f in ([files] if isinstance(files, (str, os.PathLike)) else files)]
    if not paths:
        raise InputError("horizon.files: no elevation model files given")
    if not (0 < step_deg <= 30):
        raise InputError(f"step_deg: {step_deg!r} is outside (0, 30] degrees")
    if not (math.isfinite(max_distance_m) and 0 < max_distance_m <= 500_000):
        raise InputError(f"max_distance_m: {max_distance_m!r} is outside (0, 500000] metres")
    if not (math.isfinite(observer_height_m) and -100 <= observer_height_m <= 1000):
        raise InputError(f"observer_height_m: {observer_height_m!r} is outside -100..1000 metres")
    lat, lon = float(latitude_deg), float(longitude_deg)
    settings = {"lat": lat, "lon": lon, "h": observer_height_m, "eye": eye_elevation_m, "step": step_deg,
                "max": max_distance_m, "min": min_distance_m, "k": refraction_k, "R": earth_radius_m}  # fmt: skip
    key = _key(paths, settings)
    cache_file = Path(cache_dir) / f"dem-skyline-{key[:24]}.npz" if cache_dir is not None else None
    if cache_file is not None and (cached := _load_cached(cache_file, key)) is not None:
        return cached

    from pyproj import Geod

    rasters = [_Raster(p, lon, lat, max_distance_m) for p in paths]
    mosaic = _Mosaic(rasters)
    ground = mosaic.heights(np.array([lon]), np.array([lat]))[0]
    if not np.isfinite(ground):
        names = ", ".join(str(p) for p in paths)
        raise InputError(
            f"{names}: the elevation model does not cover the site (latitude {lat:.6f}, longitude {lon:.6f}) "
            "or has nodata there; give rasters that contain the site"
        )
    eye = float(ground) + float(observer_height_m) if eye_elevation_m is None else float(eye_elevation_m)
    cell = min(r.cell_size_m(lat) * r.decimation for r in rasters if not r.empty)
    near = 2.0 * cell if min_distance_m is None else float(min_distance_m)
    distances = np.arange(near, max_distance_m + 0.25 * cell, 0.5 * cell)
    if distances.size == 0:
        raise InputError(f"max_distance_m: {max_distance_m:g} m is not beyond min_distance_m {near:g} m")
    curve = (1.0 - refraction_k) / (2.0 * earth_radius_m)
    geod = Geod(ellps="WGS84")
    azimuth = np.arange(0.0, 360.0, float(step_deg))

    def altitude(az: np.ndarray, d: np.ndarray, record: bool) -> np.ndarray:
        lon_d, lat_d, _ = geod.fwd(np.full(d.shape, lon), np.full(d.shape, lat), np.broadcast_to(az, d.shape), d)
        h = mosaic.heights(lon_d, lat_d, np.broadcast_to(az, d.shape) if record else None)
        return np.arctan2(h - eye - curve * d * d, d)  # curvature and refraction, see the module docstring

    best_alt = np.full(azimuth.size, np.nan)
    best_d = np.full(azimuth.size, np.nan)
    for start in range(0, azimuth.size, _CHUNK):
        az = azimuth[start : start + _CHUNK, None]
        d = np.broadcast_to(distances, (az.shape[0], distances.size))
        alt = altitude(az, d, record=True)
        seen = ~np.all(np.isnan(alt), axis=1)
        i = np.nanargmax(np.where(np.isnan(alt), -np.inf, alt), axis=1)
        lo = distances[np.maximum(i - 1, 0)]
        hi = distances[np.minimum(i + 1, distances.size - 1)]
        a = lo + (1 - _GOLDEN) * (hi - lo)
        b = lo + _GOLDEN * (hi - lo)
        fa, fb = altitude(az[:, 0], a, False), altitude(az[:, 0], b, False)
        for _ in range(24):  # golden section: the bracket shrinks to 0.618^24 ≈ 1e-5 of a cell
            left = np.nan_to_num(fa, nan=-np.inf) >= np.nan_to_num(fb, nan=-np.inf)
            lo, hi = np.where(left, lo, a), np.where(left, b, hi)
            a2 = np.where(left, lo + (1 - _GOLDEN) * (hi - lo), b)
            b2 = np.where(left, a, lo + _GOLDEN * (hi - lo))
            fresh = np.where(left, a2, b2)
            f_fresh = altitude(az[:, 0], fresh, False)
            fa, fb = np.where(left, f_fresh, fb), np.where(left, fa, f_fresh)
            a, b = a2, b2
        refined = np.fmax(fa, fb)
        coarse = alt[np.arange(az.shape[0]), i]
        use = np.nan_to_num(refined, nan=-np.inf) > coarse
        best_alt[start : start + _CHUNK] = np.where(seen, np.where(use, refined, coarse), np.nan)
        best_d[start : start + _CHUNK] = np.where(seen, np.where(use, np.where(fa >= fb, a, b), distances[i]), np.nan)

    notes = []
    for idx, r in enumerate(rasters):
        cells = sorted(mosaic.nodata[idx])
        if cells:
            az_seen = sorted(mosaic.nodata_azimuths)
            shown = ", ".join(r.cell_name(c) for c in cells[:3]) + (", ..." if len(cells) > 3 else "")
            notes.append(
                f"horizon: {r.path.name}: {len(cells)} nodata cells met and skipped ({shown}) along "
                f"{len(az_seen)} azimuths ({min(az_seen):g}..{max(az_seen):g} deg)"
            )
        if r.decimation > 1:
            notes.append(
                f"horizon: {r.path.name}: read every {r.decimation}th cell (the window around the site is large)"
            )
    if np.any(np.isnan(best_alt)):
        missing = azimuth[np.isnan(best_alt)]
        notes.append(
            f"horizon: no ground in the elevation model at {missing.size} of {azimuth.size} azimuths "
            f"({missing.min():g}..{missing.max():g} deg); altitude 0 used there"
        )
    altitude_deg = np.clip(np.degrees(np.where(np.isnan(best_alt), 0.0, best_alt)), -90.0, 90.0)
    label = f"elevation model {', '.join(p.name for p in paths)}, eye {eye:.1f} m, to {max_distance_m / 1000:g} km"
    sky = DemSkyline(azimuth, altitude_deg, best_d, float(ground), eye, notes, label)
    if cache_file is not None:
        _save(cache_file, sky, key)
    return sky
