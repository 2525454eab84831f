"""Visit planning: the coming light events in the site's civil time, with their spread from refraction.

:func:`plan_visit` asks the engine for every light event between two civil dates,
three times: with the site's air as given, and with the refraction near the
horizon made smaller and larger by its observed scatter (σ ≈ 0.18° at sunrise
and sunset; Sampson et al. 2003).  Each event then carries its expected start,
peak and end clock times and the earliest and latest start and end among the
three runs.  Sunrise and sunset are the instants the Sun's upper limb stands at
apparent altitude 0 on the scene's skyline (the astronomical horizon when the
scene has none), from :func:`lightpath.sky.riseset.rise_set_instants`; the plan
says which horizon was used.

The refraction is scaled through the air's pressure and temperature, since the
models scale with (P/1010)·(283/(273+T)) (Meeus 1998 ch. 16): a factor
``1 ± σ/R₀``, with R₀ the model's refraction at apparent altitude 0° for the
site's air.  Scaling the whole profile is a simplification: the real scatter
comes from the lapse rate near the ground and is largest at the horizon.

References
----------
Sampson, R. D., Lozowski, E. P., Peterson, A. E. & Hube, D. P. (2003).
Variability in the astronomical refraction of the rising and setting Sun.
*PASP* 115, 1256-1261.
Meeus, J. (1998). *Astronomical Algorithms*, 2nd ed., ch. 16 (refraction and
its pressure/temperature factor) and ch. 15 (rising and setting).
"""

from __future__ import annotations

import dataclasses
from collections.abc import Callable, Sequence
from dataclasses import dataclass, field
from typing import Any

import numpy as np
from numpy.typing import ArrayLike

from lightpath.errors import InputError
from lightpath.light.results import LightEvent, ScanResult, ScanSettings
from lightpath.sky.observer import Observer
from lightpath.sky.refraction import refraction_bennett1982, refraction_saemundsson1986
from lightpath.sky.riseset import SunTrack, rise_set_instants
from lightpath.sky.seasons import YEAR_MAX
from lightpath.sky.tables import Tabular

__all__ = [
    "REFRACTION_SIGMA_DEG",
    "VisitEvent",
    "VisitPlan",
    "local_day_start",
    "match_events",
    "observer_with_refraction_scaled",
    "plan_visit",
    "horizon_label",
    "sunrise_sunset",
    "visit_scene",
]

#: Scatter (1σ) of refraction at sunrise/sunset, degrees (Sampson et al. 2003).
REFRACTION_SIGMA_DEG = 0.18
#: Mean semidiameter of the Sun, degrees (959.63″ at 1 au; the upper limb touches the horizon at sunrise).
SUN_SEMIDIAMETER_DEG = 959.63 / 3600.0
_PRESSURE_MAX_MBAR, _TEMPERATURE_RANGE_C = 1100.0, (-90.0, 60.0)  # what Observer accepts


@dataclass(frozen=True)
class VisitEvent(Tabular):
    """One light event for a visitor, as instants (JD UT); :mod:`lightpath.present.visits` gives clock times.

    ``earliest_*``/``latest_*`` are the extremes among the refraction cases that give the event;
    ``sunrise``/``sunset`` are for the upper limb at apparent altitude 0 on the plan's horizon
    (:attr:`VisitPlan.sunrise_horizon`), on the local day of the event (nan when the Sun does not rise or set).
    """

    event: LightEvent
    start_jd_ut: float
    peak_jd_ut: float
    end_jd_ut: float
    earliest_start_jd_ut: float
    latest_start_jd_ut: float
    earliest_end_jd_ut: float
    latest_end_jd_ut: float
    sunrise_jd_ut: float
    sunset_jd_ut: float
    cases_with_light: int  # of the refraction cases (as given, less, more), how many give this event

    @property
    def start_spread_min(self) -> float:
        """Latest minus earliest start among the refraction cases, minutes."""
        return (self.latest_start_jd_ut - self.earliest_start_jd_ut) * 1440.0

    @property
    def end_spread_min(self) -> float:
        """Latest minus earliest end among the refraction cases, minutes."""
        return (self.latest_end_jd_ut - self.earliest_end_jd_ut) * 1440.0


@dataclass(frozen=True)
class VisitPlan(Tabular):
    """Every light event in a span of time at one site."""

    _tables = ("events",)

    scene: str
    timezone: str | None  # the site's IANA zone, for clock times
    first_jd_ut: float
    last_jd_ut: float
    events: list[VisitEvent]
    settings: ScanSettings
    refraction_cases: list[str]
    latitude_deg: float
    longitude_deg: float
    notes: list[str] = field(default_factory=list)
    sunrise_horizon: str = "the astronomical horizon"  # what sunrise and sunset were computed over


def observer_with_refraction_scaled(observer: Observer, factor: float) -> Observer:
    """The observer with air that scales its refraction by ``factor`` (pressure first, then temperature).

    >>> o = observer_with_refraction_scaled(Observer(52.0, 0.0), 1.3)
    >>> (o.pressure_mbar, round(o.temperature_c, 2))
    (1100.0, -35.91)
    """
    if not np.isfinite(factor) or factor <= 0:
        raise InputError(f"refraction factor {factor!r} must be a positive number")
    pressure = min(observer.pressure_mbar * factor, _PRESSURE_MAX_MBAR)
    remaining = factor * observer.pressure_mbar / pressure if pressure > 0 else 1.0
    # refraction ∝ (P/1010)·(283/(273+T)), Meeus (1998) ch. 16: solve 283/(273+T') = remaining·283/(273+T).
    temperature = (273.0 + observer.temperature_c) / remaining - 273.0
    low, high = _TEMPERATURE_RANGE_C
    if not low <= temperature <= high:
        raise InputError(f"refraction factor {factor:g} needs air outside what an observer accepts")
    return dataclasses.replace(observer, pressure_mbar=pressure, temperature_c=temperature)


def _horizon_refraction_deg(observer: Observer) -> float:
    if observer.refraction == "saemundsson1986":
        # Sæmundsson's formula takes the geometric altitude; about −0.57° geometric is 0° apparent.
        return float(refraction_saemundsson1986(-0.57, observer.pressure_mbar, observer.temperature_c))
    return float(refraction_bennett1982(0.0, observer.pressure_mbar, observer.temperature_c))


def match_events(reference: LightEvent, candidates: Sequence[LightEvent]) -> LightEvent | None:
    """The candidate that overlaps ``reference`` most in time, else the nearest within half a day, else None."""
    best, best_gap = None, 0.5
    for c in candidates:
        gap = max(c.start_jd_ut, reference.start_jd_ut) - min(c.end_jd_ut, reference.end_jd_ut)  # < 0: overlap
        if gap <= best_gap:
            best, best_gap = c, gap
    return best


def local_day_start(jd_ut: ArrayLike, longitude_deg: float) -> np.ndarray:
    """JD UT of local mean midnight starting the local mean solar day that contains each instant.

    >>> float(local_day_start(2461072.9, -90.0))   # 2026-02-01 09:36 UT is 03:36 local mean time at 90° W
    2461072.75
    """
    shift = longitude_deg / 360.0  # local mean time = UT + longitude/360 days
    return np.floor(np.asarray(jd_ut, dtype=float) + shift + 0.5) - 0.5 - shift


def sunrise_sunset(
    jd_ut_midnight: np.ndarray,
    observer: Observer,
    sun_fn: SunTrack | None = None,
    *,
    horizon: Any = None,
    source: str = "auto",
    step_min: float = 1.0,
) -> tuple[np.ndarray, np.ndarray]:
    """Sunrise and sunset (JD UT) on each day starting at ``jd_ut_midnight``; nan when there is none.

    The Sun's upper limb at apparent altitude 0 on ``horizon`` (a skyline profile; None: the astronomical
    horizon): :func:`lightpath.sky.riseset.rise_set_instants` with ``sun_fn`` (JD UT → azimuth, geometric
    altitude, semidiameter) or the ``source``.
    """
    start = np.atleast_1d(np.asarray(jd_ut_midnight, dtype=float))
    return rise_set_instants(start, observer, horizon=horizon, source=source, sun_fn=sun_fn, step_min=step_min)


def horizon_label(horizon: Any) -> str:
    """Words for the horizon sunrise and sunset are computed over (for notes and tables)."""
    if horizon is None:
        return "the astronomical horizon"
    alt = np.asarray(horizon.altitude_deg, dtype=float)
    if np.ptp(alt) == 0.0:
        return "the astronomical horizon" if alt[0] == 0.0 else f"a level horizon at {alt[0]:+.2f}°"
    return f"the scene's skyline ({getattr(horizon, 'source', 'horizon profile')})"


def plan_visit(
    scene: Any,
    first_jd_ut: float,
    last_jd_ut: float,
    *,
    scan: Callable[..., ScanResult],
    sun_fn: Callable[[np.ndarray, Observer], tuple[np.ndarray, np.ndarray, np.ndarray]] | None = None,
    source: str = "auto",
    refraction_sigma_deg: float = REFRACTION_SIGMA_DEG,
    progress: Callable[[int], None] | None = None,
    **scan_options: Any,
) -> VisitPlan:
    """Light events starting in ``[first_jd_ut, last_jd_ut)`` with the spread from refraction.

    Parameters
    ----------
    scene : a loaded scene (``scene.label``, ``scene.observer``).
    first_jd_ut, last_jd_ut : the span of the visit window, Julian dates in UT (e.g. civil midnights).
    scan : the engine's scan function, ``scan(scene, years, **scan_options) -> ScanResult``.
    sun_fn : for sunrise/sunset, ``sun_fn(jd_ut, observer)`` → (azimuth, geometric altitude, semidiameter) of
        the Sun, degrees; None uses ``source``.  They are over ``scene.horizon`` when the scene has one.
    refraction_sigma_deg : 1σ of refraction at the horizon, degrees (0 runs the nominal case only).
    progress : called with 1 after each engine run.
    scan_options : passed to ``scan`` (criterion, samples, seed, resolution_deg, cache_dir, …).
    """
    from lightpath.sky.calendar import calendar_date

    if not last_jd_ut > first_jd_ut:
        raise InputError("visit window: the end must come after the start")
    if last_jd_ut - first_jd_ut > 3 * 366:
        raise InputError("visit window: plan at most three years at a time")
    observer: Observer = scene.observer
    horizon = getattr(scene, "horizon", None)
    # year Y's divisions run from the December solstice of Y − 1: light late in a calendar year can
    # belong to the next year's first division, so scan one year more (each run is reported once)
    years = list(range(calendar_date(first_jd_ut)[0], min(calendar_date(last_jd_ut)[0] + 2, YEAR_MAX + 1)))
    step = progress or (lambda n=1: None)

    cases: list[tuple[str, Any]] = [("as given", scene)]
    notes: list[str] = []
    if refraction_sigma_deg > 0 and observer.refraction is not None:
        r0 = _horizon_refraction_deg(observer)
        for label, sign in (("less refraction", -1.0), ("more refraction", 1.0)):
            factor = 1.0 + sign * refraction_sigma_deg / r0
            obs = observer_with_refraction_scaled(observer, factor)
            cases.append((f"{label} (×{factor:.2f}: {obs.pressure_mbar:.0f} mbar, {obs.temperature_c:.0f} °C)",
                          dataclasses.replace(scene, observer=obs)))  # fmt: skip
        notes.append(
            f"Spread: refraction scaled by 1 ± {refraction_sigma_deg:g}°/{r0:.2f}° (its scatter at the horizon, "
            "Sampson et al. 2003, over the model's value at 0° for the site's air)."
        )
    elif observer.refraction is None:
        notes.append("Refraction is off for this site: no refraction spread.")

    results: list[list[LightEvent]] = []
    settings = None
    for _, case_scene in cases:
        result = scan(case_scene, years, **scan_options)
        settings = settings or result.settings
        events = [e for y in result.years for e in y.events if first_jd_ut <= e.start_jd_ut < last_jd_ut]
        results.append(sorted(events, key=lambda e: e.start_jd_ut))
        notes.extend(n for n in list(result.notes) + [n for y in result.years for n in y.notes] if n not in notes)
        step(1)

    nominal = results[0]
    if nominal:
        day_starts = local_day_start(np.array([e.peak_jd_ut for e in nominal]), observer.longitude_deg)
        track = None if sun_fn is None else (lambda jd: sun_fn(jd, observer))
        rises, sets = sunrise_sunset(day_starts, observer, track, horizon=horizon, source=source)
    visits = []
    for k, event in enumerate(nominal):
        matched = [event] + [m for m in (match_events(event, other) for other in results[1:]) if m is not None]
        starts = [m.start_jd_ut for m in matched]
        ends = [m.end_jd_ut for m in matched]
        visits.append(
            VisitEvent(
                event=event,
                start_jd_ut=event.start_jd_ut,
                peak_jd_ut=event.peak_jd_ut,
                end_jd_ut=event.end_jd_ut,
                earliest_start_jd_ut=min(starts),
                latest_start_jd_ut=max(starts),
                earliest_end_jd_ut=min(ends),
                latest_end_jd_ut=max(ends),
                sunrise_jd_ut=float(rises[k]),
                sunset_jd_ut=float(sets[k]),
                cases_with_light=len(matched),
            )
        )
    notes.append(f"Sunrise and sunset: the Sun's upper limb at apparent altitude 0 on {horizon_label(horizon)}.")
    if any(v.cases_with_light < len(cases) for v in visits):
        notes.append("Some events do not occur in every refraction case: they are marginal.")
    return VisitPlan(
        scene=str(getattr(scene, "label", "scene")),
        timezone=observer.timezone,
        first_jd_ut=float(first_jd_ut),
        last_jd_ut=float(last_jd_ut),
        events=visits,
        settings=settings,
        refraction_cases=[label for label, _ in cases],
        latitude_deg=observer.latitude_deg,
        longitude_deg=observer.longitude_deg,
        notes=notes,
        sunrise_horizon=horizon_label(horizon),
    )


def visit_scene(
    scene: Any,
    first_jd_ut: float,
    last_jd_ut: float,
    options: Any = None,
    window_options: Any = None,
    *,
    refraction_sigma_deg: float = REFRACTION_SIGMA_DEG,
    window: Any = None,
    progress: Callable[[int], None] | None = None,
    **settings: Any,
) -> VisitPlan:
    """:func:`plan_visit` with the engine: one sky window, scanned for each refraction case.

    ``scene`` is a :class:`lightpath.scene.Scene` or a scene file's path; ``options`` and
    ``window_options`` the engine's :class:`~lightpath.light.options.ScanOptions` and
    :class:`~lightpath.light.options.WindowOptions` (``settings``: their fields, laid over them);
    ``window`` an already prepared :class:`lightpath.light.window.SkyWindow` of the scene.  ``first_jd_ut`` and
    ``last_jd_ut`` may also be any instant :func:`lightpath.sky.moments.to_jd_ut` reads (a datetime, a string).
    Sunrise and sunset use :func:`lightpath.sky.sun.sun_position` with the model ΔT, over the scene's horizon.
    """
    from lightpath.light.options import split_settings
    from lightpath.light.scan import prepare_window, scan_window
    from lightpath.sky.moments import to_jd_ut

    if not hasattr(scene, "observer"):
        from lightpath.scene import load_scene

        scene = load_scene(scene)
    first_jd_ut = to_jd_ut(first_jd_ut, scene.observer, what="first_jd_ut")  # or a datetime, a string …
    last_jd_ut = to_jd_ut(last_jd_ut, scene.observer, what="last_jd_ut")
    w_options, s_options = split_settings(settings, window_options, options)
    if window is None:
        window = prepare_window(scene, w_options)
    label = str(getattr(scene, "label", "") or getattr(scene, "path", "scene"))
    warnings = list(getattr(scene, "warnings", []))

    def scan(case_scene: Any, years: Sequence[int]) -> ScanResult:
        return scan_window(window, case_scene.observer, years, s_options, scene_label=label, seed=w_options.seed,
                           scene_notes=warnings)  # fmt: skip

    return plan_visit(
        scene,
        first_jd_ut,
        last_jd_ut,
        scan=scan,
        source=s_options.source,
        refraction_sigma_deg=refraction_sigma_deg,
        progress=progress,
    )
