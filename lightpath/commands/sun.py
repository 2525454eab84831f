"""``lightpath sun``: where the Sun stands, seen from a site, at one instant or over a run of instants.

Examples (shell)::

    lightpath sun --site=-29.861,22.814,1183 --at "1500 BC-02-16T18:00 LAT"
    lightpath sun --site 38.947,-98.412 --at 2027-03-20T12:00 --to 2027-03-20T14:00 --step 10 --json

A table by default; ``--json`` prints one object per instant (a list when ``--to`` is given).
"""

from __future__ import annotations

import argparse
import json
import math
import os
import sys

import numpy as np
from numpy.typing import ArrayLike

from lightpath.commands._common import (
    add_air_options,
    add_output_options,
    observer_from_options,
    progress_bar,
)
from lightpath.errors import InputError
from lightpath.sky import deltat
from lightpath.sky.calendar import CALENDARS, calendar_for, format_date
from lightpath.sky.instants import format_instant, format_time_of_day, parse_instant, resolve_instant, tt_from_lat
from lightpath.sky.observer import Observer

__all__ = ["HELP", "MAX_ROWS", "NAME", "add_arguments", "run", "sun_rows"]

NAME = "sun"
HELP = "the Sun's azimuth and altitude seen from a site at given instants, with ΔT and local apparent time"

#: Largest number of instants one run may ask for (--to / --step).
MAX_ROWS = 1_000_000

_CHUNK = 100_000

# (JSON key, table heading, format) for the table; the JSON carries more keys.
_COLUMNS = (
    ("ut", "UT", "{}"),
    ("local_apparent_time", "LAT", "{}"),
    ("azimuth_deg", "azimuth°", "{:9.4f}"),
    ("altitude_deg", "altitude°", "{:9.4f}"),
    ("altitude_geometric_deg", "geom.alt°", "{:9.4f}"),
    ("declination_deg", "decl.°", "{:8.4f}"),
    ("equation_of_time_min", "EoT min", "{:7.2f}"),
    ("delta_t_s", "ΔT s", "{:9.1f}"),
    ("delta_t_sigma_s", "±σ s", "{:7.1f}"),
)


def add_arguments(parser: argparse.ArgumentParser) -> None:
    """Options of ``lightpath sun``."""
    parser.add_argument("--site", required=True, metavar="LAT,LON[,ELEV_M]", help="degrees north, degrees east, metres")
    parser.add_argument(
        "--at",
        required=True,
        metavar="INSTANT",
        help="e.g. 2027-02-03T07:40 (UT), 2027-02-03T09:40+02:00, '1500 BC-02-16T18:00 LAT', JD2451545.0, JDE2451545.0",
    )
    parser.add_argument("--to", metavar="INSTANT", help="last instant of a run from --at (same forms as --at)")
    parser.add_argument("--step", type=float, metavar="MINUTES", help="spacing of a run (default 60 minutes)")
    add_air_options(parser, "geometric altitudes only (no refraction)")
    parser.add_argument(
        "--calendar",
        choices=CALENDARS,
        default="auto",
        help="how dates are read and shown (default auto: Julian before 1582-10-15, Gregorian after)",
    )
    parser.add_argument("--ephemeris", metavar="PATH", help="a JPL .bsp kernel to use instead of the default source")
    parser.add_argument("--delta-t", type=float, metavar="SECONDS", help="use this ΔT (TT − UT1) for every instant")
    add_output_options(parser)


def _observer(args: argparse.Namespace) -> Observer:
    return observer_from_options(args)


def _source(args: argparse.Namespace) -> str:
    if not args.ephemeris:
        return "auto"
    path = os.path.expanduser(args.ephemeris)
    if not os.path.isfile(path):
        raise InputError(f"--ephemeris: file {args.ephemeris!r} not found (give a JPL .bsp kernel, e.g. de440s.bsp)")
    return path


def _instants(args: argparse.Namespace, observer: Observer, source: str) -> np.ndarray:
    """JD TT of every instant asked for, spaced evenly on the scale --at is written in."""
    delta = args.delta_t
    if delta is not None and not math.isfinite(delta):
        raise InputError(f"--delta-t: {delta!r} is not a finite number of seconds")
    start = parse_instant(args.at, args.calendar, what="--at")
    start_tt = resolve_instant(start, observer, source=source, delta_t_s=delta)
    if args.to is None:
        if args.step is not None:
            raise InputError("--step: needs --to (the last instant of the run)")
        return np.array([start_tt])
    step_min = 60.0 if args.step is None else float(args.step)
    if not (math.isfinite(step_min) and step_min > 0.0):
        raise InputError(f"--step: {args.step!r} is not a positive number of minutes")
    end = parse_instant(args.to, args.calendar, what="--to")
    end_tt = resolve_instant(end, observer, source=source, delta_t_s=delta)
    if end_tt < start_tt:
        raise InputError(f"--to: {args.to!r} comes before --at {args.at!r}")
    step_days = step_min / 1440.0
    # Count the steps on the scale --at is written in (ΔT drifts, so a TT span differs from a UT one).
    if end.scale == start.scale:
        span_days = end.jd - start.jd
    elif start.scale == "UT":
        span_days = float(deltat.ut_from_tt(end_tt, delta)) - start.jd
    else:  # TT, or LAT (whose rate differs from TT's by the drift of the equation of time, < 1 min/day)
        span_days = end_tt - start_tt
    count = math.floor(span_days / step_days + 1e-6) + 1
    if count > MAX_ROWS:
        raise InputError(
            f"--step: {count:,} instants from --at to --to at {step_min:g} minutes; at most {MAX_ROWS:,} "
            "(use a larger --step or a shorter run)"
        )
    grid = start.jd + step_days * np.arange(count)
    if start.scale == "TT":
        return grid
    if start.scale == "UT":
        return np.asarray(deltat.tt_from_ut(grid, delta), dtype=np.float64)
    return np.asarray(tt_from_lat(grid, observer, source=source, delta_t_s=delta), dtype=np.float64)


def _plain(values: np.ndarray) -> list:
    """Floats as a list, with nan as None (JSON null)."""
    out = values.tolist()
    if not np.isfinite(values).all():
        out = [v if math.isfinite(v) else None for v in out]
    return out


def _fixed_source(jd_tt: np.ndarray, source: str) -> str:
    """One Sun source for the whole run (``"auto"`` would otherwise be decided chunk by chunk)."""
    from lightpath.sky.sources import choose_source

    chosen = choose_source(jd_tt, source)
    return "vsop87" if chosen.kind == "vsop87" else str(chosen.path)


def _row_chunks(jd_tt: np.ndarray, observer: Observer, source: str, calendar: str, delta_t_s, advance=None):
    """Rows (dicts with the keys ``lightpath sun --json`` prints), ``_CHUNK`` instants at a time.

    ``source`` must already be fixed for the whole run (see :func:`_fixed_source`)."""
    from lightpath.sky.sun import sun_position

    for lo in range(0, len(jd_tt), _CHUNK):
        part = jd_tt[lo : lo + _CHUNK]
        pos = sun_position(part, observer, source=source, delta_t_s=delta_t_s)
        jd_ut = np.asarray(pos.jd_ut, dtype=np.float64)
        uncertain = np.asarray(deltat.ut_date_uncertain(part))
        if delta_t_s is not None:
            uncertain = np.zeros(part.shape, dtype=bool)  # the user fixed ΔT
        lat_text = format_time_of_day(np.asarray(pos.local_apparent_time_h) / 24.0, seconds=True)
        dates = format_date(jd_ut, calendar)
        # Local apparent date: UT + longitude/15° + equation of time (Meeus 1998 ch. 28).
        jd_lat = jd_ut + observer.longitude_deg / 360.0 + np.asarray(pos.equation_of_time_min) / 1440.0
        lat_dates = format_date(jd_lat, calendar)
        ut_text = format_instant(jd_ut, calendar)
        used = calendar_for(jd_ut, calendar)
        columns = {
            "jd_tt": part,
            "jd_ut": jd_ut,
            "delta_t_s": pos.delta_t_s,
            "delta_t_sigma_s": pos.delta_t_sigma_s,
            "azimuth_deg": pos.azimuth_deg,
            "altitude_deg": pos.altitude_deg,
            "altitude_geometric_deg": pos.altitude_geometric_deg,
            "declination_deg": pos.declination_deg,
            "right_ascension_deg": pos.right_ascension_deg,
            "hour_angle_deg": pos.hour_angle_deg,
            "equation_of_time_min": pos.equation_of_time_min,
            "distance_au": pos.distance_au,
            "semidiameter_deg": pos.semidiameter_deg,
        }
        columns = {k: _plain(np.broadcast_to(np.asarray(v, dtype=np.float64), part.shape)) for k, v in columns.items()}
        rows = []
        for i in range(len(part)):
            row = {k: v[i] for k, v in columns.items()}
            row["ut"] = str(ut_text[i])
            row["local_apparent_time"] = str(lat_text[i])
            row["date"] = str(dates[i])
            row["local_apparent_date"] = str(lat_dates[i])
            row["calendar"] = str(used[i])
            row["source"] = str(pos.source)
            row["ut_date_uncertain"] = bool(uncertain[i])
            rows.append(row)
        if advance is not None:
            advance(len(part))
        yield rows


def sun_rows(jd_tt: ArrayLike, observer: Observer, source: str = "auto", calendar: str = "auto", delta_t_s=None):
    """One dict per instant (JD TT) with the keys ``lightpath sun --json`` prints.

    Angles in degrees, the equation of time in minutes, ΔT and σ in seconds; one Sun
    source for all instants.
    """
    jd = np.atleast_1d(np.asarray(jd_tt, dtype=np.float64))
    fixed = _fixed_source(jd, source)
    return [row for chunk in _row_chunks(jd, observer, fixed, calendar, delta_t_s) for row in chunk]


def _table_header(first: dict, observer: Observer) -> str:
    lat, lon = observer.latitude_deg, observer.longitude_deg
    refraction = "none" if observer.refraction is None else "Bennett (1982)"
    return (
        f"site {abs(lat):.5f}°{'N' if lat >= 0 else 'S'} {abs(lon):.5f}°{'E' if lon >= 0 else 'W'} "
        f"{observer.elevation_m:g} m; Sun source {first['source']}; refraction {refraction}; "
        f"dates in the {first['calendar']} calendar (UT date)\n"
    )


def _write_table(chunks, observer: Observer, args: argparse.Namespace) -> None:
    out = sys.stdout
    heads = [head for _, head, _ in _COLUMNS]
    widths = None
    uncertain = False
    for rows in chunks:
        cells = [[fmt.format(r[key]) if r[key] is not None else "nan" for key, _, fmt in _COLUMNS] for r in rows]
        if widths is None:  # column widths from the first chunk
            out.write(_table_header(rows[0], observer))
            widths = [max(len(h), *(len(c[i]) for c in cells)) for i, h in enumerate(heads)]
            out.write("  ".join(h.rjust(w) for h, w in zip(heads, widths, strict=True)) + "\n")
        for c in cells:
            out.write("  ".join(v.rjust(w) for v, w in zip(c, widths, strict=True)) + "\n")
        uncertain = uncertain or any(r["ut_date_uncertain"] for r in rows)
    if args.delta_t is not None:
        out.write(f"ΔT fixed at {args.delta_t:g} s by --delta-t\n")
    else:
        out.write(f"ΔT: {deltat.DELTA_T_SOURCE}\n")
        if uncertain:
            out.write(
                "note: for some rows UT ± 2σ of ΔT straddles a midnight UT, so their UT date is uncertain "
                "(ut_date_uncertain); local apparent time (LAT) is not affected\n"
            )


def _write_json(chunks, single: bool) -> None:
    out = sys.stdout
    if single:
        json.dump(next(iter(chunks))[0], out, indent=2, ensure_ascii=False, allow_nan=False)
        out.write("\n")
        return
    out.write("[")
    sep = "\n"
    for rows in chunks:
        for row in rows:
            out.write(sep)
            out.write(json.dumps(row, ensure_ascii=False, allow_nan=False))
            sep = ",\n"
    out.write("\n]\n")


def run(args: argparse.Namespace) -> int:
    """Run ``lightpath sun``; returns the exit code."""
    observer = _observer(args)
    source = _source(args)
    jd_tt = _instants(args, observer, source)
    source = _fixed_source(jd_tt, source)  # checks the span before anything is written
    total = len(jd_tt) if len(jd_tt) > _CHUNK else 0
    with progress_bar("Sun positions", total, quiet=args.quiet) as advance:
        chunks = _row_chunks(jd_tt, observer, source, args.calendar, args.delta_t, advance)
        if args.json:
            _write_json(chunks, single=args.to is None)
        else:
            _write_table(chunks, observer, args)
    return 0
