"""Reading mesh files into one triangle soup with the names each face carries.

A :class:`LabeledMesh` is vertices (file units, file axes), triangular faces and, for every naming scheme the
file has, a map ``name → face indices``:

- ``"group"``: OBJ ``g`` groups; glTF/GLB node names;
- ``"object"``: OBJ ``o`` objects; glTF/GLB node names and mesh names;
- ``"material"``: OBJ ``usemtl`` names; glTF/GLB material names.

PLY, STL and OFF files carry no names (select their faces by a box or give the target as a separate file).

OBJ is read by our own reader (array-based, :mod:`lightpath.site.objfile`) because trimesh 5.2 merges
``o``/``g`` blocks that share a material (checked: ``trimesh.load(..., group_material=False,
split_object=True)`` returned one geometry for two objects), losing the names we select targets by.
Polygons are split into triangle fans.  The other formats go through ``trimesh.load(..., force="scene")``
with every node's transform applied (flattened).

>>> import tempfile, pathlib
>>> p = pathlib.Path(tempfile.mkdtemp()) / "tri.obj"
>>> _ = p.write_text("o stone\\nv 0 0 0\\nv 1 0 0\\nv 0 1 0\\nv 1 1 0\\ng face\\nf 1 2 4 3\\n")
>>> m = read_mesh(p)
>>> m.faces.shape, sorted(m.names["group"]), sorted(m.names["object"])
((2, 3), ['face'], ['stone'])
"""

from __future__ import annotations

import os
from dataclasses import dataclass, field
from pathlib import Path

import numpy as np

from lightpath.errors import InputError
from lightpath.site.objfile import group_faces, read_obj_arrays

__all__ = ["MESH_FORMATS", "NAME_KINDS", "LabeledMesh", "read_mesh", "merge_meshes"]

#: File suffixes we read, and the reader used.
MESH_FORMATS = {".obj": "obj", ".ply": "ply", ".stl": "stl", ".off": "off", ".glb": "glb", ".gltf": "gltf"}

#: Naming schemes a face can be selected by.
NAME_KINDS = ("group", "object", "material")


@dataclass(frozen=True, eq=False)
class LabeledMesh:
    """Triangles with their names.

    vertices : (V, 3) float64, in the file's unit and axes.
    faces : (F, 3) int64 vertex indices.
    names : ``{kind: {name: (k,) int64 face indices}}`` for kind in :data:`NAME_KINDS`.
    path : the file read (for messages).
    """

    vertices: np.ndarray
    faces: np.ndarray
    names: dict[str, dict[str, np.ndarray]] = field(default_factory=dict)
    path: str = ""

    def available_names(self) -> dict[str, list[str]]:
        """Sorted names per kind (only kinds the file has)."""
        return {kind: sorted(d) for kind, d in self.names.items() if d}


def _face_tokens_to_index(token: str, n_vertices: int) -> int:
    i = int(token.split("/", 1)[0])
    return i - 1 if i > 0 else n_vertices + i


def _read_obj(path: Path) -> LabeledMesh:
    try:
        text = path.read_text(encoding="utf-8", errors="replace")
    except OSError as exc:
        raise InputError(f"{path}: mesh file cannot be read ({exc.strerror or type(exc).__name__})") from None
    bulk = read_obj_arrays(text)
    if bulk is None:
        return _read_obj_lines(path, text)
    v, f, labels, tables = bulk
    if f.size and (f.min() < 0 or f.max() >= len(v)):
        raise InputError(f"{path}: a face refers to a vertex that does not exist ({len(v)} vertices)")
    names = {kind: group_faces(labels[kind], tables[kind]) for kind in NAME_KINDS}
    return LabeledMesh(v, f, names, str(path))


def _read_obj_lines(path: Path, text: str) -> LabeledMesh:
    """The line-by-line OBJ reader: negative indices, and line-numbered messages for malformed records."""
    vertices: list[list[float]] = []
    faces: list[tuple[int, int, int]] = []
    labels: dict[str, list[int]] = {kind: [] for kind in NAME_KINDS}
    current = {kind: -1 for kind in NAME_KINDS}
    tables: dict[str, dict[str, int]] = {kind: {} for kind in NAME_KINDS}

    def set_name(kind: str, name: str) -> None:
        current[kind] = tables[kind].setdefault(name, len(tables[kind])) if name else -1

    for lineno, raw in enumerate(text.splitlines(), start=1):
        parts = raw.split("#", 1)[0].split()
        if not parts:
            continue
        key = parts[0]
        try:
            if key == "v":
                vertices.append([float(parts[1]), float(parts[2]), float(parts[3])])
            elif key == "f":
                idx = [_face_tokens_to_index(t, len(vertices)) for t in parts[1:]]
                if len(idx) < 3:
                    raise ValueError("a face needs 3 vertices")
                for k in range(1, len(idx) - 1):  # triangle fan
                    faces.append((idx[0], idx[k], idx[k + 1]))
                    for kind in NAME_KINDS:
                        labels[kind].append(current[kind])
            elif key == "g":
                set_name("group", " ".join(parts[1:]))
            elif key == "o":
                set_name("object", " ".join(parts[1:]))
                set_name("group", "")  # groups belong to the object they appear in
            elif key == "usemtl":
                set_name("material", " ".join(parts[1:]))
        except (ValueError, IndexError) as exc:
            raise InputError(f"{path}: line {lineno}: cannot read {key!r} record ({exc})") from None
    v = np.array(vertices, dtype=float).reshape(-1, 3)
    f = np.array(faces, dtype=np.int64).reshape(-1, 3)
    if f.size and (f.min() < 0 or f.max() >= len(v)):
        raise InputError(f"{path}: a face refers to a vertex that does not exist ({len(v)} vertices)")
    names = {kind: group_faces(np.array(labels[kind], dtype=np.int64), list(tables[kind])) for kind in NAME_KINDS}
    return LabeledMesh(v, f, names, str(path))


def _read_with_trimesh(path: Path, file_type: str) -> LabeledMesh:
    import trimesh

    try:
        scene = trimesh.load(str(path), file_type=file_type, force="scene", process=False)
    except Exception as exc:  # noqa: BLE001 - trimesh raises many kinds; the user needs one line
        raise InputError(f"{path}: cannot read {file_type.upper()} mesh ({type(exc).__name__}: {exc})") from None
    vertices, faces = [], []
    labels = {kind: {} for kind in NAME_KINDS}
    offset = 0
    start_face = 0
    for node in scene.graph.nodes_geometry:
        transform, geom_name = scene.graph[node]
        geom = scene.geometry.get(geom_name)
        if not isinstance(geom, trimesh.Trimesh) or len(geom.faces) == 0:
            continue
        v = trimesh.transformations.transform_points(np.asarray(geom.vertices, dtype=float), transform)
        f = np.asarray(geom.faces, dtype=np.int64) + offset
        vertices.append(v)
        faces.append(f)
        idx = np.arange(start_face, start_face + len(f))
        names_here = {"group": [node], "object": [node, geom_name]}
        material = getattr(getattr(geom.visual, "material", None), "name", None)
        if material:
            names_here["material"] = [material]
        if file_type in ("ply", "stl", "off"):
            names_here = {}  # trimesh invents names from the file name; the format has none
        for kind, these in names_here.items():
            for name in dict.fromkeys(these):
                if name:
                    labels[kind][name] = np.concatenate([labels[kind].get(name, np.empty(0, np.int64)), idx])
        offset += len(v)
        start_face += len(f)
    if not faces:
        raise InputError(f"{path}: the file has no triangles")
    return LabeledMesh(np.concatenate(vertices), np.concatenate(faces), labels, str(path))


def read_mesh(path: str | os.PathLike) -> LabeledMesh:
    """Read an OBJ, PLY, STL, OFF, glTF or GLB file; vertices stay in the file's unit and axes.

    Raises :class:`~lightpath.errors.InputError` for a missing, unreadable or empty file, an unknown suffix,
    or non-finite vertex coordinates.
    """
    path = Path(path)
    suffix = path.suffix.lower()
    if suffix not in MESH_FORMATS:
        raise InputError(f"{path}: unknown mesh format {suffix or '(none)'!r}; accepted: {', '.join(MESH_FORMATS)}")
    if not path.is_file():
        raise InputError(f"{path}: mesh file not found")
    kind = MESH_FORMATS[suffix]
    mesh = _read_obj(path) if kind == "obj" else _read_with_trimesh(path, kind)
    if len(mesh.faces) == 0:
        raise InputError(f"{path}: the file has no faces")
    bad = ~np.all(np.isfinite(mesh.vertices), axis=1)
    if np.any(bad):
        first = int(np.flatnonzero(bad)[0])
        raise InputError(f"{path}: {int(bad.sum())} vertices have non-finite coordinates (first: vertex {first + 1})")
    return mesh


def merge_meshes(meshes: list[LabeledMesh]) -> LabeledMesh:
    """Concatenate labeled meshes, keeping every name (faces of equal names are joined).

    >>> a = LabeledMesh(np.eye(3), np.array([[0, 1, 2]]), {"group": {"a": np.array([0])}})
    >>> m = merge_meshes([a, a])
    >>> m.faces.tolist(), m.names["group"]["a"].tolist()
    ([[0, 1, 2], [3, 4, 5]], [0, 1])
    """
    vertices, faces, names = [], [], {kind: {} for kind in NAME_KINDS}
    v_off = f_off = 0
    for m in meshes:
        vertices.append(m.vertices)
        faces.append(m.faces + v_off)
        for kind, table in m.names.items():
            for name, idx in table.items():
                names[kind][name] = np.concatenate([names[kind].get(name, np.empty(0, np.int64)), idx + f_off])
        v_off += len(m.vertices)
        f_off += len(m.faces)
    return LabeledMesh(np.concatenate(vertices), np.concatenate(faces), names, ", ".join(m.path for m in meshes))
