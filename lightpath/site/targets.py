"""Picking the target surface and the opening out of a model.

Three ways, the same for target and opening:

- by name: faces whose OBJ group/object/material (or glTF node/material) has one of the given names;
- by a box in site coordinates (ENU metres): faces whose centroid lies inside the box;
- by a separate mesh file (read by the scene loader with the model's unit and axes);
- by a surveyed polygon: corners in site coordinates (e.g. a backstone's corners from a total station).

>>> import trimesh
>>> from lightpath.site.meshes import LabeledMesh
>>> lm = LabeledMesh(np.eye(3), np.array([[0, 1, 2]]), {"group": {"back": np.array([0])}}, "x.obj")
>>> select_by_name(lm, {"group": ["back"]}, "target").tolist()
[0]
"""

from __future__ import annotations

import difflib

import numpy as np

from lightpath.errors import InputError
from lightpath.site.meshes import NAME_KINDS, LabeledMesh

__all__ = ["select_by_name", "faces_in_box", "box_mesh", "polygon_mesh", "submesh", "face_areas_m2", "area_centroid_m"]


def select_by_name(mesh: LabeledMesh, wanted: dict[str, list[str]], table: str) -> np.ndarray:
    """Indices of the faces carrying any of the ``wanted`` names (``{"group": [...], "object": [...], ...}``).

    ``table`` is the scene table asking (``"target"`` or ``"opening"``) for messages.  An unknown name raises
    InputError listing the names the file has.
    """
    chosen = []
    for kind, names in wanted.items():
        if kind not in NAME_KINDS:
            raise InputError(f"{table}: unknown name kind {kind!r}; accepted: {', '.join(NAME_KINDS)}")
        have = mesh.names.get(kind, {})
        for name in names:
            if name not in have:
                listing = ", ".join(sorted(have)[:30]) or "none"
                close = difflib.get_close_matches(name, list(have), n=1)
                hint = f" (did you mean {close[0]!r}?)" if close else ""
                raise InputError(
                    f"{table}.{kind}s: {name!r} is not in {mesh.path}{hint}; the file's {kind} names: {listing}"
                )
            chosen.append(have[name])
    if not chosen:
        return np.empty(0, dtype=np.int64)
    return np.unique(np.concatenate(chosen))


def face_areas_m2(vertices: np.ndarray, faces: np.ndarray) -> np.ndarray:
    """(F,) triangle areas (half the cross product's length), in the square of the vertices' unit.

    >>> face_areas_m2(np.array([[0, 0, 0], [1, 0, 0], [0, 1, 0]], float), np.array([[0, 1, 2]])).tolist()
    [0.5]
    """
    tri = np.asarray(vertices, dtype=float)[np.asarray(faces)]
    return 0.5 * np.linalg.norm(np.cross(tri[:, 1] - tri[:, 0], tri[:, 2] - tri[:, 0]), axis=1)


def faces_in_box(vertices: np.ndarray, faces: np.ndarray, box_min_m, box_max_m) -> np.ndarray:
    """Indices of faces whose centroid lies inside the axis-aligned box [min, max] (site metres).

    >>> v = np.array([[0, 0, 0], [1, 0, 0], [0, 1, 0], [5, 5, 5], [6, 5, 5], [5, 6, 5]], float)
    >>> faces_in_box(v, np.array([[0, 1, 2], [3, 4, 5]]), [-1, -1, -1], [2, 2, 2]).tolist()
    [0]
    """
    lo, hi = np.asarray(box_min_m, float), np.asarray(box_max_m, float)
    centroid = np.asarray(vertices, float)[np.asarray(faces)].mean(axis=1)
    inside = np.all((centroid >= lo) & (centroid <= hi), axis=1)
    return np.flatnonzero(inside)


def box_mesh(box_min_m, box_max_m):
    """The box [min, max] (site metres) as a closed trimesh with outward normals (12 triangles).

    >>> float(box_mesh([0, 0, 0], [1, 2, 3]).volume)
    6.0
    """
    import trimesh

    lo, hi = np.asarray(box_min_m, float), np.asarray(box_max_m, float)
    box = trimesh.creation.box(extents=hi - lo)
    box.apply_translation((lo + hi) / 2)
    return box


def submesh(vertices: np.ndarray, faces: np.ndarray, face_index: np.ndarray):
    """A trimesh of the chosen faces only (unused vertices dropped, nothing merged or reordered)."""
    import trimesh

    f = np.asarray(faces)[np.asarray(face_index, dtype=np.int64)]
    used, inverse = np.unique(f.reshape(-1), return_inverse=True)
    return trimesh.Trimesh(np.asarray(vertices)[used], inverse.reshape(-1, 3), process=False)


def polygon_mesh(corners_m, *, key: str = "polygon_m", planar_tolerance_m: float = 0.01):
    """A convex planar polygon (corners in order, site metres) as a triangle fan.

    The normal follows the right-hand rule: corners counter-clockwise seen from the side the surface faces.
    Raises InputError for fewer than 3 corners, non-finite numbers, no area, or corners off a plane by more
    than ``planar_tolerance_m`` (default 1 cm, a total station's usual point accuracy; common practice).

    >>> m = polygon_mesh([[0, 0, 0], [2, 0, 0], [2, 1, 0], [0, 1, 0]])
    >>> float(m.area), m.face_normals[0].tolist()
    (2.0, [0.0, 0.0, 1.0])
    """
    import trimesh

    try:
        p = np.asarray(corners_m, dtype=float)
    except (TypeError, ValueError):
        raise InputError(f"{key}: corners must be [east, north, up] numbers in metres") from None
    if p.ndim != 2 or p.shape[1] != 3 or len(p) < 3 or not np.all(np.isfinite(p)):
        raise InputError(f"{key}: give at least 3 corners, each [east, north, up] finite numbers in metres")
    n = len(p)
    faces = np.stack([np.zeros(n - 2, int), np.arange(1, n - 1), np.arange(2, n)], axis=1)
    normal = np.cross(p[faces[:, 1]] - p[faces[:, 0]], p[faces[:, 2]] - p[faces[:, 0]]).sum(axis=0)
    length = np.linalg.norm(normal)
    if length == 0:
        raise InputError(f"{key}: the corners enclose no area")
    off_plane = np.abs((p - p.mean(axis=0)) @ (normal / length))
    if off_plane.max() > planar_tolerance_m:
        raise InputError(f"{key}: corners are {off_plane.max():.3f} m off a plane (more than {planar_tolerance_m} m)")
    return trimesh.Trimesh(p, faces, process=False)


def area_centroid_m(mesh) -> np.ndarray:
    """Area-weighted centre of a surface mesh's triangles (site-frame metres); also right for an open, flat pane."""
    weights = np.asarray(mesh.area_faces, dtype=float)
    return (np.asarray(mesh.triangles_center, dtype=float) * weights[:, None]).sum(axis=0) / weights.sum()
