"""The framing test: does this opening frame a division of the year, and would a random one do as well?

For each division of the year the test reports

- the **probability** that light reaches the target on a day within ±``within_days``
  of it, over Monte Carlo draws of the survey's tolerances and the sky
  (:mod:`lightpath.study.uncertainty`), with a 95 % Wilson score interval;
- the spread (5/25/50/75/95th percentiles) of the first and last day of the run of
  light days nearest to the division, in days from the division's day;
- against the **null model** (:mod:`lightpath.study.null_model`, named and described in
  the result): the share of random orientations that frame this division, and any
  division, within ±``within_days``; Monte Carlo p-values (k + 1)/(n + 1) for "a random
  orientation brings light at least as close to this division" (and to any division —
  the look-elsewhere version); effect sizes as the difference and ratio of the
  probabilities and Cohen's h.

Everything is deterministic for a seed and independent of the back end
(:mod:`lightpath.study.execution`): the JSON of two runs with the same inputs is identical.

>>> wilson_interval(8, 10)
(0.4902, 0.9433)
>>> round(cohen_h(0.9, 0.1), 4)
1.8546

References
----------
Wilson, E. B. (1927). Probable inference, the law of succession, and statistical inference.
*J. Am. Stat. Assoc.* 22, 209-212.
Cohen, J. (1988). *Statistical Power Analysis for the Behavioral Sciences*, 2nd ed., ch. 6
(h = 2 asin √p₁ − 2 asin √p₂).
Davison, A. C. & Hinkley, D. V. (1997). *Bootstrap Methods and their Application*, §4.2.
"""

from __future__ import annotations

import math
from collections.abc import Callable
from dataclasses import dataclass, field
from typing import Any

import numpy as np
from numpy.typing import ArrayLike, NDArray

from lightpath.errors import InputError
from lightpath.light.results import ScanSettings
from lightpath.light.scan import scan_settings
from lightpath.light.year import MARGIN_DAYS
from lightpath.sky.tables import Tabular
from lightpath.study.execution import Execution, run_draws
from lightpath.study.light_days import DAY_NOTE, UNVERIFIED_NOTE, VERIFIED_FROM_YEAR, LightDays
from lightpath.study.null_model import NULL_MODEL_NAME, monte_carlo_p_value, null_azimuths, side_for, sun_arc
from lightpath.study.uncertainty import Draw, Tolerances, make_draws, nominal_draw, rotation_about_up

__all__ = [
    "DivisionFraming",
    "FramingResult",
    "NullTask",
    "PERCENTILES",
    "cohen_h",
    "facing_azimuth_deg",
    "skyline_azimuth_deg",
    "framing_test",
    "wilson_interval",
]

PERCENTILES = (5, 25, 50, 75, 95)


def wilson_interval(k: int, n: int, z: float = 1.959964) -> tuple[float, float]:
    """95 % Wilson score interval of a binomial proportion k/n (Wilson 1927), rounded to 4 places."""
    if n == 0:
        return (0.0, 1.0)
    p = k / n
    centre = (p + z * z / (2 * n)) / (1 + z * z / n)
    half = z / (1 + z * z / n) * math.sqrt(p * (1 - p) / n + z * z / (4 * n * n))
    return (round(max(0.0, centre - half), 4), round(min(1.0, centre + half), 4))


def cohen_h(p1: float, p2: float) -> float:
    """Cohen's h for two proportions: 2 asin √p₁ − 2 asin √p₂ (0.2 small, 0.5 medium, 0.8 large; Cohen 1988)."""
    return 2.0 * math.asin(math.sqrt(p1)) - 2.0 * math.asin(math.sqrt(p2))


def facing_azimuth_deg(axis_enu: ArrayLike) -> float:
    """Azimuth (degrees from north, clockwise) of the horizontal part of the target→opening vector.

    >>> facing_azimuth_deg([1.0, 1.0, 0.2])
    45.0
    """
    v = np.asarray(axis_enu, dtype=float)
    if math.hypot(v[0], v[1]) < 1e-12:
        raise InputError("the opening is straight above the target: its facing azimuth is undefined")
    return round(math.degrees(math.atan2(v[0], v[1])) % 360.0, 12)


@dataclass(frozen=True)
class NullTask:
    """One null-model orientation: the structure turned by ``azimuth_offset_deg`` about the target's vertical."""

    index: int
    year: int
    reference_azimuth_deg: float
    azimuth_offset_deg: float


def skyline_azimuth_deg(axis_enu: ArrayLike, observer, arc, horizon=None) -> float:
    """Where the Sun's daily circle through the opening's axis meets the skyline, degrees from north.

    The axis (target→opening) has a declination δ in the site's equatorial frame; a Sun of that
    declination (clipped to ±ε of the epoch) rises (or sets, on the ``arc``'s side) at this azimuth.
    The null model turns the structure so that this point is uniform over the arc: for an opening
    aimed a little above the skyline (a passage rising to its chamber) the axis's own azimuth lies
    outside the arc of sunrises, but its skyline point does not.
    """
    from lightpath.light.grid import hadec_from_enu
    from lightpath.sky.riseset import rise_set_azimuths

    _, dec = hadec_from_enu(observer.latitude_deg, np.asarray(axis_enu, dtype=float))
    dec = float(np.clip(dec, -arc.obliquity_deg, arc.obliquity_deg))
    air = {"pressure_mbar": observer.pressure_mbar, "temperature_c": observer.temperature_c}
    rise, set_ = rise_set_azimuths(dec, observer.latitude_deg, horizon=horizon, refraction=observer.refraction, **air)
    value = float(rise if arc.side == "sunrise" else set_)
    if not math.isfinite(value):
        raise InputError("the Sun on the opening's declination never meets the skyline: no null model arc")
    return value


def _evaluate(light: LightDays, task: Draw | NullTask) -> NDArray:
    """What each worker runs: one survey draw or one null orientation → (D, 3) day offsets."""
    if isinstance(task, NullTask):
        return light.evaluate(task.year, rotation_about_up(task.azimuth_offset_deg))
    return light.evaluate_draw(task)


class _Evaluate:
    """Picklable callable ``task → (D, 3)`` holding the :class:`LightDays` (sent once per worker)."""

    def __init__(self, light: LightDays) -> None:
        self.light = light

    def __call__(self, task):
        return _evaluate(self.light, task)


@dataclass(frozen=True)
class DivisionFraming(Tabular):
    """The framing test for one division (offsets in days from the division's local day)."""

    _day_columns = ("day",)

    name: str
    day: int  # the division's local apparent day at the nominal epoch (Julian day number)
    calendar: str  # the calendar its date is shown in
    observed_nearest_day: float | None  # nominal geometry and sky: nearest lit day (None: no light in the span)
    observed_first_day: float | None
    observed_last_day: float | None
    probability: float  # share of survey draws with light within ±within_days
    probability_interval: tuple[float, float]  # 95 % Wilson score interval
    draws_with_light: int  # draws with any light in the span searched
    first_day_percentiles: dict[str, float | None]
    last_day_percentiles: dict[str, float | None]
    null_rate: float  # share of null orientations framing this division
    null_rate_any: float  # share of null orientations framing any division tested
    p_value: float  # (k+1)/(n+1), k = null orientations at least as close to this division
    p_value_any: float  # the same against the nearest of all divisions tested (look-elsewhere)
    effect_difference: float  # probability − null_rate
    effect_ratio: float | None  # probability / null_rate (None when null_rate = 0)
    effect_cohen_h: float


@dataclass(frozen=True)
class FramingResult(Tabular):
    """A framing test of one scene at one epoch."""

    _tables = ("divisions",)

    scene: str
    epoch_year: int
    epoch_sigma_years: float
    scheme: str
    parts: int
    criterion: str
    within_days: int
    draws: int
    null_draws: int
    seed: int
    source: str
    tolerances: dict[str, Any]
    facing_azimuth_deg: float  # azimuth of the target→opening axis
    null_model: dict[str, Any]
    divisions: list[DivisionFraming]
    settings: ScanSettings | None = None  # the engine's settings (samples and cell size beside the days)
    notes: list[str] = field(default_factory=list)


def _percentiles(values: NDArray) -> dict[str, float | None]:
    v = values[np.isfinite(values)]
    if v.size == 0:
        return {f"p{q}": None for q in PERCENTILES}
    return {f"p{q}": round(float(np.percentile(v, q)), 3) for q in PERCENTILES}


def _closeness(runs: NDArray) -> NDArray:
    """|nearest lit day| per (…, D), inf where no light."""
    c = np.abs(runs[..., 0])
    return np.where(np.isfinite(c), c, np.inf)


def _none(x: float) -> float | None:
    return None if not math.isfinite(x) else float(x)


def framing_test(
    light: LightDays,
    *,
    year: int,
    axis_enu: ArrayLike,
    distance_m: float | None = None,
    tolerances: Tolerances | None = None,
    epoch_sigma_years: float | None = None,
    within_days: int = 3,
    draws: int = 200,
    null_draws: int = 200,
    seed: int = 0,
    workers: int = 1,
    client: Any = None,
    execution: Execution | None = None,
    progress: Callable[[int], Any] | None = None,
    scene_label: str = "",
) -> FramingResult:
    """Run the framing test (see the module notes).

    Parameters
    ----------
    light : the window, site, divisions and search settings (:class:`~lightpath.study.light_days.LightDays`).
    year : nominal epoch, astronomical year.
    axis_enu : vector from the target to the opening (ENU, metres); its azimuth is the facing azimuth.
    distance_m : target–opening distance for position tolerances (default: the length of ``axis_enu``).
    tolerances : one-sigma spreads (default :class:`Tolerances` (): sky terms only).
    epoch_sigma_years : spread of the epoch, years (None: ``tolerances.epoch_years``).
    within_days : a division is framed when light comes on a day within ±``within_days`` of it.
    draws, null_draws : Monte Carlo draws of the survey and orientations of the null model.
    seed : the study's seed.
    workers, client, execution : where draws run (:func:`lightpath.study.execution.run_draws`); survey
        draws and null orientations go in separate chunks, each grouped by year.
    progress : ``progress(n)`` after every n finished draws.
    """
    if isinstance(within_days, bool) or not isinstance(within_days, int) or not 0 <= within_days <= MARGIN_DAYS:
        raise InputError(f"within_days: {within_days!r} is not a whole number of days in 0..{MARGIN_DAYS}")
    tol = tolerances if tolerances is not None else Tolerances()
    if epoch_sigma_years is not None:
        tol = Tolerances(**{**tol.__dict__, "epoch_years": float(epoch_sigma_years)})
    axis = np.asarray(axis_enu, dtype=float)
    dist = float(np.linalg.norm(axis)) if distance_m is None else float(distance_m)
    facing = facing_azimuth_deg(axis)
    obs = light.observer
    horizon = getattr(light.window, "horizon", None)
    side = side_for(facing)
    arc = sun_arc(obs.latitude_deg, year, side, horizon=horizon, refraction=obs.refraction,
                  pressure_mbar=obs.pressure_mbar, temperature_c=obs.temperature_c)  # fmt: skip
    reference = skyline_azimuth_deg(axis, obs, arc, horizon)
    survey = make_draws(tol, draws, seed=seed, year=year, axis_enu=axis, distance_m=dist,
                        temperature_c=obs.temperature_c, pressure_mbar=obs.pressure_mbar)  # fmt: skip
    azimuths = null_azimuths(arc, null_draws, seed=seed)
    nulls = [NullTask(i, year, reference, float(a - reference)) for i, a in enumerate(azimuths)]
    names = light.division_names(year)  # checks the division names before any work is sent out
    nominal = nominal_draw(year, obs.temperature_c, obs.pressure_mbar)
    tasks = [nominal, *survey, *nulls]
    kinds = ["nominal"] + ["survey"] * len(survey) + ["null"] * len(nulls)  # their costs differ: never mixed
    results = run_draws(_Evaluate(light), tasks, workers=workers, client=client, execution=execution,
                        progress=progress, kinds=kinds, group=[t.year for t in tasks], name="frame")  # fmt: skip
    observed = results[0]
    s_runs = np.array(results[1 : 1 + draws]).reshape(draws, len(names), 3)
    n_runs = np.array(results[1 + draws :]).reshape(null_draws, len(names), 3)

    framed = _closeness(s_runs) <= within_days  # (N, D)
    null_close = _closeness(n_runs)  # (M, D)
    null_framed = null_close <= within_days
    null_any_close = null_close.min(axis=1) if null_draws else np.zeros(0)
    obs_close = _closeness(observed)

    from lightpath.sky.calendar import calendar_for

    days = light.division_days(year)
    out = []
    for i, name in enumerate(names):
        k = int(framed[:, i].sum())
        p_obs = k / draws if draws else float("nan")
        rate = float(null_framed[:, i].mean()) if null_draws else float("nan")
        rate_any = float((null_any_close <= within_days).mean()) if null_draws else float("nan")
        k_div = int((null_close[:, i] <= obs_close[i]).sum())
        k_any = int((null_any_close <= obs_close[i]).sum())
        has = np.isfinite(s_runs[:, i, 0])
        out.append(
            DivisionFraming(
                name=name,
                day=int(days[i]),
                calendar=str(calendar_for(float(days[i]), light.options.calendar)),
                observed_nearest_day=_none(observed[i, 0]),
                observed_first_day=_none(observed[i, 1]),
                observed_last_day=_none(observed[i, 2]),
                probability=round(p_obs, 6),
                probability_interval=wilson_interval(k, draws),
                draws_with_light=int(has.sum()),
                first_day_percentiles=_percentiles(s_runs[:, i, 1]),
                last_day_percentiles=_percentiles(s_runs[:, i, 2]),
                null_rate=round(rate, 6),
                null_rate_any=round(rate_any, 6),
                p_value=round(monte_carlo_p_value(k_div, null_draws), 6),
                p_value_any=round(monte_carlo_p_value(k_any, null_draws), 6),
                effect_difference=round(p_obs - rate, 6),
                effect_ratio=round(p_obs / rate, 4) if rate > 0 else None,
                effect_cohen_h=round(cohen_h(p_obs, rate), 4) if draws and null_draws else float("nan"),
            )
        )
    notes = [
        "tolerances are one-sigma Gaussian spreads; the survey draws and the null orientations use "
        "independent streams of the seed",
        DAY_NOTE,
        "null orientations keep the nominal sky and survey (no tolerances)",
    ]
    if min([year, *(d.year for d in survey)]) < VERIFIED_FROM_YEAR:
        notes.append(UNVERIFIED_NOTE)
    if obs_close.size and not np.isfinite(obs_close).all():
        notes.append("no light run belongs to some divisions for the surveyed geometry")
    return FramingResult(
        scene=scene_label,
        epoch_year=int(year),
        epoch_sigma_years=float(tol.epoch_years),
        scheme=light.scheme,
        parts=int(light.parts),
        criterion=light.criterion,
        within_days=int(within_days),
        draws=int(draws),
        null_draws=int(null_draws),
        seed=int(seed),
        source=light.source,
        tolerances=dict(tol.__dict__),
        facing_azimuth_deg=round(facing, 6),
        null_model={
            "name": NULL_MODEL_NAME,
            "description": arc.describe(),
            "side": arc.side,
            "arc_low_deg": round(arc.low_deg, 6),
            "arc_high_deg": round(arc.high_deg, 6),
            "obliquity_deg": round(arc.obliquity_deg, 6),
            "reference_azimuth_deg": round(reference, 6),
            "reference": "where the Sun's daily circle through the opening's axis meets the skyline; the null "
            "turns the structure so that this point is uniform over the arc",
            "statistic": "|days from the division to the nearest lit day|; "
            "p = (k + 1)/(n + 1), k = orientations at least as close",
        },
        divisions=out,
        settings=scan_settings(light.window, light.observer, light.options, seed),
        notes=notes,
    )
