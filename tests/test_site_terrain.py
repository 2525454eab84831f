"""Skyline from terrain in the mesh (site layer: plain arrays), against closed-form altitudes of analytic terrains."""

import math

import numpy as np
import pytest
import trimesh

from lightpath.errors import InputError
from lightpath.site.terrain import EARTH_RADIUS_M, TERRESTRIAL_REFRACTION_K, skyline_from_terrain


def bowl(rim_radius_m, rim_height_m, segments=720, rings=8):
    """An inverted cone z = r·H/R for r ≤ R (the site at its apex looks up at the rim all round)."""
    theta = np.linspace(0.0, 2 * np.pi, segments, endpoint=False)
    radii = np.linspace(0.0, rim_radius_m, rings + 1)[1:]
    verts = [[0.0, 0.0, 0.0]]
    for r in radii:
        verts += [[r * np.sin(t), r * np.cos(t), r * rim_height_m / rim_radius_m] for t in theta]
    verts = np.array(verts)
    faces = []
    for j in range(segments):
        faces.append([0, 1 + (j + 1) % segments, 1 + j])
    for i in range(rings - 1):
        a, b = 1 + i * segments, 1 + (i + 1) * segments
        for j in range(segments):
            k = (j + 1) % segments
            faces += [[a + j, a + k, b + k], [a + j, b + k, b + j]]
    return trimesh.Trimesh(verts, faces, process=False)


def ridge(distance_m, height_m, half_length_m=5000.0):
    """A triangular ridge running north-south at x = distance (east of the site), crest height H."""
    d, h, L = distance_m, height_m, half_length_m
    v = [[d - h, -L, 0], [d, -L, h], [d + h, -L, 0], [d - h, L, 0], [d, L, h], [d + h, L, 0]]
    f = [[0, 1, 4], [0, 4, 3], [1, 2, 5], [1, 5, 4], [0, 3, 5], [0, 5, 2], [0, 2, 1], [3, 4, 5]]
    return trimesh.Trimesh(v, f, process=False)


def test_cone_rim_closed_form():
    # closed form: eye at height e over the apex sees the rim at atan((H - e) / R)
    R, H, eye = 800.0, 60.0, 1.6
    h = skyline_from_terrain(bowl(R, H), (0.0, 0.0, eye), step_deg=5.0, curvature=False)
    expected = math.degrees(math.atan((H - eye) / R))
    # polygon rim: between vertices the rim is nearer by at most 1 - cos(0.25°) ≈ 1e-5 (negligible);
    # bisection to 1/256° → tolerance 0.01°
    assert np.max(np.abs(h.altitude_deg - expected)) < 0.01
    assert h.notes == []
    assert np.array_equal(h.azimuth_deg, np.arange(0.0, 360.0, 5.0))


def test_cone_with_curvature_and_refraction():
    R, H = 10_000.0, 500.0
    h = skyline_from_terrain(bowl(R, H, segments=360, rings=4), (0.0, 0.0, 2.0), step_deg=30.0)
    flat = math.degrees(math.atan((H - 2.0) / R))
    drop = math.degrees((1 - TERRESTRIAL_REFRACTION_K) * R / (2 * EARTH_RADIUS_M))  # 0.039° at 10 km
    assert drop == pytest.approx(0.0391, abs=1e-3)
    assert np.max(np.abs(h.altitude_deg - (flat - drop))) < 0.01


def test_ridge_closed_form():
    # closed form: along azimuth A the crest line x = D is at horizontal distance D / sin A, so alt = atan(H sin A / D)
    D, H = 300.0, 40.0
    h = skyline_from_terrain(ridge(D, H), (0.0, 0.0, 0.0), step_deg=2.0, curvature=False)
    east = (h.azimuth_deg >= 40.0) & (h.azimuth_deg <= 140.0)
    expected = np.degrees(np.arctan(H * np.sin(np.radians(h.azimuth_deg[east])) / D))
    assert np.max(np.abs(h.altitude_deg[east] - expected)) < 0.01
    # looking west there is no terrain: altitude 0 and a note naming it
    assert h.altitude_deg[h.azimuth_deg == 270.0].tolist() == [0.0]
    assert h.notes and "no terrain" in h.notes[0]


def test_bad_terrain_inputs():
    with pytest.raises(InputError, match="^step_deg: "):
        skyline_from_terrain(ridge(100.0, 10.0), (0, 0, 0), step_deg=45.0)
    with pytest.raises(InputError, match="no faces"):
        skyline_from_terrain(trimesh.Trimesh(), (0, 0, 0))
