"""Points on the target surface, each standing for an equal share of its area.

Samples are area-weighted (a face is chosen with probability proportional to its area, the point uniformly
inside it), stratified over the cumulative area so that a few hundred samples already cover the surface
evenly, and deterministic for a given random-number-generator seed.  Each point is pushed off the surface
along its face normal by ``offset_m`` so that a ray leaving it does not hit its own face.

Why an offset: embree, the ray caster behind trimesh, works in single precision, whose relative spacing is
2⁻²³ ≈ 1.2e-7; a point lying *on* a triangle at coordinates of size L is only known to ≈ 1.2e-7·L and its own
face may be reported as the first hit.  The default offset, 1e-5 × max(L, 1 m) with L the largest absolute
coordinate of the target, is about 80 single-precision steps: far above that noise and far below any
architectural detail (0.1 mm for a 10 m scene).

>>> import trimesh
>>> plate = trimesh.Trimesh([[0, 0, 0], [2, 0, 0], [2, 1, 0], [0, 1, 0]], [[0, 1, 2], [0, 2, 3]])
>>> s = sample_target(plate, count=100)
>>> s.points_m.shape, round(float(s.area_m2.sum()), 12), s.total_area_m2
((100, 3), 2.0, 2.0)
>>> bool(np.allclose(s.points_m[:, 2], s.offset_m)) and s.normals[0].tolist() == [0.0, 0.0, 1.0]
True

References
----------
Turk, G. (1990). "Generating random points in triangles", in *Graphics Gems*, A. Glassner (ed.), Academic
Press, pp. 24–28 (uniform point in a triangle from two uniform numbers, the reflected-square form).
"""

from __future__ import annotations

import math
from dataclasses import dataclass

import numpy as np

from lightpath.errors import InputError

__all__ = ["TargetSamples", "default_offset_m", "sample_target", "MAX_SAMPLES"]

#: Largest number of samples we make in one call (a guard against a tiny spacing on a big surface).
MAX_SAMPLES = 2_000_000


@dataclass(frozen=True, eq=False)
class TargetSamples:
    """Sample points on a target surface.

    points_m : (N, 3) site-frame points (ENU metres), already offset along their normals.
    normals : (N, 3) unit normals of the faces the points lie on.
    area_m2 : (N,) each sample's share of the area, m²; they sum to ``total_area_m2``.
    total_area_m2 : the target's area, m².
    face_index : (N,) index of the target face each sample lies on.
    offset_m : the offset used, metres.
    seed : the random-number-generator seed used.
    """

    points_m: np.ndarray
    normals: np.ndarray
    area_m2: np.ndarray
    total_area_m2: float
    face_index: np.ndarray
    offset_m: float
    seed: int

    def __len__(self) -> int:
        return int(self.points_m.shape[0])


def default_offset_m(vertices: np.ndarray) -> float:
    """1e-5 × max(largest absolute coordinate, 1 m), metres (see the module docstring for why).

    >>> round(default_offset_m(np.array([[0.0, 0.0, 0.0], [30.0, -5.0, 2.0]])), 9)
    0.0003
    """
    size = float(np.max(np.abs(vertices))) if np.size(vertices) else 0.0
    return 1e-5 * max(size, 1.0)


def sample_target(
    target,
    *,
    count: int | None = None,
    spacing_m: float | None = None,
    seed: int = 0,
    offset_m: float | None = None,
) -> TargetSamples:
    """Area-weighted sample points with normals on ``target`` (a trimesh.Trimesh in the site frame).

    Parameters
    ----------
    target : trimesh.Trimesh, ENU metres; its face winding gives the side the samples face.
    count : number of samples (default 1000 when neither ``count`` nor ``spacing_m`` is given).
    spacing_m : alternatively, a mean spacing in metres: count = ceil(area / spacing_m²).
    seed : random-number-generator seed; the same seed gives the same samples.
    offset_m : push along the normal, metres (default :func:`default_offset_m`).

    Raises InputError for a target without area, both or neither-positive count/spacing, or a negative offset.
    """
    if count is not None and spacing_m is not None:
        raise InputError("samples: give either a count or a spacing_m, not both")
    vertices = np.asarray(target.vertices, dtype=float)
    faces = np.asarray(target.faces, dtype=np.int64)
    if faces.size == 0:
        raise InputError("target: the target has no faces")
    tri = vertices[faces]  # (F, 3, 3)
    cross = np.cross(tri[:, 1] - tri[:, 0], tri[:, 2] - tri[:, 0])
    double_area = np.linalg.norm(cross, axis=1)
    face_area = 0.5 * double_area  # half the cross product's length
    total = float(face_area.sum())
    if not (total > 0.0 and math.isfinite(total)):
        raise InputError("target: the target surface has zero area (degenerate or empty faces)")
    if spacing_m is not None:
        if not (math.isfinite(spacing_m) and spacing_m > 0):
            raise InputError(f"samples: spacing_m {spacing_m!r} must be a positive number of metres")
        count = math.ceil(total / spacing_m**2)
    if count is None:
        count = 1000
    if int(count) != count or count < 1:
        raise InputError(f"samples: count {count!r} must be a positive whole number")
    count = int(count)
    if count > MAX_SAMPLES:
        raise InputError(f"samples: {count} samples is more than the limit {MAX_SAMPLES}; use a larger spacing_m")
    if offset_m is None:
        offset_m = default_offset_m(tri)
    if not (math.isfinite(offset_m) and offset_m >= 0):
        raise InputError(f"samples: offset_m {offset_m!r} must be a non-negative number of metres")

    rng = np.random.default_rng(seed)
    # stratified choice of faces over the cumulative area: one uniform number in each of `count` equal slices
    u = (np.arange(count) + rng.random(count)) / count
    cumulative = np.cumsum(face_area) / total
    face = np.minimum(np.searchsorted(cumulative, u, side="right"), len(faces) - 1)
    face = np.where(face_area[face] > 0, face, np.argmax(face_area))
    # uniform point in the triangle, reflected-square form (Turk 1990)
    r = rng.random((count, 2))
    outside = r.sum(axis=1) > 1.0
    r[outside] = 1.0 - r[outside]
    t = tri[face]
    points = t[:, 0] + r[:, :1] * (t[:, 1] - t[:, 0]) + r[:, 1:] * (t[:, 2] - t[:, 0])
    with np.errstate(invalid="ignore", divide="ignore"):
        normals = cross[face] / double_area[face, None]
    points = points + offset_m * normals
    area = np.full(count, total / count)
    return TargetSamples(points, normals, area, total, face, float(offset_m), int(seed))
