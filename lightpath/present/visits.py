"""A visit plan for people: clock times in the site's zone, a table, a text listing, calendar entries.

Turns a :class:`lightpath.study.visit.VisitPlan` (instants as Julian dates) into
civil clock times with :mod:`lightpath.present.civil` (daylight saving included)
and into iCalendar entries (:mod:`lightpath.present.ics`) whose description
carries the expected times, their spread and the cautions.
"""

from __future__ import annotations

import math
from typing import Any

from lightpath.present.civil import civil_datetime, time_zone, utc_datetime
from lightpath.present.ics import CalendarEntry
from lightpath.present.report import CAUTIONS
from lightpath.present.tables import day_date, division_label
from lightpath.study.visit import VisitEvent, VisitPlan

__all__ = ["VISIT_COLUMNS", "visit_entries", "visit_row", "visit_rows", "visit_text"]

#: (key, heading) of each column of the visit table, in order.
VISIT_COLUMNS: tuple[tuple[str, str], ...] = (
    ("date", "Civil date"),
    ("sunrise", "Sunrise"),
    ("start", "Light starts"),
    ("peak", "Peak"),
    ("end", "Light ends"),
    ("earliest_start", "Earliest start"),
    ("latest_start", "Latest start"),
    ("earliest_end", "Earliest end"),
    ("latest_end", "Latest end"),
    ("start_spread_min", "Start spread (min)"),
    ("sunset", "Sunset"),
    ("duration_min", "Duration (min)"),
    ("peak_fraction", "Peak lit fraction"),
    ("division", "Division of its light run"),
    ("offset_days", "Days from division"),
    ("cases_with_light", "Refraction cases with light"),
    ("utc_offset", "UTC offset"),
)


def _to_minute(jd_ut: float) -> float:
    """A Julian date rounded to the nearest minute (08:54:55 → 08:55, 23:59:40 → 00:00 of the next day)."""
    return round(jd_ut * 1440.0) / 1440.0


def _clock(jd_ut: float, zone) -> str | None:
    if not math.isfinite(jd_ut):
        return None
    return civil_datetime(_to_minute(jd_ut), zone).strftime("%H:%M")


def visit_row(visit: VisitEvent, zone_name: str | None) -> dict[str, Any]:
    """One visit event as a flat dict: clock times ``HH:MM`` in the zone (UTC when None), plain numbers."""
    zone = time_zone(zone_name or "UTC")
    peak = civil_datetime(visit.peak_jd_ut, zone)
    e = visit.event
    return {
        "date": civil_datetime(_to_minute(visit.peak_jd_ut), zone).date().isoformat(),  # the date of "peak"
        "sunrise": _clock(visit.sunrise_jd_ut, zone),
        "start": _clock(visit.start_jd_ut, zone),
        "peak": _clock(visit.peak_jd_ut, zone),
        "end": _clock(visit.end_jd_ut, zone),
        "earliest_start": _clock(visit.earliest_start_jd_ut, zone),
        "latest_start": _clock(visit.latest_start_jd_ut, zone),
        "earliest_end": _clock(visit.earliest_end_jd_ut, zone),
        "latest_end": _clock(visit.latest_end_jd_ut, zone),
        "start_spread_min": round(visit.start_spread_min, 1),
        "sunset": _clock(visit.sunset_jd_ut, zone),
        "duration_min": round(float(e.duration_min), 1),
        "peak_fraction": round(float(e.peak_fraction), 3),
        "division": e.division,
        "division_label": division_label(e.division),
        "offset_days": int(e.offset_days),
        "local_apparent_date": day_date(e.day, e.calendar),
        "cases_with_light": visit.cases_with_light,
        "utc_offset": peak.strftime("%z")[:3] + ":" + peak.strftime("%z")[3:],
        "start_iso": civil_datetime(visit.start_jd_ut, zone).isoformat(timespec="seconds"),
        "peak_iso": peak.isoformat(timespec="seconds"),
        "end_iso": civil_datetime(visit.end_jd_ut, zone).isoformat(timespec="seconds"),
        "timezone": zone.key,
    }


def visit_rows(plan: VisitPlan) -> list[dict[str, Any]]:
    """Every event of the plan as a row (see :func:`visit_row`)."""
    return [visit_row(v, plan.timezone) for v in plan.events]


def visit_text(plan: VisitPlan) -> str:
    """A plain-text listing of the plan for the terminal."""
    zone = plan.timezone or "UTC"
    rows = visit_rows(plan)
    lines = [f"{plan.scene}: {len(rows)} light event(s), clock times in {zone}"]
    for row in rows:
        lines.append(
            f"  {row['date']} (UTC{row['utc_offset']})  sunrise {row['sunrise'] or '—'}  "
            f"light {row['start']}–{row['end']} (peak {row['peak']}, {row['peak_fraction']:.0%} lit)  "
            f"start between {row['earliest_start']} and {row['latest_start']}  sunset {row['sunset'] or '—'}"
        )
    if not rows:
        lines.append("  no light reaches the target in this span")
    lines += [f"  note: {n}" for n in plan.notes]
    lines += [f"  caution: {c}" for c in CAUTIONS]
    return "\n".join(lines)


def _light_word(plan) -> str:
    """The word for the light a plan followed: Moonlight or Sunlight."""
    return "Moonlight" if getattr(plan.settings, "body", "sun") == "moon" else "Sunlight"


def visit_entries(plan: VisitPlan) -> list[CalendarEntry]:
    """One calendar entry per event: from the earliest start to the latest end, description with the details."""
    zone = time_zone(plan.timezone or "UTC")
    entries = []
    for visit, row in zip(plan.events, visit_rows(plan), strict=True):
        start = civil_datetime(visit.earliest_start_jd_ut, zone)
        end = civil_datetime(max(visit.latest_end_jd_ut, visit.earliest_start_jd_ut + 1 / 1440), zone)
        description = "\n".join(
            [
                f"Expected light on the target {row['start']}–{row['end']} (peak {row['peak']}, "
                f"{row['peak_fraction']:.0%} of the target lit), {zone.key} clock time (UTC{row['utc_offset']}).",
                f"With refraction's spread: start between {row['earliest_start']} and {row['latest_start']}, "
                f"end between {row['earliest_end']} and {row['latest_end']}.",
                f"Sunrise {row['sunrise'] or '—'}, sunset {row['sunset'] or '—'}. "
                f"{row['offset_days']:+d} days from the {row['division_label']} (its light run's division).",
                *CAUTIONS,
            ]
        )
        entries.append(
            CalendarEntry(
                summary=f"{_light_word(plan)} on the target: {plan.scene}",
                uid_key=f"{plan.scene}|{utc_datetime(visit.start_jd_ut).strftime('%Y-%m-%dT%H:%MZ')}",
                start=start,
                end=end,
                description=description,
                location=f"{plan.scene} ({plan.latitude_deg:.5f}, {plan.longitude_deg:.5f})",
                latitude_deg=plan.latitude_deg,
                longitude_deg=plan.longitude_deg,
            )
        )
    return entries
