"""From a year's light (:class:`~lightpath.light.year.YearLight`) to the events and per-division runs people read.

Each :class:`~lightpath.light.sweep.LightInterval` of a run that belongs to a division of the
year becomes a :class:`~lightpath.light.results.LightEvent`: its local apparent day, its start,
peak and end in UT and local apparent time, the Sun at the peak, the division of its run with
the day's offset from it, and ΔT with its σ.  Each division of the year becomes a
:class:`~lightpath.light.results.DivisionLight` with the span of its runs.  Both take the
division from the same assignment (:func:`lightpath.light.runs.assign_runs`), so a day is never
counted under one division in the events and another in the summary.
"""

from __future__ import annotations

import numpy as np

from lightpath.light.results import DivisionLight, LightEvent
from lightpath.light.year import YearLight
from lightpath.sky.calendar import calendar_for
from lightpath.sky.deltat import ut_date_uncertain

__all__ = ["division_lights", "light_events"]


def light_events(light: YearLight, total_area_m2: float) -> list[LightEvent]:
    """LightEvents of the runs that belong to the divisions of ``light.sky.year``, in time order.

    An event's UT date is flagged uncertain when ΔT ± 2σ could move it
    (:func:`lightpath.sky.deltat.ut_date_uncertain`); never with a fixed ΔT.
    """
    sky = light.sky
    if not light.intervals:
        return []
    run_of_day = {}
    reported = light.reported()
    for r, ((a, b), own) in enumerate(zip(light.runs, light.owner, strict=True)):
        if reported[r]:
            for d in range(int(a), int(b) + 1):
                run_of_day[d] = int(own)
    pick = [i for i, d in enumerate(light.interval_days) if int(d) in run_of_day]
    if not pick:
        return []
    intervals = [light.intervals[i] for i in pick]
    days = light.interval_days[pick]
    n = len(intervals)
    t = np.array([[x.start_jd_tt, x.end_jd_tt, x.peak_jd_tt] for x in intervals]).ravel()
    pos = sky.track.positions(t)
    jd_ut = np.asarray(pos.jd_ut).reshape(n, 3)
    lat_h = np.asarray(pos.local_apparent_time_h).reshape(n, 3)
    az = np.asarray(pos.azimuth_deg).reshape(n, 3)
    alt = np.asarray(pos.altitude_deg).reshape(n, 3)
    dts = np.asarray(pos.delta_t_s).reshape(n, 3)
    sig = np.asarray(pos.delta_t_sigma_s).reshape(n, 3)
    calendars = np.atleast_1d(calendar_for(days.astype(float), sky.options.calendar))
    if sky.options.delta_t_s is None:
        uncertain = np.atleast_1d(ut_date_uncertain(t.reshape(n, 3)[:, 2]))
    else:
        uncertain = np.zeros(n, bool)
    moon = {}
    if getattr(sky.track, "body", "sun") == "moon":
        from lightpath.light.moontrack import relative_brightness

        m = sky.track.ungated(t.reshape(n, 3)[:, 2])
        moon = {
            "body": "moon",
            "moon_azimuth_deg": az[:, 2],
            "moon_altitude_deg": alt[:, 2],
            "moon_phase_angle_deg": np.asarray(m.phase_angle_deg),
            "moon_illuminated_fraction": np.asarray(m.illuminated_fraction),
            "moon_relative_brightness": relative_brightness(m.phase_angle_deg),
        }
        az = np.full_like(az, np.nan)
        alt = np.repeat(np.asarray(m.sun_altitude_deg)[:, None], 3, axis=1)
    out = []
    for i, x in enumerate(intervals):
        own = run_of_day[int(days[i])]
        div_day = int(light.division_days[own])
        out.append(
            LightEvent(
                day=int(days[i]),
                calendar=str(calendars[i]),
                start_jd_ut=float(jd_ut[i, 0]),
                end_jd_ut=float(jd_ut[i, 1]),
                peak_jd_ut=float(jd_ut[i, 2]),
                start_local_apparent_h=float(lat_h[i, 0]),
                end_local_apparent_h=float(lat_h[i, 1]),
                peak_local_apparent_h=float(lat_h[i, 2]),
                duration_min=float((x.end_jd_tt - x.start_jd_tt) * 1440.0),
                peak_area_m2=float(x.peak_area_m2),
                peak_fraction=float(x.peak_area_m2 / total_area_m2) if total_area_m2 > 0 else 0.0,
                sun_azimuth_deg=float(az[i, 2]),
                sun_altitude_deg=float(alt[i, 2]),
                division=str(sky.divisions[own].name),
                division_day=div_day,
                offset_days=int(days[i]) - div_day,
                delta_t_s=float(dts[i, 2]),
                delta_t_sigma_s=float(sig[i, 2]),
                ut_date_uncertain=bool(uncertain[i]),
                **{k: (v if isinstance(v, str) else float(v[i])) for k, v in moon.items()},
            )
        )
    return out


def division_lights(light: YearLight) -> list[DivisionLight]:
    """One :class:`DivisionLight` per division of ``light.sky.year``, in order."""
    sky = light.sky
    per = light.runs_by_division()
    calendars = np.atleast_1d(calendar_for(per.division_day.astype(float), sky.options.calendar))
    out = []
    for k in np.flatnonzero(sky.in_year):
        d = sky.divisions[k]
        has = per.days[k] > 0
        out.append(
            DivisionLight(
                scheme=d.scheme,
                index=d.index,
                name=d.name,
                jd_tt=float(d.jd_tt),
                day=int(per.division_day[k]),
                calendar=str(calendars[k]),
                first_day=int(per.first_day[k]) if has else None,
                last_day=int(per.last_day[k]) if has else None,
                days=int(per.days[k]),
                first_offset_days=int(per.first_offset[k]) if has else None,
                last_offset_days=int(per.last_offset[k]) if has else None,
                nearest_offset_days=int(per.nearest_offset[k]) if has else None,
            )
        )
    return out
