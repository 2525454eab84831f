"""The uncertainty model: deterministic seeded draws, rotations with the right sense, epoch parsing."""

from __future__ import annotations

import math

import numpy as np
import pytest

from lightpath.errors import InputError
from lightpath.light.track import raise_altitude
from lightpath.study.uncertainty import (
    NULL_STREAM,
    Tolerances,
    make_draws,
    nominal_draw,
    parse_epoch,
    rotation_about_up,
    rotation_from_vector,
    shift_rotation_vector,
    tolerances_from_table,
)

TOL = Tolerances(
    opening_azimuth_deg=0.5,
    opening_tilt_deg=0.2,
    opening_position_m=0.05,
    target_position_m=0.02,
    horizon_altitude_deg=0.1,
    temperature_c=5.0,
    pressure_mbar=10.0,
    epoch_years=100.0,
)
GEOM = {"axis_enu": [0.6, 0.8, 0.0], "distance_m": 12.0}


def _azimuth_deg(v):
    return math.degrees(math.atan2(v[0], v[1])) % 360.0


def test_draw_i_does_not_depend_on_count_or_start():
    a = make_draws(TOL, 40, seed=3, year=-3199, **GEOM)
    b = make_draws(TOL, 10, seed=3, year=-3199, start=30, **GEOM)
    assert a[30:] == b
    assert make_draws(TOL, 40, seed=3, year=-3199, **GEOM) == a  # same seed, same draws
    assert make_draws(TOL, 40, seed=4, year=-3199, **GEOM) != a
    assert make_draws(TOL, 40, seed=3, year=-3199, stream=NULL_STREAM, **GEOM) != a


def test_draws_are_spawned_children_of_the_seed():
    # Draw i uses child i of SeedSequence(seed).spawn(..)[stream]: the numpy spawning tree.
    root = np.random.SeedSequence(5).spawn(1)[0]
    child = root.spawn(3)[2]
    z = np.random.default_rng(child).standard_normal(15)
    d = make_draws(Tolerances(opening_azimuth_deg=1.0), 3, seed=5, year=0)[2]
    assert d.azimuth_offset_deg == pytest.approx(z[0])


def test_turning_one_tolerance_on_keeps_the_others():
    only_az = make_draws(Tolerances(opening_azimuth_deg=0.5), 20, seed=1, year=0)
    with_more = make_draws(Tolerances(opening_azimuth_deg=0.5, pressure_mbar=5.0), 20, seed=1, year=0)
    assert [d.azimuth_offset_deg for d in only_az] == [d.azimuth_offset_deg for d in with_more]


def test_spreads_match_the_tolerances():
    draws = make_draws(TOL, 4000, seed=9, year=-3199, **GEOM)
    az = np.array([d.azimuth_offset_deg for d in draws])
    years = np.array([d.year for d in draws])
    temp = np.array([d.temperature_c for d in draws])
    # sample sd of n normals has relative standard error 1/sqrt(2n) ≈ 1.1 %; allow 5σ
    assert az.std() == pytest.approx(0.5, rel=0.06)
    assert years.std() == pytest.approx(100.0, rel=0.06)
    assert temp.mean() == pytest.approx(10.0, abs=5 * 5.0 / math.sqrt(4000))
    # relative shift: σ per axis = hypot(0.05, 0.02) m; perpendicular part has 2 axes → Rayleigh mean σ√(π/2)
    shift = np.radians([d.shift_deg for d in draws]) * 12.0
    assert shift.mean() == pytest.approx(math.hypot(0.05, 0.02) * math.sqrt(math.pi / 2), rel=0.05)


def test_zero_tolerances_give_the_nominal_geometry():
    draws = make_draws(Tolerances.zero(), 5, seed=2, year=1000, **GEOM)
    nominal = nominal_draw(1000)
    for d in draws:
        assert d.rotation_matrix.tolist() == np.eye(3).tolist()
        assert (d.year, d.horizon_offset_deg, d.refraction_offset_deg, d.delta_t_z) == (1000, 0.0, 0.0, 0.0)
        assert d.temperature_c == nominal.temperature_c


def test_azimuth_rotation_sense():
    # a structure turned by +10° (clockwise from above) faces 10° further round from north
    v = rotation_about_up(10.0) @ np.array([math.sin(math.radians(80)), math.cos(math.radians(80)), 0.0])
    assert _azimuth_deg(v) == pytest.approx(90.0, abs=1e-12)
    d = make_draws(Tolerances(opening_azimuth_deg=1.0), 1, seed=0, year=0)[0]
    v = d.rotation_matrix @ np.array([0.0, 1.0, 0.0])
    assert _azimuth_deg(v) == pytest.approx(d.azimuth_offset_deg % 360.0, abs=1e-9)


def test_rotations_are_orthonormal():
    for d in make_draws(TOL, 50, seed=8, year=0, **GEOM):
        r = d.rotation_matrix
        assert np.allclose(r @ r.T, np.eye(3), atol=1e-13)
        assert np.linalg.det(r) == pytest.approx(1.0, abs=1e-13)
    r = rotation_from_vector([0.3, -0.2, 0.5])
    assert np.allclose(r @ r.T, np.eye(3), atol=1e-13)


def test_shift_moves_the_axis_like_a_translation():
    # exact geometry: opening at d·u moved by Δ; the new direction vs the rotated one agree to O((Δ/d)²)
    u = np.array([0.0, 0.8, 0.6])
    delta = np.array([0.03, -0.02, 0.04])
    d = 5.0
    exact = (d * u + delta) / np.linalg.norm(d * u + delta)
    rotated = rotation_from_vector(shift_rotation_vector(u, d, delta)) @ u
    angle = math.degrees(math.acos(np.clip(exact @ rotated, -1, 1)))
    assert angle < 0.01  # (Δ/d)² ≈ 1e-4 rad ≈ 0.006°
    assert math.degrees(math.acos(exact @ u)) > 0.5  # and the shift itself is large


def test_raise_altitude_tapers_with_altitude():
    alt = np.radians([0.0, 10.0, 45.0])
    s = np.stack([np.zeros(3), np.cos(alt), np.sin(alt)], axis=1)
    raised = raise_altitude(s, 0.18)
    new_alt = np.degrees(np.arcsin(raised[:, 2]))
    gain = new_alt - np.degrees(alt)
    assert gain[0] == pytest.approx(0.18, abs=1e-9)
    assert gain[0] > gain[1] > gain[2] > 0
    # Bennett (1982), J. Navigation 35, 255: R(0°) ≈ 34.5′; R(10°) ≈ 5.3′ (from memory) → ratio ≈ 0.154
    assert gain[1] / gain[0] == pytest.approx(0.154, abs=0.01)
    assert np.allclose(raised[:, 0], 0.0) and np.allclose(np.linalg.norm(raised, axis=1), 1.0)
    assert np.allclose(raise_altitude(s, 0.3, taper=False)[:, 2], np.sin(alt + np.radians(0.3)))


@pytest.mark.parametrize(
    ("text", "expected"),
    [
        ("-3199", (-3199, 0.0)),
        ("3200 BC", (-3199, 0.0)),
        ("3200BC±50", (-3199, 50.0)),
        ("1 BC", (0, 0.0)),
        ("AD 2024 +/- 0.5", (2024, 0.5)),
        ("+1500+-20", (1500, 20.0)),
    ],
)
def test_parse_epoch(text, expected):
    assert parse_epoch(text) == expected


@pytest.mark.parametrize("text", ["", "abc", "3200 BC ± x", "0 BC", "-20000", "12±-3"])
def test_parse_epoch_rejects(text):
    with pytest.raises(InputError, match="--epoch"):
        parse_epoch(text)


def test_tolerance_table():
    tol = tolerances_from_table({"azimuth_deg": 0.4, "delta_t": False}, refraction_deg=0.0)
    assert (tol.opening_azimuth_deg, tol.delta_t, tol.refraction_deg) == (0.4, False, 0.0)
    with pytest.raises(InputError, match="unknown key 'azimth_deg'"):
        tolerances_from_table({"azimth_deg": 0.4})
    with pytest.raises(InputError, match="opening_tilt_deg"):
        Tolerances(opening_tilt_deg=-1.0)
    with pytest.raises(InputError, match="--draws"):
        make_draws(TOL, -1, seed=0, year=0)
    with pytest.raises(InputError, match="--seed"):
        make_draws(TOL, 1, seed=-3, year=0)
