"""``lightpath report SCENE.toml --year Y --out DIR``: a self-contained HTML report with its tables and figures.

Examples (shell)::

    lightpath report demo_models/larchfold/scene.toml --year "2600 BC" --parts 16 --out report/
    lightpath report demo_models/sandwren/scene.toml --year -1499 --visit-year 2027 --drift -1799:-1199:100 --out r/

Writes ``DIR/report.html`` (figures embedded, opens with no network), ``events.csv``,
``divisions.csv``, ``tables.json``, ``figures/*.png|svg`` and, with ``--visit-year``,
``visit.csv`` and ``visit.ics`` — each file atomically.  See ``docs/reports.md``.

>>> import argparse
>>> p = argparse.ArgumentParser(); add_arguments(p)
>>> a = p.parse_args(["s.toml", "--year", "2600 BC", "--out", "r"])
>>> a.samples, a.resolution, a.criterion
(400, 0.05, 'first-gleam')
"""

from __future__ import annotations

import argparse
import sys

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

__all__ = ["HELP", "NAME", "add_arguments", "run", "stage_count"]

NAME = "report"
HELP = "write a self-contained HTML report (tables, figures, cautions) with CSV/JSON tables and figure files"


def add_arguments(parser: argparse.ArgumentParser) -> None:
    """Options of ``lightpath report``."""
    parser.add_argument("scene", metavar="SCENE.toml", help="the scene file")
    parser.add_argument("--year", required=True, metavar="Y", help="year of the report: -2599, '2600 BC' or 'AD 33'")
    parser.add_argument("--visit-year", metavar="Y", help="a modern year to plan a visit in (civil times, visit.ics)")
    parser.add_argument(
        "--drift", metavar="START:END:STEP", help="years for the epoch-drift figure, e.g. -3500:-2900:100"
    )
    parser.add_argument("--out", required=True, metavar="DIR", help="folder to write the report into")
    parser.add_argument("--no-svg", action="store_true", help="write the figures as PNG only")
    add_engine_options(parser)
    add_output_options(parser)


def _visit_year(text: str | None) -> int | None:
    if text is None:
        return None
    from lightpath.present.civil import CIVIL_FIRST_YEAR
    from lightpath.sky.calendar import year_from_label
    from lightpath.sky.seasons import YEAR_MAX

    year = year_from_label(text, what="--visit-year")
    if not CIVIL_FIRST_YEAR <= year <= YEAR_MAX:
        raise InputError(f"--visit-year: {text!r} is outside {CIVIL_FIRST_YEAR}..{YEAR_MAX} (civil clock times)")
    return year


def stage_count(visit: bool, drift: bool) -> int:
    """How many times the report builder reports progress."""
    return 6 + (3 if visit else 0) + (2 if drift else 0)


def run(args: argparse.Namespace) -> int:
    from lightpath.light.scan import parse_years
    from lightpath.present.scene_report import make_report
    from lightpath.sky.calendar import year_from_label

    year = year_from_label(args.year, what="--year")
    visit_year = _visit_year(args.visit_year)
    drift = parse_years(args.drift, option="--drift") if args.drift else None
    if drift is not None and len(drift) < 2:
        raise InputError("--drift: give at least two years (START:END:STEP)")
    window_options, options = engine_options(args)
    formats = ("png",) if args.no_svg else ("png", "svg")
    with progress_bar("report", stage_count(visit_year is not None, drift is not None), args.quiet) as advance:
        out = make_report(args.scene, year, out_dir=args.out, visit_year=visit_year, drift_years=drift,
                          formats=formats, progress=advance, options=options,
                          window_options=window_options)  # fmt: skip
    if not args.quiet:
        for notice in out.warnings:
            print(f"notice: {notice}", file=sys.stderr)
    if args.json:
        print_json(
            {
                "scene": out.scan.scene,
                "settings": to_jsonable(out.scan.settings),
                "settings_line": settings_line(out.scan.settings),
                "notices": out.warnings,
                "files": {name: str(path) for name, path in out.paths.items()},
                "events": sum(len(y.events) for y in out.scan.years),
                "visit_events": None if out.visit is None else len(out.visit.events),
                "seconds": out.seconds,
            }
        )
    else:
        events = sum(len(y.events) for y in out.scan.years)
        print(f"{out.scan.scene}: {events} light event(s) in {args.year}")
        print(f"  settings: {settings_line(out.scan.settings)}")
        if out.visit is not None:
            print(f"  visit {visit_year}: {len(out.visit.events)} event(s); calendar file {out.paths['visit.ics']}")
        print(f"  report: {out.paths['report.html']}")
    return 0
