"""``lightpath year``: the year's structure at a site — quarter days, season lengths, divisions of the year.

Examples (shell)::

    lightpath year --site 53.452,104.637,548 --year "2600 BC" --parts 16
    lightpath year --site 53.452,104.637 --year "2600 BC" --parts 16 --calendar gregorian
    lightpath year --site 38.947,-98.412 --year 2027 --parts 16 --scheme days --json
    lightpath year --site 47.10,12.30 --year -2499 --horizon skyline.csv --csv divisions.csv

Dates are local apparent days at the site, the day convention of every result; see ``docs/divisions.md``.
"""

from __future__ import annotations

import argparse
import csv
import dataclasses
import io
import math
import sys
import warnings

from lightpath.commands._common import (
    add_air_options,
    add_output_options,
    observer_from_options,
    print_json,
    progress_bar,
)
from lightpath.errors import InputError
from lightpath.files import write_text_atomic
from lightpath.sky.calendar import CALENDARS, format_date, year_from_label, year_label
from lightpath.sky.divisions import ANCHORS, SCHEMES, Division
from lightpath.sky.instants import format_local_apparent
from lightpath.sky.observer import Observer
from lightpath.sky.year_structure import year_structure

__all__ = ["HELP", "NAME", "SOURCES", "add_arguments", "run", "year_document"]

NAME = "year"
HELP = "quarter days, season lengths and divisions of the year (four definitions) with sunrise/sunset azimuths"

#: Sun position sources offered on the command line.
SOURCES = ("auto", "jpl", "vsop87")

_TIME_BASIS = "local apparent days at the site; quarter days with their local apparent time"


def add_arguments(parser: argparse.ArgumentParser) -> None:
    """Options of ``lightpath year``."""
    parser.add_argument("--site", required=True, metavar="LAT,LON[,ELEV_M]", help="degrees north, degrees east, metres")
    parser.add_argument("--year", required=True, metavar="Y", help="astronomical year (-2599) or '2600 BC' / 'AD 33'")
    parser.add_argument("--parts", type=int, default=8, metavar="N", help="number of divisions, N >= 2 (default 8)")
    parser.add_argument(
        "--scheme", choices=(*SCHEMES, "all"), default="all", help="definition of the divisions (default all)"
    )
    parser.add_argument(
        "--anchor", choices=ANCHORS, default="december", help="solstice the days scheme counts from (default december)"
    )
    parser.add_argument("--horizon", metavar="FILE", help="skyline CSV with header azimuth_deg,altitude_deg")
    parser.add_argument("--calendar", choices=CALENDARS, default="auto", help="calendar of the dates (default auto)")
    parser.add_argument("--source", choices=SOURCES, default="auto", help="Sun position source (default auto)")
    add_air_options(parser, "geometric horizon crossings (no refraction)")
    parser.add_argument("--csv", metavar="FILE", help="also write the divisions as CSV (atomically)")
    add_output_options(parser)


def _observer(args: argparse.Namespace) -> Observer:
    return observer_from_options(args)


def _year(text: str) -> int:
    return year_from_label(text, what="--year")


def _calendar_name(cals) -> str:
    used = sorted({str(c) for c in cals})
    return used[0] if len(used) == 1 else "/".join(used)


def year_document(
    year: int,
    observer: Observer,
    *,
    parts: int = 8,
    scheme: str = "all",
    anchor: str = "december",
    horizon=None,
    calendar: str = "auto",
    source: str = "auto",
    progress=None,
) -> dict:
    """Everything ``lightpath year --json`` prints: :func:`lightpath.sky.year_structure.year_structure`, with labels.

    ``progress`` (optional) is called with no argument after each scheme.
    """
    ys = year_structure(year, observer, parts=parts, scheme=scheme, anchor=anchor, horizon=horizon,
                        calendar=calendar, source=source, progress=progress)  # fmt: skip
    quarter = []
    for q in ys.quarter_days:
        row = dataclasses.asdict(q)
        row["date"] = str(format_date(float(q.local_apparent_day), calendar))
        quarter.append(row)
    return {
        "year": int(year),
        "year_label": year_label(year),
        "calendar": _calendar_name([d.calendar for d in ys.divisions] + [q.calendar for q in ys.quarter_days]),
        "date_time_basis": _TIME_BASIS,
        "site": {
            "latitude_deg": observer.latitude_deg,
            "longitude_deg": observer.longitude_deg,
            "elevation_m": observer.elevation_m,
            "refraction": observer.refraction,
            "pressure_mbar": observer.pressure_mbar,
            "temperature_c": observer.temperature_c,
        },
        "horizon": "flat (altitude 0)" if horizon is None else (getattr(horizon, "source", "") or "profile"),
        "source": ys.source,
        "parts": int(parts),
        "anchor": anchor,
        "quarter_days": quarter,
        "half_years": ys.half_years,
        "seasons_days": ys.seasons_days,
        "divisions": [dataclasses.asdict(d) for d in ys.divisions],
    }


def _csv_text(rows: list[dict]) -> str:
    buf = io.StringIO()
    fields = [f.name for f in dataclasses.fields(Division)]
    writer = csv.DictWriter(buf, fieldnames=fields, lineterminator="\n")
    writer.writeheader()
    for row in rows:
        writer.writerow({k: ("" if isinstance(v, float) and not math.isfinite(v) else v) for k, v in row.items()})
    return buf.getvalue()


def _fmt(value, spec: str) -> str:
    if value is None or (isinstance(value, float) and not math.isfinite(value)):
        width = spec.split(".")[0]
        return "—".rjust(int(width)) if width.isdigit() else "—"
    return format(value, spec)


def _print_text(doc: dict) -> None:
    site = doc["site"]
    print(
        f"Year {doc['year_label']} (astronomical {doc['year']}), site {site['latitude_deg']:g}°, "
        f"{site['longitude_deg']:g}°E; dates: {doc['calendar']} calendar, {doc['date_time_basis']}"
    )
    print(f"Sun: {doc['source']}; horizon: {doc['horizon']}; refraction: {site['refraction'] or 'none'}")
    print("\nQuarter days")
    for q in doc["quarter_days"]:
        date, clock = format_local_apparent(q["local_apparent_day"], q["local_apparent_time_h"], q["calendar"])
        name = q["name"] if q["of_year"] == doc["year"] else f"{q['name']} of {year_label(q['of_year'])}"
        print(f"  {name:<30} {date}  {clock} LAT  JDE {q['jd_tt']:.5f}  (ΔT ±{q['delta_t_sigma_s']:.0f} s)")
    h, s = doc["half_years"], doc["seasons_days"]
    print(
        f"\nHalf-years: December→June {_fmt(h['december_to_june_days'], '.2f')} d, "
        f"June→December {_fmt(h['june_to_december_days'], '.2f')} d"
    )
    print(
        f"Seasons: Dec→Mar {s['december_to_march_days']:.2f} d, Mar→Jun {s['march_to_june_days']:.2f} d, "
        f"Jun→Sep {s['june_to_september_days']:.2f} d, Sep→Dec {s['september_to_december_days']:.2f} d"
    )
    current = None
    for d in doc["divisions"]:
        if d["scheme"] != current:
            current = d["scheme"]
            print(f"\nDivisions, scheme {current} (N = {doc['parts']})")
            print(
                f"  {'#':>3} {'name':<20} {'date':<12} {'decl.°':>8} {'rise°':>8} {'gleam°':>8} {'full°':>8} "
                f"{'set°':>8} {'part d':>7}"
            )
        print(
            f"  {d['index']:>3} {d['name']:<20} {d['date']:<12} {_fmt(d['declination_deg'], '8.3f')} "
            f"{_fmt(d['sunrise_azimuth_deg'], '8.2f')} {_fmt(d['sunrise_first_gleam_azimuth_deg'], '8.2f')} "
            f"{_fmt(d['sunrise_full_disc_azimuth_deg'], '8.2f')} {_fmt(d['sunset_azimuth_deg'], '8.2f')} "
            f"{_fmt(d['part_days'], '7.2f')}"
        )


def run(args: argparse.Namespace) -> int:
    """Run ``lightpath year``; returns the exit code."""
    observer = _observer(args)
    year = _year(args.year)
    if args.parts < 2:
        raise InputError(f"--parts: {args.parts} must be 2 or more")
    horizon = None
    if args.horizon:
        from lightpath.sky.horizon import read_horizon_csv

        horizon = read_horizon_csv(args.horizon)
    n_schemes = len(SCHEMES) if args.scheme == "all" else 1
    with warnings.catch_warnings(record=True) as caught:
        warnings.simplefilter("always", UserWarning)
        with progress_bar("divisions of the year", n_schemes, quiet=args.quiet or args.json) as advance:
            doc = year_document(
                year,
                observer,
                parts=args.parts,
                scheme=args.scheme,
                anchor=args.anchor,
                horizon=horizon,
                calendar=args.calendar,
                source=args.source,
                progress=advance,
            )
    # each distinct warning once (the Sun model's accuracy notes repeat for every call)
    notes = list(dict.fromkeys(" ".join(str(w.message).split()) for w in caught if issubclass(w.category, UserWarning)))
    for w in caught:  # anything else goes on as it came
        if not issubclass(w.category, UserWarning):
            warnings.warn_explicit(w.message, w.category, w.filename, w.lineno)
    doc["notes"] = notes
    if not args.quiet:
        for note in notes:
            print(f"lightpath year: note: {note}", file=sys.stderr)
    if args.csv:
        write_text_atomic(args.csv, _csv_text(doc["divisions"]))
    if args.json:
        print_json(doc)
    else:
        _print_text(doc)
        if args.csv and not args.quiet:
            print(f"\nwrote {args.csv}")
    return 0
