"""The site as a survey gives it: DMS or decimal latitude/longitude, or a projected grid position (EPSG code,
easting, northing); a survey date for the magnetic declination; polygons in the site, model or grid frame.

:func:`site_from_table` reads the ``[site]`` table into a :class:`SiteSurvey`, which knows its grid convergence
(from pyproj, :mod:`lightpath.site.projected`) and, given a survey date, its magnetic declination (IGRF,
:mod:`lightpath.scene.magnetic`).  :func:`polygon_in_site` turns a surveyed polygon into site coordinates.

>>> s = site_from_table({"latitude_deg": "41°37'12\\"N", "longitude_deg": "8 03 00 W"}, "a.toml")
>>> s.latitude_deg, s.longitude_deg
(41.62, -8.05)
"""

from __future__ import annotations

import datetime
import math
from dataclasses import dataclass, field

import numpy as np

from lightpath.errors import InputError
from lightpath.scene.keys import number, text
from lightpath.scene.magnetic import IGRF_MODEL, magnetic_declination_deg, survey_date
from lightpath.sky.angles import parse_angle_deg

__all__ = ["POLYGON_FRAMES", "SiteSurvey", "site_from_table", "polygon_in_site"]

#: Frames a surveyed polygon may be given in.
POLYGON_FRAMES = ("site", "model", "crs")


@dataclass
class SiteSurvey:
    """The site's reference point and what the survey says about north there."""

    latitude_deg: float
    longitude_deg: float
    elevation_m: float
    elevation_given: bool
    crs: str | None = None
    easting_m: float | None = None
    northing_m: float | None = None
    date: datetime.date | None = None
    where: str = ""
    _cache: dict = field(default_factory=dict, repr=False)

    @property
    def convergence_deg(self) -> float:
        """Grid convergence of ``crs`` at the site, degrees (true azimuth of grid north, east positive)."""
        if "convergence" not in self._cache:
            from lightpath.site.projected import grid_convergence_deg, grid_scale_factor

            self._cache["convergence"] = grid_convergence_deg(self.crs, self.latitude_deg, self.longitude_deg)
            self._cache["scale"] = grid_scale_factor(self.crs, self.latitude_deg, self.longitude_deg)
        return self._cache["convergence"]

    @property
    def scale_factor(self) -> float:
        """The grid's point scale factor at the site (grid metres per ground metre)."""
        self.convergence_deg  # noqa: B018 (fills the cache)
        return self._cache["scale"]

    def declination_deg(self) -> float:
        """Magnetic declination at the site on the survey date (IGRF), degrees east positive."""
        if self.date is None:
            raise InputError(f"{self.where}: no site.survey_date to compute the magnetic declination from")
        if "declination" not in self._cache:
            self._cache["declination"] = magnetic_declination_deg(
                self.latitude_deg, self.longitude_deg, self.elevation_m, self.date, f"{self.where}: 'site.survey_date'"
            )
        return self._cache["declination"]

    def info(self) -> dict:
        """What was computed from the survey, for ``inspect`` (numbers and their sources)."""
        out: dict = {}
        if self.crs is not None:
            out.update(crs=self.crs, easting_m=self.easting_m, northing_m=self.northing_m)
            out.update(convergence_deg=self.convergence_deg, scale_factor=self.scale_factor)
        if self.date is not None:
            out["survey_date"] = self.date.isoformat()
        if "declination" in self._cache:
            out.update(declination_deg=self._cache["declination"], declination_model=IGRF_MODEL)
        return out


def site_from_table(site: dict, where: str) -> SiteSurvey:
    """The ``[site]`` table → :class:`SiteSurvey` (raises InputError naming ``where`` and the key)."""
    elevation = number(site, "site.elevation_m", where, 0.0, -500.0, 9000.0)
    date = survey_date(site["survey_date"], f"{where}: 'site.survey_date'") if "survey_date" in site else None
    geographic = [k for k in ("latitude_deg", "longitude_deg") if k in site]
    projected = [k for k in ("crs", "easting_m", "northing_m") if k in site]
    if geographic and projected:
        raise InputError(
            f"{where}: [site] give latitude_deg and longitude_deg, or crs with easting_m and northing_m, not both"
        )
    if projected:
        from lightpath.site.projected import grid_to_geographic, projected_crs

        missing = [k for k in ("crs", "easting_m", "northing_m") if k not in site]
        if missing:
            raise InputError(
                f"{where}: missing key 'site.{missing[0]}' (a projected site needs crs, easting_m, northing_m)"
            )
        code = text(site, "site.crs", where)
        crs = projected_crs(code, f"{where}: 'site.crs'")
        easting = number(site, "site.easting_m", where)
        northing = number(site, "site.northing_m", where)
        try:
            lat, lon = grid_to_geographic(crs, easting, northing)
        except InputError as exc:
            raise InputError(f"{where}: site.{exc}") from None
        return SiteSurvey(lat, lon, elevation, "elevation_m" in site, code, easting, northing, date, where)
    for key in ("latitude_deg", "longitude_deg"):
        if key not in site:
            raise InputError(
                f"{where}: missing key 'site.{key}' (or give crs, easting_m and northing_m for a projected site)"
            )
    lat = parse_angle_deg(site["latitude_deg"], kind="latitude", name=f"{where}: 'site.latitude_deg'")
    lon = parse_angle_deg(site["longitude_deg"], kind="longitude", name=f"{where}: 'site.longitude_deg'")
    return SiteSurvey(lat, lon, elevation, "elevation_m" in site, None, None, None, date, where)


def polygon_in_site(points, frame: str, *, survey: SiteSurvey, transform: np.ndarray, key: str):
    """A surveyed polygon's corners in ``frame`` → site coordinates (a list of [E, N, U] metres).

    ``"site"``: already site coordinates; ``"model"``: the model file's own coordinates (its unit, axes and north;
    ``transform`` is the file-to-site matrix); ``"crs"``: [easting, northing, elevation] in the site's ``crs``.
    Points that are not a list of [x, y, z] numbers are returned as given (the polygon reader names the fault).
    """
    try:
        p = np.asarray(points, dtype=float)
    except (TypeError, ValueError):
        return points
    if frame == "site" or p.ndim != 2 or p.shape[1] != 3 or not np.all(np.isfinite(p)):
        return points
    if frame == "model":
        return (p @ transform[:3, :3].T + transform[:3, 3]).tolist()
    if survey.crs is None:
        raise InputError(f"{key}: frame 'crs' needs the site given by crs, easting_m and northing_m")
    from lightpath.site.projected import grid_to_site_m

    origin = (survey.easting_m, survey.northing_m, survey.elevation_m)
    if not survey.elevation_given:
        raise InputError(f"{key}: frame 'crs' needs site.elevation_m (the polygon's elevations are compared with it)")
    if not math.isfinite(survey.scale_factor):
        raise InputError(f"{key}: the grid's scale factor at the site is not finite")
    return grid_to_site_m(p, origin, survey.convergence_deg, survey.scale_factor).tolist()
