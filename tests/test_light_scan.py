"""The scan API: projected area of a lit opening (closed form), determinism, and a target without sky."""

from __future__ import annotations

import math
from types import SimpleNamespace

import numpy as np
import pytest
import trimesh

from lightpath.errors import InputError
from lightpath.light.disc import lit_area, lit_area_weighted
from lightpath.light.scan import parse_years, prepare_window, scan_scene
from lightpath.light.window import compute_window
from lightpath.scene import demo_scene_path, load_scene
from lightpath.sky.horizon import flat_horizon
from lightpath.sky.observer import Observer
from lightpath.sky.vectors import enu_from_azalt


def _plate_with_hole(side_m, hole_m, height_m, thickness_m):
    """A horizontal square plate (side ``side_m``) at ``height_m`` with a centred square hole ``hole_m``."""
    s, h = side_m / 2, hole_m / 2
    bars = [((-s, -s), (s, -h)), ((-s, h), (s, s)), ((-s, -h), (-h, h)), ((h, -h), (s, h))]
    parts = []
    for (x0, y0), (x1, y1) in bars:
        box = trimesh.creation.box(extents=(x1 - x0, y1 - y0, thickness_m))
        box.apply_translation(((x0 + x1) / 2, (y0 + y1) / 2, height_m))
        parts.append(box)
    return trimesh.util.concatenate(parts)


def test_a_fully_lit_thin_opening_projects_its_own_area():
    """Closed form: the beam through a thin aperture lights its own area on a parallel plane.

    The disc-weighted lit area (Σ sample area × visible fraction) integrates the beam over the floor, so it
    equals the aperture's area as seen along the Sun, a (a − t tan z) for a plate of thickness t (its
    hole's walls shade a strip), whatever the penumbra.  Samples lie on a grid of 1/16 m whose lines fall
    midway between the projected edges (3 cm clear: the window's 0.05° cells move an edge by
    0.05° × 23 m = 2 cm): 16 × 16 samples see the disc's centre; all but the 4 corner ones, which see
    a quadrant of the penumbra (< ½ of the disc), meet ``half-disc``.
    """
    a, height, t = 1.0, 20.0, 0.01
    altitude, azimuth = 60.0, 90.0  # Sun in the east, 30° from the zenith
    mesh = _plate_with_hole(6.0, a, height, t)
    opening = trimesh.creation.box(extents=(a, a, 1e-3))
    opening.apply_translation((0.0, 0.0, height))
    shift = height / math.tan(math.radians(altitude))  # the beam's centre lands this far west of the hole
    spacing = 1.0 / 16.0
    g = (np.arange(-13, 13) + 0.5) * spacing
    x, y = np.meshgrid(g - shift, g, indexing="ij")
    pts = np.column_stack([x.ravel(), y.ravel(), np.zeros(x.size)])
    area = np.full(len(pts), spacing * spacing)
    # latitude 10°: that Sun direction has site declination 8.6°, inside the band the window covers
    window = compute_window(mesh, pts, np.tile([0.0, 0.0, 1.0], (len(pts), 1)), area, 10.0, opening=opening)
    sun = enu_from_azalt(azimuth, altitude).reshape(1, 3)
    beam = a * (a - t * math.tan(math.radians(90.0 - altitude)))
    assert float(lit_area_weighted(window, sun)[0]) == pytest.approx(beam, rel=0.005)
    assert float(lit_area(window, sun, "half-disc")[0]) == pytest.approx((16 * 16 - 4) * spacing**2, abs=1e-9)
    # first gleam adds the outer half of the penumbra, full disc removes the inner half.  The penumbra is
    # w = 2 × slant × tan(r) wide across the beam (slant = height / sin(alt)), stretched by 1 / sin(alt) on
    # the floor for the two edges across the Sun's azimuth: area ≈ 2 a w / sin(alt) + 2 a w
    slant = height / math.sin(math.radians(altitude))
    w = 2 * slant * math.tan(math.radians(959.63 / 3600))
    band = 2 * a * w / math.sin(math.radians(altitude)) + 2 * a * w
    gleam = float(lit_area(window, sun, "first-gleam")[0])
    full = float(lit_area(window, sun, "full-disc")[0])
    assert gleam > a * a > full
    assert gleam - full == pytest.approx(band, rel=0.1)


def test_same_seed_same_result_and_other_seed_other_samples():
    scene = load_scene(demo_scene_path("sandwren"))
    r1 = scan_scene(scene, [-1499], samples=40, seed=5)
    r2 = scan_scene(scene, [-1499], samples=40, seed=5)
    assert r1 == r2
    assert r1.years[0].events
    w1 = prepare_window(scene, samples=40, seed=5)
    w3 = prepare_window(scene, samples=40, seed=6)
    assert not np.array_equal(w1.points_m, w3.points_m)


def test_cache_gives_the_same_window(tmp_path):
    scene = load_scene(demo_scene_path("larchfold"))
    w1 = prepare_window(scene, samples=30, cache_dir=tmp_path)
    w2 = prepare_window(scene, samples=30, cache_dir=tmp_path)
    assert np.array_equal(w1.escape, w2.escape) and w1.key == w2.key
    assert w2.horizon is scene.horizon


def test_target_without_sky_is_an_input_error():
    box = trimesh.creation.box(extents=(4.0, 4.0, 3.0))  # a closed room
    floor = trimesh.Trimesh([[-1, -1, -1.49], [1, -1, -1.49], [1, 1, -1.49], [-1, 1, -1.49]], [[0, 1, 2], [0, 2, 3]])
    scene = SimpleNamespace(
        path="closed.toml",
        mesh=box,
        target=floor,
        opening=None,
        horizon=flat_horizon(),
        observer=Observer(latitude_deg=45.0, longitude_deg=0.0),
        content_hash="",
    )
    with pytest.raises(InputError, match="sees no sky"):
        prepare_window(scene, samples=20)


def test_parse_years_forms():
    assert parse_years("3200 BC:3000 BC:100") == [-3199, -3099, -2999]
    assert parse_years("2026") == [2026]
    assert parse_years("1,5,-3") == [1, 5, -3]
    for bad in ("2000:1990", "2000:2010:-1", "x:y", "-20000:0:10"):
        with pytest.raises(InputError):
            parse_years(bad)


def test_horizon_offset_and_light_map_on_the_passage():
    """Raising the skyline can only shorten light that comes at sunrise; the light map holds the events.

    The bent passage's light comes with the Sun about 5° up over a skyline near 2° (its README): a skyline
    raised by 4° hides part of it."""
    from lightpath.light.options import Conditions
    from lightpath.light.scan import scan_window, scan_year

    scene = load_scene(demo_scene_path("larchfold"))
    window = prepare_window(scene, samples=40, seed=1)
    base = scan_window(window, scene.observer, [-2599], with_light_map=True).years[0]
    high = scan_year(window, scene.observer, -2599, conditions=Conditions(horizon_offset_deg=4.0))
    assert base.events
    total = sum(e.duration_min for e in base.events)
    assert sum(e.duration_min for e in high.events) < total
    lm = base.light_map
    assert lm is not None and lm.area_m2.shape == (len(lm.day_jd_ut), len(lm.minutes))
    assert lm.area_m2.max() > 0
    # minutes of light in the map (1-minute columns) match the events' durations within a minute a day
    lit_minutes = (lm.area_m2 > 0).sum()
    assert abs(lit_minutes - total) < len(base.events) * 1.0 + 1


def test_limb_darkening_dims_a_limb_only_view():
    """With the linear law, a disc showing only its limb shows less light than a uniform one; full is full."""
    from test_light_geometry import tube_scene

    from lightpath.light.disc import LIMB_DARKENING_U, SEMIDIAMETER_DEG, disc_fraction

    lat = 52.0
    mesh, opening, axis, end = tube_scene(lat, -60.0, 10.0)
    window = compute_window(mesh, end[None], axis[None], [1.0], lat, opening=opening)
    theta = math.degrees(math.atan(0.3 / 30.0))
    perp = np.cross(axis, [0.0, 0.0, 1.0])
    perp /= np.linalg.norm(perp)

    def toward(offset_deg):
        o = math.radians(offset_deg)
        return (axis * math.cos(o) + perp * math.sin(o))[None]

    for off, relation in ((0.0, "equal"), (theta + 0.8 * SEMIDIAMETER_DEG, "darker")):
        uniform = disc_fraction(window, toward(off))[0, 0]
        dark = disc_fraction(window, toward(off), limb_darkening_u=LIMB_DARKENING_U)[0, 0]
        if relation == "equal":
            assert uniform == pytest.approx(1.0) and dark == pytest.approx(1.0, abs=1e-6)
        else:
            assert 0.0 < dark < uniform
