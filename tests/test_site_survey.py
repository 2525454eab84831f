"""Scenes built from survey numbers ([build] table) instead of a mesh file."""

import math

import pytest

from lightpath.errors import InputError
from lightpath.scene import load_scene
from lightpath.site.builders import Bend, Chamber, Slot, passage_chamber

PASSAGE = """
[site]
latitude_deg = 53.45
longitude_deg = -7.1

[build]
kind = "passage_chamber"
bearing_deg = 131.0
north = "magnetic"
declination_deg = 4.9
floor_slope_deg = 2.0
length_m = 16
width_m = 1.0
height_m = 1.6
chamber = {depth_m = 3.2, width_m = 3.0, height_m = 2.6, backstone = [-0.6, 0.6, 0.0, 1.2]}
slot = {width_m = 0.5, height_m = 0.3}
bend = {at_m = 8, angle_deg = 4}
"""


def write(tmp_path, text):
    path = tmp_path / "survey.toml"
    path.write_text(text)
    return path


def test_passage_from_survey_numbers(tmp_path):
    scene = load_scene(write(tmp_path, PASSAGE))
    # compass bearing 131° + 4.9° E declination = true 135.9° (common practice, no published source)
    same = passage_chamber(135.9, 2.0, 16.0, 1.0, 1.6, chamber=Chamber(3.2, 3.0, 2.6, (-0.6, 0.6, 0.0, 1.2)),
                           slot=Slot(0.5, 0.3), bend=Bend(8.0, 4.0))  # fmt: skip
    assert scene.report.triangles == len(same.blocking_mesh().faces)
    assert scene.target.area == pytest.approx(1.44)
    n = scene.opening.face_normals[0]
    assert math.degrees(math.atan2(n[0], n[1])) % 360 == pytest.approx(135.9)
    assert scene.warnings == []


def test_rooms_and_defaults(tmp_path):
    text = "[site]\nlatitude_deg = 30\nlongitude_deg = 31\n"
    text += '[build]\nkind = "slit_shrine"\nbearing_deg = 290\nnorth = "true"\n'
    scene = load_scene(write(tmp_path, text + "slit = {width_m = 0.05, height_m = 0.5, sill_m = 1.0}\n"))
    assert scene.opening.area == pytest.approx(0.025)
    text = (
        text.replace("slit_shrine", "window_room")
        + "niche = {width_m = 0.5, height_m = 0.5, depth_m = 0.3, sill_m = 1}"
    )
    assert load_scene(write(tmp_path, text)).target.area == pytest.approx(0.25)


def test_passage_without_chamber(tmp_path):
    scene = load_scene(write(tmp_path, PASSAGE.replace("chamber = {", "chamber = false\n# {")))
    assert scene.target.area == pytest.approx(1.0 * 1.6)


@pytest.mark.parametrize(
    "old, new, words",
    [
        ('kind = "passage_chamber"', 'kind = "tomb"', ["build.kind", "passage_chamber, slit_shrine, window_room"]),
        ("length_m = 16\n", "", ["missing key 'build.length_m'"]),
        ("length_m = 16", "lenght_m = 16", ["unknown key 'build.lenght_m'", "length_m"]),
        ("slot = {width_m", "slot = {widht_m", ["build.slot.widht_m", "width_m"]),
        ('north = "magnetic"\n', "", ["missing key 'build.north'"]),
        ("declination_deg = 4.9\n", "", ["missing key 'build.declination_deg'"]),
        ("length_m = 16", "length_m = -16", ["[build]", "length_m"]),
        ("bend = {at_m = 8", "bend = {at_m = 80", ["[build]", "bend"]),
        ("[build]", '[model]\nfile = "x.obj"\n[build]', ["not both"]),
        ("width_m = 1.0", 'width_m = "wide"', ["build.width_m", "finite number"]),
    ],
)
def test_bad_survey_inputs(tmp_path, old, new, words):
    assert old in PASSAGE
    with pytest.raises(InputError) as info:
        load_scene(write(tmp_path, PASSAGE.replace(old, new, 1)))
    message = str(info.value)
    assert "survey.toml" in message and "\n" not in message
    for word in words:
        assert word in message, message
