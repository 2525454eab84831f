"""``lightpath scan``: the days and minutes of light on a scene's target, for one year or a span of years.

Examples (shell)::

    lightpath scan site.toml --year "1500 BC" --parts 8
    lightpath scan site.toml --years -3500:-2500:50 --criterion half-disc --json
    lightpath scan site.toml --year 2027 --csv light-2027.csv --quiet

A table by default; ``--json`` prints the whole result; ``--csv FILE`` writes one row per light event.
The sky window is cached (``--cache DIR``, ``--no-cache``); the engine's settings are the same in every command.
"""

from __future__ import annotations

import argparse
import re
from pathlib import Path

from lightpath.commands._common import (
    add_engine_options,
    add_output_options,
    engine_options,
    print_json,
    progress_bar,
    settings_line,
    to_jsonable,
)
from lightpath.errors import InputError
from lightpath.files import write_text_atomic
from lightpath.light.scan import parse_years, scan_scene
from lightpath.present.tables import (
    EVENT_COLUMNS,
    MOON_EVENT_COLUMNS,
    division_label,
    division_offset_label,
    division_row,
    event_row,
    rows_to_csv,
)
from lightpath.sky.calendar import year_from_label, year_label

#: Columns of ``--csv``, one row per event (the event table's keys).
CSV_COLUMNS = tuple(key for key, _ in EVENT_COLUMNS)

__all__ = ["CSV_COLUMNS", "HELP", "NAME", "add_arguments", "result_json", "run"]

NAME = "scan"
HELP = "every interval of sunlight on the target of a scene, with the light runs around the divisions of the year"


def add_arguments(parser: argparse.ArgumentParser) -> None:
    """Options of ``lightpath scan``."""
    # let "--years -3500:-2500:50" through as a value: argparse only takes plain negative numbers as values
    parser._negative_number_matcher = re.compile(r"^-\d+(:-?\d+){0,2}$|^-\d*\.\d+$")
    parser.add_argument("scene", metavar="SCENE.toml", help="scene file (site, model, target, opening, horizon)")
    when = parser.add_mutually_exclusive_group(required=True)
    when.add_argument("--year", metavar="Y", help="one year: 2027, -1499 or '1500 BC'")
    when.add_argument("--years", metavar="START:END:STEP", help="a span, END included, e.g. -3500:-2500:50")
    add_engine_options(parser)
    parser.add_argument("--csv", metavar="FILE", default=None, help="write one row per light event to FILE")
    add_output_options(parser)


def result_json(result, timezone: str | None = None) -> dict:
    """The scan result as the JSON ``lightpath scan --json`` prints: numbers, and the rows people read."""
    years = []
    for y in result.years:
        years.append(
            {
                "year": y.year,
                "year_label": year_label(y.year),
                "calendar": y.calendar,
                "source": y.source,
                "events": [to_jsonable(e) for e in y.events],
                "event_rows": [event_row(e, y.year, timezone) for e in y.events],
                "divisions": [to_jsonable(d) for d in y.divisions],
                "division_rows": [division_row(d, y.year) for d in y.divisions],
                "notes": list(y.notes),
            }
        )
    return {
        "scene": result.scene,
        "settings": to_jsonable(result.settings),
        "target_area_m2": result.target_area_m2,
        "notes": list(result.notes),
        "years": years,
    }


def _csv_text(result, timezone: str | None) -> str:
    rows = [event_row(e, y.year, timezone) for y in result.years for e in y.events]
    columns = EVENT_COLUMNS + (MOON_EVENT_COLUMNS if result.settings.body == "moon" else ())
    return f"# lightpath scan of {result.scene}: {settings_line(result.settings)}\n" + rows_to_csv(rows, columns)


def _print_table(result, timezone: str | None) -> None:
    s = result.settings
    print(f"{result.scene}: target {result.target_area_m2:.3f} m²")
    print(f"settings: {settings_line(s)}")
    for note in result.notes:
        print(f"note: {note}")
    for y in result.years:
        print()
        label = f"Year {year_label(y.year)} (astronomical {y.year}), dates in the {y.calendar} calendar"
        print(f"{label}; {s.body.title()}: {y.source}")
        if not y.events:
            print("  no light on the target this year")
        else:
            moon = s.body == "moon"
            head = "Moon azim°  alt°  phase°  lit  bright" if moon else "azim°   alt°"
            print(f"  date (LAD)    day in the year           LAT start–end  min    area m²  frac   {head}")
            for e in y.events:
                row = event_row(e, y.year, timezone)
                if moon:  # the Moon at the peak: phase angle, illuminated fraction, brightness against full
                    seen = (f"{e.moon_azimuth_deg:6.2f}  {e.moon_altitude_deg:5.2f}  {e.moon_phase_angle_deg:6.1f}  "
                            f"{e.moon_illuminated_fraction:4.2f}  {e.moon_relative_brightness:5.3f}")  # fmt: skip
                else:
                    seen = f"{e.sun_azimuth_deg:6.2f}  {e.sun_altitude_deg:5.2f}"
                print(
                    f"  {row['date']:<12}  {division_offset_label(e.division, e.offset_days):<24}  "
                    f"{row['start_local_apparent']}–{row['end_local_apparent']}  {e.duration_min:5.1f}  "
                    f"{e.peak_area_m2:8.4f}  {e.peak_fraction:4.2f}  {seen}"
                )
        print(f"  light runs per division ({s.samples} samples, {s.resolution_deg:g}° cells): date, days, first – last")
        for d in y.divisions:
            row = division_row(d, y.year)
            span = "none"
            if d.days:
                span = f"{row['first_date']} – {row['last_date']} ({d.first_offset_days:+d} … {d.last_offset_days:+d})"
            print(f"    {division_label(d.name):<30} {row['date']:<12} {d.days:4d}  {span}")
        for note in y.notes:
            print(f"  note: {note}")


def run(args: argparse.Namespace) -> int:
    """Run ``lightpath scan``."""
    if args.year is not None:
        years = parse_years(str(year_from_label(args.year, "--year")), "--year")
    else:
        years = parse_years(args.years, "--years")
    window_options, options = engine_options(args)
    scene_path = Path(args.scene)
    if not scene_path.is_file():
        raise InputError(f"{args.scene}: no such scene file")
    from lightpath.scene import load_scene

    scene = load_scene(scene_path)
    with progress_bar("scanning", len(years) + 1, quiet=args.quiet or args.json) as advance:
        done = [0]

        def progress(n, _total):
            advance(n - done[0])
            done[0] = n

        result = scan_scene(scene, years, options, window_options, progress=progress)
    timezone = scene.observer.timezone
    if args.csv:
        write_text_atomic(args.csv, _csv_text(result, timezone))
    if args.json:
        print_json(result_json(result, timezone))
    else:
        _print_table(result, timezone)
    return 0
