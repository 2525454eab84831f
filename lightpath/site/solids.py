"""Closed building blocks for parametric chambers: boxes, panes, and the local-to-site transform.

Walls are made of closed boxes that overlap where they meet (overlapping solids are fine for a ray caster
and leave no crack for a ray to slip through, unlike surfaces that merely touch).  Panes (the surfaces
light passes through: slots, slits, windows) and targets are single quads.

Local frame of a builder: +x points *inward* from the opening (away from the sky it looks at), +y to the
left looking inward, +z up; metres.  :func:`local_to_site` turns it so that the opening's outward axis
(−x) points to ``azimuth_deg`` (degrees from true north, clockwise).

>>> b = box((0, 0, 0), (1, 2, 3))
>>> b.is_watertight, float(b.volume)
(True, 6.0)
"""

from __future__ import annotations

import math

import numpy as np

__all__ = ["box", "quad", "local_to_site", "transform_mesh", "pitch_matrix", "yaw_matrix"]


def box(lo, hi, transform: np.ndarray | None = None):
    """A closed box [lo, hi] (metres) with outward normals, optionally moved by a 4×4 ``transform``."""
    import trimesh

    lo, hi = np.asarray(lo, float), np.asarray(hi, float)
    if np.any(hi <= lo):
        raise ValueError(f"box with non-positive size: {lo} .. {hi}")
    b = trimesh.creation.box(extents=hi - lo)
    b.apply_translation((lo + hi) / 2)
    if transform is not None:
        b.apply_transform(transform)
    return b


def quad(corners, transform: np.ndarray | None = None):
    """A flat quad (2 triangles) from four corners in order; its normal follows the right-hand rule.

    >>> q = quad([(0, 0, 0), (1, 0, 0), (1, 1, 0), (0, 1, 0)])
    >>> q.face_normals[0].tolist(), float(q.area)
    ([0.0, 0.0, 1.0], 1.0)
    """
    import trimesh

    v = np.asarray(corners, float).reshape(4, 3)
    q = trimesh.Trimesh(v, [[0, 1, 2], [0, 2, 3]], process=False)
    if transform is not None:
        q.apply_transform(transform)
    return q


def pitch_matrix(slope_deg: float) -> np.ndarray:
    """4×4 rotation about the y axis that lifts +x by ``slope_deg`` degrees (positive: +x rises).

    >>> (pitch_matrix(90.0)[:3, :3] @ [1.0, 0, 0]).round(12).tolist()
    [0.0, 0.0, 1.0]
    """
    s = math.radians(slope_deg)
    T = np.eye(4)
    T[:3, :3] = [[math.cos(s), 0, -math.sin(s)], [0, 1, 0], [math.sin(s), 0, math.cos(s)]]
    return T


def yaw_matrix(angle_deg: float, about=(0.0, 0.0, 0.0)) -> np.ndarray:
    """4×4 rotation about the vertical through ``about`` by ``angle_deg`` counter-clockwise seen from above.

    >>> (yaw_matrix(90.0)[:3, :3] @ [1.0, 0, 0]).round(12).tolist()
    [0.0, 1.0, 0.0]
    """
    a = math.radians(angle_deg)
    R = np.eye(4)
    R[:3, :3] = [[math.cos(a), -math.sin(a), 0], [math.sin(a), math.cos(a), 0], [0, 0, 1]]
    p = np.asarray(about, float)
    T1, T2 = np.eye(4), np.eye(4)
    T1[:3, 3], T2[:3, 3] = -p, p
    return T2 @ R @ T1


def local_to_site(azimuth_deg: float, origin_m=(0.0, 0.0, 0.0)) -> np.ndarray:
    """4×4 transform from a builder's local frame to ENU: local −x (outward) points to ``azimuth_deg``.

    >>> T = local_to_site(90.0)      # opening looks east: inward +x is west
    >>> ((T[:3, :3] @ [1.0, 0, 0]).round(12) + 0.0).tolist(), ((T[:3, :3] @ [0, 1.0, 0]).round(12) + 0.0).tolist()
    ([-1.0, 0.0, 0.0], [0.0, -1.0, 0.0])
    """
    inward = math.radians(float(azimuth_deg) + 180.0)
    x_axis = np.array([math.sin(inward), math.cos(inward), 0.0])
    z_axis = np.array([0.0, 0.0, 1.0])
    y_axis = np.cross(z_axis, x_axis)  # left of +x, seen from above
    T = np.eye(4)
    T[:3, :3] = np.column_stack([x_axis, y_axis, z_axis])
    T[:3, 3] = np.asarray(origin_m, float)
    return T


def transform_mesh(mesh, transform: np.ndarray):
    """A transformed copy of a trimesh."""
    out = mesh.copy()
    out.apply_transform(transform)
    return out
