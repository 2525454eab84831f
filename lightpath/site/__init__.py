"""Geometry: mesh files, parametric chambers, targets, openings, samples and terrain skylines in the site frame.

This layer knows nothing of dates and imports nothing from ``lightpath.sky``: terrain skylines come out as
plain arrays.  Scene files (observer, horizon profile, air) are read one layer up, in ``lightpath.scene``.
The site frame is East-North-Up, metres, origin at the site's reference point.

>>> room = window_room(95.0)
>>> samples = sample_target(room.target(), count=200, seed=0)
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
from lightpath.site.report import LoadReport
from lightpath.site.sampling import TargetSamples, sample_target
from lightpath.site.terrain import TerrainSkyline, skyline_from_terrain

__all__ = [
    "Bend",
    "Chamber",
    "ChamberModel",
    "LoadReport",
    "Niche",
    "Slot",
    "TargetSamples",
    "TerrainSkyline",
    "export_glb",
    "export_mesh",
    "export_obj",
    "passage_chamber",
    "sample_target",
    "skyline_from_terrain",
    "slit_shrine",
    "window_room",
]
