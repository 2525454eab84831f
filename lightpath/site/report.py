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

__all__ = ["LoadReport", "load_report", "scene_summary"]


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


def _azalt_deg(v: np.ndarray) -> tuple[float, float]:
    """Azimuth (from north, clockwise) and altitude of an ENU vector, degrees."""
    e, n, u = (float(c) for c in v)
    return float(np.degrees(np.arctan2(e, n)) % 360.0), float(np.degrees(np.arctan2(u, np.hypot(e, n))))


def scene_summary(scene, samples=None) -> dict:
    """A plain dict describing a loaded scene (for ``lightpath inspect`` and reports; JSON-ready).

    ``samples`` is an optional :class:`~lightpath.site.sampling.TargetSamples` to describe.  Directions are
    azimuth (degrees from true north, clockwise) and altitude (degrees above the horizontal, geometric).
    """
    obs = scene.observer
    target = scene.target
    normal_sum = np.sum(np.asarray(target.face_normals) * np.asarray(target.area_faces)[:, None], axis=0)
    target_centre = np.average(np.asarray(target.triangles_center), axis=0, weights=np.asarray(target.area_faces))
    out = {
        "scene": str(scene.path),
        "label": scene.label,
        "site": {
            "latitude_deg": obs.latitude_deg,
            "longitude_deg": obs.longitude_deg,
            "elevation_m": obs.elevation_m,
            "timezone": obs.timezone,
            "temperature_c": obs.temperature_c,
            "pressure_mbar": obs.pressure_mbar,
            "refraction": obs.refraction,
        },
        "frame": {
            "axes": "east, north, up (metres, true north)",
            "files": scene.report.files,
            "file_to_site": scene.report.transform,
            "names_in_file": scene.report.names,
        },
        "mesh": {
            "triangles": scene.report.triangles,
            "vertices": scene.report.vertices,
            "extents_m": scene.report.extents_m,
            "bounds_m": scene.report.bounds_m,
            "watertight": scene.report.watertight,
        },
        "target": {
            "triangles": scene.report.target_triangles,
            "area_m2": scene.report.target_area_m2,
            "centre_m": target_centre.round(4).tolist(),
        },
        "opening": None,
        "horizon": scene.horizon.summary(),
        "tolerances": scene.tolerances,
        "warnings": list(scene.warnings),
        "content_hash": scene.content_hash,
    }
    if np.linalg.norm(normal_sum) > 0:
        az, alt = _azalt_deg(normal_sum)
        out["target"]["mean_normal_azimuth_deg"], out["target"]["mean_normal_altitude_deg"] = (
            round(az, 3),
            round(alt, 3),
        )
    if scene.opening is not None:
        centre = np.asarray(scene.opening.vertices).mean(axis=0)
        az, alt = _azalt_deg(centre - target_centre)
        out["opening"] = {
            "triangles": scene.report.opening_triangles,
            "area_m2": scene.report.opening_area_m2,
            "centre_m": centre.round(4).tolist(),
            "seen_from_target_azimuth_deg": round(az, 3),
            "seen_from_target_altitude_deg": round(alt, 3),
            "distance_from_target_m": round(float(np.linalg.norm(centre - target_centre)), 4),
        }
    if samples is not None:
        out["samples"] = {
            "count": len(samples),
            "seed": samples.seed,
            "offset_m": samples.offset_m,
            "area_each_m2": float(samples.area_m2[0]),
            "total_area_m2": samples.total_area_m2,
        }
    return out
