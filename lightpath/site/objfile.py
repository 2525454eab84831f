"""A fast, array-based reader for Wavefront OBJ meshes that keeps group, object and material names.

The text is split at its ``g``/``o``/``usemtl`` lines; in each piece regular expressions pull out the ``v``
and ``f`` records in bulk, and every face in it carries the names in force there (an ``o`` line ends the
current group).  Polygons are split into triangle fans with numpy.  Files this reader cannot take
in bulk (negative vertex indices, malformed records) return None and the line-by-line reader in
:mod:`lightpath.site.meshes` reads them with line-numbered messages.

>>> v, f, labels, tables = read_obj_arrays("v 0 0 0\\nv 1 0 0\\nv 1 1 0\\nv 0 1 0\\ng top\\nf 1 2 3 4\\n")
>>> f.tolist(), labels["group"].tolist(), tables["group"]
([[0, 1, 2], [0, 2, 3]], [0, 0], ['top'])

References
----------
Wavefront Technologies (1992). *Object Files (.obj)*, Appendix B1 of the Advanced Visualizer manual
(``v``, ``f``, ``g``, ``o``, ``usemtl`` records; 1-based and negative vertex indices).
"""

from __future__ import annotations

import re

import numpy as np

__all__ = ["read_obj_arrays", "group_faces"]

_COMMENT = re.compile(r"#[^\n]*")
_VERTEX = re.compile(r"^v[ \t]+(\S+)[ \t]+(\S+)[ \t]+(\S+)", re.M)
_FACE = re.compile(r"^f[ \t]+([^\n]*)", re.M)
_LABEL = re.compile(r"^(g|o|usemtl)(?:[ \t]+([^\n]*?))?[ \t]*$", re.M)
_SLASHES = re.compile(r"/\S*")
_KINDS = {"g": "group", "o": "object", "usemtl": "material"}


def group_faces(labels: np.ndarray, names: list[str]) -> dict[str, np.ndarray]:
    """``{name: face indices}`` from per-face label ids (−1 = none), in O(F log F).

    >>> {k: v.tolist() for k, v in group_faces(np.array([1, -1, 0, 1]), ["a", "b"]).items()}
    {'a': [2], 'b': [0, 3]}
    """
    order = np.argsort(labels, kind="stable")
    sorted_labels = labels[order]
    out = {}
    for i, name in enumerate(names):
        lo, hi = np.searchsorted(sorted_labels, [i, i + 1])
        if hi > lo:
            out[name] = order[lo:hi]
    return out


def read_obj_arrays(text: str):
    """(vertices (V,3), faces (F,3), labels {kind: (F,) ids}, tables {kind: [names]}) or None.

    None means "not in bulk": negative indices, a malformed number, or a face with fewer than 3 vertices.
    """
    text = text.replace("\r", "")
    if "#" in text:
        text = _COMMENT.sub("", text)
    # split at the label lines: [chunk, key, name, chunk, key, name, ..., chunk]; faces in a chunk share labels
    pieces = _LABEL.split(text)
    tables: dict[str, list[str]] = {kind: [] for kind in _KINDS.values()}
    ids: dict[str, dict[str, int]] = {kind: {} for kind in _KINDS.values()}
    current = {kind: -1 for kind in _KINDS.values()}
    vertex_rows, face_strings, chunk_labels, chunk_sizes = [], [], [], []
    for i in range(0, len(pieces), 3):
        if i:
            kind = _KINDS[pieces[i - 2]]
            name = " ".join((pieces[i - 1] or "").split())
            if name and name not in ids[kind]:
                ids[kind][name] = len(tables[kind])
                tables[kind].append(name)
            current[kind] = ids[kind][name] if name else -1
            if kind == "object":
                current["group"] = -1  # a new object ends the current group
        chunk = pieces[i]
        vertex_rows += _VERTEX.findall(chunk)
        these = _FACE.findall(chunk)
        face_strings += these
        chunk_sizes.append(len(these))
        chunk_labels.append([current[kind] for kind in tables])
    try:
        vertices = np.array(vertex_rows, dtype=float).reshape(-1, 3)
    except ValueError:
        return None
    face_text = "\n".join(face_strings)
    if "-" in face_text:
        return None  # relative (negative) indices need the line-by-line reader
    face_text = _SLASHES.sub("", face_text)
    counts = np.array([len(line.split()) for line in face_text.split("\n")] if face_strings else [], dtype=np.int64)
    if np.any(counts < 3):
        return None
    try:
        flat = np.array(face_text.split(), dtype=np.int64) - 1
    except ValueError:
        return None
    # triangle fans: polygon p with n vertices gives triangles (0, k, k+1), k = 1..n-2
    starts = np.concatenate([[0], np.cumsum(counts)[:-1]]).astype(np.int64)
    n_tri = counts - 2
    poly = np.repeat(np.arange(len(counts)), n_tri)
    k = np.arange(int(n_tri.sum())) - np.repeat(np.cumsum(n_tri) - n_tri, n_tri) + 1
    first = starts[poly]
    if len(poly):
        faces = np.stack([flat[first], flat[first + k], flat[first + k + 1]], axis=1)
    else:
        faces = np.empty((0, 3), dtype=np.int64)
    per_poly = np.repeat(np.array(chunk_labels, dtype=np.int64).reshape(-1, len(tables)), chunk_sizes, axis=0)
    labels = {kind: per_poly[poly, j] for j, kind in enumerate(tables)}
    return vertices, faces.astype(np.int64), labels, tables
