"""What a scene loaded: counts, extents, areas and watertightness, for ``lightpath inspect`` and the reports.

>>> import trimesh
>>> box = trimesh.creation.box(extents=(4.0, 2.0, 1.0))
>>> r = load_report(box, box, None, files=["box.obj"], transform=np.eye(4))
>>> r.triangles, r.extents_m, r.target_area_m2, r.watertight
(12, [4.0, 2.0, 1.0], 28.0, True)
"""

from __future__ import annotations

from dataclasses import dataclass, field

import numpy as np

__all__ = ["LoadReport", "load_report"]


@dataclass(frozen=True)
class LoadReport:
    """A summary of the loaded geometry (site frame, ENU metres).

    triangles, vertices : counts in the blocking mesh (target included, opening not).
    bounds_m : [[min E, min N, min U], [max E, max N, max U]], metres.
    extents_m : [E, N, U] size of the bounding box, metres.
    target_triangles, target_area_m2 : the target's triangle count and area (m²).
    opening_triangles, opening_area_m2 : the opening's, or 0 and None without one.
    watertight : True when every edge of the blocking mesh (vertices welded) is shared by exactly two faces.
    files : the mesh files read.
    names : the names the model file offers, per kind (group/object/material).
    transform : 4×4 file-to-site matrix (nested lists).
    scale_warnings : warnings about implausible size.
    """

    triangles: int
    vertices: int
    bounds_m: list
    extents_m: list
    target_triangles: int
    target_area_m2: float
    opening_triangles: int
    opening_area_m2: float | None
    watertight: bool
    files: list[str] = field(default_factory=list)
    names: dict = field(default_factory=dict)
    transform: list = field(default_factory=list)
    scale_warnings: list[str] = field(default_factory=list)


def _watertight(mesh) -> bool:
    import trimesh

    welded = trimesh.Trimesh(np.asarray(mesh.vertices), np.asarray(mesh.faces), process=True, validate=False)
    return bool(welded.is_watertight)


def load_report(
    mesh,
    target,
    opening,
    *,
    files: list[str],
    transform: np.ndarray,
    names: dict | None = None,
    scale_warnings: list[str] | None = None,
) -> LoadReport:
    """Build a :class:`LoadReport` from the site-frame meshes (trimesh objects; ``opening`` may be None)."""
    bounds = np.asarray(mesh.bounds, dtype=float)
    return LoadReport(
        triangles=int(len(mesh.faces)),
        vertices=int(len(mesh.vertices)),
        bounds_m=bounds.round(6).tolist(),
        extents_m=(bounds[1] - bounds[0]).round(6).tolist(),
        target_triangles=int(len(target.faces)),
        target_area_m2=float(target.area),
        opening_triangles=0 if opening is None else int(len(opening.faces)),
        opening_area_m2=None if opening is None else float(opening.area),
        watertight=_watertight(mesh),
        files=list(files),
        names=dict(names or {}),
        transform=np.asarray(transform, dtype=float).round(12).tolist(),
        scale_warnings=list(scale_warnings or []),
    )
