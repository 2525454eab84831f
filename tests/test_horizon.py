"""Horizon profiles: interpolation, wrapping, dip, CSV reading and its bad inputs."""

import math

import numpy as np
import pytest

from lightpath.errors import InputError
from lightpath.sky.horizon import (
    EARTH_RADIUS_M,
    HorizonProfile,
    flat_horizon,
    horizon_dip_deg,
    read_horizon_csv,
    write_horizon_csv,
)


def test_interpolation_wraps_at_360():
    h = HorizonProfile(np.array([10.0, 100.0, 350.0]), np.array([2.0, 5.0, 0.0]))
    # between 350 and 10 (+360): 20 degrees span, 0 -> 2
    assert h.altitude_at(0.0) == pytest.approx(1.0)
    assert h.altitude_at(360.0) == pytest.approx(1.0)
    assert h.altitude_at(-10.0) == pytest.approx(0.0)
    assert h.altitude_at(55.0) == pytest.approx(3.5)


def test_broadcasting_scalar_array_nan():
    h = HorizonProfile(np.array([0.0, 180.0]), np.array([1.0, 3.0]))
    assert np.ndim(h.altitude_at(90.0)) == 0
    grid = h.altitude_at(np.array([[0.0, 90.0], [270.0, np.nan]]))
    assert grid.shape == (2, 2)
    assert grid[0].tolist() == [1.0, 2.0]
    assert grid[1, 0] == pytest.approx(2.0)
    assert np.isnan(grid[1, 1])


def test_sorting_and_duplicate_azimuths():
    h = HorizonProfile(np.array([370.0, 0.0, 200.0]), np.array([3.0, 1.0, 0.0]))
    assert h.azimuth_deg.tolist() == [0.0, 10.0, 200.0]
    assert h.altitude_deg.tolist() == [1.0, 3.0, 0.0]
    dup = HorizonProfile(np.array([0.0, 360.0, 200.0]), np.array([1.0, 3.0, 0.0]))  # 0 and 360 are one azimuth
    assert dup.azimuth_deg.tolist() == [0.0, 200.0]
    assert dup.altitude_deg.tolist() == [2.0, 0.0]


def test_shifted_and_rotated():
    h = HorizonProfile(np.array([0.0, 90.0, 180.0, 270.0]), np.array([0.0, 4.0, 0.0, 0.0]))
    assert h.shifted(-0.5).altitude_at(90.0) == pytest.approx(3.5)
    assert h.rotated(-30.0).altitude_at(60.0) == pytest.approx(4.0)
    assert h.rotated(360.0) == h


def test_flat_horizon_and_dip():
    assert flat_horizon().altitude_at(77.0) == 0.0
    assert flat_horizon(0.25).altitude_at(np.arange(5.0)).tolist() == [-0.25] * 5
    # Geometric dip: small-angle form sqrt(2h/R) (right triangle at the tangent point; textbook geometry).
    h_m = np.array([1.0, 10.0, 1000.0])
    assert horizon_dip_deg(h_m, refraction=False) == pytest.approx(
        np.degrees(np.sqrt(2 * h_m / EARTH_RADIUS_M)), rel=1e-3
    )
    # Bowditch (2002), American Practical Navigator Table 22: dip for 10 m eye height ~ 5.6' (from memory).
    assert horizon_dip_deg(10.0) * 60 == pytest.approx(5.6, abs=0.05)
    assert np.isnan(horizon_dip_deg(-1.0))
    with pytest.raises(InputError):
        flat_horizon(math.inf)


def test_csv_round_trip(tmp_path):
    h = HorizonProfile(np.arange(0.0, 360.0, 7.5), np.sin(np.radians(np.arange(0.0, 360.0, 7.5))) * 3)
    p = write_horizon_csv(tmp_path / "sky.csv", h, comment="made by a test")
    back = read_horizon_csv(p)
    assert np.allclose(back.altitude_deg, h.altitude_deg, atol=1e-6)
    assert back.source == "sky.csv"


@pytest.mark.parametrize(
    "body, words",
    [
        ("azimuth_deg,altitude_deg\n0,1\n20,x\n40,1\n", ["line 3", "column 2", "altitude", "accepted"]),
        ("azimuth_deg,altitude_deg\n0,1\nnan,1\n", ["line 3", "column 1", "azimuth", "accepted"]),
        ("azimuth_deg,altitude_deg\n0,1\n20,95\n", ["line 3", "column 2", "-90..90"]),
        ("azi,alti\n0,1\n", ["line 1", "header", "az", "alt"]),
        ("azimuth_deg,altitude_deg\n0,1\n20,1 30 00 W\n40,1\n", ["line 3", "column 2", "not an angle"]),
        ("# north: magnetic\naz,alt\n" + "".join(f"{a},1\n" for a in range(0, 360, 20)), ["magnetic", "declination"]),
        ("# north: sideways\nazimuth_deg,altitude_deg\n0,1\n", ["line 1", "north line"]),
        ("azimuth_deg,altitude_deg\n0,1\n10,1\n", ["at least 3"]),
        ("azimuth_deg,altitude_deg\n0,1\n10,1\n20,1\n", ["gap", "340"]),
        ("azimuth_deg,altitude_deg\n0,1,2\n", ["line 2", "2 cells"]),
        ("", ["empty"]),
    ],
)
def test_csv_bad_inputs(tmp_path, body, words):
    p = tmp_path / "bad.csv"
    p.write_text(body)
    with pytest.raises(InputError) as info:
        read_horizon_csv(p)
    message = str(info.value)
    assert "bad.csv" in message and "\n" not in message
    assert "'x'" not in message and "sideways" not in message  # the file's text is never echoed
    for word in words:
        assert word in message


def test_csv_missing_file(tmp_path):
    with pytest.raises(InputError, match="not found"):
        read_horizon_csv(tmp_path / "nowhere.csv")


def test_profile_rejects_bad_arrays():
    with pytest.raises(InputError):
        HorizonProfile(np.array([0.0, 1.0]), np.array([1.0]))
    with pytest.raises(InputError):
        HorizonProfile(np.array([0.0]), np.array([91.0]))
    with pytest.raises(InputError):
        HorizonProfile(np.array([]), np.array([]))
