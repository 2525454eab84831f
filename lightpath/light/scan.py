"""The engine's front door: scan a scene for the days and minutes of light in chosen years.

>>> from lightpath.light.scan import parse_years
>>> parse_years("-3500:-2500:250")
[-3500, -3250, -3000, -2750, -2500]

Typical use (a scene file from :mod:`lightpath.site`)::

    from lightpath.light.scan import scan_scene
    result = scan_scene("site.toml", [-3199], criterion="first-gleam", scheme="longitude", parts=8)
    for event in result.years[0].events:
        print(event.date, event.start_local_apparent, event.end_local_apparent, event.peak_area_m2)

For many scans of one scene (studies), make the window once with
:func:`prepare_window` and call :func:`scan_window` (or, lower down,
:func:`lightpath.light.disc.lit_area` and :func:`lightpath.light.sweep.find_light`).

The year ``Y`` runs over the local days 1 January to 31 December of ``Y`` in the
chosen calendar (Julian before 1582-10-15 by default); the sweep runs 40 days
further on each side so that runs of light days across New Year are whole in
the per-division summary.
"""

from __future__ import annotations

import dataclasses
import warnings
from collections.abc import Callable, Sequence
from pathlib import Path

import numpy as np

from lightpath.errors import InputError
from lightpath.light.disc import CRITERIA, SEMIDIAMETER_DEG, lit_area
from lightpath.light.events import division_runs, light_events, local_day_number
from lightpath.light.grid import DECLINATION_LIMIT_DEG
from lightpath.light.results import LightMap, ScanResult, ScanSettings, YearScan
from lightpath.light.sweep import find_light, sun_enu
from lightpath.light.window import SkyWindow, compute_window
from lightpath.sky.calendar import calendar_for, julian_day, year_from_label
from lightpath.sky.deltat import tt_from_ut, ut_date_uncertain
from lightpath.sky.observer import Observer
from lightpath.sky.seasons import YEAR_MAX, YEAR_MIN

__all__ = [
    "MARGIN_DAYS",
    "ScanOptions",
    "parse_years",
    "prepare_window",
    "scan_scene",
    "scan_window",
    "scan_window_with",
    "scan_year",
    "sun_for",
]

#: Days swept beyond each end of a year, for whole runs of light days around New Year.
MARGIN_DAYS = 40


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
        years = list(range(start, end + 1, step))
    else:
        years = [year_from_label(p, option) for p in text.split(",") if p.strip()]
    check_years(years, option)
    return years


def check_years(years: Sequence[int], what: str = "years") -> list[int]:
    """Whole years within the supported range, else :class:`InputError`."""
    out = []
    for y in years:
        if isinstance(y, bool) or not isinstance(y, int | np.integer) or not YEAR_MIN <= int(y) <= YEAR_MAX:
            raise InputError(f"{what}: {y!r} is not a whole year in {YEAR_MIN}..{YEAR_MAX} (astronomical numbering)")
        out.append(int(y))
    if not out:
        raise InputError(f"{what}: no years given")
    if len(out) > 20000:
        raise InputError(f"{what}: {len(out)} years is more than 20000; use a larger step")
    return out


def sun_for(observer: Observer, source: str = "auto", delta_t_s: float | None = None) -> Callable:
    """``sun(jd_tt) → SunPosition`` bound to a site, source and optional fixed ΔT."""
    from lightpath.sky.sun import sun_position

    def sun(jd_tt):
        return sun_position(jd_tt, observer, source=source, delta_t_s=delta_t_s)

    return sun


def _check_names(criterion: str, scheme: str, parts: int) -> None:
    from lightpath.sky.divisions import MAX_PARTS, SCHEMES

    if criterion not in CRITERIA:
        raise InputError(f"criterion {criterion!r} is not one of {', '.join(CRITERIA)}")
    if scheme not in SCHEMES:
        raise InputError(f"scheme {scheme!r} is not one of {', '.join(SCHEMES)}")
    if isinstance(parts, bool) or not isinstance(parts, int | np.integer) or not 2 <= parts <= MAX_PARTS:
        raise InputError(f"parts {parts!r} is not a whole number in 2..{MAX_PARTS}")


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
    *,
    samples: int = 1000,
    seed: int = 0,
    resolution_deg: float = 0.05,
    cache_dir: str | Path | None = None,
    progress: Callable[[int, int], None] | None = None,
    **window_options,
) -> SkyWindow:
    """Sample the scene's target and ray-cast its sky window (cached when ``cache_dir`` is given).

    Parameters
    ----------
    scene : a :class:`lightpath.site.scene.Scene` or the path of a scene file.
    samples : number of target samples (area-weighted, stratified; :func:`lightpath.site.sampling.sample_target`).
    seed : random-number-generator seed of the sampling (same seed → same window).
    resolution_deg : window cell size, degrees.
    cache_dir : folder for cached windows, or None.
    window_options : passed to :func:`lightpath.light.window.compute_window` (``coarse_deg``, ``search_deg``, …).

    Raises
    ------
    InputError when the target sees no sky in any direction the Sun can take.
    """
    from lightpath.site.sampling import sample_target

    scene = _as_scene(scene)
    if isinstance(samples, bool) or not isinstance(samples, int | np.integer) or not 1 <= samples <= 1_000_000:
        raise InputError(f"samples {samples!r} is not a whole number in 1..1000000")
    ts = sample_target(scene.target, count=int(samples), seed=int(seed))
    window = compute_window(
        scene.mesh,
        ts.points_m,
        ts.normals,
        ts.area_m2,
        scene.observer.latitude_deg,
        opening=scene.opening,
        resolution_deg=resolution_deg,
        cache_dir=cache_dir,
        content_key=scene.content_hash or None,
        progress=progress,
        **window_options,
    )
    window.horizon = scene.horizon
    if not _sees_sky(window):
        where = "through the opening" if scene.opening is not None else "anywhere"
        raise InputError(
            f"{scene.path}: the target sees no sky {where} in the directions the Sun can take at latitude "
            f"{scene.observer.latitude_deg:g}° (declination ±{DECLINATION_LIMIT_DEG:g}°, above the horizon); "
            "check the target, the opening and the mesh's normals"
        )
    return window


def _as_scene(scene):
    if isinstance(scene, str | Path):
        from lightpath.scene import load_scene

        return load_scene(scene)
    return scene


def _year_bounds(year: int, observer: Observer, calendar: str, delta_t_s: float | None):
    """(first local day number, last local day number, TT span) of calendar year ``year`` at the site."""
    first = int(round(float(julian_day(year, 1, 1.5, calendar))))
    last = int(round(float(julian_day(year + 1, 1, 1.5, calendar)))) - 1
    lon_d = observer.longitude_deg / 360.0
    ut = np.array([first - 0.5 - lon_d - MARGIN_DAYS, last + 0.5 - lon_d + MARGIN_DAYS])
    tt = tt_from_ut(ut, delta_t_s)
    return first, last, float(tt[0]), float(tt[1])


def _light_map(window, sun, observer, first, last, events, criterion, lookup) -> LightMap:
    days = np.arange(first, last + 1)
    if events:
        lo = min(_minutes(e.start_local_apparent) for e in events) - 30
        hi = max(_minutes(e.end_local_apparent) for e in events) + 30
        if hi <= lo:  # an interval across local midnight
            lo, hi = 0, 1439
    else:
        lo, hi = 720, 720
    minutes = np.arange(max(lo, 0), min(hi, 1439) + 1, dtype=float)
    noon_ut = days - observer.longitude_deg / 360.0
    pos = sun(tt_from_ut(noon_ut, None if lookup.get("delta_t_s") is None else lookup["delta_t_s"]))
    eot_d = np.asarray(pos.equation_of_time_min) / 1440.0
    midnight_ut = days - 0.5 - observer.longitude_deg / 360.0 - eot_d
    dts = np.asarray(pos.delta_t_s) / 86400.0
    t = (midnight_ut + dts)[:, None] + minutes[None, :] / 1440.0
    _, dirs = sun_enu(sun, t.ravel())
    area = lit_area(
        window,
        dirs,
        criterion,
        rotation=lookup.get("rotation"),
        horizon_offset_deg=lookup.get("horizon_offset_deg", 0.0),
        limb_darkening_u=lookup.get("limb_darkening_u"),
    )
    return LightMap(midnight_ut, minutes, area.reshape(t.shape))


def _minutes(hhmm: str) -> int:
    h, m = hhmm.split(":")[:2]
    return int(h) * 60 + int(m) if h.isdigit() else 720


@dataclasses.dataclass(frozen=True)
class ScanOptions:
    """How each year of a scan is swept and summed up: everything but the window, the site and the years.

    The public scan functions take these as keywords (documented in :func:`scan_window` and
    :func:`scan_year`), build one ``ScanOptions`` and pass it down; :func:`scan_window_with` takes it as is.

    criterion : ``first-gleam``, ``half-disc`` or ``full-disc``.
    scheme, parts : divisions of the year (:func:`lightpath.sky.divisions.divisions`).
    source : Sun position source (``auto``, ``jpl``, ``vsop87``).
    delta_t_s : fixed ΔT in seconds, or None for the model (with its σ).
    calendar : ``auto``, ``julian`` or ``gregorian`` for the dates.
    with_light_map : also compute the lit area by day × local apparent time.
    rotation : 3×3 matrix rotating the whole structure about the target, or None
        (:func:`lightpath.light.disc.disc_fraction`).
    horizon_offset_deg : degrees added to the horizon profile's apparent altitudes.
    limb_darkening_u : linear limb-darkening coefficient of the disc, or None for a uniform disc.
    step_min : the sweep's fine sampling step, minutes (:func:`lightpath.light.sweep.find_light`).

    >>> ScanOptions(parts=4).with_light_map
    False
    """

    criterion: str = "first-gleam"
    scheme: str = "longitude"
    parts: int = 8
    source: str = "auto"
    delta_t_s: float | None = None
    calendar: str = "auto"
    with_light_map: bool = False
    rotation: np.ndarray | None = None
    horizon_offset_deg: float = 0.0
    limb_darkening_u: float | None = None
    step_min: float = 1.0

    def check(self) -> None:
        """:class:`InputError` for an unknown criterion or scheme or a number of parts out of range."""
        _check_names(self.criterion, self.scheme, self.parts)


def scan_year(
    window: SkyWindow,
    observer: Observer,
    year: int,
    *,
    criterion: str = "first-gleam",
    scheme: str = "longitude",
    parts: int = 8,
    source: str = "auto",
    delta_t_s: float | None = None,
    calendar: str = "auto",
    with_light_map: bool = False,
    rotation=None,
    horizon_offset_deg: float = 0.0,
    limb_darkening_u: float | None = None,
    step_min: float = 1.0,
) -> YearScan:
    """Every light event of one year and the per-division summary (see :func:`scan_window`).

    Warnings raised by the Sun model or the divisions (e.g. epochs beyond the checked span) are
    recorded once each in the year's ``notes`` instead of being printed.
    """
    options = ScanOptions(criterion, scheme, parts, source, delta_t_s, calendar, with_light_map, rotation,
                          horizon_offset_deg, limb_darkening_u, step_min)  # fmt: skip
    return _scan_year(window, observer, year, options)


def _scan_year(window: SkyWindow, observer: Observer, year: int, options: ScanOptions) -> YearScan:
    """:func:`_sweep_year` with its warnings recorded once each in the year's ``notes``."""
    with warnings.catch_warnings(record=True) as caught:
        warnings.simplefilter("always")
        result = _sweep_year(window, observer, year, options)
    notes = list(result.notes)
    for w in caught:
        text = f"{w.category.__name__}: {w.message}"
        if text not in notes:
            notes.append(text)
    return dataclasses.replace(result, notes=notes)


def _sweep_year(window: SkyWindow, observer: Observer, year: int, o: ScanOptions) -> YearScan:
    from lightpath.sky.divisions import divisions

    sun = sun_for(observer, o.source, o.delta_t_s)
    first, last, t0, t1 = _year_bounds(year, observer, o.calendar, o.delta_t_s)
    intervals = find_light(
        window,
        sun,
        t0,
        t1,
        o.criterion,
        step_min=o.step_min,
        rotation=o.rotation,
        horizon_offset_deg=o.horizon_offset_deg,
        limb_darkening_u=o.limb_darkening_u,
    )
    # year Y's divisions run from the December solstice of Y − 1: Y − 1 … Y + 1 cover the sweep and margins;
    # horizon=None: the divisions' instants do not depend on it, only their sunrise azimuths (unused here)
    div_years = [y for y in (year - 1, year, year + 1) if YEAR_MIN <= y <= YEAR_MAX]
    divs = [
        d
        for y in div_years
        for d in divisions(y, o.scheme, o.parts, observer=observer, horizon=None, source=o.source, calendar=o.calendar)
    ]
    div_pos = sun(np.array([d.jd_tt for d in divs]))
    div_days = local_day_number(div_pos.jd_ut, observer.longitude_deg, div_pos.local_apparent_time_h)
    notes: list[str] = []
    if intervals:
        peaks = sun(np.array([x.peak_jd_tt for x in intervals]))
        days = np.atleast_1d(local_day_number(peaks.jd_ut, observer.longitude_deg, peaks.local_apparent_time_h))
        source_name = peaks.source
    else:
        days = np.array([], dtype=np.int64)
        source_name = div_pos.source
    in_year = [x for x, d in zip(intervals, days, strict=True) if first <= d <= last]
    # with a fixed ΔT (σ = 0) the UT date is as certain as the ΔT given
    uncertain = ut_date_uncertain if o.delta_t_s is None else None
    events = light_events(in_year, sun, observer, divs, window.total_area_m2, o.calendar, uncertain)
    report = [i for i, d in enumerate(div_days) if first <= d <= last]
    summary = division_runs(days, divs, div_days, report, o.calendar)
    span = (first - MARGIN_DAYS + 1, last + MARGIN_DAYS - 1)
    for i, d in zip(report, summary, strict=True):
        if d.days and (div_days[i] + d.first_offset_days <= span[0] or div_days[i] + d.last_offset_days >= span[1]):
            notes.append(
                f"the run of light days around {d.name} reaches the sweep's edge ({MARGIN_DAYS} days beyond the "
                "year); it may be longer"
            )
    light_map = None
    if o.with_light_map:
        lookup = {
            "rotation": o.rotation,
            "horizon_offset_deg": o.horizon_offset_deg,
            "limb_darkening_u": o.limb_darkening_u,
            "delta_t_s": o.delta_t_s,
        }
        light_map = _light_map(window, sun, observer, first, last, events, o.criterion, lookup)
    cal = str(calendar_for(float(first), o.calendar))
    return YearScan(int(year), cal, source_name, events, summary, light_map, notes)


def scan_window(
    window: SkyWindow,
    observer: Observer,
    years: Sequence[int],
    *,
    criterion: str = "first-gleam",
    scheme: str = "longitude",
    parts: int = 8,
    source: str = "auto",
    delta_t_s: float | None = None,
    calendar: str = "auto",
    with_light_map: bool = False,
    progress: Callable[[int, int], None] | None = None,
    scene_label: str = "",
    seed: int = 0,
    **options,
) -> ScanResult:
    """Scan a prepared window over ``years`` (astronomical numbering).

    Parameters
    ----------
    window : from :func:`prepare_window` (its ``horizon`` is used).
    observer : the site and its air (refraction).
    years : whole years, −10000…2999.
    criterion, scheme, parts, source, delta_t_s, calendar, with_light_map : see :class:`ScanOptions`
        (criterion ``first-gleam``, ``half-disc`` or ``full-disc``; ΔT in seconds).
    progress : ``progress(done, total)`` after each year.
    scene_label, seed : recorded in the result (the seed that sampled the window).
    options : ``rotation``, ``horizon_offset_deg``, ``limb_darkening_u``, ``step_min`` (see :class:`ScanOptions`).
    """
    settings = ScanOptions(criterion, scheme, parts, source, delta_t_s, calendar, with_light_map, **options)
    return scan_window_with(window, observer, years, settings, progress=progress, scene_label=scene_label, seed=seed)


def scan_window_with(
    window: SkyWindow,
    observer: Observer,
    years: Sequence[int],
    options: ScanOptions,
    *,
    progress: Callable[[int, int], None] | None = None,
    scene_label: str = "",
    seed: int = 0,
    scene_notes: Sequence[str] = (),
) -> ScanResult:
    """:func:`scan_window` with its settings in one :class:`ScanOptions`.

    ``scene_notes`` (e.g. the scene file's warnings) are added to the result's notes, each once.
    """
    years = check_years(list(years))
    options.check()
    out = []
    for n, year in enumerate(years, start=1):
        out.append(_scan_year(window, observer, year, options))
        if progress is not None:
            progress(n, len(years))
    settings = ScanSettings(
        options.criterion,
        options.scheme,
        int(options.parts),
        window.samples,
        int(seed),
        window.resolution_deg,
        observer.refraction,
        options.source,
        options.delta_t_s,
    )
    notes = list(window.notes)
    notes += [w for w in scene_notes if w not in notes]
    return ScanResult(scene_label, settings, window.total_area_m2, out, notes)


def scan_scene(
    scene,
    years: Sequence[int],
    *,
    criterion: str = "first-gleam",
    scheme: str = "longitude",
    parts: int = 8,
    samples: int = 1000,
    seed: int = 0,
    source: str = "auto",
    delta_t_s: float | None = None,
    resolution_deg: float = 0.05,
    cache_dir: str | Path | None = None,
    with_light_map: bool = False,
    progress: Callable[[int, int], None] | None = None,
    calendar: str = "auto",
) -> ScanResult:
    """Every interval of sunlight on the scene's target in ``years``: see :func:`scan_window`.

    ``progress(done, total)`` counts the window as one step and each year as one.
    """
    options = ScanOptions(criterion, scheme, parts, source, delta_t_s, calendar, with_light_map)
    years = check_years(list(years))
    options.check()
    scene = _as_scene(scene)
    total = len(years) + 1
    window = prepare_window(scene, samples=samples, seed=seed, resolution_deg=resolution_deg, cache_dir=cache_dir)
    if progress is not None:
        progress(1, total)

    def step(done, _):
        if progress is not None:
            progress(done + 1, total)

    label = str(getattr(scene, "label", "") or scene.path)
    result = scan_window_with(window, scene.observer, years, options, progress=step, scene_label=label, seed=seed)
    notes = list(result.notes) + list(getattr(scene, "warnings", []))
    return ScanResult(result.scene, result.settings, result.target_area_m2, result.years, notes)
