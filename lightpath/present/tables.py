"""The event and division tables of a scan, as rows, CSV, JSON and HTML.

Every table is built from the engine's result dataclasses
(:mod:`lightpath.light.results`) and adds nothing but formatting: UT instants
written as calendar dates (astronomical year numbering, calendar named) and
rounded numbers.  The same rows feed the CSV files, the JSON file and the HTML
report, so they always agree.

>>> from lightpath.light.results import DivisionLight
>>> d = DivisionLight("longitude", 0, "december_solstice", 2461396.1, 2461396, "gregorian", 2461393, 2461399, 7, -3, 3)
>>> row = division_row(d, 2027)
>>> row["date"], row["first_date"], row["days_lit"], row["first_offset_days"]
('2026-12-21', '2026-12-18', 7, -3)
"""

from __future__ import annotations

import csv
import dataclasses
import html
import io
import math
from collections.abc import Sequence
from typing import Any

import numpy as np

from lightpath.light.results import DivisionLight, LightEvent, ScanResult
from lightpath.sky.calendar import calendar_date, format_date, year_label
from lightpath.sky.instants import format_time_of_day

__all__ = [
    "DIVISION_COLUMNS",
    "EVENT_COLUMNS",
    "EVENT_HTML_COLUMNS",
    "MOON_EVENT_COLUMNS",
    "clock_hm",
    "day_date",
    "division_label",
    "division_offset_label",
    "division_row",
    "division_rows",
    "event_row",
    "event_rows",
    "rows_to_csv",
    "rows_to_html",
    "settings_line",
    "tables_document",
    "ut_label",
]

#: (key, heading) of each column of the event table, in order.
EVENT_COLUMNS: tuple[tuple[str, str], ...] = (
    ("year", "Year"),
    ("date", "Date (local apparent day)"),
    ("calendar", "Calendar"),
    ("division_offset", "Day in the year's divisions"),
    ("start_local_apparent", "Start (local apparent time)"),
    ("end_local_apparent", "End (local apparent time)"),
    ("duration_min", "Duration (min)"),
    ("start_ut", "Start (UT)"),
    ("peak_ut", "Peak (UT)"),
    ("end_ut", "End (UT)"),
    ("start_civil", "Start (civil)"),
    ("end_civil", "End (civil)"),
    ("peak_area_m2", "Peak lit area (m²)"),
    ("peak_fraction", "Peak lit fraction"),
    ("sun_azimuth_deg", "Sun azimuth at peak (°)"),
    ("sun_altitude_deg", "Sun apparent altitude at peak (°)"),
    ("division", "Division of its light run"),
    ("offset_days", "Days from division"),
    ("delta_t_s", "ΔT (s)"),
    ("delta_t_sigma_s", "ΔT σ (s)"),
    ("ut_date_uncertain", "UT date uncertain"),
)

#: Columns added to moonlight events (``body`` "moon"): the Moon at the peak, its phase and brightness.
MOON_EVENT_COLUMNS = (
    ("moon_azimuth_deg", "Moon azimuth at peak (°)"),
    ("moon_altitude_deg", "Moon apparent altitude at peak (°)"),
    ("moon_phase_angle_deg", "Moon phase angle (°, 0 = full)"),
    ("moon_illuminated_fraction", "Moon illuminated fraction"),
    ("moon_relative_brightness", "Brightness against the full Moon (Krisciunas & Schaefer 1991)"),
)

#: The event columns shown in the HTML report (the CSV and JSON files carry them all).
EVENT_HTML_COLUMNS: tuple[tuple[str, str], ...] = tuple(
    c for c in EVENT_COLUMNS if c[0] not in ("year", "peak_ut", "end_ut", "delta_t_s", "peak_area_m2")
)

#: (key, heading) of each column of the division table, in order.
DIVISION_COLUMNS: tuple[tuple[str, str], ...] = (
    ("year", "Year"),
    ("scheme", "Scheme"),
    ("index", "No."),
    ("name", "Division"),
    ("date", "Division date"),
    ("first_date", "First day of light"),
    ("last_date", "Last day of light"),
    ("days_lit", "Days with light"),
    ("first_offset_days", "First day − division (days)"),
    ("last_offset_days", "Last day − division (days)"),
    ("nearest_offset_days", "Nearest lit day − division (days)"),
)


_MONTHS = {"feb": "February", "may": "May", "aug": "August", "nov": "November"}


def division_label(name: str) -> str:
    """A division's name (:func:`lightpath.sky.divisions.division_name`) written for people.

    >>> division_label("december_solstice"), division_label("cross_quarter_feb"), division_label("division_3_of_16")
    ('December solstice', 'cross-quarter day (February)', 'division 3 of 16')
    """
    text = str(name)
    if text.startswith("cross_quarter_"):
        month = text.removeprefix("cross_quarter_")
        return f"cross-quarter day ({_MONTHS.get(month, month)})"
    words = text.split("_")
    if len(words) == 2 and words[1] in ("solstice", "equinox"):
        return f"{words[0].capitalize()} {words[1]}"
    return " ".join(words)


def day_date(day: int | None, calendar: str = "auto") -> str | None:
    """A local apparent day (Julian day number) as ``YYYY-MM-DD`` in astronomical numbering, or None.

    >>> day_date(2451545), day_date(1507900, "julian")
    ('2000-01-01', '-0584-05-28')
    """
    if day is None:
        return None
    return str(format_date(float(day), calendar if calendar in ("julian", "gregorian") else "auto"))


def clock_hm(hours: float) -> str:
    """Hours of a day (0..24) as ``HH:MM``, rounded to the nearest minute.

    >>> clock_hm(8.915), clock_hm(23.999)
    ('08:55', '00:00')
    """
    return str(format_time_of_day(float(hours) / 24.0))


def division_offset_label(name: str, offset_days: int | None) -> str:
    """A day named by its division and offset: ``"December solstice +3"``.

    >>> division_offset_label("december_solstice", -2), division_offset_label("march_equinox", 0)
    ('December solstice −2', 'March equinox')
    """
    if offset_days is None:
        return division_label(name)
    if offset_days == 0:
        return division_label(name)
    sign = "+" if offset_days > 0 else "−"
    return f"{division_label(name)} {sign}{abs(int(offset_days))}"


def ut_label(jd_ut: float, calendar: str = "auto") -> str:
    """A Julian date (UT) as ``YYYY-MM-DD HH:MM`` in astronomical year numbering, to the minute.

    >>> ut_label(2451545.0)
    '2000-01-01 12:00'
    >>> ut_label(1507900.13)  # Meeus (1998) Table 7.a: -584 May 28.63 (Julian calendar)
    '-0584-05-28 15:07'
    """
    if not math.isfinite(float(jd_ut)):
        return ""
    minutes = round(float(jd_ut) * 1440.0) / 1440.0  # round to the minute first, so 23:59:40 → next day
    year, month, day = calendar_date(minutes, calendar)
    whole = math.floor(day + 1e-9)
    minute_of_day = round((day - whole) * 1440.0) % 1440
    sign = "-" if year < 0 else ""
    return f"{sign}{abs(year):04d}-{month:02d}-{whole:02d} {minute_of_day // 60:02d}:{minute_of_day % 60:02d}"


def _round(value: float | None, digits: int) -> float | None:
    if value is None:
        return None
    value = float(value)
    return round(value, digits) if math.isfinite(value) else None


def event_row(event: LightEvent, year: int, timezone: str | None = None) -> dict[str, Any]:
    """One event as a flat dict of plain values (the keys of :data:`EVENT_COLUMNS`).

    ``timezone`` (IANA) gives civil times for modern dates (:func:`lightpath.present.civil.civil_iso`).
    """
    from lightpath.present.civil import civil_iso

    calendar = event.calendar if event.calendar in ("julian", "gregorian") else "auto"
    start_civil, end_civil = civil_iso([event.start_jd_ut, event.end_jd_ut], timezone)
    return {
        "year": int(year),
        "date": day_date(event.day, calendar),
        "calendar": event.calendar,
        "division_offset": division_offset_label(event.division, event.offset_days),
        "start_local_apparent": clock_hm(event.start_local_apparent_h),
        "end_local_apparent": clock_hm(event.end_local_apparent_h),
        "duration_min": _round(event.duration_min, 1),
        "start_ut": ut_label(event.start_jd_ut, calendar),
        "peak_ut": ut_label(event.peak_jd_ut, calendar),
        "end_ut": ut_label(event.end_jd_ut, calendar),
        "start_civil": start_civil,
        "end_civil": end_civil,
        "peak_area_m2": _round(event.peak_area_m2, 4),
        "peak_fraction": _round(event.peak_fraction, 3),
        "sun_azimuth_deg": _round(event.sun_azimuth_deg, 2),
        "sun_altitude_deg": _round(event.sun_altitude_deg, 2),
        "division": event.division,
        "offset_days": int(event.offset_days),
        "delta_t_s": _round(event.delta_t_s, 0),
        "delta_t_sigma_s": _round(event.delta_t_sigma_s, 0),
        "ut_date_uncertain": bool(event.ut_date_uncertain),
        **_moon_cells(event),
    }


def _moon_cells(event: LightEvent) -> dict[str, Any]:
    """The :data:`MOON_EVENT_COLUMNS` of a moonlight event (nothing for sunlight)."""
    if getattr(event, "body", "sun") != "moon":
        return {}
    digits = {"moon_illuminated_fraction": 3, "moon_relative_brightness": 4}
    return {key: _round(getattr(event, key), digits.get(key, 2)) for key, _ in MOON_EVENT_COLUMNS}


def division_row(division: DivisionLight, year: int) -> dict[str, Any]:
    """One division summary as a flat dict of plain values (the keys of :data:`DIVISION_COLUMNS`)."""
    return {
        "year": int(year),
        "scheme": division.scheme,
        "index": int(division.index),
        "name": division.name,
        "date": day_date(division.day, division.calendar),
        "first_date": day_date(division.first_day, division.calendar),
        "last_date": day_date(division.last_day, division.calendar),
        "days_lit": int(division.days),
        "first_offset_days": division.first_offset_days,
        "last_offset_days": division.last_offset_days,
        "nearest_offset_days": division.nearest_offset_days,
    }


def event_rows(scan: ScanResult, timezone: str | None = None) -> list[dict[str, Any]]:
    """Every event of every year of a scan, in time order (civil times in ``timezone`` for modern dates)."""
    rows = [(e.start_jd_ut, event_row(e, y.year, timezone)) for y in scan.years for e in y.events]
    return [row for _, row in sorted(rows, key=lambda pair: pair[0])]


def division_rows(scan: ScanResult) -> list[dict[str, Any]]:
    """Every division summary of every year of a scan, by year then division number."""
    return [division_row(d, y.year) for y in scan.years for d in sorted(y.divisions, key=lambda d: d.index)]


def _cell(value: Any) -> str:
    if value is None:
        return ""
    if isinstance(value, bool):
        return "yes" if value else "no"
    if isinstance(value, float | np.floating):
        return f"{float(value):g}"
    return str(value)


def rows_to_csv(rows: Sequence[dict[str, Any]], columns: Sequence[tuple[str, str]]) -> str:
    """Rows as CSV text (RFC 4180 quoting) with the column keys as the header line; empty cells for None.

    >>> print(rows_to_csv([{"a": 1.5, "b": None}], [("a", "A"), ("b", "B")]), end="")
    a,b
    1.5,
    """
    buffer = io.StringIO()
    writer = csv.writer(buffer, lineterminator="\n")
    writer.writerow([key for key, _ in columns])
    for row in rows:
        writer.writerow(["" if row.get(key) is None else row.get(key) for key, _ in columns])
    return buffer.getvalue()


def rows_to_html(
    rows: Sequence[dict[str, Any]], columns: Sequence[tuple[str, str]], *, caption: str = "", table_id: str = ""
) -> str:
    """Rows as an HTML ``<table>`` (every value escaped), with headings and an optional caption.

    >>> rows_to_html([{"a": "<b>"}], [("a", "A")])
    '<table><thead><tr><th scope="col">A</th></tr></thead><tbody><tr><td>&lt;b&gt;</td></tr></tbody></table>'
    """
    attrs = f' id="{html.escape(table_id)}"' if table_id else ""
    head = "".join(f'<th scope="col">{html.escape(title)}</th>' for _, title in columns)
    body = "".join(
        "<tr>" + "".join(f"<td>{html.escape(_cell(row.get(key)))}</td>" for key, _ in columns) + "</tr>" for row in rows
    )
    cap = f"<caption>{html.escape(caption)}</caption>" if caption else ""
    return f"<table{attrs}>{cap}<thead><tr>{head}</tr></thead><tbody>{body}</tbody></table>"


def tables_document(scan: ScanResult, timezone: str | None = None) -> dict[str, Any]:
    """The tables and the settings they came from, as one JSON-ready dict."""
    return {
        "scene": scan.scene,
        "years": [{"year": y.year, "label": year_label(y.year), "calendar": y.calendar} for y in scan.years],
        "settings": dataclasses.asdict(scan.settings),
        "target_area_m2": _round(scan.target_area_m2, 6),
        "events": event_rows(scan, timezone),
        "divisions": division_rows(scan),
        "notes": list(scan.notes) + [n for y in scan.years for n in y.notes],
    }


def settings_line(settings) -> str:
    """The engine's settings in one line, printed beside every result (samples and cell size first).

    ``settings`` is a :class:`~lightpath.light.results.ScanSettings`.

    >>> from lightpath.light.results import ScanSettings
    >>> settings_line(ScanSettings("first-gleam", "longitude", 8, 400, 0, 0.05, "bennett1982", "auto"))[:42]
    '400 target samples, 0.05° window cells, cr'
    """
    dt = "model" if settings.delta_t_s is None else f"{settings.delta_t_s:g} s"
    body = f"Sun {settings.source}"
    if getattr(settings, "body", "sun") == "moon":
        body = (f"moonlight (source {settings.source}) with the Sun below {settings.sun_below_deg:g}° and the Moon "
                f"at least {settings.min_illuminated_fraction:g} illuminated")  # fmt: skip
    return (
        f"{settings.samples} target samples, {settings.resolution_deg:g}° window cells, criterion "
        f"{settings.criterion}, {settings.parts} divisions ({settings.scheme}), {body}, ΔT {dt}; "
        f"days are {settings.day_convention}s"
    )
