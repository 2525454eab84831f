"""Days of light around the divisions of the year, for one realisation of a structure and its sky.

:class:`LightDays` holds a sky window and a site; called with a rotation of the
structure (about the target), an air state, an anomalous refraction, a horizon
offset and a ΔT error, it tells for each chosen division of a year which days
within ±``span_days`` of it bring light to the target, and returns, per
division, the offset (days) of the lit day nearest to the division, and the
first and last days of the run of consecutive lit days that contains it.

Days are local mean solar days at the site (UT + longitude/15 h, as in
:mod:`lightpath.sky.divisions`); day 0 is the day in which the division's
instant falls.  A ΔT error moves that instant in UT and so may move day 0 by a
day; its effect on the Sun's direction at a given local time (≤ 0.02° for 30
minutes of ΔT) is left out.

How it stays fast: the Sun's topocentric track is computed once per year
(hourly, every day of the span), so a realisation only evaluates the Sun at
fine steps (``step_min``) while its hour angle lies inside the rotated window,
on days whose declination can reach it; each such direction is screened against
the union of all samples' windows (the engine's :func:`~lightpath.light.sweep.union_map`,
widened for refraction and the step) before the engine's
:func:`~lightpath.light.disc.lit_area` is asked.

References
----------
Meeus, J. (1998). *Astronomical Algorithms*, 2nd ed., ch. 13 (hour angle and declination
from azimuth and altitude) and ch. 16 (refraction); the Sun from :mod:`lightpath.sky.sun`.
"""

from __future__ import annotations

import math
import warnings
from dataclasses import dataclass, field

import numpy as np
from numpy.typing import ArrayLike, NDArray
from scipy.ndimage import maximum_filter

from lightpath.errors import InputError
from lightpath.light.disc import lit_area, meets
from lightpath.light.grid import enu_from_hadec, hadec_from_enu
from lightpath.light.sweep import union_map
from lightpath.light.window import SkyWindow
from lightpath.sky.deltat import delta_t_s, delta_t_sigma_s
from lightpath.sky.observer import Observer
from lightpath.sky.refraction import apparent_altitude
from lightpath.sky.sources import SunAccuracyWarning
from lightpath.sky.sun import sun_position
from lightpath.sky.vectors import azalt_from_enu, enu_from_azalt
from lightpath.study.uncertainty import Draw, raise_altitude

#: Earliest year whose Sun is checked against JPL DE406 (lightpath.sky.sources); earlier ones get a note.
VERIFIED_FROM_YEAR = -2999
#: The note studies add when they reach before it.
UNVERIFIED_NOTE = (
    "Sun positions before 3000 BC come from VSOP87D beyond the span checked against JPL DE406 (-3000..+3000); "
    "their error is estimated, not measured (see docs/sun-model.md)"
)

__all__ = [
    "DEFAULT_SPAN_DAYS",
    "UNVERIFIED_NOTE",
    "VERIFIED_FROM_YEAR",
    "LightDays",
    "area_centroid_m",
    "default_span_days",
    "light_days_for_scene",
    "light_runs",
]

#: Days searched on each side of a division.
DEFAULT_SPAN_DAYS = 30
#: Apparent motion of the Sun in hour angle, degrees per minute.
_H_RATE_DEG_PER_MIN = 0.25
#: Margin (degrees) on the window's hour-angle and declination range: refraction lifts the apparent
#: Sun up to ~0.6° (more in cold dense air and with the anomaly) off its geometric small circle.
_MARGIN_DEG = 1.5
#: Geometric altitude below which the Sun is not looked up (no horizon is that low; window floor −3°).
_ALTITUDE_FLOOR_DEG = -4.0
_DAY_S = 86400.0


def default_span_days(parts: int) -> int:
    """Days searched on each side of a division: half the shortest part, at most 30.

    Each division then owns the days nearest to it, so a run of light is not counted twice.

    >>> default_span_days(8), default_span_days(16), default_span_days(4)
    (22, 11, 30)
    """
    return max(1, min(DEFAULT_SPAN_DAYS, int(365.2422 / int(parts) / 2.0)))


def light_runs(lit: ArrayLike, offsets: ArrayLike) -> NDArray:
    """Per row of day flags: (nearest lit day, first and last day of its run), days; nan where no light.

    ``lit`` is (D, K) bool over the days ``offsets`` (K,) (consecutive integers); the nearest lit
    day to 0 wins, the earlier one on a tie; its run is the stretch of consecutive lit days around it.

    >>> light_runs([[0, 1, 1, 0, 1], [0, 0, 0, 0, 0]], [-2, -1, 0, 1, 2]).tolist()
    [[0.0, -1.0, 0.0], [nan, nan, nan]]
    """
    lit = np.atleast_2d(np.asarray(lit, dtype=bool))
    off = np.asarray(offsets, dtype=float)
    d, k = lit.shape
    cols = np.arange(k)
    score = np.where(lit, np.abs(off)[None, :] + 0.25 * (off > 0)[None, :], np.inf)
    best = np.argmin(score, axis=1)
    any_lit = lit.any(axis=1)
    last_dark_before = np.maximum.accumulate(np.where(~lit, cols[None, :], -1), axis=1)
    next_dark_after = np.minimum.accumulate(np.where(~lit, cols[None, :], k)[:, ::-1], axis=1)[:, ::-1]
    rows = np.arange(d)
    first = last_dark_before[rows, best] + 1
    last = next_dark_after[rows, best] - 1
    out = np.stack([off[best], off[np.clip(first, 0, k - 1)], off[np.clip(last, 0, k - 1)]], axis=1)
    out[~any_lit] = np.nan
    return out


@dataclass
class _YearTrack:
    names: list[str]
    division_jd_tt: NDArray  # (D,)
    day0: NDArray  # (D,) local day number of each division (nominal ΔT)
    midnight_ut: NDArray  # (D, K) UT Julian date of local mean midnight starting each day
    hourly_h: NDArray  # (D, K, 25) topocentric hour angle, unwrapped, degrees
    hourly_dec: NDArray  # (D, K, 25) topocentric declination, degrees
    daily_dec: NDArray  # (D, K) topocentric declination at local noon, degrees
    delta_t_s: NDArray  # (D,) model ΔT at each division, seconds
    delta_t_sigma_s: NDArray  # (D,)


@dataclass
class LightDays:
    """A sky window at a site, asked which days around the divisions of a year bring light.

    Parameters
    ----------
    window : the engine's :class:`~lightpath.light.window.SkyWindow` (with its horizon).
    observer : the site and its nominal air.
    criterion : ``first-gleam``, ``half-disc`` or ``full-disc``.
    scheme, parts : the divisions of the year (:func:`lightpath.sky.divisions.divisions`).
    names : division names to test (None: all ``parts``).
    span_days : days searched on each side of each division.
    step_min : time step of the fine look-ups, minutes (the Sun moves 0.25° per minute).
    source : Sun position source (``"auto"``, ``"jpl"``, ``"vsop87"``).
    """

    window: SkyWindow
    observer: Observer
    criterion: str = "first-gleam"
    scheme: str = "longitude"
    parts: int = 8
    names: tuple[str, ...] | None = None
    span_days: int = DEFAULT_SPAN_DAYS
    step_min: float = 0.5
    source: str = "auto"
    _cache: dict = field(default_factory=dict, repr=False, compare=False)

    def __post_init__(self) -> None:
        meets(0.0, self.criterion)
        if isinstance(self.span_days, bool) or not isinstance(self.span_days, int) or not 1 <= self.span_days <= 120:
            raise InputError(f"--span: {self.span_days!r} is not a whole number of days in 1..120")
        if not (0.05 <= float(self.step_min) <= 5.0):
            raise InputError(f"step {self.step_min!r} min is outside 0.05..5 minutes")

    def __getstate__(self) -> dict:  # the per-process cache never travels to workers
        state = dict(self.__dict__)
        state["_cache"] = {}
        return state

    @property
    def offsets(self) -> NDArray:
        """Day offsets searched, −span … +span."""
        return np.arange(-self.span_days, self.span_days + 1)

    # -- per-year Sun track, cached per process ---------------------------------------------------
    def division_names(self, year: int) -> list[str]:
        """Names of the divisions tested (in the order of the results)."""
        return self._track(int(year)).names

    def _track(self, year: int) -> _YearTrack:
        if year in self._cache:
            return self._cache[year]
        from lightpath.sky.divisions import divisions

        # only the days scheme needs the site (its local days); the others are instants
        site = self.observer if self.scheme == "days" else None
        divs = divisions(year, self.scheme, self.parts, observer=site, source=self.source)
        if self.names is not None:
            by_name = {d.name: d for d in divs}
            missing = [n for n in self.names if n not in by_name]
            if missing:
                raise InputError(
                    f"--division: {missing[0]!r} is not a division of scheme {self.scheme} with {self.parts} parts; "
                    f"choose from {', '.join(by_name)} or all"
                )
            divs = [by_name[n] for n in self.names]
        lon_d = self.observer.longitude_deg / 360.0
        jd_tt = np.array([d.jd_tt for d in divs])
        dt = np.asarray(delta_t_s(jd_tt), dtype=float)
        day0 = np.floor(jd_tt - dt / _DAY_S + lon_d + 0.5)
        midnight = (day0[:, None] + self.offsets[None, :]) - 0.5 - lon_d  # UT
        t_ut = midnight[:, :, None] + np.arange(25)[None, None, :] / 24.0
        pos = sun_position(
            t_ut + dt[:, None, None] / _DAY_S, self.observer, source=self.source, delta_t_s=dt[:, None, None]
        )
        geo = enu_from_azalt(pos.azimuth_deg, pos.altitude_geometric_deg)
        h, d = hadec_from_enu(self.observer.latitude_deg, geo)
        h = np.degrees(np.unwrap(np.radians(h), axis=-1))
        h -= 360.0 * np.round(h[..., 12:13] / 360.0)  # local noon near H = 0
        track = _YearTrack(
            names=[d.name for d in divs],
            division_jd_tt=jd_tt,
            day0=day0,
            midnight_ut=midnight,
            hourly_h=h,
            hourly_dec=d,
            daily_dec=d[..., 12],
            delta_t_s=dt,
            delta_t_sigma_s=np.asarray(delta_t_sigma_s(jd_tt), dtype=float),
        )
        if len(self._cache) > 64:
            self._cache.pop(next(iter(self._cache)))
        self._cache[year] = track
        return track

    # -- the window, screened ----------------------------------------------------------------------
    def _screen(self) -> tuple[NDArray, NDArray]:
        """(widened union map (n_h, n_d) bool, ENU directions of its open cells (N, 3))."""
        if "screen" not in self._cache:
            g = self.window.grid
            union = union_map(self.window)
            cells_h = int(math.ceil((self.step_min * _H_RATE_DEG_PER_MIN + 0.5) / g.resolution_deg)) + 1
            cells_d = int(math.ceil(0.5 / g.resolution_deg)) + 1  # refraction's lift off the geometric track
            wide = (
                maximum_filter(
                    union.astype(np.uint8), size=(2 * cells_h + 1, 2 * cells_d + 1), mode=("wrap", "constant")
                )
                > 0
            )
            k, j = np.nonzero(wide)
            self._cache["screen"] = (wide, g.directions(k, j))
        return self._cache["screen"]

    def _window_range(self, rotation: NDArray) -> tuple[float, float, float, float] | None:
        """(H low, H high, δ low, δ high) of the rotated window in the site frame, degrees; None if empty."""
        _, dirs = self._screen()
        if len(dirs) == 0:
            return None
        h, d = hadec_from_enu(self.observer.latitude_deg, dirs @ rotation.T)
        ref = math.degrees(math.atan2(np.mean(np.sin(np.radians(h))), np.mean(np.cos(np.radians(h)))))
        h = (h - ref + 180.0) % 360.0 - 180.0 + ref
        if np.ptp(h) > 300.0:  # a window all round the sky: the whole day
            return -200.0, 200.0, float(d.min()), float(d.max())
        return float(h.min()), float(h.max()), float(d.min()), float(d.max())

    # -- one realisation ----------------------------------------------------------------------------
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
        """(D, 3) days: nearest lit day, first and last day of its run, per division (nan: no light).

        Parameters
        ----------
        year : astronomical year.
        rotation : 3×3 rotation of the structure about the target (ENU), or None.
        temperature_c, pressure_mbar : air for refraction (default: the observer's).
        refraction_offset_deg : anomalous refraction at the horizon, degrees (tapers with altitude).
        horizon_offset_deg : raise of the horizon profile, degrees.
        delta_t_z : ΔT error in units of its σ at each division.
        """
        with warnings.catch_warnings():
            # before 3000 BC every call would warn; the studies state it once in their notes instead
            warnings.simplefilter("ignore", SunAccuracyWarning)
            return self._evaluate(year, rotation, temperature_c, pressure_mbar, refraction_offset_deg,
                                  horizon_offset_deg, delta_t_z)  # fmt: skip

    def _evaluate(self, year, rotation, temperature_c, pressure_mbar, refraction_offset_deg, horizon_offset_deg,
                  delta_t_z) -> NDArray:  # fmt: skip
        track = self._track(int(year))
        rot = np.eye(3) if rotation is None else np.asarray(rotation, dtype=float)
        n_div, n_days = track.midnight_ut.shape
        lit = np.zeros((n_div, n_days), bool)
        bounds = self._window_range(rot)
        if bounds is not None:
            lit = self._lit_days(track, rot, bounds, temperature_c, pressure_mbar, refraction_offset_deg,
                                 horizon_offset_deg)  # fmt: skip
        runs = light_runs(lit, self.offsets)
        if delta_t_z:
            lon_d = self.observer.longitude_deg / 360.0
            dt = track.delta_t_s + delta_t_z * track.delta_t_sigma_s
            shift = np.floor(track.division_jd_tt - dt / _DAY_S + lon_d + 0.5) - track.day0
            runs = runs - shift[:, None]
        return runs

    def _lit_days(self, track, rot, bounds, temperature_c, pressure_mbar, refraction_offset_deg, horizon_offset_deg):
        h_lo, h_hi, d_lo, d_hi = bounds
        n_div, n_days = track.midnight_ut.shape
        rows = (track.daily_dec >= d_lo - _MARGIN_DAYS_DEC) & (track.daily_dec <= d_hi + _MARGIN_DAYS_DEC)
        lit = np.zeros((n_div, n_days), bool)
        if not rows.any():
            return lit
        hh = track.hourly_h[rows]  # (R, 25), increasing
        lo, hi = h_lo - _MARGIN_DEG, h_hi + _MARGIN_DEG
        f_lo = _fractional_hour(hh, lo)
        f_hi = _fractional_hour(hh, hi)
        n_fine = int(math.ceil((hi - lo) / (self.step_min * _H_RATE_DEG_PER_MIN))) + 1
        frac = np.linspace(0.0, 1.0, n_fine)[None, :]
        x = f_lo[:, None] + (f_hi - f_lo)[:, None] * frac  # (R, n_fine) fractional hours of the local day
        az, alt = self._sun_at(track.hourly_h[rows], track.hourly_dec[rows], x)
        keep = (alt > _ALTITUDE_FLOOR_DEG) & (f_hi > f_lo)[:, None]
        refraction = self.observer.refraction
        temp = self.observer.temperature_c if temperature_c is None else float(temperature_c)
        pres = self.observer.pressure_mbar if pressure_mbar is None else float(pressure_mbar)
        sun = enu_from_azalt(az[keep], apparent_altitude(alt[keep], refraction, pres, temp))
        if refraction_offset_deg:
            sun = raise_altitude(sun, refraction_offset_deg)
        wide, _ = self._screen()
        g = self.window.grid
        fh, fd = g.fractional_index(*hadec_from_enu(g.latitude_deg, sun @ rot))  # look-up at Rᵀ·s
        k = np.mod(np.rint(fh).astype(np.int64), g.n_h)
        j = np.rint(fd).astype(np.int64)
        inside = (j >= 0) & (j < g.n_d)
        screened = np.zeros(len(sun), bool)
        screened[inside] = wide[k[inside], j[inside]]
        area = np.zeros(len(sun))
        if screened.any():
            area[screened] = lit_area(self.window, sun[screened], self.criterion, rotation=rot,
                                      horizon_offset_deg=horizon_offset_deg)  # fmt: skip
        lit_fine = np.zeros(keep.shape, bool)
        lit_fine[keep] = area > 0
        lit[rows] = lit_fine.any(axis=1)
        return lit

    def _sun_at(self, hourly_h: NDArray, hourly_dec: NDArray, hours: NDArray) -> tuple[NDArray, NDArray]:
        """(azimuth, geometric altitude) in degrees at fractional ``hours`` (R, n) of each row's local day.

        Linear interpolation of the hourly topocentric hour angle and declination: both are smooth to
        better than 1e-4° over an hour (checked against :func:`lightpath.sky.sun.sun_position`).
        """
        i = np.clip(np.floor(hours).astype(np.int64), 0, hourly_h.shape[1] - 2)
        w = hours - i
        r = np.arange(len(hourly_h))[:, None]
        h = hourly_h[r, i] * (1.0 - w) + hourly_h[r, i + 1] * w
        d = hourly_dec[r, i] * (1.0 - w) + hourly_dec[r, i + 1] * w
        return azalt_from_enu(enu_from_hadec(self.observer.latitude_deg, h, d))

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


#: Declination margin on the day screen, degrees: refraction near the horizon plus a day's motion (0.4°).
_MARGIN_DAYS_DEC = 1.5


def _fractional_hour(hourly_h: NDArray, target_deg: float) -> NDArray:
    """Hour of the day (0..24, fractional) at which each row's increasing hour angle reaches ``target_deg``."""
    n = hourly_h.shape[1]
    i = np.clip((hourly_h < target_deg).sum(axis=1) - 1, 0, n - 2)
    rows = np.arange(len(hourly_h))
    a, b = hourly_h[rows, i], hourly_h[rows, i + 1]
    x = i + np.clip((target_deg - a) / (b - a), 0.0, 1.0)
    return np.clip(x, 0.0, n - 1.0)


def area_centroid_m(mesh) -> NDArray:
    """Area-weighted centre of a surface mesh's triangles (ENU metres); also right for an open, flat pane."""
    weights = np.asarray(mesh.area_faces, dtype=float)
    return (np.asarray(mesh.triangles_center, dtype=float) * weights[:, None]).sum(axis=0) / weights.sum()


def light_days_for_scene(
    scene,
    *,
    samples: int = 100,
    seed: int = 0,
    resolution_deg: float = 0.05,
    cache_dir=None,
    progress=None,
    **settings,
) -> tuple[LightDays, NDArray, float | None]:
    """(:class:`LightDays`, target→opening vector in ENU metres, its length or None) for a scene.

    ``scene`` is a :class:`lightpath.site.scene.Scene` or a path; the window comes from the engine's
    :func:`lightpath.light.scan.prepare_window` (``samples`` target samples, ``seed``, ``resolution_deg``,
    cached in ``cache_dir``); ``settings`` go to :class:`LightDays` (criterion, scheme, parts, names,
    span_days, step_min, source).  Without an opening the axis is the mean direction of the open sky
    and the distance is unknown (None: position tolerances are then left out).
    """
    from lightpath.light.scan import prepare_window

    if not hasattr(scene, "observer"):
        from lightpath.scene import load_scene

        scene = load_scene(scene)
    window = prepare_window(scene, samples=samples, seed=seed, resolution_deg=resolution_deg,
                            cache_dir=cache_dir, progress=progress)  # fmt: skip
    light = LightDays(window, scene.observer, **settings)
    if scene.opening is not None:
        axis = area_centroid_m(scene.opening) - area_centroid_m(scene.target)
        return light, axis, float(np.linalg.norm(axis))
    _, dirs = light._screen()
    mean = dirs.mean(axis=0)
    return light, mean / np.linalg.norm(mean), None
