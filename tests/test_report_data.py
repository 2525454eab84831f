"""The report's data (study.report_data): the same light as ``scan`` with the same settings, Sun paths on the
division days from the year's track, and a light patch lit through its event."""

from __future__ import annotations

import numpy as np
import pytest

from lightpath.light.options import ScanOptions, WindowOptions
from lightpath.light.scan import scan_scene
from lightpath.scene import demo_scene_path, load_scene
from lightpath.study.report_data import report_data, year_span_jd_ut

WINDOW = WindowOptions(samples=60)


@pytest.fixture(scope="module")
def room():
    scene = load_scene(demo_scene_path("quillfield"))
    data = report_data(scene, 2027, options=ScanOptions(), window_options=WINDOW, drift_years=[2026, 2027])
    return scene, data


def test_report_data_gives_the_light_of_scan(room):
    scene, data = room
    scan = scan_scene(scene, [2027], ScanOptions(), WINDOW)
    assert data.scan.settings == scan.settings and data.samples == 60
    mine, theirs = data.scan.years[0], scan.years[0]
    assert [(e.day, e.division, e.offset_days) for e in mine.events] == [
        (e.day, e.division, e.offset_days) for e in theirs.events
    ]
    assert mine.divisions == theirs.divisions
    assert mine.light_map is not None and theirs.light_map is None
    # the drift scan of the same year agrees with it too (same window)
    drift_2027 = next(y for y in data.drift.years if y.year == 2027)
    assert drift_2027.divisions == theirs.divisions


def test_sun_paths_follow_the_sun_on_each_division_day(room):
    from lightpath.sky.deltat import tt_from_ut
    from lightpath.sky.sun import sun_position

    scene, data = room
    divisions = data.scan.years[0].divisions
    assert [p.name for p in data.sun_paths] == [d.name for d in divisions]
    path = data.sun_paths[0]
    # the path is the Sun above −3° through the division's local day: its highest point agrees with a direct
    # computation on the same 3-minute grid (the track interpolates hourly nodes: far below 0.01°)
    assert path.altitude_deg.min() > -3.0 and path.altitude_deg.max() > 20.0
    start_ut = path.day - 0.5 - scene.observer.longitude_deg / 360.0
    t = tt_from_ut(start_ut + np.arange(0, 1441, 3) / 1440.0)
    direct = sun_position(t, scene.observer)
    np.testing.assert_allclose(np.max(direct.altitude_deg), path.altitude_deg.max(), atol=0.01)


def test_light_patch_is_lit_through_its_event(room):
    _, data = room
    patch = data.patch
    assert patch is not None
    best = max(data.scan.years[0].events, key=lambda e: e.peak_area_m2)
    assert patch.event.peak_area_m2 == best.peak_area_m2
    assert patch.lit.shape == (6, data.samples) and patch.jd_ut.shape == (6,)
    assert np.all((patch.jd_ut > best.start_jd_ut) & (patch.jd_ut < best.end_jd_ut))
    lit_area = (patch.lit * patch.area_m2[None, :]).sum(axis=1)
    assert lit_area.max() > 0  # some frame through the event has light on the target
    hours = np.asarray(patch.local_apparent_h)
    assert np.all((hours > best.start_local_apparent_h) & (hours < best.end_local_apparent_h))


def test_year_span_is_civil_midnight_to_civil_midnight():
    # America/Chicago is UTC−6 on 1 January (IANA tz database via zoneinfo): midnight is 06:00 UT
    first, last = year_span_jd_ut(2027, "America/Chicago")
    assert first == pytest.approx(2461406.5 + 0.25) and last == pytest.approx(2461771.5 + 0.25)


def test_drift_needs_two_years():
    from lightpath.errors import InputError

    with pytest.raises(InputError, match="drift_years"):
        report_data(demo_scene_path("quillfield"), 2027, window_options=WINDOW, drift_years=[2027])
