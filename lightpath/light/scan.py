"""The engine's front door: scan a scene for the days and minutes of light in chosen years.

>>> from lightpath.light.scan import parse_years
>>> parse_years("-3500:-2500:250")
[-3500, -3250, -3000, -2750, -2500]

Typical use (a scene file read by :mod:`lightpath.scene`)::

    from lightpath.light.scan import scan_scene
    result = scan_scene("site.toml", [-1499], parts=8)          # settings: WindowOptions, ScanOptions fields
    for event in result.years[0].events:
        print(event.day, event.start_local_apparent_h, event.division, event.offset_days, event.peak_area_m2)

For many scans of one scene make the window once with :func:`prepare_window` and call
:func:`scan_window`.  Every scan goes through :mod:`lightpath.light.year` (one Sun track, one
sweep, one rule for light runs and their divisions); the studies use the same path.
"""

from __future__ import annotations

import warnings
from collections.abc import Callable, Sequence
from pathlib import Path

import numpy as np

from lightpath.errors import InputError
from lightpath.light.disc import SEMIDIAMETER_DEG, lit_area
from lightpath.light.events import division_lights, light_events
from lightpath.light.options import Conditions, ScanOptions, WindowOptions, split_settings
from lightpath.light.results import LightMap, ScanResult, ScanSettings, YearScan
from lightpath.light.window import SkyWindow, compute_window
from lightpath.light.year import MARGIN_DAYS, YearLight, year_light, year_sky
from lightpath.sky.calendar import calendar_for, year_from_label
from lightpath.sky.observer import Observer
from lightpath.sky.seasons import YEAR_MAX, YEAR_MIN

__all__ = [
    "MAX_YEARS",
    "check_years",
    "parse_years",
    "prepare_window",
    "scan_scene",
    "scan_settings",
    "scan_window",
    "scan_year",
]

#: Most years one scan may ask for.
MAX_YEARS = 20000


def parse_years(text: str, option: str = "--years") -> list[int]:
    """``"START:END:STEP"`` (astronomical or BC forms, END included) or ``"Y1,Y2,…"`` → list of years."""
    text = str(text).strip()
    if ":" in text:
        parts = text.split(":")
        if len(parts) not in (2, 3):
            raise InputError(
                f"{option}: {text!r} is not START:END[:STEP] (e.g. -3500:-2500:50 or '3500 BC:2500 BC:50')"
            )
        start, end = year_from_label(parts[0], option), year_from_label(parts[1], option)
        try:
            step = int(parts[2]) if len(parts) == 3 else 1
        except ValueError:
            raise InputError(f"{option}: step {parts[2]!r} is not a whole number of years") from None
        if step <= 0:
            raise InputError(f"{option}: step {step} must be a positive number of years")
        if end < start:
            raise InputError(f"{option}: END {end} is before START {start}")
        if (end - start) // step + 1 > MAX_YEARS:
            raise InputError(f"{option}: more than {MAX_YEARS} years; use a larger step")
        years = list(range(start, end + 1, step))
    else:
        years = [year_from_label(p, option) for p in text.split(",") if p.strip()]
    check_years(years, option)
    return years


def check_years(years: Sequence[int], what: str = "years") -> list[int]:
    """Whole years (integers, astronomical numbering, or labels such as ``"2500 BC"``) within the supported range,
    else :class:`InputError`."""
    out = []
    for y in [years] if isinstance(years, int | str) else years:
        y = year_from_label(y, what) if isinstance(y, str) else y
        if isinstance(y, bool) or not isinstance(y, int | np.integer) or not YEAR_MIN <= int(y) <= YEAR_MAX:
            raise InputError(f"{what}: {y!r} is not a whole year in {YEAR_MIN}..{YEAR_MAX} (astronomical numbering)")
        out.append(int(y))
    if not out:
        raise InputError(f"{what}: no years given")
    if len(out) > MAX_YEARS:
        raise InputError(f"{what}: {len(out)} years is more than {MAX_YEARS}; use a larger step")
    return out


def _sees_sky(window: SkyWindow) -> bool:
    """Whether any escaping direction is above the horizon (less the disc's semidiameter)."""
    s, i, j = np.nonzero(window.escape)
    if s.size == 0:
        return False
    step = max(1, s.size // 200_000)  # a thinned check is enough to tell "none" from "some"
    s, i, j = s[::step], i[::step], j[::step]
    v = window.grid.directions(window.h0[s] + i, window.d0[s] + j)
    alt = np.degrees(np.arcsin(np.clip(v[:, 2], -1, 1)))
    az = np.degrees(np.arctan2(v[:, 0], v[:, 1])) % 360.0
    horizon = np.zeros_like(az) if window.horizon is None else window.horizon.altitude_at(az)
    return bool(np.any(alt > horizon - SEMIDIAMETER_DEG))


def prepare_window(
    scene,
    options: WindowOptions | None = None,
    *,
    progress: Callable[[int, int], None] | None = None,
    **window_options,
) -> SkyWindow:
    """Sample the scene's target and ray-cast its sky window (cached when ``options.cache_dir`` is set).

    Parameters
    ----------
    scene : a :class:`lightpath.scene.Scene` or the path of a scene file.
    options : samples, seed, resolution_deg, cache_dir (:class:`~lightpath.light.options.WindowOptions`).
    window_options : fields of :class:`WindowOptions` laid over ``options``; the rest go to
        :func:`lightpath.light.window.compute_window` (``coarse_deg``, ``search_deg``, …).

    Raises
    ------
    InputError when the target sees no sky in any direction the Sun can take.
    """
    import dataclasses

    from lightpath.site.sampling import sample_target

    names = {f.name for f in dataclasses.fields(WindowOptions)}
    mine = {k: window_options.pop(k) for k in list(window_options) if k in names}
    o = dataclasses.replace(options if options is not None else WindowOptions(), **mine).check()
    scene = _as_scene(scene)
    ts = sample_target(scene.target, count=int(o.samples), seed=int(o.seed))
    window = compute_window(
        scene.mesh,
        ts.points_m,
        ts.normals,
        ts.area_m2,
        scene.observer.latitude_deg,
        opening=scene.opening,
        resolution_deg=o.resolution_deg,
        declination_limit_deg=o.declination_limit_deg,
        cache_dir=o.cache_dir,
        content_key=scene.content_hash or None,
        progress=progress,
        **window_options,
    )
    window.horizon = scene.horizon
    if not _sees_sky(window):
        where = "through the opening" if scene.opening is not None else "anywhere"
        raise InputError(
            f"{scene.path}: the target sees no sky {where} in the directions the Sun can take at latitude "
            f"{scene.observer.latitude_deg:g}° (declination ±{o.declination_limit_deg:g}°, above the horizon); "
            "check the target, the opening and the mesh's normals"
        )
    return window


def _light_map(window: SkyWindow, light: YearLight, events, criterion: str) -> LightMap:
    """Lit area by reported day × minute of local apparent time, around the hours with light."""
    sky = light.sky
    reported = light.runs[light.reported()] if light.runs.size else np.zeros((0, 2), np.int64)
    first = int(reported[:, 0].min()) if reported.size else sky.first_day + MARGIN_DAYS
    last = int(reported[:, 1].max()) if reported.size else sky.last_day - MARGIN_DAYS
    days = np.arange(first, last + 1)
    if events:
        lo = int(min(e.start_local_apparent_h for e in events) * 60.0) - 30
        hi = int(max(e.end_local_apparent_h for e in events) * 60.0) + 31
        if hi <= lo:  # an interval across local midnight
            lo, hi = 0, 1439
    else:
        lo, hi = 720, 720
    minutes = np.arange(max(lo, 0), min(hi, 1439) + 1, dtype=float)
    lon_d = sky.observer.longitude_deg / 360.0
    # local apparent noon of each day, found on the track by the hour angle (LAT = 12 h)
    noon_guess = days - lon_d + float(np.median(sky.track.delta_t_s)) / 86400.0
    lat = sky.track.positions(noon_guess).local_apparent_time_h
    noon_tt = noon_guess - (np.mod(np.asarray(lat), 24.0) - 12.0) / 24.0
    t = (noon_tt - 0.5)[:, None] + minutes[None, :] / 1440.0
    lo_t, hi_t = sky.track.span
    t = np.clip(t, lo_t, hi_t)
    pos = sky.track.positions(t.ravel())
    area = lit_area(window, pos.directions(), criterion)
    midnight_ut = noon_tt - 0.5 - np.asarray(sky.track.positions(noon_tt).delta_t_s) / 86400.0
    return LightMap(midnight_ut, minutes, area.reshape(t.shape))


def scan_year(
    window: SkyWindow,
    observer: Observer,
    year: int,
    options: ScanOptions | None = None,
    conditions: Conditions | None = None,
    *,
    with_light_map: bool = False,
) -> YearScan:
    """Every light event of one year and its light runs per division (see :mod:`lightpath.light.year`).

    Warnings raised by the Sun model or the divisions (e.g. epochs beyond the checked span) are
    recorded once each in the year's ``notes`` instead of being printed.
    """
    o = (options if options is not None else ScanOptions()).check()
    sky = year_sky(observer, int(year), o)
    with warnings.catch_warnings(record=True) as caught:
        warnings.simplefilter("always")
        light = year_light(window, sky, conditions)
        events = light_events(light, window.total_area_m2)
        summary = division_lights(light)
        light_map = _light_map(window, light, events, o.criterion) if with_light_map else None
    notes = list(sky.notes)
    for w in caught:
        text = f"{w.category.__name__}: {w.message}"
        if text not in notes:
            notes.append(text)
    if light.edge:
        notes.append(
            f"a run of light days reaches the sweep's edge ({MARGIN_DAYS} days beyond the year's divisions); "
            "it may be longer"
        )
    first_in_year = min(d.day for d in summary) if summary else sky.first_day
    cal = str(calendar_for(float(first_in_year), o.calendar))
    return YearScan(int(year), cal, sky.track.source, events, summary, light_map, notes)


def scan_window(
    window: SkyWindow,
    observer: Observer,
    years: Sequence[int],
    options: ScanOptions | None = None,
    *,
    with_light_map: bool = False,
    progress: Callable[[int, int], None] | None = None,
    scene_label: str = "",
    seed: int = 0,
    scene_notes: Sequence[str] = (),
) -> ScanResult:
    """Scan a prepared window over ``years`` (astronomical numbering, −10000…2999).

    Parameters
    ----------
    window : from :func:`prepare_window` (its ``horizon`` is used).
    observer : the site and its air (refraction).
    options : :class:`~lightpath.light.options.ScanOptions` (criterion, scheme, parts, source, ΔT, calendar, step).
    with_light_map : also compute the lit area by day × local apparent time (the light-calendar figure).
    progress : ``progress(done, total)`` after each year.
    scene_label, seed : recorded in the result (the seed that sampled the window).
    scene_notes : e.g. the scene file's warnings, added to the result's notes, each once.
    """
    years = check_years(list(years))
    o = (options if options is not None else ScanOptions()).check()
    out = []
    for n, year in enumerate(years, start=1):
        out.append(scan_year(window, observer, year, o, with_light_map=with_light_map))
        if progress is not None:
            progress(n, len(years))
    settings = scan_settings(window, observer, o, seed)
    notes = list(window.notes)
    notes += [w for w in scene_notes if w not in notes]
    return ScanResult(scene_label, settings, window.total_area_m2, out, notes)


def scan_settings(window: SkyWindow, observer: Observer, options: ScanOptions, seed: int) -> ScanSettings:
    """The settings a scan reports beside its results (samples and cell size from the window)."""
    return ScanSettings(
        options.criterion,
        options.scheme,
        int(options.parts),
        window.samples,
        int(seed),
        window.resolution_deg,
        observer.refraction,
        options.source,
        options.delta_t_s,
        float(options.step_min),
        body=options.body,
        sun_below_deg=float(options.sun_below_deg) if options.body == "moon" else None,
        min_illuminated_fraction=float(options.min_illuminated_fraction) if options.body == "moon" else None,
    )


def scan_scene(
    scene,
    years: Sequence[int],
    options: ScanOptions | None = None,
    window_options: WindowOptions | None = None,
    *,
    with_light_map: bool = False,
    progress: Callable[[int, int], None] | None = None,
    **settings,
) -> ScanResult:
    """Every interval of sunlight on the scene's target in ``years``: see :func:`scan_window`.

    ``settings`` are fields of :class:`WindowOptions` and :class:`ScanOptions` laid over the
    options given (e.g. ``samples=200, parts=4``).  ``progress(done, total)`` counts the window as
    one step and each year as one.
    """
    w, o = split_settings(settings, window_options, options)
    years = check_years(list(years))
    scene = _as_scene(scene)
    total = len(years) + 1
    window = prepare_window(scene, w)
    if progress is not None:
        progress(1, total)

    def step(done, _):
        if progress is not None:
            progress(done + 1, total)

    label = str(getattr(scene, "label", "") or scene.path)
    return scan_window(window, scene.observer, years, o, with_light_map=with_light_map, progress=step,
                       scene_label=label, seed=w.seed, scene_notes=list(getattr(scene, "warnings", [])))  # fmt: skip


def _as_scene(scene):
    if isinstance(scene, str | Path):
        from lightpath.scene import load_scene

        return load_scene(scene)
    return scene
