"""Null model: the sunrise/sunset arc, uniform seeded orientations, Monte Carlo p-values, the slit closed form."""

from __future__ import annotations

import math

import numpy as np
import pytest

from lightpath.errors import InputError
from lightpath.study.null_model import (
    NullArc,
    monte_carlo_p_value,
    null_azimuths,
    obliquity_deg,
    side_for,
    slit_null_rate,
    sun_arc,
)


def test_obliquity_against_erfa_and_iau():
    import erfa

    # IAU 2006 mean obliquity at J2000: 84381.406″ = 23.4392794° (Capitaine et al. 2003, via erfa.obl06)
    assert obliquity_deg(2000.0) == pytest.approx(math.degrees(erfa.obl06(2451545.0, 0.0)), abs=1e-6)
    # the long-term model keeps growing into the past: ≈ 24.0° around 3000 BC (Vondrák et al. 2011, via pyerfa)
    assert 23.9 < float(obliquity_deg(-2999.0)) < 24.1
    assert obliquity_deg(np.array([2000.0, 0.0])).shape == (2,)


def test_arc_is_between_the_solstice_sunrises():
    # closed form, level horizon, no refraction, disc centre: cos A = sin δ / cos φ (Smart 1977, ch. II)
    lat, year = 53.0, -3199
    eps = math.radians(float(obliquity_deg(year)))
    expect_lo = math.degrees(math.acos(math.sin(eps) / math.cos(math.radians(lat))))
    expect_hi = math.degrees(math.acos(-math.sin(eps) / math.cos(math.radians(lat))))
    arc = sun_arc(lat, year, "sunrise", refraction=None)
    assert (arc.low_deg, arc.high_deg) == pytest.approx((expect_lo, expect_hi), abs=1e-6)
    west = sun_arc(lat, year, "sunset", refraction=None)
    assert (west.low_deg, west.high_deg) == pytest.approx((360 - expect_hi, 360 - expect_lo), abs=1e-6)
    assert "sunrise arc" in arc.describe()
    with pytest.raises(InputError, match="polar"):
        sun_arc(80.0, 2000, "sunrise")
    assert (side_for(45.0), side_for(179.9), side_for(180.0), side_for(-30.0)) == (
        "sunrise",
        "sunrise",
        "sunset",
        "sunset",
    )


def test_null_azimuths_uniform_and_stable():
    arc = NullArc("sunrise", 50.0, 130.0, 24.0)
    a = null_azimuths(arc, 5000, seed=12)
    assert np.all((a >= 50.0) & (a <= 130.0))
    # mean of U(50,130) = 90, sd of the mean = 80/sqrt(12·5000) ≈ 0.33°; allow 5σ
    assert a.mean() == pytest.approx(90.0, abs=1.7)
    assert np.array_equal(null_azimuths(arc, 10, seed=12, start=4990), a[4990:])
    assert not np.array_equal(null_azimuths(arc, 10, seed=13), a[:10])
    with pytest.raises(InputError, match="--null-draws"):
        null_azimuths(arc, -1, seed=0)


def test_p_value_never_zero():
    assert monte_carlo_p_value(0, 99) == pytest.approx(0.01)
    assert monte_carlo_p_value(99, 99) == 1.0
    with pytest.raises(ValueError):
        monte_carlo_p_value(5, 4)


def test_slit_closed_form_against_monte_carlo():
    # frames ⇔ the window [A+l, A+u] meets the run [a_lo, a_hi]; count it directly for uniform A
    arc = NullArc("sunrise", 55.0, 125.0, 24.0)
    run = (70.0, 73.5)
    offsets = (-0.6, 0.9)
    a = null_azimuths(arc, 20000, seed=3)
    hits = (a + offsets[1] >= run[0]) & (a + offsets[0] <= run[1])
    closed = slit_null_rate(1.5, 3.5, arc, run, window_offsets_deg=offsets)
    assert closed == pytest.approx((1.5 + 3.5) / 70.0)
    sigma = math.sqrt(closed * (1 - closed) / a.size)
    assert hits.mean() == pytest.approx(closed, abs=4 * sigma)
    # at the arc's end only the part of the interval inside the arc counts
    assert slit_null_rate(2.0, 2.0, arc, (54.0, 56.0)) == pytest.approx((57.0 - 55.0) / 70.0)
