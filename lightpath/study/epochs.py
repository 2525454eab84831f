"""Alignment epochs: when in history did an opening frame a division of the year?

Over a span of years the Sun's declination on a division's day changes with the
obliquity, and the days of the divisions move against the perihelion, so a
fixed opening's days of light drift against the division.  For each year
``Y1, Y1+S, …, Y2`` this module reports the run of light days nearest the
division (first and last day, in days from the division's day) for the surveyed
geometry, their spread over Monte Carlo draws of the tolerances, and whether
the division's own day lies inside the run; then the spans of years during
which it does (for the surveyed geometry, and with a probability ≥ 0.5 over
the draws), and the drift of the run's ends in days per century (least
squares).

The draws are *common random numbers*: draw *i* has the same survey errors in
every year (only the year changes), so the curves over the years are smooth and
their differences are due to the sky alone.

>>> spans_of([-3000, -2900, -2800, -2700], [True, True, False, True])
[(-3000, -2900), (-2700, -2700)]

References
----------
Vondrák, J., Capitaine, N. & Wallace, P. (2011). New precession expressions, valid for long
time intervals. *A&A* 534, A22 (the obliquity and the ecliptic over millennia, via the Sun).
Law, A. M. (2015). *Simulation Modeling and Analysis*, 5th ed., McGraw-Hill, §11.2
(common random numbers).
"""

from __future__ import annotations

import math
from collections.abc import Callable, Sequence
from dataclasses import dataclass, field
from typing import Any

import numpy as np
from numpy.typing import NDArray

from lightpath.errors import InputError
from lightpath.light.results import ScanSettings
from lightpath.light.scan import MAX_YEARS as SCAN_MAX_YEARS
from lightpath.light.scan import scan_settings
from lightpath.sky.tables import Tabular
from lightpath.study.execution import Execution, run_draws
from lightpath.study.light_days import DAY_NOTE, UNVERIFIED_NOTE, VERIFIED_FROM_YEAR, LightDays
from lightpath.study.uncertainty import Draw, Tolerances, make_draws, nominal_draw

__all__ = ["EpochRow", "EpochsResult", "alignment_epochs", "drift_days_per_century", "spans_of"]

#: Most years one study may ask for (as many as a scan).
MAX_YEARS = SCAN_MAX_YEARS


class _EpochTask:
    """Picklable ``draw → (1, 3) days``; the nominal draw (index −1) also returns the division's day."""

    def __init__(self, light: LightDays) -> None:
        self.light = light

    def __call__(self, draw: Draw):
        days = self.light.evaluate_draw(draw)
        if draw.index == -1:
            return days, int(self.light.division_days(draw.year)[0])
        return days


@dataclass(frozen=True)
class EpochRow(Tabular):
    """The run of light days around the division in one year (days from the division's day)."""

    _day_columns = ("division_day",)

    year: int
    division_day: int  # local apparent day of the division (Julian day number)
    calendar: str  # the calendar its date is shown in
    nearest_day: float | None  # surveyed geometry, nominal sky
    first_day: float | None
    last_day: float | None
    inside: bool  # the division's day lies in the run (first ≤ 0 ≤ last)
    probability_inside: float  # share of draws with first ≤ 0 ≤ last
    first_day_percentiles: dict[str, float | None]  # p5, p50, p95 over draws with light
    last_day_percentiles: dict[str, float | None]


@dataclass(frozen=True)
class EpochsResult(Tabular):
    """How the light window drifts against one division over a span of years."""

    _tables = ("rows",)

    scene: str
    division: str
    scheme: str
    parts: int
    criterion: str
    from_year: int
    to_year: int
    step_years: int
    draws: int
    seed: int
    tolerances: dict[str, Any]
    rows: list[EpochRow]
    spans_inside: list[dict[str, Any]]  # surveyed geometry
    spans_likely: list[dict[str, Any]]  # probability_inside ≥ 0.5
    drift_first_days_per_century: float | None
    drift_last_days_per_century: float | None
    settings: ScanSettings | None = None  # the engine's settings (samples and cell size beside the days)
    notes: list[str] = field(default_factory=list)


def spans_of(years: Sequence[int], flags: Sequence[bool]) -> list[tuple[int, int]]:
    """Runs of consecutive ``True`` flags as (first year, last year) pairs."""
    out: list[tuple[int, int]] = []
    start = None
    for i, (y, f) in enumerate(zip(years, flags, strict=True)):
        if f and start is None:
            start = y
        if start is not None and (not f or i == len(years) - 1):
            out.append((start, y if f else years[i - 1]))
            start = None
    return out


def drift_days_per_century(years: NDArray, days: NDArray) -> float | None:
    """Least-squares slope of ``days`` against ``years``, days per century (None with < 2 finite points).

    >>> drift_days_per_century(np.array([0, 100, 200]), np.array([1.0, 2.0, 3.0]))
    1.0
    """
    ok = np.isfinite(days)
    if ok.sum() < 2 or np.ptp(years[ok]) == 0:
        return None
    slope = np.polyfit(years[ok].astype(float), days[ok].astype(float), 1)[0]
    return round(float(slope) * 100.0, 4)


def _pct(values: NDArray) -> dict[str, float | None]:
    v = values[np.isfinite(values)]
    if v.size == 0:
        return {"p5": None, "p50": None, "p95": None}
    return {f"p{q}": round(float(np.percentile(v, q)), 3) for q in (5, 50, 95)}


def _maybe(x: float) -> float | None:
    return float(x) if math.isfinite(x) else None


def _span_dicts(spans: list[tuple[int, int]]) -> list[dict[str, Any]]:
    return [{"from_year": a, "to_year": b} for a, b in spans]


def alignment_epochs(
    light: LightDays,
    *,
    division: str,
    from_year: int,
    to_year: int,
    step_years: int = 100,
    axis_enu=None,
    distance_m: float | None = None,
    tolerances: Tolerances | None = None,
    draws: int = 20,
    seed: int = 0,
    workers: int = 1,
    client: Any = None,
    execution: Execution | None = None,
    progress: Callable[[int], Any] | None = None,
    scene_label: str = "",
) -> EpochsResult:
    """The run of light days around ``division`` in every ``step_years`` from ``from_year`` to ``to_year``.

    Parameters
    ----------
    light : window, site and search settings; its ``names`` are replaced by ``(division,)``.
    division : a division name of ``light.scheme`` / ``light.parts`` (e.g. ``"cross_quarter_nov"``).
    from_year, to_year, step_years : the years, astronomical numbering, both ends included.
    axis_enu, distance_m : target→opening vector (metres) for the position tolerances.
    tolerances : one-sigma spreads (the epoch's spread is not used: every year is studied).
    draws : Monte Carlo draws per year (0: surveyed geometry only).
    seed, workers, client, execution, progress : as in :func:`lightpath.study.framing.framing_test`; the
        draws go out in chunks of consecutive years, and each year's division day comes back with its
        nominal draw (this process computes no year's sky but the first).
    """
    if isinstance(step_years, bool) or not isinstance(step_years, int) or step_years < 1:
        raise InputError(f"step_years: {step_years!r} is not a whole number of years ≥ 1")
    if to_year < from_year:
        raise InputError(f"to_year: {to_year} is before from_year {from_year}")
    if (int(to_year) - int(from_year)) // step_years + 1 > MAX_YEARS:
        raise InputError(f"step_years: more than {MAX_YEARS} years asked for (use a larger step)")
    years = list(range(int(from_year), int(to_year) + 1, step_years))
    light = light.with_names((division,))
    tol = tolerances if tolerances is not None else Tolerances()
    tol = Tolerances(**{**tol.__dict__, "epoch_years": 0.0})
    obs = light.observer
    dist = None
    if axis_enu is not None:
        dist = float(np.linalg.norm(axis_enu)) if distance_m is None else float(distance_m)
    light.division_names(years[0])  # checks the division's name before any work is sent out
    tasks = []
    for y in years:
        tasks.append(nominal_draw(y, obs.temperature_c, obs.pressure_mbar))
        tasks += make_draws(tol, draws, seed=seed, year=y, axis_enu=axis_enu, distance_m=dist,
                            temperature_c=obs.temperature_c, pressure_mbar=obs.pressure_mbar)  # fmt: skip
    values = run_draws(_EpochTask(light), tasks, workers=workers, client=client, execution=execution,
                       progress=progress, group=[t.year for t in tasks], name="epochs")  # fmt: skip
    division_days = [values[i * (1 + draws)][1] for i in range(len(years))]  # from the workers' own skies
    results = np.array([v[0] if isinstance(v, tuple) else v for v in values])
    results = results.reshape(len(years), 1 + draws, 3)  # (years, nominal + draws, [nearest, first, last])
    from lightpath.sky.calendar import calendar_for

    rows = []
    for i, y in enumerate(years):
        nominal, sample = results[i, 0], results[i, 1:]
        inside = bool(np.isfinite(nominal[1]) and nominal[1] <= 0 <= nominal[2])
        with np.errstate(invalid="ignore"):
            inside_draws = (sample[:, 1] <= 0) & (sample[:, 2] >= 0)
        day = int(division_days[i])
        rows.append(
            EpochRow(
                year=y,
                division_day=day,
                calendar=str(calendar_for(float(day), light.options.calendar)),
                nearest_day=_maybe(nominal[0]),
                first_day=_maybe(nominal[1]),
                last_day=_maybe(nominal[2]),
                inside=inside,
                probability_inside=round(float(inside_draws.mean()), 6) if draws else float(inside),
                first_day_percentiles=_pct(sample[:, 1]),
                last_day_percentiles=_pct(sample[:, 2]),
            )
        )
    yrs = np.array(years)
    notes = [
        DAY_NOTE,
        "draws use common random numbers: draw i has the same survey errors in every year",
    ]
    if years[0] < VERIFIED_FROM_YEAR:
        notes.append(UNVERIFIED_NOTE)
    return EpochsResult(
        scene=scene_label,
        division=division,
        scheme=light.scheme,
        parts=int(light.parts),
        criterion=light.criterion,
        from_year=int(from_year),
        to_year=int(to_year),
        step_years=int(step_years),
        draws=int(draws),
        seed=int(seed),
        tolerances=dict(tol.__dict__),
        rows=rows,
        settings=scan_settings(light.window, light.observer, light.options, seed),
        spans_inside=_span_dicts(spans_of(years, [r.inside for r in rows])),
        spans_likely=_span_dicts(spans_of(years, [r.probability_inside >= 0.5 for r in rows])),
        drift_first_days_per_century=drift_days_per_century(yrs, results[:, 0, 1]),
        drift_last_days_per_century=drift_days_per_century(yrs, results[:, 0, 2]),
        notes=notes,
    )
