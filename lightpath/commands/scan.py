"""``lightpath scan``: the days and minutes of light on a scene's target, for one year or a span of years.

Examples (shell)::

    lightpath scan site.toml --year "3200 BC" --parts 8
    lightpath scan site.toml --years -3500:-2500:50 --criterion half-disc --json
    lightpath scan site.toml --year 2027 --csv light-2027.csv --quiet

A table by default; ``--json`` prints the whole result; ``--csv FILE`` writes one row per light event.
The sky window is cached in ``~/.cache/lightpath`` unless ``--cache DIR`` or ``--no-cache`` is given.
"""

from __future__ import annotations

import argparse
import csv
import io
import re
from pathlib import Path

from lightpath.commands._common import add_output_options, print_json, progress_bar, to_jsonable
from lightpath.errors import InputError
from lightpath.files import write_text_atomic
from lightpath.light.disc import CRITERIA
from lightpath.light.scan import parse_years, scan_scene
from lightpath.sky.calendar import year_from_label, year_label

__all__ = ["CSV_FIELDS", "DEFAULT_CACHE", "HELP", "NAME", "add_arguments", "result_json", "run"]

NAME = "scan"
HELP = "every interval of sunlight on the target of a scene, with the divisions of the year it falls near"

#: Where sky windows are cached unless --cache or --no-cache says otherwise.
DEFAULT_CACHE = Path.home() / ".cache" / "lightpath"
SCHEMES = ("longitude", "time", "days", "declination")
SOURCES = ("auto", "jpl", "vsop87")

#: Columns of ``--csv``, one row per event.
CSV_FIELDS = (
    "year",
    "date",
    "calendar",
    "start_jd_ut",
    "end_jd_ut",
    "peak_jd_ut",
    "start_local_apparent",
    "end_local_apparent",
    "start_civil",
    "end_civil",
    "duration_min",
    "peak_area_m2",
    "peak_fraction",
    "sun_azimuth_deg",
    "sun_altitude_deg",
    "nearest_division",
    "offset_days",
    "delta_t_s",
    "delta_t_sigma_s",
    "ut_date_uncertain",
)


def add_arguments(parser: argparse.ArgumentParser) -> None:
    """Options of ``lightpath scan``."""
    # let "--years -3500:-2500:50" through as a value: argparse only takes plain negative numbers as values
    parser._negative_number_matcher = re.compile(r"^-\d+(:-?\d+){0,2}$|^-\d*\.\d+$")
    parser.add_argument("scene", metavar="SCENE.toml", help="scene file (site, model, target, opening, horizon)")
    when = parser.add_mutually_exclusive_group(required=True)
    when.add_argument("--year", metavar="Y", help="one year: 2027, -3199 or '3200 BC'")
    when.add_argument("--years", metavar="START:END:STEP", help="a span, END included, e.g. -3500:-2500:50")
    parser.add_argument("--parts", type=int, default=8, metavar="N", help="divisions of the year (default 8)")
    parser.add_argument("--scheme", choices=SCHEMES, default="longitude", help="how the year is divided")
    parser.add_argument("--criterion", choices=tuple(CRITERIA), default="first-gleam", help="when a sample is lit")
    parser.add_argument("--samples", type=int, default=1000, metavar="K", help="target samples (default 1000)")
    parser.add_argument("--seed", type=int, default=0, help="random-number-generator seed of the sampling")
    parser.add_argument("--resolution", type=float, default=0.05, metavar="DEG", help="sky window cell, degrees")
    parser.add_argument("--source", choices=SOURCES, default="auto", help="Sun positions: JPL DE421 or VSOP87")
    parser.add_argument("--delta-t", type=float, default=None, metavar="S", help="fixed ΔT in seconds")
    parser.add_argument(
        "--calendar", choices=("auto", "julian", "gregorian"), default="auto", help="calendar of the dates"
    )
    cache = parser.add_mutually_exclusive_group()
    cache.add_argument("--cache", metavar="DIR", default=None, help=f"window cache folder (default {DEFAULT_CACHE})")
    cache.add_argument("--no-cache", action="store_true", help="do not read or write a window cache")
    parser.add_argument("--csv", metavar="FILE", default=None, help="write one row per light event to FILE")
    add_output_options(parser)


def result_json(result) -> dict:
    """The scan result as the JSON ``lightpath scan --json`` prints."""
    years = []
    for y in result.years:
        years.append(
            {
                "year": y.year,
                "year_label": year_label(y.year),
                "calendar": y.calendar,
                "source": y.source,
                "events": [to_jsonable(e) for e in y.events],
                "divisions": [to_jsonable(d) for d in y.divisions],
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


def _csv_text(result) -> str:
    buf = io.StringIO()
    writer = csv.writer(buf, lineterminator="\n")
    writer.writerow(CSV_FIELDS)
    for y in result.years:
        for e in y.events:
            row = to_jsonable(e)
            row["year"] = y.year
            writer.writerow(["" if row.get(k) is None else row.get(k) for k in CSV_FIELDS])
    return buf.getvalue()


def _print_table(result) -> None:
    s = result.settings
    print(f"{result.scene}: target {result.target_area_m2:.3f} m², {s.samples} samples, criterion {s.criterion}")
    for note in result.notes:
        print(f"note: {note}")
    for y in result.years:
        print()
        print(f"Year {year_label(y.year)} (astronomical {y.year}), {y.calendar} calendar; Sun: {y.source}")
        if not y.events:
            print("  no light on the target this year")
        else:
            print("  date          LAT start–end   min   area m²  frac   azim°   alt°   nearest division      offset d")
            for e in y.events:
                print(
                    f"  {e.date:<12}  {e.start_local_apparent}–{e.end_local_apparent}  {e.duration_min:5.1f}  "
                    f"{e.peak_area_m2:8.3f}  {e.peak_fraction:4.2f}  {e.sun_azimuth_deg:6.2f}  "
                    f"{e.sun_altitude_deg:5.2f}  {e.nearest_division:<20}  {e.offset_days:+7.1f}"
                )
        print("  divisions: name, date, days of light around it (first – last)")
        for d in y.divisions:
            span = f"{d.first_date} – {d.last_date}" if d.days else "none"
            print(f"    {d.name:<24} {d.date:<12} {d.days:4d}  {span}")
        for note in y.notes:
            print(f"  note: {note}")


def run(args: argparse.Namespace) -> int:
    """Run ``lightpath scan``."""
    if args.year is not None:
        years = parse_years(str(year_from_label(args.year, "--year")), "--year")
    else:
        years = parse_years(args.years, "--years")
    if args.samples < 1:
        raise InputError(f"--samples: {args.samples} must be at least 1")
    scene_path = Path(args.scene)
    if not scene_path.is_file():
        raise InputError(f"{args.scene}: no such scene file")
    cache_dir = None if args.no_cache else Path(args.cache) if args.cache else DEFAULT_CACHE
    with progress_bar("scanning", len(years) + 1, quiet=args.quiet or args.json) as advance:
        done = [0]

        def progress(n, _total):
            advance(n - done[0])
            done[0] = n

        result = scan_scene(
            scene_path,
            years,
            criterion=args.criterion,
            scheme=args.scheme,
            parts=args.parts,
            samples=args.samples,
            seed=args.seed,
            source=args.source,
            delta_t_s=args.delta_t,
            resolution_deg=args.resolution,
            cache_dir=cache_dir,
            progress=progress,
            calendar=args.calendar,
        )
    if args.csv:
        write_text_atomic(args.csv, _csv_text(result))
    if args.json:
        print_json(result_json(result))
    elif not args.quiet:
        _print_table(result)
    return 0
