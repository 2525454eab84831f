"""A scene's ``[build]`` table: a chamber built from tape, compass and clinometer numbers instead of a mesh.

Instead of ``[model]`` a scene file may hold ``[build]``: the builder's name, the opening's measured bearing
with its north reference, and the builder's numbers (nested tables for the chamber, slot, bend, niche…).
The target and opening are then the model's own parts, unless ``[target]``/``[opening]`` say otherwise.

>>> model = model_from_build({"kind": "window_room", "bearing_deg": 90.0, "north": "magnetic",
...                           "declination_deg": -2.0, "depth_m": 5.0}, "a.toml")
>>> model.axis_azimuth_deg, model.survey["depth_m"]
(88.0, 5.0)
"""

from __future__ import annotations

import difflib
import math

import numpy as np

from lightpath.errors import InputError
from lightpath.site.builders import Bend, Chamber, passage_chamber
from lightpath.site.frames import NORTH_REFERENCES, true_azimuth_deg
from lightpath.site.meshes import NAME_KINDS, LabeledMesh
from lightpath.site.parts import Slot
from lightpath.site.rooms import Niche, slit_shrine, window_room

__all__ = ["BUILD_KINDS", "BUILD_KEYS", "labeled_from_model", "model_from_build"]

_COMMON = ("kind", "bearing_deg", "north", "declination_deg", "convergence_deg")
_SLOT = ("width_m", "height_m", "sill_m")

#: builder name -> {key: None for a number, or a tuple of nested keys for a nested table}
BUILD_KEYS: dict[str, dict[str, tuple[str, ...] | None]] = {
    "passage_chamber": {
        "floor_slope_deg": None,
        "length_m": None,
        "width_m": None,
        "height_m": None,
        "wall_m": None,
        "lintel_m": None,
        "door_closed": None,
        "chamber": ("depth_m", "width_m", "height_m", "backstone"),
        "slot": _SLOT,
        "bend": ("at_m", "angle_deg"),
    },
    "slit_shrine": {"depth_m": None, "width_m": None, "height_m": None, "rock_m": None, "slit": _SLOT, "image": None},
    "window_room": {
        "depth_m": None,
        "width_m": None,
        "height_m": None,
        "wall_m": None,
        "window": _SLOT,
        "niche": ("width_m", "height_m", "depth_m", "sill_m"),
    },
}
#: builders a [build] table can name
BUILD_KINDS = tuple(BUILD_KEYS)
_REQUIRED = {"passage_chamber": ("floor_slope_deg", "length_m", "width_m", "height_m")}
_NESTED = {"chamber": Chamber, "slot": Slot, "bend": Bend, "slit": Slot, "window": Slot, "niche": Niche}


def _unknown(where: str, key: str, options) -> InputError:
    close = difflib.get_close_matches(key.split(".")[-1], list(options), n=1, cutoff=0.5)
    hint = f" (did you mean {close[0]!r}?)" if close else f" (valid: {', '.join(options)})"
    return InputError(f"{where}: unknown key '{key}'{hint}")


def _value(value, key: str, where: str):
    if isinstance(value, bool):
        return value
    if isinstance(value, (int, float)) and math.isfinite(value):
        return float(value)
    if isinstance(value, list) and len(value) == 4 and all(isinstance(v, (int, float)) for v in value):
        return tuple(float(v) for v in value)
    raise InputError(f"{where}: '{key}' = {value!r} is not a finite number")


def model_from_build(table: dict, where: str):
    """The :class:`~lightpath.site.builders.ChamberModel` a ``[build]`` table describes (ENU metres).

    ``bearing_deg`` is the direction the opening looks out to, measured from the reference ``north``
    (``true``, ``magnetic`` with ``declination_deg`` east positive, or ``grid`` with ``convergence_deg``).
    Raises InputError naming the file and key for anything wrong.
    """
    kind = table.get("kind")
    if kind not in BUILD_KEYS:
        raise InputError(f"{where}: 'build.kind' = {kind!r} is not one of {', '.join(BUILD_KINDS)}")
    allowed = BUILD_KEYS[kind]
    for key in table:
        if key not in _COMMON and key not in allowed:
            raise _unknown(where, f"build.{key}", (*_COMMON, *allowed))
    for key in ("bearing_deg", *_REQUIRED.get(kind, ())):
        if key not in table:
            raise InputError(f"{where}: missing key 'build.{key}'")
    north = table.get("north")
    if north is None:
        raise InputError(f"{where}: missing key 'build.north' (true, magnetic or grid: what the bearing is from)")
    if north not in NORTH_REFERENCES:
        raise InputError(f"{where}: 'build.north' = {north!r} is not one of {', '.join(NORTH_REFERENCES)}")
    need = {"magnetic": "declination_deg", "grid": "convergence_deg"}.get(north)
    if need and need not in table:
        raise InputError(f"{where}: missing key 'build.{need}' (build.north is {north!r})")
    for other in ("declination_deg", "convergence_deg"):
        if other in table and other != need:
            raise InputError(f"{where}: 'build.{other}' is given but build.north is {north!r}")
    bearing = _value(table["bearing_deg"], "build.bearing_deg", where)
    turn = {k: _value(table[k], f"build.{k}", where) for k in ("declination_deg", "convergence_deg") if k in table}
    azimuth = float(true_azimuth_deg(bearing, north, **turn))
    kwargs = {}
    for key, nested in allowed.items():
        if key not in table:
            continue
        value = table[key]
        if nested is None:
            kwargs[key] = _value(value, f"build.{key}", where)
        elif value is False and key == "chamber":
            kwargs[key] = None  # a passage closed by an end wall
        elif isinstance(value, dict):
            for sub in value:
                if sub not in nested:
                    raise _unknown(where, f"build.{key}.{sub}", nested)
            parts = {sub: _value(v, f"build.{key}.{sub}", where) for sub, v in value.items()}
            try:
                kwargs[key] = _NESTED[key](**parts)
            except TypeError as exc:
                raise InputError(f"{where}: 'build.{key}' is incomplete ({exc})") from None
        else:
            raise InputError(f"{where}: 'build.{key}' must be a table of {', '.join(nested)}")
    builder = {"passage_chamber": passage_chamber, "slit_shrine": slit_shrine, "window_room": window_room}[kind]
    try:
        return builder(azimuth, **kwargs)
    except ValueError as exc:
        raise InputError(f"{where}: [build] {exc}") from None


def labeled_from_model(model, where: str = "") -> LabeledMesh:
    """All parts of a built model as one :class:`~lightpath.site.meshes.LabeledMesh`; each part's name is
    both its group and its object name.

    >>> from lightpath.site.rooms import window_room
    >>> sorted(labeled_from_model(window_room(90.0)).names["group"])
    ['floor', 'roof', 'target', 'walls', 'window']
    """
    vertices, faces, names = [], [], {kind: {} for kind in NAME_KINDS}
    v_off = f_off = 0
    for name, mesh in model.parts.items():
        vertices.append(np.asarray(mesh.vertices, dtype=float))
        faces.append(np.asarray(mesh.faces, dtype=np.int64) + v_off)
        idx = np.arange(f_off, f_off + len(mesh.faces))
        names["group"][name] = names["object"][name] = idx
        v_off += len(mesh.vertices)
        f_off += len(mesh.faces)
    return LabeledMesh(np.concatenate(vertices), np.concatenate(faces), names, where or f"<{model.kind}>")
