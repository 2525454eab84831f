"""Parametric chambers: closed (no light leaks except through the opening), aimed, sized and exported."""

import math

import numpy as np
import pytest

from lightpath.site.builders import Bend, Chamber, Niche, Slot, passage_chamber, slit_shrine, window_room
from lightpath.site.export import export_glb, export_obj
from lightpath.site.meshes import read_mesh
from lightpath.site.sampling import sample_target

MODELS = {
    "passage": lambda: passage_chamber(135.0, 2.0, 15.0, 1.0, 1.6),
    "passage_bent_left": lambda: passage_chamber(60.0, 3.0, 14.0, 1.0, 1.5, bend=Bend(6.0, 15.0)),
    "passage_bent_right_no_chamber": lambda: passage_chamber(
        200.0, -1.0, 12.0, 0.9, 1.4, bend=Bend(5.0, -20.0), chamber=None
    ),
    "passage_open_door": lambda: passage_chamber(100.0, 0.0, 8.0, 1.0, 1.6, door_closed=False),
    "shrine": lambda: slit_shrine(290.0),
    "window": lambda: window_room(95.0),
}


def air_points(model, rng):
    """Points known to be in the air inside: in front of the target, and just inside the opening."""
    s = sample_target(model.target(), count=150, seed=1, offset_m=0.05)
    pane = model.opening()
    inward = -pane.face_normals[0]
    near_opening = pane.vertices.mean(axis=0) + (0.25 + rng.random((50, 1)) * 0.1) * inward
    return np.vstack([s.points_m, near_opening])


@pytest.mark.parametrize("name", sorted(MODELS))
def test_no_leaks_except_through_the_opening(name):
    model = MODELS[name]()
    solid, pane = model.blocking_mesh(), model.opening()
    rng = np.random.default_rng(0)
    origins = air_points(model, rng)
    # random directions, plus directions aimed exactly at every vertex and edge midpoint of the solids
    # (shared edges and corners are where single-precision ray casters leak)
    targets = np.vstack([solid.vertices, solid.vertices[solid.edges_unique].mean(axis=1)])
    dirs = [rng.normal(size=(len(origins) * 40, 3))]
    o = [np.repeat(origins, 40, axis=0)]
    pick = rng.choice(len(origins), size=len(targets))
    o.append(origins[pick])
    dirs.append(targets - origins[pick])
    o, d = np.vstack(o), np.vstack(dirs)
    d /= np.linalg.norm(d, axis=1)[:, None]
    escaped = ~solid.ray.intersects_any(o, d)
    through = pane.ray.intersects_any(o, d)
    assert np.sum(escaped & ~through) == 0, f"{np.sum(escaped & ~through)} rays leak out of {name}"
    assert np.sum(escaped) > 0 or name.startswith("passage_bent"), "no light gets in at all"


def test_target_sees_the_sky_through_the_opening():
    model = MODELS["window"]()
    s = sample_target(model.target(), count=200, seed=0)
    d = model.opening().vertices.mean(axis=0) - s.points_m
    d /= np.linalg.norm(d, axis=1)[:, None]
    assert np.mean(~model.blocking_mesh().ray.intersects_any(s.points_m, d)) > 0.5


def angle_between(a_deg, b_deg):
    return abs((a_deg - b_deg + 180.0) % 360.0 - 180.0)


@pytest.mark.parametrize("azimuth", [0.0, 72.5, 135.0, 290.0])
def test_opening_faces_the_azimuth(azimuth):
    for model in (passage_chamber(azimuth, 0.0, 10.0, 1.0, 1.5), slit_shrine(azimuth), window_room(azimuth)):
        n = model.opening().face_normals[0]
        assert angle_between(math.degrees(math.atan2(n[0], n[1])), azimuth) == pytest.approx(0.0, abs=1e-9)
        assert model.axis_azimuth_deg == azimuth
        t = model.target().face_normals[0]  # the target faces back toward the opening
        assert angle_between(math.degrees(math.atan2(t[0], t[1])), azimuth) == pytest.approx(0.0, abs=1e-9)


def test_passage_floor_slope_and_chamber_level():
    L, s = 15.0, 3.0
    model = passage_chamber(90.0, s, L, 1.0, 1.6, chamber=Chamber(3.0, 3.0, 2.5, backstone=(-0.5, 0.5, 0.0, 1.0)))
    target = model.target()
    # the chamber floor is level at the passage's end height L·sin(s); the backstone starts there
    assert target.vertices[:, 2].min() == pytest.approx(L * math.sin(math.radians(s)), abs=1e-9)
    assert target.area == pytest.approx(1.0)
    # the slot's top is at the passage roof (pitched by s at the entrance)
    slot = model.parts["slot"]
    assert slot.area == pytest.approx(0.6 * 0.25, rel=1e-9)


def test_window_room_niche_and_sizes():
    m = window_room(90.0, window=Slot(0.3, 0.5, 1.5), niche=Niche(0.5, 0.7, 0.3, 1.0))
    assert m.target().area == pytest.approx(0.35)
    assert m.opening().area == pytest.approx(0.15)
    with pytest.raises(ValueError, match="niche"):
        window_room(90.0, niche=Niche(depth_m=5.0))
    with pytest.raises(ValueError, match="positive"):
        passage_chamber(90.0, 0.0, -3.0, 1.0, 1.5)


def test_exports_keep_part_names(tmp_path):
    model = MODELS["passage_bent_left"]()
    for path in (export_obj(model, tmp_path / "p.obj"), export_glb(model, tmp_path / "p.glb")):
        raw = read_mesh(path)
        assert sorted(raw.names["group"]) == sorted(model.parts)
        assert len(raw.faces) == sum(len(p.faces) for p in model.parts.values())
