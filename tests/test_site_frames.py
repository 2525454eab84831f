"""Unit, axis and north conversions against transforms worked by hand."""

import math

import numpy as np
import pytest
from hypothesis import given, settings
from hypothesis import strategies as st

from lightpath.errors import InputError
from lightpath.site.frames import (
    UNIT_TO_M,
    apply_transform,
    axes_matrix,
    axis_vector,
    azimuth_turn_matrix,
    model_to_site_matrix,
    true_azimuth_deg,
)


def azimuth_of(v):
    return math.degrees(math.atan2(v[0], v[1])) % 360.0


@pytest.mark.parametrize("unit, metres", [("m", 1.0), ("cm", 0.01), ("mm", 0.001), ("ft", 0.3048), ("in", 0.0254)])
def test_units(unit, metres):
    # international foot = 0.3048 m and inch = 0.0254 m exactly (1959 international yard and pound agreement)
    T = model_to_site_matrix(unit)
    assert T @ [2.0, 3.0, 4.0, 1.0] == pytest.approx([2 * metres, 3 * metres, 4 * metres, 1.0])
    assert UNIT_TO_M[unit] == metres


def test_y_up_file_by_hand():
    # A y-up file (glTF convention) with -z toward north: file (x, y, z) -> ENU (x, -z, y).
    T = model_to_site_matrix("cm", up_axis="y", north_axis="-z")
    assert T @ [100.0, 200.0, 300.0, 1.0] == pytest.approx([1.0, -3.0, 2.0, 1.0])


def test_x_north_z_up_by_hand():
    # A survey file with +x toward north and z up: east = north x up = x cross z = -y; file (x, y, z) -> (-y, x, z).
    M = axes_matrix("z", "x")
    assert M @ [1.0, 2.0, 3.0] == pytest.approx([-2.0, 1.0, 3.0])


def test_minus_y_up():
    M = axes_matrix("-y", "z")  # up = -y, north = +z, east = z cross -y = +x
    assert M @ [1.0, 2.0, 3.0] == pytest.approx([1.0, 3.0, -2.0])


def test_mirrored_file_needs_east_axis_and_flips_winding():
    M = axes_matrix("z", "y", east_axis="-x")  # a left-handed file: +x points west
    assert np.linalg.det(M) == pytest.approx(-1.0)
    assert M @ [1.0, 0.0, 0.0] == pytest.approx([-1.0, 0.0, 0.0])
    T = np.eye(4)
    T[:3, :3] = M
    tri = np.array([[0.0, 0, 0], [1, 0, 0], [0, 1, 0]])
    v, f = apply_transform(tri, np.array([[0, 1, 2]]), T)
    normal = np.cross(v[f[0, 1]] - v[f[0, 0]], v[f[0, 2]] - v[f[0, 0]])
    assert normal == pytest.approx([0.0, 0.0, 1.0])  # still facing up after the mirror
    with pytest.raises(InputError, match="east_axis"):
        axes_matrix("z", "y", east_axis="z")


def test_magnetic_declination_sign():
    # Common practice, no published source: compass bearing 100 deg with declination 5 deg E is true 105 deg.
    assert true_azimuth_deg(100.0, "magnetic", declination_deg=5.0) == pytest.approx(105.0)
    assert true_azimuth_deg(100.0, "magnetic", declination_deg=-5.0) == pytest.approx(95.0)
    # The same through the mesh transform: a passage built along the file's magnetic bearing 100 deg.
    b = math.radians(100.0)
    along = [math.sin(b), math.cos(b), 0.0, 0.0]  # direction, no translation
    T = model_to_site_matrix("m", north="magnetic", declination_deg=5.0)
    assert azimuth_of(T @ along) == pytest.approx(105.0)


def test_grid_convergence_sign():
    # Our documented convention: convergence = true azimuth of grid north (east positive), so true = grid + conv.
    T = model_to_site_matrix("m", north="grid", convergence_deg=-1.5)
    assert azimuth_of(T @ [0.0, 1.0, 0.0, 0.0]) == pytest.approx(358.5)
    assert true_azimuth_deg(90.0, "grid", convergence_deg=2.0) == pytest.approx(92.0)


def test_rotation_and_offset_order():
    # Scale, then axes, then turn (declination + rotation), then offset: worked by hand for one point.
    T = model_to_site_matrix("mm", north="magnetic", declination_deg=10.0, rotation_deg=20.0, offset_m=(1, 2, 3))
    p = T @ [0.0, 1000.0, 500.0, 1.0]  # 1 m toward magnetic north, 0.5 m up
    assert p[:3] == pytest.approx([1 + math.sin(math.radians(30)), 2 + math.cos(math.radians(30)), 3.5])


def test_turn_matrix_adds_to_azimuth():
    for az in (0.0, 45.0, 200.0):
        v = [math.sin(math.radians(az)), math.cos(math.radians(az)), 0.0]
        assert azimuth_of(azimuth_turn_matrix(33.0) @ v) == pytest.approx((az + 33.0) % 360.0)


@pytest.mark.parametrize(
    "kwargs, word",
    [
        (dict(unit="yd"), "model.unit"),
        (dict(unit="m", up_axis="w"), "model.up_axis"),
        (dict(unit="m", up_axis="z", north_axis="-z"), "parallel"),
        (dict(unit="m", north="compass"), "model.north"),
        (dict(unit="m", north="magnetic", declination_deg=120.0), "declination_deg"),
        (dict(unit="m", offset_m=(1.0, 2.0)), "offset_m"),
    ],
)
def test_bad_frame_inputs(kwargs, word):
    unit = kwargs.pop("unit")
    with pytest.raises(InputError, match=word):
        model_to_site_matrix(unit, **kwargs)


_angles = st.floats(-89.0, 89.0, allow_nan=False)
_axes = st.sampled_from([("z", "y"), ("y", "-z"), ("x", "z"), ("-z", "x"), ("-y", "-x")])


@settings(max_examples=60, deadline=None)
@given(_axes, _angles, st.floats(-360.0, 360.0, allow_nan=False), st.sampled_from(sorted(UNIT_TO_M)))
def test_transform_is_a_scaled_rotation(axes, declination, rotation, unit):
    up, north = axes
    T = model_to_site_matrix(
        unit, up_axis=up, north_axis=north, north="magnetic", declination_deg=declination, rotation_deg=rotation
    )
    R = T[:3, :3] / UNIT_TO_M[unit]
    np.testing.assert_allclose(R @ R.T, np.eye(3), atol=1e-12)
    assert np.linalg.det(R) == pytest.approx(1.0)
    # the file's up axis always lands on Up
    np.testing.assert_allclose(R @ axis_vector(up), [0.0, 0.0, 1.0], atol=1e-12)


@settings(max_examples=60, deadline=None)
@given(_angles, _angles)
def test_turns_add(a, b):
    np.testing.assert_allclose(azimuth_turn_matrix(a) @ azimuth_turn_matrix(b), azimuth_turn_matrix(a + b), atol=1e-12)
