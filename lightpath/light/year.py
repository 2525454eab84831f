"""The one path from a sky window to the light runs of a year: every command and study goes through here.

For year ``Y`` (astronomical numbering) the divisions are those of
:func:`lightpath.sky.divisions.divisions` — from the December solstice of ``Y − 1`` up to the
December solstice of ``Y`` — and the sweep runs over their local apparent days with
:data:`MARGIN_DAYS` more on each side, so that a run of light across 1 January (or across the
December solstice) is whole.  Then:

1. :class:`YearSky` — the Sun track of the span (:class:`~lightpath.light.track.SunTrack`, one batched
   call; or the Moon's, :class:`~lightpath.light.moontrack.MoonTrack`, when ``options.body`` is ``"moon"``)
   and the candidate divisions (those of ``Y − 1``, ``Y`` and ``Y + 1``) with their local apparent days; it
   depends on the site, the year and the :class:`~lightpath.light.options.ScanOptions` only, so studies
   compute it once per year and reuse it for every realisation;
2. :func:`year_light` — one realisation (:class:`~lightpath.light.options.Conditions`: a rotation of the
   structure, the air, an anomalous refraction, a raised horizon, a ΔT error): every interval of light
   (:func:`lightpath.light.sweep.find_light`), its local apparent day, the light runs and the division
   each run belongs to (:mod:`lightpath.light.runs`).

>>> MARGIN_DAYS
60
"""

from __future__ import annotations

import functools
import warnings
from dataclasses import dataclass

import numpy as np
from numpy.typing import NDArray

from lightpath.errors import InputError
from lightpath.light.options import BODIES, Conditions, ScanOptions
from lightpath.light.runs import DivisionRuns, assign_runs, division_runs, local_apparent_day_number, runs_of_days
from lightpath.light.sweep import LightInterval, find_light
from lightpath.light.track import SunTrack
from lightpath.light.window import SkyWindow
from lightpath.sky.observer import Observer
from lightpath.sky.seasons import YEAR_MAX, YEAR_MIN

__all__ = ["MARGIN_DAYS", "YearLight", "YearSky", "year_light", "year_sky"]

#: Days swept beyond the first and last division's day of a year, so that runs around them are whole.
MARGIN_DAYS = 60
_DAY_S = 86400.0


@dataclass(frozen=True)
class YearSky:
    """The sky of one year at a site: its Sun track and its divisions (see the module notes).

    ``divisions`` are the candidates (years ``Y − 1`` … ``Y + 1``), ``in_year`` marks those of year ``Y``;
    ``division_jd_ut``, ``division_lat_h`` and ``division_sigma_s`` are their UT, local apparent time (h) and
    ΔT's σ (s) with the model ΔT; ``first_day``/``last_day`` bound the sweep (local apparent day numbers).
    """

    year: int
    observer: Observer
    options: ScanOptions
    track: SunTrack
    divisions: list
    in_year: NDArray
    division_jd_tt: NDArray
    division_jd_ut: NDArray
    division_lat_h: NDArray
    division_sigma_s: NDArray
    first_day: int
    last_day: int
    notes: tuple[str, ...] = ()

    def division_days(self, delta_t_z: float = 0.0) -> NDArray:
        """(K,) local apparent day of each candidate division, with ΔT off by ``delta_t_z`` σ.

        A ΔT larger by e seconds puts a TT instant e seconds earlier in UT and in local apparent time
        (the Earth has turned less), which moves the division's day when that crosses local midnight.
        """
        fixed = self.options.delta_t_s is not None  # a fixed ΔT has no σ
        e = np.zeros_like(self.division_sigma_s) if fixed else delta_t_z * self.division_sigma_s
        jd_ut = self.division_jd_ut - e / _DAY_S
        lat_h = np.mod(self.division_lat_h - e / 3600.0, 24.0)
        return np.atleast_1d(local_apparent_day_number(jd_ut, self.observer.longitude_deg, lat_h))


@functools.lru_cache(maxsize=256)
def _divisions(year: int, scheme: str, parts: int, observer: Observer, source: str, calendar: str) -> tuple:
    """The divisions of one year, memoized: a span of years asks each year three times (Y − 1, Y, Y + 1)."""
    from lightpath.sky.divisions import divisions

    return tuple(divisions(year, scheme, parts, observer=observer, horizon=None, source=source, calendar=calendar))


def year_sky(observer: Observer, year: int, options: ScanOptions) -> YearSky:
    """Sun track and divisions of ``year`` at ``observer`` (see :class:`YearSky`)."""
    from lightpath.sky.deltat import delta_t_s as model_delta_t_s

    year = int(year)
    notes: list[str] = []
    with warnings.catch_warnings(record=True) as caught:
        warnings.simplefilter("always")
        cands = []
        in_year = []
        for y in (year - 1, year, year + 1):
            if not YEAR_MIN <= y <= YEAR_MAX:
                continue
            divs = _divisions(y, options.scheme, int(options.parts), observer, options.source, options.calendar)
            cands += divs
            in_year += [y == year] * len(divs)
        jd_tt = np.array([d.jd_tt for d in cands])
        in_year_a = np.array(in_year, bool)
        # span: the year's first division to the next year's first (the December solstice of Y), ± margin
        mine = jd_tt[in_year_a]
        nxt = jd_tt[(~in_year_a) & (jd_tt > mine.max())]
        end = float(nxt.min()) if nxt.size else float(mine.max()) + 46.0
        dt0 = float(model_delta_t_s(mine.min())) if options.delta_t_s is None else float(options.delta_t_s)
        dt1 = float(model_delta_t_s(end)) if options.delta_t_s is None else float(options.delta_t_s)
        lon_d = observer.longitude_deg / 360.0
        first_day = int(np.rint(mine.min() - dt0 / _DAY_S + lon_d)) - MARGIN_DAYS
        last_day = int(np.rint(end - dt1 / _DAY_S + lon_d)) + MARGIN_DAYS
        t0 = first_day - 0.5 - lon_d + dt0 / _DAY_S - 0.02
        t1 = last_day + 0.5 - lon_d + dt1 / _DAY_S + 0.02
        if options.body == "moon":
            from lightpath.light.moontrack import MoonTrack

            track = MoonTrack(observer, t0, t1, options.source, options.delta_t_s, options.sun_below_deg,
                              options.min_illuminated_fraction)  # fmt: skip
        else:
            track = SunTrack(observer, t0, t1, options.source, options.delta_t_s)
        direct = SunTrack.direct(track, jd_tt)  # the divisions' instants: the Sun's local apparent time
    for w in caught:
        text = f"{w.category.__name__}: {w.message}"
        if text not in notes:
            notes.append(text)
    return YearSky(
        year=year,
        observer=observer,
        options=options,
        track=track,
        divisions=cands,
        in_year=in_year_a,
        division_jd_tt=jd_tt,
        division_jd_ut=np.asarray(direct.jd_ut, dtype=float),
        division_lat_h=np.asarray(direct.local_apparent_time_h, dtype=float),
        division_sigma_s=np.asarray(direct.delta_t_sigma_s, dtype=float) * np.ones(jd_tt.shape),
        first_day=first_day,
        last_day=last_day,
        notes=tuple(notes),
    )


@dataclass(frozen=True)
class YearLight:
    """The light of one year in one realisation.

    ``intervals`` are every interval of light in the sweep, ``interval_days`` their local apparent
    days (the day of the peak); ``runs`` (R, 2) the light runs (first, last day) and ``owner`` (R,) the
    index in ``sky.divisions`` of the division each belongs to; ``division_days`` (K,) the divisions'
    days in this realisation; ``edge`` is True when a run reaches the sweep's edge (it may be longer).
    """

    sky: YearSky
    intervals: list[LightInterval]
    interval_days: NDArray
    runs: NDArray
    owner: NDArray
    division_days: NDArray
    edge: bool

    def runs_by_division(self) -> DivisionRuns:
        """Per candidate division, its runs as day numbers and offsets (:class:`~lightpath.light.runs.DivisionRuns`)."""
        return division_runs(self.runs, self.owner, self.division_days)

    def reported(self) -> NDArray:
        """(R,) bool: runs that belong to a division of this year."""
        return self.sky.in_year[self.owner] if self.owner.size else np.zeros(0, bool)


def year_light(window: SkyWindow, sky: YearSky, conditions: Conditions | None = None) -> YearLight:
    """Every interval of light and the light runs of ``sky.year`` in one realisation (see the module notes)."""
    c = conditions if conditions is not None else Conditions()
    o = sky.options
    track = sky.track
    band = window.grid.declination_limit_deg
    if band < BODIES[track.body] - 1e-9:
        raise InputError(
            f"declination_limit_deg: the window's band ±{band:g}° is narrower than the {track.body}'s "
            f"±{BODIES[track.body]:g}°; make the window with WindowOptions().for_body({track.body!r})"
        )
    sun = track.bound(c.air)
    lon_d = sky.observer.longitude_deg / 360.0
    # local mean midnights widened by 22 minutes (the equation of time is at most 17)
    t0 = sky.first_day - 0.5 - lon_d + float(sky.track.delta_t_s[0]) / _DAY_S - 0.015
    t1 = sky.last_day + 0.5 - lon_d + float(sky.track.delta_t_s[-1]) / _DAY_S + 0.015
    intervals = find_light(window, sun, t0, t1, o.criterion, step_min=o.step_min, rotation=c.rotation,
                           horizon_offset_deg=c.horizon_offset_deg, limb_darkening_u=c.limb_darkening_u,
                           semidiameter_deg=track.disc_semidiameter_deg, screen_step_d=track.screen_step_d,
                           screen_slop_deg=track.screen_slop_deg)  # fmt: skip
    if intervals:
        peaks = sun(np.array([x.peak_jd_tt for x in intervals]))
        days = np.atleast_1d(
            local_apparent_day_number(peaks.jd_ut, sky.observer.longitude_deg, peaks.local_apparent_time_h)
        )
        keep = (days >= sky.first_day) & (days <= sky.last_day)
        intervals = [x for x, k in zip(intervals, keep, strict=True) if k]
        days = days[keep]
    else:
        days = np.zeros(0, np.int64)
    runs = runs_of_days(days)
    div_days = sky.division_days(c.delta_t_z)
    owner = assign_runs(runs, div_days)
    edge = bool(runs.size and (runs[0, 0] <= sky.first_day or runs[-1, 1] >= sky.last_day))
    return YearLight(sky, intervals, days, runs, owner, div_days, edge)
