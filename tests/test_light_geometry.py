"""Ray backend, sky windows and the Sun's disc, checked against closed forms.

Every expected value here is geometry worked out on paper (closed forms), not
from an outside program: a ray leaves a closed box only through its hole; a ray
from the centre of a tube's far end leaves the tube iff its angle from the axis
is under atan(radius / length); two overlapping circles share the lens area
given by the standard circle-circle intersection formula (e.g. Weisstein,
MathWorld, "Circle-Circle Intersection", eq. 14).
"""

from __future__ import annotations

import math

import numpy as np
import pytest
import trimesh

from lightpath.light.disc import SEMIDIAMETER_DEG, disc_fraction, horizon_fraction, lit_area, meets
from lightpath.light.grid import SkyGrid, enu_from_hadec, hadec_from_enu
from lightpath.light.rays import RayCaster, escapes, origin_offset_m
from lightpath.light.window import compute_window, load_window


def _quad(a, b, c, d):
    return [[a, b, c], [a, c, d]]


def pinhole_box(size=2.0, hole=0.2):
    """A closed cube [-s/2, s/2]³ whose top face has a square hole of side ``hole`` at its centre."""
    s, h = size / 2, hole / 2
    v = []

    def add(*pts):
        base = len(v)
        v.extend(pts)
        return [base + i for i in range(len(pts))]

    faces = []
    # bottom and four sides (outward normals), each as two triangles sharing a diagonal
    for quad in (
        [(-s, -s, -s), (-s, s, -s), (s, s, -s), (s, -s, -s)],
        [(-s, -s, -s), (s, -s, -s), (s, -s, s), (-s, -s, s)],
        [(s, -s, -s), (s, s, -s), (s, s, s), (s, -s, s)],
        [(s, s, -s), (-s, s, -s), (-s, s, s), (s, s, s)],
        [(-s, s, -s), (-s, -s, -s), (-s, -s, s), (-s, s, s)],
    ):
        faces += _quad(*add(*quad))
    # top: a frame of four trapezoids around the hole
    outer = [(-s, -s, s), (s, -s, s), (s, s, s), (-s, s, s)]
    inner = [(-h, -h, s), (h, -h, s), (h, h, s), (-h, h, s)]
    for k in range(4):
        a, b = outer[k], outer[(k + 1) % 4]
        c, d = inner[(k + 1) % 4], inner[k]
        faces += _quad(*add(a, b, c, d))
    mesh = trimesh.Trimesh(vertices=np.array(v, float), faces=np.array(faces), process=True)
    return mesh


def test_closed_box_leaks_only_through_the_hole():
    """Many rays aimed exactly at shared edges and vertices: none escapes except through the hole."""
    mesh = pinhole_box()
    rng = np.random.default_rng(1)
    verts = mesh.vertices[mesh.edges_unique]
    t = rng.random((len(verts), 800))
    targets = (verts[:, None, 0] * (1 - t[..., None]) + verts[:, None, 1] * t[..., None]).reshape(-1, 3)
    targets = np.vstack([targets, mesh.vertices])
    origins = rng.uniform(-0.9, 0.9, size=(len(targets), 3))
    origins[: len(origins) // 2] = [0.0, 0.0, -0.5]  # half from one point
    d = targets - origins
    out = escapes(mesh, origins, d)
    # where each ray meets the top plane z = 1: only rays through the hole (rim included) may escape
    tz = (1.0 - origins[:, 2]) / d[:, 2]
    with np.errstate(invalid="ignore", divide="ignore"):
        x = origins[:, 0] + tz * d[:, 0]
        y = origins[:, 1] + tz * d[:, 1]
    through = (d[:, 2] > 0) & (np.abs(x) <= 0.1 + 1e-6) & (np.abs(y) <= 0.1 + 1e-6)  # the rim counts as hole
    assert len(d) > 20_000
    assert not np.any(out & ~through), f"{np.sum(out & ~through)} rays leaked through edges or vertices"


def test_rays_through_the_hole_escape_and_origins_do_not_hit_their_own_surface():
    mesh = pinhole_box()
    off = origin_offset_m(mesh)
    assert off == pytest.approx(1e-3)
    # origins on the floor, pushed up by the offset, toward the hole's interior
    rng = np.random.default_rng(2)
    floor = np.column_stack([rng.uniform(-0.05, 0.05, 2000), rng.uniform(-0.05, 0.05, 2000), np.full(2000, -1.0)])
    goal = np.column_stack([rng.uniform(-0.09, 0.09, 2000), rng.uniform(-0.09, 0.09, 2000), np.ones(2000)])
    origins = floor + [0.0, 0.0, off]
    assert escapes(mesh, origins, goal - floor).all()
    # grazing rays along the floor (nearly parallel to it) hit a wall, not the floor at their start
    caster = RayCaster(mesh)
    assert not caster.escapes(origins, np.tile([1.0, 0.0, 1e-4], (2000, 1))).any()


def test_numpy_backend_agrees_with_embree():
    mesh = pinhole_box()
    rng = np.random.default_rng(3)
    o = rng.uniform(-0.8, 0.8, size=(300, 3))
    d = rng.normal(size=(300, 3)) + [0, 0, 2.0]
    slow = escapes(mesh, o, d, backend="numpy")
    assert 0 < slow.sum() < len(slow)
    assert np.array_equal(slow, escapes(mesh, o, d, backend="embree"))


def tube_scene(latitude_deg, hour_angle_deg, declination_deg, length_m=30.0, radius_m=0.3, sections=256):
    """A long capped tube whose axis points at (H, δ) of the site grid; returns mesh, opening, axis, end point."""
    axis = enu_from_hadec(latitude_deg, hour_angle_deg, declination_deg)
    tube = trimesh.creation.annulus(r_min=radius_m, r_max=radius_m + 0.2, height=length_m, sections=sections)
    cap = trimesh.creation.cylinder(radius=radius_m + 0.2, height=0.2, sections=sections)
    cap.apply_translation([0, 0, -length_m / 2 - 0.1])
    mesh = trimesh.util.concatenate([tube, cap])
    opening = trimesh.creation.cylinder(radius=radius_m, height=0.01, sections=sections)
    opening.apply_translation([0, 0, length_m / 2])
    rot = trimesh.geometry.align_vectors([0, 0, 1], axis)
    mesh.apply_transform(rot)
    opening.apply_transform(rot)
    return mesh, opening, axis, -axis * length_m / 2


@pytest.mark.parametrize("use_opening", [True, False])
def test_tube_window_matches_its_angular_radius(use_opening):
    lat = 52.0
    mesh, opening, axis, end = tube_scene(lat, -60.0, 10.0)
    w = compute_window(mesh, end[None], axis[None], [1.0], lat, opening=opening if use_opening else None)
    theta = math.degrees(math.atan(0.3 / 30.0))
    nh, nd = w.escape.shape[1:]
    i, j = np.meshgrid(np.arange(nh), np.arange(nd), indexing="ij")
    ang = np.degrees(np.arccos(np.clip(w.grid.directions(w.h0[0] + i, w.d0[0] + j) @ axis, -1, 1)))
    expected = ang < theta
    far = np.abs(ang - theta) > 0.01  # cells whose centre is not on the (256-gon) rim
    assert expected.sum() > 300
    assert np.array_equal(w.escape[0][far], expected[far])


def _lens_fraction(big_r, small_r, d):
    """Fraction of the small circle inside the big one, centres ``d`` apart (circle-circle intersection)."""
    if d >= big_r + small_r:
        return 0.0
    if d <= big_r - small_r:
        return 1.0
    a1 = small_r**2 * math.acos((d * d + small_r**2 - big_r**2) / (2 * d * small_r))
    a2 = big_r**2 * math.acos((d * d + big_r**2 - small_r**2) / (2 * d * big_r))
    a3 = 0.5 * math.sqrt((-d + small_r + big_r) * (d + small_r - big_r) * (d - small_r + big_r) * (d + small_r + big_r))
    return (a1 + a2 - a3) / (math.pi * small_r**2)


def test_disc_fraction_is_the_lens_area_of_disc_and_window():
    lat = 52.0
    mesh, opening, axis, end = tube_scene(lat, -60.0, 10.0)
    w = compute_window(mesh, end[None], axis[None], [2.5], lat, opening=opening)
    theta = math.degrees(math.atan(0.3 / 30.0))
    perp = np.cross(axis, [0.0, 0.0, 1.0])
    perp /= np.linalg.norm(perp)
    offsets = np.linspace(0.0, theta + 0.3, 40)
    dirs = axis * np.cos(np.radians(offsets))[:, None] + perp * np.sin(np.radians(offsets))[:, None]
    got = disc_fraction(w, dirs)[:, 0]
    want = np.array([_lens_fraction(theta, SEMIDIAMETER_DEG, o) for o in offsets])
    # 0.05° cells against a 0.267° disc: the rim's rounding is ~1.5 % of the disc
    np.testing.assert_allclose(got, want, atol=0.02)
    area = lit_area(w, dirs, "half-disc")
    np.testing.assert_array_equal(area, np.where(got >= 0.5, 2.5, 0.0))
    assert not meets(disc_fraction(w, -axis[None]), "first-gleam").any()  # straight down: no light


def test_rotation_is_the_same_as_looking_up_the_rotated_sun():
    lat = 40.0
    mesh, opening, axis, end = tube_scene(lat, 20.0, -5.0)
    w = compute_window(mesh, end[None], axis[None], [1.0], lat, opening=opening)
    rot = trimesh.transformations.rotation_matrix(math.radians(0.4), [0, 0, 1])[:3, :3]
    sun = axis[None]  # on the axis: fully lit unrotated; the rotated tube points 0.4° away
    f_rot = disc_fraction(w, sun, rotation=rot)
    f_look = disc_fraction(w, (rot.T @ axis)[None])
    assert disc_fraction(w, sun)[0, 0] == pytest.approx(1.0)
    np.testing.assert_allclose(f_rot, f_look)
    assert f_rot[0, 0] < 1.0


def test_horizon_fraction_is_a_circular_segment():
    r = SEMIDIAMETER_DEG
    assert float(horizon_fraction(0.0, 0.0)) == pytest.approx(0.5)
    # z = 0.5: segment above a chord at half the radius, (acos z − z√(1−z²))/π below it
    z = 0.5
    assert float(horizon_fraction(z * r, 0.0)) == pytest.approx(1 - (math.acos(z) - z * math.sqrt(1 - z * z)) / math.pi)
    assert float(horizon_fraction(5.0, 4.0)) == 1.0


def test_grid_round_trip_and_pole():
    lat = -33.0
    g = SkyGrid.make(lat, 0.05)
    h = np.array([-179.0, -30.0, 0.0, 45.0, 170.0])
    d = np.array([-25.0, -3.0, 0.0, 12.0, 24.5])
    h2, d2 = hadec_from_enu(lat, enu_from_hadec(lat, h, d))
    np.testing.assert_allclose(h2, h, atol=1e-9)
    np.testing.assert_allclose(d2, d, atol=1e-9)
    # the south celestial pole is at altitude 33° due south for latitude −33°
    south_pole = enu_from_hadec(lat, 0.0, -90.0)
    np.testing.assert_allclose(south_pole, [0.0, -math.cos(math.radians(33)), math.sin(math.radians(33))], atol=1e-12)
    # meridian transit of δ = 0 from latitude φ is at altitude 90° − |φ|
    v = enu_from_hadec(lat, 0.0, 0.0)
    assert math.degrees(math.asin(v[2])) == pytest.approx(57.0)
    assert g.n_h * g.resolution_deg == pytest.approx(360.0)


def test_window_cache_round_trip(tmp_path):
    lat = 52.0
    mesh, opening, axis, end = tube_scene(lat, -60.0, 10.0, sections=64)
    pts = end[None] + np.array([[0, 0, 0], [0.05, 0, 0]]) @ np.eye(3)
    w1 = compute_window(mesh, pts, np.tile(axis, (2, 1)), [1.0, 1.0], lat, opening=opening, cache_dir=tmp_path)
    files = list(tmp_path.glob("window-*.npz"))
    assert len(files) == 1
    w2 = load_window(files[0], w1.key)
    assert w2 is not None and np.array_equal(w2.escape, w1.escape) and np.array_equal(w2.h0, w1.h0)
    w3 = compute_window(mesh, pts, np.tile(axis, (2, 1)), [1.0, 1.0], lat, opening=opening, cache_dir=tmp_path)
    assert w3.key == w1.key and np.array_equal(w3.escape, w1.escape)
    assert load_window(files[0], "another key") is None


def test_a_box_sees_no_sky():
    box = trimesh.creation.box(extents=(3.0, 3.0, 3.0))
    w = compute_window(box, [[0.0, 0.0, -1.5]], [[0.0, 0.0, 1.0]], [1.0], 50.0)
    assert not w.escape.any()
