"""Geometry: scene files to meshes, targets, openings and horizons in the site frame.

This layer knows nothing of dates.  The site frame is East-North-Up, metres,
origin at the site's reference point.

>>> scene = load_scene(demo_scene_path("window"))
>>> samples = sample_target(scene.target, count=200, seed=0)
>>> len(samples), round(samples.total_area_m2, 3)
(200, 0.48)
"""

from lightpath.site.builders import (
    Bend,
    Chamber,
    ChamberModel,
    Niche,
    Slot,
    passage_chamber,
    slit_shrine,
    window_room,
)
from lightpath.site.export import export_glb, export_mesh, export_obj
from lightpath.site.modelscene import scene_from_model
from lightpath.site.report import LoadReport
from lightpath.site.sampling import TargetSamples, sample_target
from lightpath.site.scene import DEMO_SITES, Scene, demo_scene_path, load_scene
from lightpath.site.terrain import horizon_from_terrain

__all__ = [
    "Bend",
    "Chamber",
    "ChamberModel",
    "DEMO_SITES",
    "LoadReport",
    "Niche",
    "Scene",
    "Slot",
    "TargetSamples",
    "demo_scene_path",
    "export_glb",
    "export_mesh",
    "export_obj",
    "horizon_from_terrain",
    "load_scene",
    "passage_chamber",
    "sample_target",
    "scene_from_model",
    "slit_shrine",
    "window_room",
]
