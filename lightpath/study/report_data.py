"""Everything a scene's report shows, computed once: the engine runs behind ``lightpath report``.

:func:`report_data` prepares the sky window once and asks the engine (:mod:`lightpath.light.scan`)
for the report's year with its light map, optionally for a span of years (the epoch-drift figure)
and for a modern visit year (:func:`lightpath.study.visit.visit_scene`, same window); then it takes
the Sun's path on each division day of the year from the year's Sun track
(:class:`lightpath.light.track.SunTrack`) and the lit samples of the target at a few instants through
the brightest event (:func:`lightpath.light.disc.disc_fraction`).  The result, :class:`ReportData`,
holds numbers only; :mod:`lightpath.present.scene_report` draws and writes it.

Typical use::

    from lightpath.light.options import ScanOptions, WindowOptions
    from lightpath.study.report_data import report_data
    data = report_data("site.toml", -3199, options=ScanOptions(parts=8), window_options=WindowOptions())
    print(len(data.scan.years[0].events), [p.name for p in data.sun_paths])

References
----------
Meeus, J. (1998). *Astronomical Algorithms*, 2nd ed., ch. 13 (hour angle, azimuth and altitude).
"""

from __future__ import annotations

import datetime as _dt
import os
import time
from collections.abc import Callable, Sequence
from dataclasses import dataclass, field, replace
from typing import Any

import numpy as np

from lightpath.errors import InputError
from lightpath.light.options import ScanOptions, WindowOptions
from lightpath.light.results import LightEvent, ScanResult, YearScan
from lightpath.study.visit import VisitPlan
from lightpath.study.window_outline import window_outlines

__all__ = ["LightPatch", "PATCH_FRAMES", "ReportData", "SunPath", "report_data", "year_span_jd_ut"]

#: Instants through the brightest event at which the light patch is shown.
PATCH_FRAMES = 6
#: Spacing of the Sun's path on each division day, minutes.
PATH_STEP_MIN = 3.0
_DAY_S = 86400.0
_UNIX_EPOCH_JD = 2440587.5  # 1970-01-01 00:00 UT


@dataclass(frozen=True)
class SunPath:
    """The Sun's apparent place through one division's local apparent day (above −3° apparent altitude)."""

    name: str  # the division's name (lightpath.sky.divisions.division_name)
    day: int  # its local apparent day (Julian day number)
    calendar: str
    azimuth_deg: np.ndarray  # from true north, clockwise
    altitude_deg: np.ndarray  # apparent (refracted)


@dataclass(frozen=True)
class LightPatch:
    """Which target samples are lit at a few instants through one event.

    ``lit`` (F, S) per frame and sample; ``jd_ut`` (F,) the instants and ``local_apparent_h`` (F,) their
    local apparent times (hours 0..24); ``points_m``, ``normals``, ``area_m2`` the window's samples (ENU);
    ``triangles_m`` (T, 3, 3) the target's triangles, or None.
    """

    event: LightEvent
    lit: np.ndarray
    jd_ut: np.ndarray
    local_apparent_h: np.ndarray
    points_m: np.ndarray
    normals: np.ndarray
    area_m2: np.ndarray
    triangles_m: np.ndarray | None


@dataclass
class ReportData:
    """What a report shows, as numbers (see the module notes)."""

    scene: Any  # the loaded lightpath.scene.Scene
    year: int
    options: ScanOptions
    window_options: WindowOptions
    samples: int  # samples of the window
    scan: ScanResult  # the report's year, with its light map
    outlines: list[tuple[np.ndarray, np.ndarray]]  # the window's outline(s), azimuth/altitude degrees
    sun_paths: list[SunPath]
    patch: LightPatch | None
    horizon: tuple[np.ndarray, np.ndarray] | None  # (azimuth_deg, apparent altitude_deg), or None: flat
    drift: ScanResult | None = None
    drift_years: list[int] | None = None
    visit: VisitPlan | None = None
    visit_year: int | None = None
    seconds: dict[str, float] = field(default_factory=dict)


def year_span_jd_ut(year: int, timezone: str | None) -> tuple[float, float]:
    """Julian dates (UT) of civil midnight on 1 January of ``year`` and of ``year + 1`` in ``timezone`` (UTC if None).

    >>> year_span_jd_ut(2000, None)
    (2451544.5, 2451910.5)
    """
    from zoneinfo import ZoneInfo

    zone = ZoneInfo(timezone or "UTC")
    epoch = _dt.datetime(1970, 1, 1, tzinfo=_dt.UTC)

    def jd(y: int) -> float:
        return _UNIX_EPOCH_JD + (_dt.datetime(y, 1, 1, tzinfo=zone) - epoch).total_seconds() / _DAY_S

    return jd(int(year)), jd(int(year) + 1)


def sun_paths(track, year_scan: YearScan, longitude_deg: float, step_min: float = PATH_STEP_MIN) -> list[SunPath]:
    """The Sun through the local apparent day of each division of ``year_scan``, looked up on ``track``.

    ``track`` is the year's :class:`~lightpath.light.track.SunTrack` (its span covers every division day).
    """
    if not year_scan.divisions:
        return []
    days = np.array([d.day for d in year_scan.divisions], dtype=float)
    minutes = np.arange(0.0, 1440.0 + step_min, step_min) / 1440.0
    # local mean midnight starting each day (UT), turned to TT with the track's ΔT there
    start_ut = days - 0.5 - longitude_deg / 360.0
    lo, hi = track.span
    dt_d = np.interp(start_ut, track.jd_tt, track.delta_t_s) / _DAY_S
    t = np.clip((start_ut + dt_d)[:, None] + minutes[None, :], lo, hi)
    pos = track.positions(t)
    az = np.asarray(pos.azimuth_deg).reshape(t.shape)
    alt = np.asarray(pos.altitude_deg).reshape(t.shape)
    out = []
    for k, d in enumerate(year_scan.divisions):
        keep = alt[k] > -3.0
        out.append(SunPath(d.name, int(d.day), d.calendar, az[k][keep], alt[k][keep]))
    return out


def light_patch(window, track, event: LightEvent, criterion: str, target: Any = None,
                frames: int = PATCH_FRAMES) -> LightPatch:  # fmt: skip
    """Per-sample lit flags at ``frames`` evenly spaced instants through ``event`` (the engine's disc look-up)."""
    from lightpath.light.disc import CRITERION_EDGE, disc_fraction, meets

    span = event.end_jd_ut - event.start_jd_ut
    jd_ut = event.start_jd_ut + span * (np.arange(frames) + 0.5) / frames
    lo, hi = track.span
    pos = track.positions(np.clip(jd_ut + event.delta_t_s / _DAY_S, lo, hi))
    semidiameter = track.disc_semidiameter_deg  # the Sun's or the Moon's disc, as the sweep used
    lit = meets(disc_fraction(window, pos.directions(), edge=CRITERION_EDGE[criterion], semidiameter_deg=semidiameter),
                criterion)  # fmt: skip
    try:
        triangles = np.asarray(target.triangles, dtype=float) if target is not None else None
    except AttributeError:
        triangles = None
    return LightPatch(event, lit, jd_ut, np.mod(np.asarray(pos.local_apparent_time_h, float), 24.0),
                      np.asarray(window.points_m), np.asarray(window.normals), np.asarray(window.area_m2),
                      triangles)  # fmt: skip


def _horizon_arrays(scene: Any) -> tuple[np.ndarray, np.ndarray] | None:
    horizon = getattr(scene, "horizon", None)
    if horizon is None:
        return None
    return np.asarray(horizon.azimuth_deg, dtype=float), np.asarray(horizon.altitude_deg, dtype=float)


def report_data(
    scene: Any,
    year: int,
    *,
    options: ScanOptions | None = None,
    window_options: WindowOptions | None = None,
    visit_year: int | None = None,
    drift_years: Sequence[int] | None = None,
    progress: Callable[[int], None] | None = None,
) -> ReportData:
    """Run the engine for a report (see the module notes).

    Parameters
    ----------
    scene : a :class:`lightpath.scene.Scene` or the path of a scene file.
    year : the report's year (astronomical numbering, e.g. −3199 for 3200 BC).
    options, window_options : the engine's settings (defaults: :class:`ScanOptions`, :class:`WindowOptions`).
    visit_year : a modern year to plan a visit in (civil midnight to civil midnight in the site's zone).
    drift_years : two or more years for the epoch-drift figure, or None.
    progress : called with 1 after each stage: the window, the year, the drift years (when asked)
        and each refraction case of the visit.
    """
    from lightpath.light.scan import prepare_window, scan_window
    from lightpath.light.year import year_sky
    from lightpath.study.visit import visit_scene

    o = (options if options is not None else ScanOptions()).check()
    w = (window_options if window_options is not None else WindowOptions()).check()
    if drift_years is not None and len(drift_years) < 2:
        raise InputError("drift_years: give at least two years")
    step = progress or (lambda n=1: None)
    seconds: dict[str, float] = {}
    clock = time.perf_counter()

    def lap(name: str, advance: bool = True) -> None:
        nonlocal clock
        now = time.perf_counter()
        seconds[name] = round(now - clock, 3)
        clock = now
        if advance:
            step(1)

    if isinstance(scene, str | os.PathLike):
        from lightpath.scene import load_scene

        scene = load_scene(scene)
    window = prepare_window(scene, w)
    label = str(getattr(scene, "label", "") or scene.path)
    notes = list(getattr(scene, "warnings", []))
    lap("window")

    def scan(years: Sequence[int], with_light_map: bool = False) -> ScanResult:
        return scan_window(window, scene.observer, years, o, with_light_map=with_light_map, scene_label=label,
                           seed=w.seed, scene_notes=notes)  # fmt: skip

    main = scan([int(year)], with_light_map=True)
    year_scan = main.years[0]
    track = year_sky(scene.observer, int(year), o).track
    # the Sun's paths on the division days, also in a moonlight report (the Moon's track is gated by the Sun)
    sun_track = track if o.body == "sun" else year_sky(scene.observer, int(year), replace(o, body="sun")).track
    paths = sun_paths(sun_track, year_scan, scene.observer.longitude_deg)
    patch = None
    if year_scan.events:
        best = max(year_scan.events, key=lambda e: (e.peak_area_m2, -e.start_jd_ut))
        patch = light_patch(window, track, best, o.criterion, getattr(scene, "target", None))
    lap("scan")

    drift = None
    if drift_years is not None:
        drift = scan(list(drift_years))
        lap("drift")

    plan = None
    if visit_year is not None:
        first, last = year_span_jd_ut(visit_year, scene.observer.timezone)
        plan = visit_scene(scene, first, last, o, w, window=window, progress=step)
        lap("visit", advance=False)

    return ReportData(
        scene=scene,
        year=int(year),
        options=o,
        window_options=w,
        samples=int(window.samples),
        scan=main,
        outlines=window_outlines(window),
        sun_paths=paths,
        patch=patch,
        horizon=_horizon_arrays(scene),
        drift=drift,
        drift_years=None if drift_years is None else [int(y) for y in drift_years],
        visit=plan,
        visit_year=visit_year,
        seconds=seconds,
    )
