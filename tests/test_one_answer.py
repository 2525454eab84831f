"""One question, one answer: scan, visit, the framing test's observed geometry and epochs agree day for day.

On each demo scene, with the same engine settings (one WindowOptions, one ScanOptions), every path that
reports days of light must give the same light days per division, the same run assignment and the same
first and last days: they all go through lightpath.light.year.
"""

from __future__ import annotations

import numpy as np
import pytest

from lightpath.light.options import ScanOptions, WindowOptions
from lightpath.light.scan import prepare_window, scan_window
from lightpath.scene import demo_scene_path, load_scene
from lightpath.study.epochs import alignment_epochs
from lightpath.study.framing import framing_test
from lightpath.study.light_days import LightDays
from lightpath.study.visit import visit_scene

#: The year each demo scene is built for (tools/make_demo_models.py).
DEMO_YEARS = {"sandwren": -1499, "larchfold": -2599, "quillfield": 2027}
WINDOW = WindowOptions(samples=40, seed=2)


@pytest.fixture(scope="module", params=sorted(DEMO_YEARS))
def demo(request):
    name = request.param
    scene = load_scene(demo_scene_path(name))
    options = ScanOptions(parts=16 if name == "larchfold" else 8)
    window = prepare_window(scene, WINDOW)
    return name, scene, window, options


def _scan_runs(scene, window, options, year):
    y = scan_window(window, scene.observer, [year], options).years[0]
    return y, {d.name: (d.first_offset_days, d.last_offset_days, d.days) for d in y.divisions}


def test_scan_and_the_studies_give_the_same_days(demo):
    name, scene, window, options = demo
    year = DEMO_YEARS[name]
    y, scan_runs = _scan_runs(scene, window, options, year)
    assert any(days for _, _, days in scan_runs.values()), "the demo is built to catch light"
    # the study's days (framing test and epochs ask LightDays) for the surveyed geometry
    light = LightDays(window, scene.observer, options)
    offsets = light.evaluate(year)
    for name_k, row in zip(light.division_names(year), offsets, strict=True):
        first, last, _ = scan_runs[name_k]
        if first is None:
            assert np.isnan(row).all(), name_k
        else:
            assert (row[1], row[2]) == (first, last), name_k
    # every event of the scan sits in a run of its division, with its own offset
    for e in y.events:
        first, last, _ = scan_runs[e.division]
        assert first <= e.offset_days <= last
        assert e.day - e.division_day == e.offset_days
    # the framing test's observed geometry and epochs' nominal row: the same first and last days
    lit = [k for k, (f, _, _) in scan_runs.items() if f is not None]
    target = lit[0]
    axis = np.array([0.0, 1.0, 0.0])
    framing = framing_test(LightDays(window, scene.observer, options, (target,)), year=year, axis_enu=axis,
                           draws=0, null_draws=0)  # fmt: skip
    observed = framing.divisions[0]
    assert (observed.observed_first_day, observed.observed_last_day) == scan_runs[target][:2]
    epochs = alignment_epochs(LightDays(window, scene.observer, options), division=target, from_year=year,
                              to_year=year, draws=0)  # fmt: skip
    assert (epochs.rows[0].first_day, epochs.rows[0].last_day) == scan_runs[target][:2]


def test_the_report_gives_the_scan_days(demo):
    """The report's data (study.report_data) with the same settings: the same runs and events as scan."""
    from lightpath.study.report_data import report_data

    name, scene, window, options = demo
    year = DEMO_YEARS[name]
    y, scan_runs = _scan_runs(scene, window, options, year)
    data = report_data(scene, year, options=options, window_options=WINDOW)
    r = data.scan.years[0]
    assert {d.name: (d.first_offset_days, d.last_offset_days, d.days) for d in r.divisions} == scan_runs
    assert [(e.day, e.division, e.offset_days) for e in r.events] == [
        (e.day, e.division, e.offset_days) for e in y.events
    ]
    assert data.scan.settings.samples == WINDOW.samples and data.scan.settings.resolution_deg == WINDOW.resolution_deg


def test_visit_gives_the_scan_events_of_a_modern_year():
    scene = load_scene(demo_scene_path("quillfield"))
    window = prepare_window(scene, WINDOW)
    options = ScanOptions()
    y, _ = _scan_runs(scene, window, options, 2027)
    first = min(e.start_jd_ut for e in y.events) - 1.0
    last = max(e.end_jd_ut for e in y.events) + 1.0
    plan = visit_scene(scene, first, last, options, window=window, refraction_sigma_deg=0.0)
    assert [(v.event.day, v.event.division, v.event.offset_days) for v in plan.events] == [
        (e.day, e.division, e.offset_days) for e in y.events
    ]


def test_a_run_across_new_year_is_reported_whole_once():
    """A December-solstice run of an ancient Julian year crosses 1 January: reported whole, under one year."""
    scene = load_scene(demo_scene_path("sandwren"))
    window = prepare_window(scene, WINDOW)
    # turn the scene's window about the vertical so it looks at the December-solstice sunset instead
    from lightpath.light.options import Conditions
    from lightpath.light.scan import scan_year
    from lightpath.study.uncertainty import rotation_about_up

    found = None
    for turn in sorted(np.arange(-20.0, 21.0, 1.0), key=abs):  # look for a turn that puts the run across 1 January
        rot = rotation_about_up(float(turn))
        years = {yr: scan_year(window, scene.observer, yr, conditions=Conditions(rotation=rot)) for yr in (-600, -599)}
        dec = [d for d in years[-599].divisions if d.name == "december_solstice"][0]
        if dec.days and dec.first_offset_days < -12 and dec.last_offset_days > 12:
            found = years, dec
            break
    assert found is not None, "no rotation gave a December-solstice run"
    years, dec = found
    from lightpath.sky.calendar import calendar_date

    first_year = calendar_date(float(dec.first_day), "julian")[0]
    last_year = calendar_date(float(dec.last_day), "julian")[0]
    days = [e.day for e in years[-599].events if e.division == "december_solstice"]
    assert len(days) >= dec.days and min(days) == dec.first_day and max(days) == dec.last_day
    # no event of that run is listed again under the neighbouring year
    assert not [e for e in years[-600].events if dec.first_day <= e.day <= dec.last_day]
    assert (first_year, last_year) == (-600, -599)  # the run does cross 1 January
