"""A :class:`~lightpath.scene.scene.Scene` straight from a parametric model, without writing any file.

Handy in notebooks and tests: build a chamber from survey numbers, give the site, and hand the scene to the
engine.

>>> from lightpath.site.builders import window_room
>>> from lightpath.sky.observer import Observer
>>> scene = scene_from_model(window_room(95.0), Observer(38.9, -2.3, 700.0))
>>> round(scene.report.target_area_m2, 3), scene.opening is not None, scene.warnings
(0.48, True, [])
"""

from __future__ import annotations

from pathlib import Path

import numpy as np

from lightpath.scene.scene import Scene, hash_geometry
from lightpath.site import checks
from lightpath.site.report import load_report
from lightpath.sky.horizon import HorizonProfile, flat_horizon
from lightpath.sky.observer import Observer

__all__ = ["scene_from_model"]


def scene_from_model(
    model,
    observer: Observer,
    *,
    horizon: HorizonProfile | None = None,
    label: str | None = None,
    tolerances: dict[str, float] | None = None,
) -> Scene:
    """Scene from a :class:`~lightpath.site.builders.ChamberModel` (already in the site frame, ENU metres).

    ``horizon`` defaults to the flat astronomical horizon; ``tolerances`` uses the keys of the scene file's
    [tolerances] table (see docs/scene-format.md).
    """
    mesh = model.blocking_mesh()
    target = model.target().copy()
    opening = model.opening() if model.opening_parts else None
    warnings = checks.extent_warnings(np.ptp(np.asarray(mesh.vertices), axis=0), "m")
    scale = list(warnings)
    warnings += checks.target_area_warnings(float(target.area))
    warnings += checks.facing_warnings(target, opening)
    if opening is None:
        warnings.append("no opening given: the whole sky is searched for light (slower, may miss small windows)")
    report = load_report(mesh, target, opening, files=[], transform=np.eye(4), names={}, scale_warnings=scale)
    return Scene(
        path=Path(f"<{model.kind}>"),
        label=label or model.kind.replace("_", " "),
        observer=observer,
        mesh=mesh,
        target=target,
        opening=opening,
        horizon=horizon if horizon is not None else flat_horizon(),
        tolerances=dict(tolerances or {}),
        report=report,
        warnings=warnings,
        content_hash=hash_geometry(mesh, target, opening),
    )
