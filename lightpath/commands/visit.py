"""``lightpath visit SCENE.toml --from DATE --to DATE``: the coming light events in the site's clock time.

Examples (shell)::

    lightpath visit site.toml --from 2027-01-15 --to 2027-02-28
    lightpath visit site.toml --from 2027-12-01 --to 2027-12-31 --ics solstice-visit.ics --json

Each event is shown with sunrise and sunset, the expected start, peak and end clock
times in the site's IANA time zone (daylight saving included) and the earliest and
latest start and end when refraction is made smaller or larger by its scatter at the
horizon (σ ≈ 0.18°, Sampson et al. 2003).  ``--ics`` writes an RFC 5545 calendar
file (one entry per event, from the earliest start to the latest end).

>>> import argparse
>>> p = argparse.ArgumentParser(); add_arguments(p)
>>> a = p.parse_args(["s.toml", "--from", "2027-01-01", "--to", "2027-01-31"])
>>> a.sigma, a.ics
(0.18, None)
"""

from __future__ import annotations

import argparse
import dataclasses
import datetime as _dt
import math

from lightpath.commands._common import (
    add_engine_options,
    add_output_options,
    engine_options,
    print_json,
    progress_bar,
    settings_line,
)
from lightpath.errors import InputError

__all__ = ["HELP", "NAME", "add_arguments", "run", "visit_document"]

NAME = "visit"
HELP = "plan a visit: light events between two dates in the site's clock time, with sunrise/sunset and spread"


def add_arguments(parser: argparse.ArgumentParser) -> None:
    """Options of ``lightpath visit``."""
    parser.add_argument("scene", metavar="SCENE.toml", help="the scene file")
    parser.add_argument("--from", dest="from_date", required=True, metavar="DATE", help="first day, YYYY-MM-DD")
    parser.add_argument("--to", dest="to_date", required=True, metavar="DATE", help="last day, YYYY-MM-DD")
    parser.add_argument("--ics", metavar="FILE", help="also write the events as an iCalendar (.ics) file")
    parser.add_argument("--timezone", metavar="ZONE", help="IANA time zone instead of the scene's (e.g. Asia/Tokyo)")
    parser.add_argument("--sigma", type=float, default=0.18, metavar="DEG",
                        help="1σ of refraction at the horizon, degrees (default 0.18; 0 = none)")  # fmt: skip
    add_engine_options(parser)
    add_output_options(parser)


def visit_document(plan) -> dict:
    """The plan as plain JSON values: settings, notes, cautions and one row per event."""
    from lightpath.present.report import CAUTIONS
    from lightpath.present.visits import visit_rows

    return {
        "scene": plan.scene,
        "timezone": plan.timezone or "UTC",
        "latitude_deg": plan.latitude_deg,
        "longitude_deg": plan.longitude_deg,
        "settings": dataclasses.asdict(plan.settings) if plan.settings is not None else None,
        "settings_line": settings_line(plan.settings) if plan.settings is not None else None,
        "refraction_cases": plan.refraction_cases,
        "sunrise_sunset": "upper limb on the astronomical horizon, refracted",
        "events": visit_rows(plan),
        "notes": plan.notes,
        "cautions": list(CAUTIONS),
    }


def run(args: argparse.Namespace) -> int:
    from lightpath.present.civil import jd_from_local_date, parse_local_date, time_zone
    from lightpath.present.ics import write_calendar
    from lightpath.present.visits import visit_entries, visit_text
    from lightpath.scene import load_scene
    from lightpath.study.visit import visit_scene

    first_day = parse_local_date(args.from_date, option="--from")
    last_day = parse_local_date(args.to_date, option="--to")
    if last_day < first_day:
        raise InputError(f"--to {args.to_date} is before --from {args.from_date}")
    if (last_day - first_day).days > 3 * 366:
        raise InputError("--from/--to: plan at most three years at a time")
    if not (math.isfinite(args.sigma) and 0.0 <= args.sigma <= 1.0):
        raise InputError(f"--sigma: {args.sigma!r} is outside 0..1 degrees")
    window_options, options = engine_options(args)
    scene = load_scene(args.scene)
    if args.timezone:
        time_zone(args.timezone, option="--timezone")
        scene = dataclasses.replace(scene, observer=dataclasses.replace(scene.observer, timezone=args.timezone))
    zone = scene.observer.timezone or "UTC"
    first = jd_from_local_date(first_day, zone)
    last = jd_from_local_date(last_day + _dt.timedelta(days=1), zone)
    cases = 3 if args.sigma > 0 and scene.observer.refraction is not None else 1
    with progress_bar("visit", cases, args.quiet) as advance:
        plan = visit_scene(scene, first, last, options, window_options, refraction_sigma_deg=args.sigma,
                           progress=advance)  # fmt: skip
    if scene.observer.timezone is None:
        plan.notes.append("The scene gives no time zone: clock times are UTC (set site.timezone or --timezone).")
    if args.ics:
        light = "Moonlight" if plan.settings.body == "moon" else "Sunlight"
        write_calendar(args.ics, visit_entries(plan), name=f"{light} on the target: {plan.scene}")
    if args.json:
        document = visit_document(plan)
        document["ics"] = args.ics
        print_json(document)
    else:
        print(visit_text(plan))
        if plan.settings is not None:
            print(f"settings: {settings_line(plan.settings)}")
        if args.ics:
            print(f"calendar file: {args.ics}")
    return 0
