"""The engine's one Sun track (lightpath.light.track) against the Sun model it interpolates, and the run rule."""

from __future__ import annotations

import numpy as np
import pytest

from lightpath.light.runs import assign_runs, division_runs, runs_of_days
from lightpath.light.track import Air, SunTrack
from lightpath.sky.observer import Observer
from lightpath.sky.refraction import apparent_altitude
from lightpath.sky.sun import sun_position

SITE = Observer(latitude_deg=-29.9, longitude_deg=22.8, elevation_m=1180.0)


@pytest.mark.parametrize("jd0", [2461040.0, 2451545.0 - 365.25 * 3500])  # AD 2026 (DE421), 1500 BC (VSOP87D)
def test_track_interpolates_the_sun_model_to_a_fraction_of_an_arcsecond(jd0):
    track = SunTrack(SITE, jd0, jd0 + 5.0)
    t = jd0 + np.random.default_rng(1).uniform(0.0, 5.0, 400)
    got = track.positions(t)
    ref = sun_position(t, SITE)
    # the interpolation's own error budget: diurnal parallax curvature and the Sun's motion, < 0.1″ (module notes)
    assert np.abs(got.altitude_geometric_deg - ref.altitude_geometric_deg).max() * 3600 < 0.5
    d_az = (got.azimuth_deg - ref.azimuth_deg + 180.0) % 360.0 - 180.0
    assert np.abs(d_az * np.cos(np.radians(ref.altitude_geometric_deg))).max() * 3600 < 0.5
    assert np.abs(got.altitude_deg - ref.altitude_deg).max() * 3600 < 0.5  # same refraction model and air
    assert np.abs(got.jd_ut - ref.jd_ut).max() * 86400 < 1e-3
    d_lat = (got.local_apparent_time_h - ref.local_apparent_time_h + 12.0) % 24.0 - 12.0
    assert np.abs(d_lat).max() * 3600 < 0.1


def test_air_of_a_realisation_changes_only_the_refraction():
    track = SunTrack(SITE, 2461040.0, 2461042.0)
    t = np.linspace(2461040.2, 2461041.8, 50)
    base = track.positions(t)
    cold = track.positions(t, Air(temperature_c=-20.0, pressure_mbar=1040.0))
    assert np.allclose(base.altitude_geometric_deg, cold.altitude_geometric_deg)
    expected = apparent_altitude(base.altitude_geometric_deg, SITE.refraction, 1040.0, -20.0)
    assert np.allclose(cold.altitude_deg, expected)
    lifted = track.positions(t, Air(SITE.temperature_c, SITE.pressure_mbar, anomaly_deg=0.2))
    low = np.abs(base.altitude_deg) < 0.5  # near the horizon the anomaly is (almost) all there
    assert np.all(lifted.altitude_deg[low] - base.altitude_deg[low] > 0.15)


def test_track_refuses_instants_outside_its_span():
    track = SunTrack(SITE, 2461040.0, 2461041.0)
    with pytest.raises(ValueError, match="outside"):
        track.positions(2461050.0)


def test_runs_and_their_divisions():
    runs = runs_of_days([5, 6, 7, 9, 30, 31, 60])
    assert runs.tolist() == [[5, 7], [9, 9], [30, 31], [60, 60]]
    # divisions on days 6 and 45: [5, 7] contains 6; [9, 9] is nearer 6 than 45; [30, 31] nearer 45 (14 vs 24.5);
    # [60, 60] nearer 45
    owner = assign_runs(runs, [6, 45])
    assert owner.tolist() == [0, 0, 1, 1]
    per = division_runs(runs, owner, [6, 45])
    assert per.first_day.tolist() == [5, 30] and per.last_day.tolist() == [9, 60]
    assert per.days.tolist() == [4, 3]
    assert per.offsets().tolist() == [[0.0, -1.0, 3.0], [-14.0, -15.0, 15.0]]


def test_a_run_containing_two_division_days_goes_to_the_one_nearest_its_middle():
    assert assign_runs([[0, 40]], [2, 19, 38]).tolist() == [1]
    assert assign_runs([[10, 20]], [0, 30]).tolist() == [0]  # a tie: the earlier division
    assert assign_runs(np.zeros((0, 2)), [1]).tolist() == []
    assert np.isnan(division_runs(np.zeros((0, 2)), [], [3]).offsets()).all()
