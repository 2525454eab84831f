"""Refraction: Bennett (1982) and Sæmundsson (1986), their inverses, air scaling and broadcasting."""

import numpy as np
import pytest
from hypothesis import given
from hypothesis import strategies as st

from lightpath.errors import InputError
from lightpath.sky.refraction import (
    apparent_altitude,
    geometric_altitude,
    refraction_bennett1982,
    refraction_saemundsson1986,
)

MODELS = ["bennett1982", "saemundsson1986"]


def test_bennett_at_the_horizon():
    # Bennett (1982), J. Navigation 35, 255: R ≈ 34.5′ at apparent altitude 0° (value as quoted in DESIGN.md,
    # from memory; the formula itself gives 1/tan(7.31/4.4 °) = 34.478′).
    assert float(refraction_bennett1982(0.0)) * 60 == pytest.approx(34.5, abs=0.05)


def test_bennett_matches_skyfield_earthlib():
    # Reference library: skyfield.earthlib.refraction implements the same Bennett formula for -1°..89.9°
    # apparent, with its own air factor 0.28·P/(T+273) instead of (P/1010)(283/(273+T)); those differ by
    # 282.8/283 = 0.07 %, so agree to 0.1 % of R; ours adds Meeus's zenith constant 0.0013515′ (0.08″).
    from skyfield.earthlib import refraction

    h = np.linspace(-0.9, 89.0, 500)
    for p, t in [(1010.0, 10.0), (820.0, 11.0), (1030.0, -20.0)]:
        ours = refraction_bennett1982(h, p, t)
        theirs = refraction(h, t, p)
        assert np.allclose(ours, theirs, rtol=1e-3, atol=3e-5)


def test_saemundsson_consistent_with_bennett():
    # Meeus (1998), ch. 16: Sæmundsson's formula is consistent with Bennett's to about 0.1′ (from memory).
    # Compare both as maps from geometric to apparent altitude, 0..90° apparent.
    h_app = np.linspace(0.0, 90.0, 901)
    h_geo = geometric_altitude(h_app, "bennett1982")
    r_s = refraction_saemundsson1986(h_geo)
    r_b = refraction_bennett1982(h_app)
    assert np.max(np.abs(r_s - r_b)) * 60 < 0.15


def test_air_factor_scales_linearly_with_pressure_and_inverse_temperature():
    # Meeus (1998) ch. 16: multiply R by (P/1010)·(283/(273+T)).
    r0 = refraction_bennett1982(5.0)
    assert refraction_bennett1982(5.0, 505.0, 10.0) == pytest.approx(r0 / 2)
    assert refraction_saemundsson1986(5.0, 1010.0, 30.0) == pytest.approx(
        refraction_saemundsson1986(5.0) * 283.0 / 303.0
    )
    assert refraction_bennett1982(5.0, 0.0, 10.0) == 0.0


@pytest.mark.parametrize("model", MODELS)
def test_exact_inverses_over_all_altitudes(model):
    # Required by the design: inverses of each other to < 0.1″ everywhere, including below the clamp point.
    h = np.linspace(-30.0, 90.0, 120_001)
    for p, t in [(1010.0, 10.0), (700.0, -30.0), (1050.0, 40.0)]:
        back = geometric_altitude(apparent_altitude(h, model, p, t), model, p, t)
        assert np.max(np.abs(back - h)) * 3600 < 0.1
        fwd = apparent_altitude(geometric_altitude(h, model, p, t), model, p, t)
        assert np.max(np.abs(fwd - h)) * 3600 < 0.1


@pytest.mark.parametrize("model", MODELS)
def test_monotonic_and_continuous_below_horizon(model):
    h = np.linspace(-10.0, 10.0, 200_001)
    app = apparent_altitude(h, model)
    step = np.diff(app)
    assert np.all(step > 0)
    # continuity: no jump bigger than the grid step times the largest slope (≤ 1.3)
    assert np.max(step) < 1.3 * (h[1] - h[0])
    # refraction is positive, peaks below the horizon, and is held there (≤ 1°)
    r = app - h
    assert np.all(r > 0) and np.max(r) < 1.0
    assert r[0] == pytest.approx(r[1000])


def test_zero_at_zenith():
    # Meeus (1998) ch. 16: with the added constants (0.0013515′ Bennett, 0.0019279′ Sæmundsson, from memory)
    # R is exactly zero at the zenith.
    from lightpath.sky import refraction as module

    assert module._B_ZENITH_ARCMIN == pytest.approx(0.0013515, abs=1e-7)
    assert module._S_ZENITH_ARCMIN == pytest.approx(0.0019279, abs=1e-7)
    assert abs(float(refraction_bennett1982(90.0))) < 1e-12
    assert abs(float(refraction_saemundsson1986(90.0))) < 1e-12


@pytest.mark.parametrize("model", [*MODELS, None])
def test_broadcasting_scalar_array_nan(model):
    assert np.ndim(apparent_altitude(1.0, model)) == 0
    a = apparent_altitude(np.array([[1.0, 2.0], [np.nan, 4.0]]), model)
    assert a.shape == (2, 2) and np.isnan(a[1, 0]) and np.isfinite(a[0]).all()
    g = geometric_altitude(np.array([np.nan, 3.0]), model, np.array([1000.0, 900.0]), 5.0)
    assert np.isnan(g[0]) and np.isfinite(g[1])


def test_none_means_no_refraction():
    h = np.array([-3.0, 0.0, 12.5])
    assert np.array_equal(apparent_altitude(h, None), h)
    assert np.array_equal(geometric_altitude(h, None), h)


def test_unknown_model_is_input_error():
    with pytest.raises(InputError, match="bennett1982"):
        apparent_altitude(1.0, "garfinkel1967")


@given(st.floats(-5.0, 90.0), st.floats(500.0, 1100.0), st.floats(-40.0, 50.0))
def test_property_apparent_above_geometric(h, p, t):
    for model in MODELS:
        a = float(apparent_altitude(h, model, p, t))
        assert a >= h
        assert float(geometric_altitude(a, model, p, t)) == pytest.approx(h, abs=1e-7)
