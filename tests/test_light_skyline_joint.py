"""The skyline and an opening cutting the Sun's disc together (the joint rule of lightpath.light.joint).

Closed form: a target behind a thin horizontal slit in a wall, facing a level skyline.  The slit shows
the disc between two altitudes and the skyline hides it below a third, so the disc's visible part is a
band between two straight lines: a difference of two circular segments, each 1 − (acos z − z√(1 − z²))/π
of the disc for a line z radii above the centre (Weisstein, MathWorld, "Circular Segment").  The slit's
edges are placed on cell boundaries of the 0.05° window grid at the equator (altitude = hour angle + 90°
due east), so the window's own rounding is small (0.009 of the disc measured without a skyline).
The brute-force path (a ray per disc point, lightpath.light.bruteforce) is the project's reference.
"""

from __future__ import annotations

import math

import numpy as np
import pytest
import trimesh

from lightpath.light.bruteforce import brute_force_fraction, disc_pattern
from lightpath.light.disc import disc_fraction, horizon_fraction, lit_area
from lightpath.light.grid import enu_from_hadec
from lightpath.light.window import compute_window
from lightpath.sky.horizon import HorizonProfile

DIST_M = 10.0
POINT = np.array([[0.0, 0.0, 0.0]])
NORMAL = np.array([[1.0, 0.0, 0.0]])


def _box(parts, x0, x1, y0, y1, z0, z1):
    b = trimesh.creation.box(extents=[x1 - x0, y1 - y0, z1 - z0])
    b.apply_translation([(x0 + x1) / 2, (y0 + y1) / 2, (z0 + z1) / 2])
    parts.append(b)


def slit_room(low_deg, high_deg, half_width_m=1.0, size_m=12.0):
    """A closed room around the origin whose thin east wall (x = 10 m) has a slit seen between two altitudes."""
    z_lo, z_hi = (DIST_M * math.tan(math.radians(a)) for a in (low_deg, high_deg))
    s, t, e, hw = size_m, 0.2, 0.002, half_width_m  # e: a thin wall, so the slit is an aperture, not a tunnel
    parts: list = []
    _box(parts, -s, -s + t, -s, s, -s, s)
    _box(parts, -s, DIST_M, -s, -s + t, -s, s)
    _box(parts, -s, DIST_M, s - t, s, -s, s)
    _box(parts, -s, DIST_M, -s, s, -s, -s + t)
    _box(parts, -s, DIST_M, -s, s, s - t, s)
    _box(parts, DIST_M, DIST_M + e, -s, -hw, -s, s)
    _box(parts, DIST_M, DIST_M + e, hw, s, -s, s)
    _box(parts, DIST_M, DIST_M + e, -hw, hw, -s, z_lo)
    _box(parts, DIST_M, DIST_M + e, -hw, hw, z_hi, s)
    opening = trimesh.creation.box(extents=[0.01, 2 * hw, z_hi - z_lo])
    opening.apply_translation([DIST_M, 0.0, (z_lo + z_hi) / 2])
    return trimesh.util.concatenate(parts), opening


def level(altitude_deg):
    return HorizonProfile(np.array([0.0, 180.0]), np.array([altitude_deg, altitude_deg]))


def band(alt_deg, low_deg, high_deg):
    """Closed form: fraction of the disc (centre at ``alt_deg``) between two altitudes (circular segments)."""
    return horizon_fraction(alt_deg, low_deg) - horizon_fraction(alt_deg, high_deg)


def window_for(low_deg, high_deg, latitude_deg, skyline_deg):
    mesh, opening = slit_room(low_deg, high_deg)
    w = compute_window(mesh, POINT, NORMAL, [1.0], latitude_deg, resolution_deg=0.05, opening=opening)
    w.horizon = level(skyline_deg)
    return mesh, w


ALTS = np.linspace(0.40, 1.40, 201)
EAST_AT_EQUATOR = enu_from_hadec(0.0, -90.0 + ALTS, 0.0)  # at the equator the Sun rises straight up due east


def test_slit_whose_lower_edge_is_the_skyline_shows_the_band_between_them():
    _, w = window_for(0.8, 1.0, 0.0, 0.8)
    got = disc_fraction(w, EAST_AT_EQUATOR)[:, 0]
    want = band(ALTS, 0.8, 1.0)
    np.testing.assert_allclose(got, want, atol=0.015)  # measured 0.009: the window's own cell rounding
    product = band(ALTS, 0.8, 1.0) * horizon_fraction(ALTS, 0.8)  # the former rule: fractions multiplied
    assert np.max(np.abs(product - want)) > 0.2
    # first and last gleam: the disc's top reaches 0.8° at 0.8 − s, its bottom leaves 1.0° at 1.0 + s
    lit = ALTS[lit_area(w, EAST_AT_EQUATOR, "first-gleam") > 0]
    assert lit.min() == pytest.approx(0.8 - 0.2666, abs=0.011) and lit.max() == pytest.approx(1.0 + 0.2666, abs=0.011)


def test_slit_below_the_skyline_lets_no_light_in():
    # the opening sees only the part of the disc that the skyline hides: the case the product over-counted
    _, w = window_for(0.6, 0.8, 0.0, 0.8)
    got = disc_fraction(w, EAST_AT_EQUATOR)[:, 0]
    straddling = horizon_fraction(ALTS, 0.8) < 1.0  # the skyline cuts the disc
    assert np.max(got[straddling]) < 1e-9
    assert not lit_area(w, EAST_AT_EQUATOR[straddling], "first-gleam").any()
    # once the disc is wholly above the skyline, only the window's rounding at the slit's top edge remains:
    # under half a 0.05° cell of the disc's edge (a fraction 0.0035 measured)
    assert np.max(got) < 0.005
    assert np.max(band(ALTS, 0.6, 0.8) * horizon_fraction(ALTS, 0.8)) > 0.2  # what the product gave


def test_skyline_across_the_slit_cuts_the_band():
    _, w = window_for(0.6, 1.0, 0.0, 0.8)
    got = disc_fraction(w, EAST_AT_EQUATOR)[:, 0]
    np.testing.assert_allclose(got, band(ALTS, 0.8, 1.0), atol=0.015)


def test_joint_rule_agrees_with_the_brute_force_path_at_latitude_40():
    # The Sun rising obliquely (latitude 40°, declination 0°); a ray per point of 256 disc points is the reference.
    lat = 40.0
    mesh, w = window_for(0.8, 1.0, lat, 0.9)
    alts = np.linspace(0.45, 1.35, 37)
    hour = -np.degrees(np.arccos(np.sin(np.radians(alts)) / math.cos(math.radians(lat))))
    dirs = enu_from_hadec(lat, hour, 0.0)
    got = disc_fraction(w, dirs)[:, 0]
    ref = brute_force_fraction(mesh, POINT, NORMAL, dirs, horizon=w.horizon, pattern=disc_pattern(256))[:, 0]
    np.testing.assert_allclose(got, ref, atol=0.02)  # 256 points: steps of 0.004, pattern error ~0.01
    np.testing.assert_allclose(got, band(alts, 0.9, 1.0), atol=0.015)
    # half-disc is never reached (the band holds at most 0.27 of the disc); first and last gleam as the reference's
    assert not lit_area(w, dirs, "half-disc").any()
    ours, theirs = alts[lit_area(w, dirs, "first-gleam") > 0], alts[ref > 0]
    assert abs(ours.min() - theirs.min()) <= 0.026 and abs(ours.max() - theirs.max()) <= 0.026  # one 0.025° step
