"""Helpers shared by the subcommands: site parsing, JSON output, progress bars."""

from __future__ import annotations

import argparse
import contextlib
import json
import math
import sys
from collections.abc import Iterator
from typing import Any

import numpy as np

from lightpath.errors import InputError

__all__ = [
    "add_air_options",
    "add_output_options",
    "observer_from_options",
    "parse_site",
    "print_json",
    "progress_bar",
    "to_jsonable",
]


def parse_site(text: str, option: str = "--site") -> tuple[float, float, float]:
    """``"LAT,LON[,ELEV_M]"`` → (latitude_deg, longitude_deg, elevation_m), checked.

    >>> parse_site("51.2,-1.8,120")
    (51.2, -1.8, 120.0)
    """
    parts = [p.strip() for p in str(text).split(",")]
    if len(parts) not in (2, 3):
        raise InputError(f"{option}: {text!r} is not LAT,LON[,ELEV_M] (degrees, degrees east, metres)")
    try:
        values = [float(p) for p in parts]
    except ValueError:
        raise InputError(f"{option}: {text!r} is not LAT,LON[,ELEV_M] in numbers") from None
    lat, lon = values[0], values[1]
    elev = values[2] if len(values) == 3 else 0.0
    if not all(math.isfinite(v) for v in values):
        raise InputError(f"{option}: {text!r} has a non-finite number")
    if not -90.0 <= lat <= 90.0:
        raise InputError(f"{option}: latitude {lat:g} is outside -90..90 degrees")
    if not -180.0 <= lon <= 180.0:
        raise InputError(f"{option}: longitude {lon:g} is outside -180..180 degrees (east positive)")
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
