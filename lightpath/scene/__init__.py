"""The scene: where the site's geometry meets the sky's observer, horizon profile and air.

A scene file names a site (latitude, longitude, elevation, time zone), a model (a mesh file or a chamber built
from survey numbers), the target and the opening, the horizon and the air; :func:`load_scene` reads it and
returns a :class:`Scene` in the site frame (East-North-Up metres).  Below this layer nothing reads scene files:
``lightpath.site`` is geometry alone and ``lightpath.sky`` astronomy alone.

Modules
-------
scene       :class:`Scene`, :func:`load_scene`, the demo sites, the standard-atmosphere pressure
keys        the keys a scene file may hold and the checks every value goes through
modelscene  :func:`scene_from_model`: a scene straight from a parametric chamber, no file written
terrain     :func:`horizon_from_terrain`: the site layer's terrain skyline as a horizon profile

>>> scene = load_scene(demo_scene_path("quillfield"))
>>> round(scene.observer.latitude_deg, 1), scene.opening is not None
(38.9, True)
"""

from lightpath.scene.modelscene import scene_from_model
from lightpath.scene.scene import DEMO_SITES, Scene, demo_scene_path, load_scene, standard_pressure_mbar
from lightpath.scene.terrain import horizon_from_terrain

__all__ = [
    "DEMO_SITES",
    "Scene",
    "demo_scene_path",
    "horizon_from_terrain",
    "load_scene",
    "scene_from_model",
    "standard_pressure_mbar",
]
