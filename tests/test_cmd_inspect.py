"""``lightpath inspect``: text and JSON output, warnings, and exit code 2 on bad input."""

import json
import subprocess
import sys

import pytest

from lightpath.cli import main
from lightpath.scene import demo_scene_path
from lightpath.site.builders import window_room
from lightpath.site.export import export_obj


def test_text_output_on_a_demo(capsys):
    assert main(["inspect", str(demo_scene_path("larchfold")), "--samples", "300"]) == 0
    out = capsys.readouterr().out
    for word in ("Larchfold", "east, north, up", "target", "opening", "samples   300", "horizon", "warnings  none"):
        assert word in out


def test_json_output(capsys):
    assert main(["inspect", str(demo_scene_path("quillfield")), "--json", "--samples", "64", "--seed", "3"]) == 0
    data = json.loads(capsys.readouterr().out)
    assert data["samples"]["count"] == 64 and data["samples"]["seed"] == 3
    assert data["target"]["area_m2"] == pytest.approx(0.35, abs=1e-4)  # the niche, 0.5 m × 0.7 m (site.builders)
    assert data["site"]["timezone"] == "America/Chicago"
    assert data["opening"]["seen_from_target_azimuth_deg"] == pytest.approx(93.8, abs=2.0)  # its README
    assert len(data["content_hash"]) == 64 and data["warnings"] == []


def test_warnings_are_printed(tmp_path, capsys):
    export_obj(window_room(90.0, depth_m=300.0), tmp_path / "big.obj")
    (tmp_path / "s.toml").write_text(
        '[site]\nlatitude_deg = 10\nlongitude_deg = 10\n[model]\nfile = "big.obj"\nunit = "m"\nup_axis = "z"\n'
        '[target]\ngroups = ["target"]\nflip_normals = true\n[opening]\ngroups = ["window"]\n'
    )
    assert main(["inspect", str(tmp_path / "s.toml")]) == 0
    out = capsys.readouterr().out
    assert "largest extent" in out and "model.north not given" in out and "faces away" in out


def test_bad_input_exits_2_without_traceback(tmp_path):
    (tmp_path / "s.toml").write_text('[site]\nlatitude_deg = 100\nlongitude_deg = 0\n[model]\nfile = "x.obj"\n')
    proc = subprocess.run(
        [sys.executable, "-m", "lightpath", "inspect", str(tmp_path / "s.toml")], capture_output=True, text=True
    )
    assert proc.returncode == 2
    assert "Traceback" not in proc.stderr and "s.toml" in proc.stderr
    assert len(proc.stderr.strip().splitlines()) == 1


def test_missing_scene_and_bad_samples(tmp_path, capsys):
    assert main(["inspect", str(tmp_path / "none.toml")]) == 2
    assert "scene file not found" in capsys.readouterr().err
    assert main(["inspect", str(demo_scene_path("sandwren")), "--samples", "0"]) == 2


GOOD = (
    '[site]\nlatitude_deg = 40\nlongitude_deg = 10\n[model]\nfile = "room.obj"\nunit = "m"\nup_axis = "z"\n'
    'north = "true"\n[target]\ngroups = ["target"]\n[opening]\ngroups = ["window"]\n'
)


@pytest.mark.parametrize(
    "old, new, word",
    [
        ("latitude_deg = 40", "latitud_deg = 40", "did you mean 'latitude_deg'"),
        ('unit = "m"\n', "", "missing key 'model.unit'"),
        ('"room.obj"', '"gone.obj"', "mesh file not found"),
        ('["target"]', '["niche"]', "the file's group names: floor, roof, target, walls, window"),
        ("latitude_deg = 40", "latitude_deg = -91", "-90..90"),
        ("longitude_deg = 10", "longitude_deg = 181", "-180..180"),
        ('["target"]', '["target"]\n[horizon]\nkind = "csv"\nfile = "bad.csv"', "bad.csv: line 2"),
        ('"room.obj"', '"nan.obj"', "non-finite"),
        ('groups = ["target"]', "box_min_m = [50, 50, 50]\nbox_max_m = [51, 51, 51]", "empty target"),
    ],
)
def test_bad_inputs_exit_2(tmp_path, capsys, old, new, word):
    export_obj(window_room(90.0), tmp_path / "room.obj")
    (tmp_path / "bad.csv").write_text("azimuth_deg,altitude_deg\n0,?\n")
    (tmp_path / "nan.obj").write_text("v 0 0 0\nv 1 0 0\nv 0 inf 0\ng target\nf 1 2 3\n")
    assert old in GOOD
    (tmp_path / "s.toml").write_text(GOOD.replace(old, new, 1))
    assert main(["inspect", str(tmp_path / "s.toml")]) == 2
    err = capsys.readouterr().err
    assert word in err and len(err.strip().splitlines()) == 1, err


def test_leak_check_finds_a_missing_roof(tmp_path, capsys):
    from lightpath.site.builders import ChamberModel

    room = window_room(90.0)
    roofless = ChamberModel("room", {k: v for k, v in room.parts.items() if k != "roof"}, ("window",), "target",
                            90.0, room.local_to_site)  # fmt: skip
    export_obj(roofless, tmp_path / "room.obj")
    (tmp_path / "s.toml").write_text(GOOD)
    assert main(["inspect", str(tmp_path / "s.toml"), "--json", "--samples", "200"]) == 0
    data = json.loads(capsys.readouterr().out)
    assert data["leak_check"]["leak_share"] > 0.01  # the niche sees the open roof
    assert any(w.startswith("light leaks") for w in data["warnings"])


@pytest.mark.parametrize("shift_m, covered", [(0.004, False), (-0.006, True)])
def test_surveyed_polygon_target_and_covered_check(tmp_path, capsys, shift_m, covered):
    room = window_room(90.0)
    export_obj(room, tmp_path / "room.obj")
    quad = room.target()
    corners = (quad.vertices + shift_m * quad.face_normals[0]).round(6).tolist()  # in order, normal into the room
    text = GOOD.replace('groups = ["target"]', f"polygon_m = {corners}")
    (tmp_path / "s.toml").write_text(text)
    assert main(["inspect", str(tmp_path / "s.toml"), "--json", "--samples", "100"]) == 0
    data = json.loads(capsys.readouterr().out)
    assert data["target"]["area_m2"] == pytest.approx(quad.area, rel=1e-6)
    assert (data["samples"]["covered_share"] > 0.9) is covered
    assert any(w.startswith("target covered") for w in data["warnings"]) is covered
