"""Target sampling: area weights, determinism, spacing, offsets and bad input."""

import numpy as np
import pytest
import trimesh

from lightpath.errors import InputError
from lightpath.site.sampling import default_offset_m, sample_target


def two_plates():
    """A 1 m² plate facing up and a 3 m² plate facing east, 10 m apart."""
    a = trimesh.Trimesh([[0, 0, 0], [1, 0, 0], [1, 1, 0], [0, 1, 0]], [[0, 1, 2], [0, 2, 3]], process=False)
    b = trimesh.Trimesh([[10, 0, 0], [10, 3, 0], [10, 3, 1], [10, 0, 1]], [[0, 1, 2], [0, 2, 3]], process=False)
    return trimesh.util.concatenate([a, b])


def test_area_weighted_and_sums_to_area():
    s = sample_target(two_plates(), count=4000, seed=3)
    assert s.total_area_m2 == pytest.approx(4.0)
    assert s.area_m2.sum() == pytest.approx(4.0)
    east = s.normals[:, 0] > 0.5
    # stratified over the cumulative area: the 3 m² plate gets 3/4 of the samples to within one sample
    assert abs(east.sum() - 3000) <= 1
    assert np.allclose(s.normals[east], [1, 0, 0]) and np.allclose(s.normals[~east], [0, 0, 1])
    # uniform inside: the mean of the up plate's points is its centre (σ of the mean ≈ 0.29/√1000 ≈ 0.009 m)
    assert s.points_m[~east, :2].mean(axis=0) == pytest.approx([0.5, 0.5], abs=0.04)


def test_deterministic_for_a_seed():
    a = sample_target(two_plates(), count=100, seed=7)
    b = sample_target(two_plates(), count=100, seed=7)
    c = sample_target(two_plates(), count=100, seed=8)
    assert np.array_equal(a.points_m, b.points_m) and not np.array_equal(a.points_m, c.points_m)


def test_points_lie_on_faces_plus_offset():
    mesh = two_plates()
    s = sample_target(mesh, count=500, seed=1, offset_m=0.01)
    back = s.points_m - 0.01 * s.normals
    up = s.normals[:, 2] > 0.5
    assert np.allclose(back[up, 2], 0.0) and np.all((back[up, :2] >= 0) & (back[up, :2] <= 1))
    east = ~up
    assert np.allclose(back[east, 0], 10.0) and np.all((back[east, 1] >= 0) & (back[east, 1] <= 3))
    assert np.all((back[east, 2] >= 0) & (back[east, 2] <= 1))
    assert len(mesh.faces) == 4


def test_spacing_sets_count():
    s = sample_target(two_plates(), spacing_m=0.1)
    assert len(s) == 400  # ceil(4 m² / 0.01 m²)


def test_default_offset_above_single_precision():
    # embree is single precision: relative spacing 2**-23 ≈ 1.2e-7 (IEEE 754 binary32)
    v = np.array([[0.0, 0.0, 0.0], [250.0, 0.0, 0.0]])
    assert default_offset_m(v) > 1e-7 * 250.0 * 10
    s = sample_target(two_plates(), count=10)
    assert s.offset_m == pytest.approx(1e-4)  # 1e-5 × 10 m (largest coordinate)


@pytest.mark.parametrize(
    "kwargs, word",
    [
        (dict(count=0), "count"),
        (dict(count=2.5), "count"),
        (dict(spacing_m=-1.0), "spacing_m"),
        (dict(count=10, spacing_m=1.0), "not both"),
        (dict(offset_m=-0.1), "offset_m"),
        (dict(spacing_m=1e-5), "limit"),
    ],
)
def test_bad_sampling_inputs(kwargs, word):
    with pytest.raises(InputError, match=word):
        sample_target(two_plates(), **kwargs)


def test_zero_area_target():
    flat = trimesh.Trimesh([[0, 0, 0], [1, 0, 0], [2, 0, 0]], [[0, 1, 2]], process=False)
    with pytest.raises(InputError, match="zero area"):
        sample_target(flat, count=10)
