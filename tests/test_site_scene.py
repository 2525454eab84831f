"""Scene files: every way of naming target, opening and horizon, the warnings, and the bad inputs."""

import math

import numpy as np
import pytest

from lightpath.errors import InputError
from lightpath.scene import DEMO_SITES, demo_scene_path, load_scene, standard_pressure_mbar
from lightpath.site.builders import window_room
from lightpath.site.export import export_mesh, export_obj

BASE = """
[site]
label = "test room"
latitude_deg = 40.0
longitude_deg = -3.0
elevation_m = 700.0
timezone = "Europe/Madrid"

[model]
file = "room.obj"
unit = "m"
up_axis = "z"
north = "true"

[target]
groups = ["target"]

[opening]
groups = ["window"]
"""


@pytest.fixture(scope="module")
def room():
    return window_room(95.0)


@pytest.fixture
def folder(tmp_path, room):
    export_obj(room, tmp_path / "room.obj")
    return tmp_path


def write(folder, text, name="scene.toml"):
    path = folder / name
    path.write_text(text)
    return path


def test_basic_scene(folder, room):
    scene = load_scene(write(folder, BASE))
    assert scene.label == "test room"
    assert scene.observer.timezone == "Europe/Madrid"
    assert scene.observer.pressure_mbar == pytest.approx(standard_pressure_mbar(700.0), abs=0.01)
    # ICAO (1993) standard atmosphere table: 898.76 hPa at 1000 m, 794.95 hPa at 2000 m (from memory)
    assert standard_pressure_mbar(1000.0) == pytest.approx(898.76, abs=0.1)
    assert standard_pressure_mbar(2000.0) == pytest.approx(794.95, abs=0.1)
    assert scene.target.area == pytest.approx(room.target().area, rel=1e-6)
    assert scene.opening.area == pytest.approx(room.opening().area, rel=1e-6)
    # the opening never blocks: the mesh holds everything but the window pane
    assert len(scene.mesh.faces) == len(room.blocking_mesh().faces)
    assert scene.warnings == []
    assert len(scene.content_hash) == 64


def test_content_hash_follows_geometry(folder):
    a = load_scene(write(folder, BASE)).content_hash
    assert load_scene(write(folder, BASE.replace('label = "test room"', 'label = "renamed"'))).content_hash == a
    turned = BASE.replace('north = "true"', 'north = "true"\nrotation_deg = 1.0')
    assert load_scene(write(folder, turned)).content_hash != a


def test_magnetic_north_in_scene_turns_the_geometry(folder, room):
    text = BASE.replace('north = "true"', 'north = "magnetic"\ndeclination_deg = 5.0')
    scene = load_scene(write(folder, text))
    # the window's outward normal pointed to 95 deg in the file's frame; 5 deg E declination makes it 100 deg true
    n = scene.opening.face_normals[0]
    assert math.degrees(math.atan2(n[0], n[1])) % 360 == pytest.approx(100.0, abs=1e-3)  # OBJ keeps 6 decimals


def test_feet_and_scale_warning(folder):
    text = BASE.replace('unit = "m"', 'unit = "cm"')  # a 9 m room read as cm is 9 cm: implausible
    scene = load_scene(write(folder, text))
    assert any("implausible" in w and "if the file is in m" in w for w in scene.warnings)


def test_big_chamber_warning(tmp_path):
    big = window_room(90.0, depth_m=300.0)
    export_obj(big, tmp_path / "room.obj")
    scene = load_scene(write(tmp_path, BASE))
    assert any("largest extent" in w and "> 150 m" in w for w in scene.warnings)


def test_no_north_reference_warning(folder):
    scene = load_scene(write(folder, BASE.replace('north = "true"\n', "")))
    assert any("model.north not given" in w for w in scene.warnings)


def test_facing_away_warning_and_flip(folder):
    text = BASE.replace('groups = ["target"]', 'groups = ["target"]\nflip_normals = true')
    scene = load_scene(write(folder, text))
    assert any("faces away from every opening" in w for w in scene.warnings)


def test_no_opening_notice(folder):
    text = BASE.split("[opening]")[0]
    scene = load_scene(write(folder, text))
    assert scene.opening is None and any("no [opening]" in w for w in scene.warnings)


def test_target_by_box_and_by_file(folder, room):
    lo, hi = (room.target().bounds + [[-0.002], [0.002]]).round(4).tolist()
    by_box = BASE.replace('groups = ["target"]', f"box_min_m = {lo}\nbox_max_m = {hi}")
    scene = load_scene(write(folder, by_box))
    assert scene.target.area == pytest.approx(room.target().area, rel=1e-6)
    export_mesh(type(room)("t", {"target": room.target()}, (), "target", 0.0, np.eye(4)), folder / "niche.ply")
    by_file = BASE.replace('groups = ["target"]', 'file = "niche.ply"')
    scene = load_scene(write(folder, by_file))
    assert scene.target.area == pytest.approx(room.target().area, rel=1e-6)
    assert len(scene.mesh.faces) == len(room.blocking_mesh().faces) + 2  # the file's target is added


def test_opening_by_box(folder):
    text = BASE.replace('[opening]\ngroups = ["window"]', "[opening]\nbox_min_m = [0, 0, 1]\nbox_max_m = [1, 1, 2]")
    scene = load_scene(write(folder, text))
    assert scene.opening.volume == pytest.approx(1.0)


def test_horizon_flat_dip_csv(folder):
    scene = load_scene(write(folder, BASE + '\n[horizon]\nkind = "flat"\neye_height_m = 100.0\n'))
    assert scene.horizon.altitude_at(10.0) == pytest.approx(-1.76 * 10 / 60)  # Bowditch (2002) Table 22 formula
    (folder / "sky.csv").write_text("azimuth_deg,altitude_deg\n" + "".join(f"{a},{1.5}\n" for a in range(0, 360, 10)))
    scene = load_scene(write(folder, BASE + '\n[horizon]\nkind = "csv"\nfile = "sky.csv"\n'))
    assert scene.horizon.altitude_at(123.0) == pytest.approx(1.5)


def test_tolerances(folder):
    scene = load_scene(write(folder, BASE + "\n[tolerances]\nopening_azimuth_deg = 0.5\nepoch_years = 50\n"))
    assert scene.tolerances == {"opening_azimuth_deg": 0.5, "epoch_years": 50.0}


@pytest.mark.parametrize("name", sorted(DEMO_SITES))
def test_demo_sites_load_cleanly(name):
    path = demo_scene_path(name)
    scene = load_scene(path)
    assert scene.warnings == []
    assert scene.opening is not None and scene.report.target_area_m2 > 0
    size = sum(p.stat().st_size for p in path.parent.iterdir())
    assert size < 2_000_000
    assert {"scene.toml", "README.md", "horizon.csv"} <= {p.name for p in path.parent.iterdir()}


@pytest.mark.parametrize(
    "change, words",
    [
        (("latitude_deg = 40.0", "latitude = 40.0"), ["unknown key 'site.latitude'", "latitude_deg"]),
        (("[opening]", "[openings]"), ["unknown table [openings]", "opening"]),
        (("latitude_deg = 40.0\n", ""), ["missing key 'site.latitude_deg'"]),
        (('unit = "m"\n', ""), ["missing key 'model.unit'"]),
        (("latitude_deg = 40.0", "latitude_deg = 95.0"), ["site.latitude_deg", "-90..90"]),
        (("longitude_deg = -3.0", "longitude_deg = 200.0"), ["site.longitude_deg", "-180..180"]),
        (('file = "room.obj"', 'file = "nowhere.obj"'), ["nowhere.obj", "not found"]),
        (('groups = ["target"]', 'groups = ["targte"]'), ["'targte'", "did you mean 'target'", "window"]),
        (('unit = "m"', 'unit = "yards"'), ["model.unit", "'yards'", "ft"]),
        (('north = "true"', 'north = "magnetic"'), ["missing key 'model.declination_deg'"]),
        (('north = "true"', 'north = "true"\ndeclination_deg = 3.0'), ["declination_deg", "not 'magnetic'"]),
        (('timezone = "Europe/Madrid"', 'timezone = "Mars/Olympus"'), ["site.timezone", "IANA"]),
        (('groups = ["target"]', 'groups = ["target"]\nfile = "x.obj"'), ["exactly one of", "names and file"]),
        (('groups = ["window"]', 'groups = ["target"]'), ["same faces"]),
        (("latitude_deg = 40.0", 'latitude_deg = "forty"'), ["site.latitude_deg", "not an angle", "41°37'12\"N"]),
        (("[site]", "site = 3\n[place]"), ["'site' must be a table"]),
        (("[site]", "[place]\n[site]"), ["unknown table [place]"]),
        (
            ('groups = ["target"]', 'groups = ["target"]\nflip_normals = "yes"'),
            ["target.flip_normals", "true or false"],
        ),
        (('groups = ["target"]', 'groups = "target"\nbox_min_m = [0, 0]'), ["exactly one of"]),
        (('groups = ["window"]', "box_min_m = [0, 0]\nbox_max_m = [1, 1, 1]"), ["opening.box_min_m", "three"]),
        (('groups = ["window"]', "box_min_m = [1, 0, 0]\nbox_max_m = [0, 1, 1]"), ["below box_max_m"]),
        (('up_axis = "z"', 'up_axis = "up"'), ["model.up_axis", "'up'"]),
    ],
)
def test_bad_scene_inputs(folder, change, words):
    old, new = change
    assert old in BASE
    path = write(folder, BASE.replace(old, new, 1))
    with pytest.raises(InputError) as info:
        load_scene(path)
    message = str(info.value)
    assert "\n" not in message and "scene.toml" in message
    for word in words:
        assert word in message, message


def test_bad_toml_and_missing_scene(folder):
    with pytest.raises(InputError, match="not valid TOML"):
        load_scene(write(folder, "[site\nlatitude_deg = 1"))
    with pytest.raises(InputError, match="scene file not found"):
        load_scene(folder / "absent.toml")


def test_empty_target_and_non_finite_vertices(folder):
    (folder / "bad.obj").write_text("o a\nv 0 0 0\nv 1 0 nan\nv 0 1 0\ng target\nf 1 2 3\n")
    with pytest.raises(InputError, match="non-finite"):
        load_scene(write(folder, BASE.replace("room.obj", "bad.obj")))
    empty = BASE.replace('groups = ["target"]', "box_min_m = [100, 100, 100]\nbox_max_m = [101, 101, 101]")
    with pytest.raises(InputError, match="empty target"):
        load_scene(write(folder, empty))


def test_malformed_horizon_file(folder):
    (folder / "sky.csv").write_text("azimuth_deg,altitude_deg\n0,1\n90,one\n")
    with pytest.raises(InputError, match=r"sky.csv: line 3, column 2 \(altitude\): not an angle"):
        load_scene(write(folder, BASE + '\n[horizon]\nkind = "csv"\nfile = "sky.csv"\n'))


def test_unknown_names_list_the_available_ones(folder):
    with pytest.raises(InputError) as info:
        load_scene(write(folder, BASE.replace('groups = ["target"]', 'groups = ["altar"]')))
    for name in ("floor", "roof", "walls", "window", "target"):
        assert name in str(info.value)


def test_names_on_a_format_without_names(folder, room):
    export_mesh(room, folder / "room.ply")
    with pytest.raises(InputError, match="none"):
        load_scene(write(folder, BASE.replace("room.obj", "room.ply")))


def test_terrain_horizon_in_a_scene(tmp_path):
    """A ridge 400 m east, 30 m high, in the model's 'hills' group: horizon atan(H sin A / D) (closed form)."""
    import trimesh

    from lightpath.site.builders import ChamberModel

    room = window_room(95.0)
    D, H, L = 400.0, 30.0, 20_000.0
    v = [[D - H, -L, 0], [D, -L, H], [D + H, -L, 0], [D - H, L, 0], [D, L, H], [D + H, L, 0]]
    f = [[0, 1, 4], [0, 4, 3], [1, 2, 5], [1, 5, 4], [0, 3, 5], [0, 5, 2], [0, 2, 1], [3, 4, 5]]
    parts = dict(room.parts, hills=trimesh.Trimesh(v, f, process=False))
    model = ChamberModel("room", parts, room.opening_parts, "target", 95.0, room.local_to_site)
    export_obj(model, tmp_path / "room.obj")
    text = BASE + '\n[horizon]\nkind = "terrain"\ngroups = ["hills"]\nfrom_m = [0.0, 0.0, 0.0]\ncurvature = false\n'
    scene = load_scene(write(tmp_path, text))
    az = np.array([60.0, 90.0, 120.0])
    expected = np.degrees(np.arctan(H * np.sin(np.radians(az)) / D))
    assert scene.horizon.altitude_at(az) == pytest.approx(expected, abs=0.01)
    # the 40 km ridge is terrain: no scale warning; the west has no terrain: a note says so
    assert not any("largest extent" in w for w in scene.warnings)
    assert any("no terrain seen" in w for w in scene.warnings)


def test_scene_from_model_matches_the_file_route(folder, room):
    from lightpath.scene import scene_from_model

    from_file = load_scene(write(folder, BASE))
    direct = scene_from_model(room, from_file.observer)
    assert direct.report.triangles == from_file.report.triangles
    assert direct.target.area == pytest.approx(from_file.target.area, rel=1e-6)
    np.testing.assert_allclose(direct.mesh.bounds, from_file.mesh.bounds, atol=1e-5)


def test_glb_scene_y_up(tmp_path, room):
    from lightpath.site.export import export_glb

    export_glb(room, tmp_path / "room.glb")
    text = BASE.replace('file = "room.obj"', 'file = "room.glb"').replace('up_axis = "z"', 'up_axis = "y"')
    scene = load_scene(write(tmp_path, text))  # north_axis defaults to -z for a y-up file (glTF convention)
    assert scene.target.area == pytest.approx(room.target().area, rel=1e-5)
    np.testing.assert_allclose(scene.mesh.bounds, room.blocking_mesh().bounds, atol=1e-4)
    assert scene.warnings == []


def test_the_documented_examples_load(tmp_path):
    """The TOML examples in docs/scene-format.md are valid scenes (run beside the bent-passage demo's files)."""
    import re
    import shutil
    from pathlib import Path

    doc = (Path(__file__).resolve().parents[1] / "docs" / "scene-format.md").read_text()
    blocks = re.findall(r"```toml\n(.*?)```", doc, re.S)
    assert len(blocks) >= 2
    demo = demo_scene_path("larchfold").parent
    for name in ("larchfold.obj", "horizon.csv"):
        shutil.copy(demo / name, tmp_path / name)
    for i, block in enumerate(blocks):
        scene = load_scene(write(tmp_path, block, f"example{i}.toml"))
        assert scene.report.target_area_m2 > 0


def test_polygon_opening_and_bad_polygons(folder, room):
    pane = room.opening()
    corners = pane.vertices.round(6).tolist()
    text = BASE.replace('groups = ["window"]', f"polygon_m = {corners}")
    scene = load_scene(write(folder, text))
    assert scene.opening.area == pytest.approx(pane.area, rel=1e-5)
    assert len(scene.mesh.faces) == len(room.blocking_mesh().faces) + 2  # the window quad is still in the file
    bad = [
        ("polygon_m = [[0, 0, 0], [1, 0, 0]]", "at least 3 corners"),
        ("polygon_m = [[0, 0, 0], [1, 0, 0], [2, 0, 0]]", "no area"),
        ("polygon_m = [[0, 0, 0], [1, 0, 0], [1, 1, 0.5], [0, 1, 0]]", "off a plane"),
        ('polygon_m = "corners"', "corners"),
    ]
    for value, word in bad:
        with pytest.raises(InputError, match=word):
            load_scene(write(folder, BASE.replace('groups = ["window"]', value)))


def test_position_and_refraction_tolerances_reach_the_framing_test(folder):
    from lightpath.study.uncertainty import tolerances_from_table

    text = BASE + "\n[tolerances]\nopening_position_m = 0.05\ntarget_position_m = 0.02\nrefraction_deg = 0.0\n"
    scene = load_scene(write(folder, text))
    tol = tolerances_from_table(scene.tolerances)
    assert (tol.opening_position_m, tol.target_position_m, tol.refraction_deg) == (0.05, 0.02, 0.0)
    with pytest.raises(InputError, match="opening_position_m"):
        load_scene(write(folder, BASE + "\n[tolerances]\nopening_position_m = -1\n"))
