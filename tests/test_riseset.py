"""Sunrise and sunset azimuths: closed forms, a profile solver, limbs, refraction, and skyfield."""

import numpy as np
import pytest
from hypothesis import given, settings
from hypothesis import strategies as st

from lightpath.errors import InputError
from lightpath.sky.horizon import HorizonProfile, flat_horizon, horizon_dip_deg
from lightpath.sky.refraction import apparent_altitude, geometric_altitude
from lightpath.sky.riseset import (
    SOLAR_PARALLAX_DEG,
    azimuth_altitude_from_hour_angle,
    rise_set_azimuths,
)

GEOMETRIC = dict(refraction=None, semidiameter_deg=0.0, horizontal_parallax_deg=0.0)


def test_closed_form_flat_horizon():
    # closed form, spherical astronomy (Smart 1977, Textbook on Spherical Astronomy, ch. II):
    # on the horizon cos A = sin δ / cos φ (geometric, disc centre, no refraction).
    dec = np.linspace(-24.0, 24.0, 49)
    for lat in (-60.0, -35.0, 0.0, 20.0, 53.0, 65.0):
        rise, set_ = rise_set_azimuths(dec, lat, **GEOMETRIC)
        expected = np.degrees(np.arccos(np.sin(np.radians(dec)) / np.cos(np.radians(lat))))
        np.testing.assert_allclose(rise, expected, atol=1e-9)
        np.testing.assert_allclose(set_, 360.0 - expected, atol=1e-9)


def test_closed_form_at_an_altitude():
    # closed form, spherical astronomy (Smart 1977 ch. II, cosine rule of the astronomical triangle):
    # at altitude h, cos A = (sin δ − sin φ sin h) / (cos φ cos h).
    dec, lat, h = np.array([-23.4, -10.0, 0.0, 12.0, 23.4]), 53.0, 2.5
    rise, _ = rise_set_azimuths(dec, lat, horizon=flat_horizon(-h), **GEOMETRIC)
    d, p, a = np.radians(dec), np.radians(lat), np.radians(h)
    expected = np.degrees(np.arccos((np.sin(d) - np.sin(p) * np.sin(a)) / (np.cos(p) * np.cos(a))))
    np.testing.assert_allclose(rise, expected, atol=1e-9)


def test_refraction_limbs_and_parallax_enter_as_altitudes():
    # The centre at geometric altitude geometric_altitude(0) − k·s + π cos h: compare with the closed form.
    dec, lat, s = np.array([-20.0, 0.0, 20.0]), 53.0, 0.27
    for limb, k in (("centre", 0.0), ("upper", 1.0), ("lower", -1.0)):
        rise, _ = rise_set_azimuths(dec, lat, limb=limb, semidiameter_deg=s)
        topo = float(geometric_altitude(0.0)) - k * s
        h = topo + SOLAR_PARALLAX_DEG * np.cos(np.radians(topo))
        d, p, a = np.radians(dec), np.radians(lat), np.radians(h)
        expected = np.degrees(np.arccos((np.sin(d) - np.sin(p) * np.sin(a)) / (np.cos(p) * np.cos(a))))
        np.testing.assert_allclose(rise, expected, atol=1e-9)


def test_limb_order_and_refraction_direction():
    # At 53° N the rising Sun moves to larger azimuths: first gleam < centre < full disc; sunset mirrors it.
    dec = np.array([-23.0, 0.0, 23.0])
    r_u, s_u = rise_set_azimuths(dec, 53.0, limb="upper")
    r_c, s_c = rise_set_azimuths(dec, 53.0, limb="centre")
    r_l, s_l = rise_set_azimuths(dec, 53.0, limb="lower")
    assert np.all(r_u < r_c) and np.all(r_c < r_l)
    assert np.all(s_u > s_c) and np.all(s_c > s_l)
    # Refraction lifts the Sun, so it is seen rising earlier, further north.
    r_geo, _ = rise_set_azimuths(dec, 53.0, refraction=None)
    assert np.all(r_c < r_geo)


def test_set_mirrors_rise_on_flat_horizon():
    dec = np.linspace(-23.4, 23.4, 11)
    rise, set_ = rise_set_azimuths(dec, -33.9, limb="upper", refraction="saemundsson1986")
    np.testing.assert_allclose(set_, 360.0 - rise, atol=1e-9)


def test_profile_solver_agrees_with_closed_form_on_a_level_profile():
    # A profile that is level to 1e-9° takes the sampling+bisection path; it must match the closed form.
    az = np.arange(0.0, 360.0, 5.0)
    wobble = HorizonProfile(az, 1.0 + 1e-9 * (np.arange(az.size) % 2))
    dec = np.linspace(-23.0, 23.0, 9)
    for limb in ("centre", "upper", "lower"):
        got = rise_set_azimuths(dec, 53.0, horizon=wobble, limb=limb)
        ref = rise_set_azimuths(dec, 53.0, horizon=flat_horizon(-1.0), limb=limb)
        np.testing.assert_allclose(got, ref, atol=1e-6)


def test_profile_event_sits_on_the_skyline():
    # On an uneven skyline the limb's apparent altitude at the found azimuth equals the skyline's there.
    az = np.arange(0.0, 360.0, 10.0)
    profile = HorizonProfile(az, 2.0 + 1.5 * np.sin(np.radians(3.0 * az)))
    dec, lat, s = np.array([-22.0, -5.0, 8.0, 21.0]), 51.0, 0.2666
    rise, set_ = rise_set_azimuths(dec, lat, horizon=profile, limb="upper", semidiameter_deg=s)
    for azs, sign in ((rise, -1.0), (set_, 1.0)):
        # hour angle from azimuth for this declination: scan the diurnal circle finely and pick the match
        hour = np.linspace(0.0, 180.0, 600_001) * sign  # 0.0003° steps
        a_grid, alt_grid = azimuth_altitude_from_hour_angle(hour[None, :], dec[:, None], lat)
        idx = np.argmin(np.abs(a_grid - azs[:, None]), axis=1)
        alt_geo = alt_grid[np.arange(dec.size), idx]
        topo_limb = alt_geo - SOLAR_PARALLAX_DEG * np.cos(np.radians(alt_geo)) + s
        np.testing.assert_allclose(apparent_altitude(topo_limb), profile.altitude_at(azs), atol=5e-4)


def test_profile_first_and_last_crossing():
    # A wall 30° high from azimuth 150° to 210°: the Sun rises before and sets after it, not at it.
    az = np.arange(0.0, 360.0, 1.0)
    alt = np.where((az >= 150.0) & (az <= 210.0), 30.0, 0.0)
    rise, set_ = rise_set_azimuths(np.array([0.0]), 53.0, horizon=HorizonProfile(az, alt))
    flat_rise, flat_set = rise_set_azimuths(np.array([0.0]), 53.0)
    np.testing.assert_allclose(rise, flat_rise, atol=1e-3)
    np.testing.assert_allclose(set_, flat_set, atol=1e-3)
    # A skyline at 80° all round hides the Sun all day at 53° N.
    hidden = HorizonProfile(az, np.where(az < 180.0, 80.0, 79.0))
    r, s = rise_set_azimuths(np.array([10.0]), 53.0, horizon=hidden)
    assert np.isnan(r).all() and np.isnan(s).all()


def test_polar_day_and_night_are_nan():
    rise, set_ = rise_set_azimuths(np.array([20.0, -20.0, 0.0]), 80.0)
    assert np.isnan(rise[:2]).all() and np.isnan(set_[:2]).all()
    assert np.isfinite(rise[2]) and np.isfinite(set_[2])


def test_broadcasting_scalar_array_and_nan():
    r, s = rise_set_azimuths(10.0, 40.0)
    assert np.ndim(r) == 0 and np.ndim(s) == 0
    r, s = rise_set_azimuths(np.array([[10.0, np.nan], [-5.0, 0.0]]), 40.0)
    assert r.shape == (2, 2) and np.isnan(r[0, 1]) and np.isnan(s[0, 1])
    r, s = rise_set_azimuths(np.array([]), 40.0)
    assert r.shape == (0,)


def test_elevation_dips_the_level_horizon():
    dec = np.array([-20.0, 15.0])
    got = rise_set_azimuths(dec, 45.0, elevation_m=100.0)
    ref = rise_set_azimuths(dec, 45.0, horizon=flat_horizon(float(horizon_dip_deg(100.0))))
    np.testing.assert_allclose(got, ref, atol=1e-12)
    # Seen from above the sea the Sun rises earlier, at a smaller azimuth (it climbs towards the south).
    assert np.all(got[0] < rise_set_azimuths(dec, 45.0)[0])


@pytest.mark.parametrize(
    "kwargs",
    [dict(limb="middle"), dict(refraction="bennett"), dict(elevation_m=-5.0)],
)
def test_bad_input(kwargs):
    with pytest.raises(InputError):
        rise_set_azimuths(0.0, 45.0, **kwargs)


def test_bad_latitude():
    with pytest.raises(InputError, match="latitude"):
        rise_set_azimuths(0.0, 95.0)


@pytest.mark.filterwarnings("ignore:The file finals2000A.all has expired")
def test_against_skyfield_risings():
    # skyfield 1.55 almanac.find_risings/find_settings with JPL DE421 (skyfield-data): topocentric geometric
    # altitude −0.8333° (no refraction); azimuth there from skyfield's altaz().  Ours is given skyfield's
    # geocentric apparent declination at that instant, no refraction, the same altitude, parallax on.
    import skyfield_data
    from skyfield import almanac
    from skyfield.api import Loader, wgs84

    load = Loader(skyfield_data.get_skyfield_data_path(), verbose=False)
    ts = load.timescale(builtin=True)
    eph = load("de421.bsp")
    earth, sun = eph["earth"], eph["sun"]
    lat = 52.4
    site = earth + wgs84.latlon(lat, -7.9)
    t0, t1 = ts.utc(2024, 1, 1), ts.utc(2024, 12, 31)
    for finder, pick in ((almanac.find_risings, 0), (almanac.find_settings, 1)):
        t, ok = finder(site, sun, t0, t1, horizon_degrees=-0.8333)
        t = t[ok][::15]
        az_sf = site.at(t).observe(sun).apparent().altaz()[1].degrees
        dec = earth.at(t).observe(sun).apparent().radec(epoch="date")[1].degrees
        dist = earth.at(t).observe(sun).apparent().distance().au
        ours = rise_set_azimuths(
            dec,
            lat,
            horizon=flat_horizon(0.8333),
            refraction=None,
            semidiameter_deg=0.0,
            horizontal_parallax_deg=SOLAR_PARALLAX_DEG / dist,
        )[pick]
        # measured: 0.18″ largest difference; skyfield iterates its instants to well under 1 s.
        np.testing.assert_allclose(ours, az_sf, atol=3e-4)


@settings(max_examples=60, deadline=None)
@given(
    dec=st.floats(-24.5, 24.5),
    lat=st.floats(-64.0, 64.0),
    alt=st.floats(-1.0, 5.0),
    limb=st.sampled_from(["centre", "upper", "lower"]),
)
def test_profile_solver_matches_flat_closed_form_anywhere(dec, lat, alt, limb):
    # Property: on a level skyline the sampled+bisected profile path equals the closed form (1e-5°),
    # whenever the Sun rises and sets that day.
    az = np.arange(0.0, 360.0, 15.0)
    level = HorizonProfile(az, alt + 1e-10 * (np.arange(az.size) % 2))
    got = rise_set_azimuths(np.array([dec]), lat, horizon=level, limb=limb)
    ref = rise_set_azimuths(np.array([dec]), lat, horizon=flat_horizon(-alt), limb=limb)
    if np.isfinite(ref[0]).all():
        np.testing.assert_allclose(got, ref, atol=1e-5)
        np.testing.assert_allclose(ref[1], 360.0 - ref[0], atol=1e-9)
