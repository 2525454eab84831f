"""Make the whole report of one scene: ask :mod:`lightpath.study.report_data` for its numbers, then draw and write.

:func:`make_report` is what ``lightpath report`` and ``lightpath demo`` call.  The engine runs
(one sky window, the report's year with its light map, the drift years, the visit plan, the Sun's
paths and the light patch) are made by :func:`lightpath.study.report_data.report_data`; this module
draws the four figures and writes the HTML report, the CSV/JSON tables, the figures and, with a
visit year, an iCalendar file — every file atomically.

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
from typing import Any

import numpy as np

from lightpath.light.options import ScanOptions, WindowOptions, split_settings
from lightpath.light.results import ScanResult
from lightpath.present.figures import epoch_drift_figure, figure_bytes, light_calendar_figure
from lightpath.present.ics import write_calendar
from lightpath.present.report import ReportFigure, ReportTable, write_report
from lightpath.present.tables import clock_hm, day_date, division_label
from lightpath.present.visits import VISIT_COLUMNS, visit_entries, visit_rows
from lightpath.present.window_figures import light_patch_figure, sky_window_figure
from lightpath.sky.calendar import year_label
from lightpath.study.report_data import ReportData, SunPath, report_data
from lightpath.study.visit import VisitPlan

__all__ = ["ReportOutput", "make_report", "patch_labels", "site_summary", "sun_track_lines", "write_scene_report"]


@dataclass
class ReportOutput:
    """What :func:`make_report` made: the written files by name, the scans and the visit plan."""

    paths: dict[str, Path]
    scan: ScanResult
    drift: ScanResult | None = None
    visit: VisitPlan | None = None
    seconds: dict[str, float] = field(default_factory=dict)
    warnings: list[str] = field(default_factory=list)  # accuracy warnings raised on the way (also in the report)


def site_summary(scene: Any, samples: int) -> list[tuple[str, str]]:
    """(label, value) pairs describing the scene for the report (``samples``: the window's target samples)."""
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
        ("Target", f"{rep.target_area_m2:.4f} m² in {rep.target_triangles} triangles, {samples} samples"),
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


def sun_track_lines(paths: Sequence[SunPath]) -> list[tuple[str, np.ndarray, np.ndarray]]:
    """(label, azimuth_deg, altitude_deg) of each division day's Sun path, for :func:`sky_window_figure`."""
    return [(f"{division_label(p.name)} ({day_date(p.day, p.calendar)})", p.azimuth_deg, p.altitude_deg) for p in paths]


def patch_labels(local_apparent_h: Sequence[float]) -> list[str]:
    """Frame labels ``"HH:MM LAT"`` (to the nearest minute).

    >>> patch_labels([7.5, 7.75])
    ['07:30 LAT', '07:45 LAT']
    """
    return [f"{clock_hm(h)} LAT" for h in np.atleast_1d(np.asarray(local_apparent_h, dtype=float))]


def _figure(name: str, caption: str, fig, formats: Sequence[str]) -> ReportFigure:
    png = figure_bytes(fig, "png", 110)
    svg = figure_bytes(fig, "svg") if "svg" in formats else None
    return ReportFigure(name, caption, png, svg)


def make_report(
    scene: Any,
    year: int,
    *,
    out_dir: str | os.PathLike,
    options: ScanOptions | None = None,
    window_options: WindowOptions | None = None,
    visit_year: int | None = None,
    drift_years: Sequence[int] | None = None,
    formats: Sequence[str] = ("png", "svg"),
    progress: Callable[[int], None] | None = None,
    **settings: Any,
) -> ReportOutput:
    """Scan a scene and write its report into ``out_dir`` (see the module notes).

    Parameters
    ----------
    scene : a loaded :class:`lightpath.scene.Scene` or the path of a scene file.
    year : the year of the report (astronomical numbering, e.g. −3199 for 3200 BC).
    options, window_options : the engine's settings (:class:`ScanOptions`, :class:`WindowOptions`);
        ``settings`` are their fields laid over them (e.g. ``samples=200, parts=16``).
    visit_year : a modern year to plan a visit in (civil times, refraction spread, ``visit.ics``).
    drift_years : years for the epoch-drift figure (two or more), or None to leave it out.
    formats : figure files beside the report (``png`` always; ``svg`` optional).
    progress : called with 1 after each stage (6 stages, 3 more with a visit year, 2 more with drift years).
    """
    from lightpath.sky.sources import SunAccuracyWarning

    w, o = split_settings(settings, window_options, options)
    with warnings.catch_warnings(record=True) as caught:
        warnings.simplefilter("always", SunAccuracyWarning)  # every accuracy notice, for the report's notes
        data = report_data(scene, year, options=o, window_options=w, visit_year=visit_year,
                           drift_years=drift_years, progress=progress)  # fmt: skip
        out = write_scene_report(data, out_dir, formats=formats, progress=progress, caught=caught)
    for m in caught:  # anything that is not an accuracy notice goes on as a warning
        if not _is_accuracy_warning(m):
            warnings.warn_explicit(m.message, m.category, m.filename, m.lineno)
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


def write_scene_report(
    data: ReportData,
    out_dir: str | os.PathLike,
    *,
    formats: Sequence[str] = ("png", "svg"),
    progress: Callable[[int], None] | None = None,
    caught: Sequence[warnings.WarningMessage] = (),
) -> ReportOutput:
    """Draw the figures of ``data`` and write the report's files into ``out_dir``.

    ``caught`` are warnings recorded while the data was made: the accuracy notices among them join the
    report's notes.  ``progress`` is called with 1 after each figure and after writing.
    """
    import time

    step = progress or (lambda n=1: None)
    scene, year, o, main = data.scene, data.year, data.options, data.scan
    year_scan = main.years[0]
    seconds = dict(data.seconds)
    clock = time.perf_counter()

    def lap(name: str) -> None:
        nonlocal clock
        now = time.perf_counter()
        seconds[name] = round(now - clock, 3)
        clock = now
        step(1)

    figures = [
        _figure(
            "light-calendar",
            f"Lit area of the target by local apparent day and time, {year_label(year)} (from the December "
            f"solstice of the year before, runs of light drawn whole); dashed lines mark the divisions of the "
            f"year ({o.scheme}, {o.parts} parts).",
            light_calendar_figure(
                year_scan, longitude_deg=scene.observer.longitude_deg, target_area_m2=main.target_area_m2
            ),  # fmt: skip
            formats,
        )
    ]
    lap("light calendar")
    figures.append(
        _figure(
            "sky-window",
            "The sky the target sees through the opening (shaded: from some part of the target), the horizon "
            f"profile and the Sun's apparent path on each division day of {year_label(year)}.",
            sky_window_figure(data.outlines, horizon=data.horizon, sun_tracks=sun_track_lines(data.sun_paths)),
            formats,
        )
    )
    lap("sky window")
    if data.patch is not None:
        p = data.patch
        best = p.event
        figures.append(
            _figure(
                "light-patch",
                f"Where the light falls on the target during the event of {day_date(best.day, best.calendar)} "
                f"({best.calendar} calendar, local apparent day), {clock_hm(best.start_local_apparent_h)}–"
                f"{clock_hm(best.end_local_apparent_h)} local apparent time; target laid flat in its own plane.",
                light_patch_figure(
                    p.points_m,
                    p.lit,
                    patch_labels(p.local_apparent_h),
                    area_m2=p.area_m2,
                    triangles_enu_m=p.triangles_m,
                    facing_enu=np.asarray(p.normals).mean(axis=0),
                ),
                formats,
            )
        )
    lap("light patch")
    if data.drift is not None:
        years = data.drift_years or [y.year for y in data.drift.years]
        figures.append(
            _figure(
                "epoch-drift",
                f"First and last day of light around each division, {year_label(min(years))} to "
                f"{year_label(max(years))}.",
                epoch_drift_figure(data.drift),
                formats,
            )
        )
        lap("epoch drift")

    plan = data.visit
    tables = []
    if plan is not None:
        tables.append(
            ReportTable(
                "visit",
                f"Visit plan for {data.visit_year} ({plan.timezone or 'UTC'} clock times)",
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
        out_dir, main, site=site_summary(scene, data.samples), figures=figures, tables=tables, made_with=made_with
    )
    if plan is not None:
        paths["visit.ics"] = write_calendar(
            Path(out_dir) / "visit.ics",
            visit_entries(plan),
            name=f"{'Moonlight' if main.settings.body == 'moon' else 'Sunlight'} on the target: {main.scene}",
        )
    lap("write")
    return ReportOutput(paths, main, data.drift, plan, seconds, accuracy_warnings)
