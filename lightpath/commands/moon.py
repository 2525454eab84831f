"""``lightpath moon``: the lunar standstill seasons in a span of years, their extreme declinations and the
moonrise/moonset azimuths of those extremes on the site's horizon.

Examples (shell)::

    lightpath moon --site 55.00,-7.00 --from 2020 --to 2050
    lightpath moon --site 51.18,-1.83,100 --from "2600 BC" --to "2400 BC" --horizon skyline.csv --json

Dates are UT in the calendar named beside them; ΔT's σ at each extreme and its effect are printed.
See ``docs/moon.md``.
"""

from __future__ import annotations

import argparse

from lightpath.commands._common import add_air_options, add_output_options, observer_from_options, print_json
from lightpath.errors import InputError
from lightpath.sky.calendar import CALENDARS, calendar_for, format_date, year_from_label, year_label
from lightpath.sky.deltat import ut_from_tt
from lightpath.sky.riseset import LIMBS
from lightpath.sky.standstills import MAX_SPAN_YEARS, extreme_rise_set_azimuths, standstill_seasons

__all__ = ["HELP", "NAME", "SOURCES", "add_arguments", "moon_document", "run"]

NAME = "moon"
HELP = "lunar standstill seasons in a span of years: extreme declinations and their moonrise/moonset azimuths"

#: Moon position sources offered on the command line.
SOURCES = ("auto", "jpl", "elp")

_DELTA_T_EFFECT = (
    "ΔT's σ shifts the UT (clock) time of each extreme by ±σ and the Moon's place at a given local apparent "
    "time by ±moon_shift_deg (its mean motion against the Sun, 0.508°/h); the extreme declinations and the "
    "rise/set azimuths of a declination depend on TT only and do not move"
)


def add_arguments(parser: argparse.ArgumentParser) -> None:
    """Options of ``lightpath moon``."""
    parser.add_argument("--site", required=True, metavar="LAT,LON[,ELEV_M]", help="degrees north, degrees east, metres")
    parser.add_argument("--from", dest="first", required=True, metavar="YEAR", help="first year: 2020, '2600 BC'")
    parser.add_argument("--to", dest="last", required=True, metavar="YEAR", help="last year (inclusive)")
    parser.add_argument("--horizon", metavar="FILE", help="skyline CSV with header azimuth_deg,altitude_deg")
    parser.add_argument("--limb", choices=LIMBS, default="centre", help="which point of the disc meets the horizon")
    parser.add_argument(
        "--band", type=float, default=0.5, metavar="DEG",
        help="a season holds the months whose extreme comes within this of its extreme (default 0.5°)",
    )  # fmt: skip
    parser.add_argument("--source", choices=SOURCES, default="auto", help="JPL DE421, the long-term theory, or auto")
    parser.add_argument("--calendar", choices=CALENDARS, default="auto", help="calendar of the dates (default auto)")
    add_air_options(parser, "geometric horizon crossings (no refraction)")
    add_output_options(parser)


def _date(jd_tt: float, calendar: str) -> dict:
    jd_ut = float(ut_from_tt(jd_tt))
    return {
        "jd_tt": jd_tt,
        "jd_ut": jd_ut,
        "date": str(format_date(jd_ut, calendar)),
        "calendar": str(calendar_for(jd_ut, calendar)),
    }


def moon_document(
    first_year: int,
    last_year: int,
    observer,
    *,
    horizon=None,
    limb: str = "centre",
    band_deg: float = 0.5,
    source: str = "auto",
    calendar: str = "auto",
) -> dict:
    """Everything ``lightpath moon --json`` prints: numbers and labels, no formatted tables."""
    seasons = standstill_seasons(first_year, last_year, source=source, band_deg=band_deg)
    rise, set_ = extreme_rise_set_azimuths(
        seasons,
        observer.latitude_deg,
        horizon=horizon,
        limb=limb,
        refraction=observer.refraction,
        pressure_mbar=observer.pressure_mbar,
        temperature_c=observer.temperature_c,
    )
    rows = []
    for s, r, st in zip(seasons, rise, set_, strict=True):
        rows.append(
            {
                "kind": s.kind,
                "direction": s.direction,
                "season_start": _date(s.start_jd_tt, calendar),
                "season_end": _date(s.end_jd_tt, calendar),
                "months": s.months,
                "extreme": _date(s.extreme_jd_tt, calendar),
                "extreme_declination_deg": s.extreme_declination_deg,
                "moonrise_azimuth_deg": float(r),
                "moonset_azimuth_deg": float(st),
                "distance_km": s.distance_km,
                "horizontal_parallax_deg": s.horizontal_parallax_deg,
                "semidiameter_deg": s.semidiameter_deg,
                "delta_t_s": s.delta_t_s,
                "delta_t_sigma_s": s.delta_t_sigma_s,
                "moon_shift_deg": s.moon_shift_deg,
                "node_instant": _date(s.node_jd_tt, calendar),
                "source": s.source,
            }
        )
    return {
        "site": {
            "latitude_deg": observer.latitude_deg,
            "longitude_deg": observer.longitude_deg,
            "elevation_m": observer.elevation_m,
        },
        "span": {"from_year": first_year, "to_year": last_year},
        "horizon": "flat (altitude 0)" if horizon is None else (getattr(horizon, "source", "") or "profile"),
        "limb": limb,
        "refraction": observer.refraction,
        "band_deg": band_deg,
        "declination": "geocentric apparent, true equator of date; monthly extremes",
        "delta_t_effect": _DELTA_T_EFFECT,
        "seasons": rows,
    }


def _azimuth(value: float) -> str:
    return "   —   " if value != value else f"{value:7.2f}"


def _print_text(doc: dict) -> None:
    site, span = doc["site"], doc["span"]
    print(
        f"Lunar standstills {year_label(span['from_year'])} – {year_label(span['to_year'])} at "
        f"{site['latitude_deg']:g}°N {site['longitude_deg']:g}°E; horizon: {doc['horizon']}, limb: {doc['limb']}, "
        f"refraction: {doc['refraction'] or 'none'}"
    )
    if not doc["seasons"]:
        print("no mean-node instant (node at 0° or 180°) falls in this span; widen it (18.6-year cycle)")
        return
    print(f"season: months whose extreme declination is within {doc['band_deg']:g}° of the season's extreme\n")
    head = f"{'standstill':<12} {'season (UT)':<25} {'extreme (UT)':<17} {'decl.°':>8} {'rise az°':>8} {'set az°':>8}"
    print(head + f" {'ΔT s':>8} {'±σ s':>7} {'±Moon°':>6}")
    for row in doc["seasons"]:
        season = f"{row['season_start']['date']} – {row['season_end']['date']}"
        print(
            f"{row['kind'] + ' ' + row['direction']:<12} {season:<25} {row['extreme']['date']:<17} "
            f"{row['extreme_declination_deg']:8.3f} {_azimuth(row['moonrise_azimuth_deg']):>8} "
            f"{_azimuth(row['moonset_azimuth_deg']):>8} {row['delta_t_s']:8.0f} {row['delta_t_sigma_s']:7.0f} "
            f"{row['moon_shift_deg']:6.2f}"
        )
    calendars = sorted({row["extreme"]["calendar"] for row in doc["seasons"]})
    sources = sorted({row["source"] for row in doc["seasons"]})
    print(f"\ndates: {' and '.join(calendars)} calendar; Moon: {'; '.join(sources)}")
    print(f"declination: {doc['declination']}")
    print(f"ΔT: {doc['delta_t_effect']}")


def _span(args: argparse.Namespace) -> tuple[int, int]:
    first = year_from_label(args.first, what="--from")
    last = year_from_label(args.last, what="--to")
    if last < first:
        raise InputError(f"--to: year {year_label(last)} is before --from {year_label(first)}")
    if last - first + 1 > MAX_SPAN_YEARS:
        span = f"{year_label(first)}..{year_label(last)}"
        raise InputError(f"--to: the span {span} is longer than {MAX_SPAN_YEARS} years (give at most that many)")
    return first, last


def run(args: argparse.Namespace) -> int:
    """Run ``lightpath moon``; returns the exit code."""
    observer = observer_from_options(args)
    first, last = _span(args)
    horizon = None
    if args.horizon:
        from lightpath.sky.horizon import read_horizon_csv

        horizon = read_horizon_csv(args.horizon)
    doc = moon_document(
        first,
        last,
        observer,
        horizon=horizon,
        limb=args.limb,
        band_deg=args.band,
        source=args.source,
        calendar=args.calendar,
    )
    if args.json:
        print_json(doc)
    else:
        _print_text(doc)
    return 0
