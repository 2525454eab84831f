"""Make the whole report of one scene: run the engine once, then draw, tabulate and write.

:func:`make_report` is what ``lightpath report`` and ``lightpath demo`` call.  It
asks the engine (:mod:`lightpath.light.scan`) for one sky window and scans it for
the report's year (with the light map), optionally for a span of years (the
epoch-drift figure) and for a visit year (:mod:`lightpath.study.visit`); then it
draws the four figures and writes the HTML report, the CSV/JSON tables, the
figures and, with a visit year, an iCalendar file — every file atomically.

Typical use::

    from lightpath.present.scene_report import make_report
    out = make_report("site.toml", -3199, out_dir="report", visit_year=2027, samples=400)
    print(out.paths["report.html"])
"""

from __future__ import annotations

import datetime as _dt
import os
import warnings
from collections.abc import Callable, Sequence
from dataclasses import dataclass, field
from pathlib import Path
from typing import TYPE_CHECKING, Any

import numpy as np

from lightpath.errors import InputError
from lightpath.light.results import LightEvent, ScanResult, YearScan
from lightpath.present.civil import jd_from_local_date
from lightpath.present.figures import epoch_drift_figure, figure_bytes, light_calendar_figure
from lightpath.present.ics import write_calendar
from lightpath.present.report import ReportFigure, ReportTable, write_report
from lightpath.present.tables import division_label
from lightpath.present.visits import VISIT_COLUMNS, visit_entries, visit_rows
from lightpath.present.window_figures import light_patch_figure, sky_window_figure, window_outlines
from lightpath.sky.calendar import year_label
from lightpath.sky.instants import format_time_of_day
from lightpath.study.visit import VisitPlan, local_day_start, visit_scene

if TYPE_CHECKING:
    from lightpath.light.scan import ScanOptions

__all__ = ["ReportOutput", "make_report", "patch_frames", "site_summary", "sun_tracks"]

_PATCH_FRAMES = 6


@dataclass
class ReportOutput:
    """What :func:`make_report` made: the written files by name, the scans and the visit plan."""

    paths: dict[str, Path]
    scan: ScanResult
    drift: ScanResult | None = None
    visit: VisitPlan | None = None
    seconds: dict[str, float] = field(default_factory=dict)
    warnings: list[str] = field(default_factory=list)  # accuracy warnings raised on the way (also in the report)


@dataclass(frozen=True)
class _ReportSettings:
    """The keywords of :func:`make_report` (units there), carried into the work it records warnings around."""

    out_dir: str | os.PathLike
    visit_year: int | None
    drift_years: Sequence[int] | None
    scan: ScanOptions  # criterion, scheme, parts, source
    samples: int
    seed: int
    resolution_deg: float
    cache_dir: str | os.PathLike | None
    formats: Sequence[str]
    progress: Callable[[int], None] | None


def site_summary(scene: Any, window: Any) -> list[tuple[str, str]]:
    """(label, value) pairs describing the scene for the report."""
    obs = scene.observer
    rep = scene.report
    horizon = scene.horizon.summary() if scene.horizon is not None else None
    pairs = [
        ("Site", str(scene.label)),
        ("Scene file", str(Path(scene.path).name)),
        ("Latitude", f"{obs.latitude_deg:.5f}° (north positive)"),
        ("Longitude", f"{obs.longitude_deg:.5f}° (east positive)"),
        ("Elevation", f"{obs.elevation_m:.1f} m"),
        ("Time zone", obs.timezone or "none given (UTC used for clock times)"),
        ("Air", f"{obs.pressure_mbar:.1f} mbar, {obs.temperature_c:.1f} °C"),
        ("Target", f"{rep.target_area_m2:.4f} m² in {rep.target_triangles} triangles, {window.samples} samples"),
        ("Opening", "none marked" if rep.opening_area_m2 is None else f"{rep.opening_area_m2:.4f} m²"),
        ("Mesh", f"{rep.triangles} triangles; {'watertight' if rep.watertight else 'not watertight'}"),
    ]
    if horizon is not None:
        pairs.append(
            (
                "Horizon",
                f"{horizon['source'] or 'profile'}: {horizon['min_altitude_deg']:.2f}° to "
                f"{horizon['max_altitude_deg']:.2f}° apparent altitude",
            )
        )
    pairs += [("Warning", w) for w in getattr(scene, "warnings", [])]
    return pairs


def sun_tracks(
    year_scan: YearScan, observer: Any, source: str = "auto", step_min: float = 3.0
) -> list[tuple[str, np.ndarray, np.ndarray]]:
    """The Sun's apparent azimuth/altitude through the local day of each division, above −3°."""
    from lightpath.sky.deltat import tt_from_ut, ut_from_tt
    from lightpath.sky.sun import sun_position

    if not year_scan.divisions:
        return []
    jd_ut = np.asarray(ut_from_tt(np.array([d.jd_tt for d in year_scan.divisions])), dtype=float)
    starts = local_day_start(jd_ut, observer.longitude_deg)
    minutes = np.arange(0.0, 1440.0 + step_min, step_min) / 1440.0
    t = tt_from_ut((starts[:, None] + minutes[None, :]).ravel())
    pos = sun_position(t, observer, source=source)
    az = np.asarray(pos.azimuth_deg).reshape(starts.size, -1)
    alt = np.asarray(pos.altitude_deg).reshape(starts.size, -1)
    out = []
    for k, d in enumerate(year_scan.divisions):
        keep = alt[k] > -3.0
        out.append((f"{division_label(d.name)} ({d.date})", az[k][keep], alt[k][keep]))
    return out


def patch_frames(
    window: Any, observer: Any, event: LightEvent, criterion: str, source: str = "auto", frames: int = _PATCH_FRAMES
) -> tuple[np.ndarray, list[str]]:
    """Per-sample lit flags (frames, samples) at evenly spaced instants through one event, with their labels.

    Asks the engine's disc look-up (:func:`lightpath.light.disc.disc_fraction`) at each instant.
    """
    from lightpath.light.disc import CRITERION_EDGE, disc_fraction, meets
    from lightpath.light.scan import sun_for
    from lightpath.light.sweep import sun_enu
    from lightpath.sky.deltat import tt_from_ut

    span = event.end_jd_ut - event.start_jd_ut
    jd_ut = event.start_jd_ut + span * (np.arange(frames) + 0.5) / frames
    pos, dirs = sun_enu(sun_for(observer, source), tt_from_ut(jd_ut))
    lit = meets(disc_fraction(window, dirs, edge=CRITERION_EDGE[criterion]), criterion)
    hours = np.mod(np.asarray(pos.local_apparent_time_h, dtype=float), 24.0)
    labels = [f"{clock} LAT" for clock in np.atleast_1d(format_time_of_day(hours / 24.0))]  # to the nearest minute
    return lit, labels


def _figure(name: str, caption: str, fig, formats: Sequence[str]) -> ReportFigure:
    png = figure_bytes(fig, "png", 110)
    svg = figure_bytes(fig, "svg") if "svg" in formats else None
    return ReportFigure(name, caption, png, svg)


def make_report(
    scene: Any,
    year: int,
    *,
    out_dir: str | os.PathLike,
    visit_year: int | None = None,
    drift_years: Sequence[int] | None = None,
    criterion: str = "first-gleam",
    scheme: str = "longitude",
    parts: int = 8,
    samples: int = 400,
    seed: int = 0,
    source: str = "auto",
    resolution_deg: float = 0.1,
    cache_dir: str | os.PathLike | None = None,
    formats: Sequence[str] = ("png", "svg"),
    progress: Callable[[int], None] | None = None,
) -> ReportOutput:
    """Scan a scene and write its report into ``out_dir`` (see the module notes).

    Parameters
    ----------
    scene : a loaded :class:`lightpath.site.scene.Scene` or the path of a scene file.
    year : the year of the report (astronomical numbering, e.g. −3199 for 3200 BC).
    visit_year : a modern year to plan a visit in (civil times, refraction spread, ``visit.ics``).
    drift_years : years for the epoch-drift figure (two or more), or None to leave it out.
    criterion, scheme, parts, samples, seed, source, resolution_deg, cache_dir : passed to the engine.
    formats : figure files beside the report (``png`` always; ``svg`` optional).
    progress : called with 1 after each stage (6 stages, 3 more with a visit year, 2 more with drift years).
    """
    from lightpath.light.scan import ScanOptions
    from lightpath.sky.sources import SunAccuracyWarning

    scan = ScanOptions(criterion=criterion, scheme=scheme, parts=parts, source=source)
    settings = _ReportSettings(out_dir, visit_year, drift_years, scan, samples, seed, resolution_deg, cache_dir,
                               formats, progress)  # fmt: skip
    with warnings.catch_warnings(record=True) as caught:
        warnings.simplefilter("always", SunAccuracyWarning)  # every accuracy notice, for the report's notes
        out = _make_report(scene, year, caught, settings)
    for w in caught:  # anything that is not an accuracy notice goes on as a warning
        if not _is_accuracy_warning(w):
            warnings.warn_explicit(w.message, w.category, w.filename, w.lineno)
    return out


def _is_accuracy_warning(w: warnings.WarningMessage) -> bool:
    from lightpath.sky.sources import SunAccuracyWarning

    return issubclass(w.category, SunAccuracyWarning)


def _accuracy_messages(caught: Sequence[warnings.WarningMessage]) -> list[str]:
    out: list[str] = []
    for w in caught:
        text = str(w.message)
        if _is_accuracy_warning(w) and text not in out:
            out.append(text)
    return out


def _make_report(scene: Any, year: int, caught: list, settings: _ReportSettings) -> ReportOutput:
    import dataclasses
    import time

    from lightpath.light.scan import prepare_window, scan_window_with
    from lightpath.scene import load_scene

    step = settings.progress or (lambda n=1: None)
    visit_year, drift_years, formats, seed = settings.visit_year, settings.drift_years, settings.formats, settings.seed
    o = settings.scan
    seconds: dict[str, float] = {}
    clock = time.perf_counter()

    def lap(name: str) -> None:
        nonlocal clock
        now = time.perf_counter()
        seconds[name] = round(now - clock, 3)
        clock = now
        step(1)

    if isinstance(scene, str | os.PathLike):
        scene = load_scene(scene)
    window = prepare_window(scene, samples=settings.samples, seed=seed, resolution_deg=settings.resolution_deg,
                            cache_dir=settings.cache_dir)  # fmt: skip
    label = str(scene.label)
    lap("window")

    def scan(years, **extra):
        options = dataclasses.replace(o, **extra)
        return scan_window_with(window, scene.observer, years, options, scene_label=label, seed=seed,
                                scene_notes=getattr(scene, "warnings", []))  # fmt: skip

    main = scan([year], with_light_map=True)
    year_scan = main.years[0]
    lap("scan")

    drift = None
    if drift_years is not None:
        if len(drift_years) < 2:
            raise InputError("--drift: give at least two years (START:END:STEP)")
        drift = scan(list(drift_years))
        lap("drift")

    plan = None
    if visit_year is not None:
        zone = scene.observer.timezone or "UTC"
        first = jd_from_local_date(_dt.date(visit_year, 1, 1), zone)
        last = jd_from_local_date(_dt.date(visit_year + 1, 1, 1), zone)

        plan = visit_scene(
            scene, first, last, criterion=o.criterion, scheme=o.scheme, parts=o.parts, seed=seed, source=o.source,
            window=window, progress=step,
        )  # fmt: skip
        seconds["visit"] = round(time.perf_counter() - clock, 3)
        clock = time.perf_counter()

    figures = [
        _figure(
            "light-calendar",
            f"Lit area of the target by day and local apparent time, {year_label(year)}; dashed lines mark the "
            f"divisions of the year ({o.scheme}, {o.parts} parts).",
            light_calendar_figure(
                year_scan, longitude_deg=scene.observer.longitude_deg, target_area_m2=main.target_area_m2
            ),  # fmt: skip
            formats,
        )
    ]
    lap("light calendar")
    outlines = window_outlines(window)
    figures.append(
        _figure(
            "sky-window",
            "The sky the target sees through the opening (shaded: from some part of the target), the horizon "
            f"profile and the Sun's apparent path on each division day of {year_label(year)}.",
            sky_window_figure(
                outlines, horizon=_horizon_arrays(scene), sun_tracks=sun_tracks(year_scan, scene.observer, o.source)
            ),  # fmt: skip
            formats,
        )
    )
    lap("sky window")
    if year_scan.events:
        best = max(year_scan.events, key=lambda e: (e.peak_area_m2, -e.start_jd_ut))
        lit, labels = patch_frames(window, scene.observer, best, o.criterion, o.source)
        figures.append(
            _figure(
                "light-patch",
                f"Where the light falls on the target during the event of {best.date} ({best.calendar} calendar), "
                f"{best.start_local_apparent}–{best.end_local_apparent} local apparent time; target laid flat "
                "in its own plane.",
                light_patch_figure(
                    window.points_m,
                    lit,
                    labels,
                    area_m2=window.area_m2,
                    triangles_enu_m=_triangles(scene.target),
                    facing_enu=np.asarray(window.normals).mean(axis=0),
                ),
                formats,
            )
        )
    lap("light patch")
    if drift is not None:
        figures.append(
            _figure(
                "epoch-drift",
                f"First and last day of light around each division, {year_label(min(drift_years))} to "
                f"{year_label(max(drift_years))}.",
                epoch_drift_figure(drift),
                formats,
            )
        )
        lap("epoch drift")

    tables = []
    if plan is not None:
        tables.append(
            ReportTable(
                "visit",
                f"Visit plan for {visit_year} ({plan.timezone or 'UTC'} clock times)",
                visit_rows(plan),
                VISIT_COLUMNS,
                note=" ".join(plan.notes),
            )
        )
    made_with = f"Made with lightpath on {_dt.date.today().isoformat()}."
    accuracy_warnings = _accuracy_messages(caught)
    main = ScanResult(main.scene, main.settings, main.target_area_m2, main.years,
                      list(main.notes) + [m for m in accuracy_warnings if m not in main.notes])  # fmt: skip
    paths = write_report(
        settings.out_dir, main, site=site_summary(scene, window), figures=figures, tables=tables, made_with=made_with
    )
    if plan is not None:
        paths["visit.ics"] = write_calendar(
            Path(settings.out_dir) / "visit.ics", visit_entries(plan), name=f"Sunlight on the target: {label}"
        )
    lap("write")
    return ReportOutput(paths, main, drift, plan, seconds, accuracy_warnings)


def _horizon_arrays(scene: Any) -> tuple[np.ndarray, np.ndarray] | None:
    horizon = getattr(scene, "horizon", None)
    if horizon is None:
        return None
    return np.asarray(horizon.azimuth_deg, dtype=float), np.asarray(horizon.altitude_deg, dtype=float)


def _triangles(mesh: Any) -> np.ndarray | None:
    try:
        return np.asarray(mesh.triangles, dtype=float)
    except AttributeError:
        return None
