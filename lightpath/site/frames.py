"""From a mesh file's own coordinates to the site frame: East-North-Up, metres.

The transform is, in this order:

1. scale by the file's unit (m, cm, mm, ft, in → metres);
2. turn the file's axes into ENU: the file's *up axis* becomes Up, its *north axis* (the axis pointing to the
   reference north) becomes North, East = North × Up (right-handed; a mirrored file names its ``east_axis``);
3. turn about Up so that the reference north becomes true north, then by any extra ``rotation_deg``:
   every azimuth grows by ``declination_deg`` (magnetic north; east positive), ``convergence_deg`` (grid north;
   the true azimuth of grid north, east positive) and ``rotation_deg`` (clockwise seen from above);
4. add ``offset_m`` (East, North, Up metres).

Magnetic declination follows the navigator's rule: true bearing = magnetic bearing + declination (east
positive), so a compass bearing of 100° with 5° E declination is true azimuth 105° (common practice, no
published source).  Grid convergence here is the angle from true north clockwise to grid north, so true
azimuth = grid bearing + convergence; for a Transverse Mercator grid it is ≈ (λ − λ₀)·sin φ, positive east of
the central meridian in the northern hemisphere (Snyder 1987, eq. 8-15 to first order, from memory).

>>> T = model_to_site_matrix("mm", up_axis="y", north_axis="-z")
>>> (T[:3, :3] @ [0.0, 1000.0, 0.0]).round(9).tolist()   # 1000 mm up the file's y axis is 1 m Up
[0.0, 0.0, 1.0]

References
----------
Snyder, J. P. (1987). *Map Projections — A Working Manual*, USGS Professional Paper 1395, ch. 8.
Bowditch, N. (2002). *The American Practical Navigator*, Pub. No. 9, ch. 1 (variation: east is added).
"""

from __future__ import annotations

import math

import numpy as np

from lightpath.errors import InputError

__all__ = [
    "AXES",
    "NORTH_REFERENCES",
    "UNIT_TO_M",
    "axis_vector",
    "axes_matrix",
    "default_north_axis",
    "north_turn_deg",
    "azimuth_turn_matrix",
    "model_to_site_matrix",
    "true_azimuth_deg",
    "apply_transform",
]

#: Length units accepted for mesh files, and metres per unit (international foot and inch, 1959).
UNIT_TO_M = {"m": 1.0, "cm": 0.01, "mm": 0.001, "ft": 0.3048, "in": 0.0254}

#: Axis names accepted for ``up_axis``, ``north_axis`` and ``east_axis``.
AXES = ("x", "y", "z", "+x", "+y", "+z", "-x", "-y", "-z")

#: What the model's north axis points at.
NORTH_REFERENCES = ("true", "magnetic", "grid")


def axis_vector(name: str, key: str = "axis") -> np.ndarray:
    """``"x"``, ``"+y"``, ``"-z"``… → a unit vector in the file's coordinates.

    >>> axis_vector("-z").tolist()
    [0.0, 0.0, -1.0]
    """
    text = str(name).strip().lower()
    if text not in AXES:
        raise InputError(f"{key}: {name!r} is not one of {', '.join(AXES)}")
    sign = -1.0 if text.startswith("-") else 1.0
    v = np.zeros(3)
    v["xyz".index(text[-1])] = sign
    return v


def default_north_axis(up_axis: str) -> str:
    """The file axis taken as north when the scene names none: ``+y`` for z-up files, ``-z`` for y-up files
    (the glTF convention: +y up, +x east, so north = up × east = −z) and ``+z`` for x-up files.

    >>> default_north_axis("z"), default_north_axis("y"), default_north_axis("x")
    ('+y', '-z', '+z')
    """
    axis = str(up_axis).strip().lower().lstrip("+-")
    return {"z": "+y", "y": "-z", "x": "+z"}.get(axis, "+y")


def axes_matrix(up_axis: str, north_axis: str, east_axis: str | None = None) -> np.ndarray:
    """3×3 matrix taking file coordinates to ENU (rows: the file-coordinates of East, North, Up).

    ``east_axis`` may be given to check handedness: if it is the opposite of north × up, the file is mirrored
    and the matrix is a reflection (determinant −1; the loader then reverses the face winding).

    >>> axes_matrix("z", "y").tolist()
    [[1.0, 0.0, 0.0], [0.0, 1.0, 0.0], [0.0, 0.0, 1.0]]
    >>> axes_matrix("y", "-z").tolist()   # glTF: +y up, -z north, +x east
    [[1.0, 0.0, 0.0], [0.0, 0.0, -1.0], [0.0, 1.0, 0.0]]
    """
    up = axis_vector(up_axis, "model.up_axis")
    north = axis_vector(north_axis, "model.north_axis")
    if abs(float(up @ north)) > 0.5:
        raise InputError(f"model.north_axis: {north_axis!r} is parallel to model.up_axis {up_axis!r}")
    east = np.cross(north, up)
    if east_axis is not None:
        given = axis_vector(east_axis, "model.east_axis")
        if np.allclose(given, -east):
            east = given  # mirrored (left-handed) file
        elif not np.allclose(given, east):
            raise InputError(f"model.east_axis: {east_axis!r} is not perpendicular to up and north axes")
    return np.vstack([east, north, up]) + 0.0  # + 0.0 turns -0.0 into 0.0


def azimuth_turn_matrix(delta_deg: float) -> np.ndarray:
    """3×3 ENU rotation about Up that adds ``delta_deg`` to every azimuth (clockwise seen from above).

    >>> v = azimuth_turn_matrix(90.0) @ [0.0, 1.0, 0.0]   # north turned 90° clockwise is east
    >>> v.round(12).tolist()
    [1.0, 0.0, 0.0]
    """
    a = math.radians(float(delta_deg))
    c, s = math.cos(a), math.sin(a)
    # (E, N) = (sin A, cos A); A -> A + a: E' = c E + s N, N' = -s E + c N
    return np.array([[c, s, 0.0], [-s, c, 0.0], [0.0, 0.0, 1.0]])


def north_turn_deg(north: str, declination_deg: float = 0.0, convergence_deg: float = 0.0) -> float:
    """Degrees added to azimuths to go from the reference north to true north.

    >>> north_turn_deg("magnetic", declination_deg=5.0)
    5.0
    """
    if north not in NORTH_REFERENCES:
        raise InputError(f"model.north: {north!r} is not one of {', '.join(NORTH_REFERENCES)}")
    return {"true": 0.0, "magnetic": float(declination_deg), "grid": float(convergence_deg)}[north]


def true_azimuth_deg(
    bearing_deg: np.ndarray | float, north: str = "true", *, declination_deg: float = 0.0, convergence_deg: float = 0.0
) -> np.ndarray:
    """A bearing measured from the reference north → true azimuth, degrees in [0, 360).

    >>> float(true_azimuth_deg(100.0, "magnetic", declination_deg=5.0))   # 5° E declination
    105.0
    >>> float(true_azimuth_deg(100.0, "magnetic", declination_deg=-5.0))  # 5° W
    95.0
    """
    turn = north_turn_deg(north, declination_deg, convergence_deg)
    return np.mod(np.asarray(bearing_deg, dtype=float) + turn, 360.0)


def model_to_site_matrix(
    unit: str,
    *,
    up_axis: str = "z",
    north_axis: str | None = None,
    east_axis: str | None = None,
    north: str = "true",
    declination_deg: float = 0.0,
    convergence_deg: float = 0.0,
    rotation_deg: float = 0.0,
    offset_m=(0.0, 0.0, 0.0),
) -> np.ndarray:
    """4×4 homogeneous transform from file coordinates (file unit) to the site frame (ENU metres).

    See the module docstring for the order of operations.

    >>> T = model_to_site_matrix("ft", north="magnetic", declination_deg=90.0, offset_m=(0, 0, 2))
    >>> (T @ [0.0, 1.0, 0.0, 1.0]).round(6).tolist()   # 1 ft toward magnetic north, declination 90° E
    [0.3048, 0.0, 2.0, 1.0]
    """
    if unit not in UNIT_TO_M:
        raise InputError(f"model.unit: {unit!r} is not one of {', '.join(UNIT_TO_M)}")
    if north_axis is None:
        north_axis = default_north_axis(up_axis)
    offset = np.asarray(offset_m, dtype=float).reshape(-1)
    if offset.shape != (3,) or not np.all(np.isfinite(offset)):
        raise InputError(f"model.offset_m: {list(offset_m)!r} is not three finite numbers (east, north, up metres)")
    for key, value in (("declination_deg", declination_deg), ("convergence_deg", convergence_deg)):
        if not (math.isfinite(value) and -90.0 <= value <= 90.0):
            raise InputError(f"model.{key}: {value!r} is outside -90..90 degrees")
    if not math.isfinite(rotation_deg):
        raise InputError(f"model.rotation_deg: {rotation_deg!r} is not a finite number")
    turn = north_turn_deg(north, declination_deg, convergence_deg) + float(rotation_deg)
    T = np.eye(4)
    T[:3, :3] = azimuth_turn_matrix(turn) @ axes_matrix(up_axis, north_axis, east_axis) * UNIT_TO_M[unit]
    T[:3, 3] = offset
    return T


def apply_transform(vertices: np.ndarray, faces: np.ndarray, transform: np.ndarray) -> tuple[np.ndarray, np.ndarray]:
    """Transform (V, 3) vertices by a 4×4 matrix; reverse face winding if it mirrors, so normals stay outward.

    >>> v, f = apply_transform(np.eye(3), np.array([[0, 1, 2]]), np.diag([-1.0, 1, 1, 1]))
    >>> f.tolist()
    [[2, 1, 0]]
    """
    v = np.asarray(vertices, dtype=float) @ transform[:3, :3].T + transform[:3, 3]
    f = np.asarray(faces)
    if np.linalg.det(transform[:3, :3]) < 0:
        f = f[:, ::-1]
    return v, f
