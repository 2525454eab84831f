"""The keys a scene file may hold, and the checks every value goes through.

Every key is documented in ``docs/scene-format.md``.  Unknown tables or keys raise InputError suggesting the
nearest valid key (difflib's ratio, the Ratcliff/Obershelp "gestalt pattern matching").

>>> check_keys({"site": {"latitude": 1}}, "a.toml")
Traceback (most recent call last):
...
lightpath.errors.InputError: a.toml: unknown key 'site.latitude' (did you mean 'latitude_deg'?)
"""

from __future__ import annotations

import difflib
import math

from lightpath.errors import InputError

__all__ = [
    "SCHEMA",
    "REQUIRED",
    "TOLERANCE_KEYS",
    "boolean",
    "check_keys",
    "choice",
    "names",
    "number",
    "text",
    "vector3",
]

_SELECT = ("groups", "objects", "materials", "file", "box_min_m", "box_max_m", "polygon_m", "frame", "flip_normals")

#: Tolerance keys of the optional [tolerances] table: one-sigma survey uncertainties, all ≥ 0.
TOLERANCE_KEYS = {
    "opening_azimuth_deg": "azimuth of the opening's axis (turn of the structure about the vertical), degrees",
    "opening_tilt_deg": "tilt of the opening's axis (turn of the structure about a horizontal axis), degrees",
    "opening_position_m": "position of the opening relative to the target, metres (per axis)",
    "target_position_m": "position of the target relative to the opening, metres (per axis)",
    "horizon_altitude_deg": "altitude of the horizon profile, degrees",
    "temperature_c": "air temperature, degrees Celsius",
    "pressure_mbar": "air pressure, mbar",
    "refraction_deg": "anomalous refraction at the horizon, degrees (default 0.18, Sampson et al. 2003)",
    "epoch_years": "the building's date, years",
}

#: table -> allowed keys
SCHEMA: dict[str, tuple[str, ...]] = {
    "site": (
        "label",
        "latitude_deg",
        "longitude_deg",
        "crs",
        "easting_m",
        "northing_m",
        "elevation_m",
        "timezone",
        "survey_date",
    ),
    "model": (
        "file",
        "unit",
        "up_axis",
        "north_axis",
        "east_axis",
        "north",
        "declination_deg",
        "convergence_deg",
        "rotation_deg",
        "offset_m",
    ),
    "target": _SELECT,
    "opening": _SELECT,
    "horizon": (
        "kind",
        "file",
        "dip_deg",
        "eye_height_m",
        "groups",
        "objects",
        "materials",
        "from_m",
        "step_deg",
        "curvature",
        "files",
        "max_distance_m",
        "min_distance_m",
        "observer_height_m",
        "cache_dir",
        "north",
        "declination_deg",
    ),
    "atmosphere": ("temperature_c", "pressure_mbar", "refraction"),
    "tolerances": tuple(TOLERANCE_KEYS),
    "build": None,  # keys checked by lightpath.site.survey, per builder
}

#: table -> keys that must be present (tables site, model and target must be present; with [build]: site, build).
#: The site's position (latitude_deg and longitude_deg, or crs, easting_m and northing_m) is checked by
#: :func:`lightpath.scene.survey.site_from_table`.
REQUIRED = {"site": (), "model": ("file", "unit", "up_axis"), "target": ()}


def _suggest(word: str, options) -> str:
    close = difflib.get_close_matches(word, list(options), n=1, cutoff=0.5)
    return f" (did you mean {close[0]!r}?)" if close else f" (valid: {', '.join(options)})"


def check_keys(data: dict, where: str) -> None:
    """Reject unknown tables/keys and missing required ones, naming the file ``where``."""
    for table, body in data.items():
        if table not in SCHEMA:
            raise InputError(f"{where}: unknown table [{table}]{_suggest(table, SCHEMA)}")
        if not isinstance(body, dict):
            raise InputError(f"{where}: {table!r} must be a table [{table}], not a single value")
        if SCHEMA[table] is None:
            continue
        for key in body:
            if key not in SCHEMA[table]:
                raise InputError(f"{where}: unknown key '{table}.{key}'{_suggest(key, SCHEMA[table])}")
    required = dict(REQUIRED)
    if "build" in data:  # a built model: no [model]; target and opening default to the model's parts
        if "model" in data:
            raise InputError(f"{where}: give either [model] (a mesh file) or [build] (survey numbers), not both")
        required = {"site": REQUIRED["site"], "build": ("kind",)}
    for table, keys in required.items():
        if table not in data:
            raise InputError(f"{where}: missing table [{table}]")
        for key in keys:
            if key not in data[table]:
                raise InputError(f"{where}: missing key '{table}.{key}'")


def number(table: dict, key: str, where: str, default=None, low: float = -math.inf, high: float = math.inf):
    """A finite number in [low, high] (or ``default`` when absent)."""
    short = key.split(".")[-1]
    if short not in table:
        return default
    value = table[short]
    if isinstance(value, bool) or not isinstance(value, (int, float)) or not math.isfinite(value):
        raise InputError(f"{where}: '{key}' = {value!r} is not a finite number")
    if not low <= value <= high:
        raise InputError(f"{where}: '{key}' = {value!r} is outside {low:g}..{high:g}")
    return float(value)


def text(table: dict, key: str, where: str, default=None) -> str | None:
    """A string (or ``default`` when absent)."""
    short = key.split(".")[-1]
    if short not in table:
        return default
    value = table[short]
    if not isinstance(value, str):
        raise InputError(f"{where}: '{key}' = {value!r} must be a quoted string")
    return value


def choice(table: dict, key: str, where: str, options, default=None) -> str | None:
    """One of ``options`` (or ``default``)."""
    value = text(table, key, where, default)
    if value is not None and value not in options:
        raise InputError(f"{where}: '{key}' = {value!r} is not one of {', '.join(options)}")
    return value


def vector3(table: dict, key: str, where: str, default=None):
    """Three finite numbers (or ``default``)."""
    short = key.split(".")[-1]
    if short not in table:
        return default
    value = table[short]
    ok = isinstance(value, list) and len(value) == 3
    ok = ok and all(isinstance(v, (int, float)) and not isinstance(v, bool) and math.isfinite(v) for v in value)
    if not ok:
        raise InputError(f"{where}: '{key}' = {value!r} must be three finite numbers [east, north, up] in metres")
    return [float(v) for v in value]


def boolean(table: dict, key: str, where: str, default: bool) -> bool:
    """``true`` or ``false`` (or ``default`` when absent)."""
    short = key.split(".")[-1]
    if short not in table:
        return default
    value = table[short]
    if not isinstance(value, bool):
        raise InputError(f"{where}: '{key}' = {value!r} must be true or false (no quotes)")
    return value


def names(table: dict, key: str, where: str) -> list[str] | None:
    """A list of names (a single string is accepted as a list of one)."""
    short = key.split(".")[-1]
    if short not in table:
        return None
    value = table[short]
    if isinstance(value, str):
        value = [value]
    if not (isinstance(value, list) and value and all(isinstance(v, str) and v for v in value)):
        raise InputError(f"{where}: '{key}' must be a non-empty list of names, e.g. [\"backstone\"]")
    return value
