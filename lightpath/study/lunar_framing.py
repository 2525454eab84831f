"""A framing test for lunar claims: does the opening frame the Moon rising (or setting) at a standstill extreme?

The claim tested is of the form "the opening frames the major-standstill southern moonrise".  The statistic is
the **closeness**: over every interval of moonlight on the target (the engine's one sweep with the Moon's track,
:class:`lightpath.light.moontrack.MoonTrack`, the Sun below the gate) in ±``span_days`` around the season's
extreme, the smallest distance in geocentric declination between the Moon at the interval's peak and the
season's extreme declination (degrees; nan when no moonlight reaches the target).  The claim holds in a
realisation when the closeness is at most ``within_deg`` (0.5° by default: the band of the standstill season in
:func:`lightpath.sky.standstills.standstill_seasons`, our choice).

- **probability**: the share of Monte Carlo draws of the survey's tolerances
  (:func:`lightpath.study.uncertainty.make_draws`: the structure's rotation, the air, anomalous refraction, the
  horizon's altitude) in which the claim holds, with a 95 % Wilson interval;
- **null model** "random orientation over the moonrise/moonset arc": the structure turned about the vertical
  through the target so that its opening faces an azimuth uniform between the moonrise (or moonset) points of the
  major standstill's northern and southern extremes, ±(ε + i) (:func:`lightpath.sky.standstills.
  extreme_rise_set_azimuths`, with the Moon's parallax and refraction); the null rate is the share of random
  orientations for which the claim holds, and the Monte Carlo p-value (k + 1)/(n + 1) counts random orientations
  whose closeness is at most the surveyed one's.

One track serves every realisation (the nominal epoch and the model ΔT): the extreme declination does not depend
on ΔT; at a given local apparent time ΔT's σ moves the Moon by ``moon_shift_deg`` of the season (≈ 0.26° at
3000 BC), which this test does not draw.

References
----------
Wilson, E. B. (1927). Probable inference, the law of succession, and statistical inference. *JASA* 22, 209–212.
Davison, A. C. & Hinkley, D. V. (1997). *Bootstrap Methods and their Application*, §4.2 (p = (1 + k)/(n + 1)).
"""

from __future__ import annotations

import math
from dataclasses import dataclass

import erfa
import numpy as np
from numpy.typing import ArrayLike, NDArray

from lightpath.errors import InputError
from lightpath.light.moontrack import MoonTrack
from lightpath.light.options import ScanOptions
from lightpath.light.sweep import find_light
from lightpath.light.track import Air
from lightpath.light.window import SkyWindow
from lightpath.sky.observer import Observer
from lightpath.sky.tables import Tabular
from lightpath.study.framing import facing_azimuth_deg, wilson_interval
from lightpath.study.null_model import NullArc, monte_carlo_p_value, null_azimuths, obliquity_deg
from lightpath.study.uncertainty import Tolerances, make_draws, rotation_about_up

__all__ = ["LUNAR_NULL_MODEL_NAME", "LunarFraming", "lunar_closeness", "lunar_framing"]

LUNAR_NULL_MODEL_NAME = "random orientation over the moonrise/moonset arc"


@dataclass(frozen=True)
class LunarFraming(Tabular):
    """The result of :func:`lunar_framing` (angles in degrees, instants TT Julian dates)."""

    kind: str  # "major" or "minor"
    direction: str  # "north" or "south"
    side: str  # "moonrise" or "moonset"
    extreme_jd_tt: float
    extreme_declination_deg: float
    within_deg: float
    span_days: float
    facing_azimuth_deg: float
    nominal_closeness_deg: float  # nan: no moonlight on the target in the span
    closeness_deg: NDArray  # per draw
    probability: float
    probability_interval: tuple[float, float]
    null_arc_deg: tuple[float, float]
    null_closeness_deg: NDArray
    null_rate: float
    p_value: float
    null_model: str = LUNAR_NULL_MODEL_NAME


def lunar_closeness(
    window: SkyWindow,
    track: MoonTrack,
    jd_tt_start: float,
    jd_tt_end: float,
    extreme_declination_deg: float,
    *,
    criterion: str = "first-gleam",
    rotation: ArrayLike | None = None,
    air: Air | None = None,
    horizon_offset_deg: float = 0.0,
) -> float:
    """Smallest |δ − δ_extreme| (geocentric declination at each moonlight interval's peak), degrees; nan if none."""
    from lightpath.sky.moon import geocentric_moon

    intervals = find_light(window, track.bound(air), jd_tt_start, jd_tt_end, criterion, rotation=rotation,
                           horizon_offset_deg=horizon_offset_deg, semidiameter_deg=track.disc_semidiameter_deg,
                           screen_step_d=track.screen_step_d, screen_slop_deg=track.screen_slop_deg)  # fmt: skip
    if not intervals:
        return math.nan
    peaks = np.array([x.peak_jd_tt for x in intervals])
    dec = geocentric_moon(peaks, source=track.source_option).declination_deg
    return float(np.min(np.abs(np.asarray(dec) - extreme_declination_deg)))


def lunar_framing(
    window: SkyWindow,
    observer: Observer,
    year: int,
    axis_enu: ArrayLike,
    *,
    kind: str = "major",
    direction: str = "south",
    tolerances: Tolerances | None = None,
    draws: int = 20,
    null_draws: int = 40,
    seed: int = 0,
    within_deg: float = 0.5,
    span_days: float = 200.0,
    options: ScanOptions | None = None,
) -> LunarFraming:
    """Test "the opening frames the ``kind``-standstill ``direction``-ern moonrise (moonset)" near ``year``.

    Parameters
    ----------
    window : the target's sky window, made with a band wide enough for the Moon
        (``WindowOptions().for_body("moon")``).
    observer : the site and its air.
    year : astronomical year; the season of that kind and direction whose extreme lies nearest its middle.
    axis_enu : target → opening vector (ENU, metres): its azimuth picks moonrise or moonset and is the facing
        azimuth the null model turns.
    kind, direction : ``"major"``/``"minor"``, ``"north"``/``"south"``.
    tolerances, draws, seed : the Monte Carlo of the survey (:mod:`lightpath.study.uncertainty`).
    null_draws : random orientations of the null model.
    within_deg : the claim holds when the closeness is at most this, degrees.
    span_days : days searched on each side of the season's extreme.
    options : criterion, source, ΔT and the Moon's gate (``body`` is set to ``"moon"``).
    """
    from dataclasses import replace

    from lightpath.light.options import BODIES
    from lightpath.sky.standstills import extreme_rise_set_azimuths, standstill_seasons

    if kind not in ("major", "minor") or direction not in ("north", "south"):
        raise InputError(f"standstill {kind!r} {direction!r}: choose major or minor, north or south")
    if window.grid.declination_limit_deg < BODIES["moon"] - 1e-9:
        raise InputError("declination_limit_deg: make the window with WindowOptions().for_body('moon')")
    o = replace(options if options is not None else ScanOptions(), body="moon").check()
    seasons = standstill_seasons(int(year) - 10, int(year) + 10, source=o.source)
    mid = float(sum(erfa.epj2jd(float(year) + 0.5)))
    mine = [s for s in seasons if s.kind == kind and s.direction == direction]
    season = min(mine, key=lambda s: abs(s.extreme_jd_tt - mid))
    facing = facing_azimuth_deg(axis_enu)
    side = "moonrise" if 0.0 <= facing % 360.0 < 180.0 else "moonset"
    majors = [s for s in seasons if s.kind == "major"]
    pair = [min((s for s in majors if s.direction == d), key=lambda s: abs(s.extreme_jd_tt - mid))
            for d in ("north", "south")]  # fmt: skip
    air = {"pressure_mbar": observer.pressure_mbar, "temperature_c": observer.temperature_c}
    rises, sets = extreme_rise_set_azimuths(pair, observer.latitude_deg, refraction=observer.refraction, **air)
    arc_az = rises if side == "moonrise" else sets
    if not np.all(np.isfinite(arc_az)):
        raise InputError(f"latitude {observer.latitude_deg:g}: the Moon at a major standstill does not rise and set")
    arc = NullArc(side, float(arc_az.min()), float(arc_az.max()), float(obliquity_deg(float(year))))
    lo, hi = season.extreme_jd_tt - span_days, season.extreme_jd_tt + span_days
    track = MoonTrack(observer, lo, hi, o.source, o.delta_t_s, o.sun_below_deg, o.min_illuminated_fraction)

    def closeness(rotation=None, air=None, horizon_offset_deg=0.0) -> float:
        return lunar_closeness(window, track, lo, hi, season.extreme_declination_deg, criterion=o.criterion,
                               rotation=rotation, air=air, horizon_offset_deg=horizon_offset_deg)  # fmt: skip

    nominal = closeness()
    axis = np.asarray(axis_enu, dtype=float)
    tol = tolerances if tolerances is not None else Tolerances()
    survey = make_draws(tol, int(draws), seed=int(seed), year=int(year), axis_enu=axis / np.linalg.norm(axis),
                        distance_m=float(np.linalg.norm(axis)), temperature_c=observer.temperature_c,
                        pressure_mbar=observer.pressure_mbar)  # fmt: skip
    close = np.array([
        closeness(d.rotation_matrix, Air(d.temperature_c, d.pressure_mbar, d.refraction_offset_deg),
                  d.horizon_offset_deg)
        for d in survey
    ])  # fmt: skip
    framed = int(np.sum(close <= within_deg))
    null_az = null_azimuths(arc, int(null_draws), seed=int(seed))
    null_close = np.array([closeness(rotation_about_up(a - facing)) for a in null_az])
    null_framed = int(np.sum(null_close <= within_deg))
    as_close = int(np.sum(null_close <= nominal)) if math.isfinite(nominal) else int(null_draws)
    return LunarFraming(
        kind=kind,
        direction=direction,
        side=side,
        extreme_jd_tt=float(season.extreme_jd_tt),
        extreme_declination_deg=float(season.extreme_declination_deg),
        within_deg=float(within_deg),
        span_days=float(span_days),
        facing_azimuth_deg=float(facing),
        nominal_closeness_deg=nominal,
        closeness_deg=close,
        probability=framed / len(close) if len(close) else math.nan,
        probability_interval=wilson_interval(framed, len(close)) if len(close) else (math.nan, math.nan),
        null_arc_deg=(arc.low_deg, arc.high_deg),
        null_closeness_deg=null_close,
        null_rate=null_framed / len(null_close) if len(null_close) else math.nan,
        p_value=monte_carlo_p_value(as_close, len(null_close)),
    )
