"""Helpers shared by the subcommands: site parsing, JSON output, progress bars."""

from __future__ import annotations

import argparse
import contextlib
import json
import math
import sys
from collections.abc import Iterator
from pathlib import Path
from typing import Any

import numpy as np

from lightpath.errors import InputError
from lightpath.present.tables import settings_line

#: Where sky windows are cached unless --cache or --no-cache says otherwise.
DEFAULT_CACHE = Path.home() / ".cache" / "lightpath"

__all__ = [
    "DEFAULT_CACHE",
    "add_air_options",
    "add_engine_options",
    "engine_options",
    "add_output_options",
    "observer_from_options",
    "parse_site",
    "print_json",
    "progress_bar",
    "settings_line",
    "to_jsonable",
]


def parse_site(text: str, option: str = "--site") -> tuple[float, float, float]:
    """``"LAT,LON[,ELEV_M]"`` → (latitude_deg, longitude_deg, elevation_m), checked.

    Latitude and longitude are decimal degrees or degrees-minutes-seconds with a hemisphere letter
    (:mod:`lightpath.sky.angles`).

    >>> parse_site("51.2,-1.8,120")
    (51.2, -1.8, 120.0)
    >>> parse_site("41°37'12 N, 8 03 00 W")
    (41.62, -8.05, 0.0)
    """
    from lightpath.sky.angles import parse_angle_deg

    parts = [p.strip() for p in str(text).split(",")]
    if len(parts) not in (2, 3):
        raise InputError(f"{option}: {text!r} is not LAT,LON[,ELEV_M] (degrees, degrees east, metres)")
    lat = parse_angle_deg(parts[0], kind="latitude", name=f"{option}: latitude")
    lon = parse_angle_deg(parts[1], kind="longitude", name=f"{option}: longitude")
    try:
        elev = float(parts[2]) if len(parts) == 3 else 0.0
    except ValueError:
        raise InputError(
            f"{option}: {text!r} is not LAT,LON[,ELEV_M]: the elevation is not a number of metres"
        ) from None
    if not math.isfinite(elev):
        raise InputError(f"{option}: {text!r} has a non-finite elevation")
    if not -500.0 <= elev <= 9000.0:
        raise InputError(f"{option}: elevation {elev:g} m is outside -500..9000 m")
    return lat, lon, elev


def add_air_options(parser: argparse.ArgumentParser, no_refraction_help: str) -> None:
    """``--temperature``, ``--pressure`` and ``--no-refraction`` for commands that take ``--site``."""
    parser.add_argument("--temperature", type=float, default=10.0, metavar="C", help="air temperature (default 10 °C)")
    parser.add_argument("--pressure", type=float, default=1010.0, metavar="MBAR", help="air pressure (default 1010)")
    parser.add_argument("--no-refraction", action="store_true", help=no_refraction_help)


def observer_from_options(args: argparse.Namespace):
    """An :class:`~lightpath.sky.observer.Observer` from ``--site`` and the air options, each checked."""
    from lightpath.sky.observer import Observer

    lat, lon, elev = parse_site(args.site)
    for option, value in (("--temperature", args.temperature), ("--pressure", args.pressure)):
        if not math.isfinite(value):
            raise InputError(f"{option}: {value!r} is not a finite number")
    try:
        return Observer(
            latitude_deg=lat,
            longitude_deg=lon,
            elevation_m=elev,
            temperature_c=float(args.temperature),
            pressure_mbar=float(args.pressure),
            refraction=None if args.no_refraction else "bennett1982",
        )
    except InputError as exc:
        option = "--pressure" if str(exc).startswith("pressure") else "--temperature"
        raise InputError(f"{option}: {exc}") from None


def add_output_options(parser: argparse.ArgumentParser) -> None:
    """``--json`` and ``--quiet``, the same for every command."""
    parser.add_argument("--json", action="store_true", help="print machine-readable JSON on standard output")
    parser.add_argument("--quiet", action="store_true", help="no progress bars or notices")


def to_jsonable(value: Any) -> Any:
    """numpy scalars and arrays, dataclasses and non-finite floats → plain JSON values (nan → null)."""
    import dataclasses

    if dataclasses.is_dataclass(value) and not isinstance(value, type):
        return {k: to_jsonable(v) for k, v in dataclasses.asdict(value).items()}
    if isinstance(value, dict):
        return {str(k): to_jsonable(v) for k, v in value.items()}
    if isinstance(value, (list, tuple)):
        return [to_jsonable(v) for v in value]
    if isinstance(value, np.ndarray):
        return [to_jsonable(v) for v in value.tolist()]
    if isinstance(value, np.generic):
        value = value.item()
    if isinstance(value, float) and not math.isfinite(value):
        return None
    return value


def print_json(value: Any) -> None:
    """Print ``value`` as indented JSON on standard output."""
    json.dump(to_jsonable(value), sys.stdout, indent=2, ensure_ascii=False)
    sys.stdout.write("\n")


@contextlib.contextmanager
def progress_bar(description: str, total: int, quiet: bool = False) -> Iterator[Any]:
    """A rich progress bar on standard error; yields ``advance(n=1)``. Silent when ``quiet``.

    >>> with progress_bar("work", 3, quiet=True) as advance:
    ...     for _ in range(3):
    ...         advance()
    """
    if quiet or total <= 0:
        yield lambda n=1: None
        return
    from rich.console import Console
    from rich.progress import BarColumn, Progress, TextColumn, TimeElapsedColumn, TimeRemainingColumn

    console = Console(stderr=True)
    columns = (
        TextColumn("{task.description}"),
        BarColumn(),
        TextColumn("{task.completed}/{task.total}"),
        TimeElapsedColumn(),
        TimeRemainingColumn(),
    )
    with Progress(*columns, console=console, transient=True) as progress:
        task = progress.add_task(description, total=total)
        yield lambda n=1: progress.advance(task, n)


def add_engine_options(
    parser: argparse.ArgumentParser, *, divisions: bool = True, seed_help: str = "seed of the target sampling"
) -> None:
    """The engine's settings as options, the same names and defaults in every command.

    Defaults come from :class:`lightpath.light.options.WindowOptions` and
    :class:`lightpath.light.options.ScanOptions` (written there once).
    """
    from lightpath.light.disc import CRITERIA
    from lightpath.light.options import ScanOptions, WindowOptions
    from lightpath.sky.divisions import SCHEMES

    w, o = WindowOptions(), ScanOptions()
    if divisions:
        parser.add_argument("--parts", type=int, default=o.parts, metavar="N",
                            help=f"divisions of the year, 2..64 (default {o.parts})")  # fmt: skip
        parser.add_argument("--scheme", choices=SCHEMES, default=o.scheme,
                            help=f"how the year is divided (default {o.scheme})")  # fmt: skip
    parser.add_argument("--criterion", choices=tuple(CRITERIA), default=o.criterion,
                        help=f"when a target sample is lit (default {o.criterion})")  # fmt: skip
    parser.add_argument("--samples", type=int, default=w.samples, metavar="K",
                        help=f"target samples, 1..1000000 (default {w.samples})")  # fmt: skip
    parser.add_argument("--seed", type=int, default=w.seed, help=f"{seed_help} (default {w.seed})")
    parser.add_argument("--resolution", type=float, default=w.resolution_deg, metavar="DEG",
                        help=f"sky window cell, 0.01..1 degrees (default {w.resolution_deg:g})")  # fmt: skip
    parser.add_argument("--source", choices=("auto", "jpl", "vsop87"), default=o.source,
                        help="ephemeris: JPL DE421 (1900-2050); beyond, VSOP87 for the Sun and the long-term "
                        "lunar theory for the Moon (default auto: DE421 where it covers)")  # fmt: skip
    parser.add_argument("--delta-t", type=float, default=None, metavar="S", help="a fixed ΔT in seconds")
    parser.add_argument("--calendar", choices=("auto", "julian", "gregorian"), default=o.calendar,
                        help="calendar of the dates shown (default: Julian before 1582-10-15)")  # fmt: skip
    parser.add_argument("--body", choices=("sun", "moon"), default=o.body,
                        help=f"whose light reaches the target (default {o.body})")  # fmt: skip
    parser.add_argument("--sun-below", type=float, default=o.sun_below_deg, metavar="DEG",
                        help=f"moonlight only with the Sun below DEG -18..0 (default {o.sun_below_deg:g})")  # fmt: skip
    parser.add_argument("--min-fraction", type=float, default=o.min_illuminated_fraction, metavar="F",
                        help="moonlight only while the Moon is at least F illuminated, 0..1 (default 0)")  # fmt: skip
    cache = parser.add_mutually_exclusive_group()
    cache.add_argument("--cache", metavar="DIR", default=None, help=f"window cache folder (default {DEFAULT_CACHE})")
    cache.add_argument("--no-cache", action="store_true", help="do not read or write a window cache")


def engine_options(args: argparse.Namespace):
    """(WindowOptions, ScanOptions) from the options of :func:`add_engine_options`, checked.

    A bad value is reported with the option's name.
    """
    from dataclasses import replace

    from lightpath.light.options import ScanOptions, WindowOptions

    cache_dir = None if args.no_cache else Path(args.cache) if args.cache else DEFAULT_CACHE
    if cache_dir is not None and cache_dir.exists() and not cache_dir.is_dir():
        raise InputError(f"--cache: {cache_dir} is a file, not a folder")
    if args.delta_t is not None and not (math.isfinite(args.delta_t) and abs(args.delta_t) <= 1e6):
        raise InputError("--delta-t: not a number of seconds in -1000000..1000000")
    flags = {"samples": "--samples", "seed": "--seed", "resolution_deg": "--resolution", "parts": "--parts",
             "delta_t_s": "--delta-t", "body": "--body", "sun_below_deg": "--sun-below",
             "min_illuminated_fraction": "--min-fraction"}  # fmt: skip
    try:
        w = WindowOptions(int(args.samples), int(args.seed), float(args.resolution), cache_dir).check()
        o = ScanOptions(criterion=args.criterion, source=args.source, delta_t_s=args.delta_t, calendar=args.calendar,
                        body=args.body, sun_below_deg=float(args.sun_below),
                        min_illuminated_fraction=float(args.min_fraction))  # fmt: skip
        if hasattr(args, "parts"):
            o = replace(o, scheme=args.scheme, parts=int(args.parts))
        o.check()
        w = w.for_body(o.body)
    except InputError as exc:
        name, _, rest = str(exc).partition(":")
        raise InputError(f"{flags.get(name, name)}:{rest}") from None
    return w, o
