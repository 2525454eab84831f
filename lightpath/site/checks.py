"""Warnings about a loaded scene: things that are probably mistakes but need not be.

Each check is a pure function returning a list of one-line messages (empty when all is well).  The
thresholds are our own choices (common practice, no published source): a chamber, shrine or room whose
largest extent is above 150 m or below 0.3 m most likely has the wrong ``model.unit``.

>>> extent_warnings(np.array([300.0, 20.0, 5.0]))[0][:44]
'largest extent 300 m is implausible for a ch'
"""

from __future__ import annotations

import numpy as np

from lightpath.site.frames import UNIT_TO_M

__all__ = [
    "LARGEST_PLAUSIBLE_M",
    "SMALLEST_PLAUSIBLE_M",
    "extent_warnings",
    "covered_fraction",
    "covered_warnings",
    "facing_warnings",
    "frame_warnings",
    "leak_fraction",
    "leak_warnings",
    "north_warnings",
    "target_area_warnings",
]

#: Structures larger than this (largest extent, metres) get a scale warning.
LARGEST_PLAUSIBLE_M = 150.0
#: Structures smaller than this (largest extent, metres) get a scale warning.
SMALLEST_PLAUSIBLE_M = 0.3
#: A target or opening facing further up or down than this (degrees) hints at a wrong up axis (our own choice).
STEEP_FACING_DEG = 60.0


def _unit_hint(largest_m: float, unit: str | None) -> str:
    if unit is None or unit not in UNIT_TO_M:
        return ""
    options = []
    for other, scale in UNIT_TO_M.items():
        size = largest_m / UNIT_TO_M[unit] * scale
        if other != unit and SMALLEST_PLAUSIBLE_M <= size <= LARGEST_PLAUSIBLE_M:
            options.append(f"{size:.3g} m if the file is in {other}")
    return f" (model.unit is {unit!r}; it would be " + " or ".join(options) + ")" if options else ""


def extent_warnings(extents_m: np.ndarray, unit: str | None = None) -> list[str]:
    """A warning when the structure's largest extent (metres) is implausible for a built chamber.

    >>> extent_warnings(np.array([12.0, 3.0, 2.5]))
    []
    >>> "0.012 m if the file is in mm" in extent_warnings(np.array([12.0, 3.0, 2.0]) * 1000, "m")[0]
    False
    >>> "12 m if the file is in mm" in extent_warnings(np.array([12.0, 3.0, 2.0]) * 1000, "m")[0]
    True
    """
    largest = float(np.max(extents_m)) if np.size(extents_m) else 0.0
    if largest > LARGEST_PLAUSIBLE_M:
        return [
            f"largest extent {largest:.4g} m is implausible for a chamber (> {LARGEST_PLAUSIBLE_M:g} m)"
            + _unit_hint(largest, unit)
        ]
    if largest < SMALLEST_PLAUSIBLE_M:
        return [
            f"largest extent {largest:.4g} m is implausible for a chamber (< {SMALLEST_PLAUSIBLE_M:g} m)"
            + _unit_hint(largest, unit)
        ]
    return []


def north_warnings(north_given: bool) -> list[str]:
    """A warning when the scene does not say what the model's north axis points at.

    >>> north_warnings(False)[0][:36]
    'model.north not given: assuming the '
    """
    if north_given:
        return []
    return [
        "model.north not given: assuming the model's north axis points to true north; "
        "say 'true', 'magnetic' (with declination_deg) or 'grid' (with convergence_deg)"
    ]


def target_area_warnings(area_m2: float) -> list[str]:
    """A warning when the target has no area (all faces degenerate).

    >>> target_area_warnings(0.0)
    ['target area is zero: its faces are degenerate (no samples can be made)']
    """
    if area_m2 > 0:
        return []
    return ["target area is zero: its faces are degenerate (no samples can be made)"]


def facing_warnings(target, opening) -> list[str]:
    """A warning when no part of the target faces the opening (its normals all point away from it).

    ``target`` and ``opening`` are trimesh meshes in the site frame (``opening`` may be None: no check).
    A face faces the opening when its normal has a positive component toward the opening's centroid.
    """
    if opening is None or len(target.faces) == 0:
        return []
    normals = np.asarray(target.face_normals)
    toward = np.asarray(opening.vertices).mean(axis=0) - np.asarray(target.triangles_center)
    facing = np.einsum("ij,ij->i", normals, toward) > 0
    area = np.asarray(target.area_faces)
    if np.sum(area[facing]) > 0:
        return []
    return [
        "the target faces away from every opening (all its normals point away from the opening); "
        "set target.flip_normals = true if the file's winding is reversed"
    ]


def leak_fraction(mesh, opening, points_m: np.ndarray, normals: np.ndarray, *, rays_per_point: int = 32, seed: int = 0):
    """Share of random rays from target points that escape ``mesh`` without crossing ``opening``.

    Rays leave each point in uniformly random directions over the hemisphere its normal faces (a fixed
    random-number-generator ``seed``).  A closed model gives 0; holes in a scan give more.  Returns
    (leak share, escape share), both 0..1.
    """
    rng = np.random.default_rng(seed)
    origins = np.repeat(np.asarray(points_m, float), rays_per_point, axis=0)
    n = np.repeat(np.asarray(normals, float), rays_per_point, axis=0)
    d = rng.normal(size=origins.shape)
    d /= np.linalg.norm(d, axis=1)[:, None]
    d = np.where(np.einsum("ij,ij->i", d, n)[:, None] < 0, -d, d)
    escaped = ~np.asarray(mesh.ray.intersects_any(origins, d))
    through = np.asarray(opening.ray.intersects_any(origins, d)) if opening is not None else np.zeros(len(d), bool)
    return float(np.mean(escaped & ~through)), float(np.mean(escaped))


def leak_warnings(leak_share: float, threshold: float = 1e-3) -> list[str]:
    """A warning when more than ``threshold`` of the random rays leak (see :func:`leak_fraction`).

    >>> leak_warnings(0.0), leak_warnings(0.02)[0][:30]
    ([], 'light leaks: 2.0% of random ra')
    """
    if leak_share <= threshold:
        return []
    return [
        f"light leaks: {leak_share:.1%} of random rays from the target escape without crossing the opening "
        "(holes in the mesh, or a second opening not named)"
    ]


def covered_fraction(mesh, points_m: np.ndarray, normals: np.ndarray, *, within_m: float = 0.01) -> float:
    """Share of target samples with other geometry within ``within_m`` metres in front of them, 0..1.

    A sample whose own normal ray hits a surface that close lies under (or just behind) another surface —
    e.g. a surveyed target polygon a few millimetres behind the scanned wall — and will never see light.
    """
    pts, n = np.asarray(points_m, float), np.asarray(normals, float)
    locations, index, _ = mesh.ray.intersects_location(pts, n, multiple_hits=False)
    if len(index) == 0:
        return 0.0
    distance = np.linalg.norm(locations - pts[index], axis=1)
    return float(np.sum(distance < within_m) / len(pts))


def covered_warnings(share: float, threshold: float = 0.05) -> list[str]:
    """A warning when more than ``threshold`` of the target's samples are covered (see :func:`covered_fraction`).

    >>> covered_warnings(0.5)[0][:40]
    'target covered: 50% of its samples have '
    """
    if share <= threshold:
        return []
    return [
        f"target covered: {share:.0%} of its samples have a surface within 1 cm in front of them "
        "(is the target behind a wall surface, or its normals reversed?)"
    ]


def _facing_altitude_deg(mesh) -> float | None:
    """Altitude (degrees) of the area-weighted mean normal of a trimesh in ENU, or None if it has none."""
    normal = np.sum(np.asarray(mesh.face_normals) * np.asarray(mesh.area_faces)[:, None], axis=0)
    length = float(np.linalg.norm(normal))
    if length == 0 or not np.isfinite(length):
        return None
    return float(np.degrees(np.arcsin(np.clip(normal[2] / length, -1.0, 1.0))))


def frame_warnings(vertices: np.ndarray, faces: np.ndarray, target, opening=None) -> list[str]:
    """Warnings when the declared up axis looks wrong (site frame, Up = third coordinate).

    ``vertices``/``faces`` are the structure (terrain left out); ``target`` and ``opening`` trimesh meshes.
    Warned: the target facing, or the opening's plane facing, more than :data:`STEEP_FACING_DEG` up or down;
    more than half the structure's area below the target's lowest point; the lowest tenth of the structure's
    height with under a quarter of its area level within 15° (no floor).  Thresholds are our own choices
    (common practice, no published source): each may be right for an unusual chamber, so they only warn.

    >>> import trimesh
    >>> box = trimesh.creation.box(extents=(4.0, 2.0, 2.0))
    >>> wall = trimesh.Trimesh([[2, -1, 0], [2, 1, 0], [2, 1, 1]], [[0, 2, 1]])   # faces west (-x)
    >>> frame_warnings(box.vertices, box.faces, wall)
    []
    >>> flat = trimesh.Trimesh([[0, 0, -1], [1, 0, -1], [0, 1, -1]], [[0, 1, 2]])   # faces up
    >>> frame_warnings(box.vertices, box.faces, flat)[0][:28]
    'the target faces 90 deg up: '
    """
    out = []
    hint = "is model.up_axis right?"
    for name, mesh, signed in (("target", target, True), ("opening", opening, False)):
        if mesh is None or len(mesh.faces) == 0:
            continue
        alt = _facing_altitude_deg(mesh)
        if alt is None:
            continue
        if abs(alt) > STEEP_FACING_DEG:
            way = ("up" if alt > 0 else "down") if signed else "up or down"
            what = "faces" if signed else "plane faces"
            out.append(f"the {name} {what} {abs(alt):.0f} deg {way}: {hint} (fine for a floor, roof or skylight)")
    v, f = np.asarray(vertices, float), np.asarray(faces)
    if len(f) == 0:
        return out
    tri = v[f]
    area = 0.5 * np.linalg.norm(np.cross(tri[:, 1] - tri[:, 0], tri[:, 2] - tri[:, 0]), axis=1)
    total = float(area.sum())
    if total <= 0:
        return out
    centre_up = tri[:, :, 2].mean(axis=1)
    lowest_target = float(np.min(np.asarray(target.vertices)[:, 2])) if len(target.vertices) else np.nan
    below = float(area[centre_up < lowest_target - 1e-6].sum()) / total
    if below > 0.5:
        out.append(f"{below:.0%} of the structure's area lies below the target: {hint}")
    z0, z1 = float(v[f].reshape(-1, 3)[:, 2].min()), float(v[f].reshape(-1, 3)[:, 2].max())
    low = centre_up <= z0 + 0.1 * (z1 - z0)
    if z1 > z0 and area[low].sum() > 0:
        normal = np.cross(tri[:, 1] - tri[:, 0], tri[:, 2] - tri[:, 0])
        with np.errstate(invalid="ignore", divide="ignore"):
            level = np.abs(normal[:, 2]) / np.linalg.norm(normal, axis=1) > np.cos(np.radians(15.0))
        share = float(area[low & level].sum() / area[low].sum())
        if share < 0.25:
            out.append(f"no level floor: only {share:.0%} of the lowest surfaces are level within 15 deg: {hint}")
    return out
