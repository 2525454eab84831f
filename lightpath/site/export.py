"""Writing a :class:`~lightpath.site.builders.ChamberModel` to OBJ (named groups) or GLB (named nodes).

Both are written atomically, in metres.  OBJ keeps the site frame as it is (x east, y north, z up; scene
``up_axis = "z"``); GLB follows the glTF convention of +y up, so ENU (E, N, U) is written as (E, U, −N)
(scene ``up_axis = "y"``, ``north_axis = "-z"``).

>>> import tempfile, pathlib
>>> from lightpath.site.builders import window_room
>>> d = pathlib.Path(tempfile.mkdtemp())
>>> p = export_obj(window_room(90.0), d / "room.obj")
>>> sorted(read_mesh(p).names["group"])
['floor', 'roof', 'target', 'walls', 'window']
"""

from __future__ import annotations

import io
import os
from pathlib import Path

import numpy as np

from lightpath.files import write_bytes_atomic, write_text_atomic
from lightpath.site.meshes import read_mesh  # noqa: F401 - used in the doctest

__all__ = ["ENU_TO_GLTF", "export_obj", "export_glb", "export_mesh"]

#: ENU (E, N, U) → glTF axes (x = E, y = U, z = −N).
ENU_TO_GLTF = np.array([[1.0, 0.0, 0.0, 0.0], [0.0, 0.0, 1.0, 0.0], [0.0, -1.0, 0.0, 0.0], [0.0, 0.0, 0.0, 1.0]])


def export_obj(model, path: str | os.PathLike, *, header: str | None = None) -> Path:
    """Write every part as an OBJ object and group of the same name (``o name`` / ``g name``); metres, z up."""
    out = io.StringIO()
    out.write("# lightpath parametric chamber: metres, x east, y north, z up\n")
    for line in (header or "").splitlines():
        out.write(f"# {line}\n")
    offset = 1
    for name, mesh in model.parts.items():
        out.write(f"o {name}\ng {name}\n")
        for x, y, z in np.asarray(mesh.vertices):
            out.write(f"v {x:.6f} {y:.6f} {z:.6f}\n")
        for a, b, c in np.asarray(mesh.faces) + offset:
            out.write(f"f {a} {b} {c}\n")
        offset += len(mesh.vertices)
    return write_text_atomic(path, out.getvalue())


def export_glb(model, path: str | os.PathLike) -> Path:
    """Write every part as a named node (and mesh) of a binary glTF file; metres, +y up, −z north."""
    import trimesh

    scene = trimesh.Scene()
    for name, mesh in model.parts.items():
        m = mesh.copy()
        m.apply_transform(ENU_TO_GLTF)
        scene.add_geometry(m, geom_name=name, node_name=name)
    return write_bytes_atomic(path, scene.export(file_type="glb"))


def export_mesh(model, path: str | os.PathLike) -> Path:
    """Write all parts merged into one unnamed mesh (PLY, STL or OFF by suffix); metres, z up."""
    import trimesh

    path = Path(path)
    kind = path.suffix.lower().lstrip(".")
    if kind not in ("ply", "stl", "off"):
        raise ValueError(f"export_mesh writes .ply, .stl or .off, not {path.suffix!r}")
    merged = trimesh.util.concatenate(list(model.parts.values()))
    data = merged.export(file_type=kind)
    return write_bytes_atomic(path, data.encode() if isinstance(data, str) else data)
