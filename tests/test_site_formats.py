"""Every mesh format loads the same builder geometry identically (after conversion to ENU metres)."""

import numpy as np
import pytest
import trimesh

from lightpath.site.builders import window_room
from lightpath.site.export import ENU_TO_GLTF, export_glb, export_mesh, export_obj
from lightpath.site.frames import apply_transform, model_to_site_matrix
from lightpath.site.meshes import merge_meshes, read_mesh


def canonical_triangles(vertices, faces, decimals=4):
    """Triangles as sorted rows of 9 rounded coordinates, each rotated to start at its smallest vertex
    (winding kept), so that two meshes with the same triangles compare equal whatever their vertex order."""
    tri = np.round(np.asarray(vertices)[np.asarray(faces)], decimals) + 0.0  # (F, 3, 3)
    keys = tri[:, :, 0] * 1e8 + tri[:, :, 1] * 1e4 + tri[:, :, 2]
    start = np.argmin(keys, axis=1)
    order = (start[:, None] + np.arange(3)) % 3
    rolled = np.take_along_axis(tri, order[:, :, None], axis=1).reshape(-1, 9)
    return rolled[np.lexsort(rolled.T[::-1])]


@pytest.fixture(scope="module")
def model():
    return window_room(95.0)


@pytest.fixture(scope="module")
def reference(model):
    merged = trimesh.util.concatenate(list(model.parts.values()))
    return canonical_triangles(merged.vertices, merged.faces)


def load_enu(path, **frame):
    raw = read_mesh(path)
    v, f = apply_transform(raw.vertices, raw.faces, model_to_site_matrix("m", **frame))
    return raw, canonical_triangles(v, f)


@pytest.mark.parametrize("suffix", ["obj", "ply", "stl", "off"])
def test_z_up_formats_match(tmp_path, model, reference, suffix):
    path = tmp_path / f"room.{suffix}"
    export_obj(model, path) if suffix == "obj" else export_mesh(model, path)
    raw, got = load_enu(path, up_axis="z", north_axis="y")
    assert got.shape == reference.shape
    # STL stores float32: 1e-4 m is far above its rounding for a 10 m model and far below any detail
    np.testing.assert_allclose(got, reference, atol=2e-4)
    if suffix == "obj":
        assert sorted(raw.names["group"]) == sorted(model.parts)
    else:
        assert all(not names for names in raw.names.values())  # these formats carry no names


def test_glb_matches_with_y_up(tmp_path, model, reference):
    path = export_glb(model, tmp_path / "room.glb")
    raw, got = load_enu(path, up_axis="y", north_axis="-z")
    np.testing.assert_allclose(got, reference, atol=2e-4)
    assert sorted(raw.names["group"]) == sorted(model.parts)


def test_gltf_with_node_transforms_flattened(tmp_path):
    """A node translation in the glTF scene graph ends up in the vertices."""
    scene = trimesh.Scene()
    box = trimesh.creation.box(extents=(1.0, 1.0, 1.0))
    shift = trimesh.transformations.translation_matrix((10.0, 0.0, -5.0))
    scene.add_geometry(box, geom_name="block", node_name="moved_block", transform=shift)
    files = trimesh.exchange.gltf.export_gltf(scene, embed_buffers=True)
    path = tmp_path / "scene.gltf"
    path.write_bytes(files["model.gltf"])
    raw = read_mesh(path)
    np.testing.assert_allclose(raw.vertices.mean(axis=0), (10.0, 0.0, -5.0), atol=1e-6)
    assert "moved_block" in raw.names["group"] and "block" in raw.names["object"]


def test_obj_groups_objects_materials_and_polygons(tmp_path):
    text = (
        "mtllib none.mtl\n"
        "o stones\nv 0 0 0\nv 1 0 0\nv 1 1 0\nv 0 1 0\nv 0 0 1\n"
        "g floor\nusemtl granite\nf 1/1/1 2/2/2 3/3/3 4/4/4\n"  # a quad: two triangles
        "g back wall\nusemtl limestone\nf -5 -4 -1\n"  # negative indices, a name with a space
        "o cap\nf 1 3 5\n"
    )
    path = tmp_path / "parts.obj"
    path.write_text(text)
    raw = read_mesh(path)
    assert raw.faces.tolist() == [[0, 1, 2], [0, 2, 3], [0, 1, 4], [0, 2, 4]]
    assert {k: v.tolist() for k, v in raw.names["group"].items()} == {"floor": [0, 1], "back wall": [2]}
    assert {k: v.tolist() for k, v in raw.names["object"].items()} == {"stones": [0, 1, 2], "cap": [3]}
    assert {k: v.tolist() for k, v in raw.names["material"].items()} == {"granite": [0, 1], "limestone": [2, 3]}


def test_merge_keeps_names(model, tmp_path):
    a = read_mesh(export_obj(model, tmp_path / "a.obj"))
    both = merge_meshes([a, a])
    assert len(both.faces) == 2 * len(a.faces)
    assert both.names["group"]["target"].tolist() == [
        *a.names["group"]["target"],
        *(a.names["group"]["target"] + len(a.faces)),
    ]


def test_enu_to_gltf_is_a_rotation():
    assert np.linalg.det(ENU_TO_GLTF[:3, :3]) == pytest.approx(1.0)
    assert (ENU_TO_GLTF[:3, :3] @ [0.0, 0.0, 1.0]).tolist() == [0.0, 1.0, 0.0]  # up -> +y
    assert (ENU_TO_GLTF[:3, :3] @ [0.0, 1.0, 0.0]).tolist() == [0.0, 0.0, -1.0]  # north -> -z


def test_bulk_and_line_obj_readers_agree(tmp_path):
    from lightpath.site.meshes import _read_obj_lines
    from lightpath.site.objfile import read_obj_arrays

    text = (
        "# a comment\r\nmtllib x.mtl\r\nv 0 0 0\r\nv 1 0 0 1.0\r\nv 1 1 0\r\nv 0 1 0\r\nvt 0 0\r\nvn 0 0 1\r\n"
        "o first\r\ng a\r\nusemtl m1\r\nf 1/1/1 2/1/1 3/1/1 4/1/1\r\ng\r\nf 1 3 4 # trailing comment\r\n"
        "o second\r\nusemtl m2\r\nf 2 3 4\r\ng b c\r\nf 1 2 3 4 \r\n"
    )
    path = tmp_path / "x.obj"
    path.write_text(text)
    bulk = read_mesh(path)
    lines = _read_obj_lines(path, text)
    assert read_obj_arrays(text) is not None  # the bulk reader took it
    assert np.array_equal(bulk.faces, lines.faces) and np.array_equal(bulk.vertices, lines.vertices)
    for kind in ("group", "object", "material"):
        assert {k: v.tolist() for k, v in bulk.names[kind].items()} == {
            k: v.tolist() for k, v in lines.names[kind].items()
        }
    assert {k: v.tolist() for k, v in bulk.names["group"].items()} == {"a": [0, 1], "b c": [4, 5]}
    assert read_obj_arrays("v 0 0 0\nv 1 0 0\nv 0 1 0\nf -3 -2 -1\n") is None  # negative: line reader


def test_malformed_obj_names_the_line(tmp_path):
    from lightpath.errors import InputError

    path = tmp_path / "bad.obj"
    path.write_text("v 0 0 0\nv 1 0 zero\nv 0 1 0\nf 1 2 3\n")
    with pytest.raises(InputError, match="line 2"):
        read_mesh(path)
    path.write_text("v 0 0 0\nv 1 0 0\nf 1 2\n")
    with pytest.raises(InputError, match="line 3"):
        read_mesh(path)
    path.write_text("v 0 0 0\nv 1 0 0\nv 0 1 0\nf 1 2 9\n")
    with pytest.raises(InputError, match="does not exist"):
        read_mesh(path)
