"""Days of light around the divisions of a year, for one realisation of a structure and its sky.

:class:`LightDays` holds a sky window, a site and the scan's settings; asked with a rotation of
the structure (about the target), an air state, an anomalous refraction, a horizon offset and a
ΔT error, it returns, per chosen division of a year, the offset (days) of the division's lit day
nearest to its day, and the first and last days of the division's light runs.

It asks the engine's one path (:func:`lightpath.light.year.year_light`) — the same Sun track,
sweep, day convention (local apparent days) and rule for runs and divisions as ``scan`` — so a
study and a scan of the same scene and settings give the same days.  The year's sky (the Sun
track and the divisions) is computed once per year and process and reused for every draw.
"""

from __future__ import annotations

import warnings
from dataclasses import dataclass, field

import numpy as np
from numpy.typing import ArrayLike, NDArray

from lightpath.errors import InputError
from lightpath.light.options import Conditions, ScanOptions
from lightpath.light.sweep import union_map
from lightpath.light.track import Air
from lightpath.light.window import SkyWindow
from lightpath.light.year import YearLight, YearSky, year_light, year_sky
from lightpath.sky.observer import Observer
from lightpath.sky.sources import SunAccuracyWarning
from lightpath.study.uncertainty import Draw

#: Earliest year whose Sun is checked against JPL DE406 (lightpath.sky.sources); earlier ones get a note.
VERIFIED_FROM_YEAR = -2999
#: The note studies add when they reach before it.
UNVERIFIED_NOTE = (
    "Sun positions before 3000 BC come from VSOP87D beyond the span checked against JPL DE406 (-3000..+3000); "
    "their error is estimated, not measured (see docs/sun-model.md)"
)
#: The day convention every study states.
DAY_NOTE = (
    "days are local apparent days at the site; day 0 is the local apparent day of the division's instant; "
    "each light run belongs to one division (the one whose day it contains, else the nearest to its middle)"
)
#: Years of sky kept per process.
_CACHE_YEARS = 64

__all__ = ["DAY_NOTE", "UNVERIFIED_NOTE", "VERIFIED_FROM_YEAR", "LightDays", "light_days_for_scene"]


@dataclass
class LightDays:
    """A sky window at a site, asked which days around the divisions of a year bring light.

    Parameters
    ----------
    window : the engine's :class:`~lightpath.light.window.SkyWindow` (with its horizon).
    observer : the site and its nominal air.
    options : the scan's settings (:class:`~lightpath.light.options.ScanOptions`), as for ``scan``.
    names : division names to report (None: every division of the year, in order).
    """

    window: SkyWindow
    observer: Observer
    options: ScanOptions = field(default_factory=ScanOptions)
    names: tuple[str, ...] | None = None
    _cache: dict = field(default_factory=dict, repr=False, compare=False)

    def __post_init__(self) -> None:
        self.options.check()

    def __getstate__(self) -> dict:  # the per-process cache never travels to workers
        state = dict(self.__dict__)
        state["_cache"] = {}
        return state

    def with_names(self, names: tuple[str, ...] | None) -> LightDays:
        """The same window, site and settings reporting other divisions; the years' sky is shared."""
        out = LightDays(self.window, self.observer, self.options, names)
        out._cache = self._cache
        return out

    @property
    def criterion(self) -> str:
        return self.options.criterion

    @property
    def scheme(self) -> str:
        return self.options.scheme

    @property
    def parts(self) -> int:
        return int(self.options.parts)

    @property
    def source(self) -> str:
        return self.options.source

    def sky(self, year: int) -> YearSky:
        """The year's Sun track and divisions (cached per process)."""
        year = int(year)
        if year not in self._cache:
            with warnings.catch_warnings():
                warnings.simplefilter("ignore", SunAccuracyWarning)  # studies state it once in their notes
                sky = year_sky(self.observer, year, self.options)
            if len(self._cache) >= _CACHE_YEARS:
                self._cache.pop(next(iter(self._cache)))
            self._cache[year] = sky
        return self._cache[year]

    def _indices(self, sky: YearSky) -> NDArray:
        mine = np.flatnonzero(sky.in_year)
        if self.names is None:
            return mine
        by_name = {sky.divisions[k].name: k for k in mine}
        missing = [n for n in self.names if n not in by_name]
        if missing:
            raise InputError(
                f"division: {missing[0]!r} is not a division of scheme {self.scheme} with {self.parts} parts; "
                f"choose from {', '.join(by_name)}"
            )
        return np.array([by_name[n] for n in self.names], dtype=np.int64)

    def division_names(self, year: int) -> list[str]:
        """Names of the divisions reported (in the order of the results)."""
        sky = self.sky(year)
        return [sky.divisions[k].name for k in self._indices(sky)]

    def division_days(self, year: int) -> NDArray:
        """Local apparent days (Julian day numbers) of the divisions reported, nominal ΔT."""
        sky = self.sky(year)
        return sky.division_days()[self._indices(sky)]

    def year_light(self, year: int, conditions: Conditions | None = None) -> YearLight:
        """The engine's :class:`~lightpath.light.year.YearLight` of ``year`` in one realisation."""
        sky = self.sky(year)
        with warnings.catch_warnings():
            warnings.simplefilter("ignore", SunAccuracyWarning)
            return year_light(self.window, sky, conditions)

    def evaluate(
        self,
        year: int,
        rotation: ArrayLike | None = None,
        *,
        temperature_c: float | None = None,
        pressure_mbar: float | None = None,
        refraction_offset_deg: float = 0.0,
        horizon_offset_deg: float = 0.0,
        delta_t_z: float = 0.0,
    ) -> NDArray:
        """(D, 3) days: nearest lit day, first and last day of the division's runs (nan: no light).

        Parameters
        ----------
        year : astronomical year.
        rotation : 3×3 rotation of the structure about the target (ENU), or None.
        temperature_c, pressure_mbar : air for refraction (default: the observer's).
        refraction_offset_deg : anomalous refraction at the horizon, degrees (tapers with altitude).
        horizon_offset_deg : raise of the horizon profile, degrees.
        delta_t_z : ΔT error in units of its σ.
        """
        air = None
        if temperature_c is not None or pressure_mbar is not None or refraction_offset_deg:
            air = Air(
                self.observer.temperature_c if temperature_c is None else float(temperature_c),
                self.observer.pressure_mbar if pressure_mbar is None else float(pressure_mbar),
                float(refraction_offset_deg),
            )
        rot = None if rotation is None else np.asarray(rotation, dtype=float)
        conditions = Conditions(rot, air, float(horizon_offset_deg), float(delta_t_z))
        light = self.year_light(year, conditions)
        per = light.runs_by_division()
        return per.offsets()[self._indices(light.sky)]

    def evaluate_draw(self, draw: Draw) -> NDArray:
        """:meth:`evaluate` for one :class:`~lightpath.study.uncertainty.Draw`."""
        return self.evaluate(
            draw.year,
            draw.rotation_matrix,
            temperature_c=draw.temperature_c,
            pressure_mbar=draw.pressure_mbar,
            refraction_offset_deg=draw.refraction_offset_deg,
            horizon_offset_deg=draw.horizon_offset_deg,
            delta_t_z=draw.delta_t_z,
        )

    def __call__(self, draw: Draw) -> NDArray:
        return self.evaluate_draw(draw)


def light_days_for_scene(
    scene,
    window_options=None,
    options: ScanOptions | None = None,
    *,
    names: tuple[str, ...] | None = None,
    progress=None,
) -> tuple[LightDays, NDArray, float | None]:
    """(:class:`LightDays`, target→opening vector in ENU metres, its length or None) for a scene.

    ``scene`` is a :class:`lightpath.scene.Scene` or a path; the window comes from the engine's
    :func:`lightpath.light.scan.prepare_window` with ``window_options`` (:class:`WindowOptions`).
    Without an opening the axis is the mean direction of the open sky and the distance is unknown
    (None: position tolerances are then left out).
    """
    from lightpath.light.scan import prepare_window
    from lightpath.site.targets import area_centroid_m

    if not hasattr(scene, "observer"):
        from lightpath.scene import load_scene

        scene = load_scene(scene)
    window = prepare_window(scene, window_options, progress=progress)
    light = LightDays(window, scene.observer, options if options is not None else ScanOptions(), names)
    if scene.opening is not None:
        axis = area_centroid_m(scene.opening) - area_centroid_m(scene.target)
        return light, axis, float(np.linalg.norm(axis))
    k, j = np.nonzero(union_map(window))
    mean = window.grid.directions(k, j).mean(axis=0)
    return light, mean / np.linalg.norm(mean), None
