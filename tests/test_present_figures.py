"""The figures exist, are non-empty, carry their axis labels and mark the division dates."""

from __future__ import annotations

import numpy as np
import pytest
from test_present_fixture import (
    LONGITUDE_DEG,
    MAP_FIRST_DAY,
    MAP_LAST_DAY,
    TARGET_AREA_M2,
    day_number,
    make_ancient_year,
    make_scan,
)

from lightpath.errors import InputError
from lightpath.light.results import LightMap, ScanResult, YearScan
from lightpath.present.figures import day_of_year, epoch_drift_figure, figure_bytes, light_calendar_figure, save_figure
from lightpath.present.window_figures import flatten_target, light_patch_figure, sky_window_figure


def _texts(ax):
    return [t.get_text() for t in ax.texts]


def test_light_calendar_labels_and_division_marks(tmp_path):
    year = make_scan().years[0]
    fig = light_calendar_figure(year, longitude_deg=LONGITUDE_DEG, target_area_m2=TARGET_AREA_M2)
    ax = fig.axes[0]
    assert ax.get_xlabel() == "Local apparent day (Gregorian calendar; day 1 = 1 January 2027)"
    assert ax.get_ylabel() == "Local apparent solar time (h)"
    assert fig.axes[1].get_ylabel() == "Lit fraction of the target"
    assert set(_texts(ax)) == {"March equinox", "June solstice", "September equinox", "December solstice"}
    # Year 2027's divisions begin at the December solstice of 2026: 2026-12-21 is 11 days before
    # 1 January 2027, day −10; the March equinox 2027-03-20 is day 79.
    xs = sorted(line.get_xdata()[0] for line in ax.get_lines())
    assert xs[0] == pytest.approx(-10.0) and xs[1] == pytest.approx(79.0)
    assert ax.xaxis.get_major_formatter()(-10.0, 0) == "12-21" and ax.xaxis.get_major_formatter()(1.0, 0) == "01-01"
    # The y range hugs the lit minutes (08:50–09:07 local apparent time) with an hour either side.
    low, high = ax.get_ylim()
    assert low == pytest.approx(530 / 60 - 1) and high == pytest.approx(545 / 60 + 1)
    png = save_figure(fig, tmp_path / "calendar.png")
    svg = save_figure(fig, tmp_path / "calendar.svg")
    assert png.read_bytes()[:8] == b"\x89PNG\r\n\x1a\n" and png.stat().st_size > 10_000
    assert b"<svg" in svg.read_bytes()[:2000]


def test_light_calendar_lit_cells_fall_on_the_lit_days():
    year = make_scan().years[0]
    doy = day_of_year(year.light_map.day_jd_ut, 2027, "gregorian", LONGITUDE_DEG)
    jan1 = day_number(2027, 1, 1)
    assert doy[0] == MAP_FIRST_DAY - jan1 + 1 == -20 and doy[-1] == MAP_LAST_DAY - jan1 + 1 == 354
    lit_doy = doy[year.light_map.area_m2.max(axis=1) > 0]
    assert lit_doy.tolist() == list(range(-13, -6))  # December 18..24 of 2026


def test_light_calendar_draws_a_run_across_1_january_whole():
    """A run from 2026-12-28 to 2027-01-03 is one block of lit cells, on both sides of day 1."""
    first, last = day_number(2026, 12, 20), day_number(2027, 1, 10)
    days = np.arange(first, last + 1)
    minutes = np.arange(600.0, 660.0, 5.0)
    area = np.zeros((days.size, minutes.size))
    lit_days = (days >= day_number(2026, 12, 28)) & (days <= day_number(2027, 1, 3))
    area[lit_days, 3:6] = 0.1
    year = YearScan(2027, "gregorian", "test", [], [], LightMap(days - 0.5, minutes, area))
    fig = light_calendar_figure(year, longitude_deg=0.0)
    mesh = fig.axes[0].collections[0]
    values = np.ma.filled(mesh.get_array(), np.nan).reshape(minutes.size, days.size)
    lit_columns = np.flatnonzero(np.isfinite(values).any(axis=0))
    x_edges = mesh.get_coordinates()[0, :, 0]
    assert (x_edges[lit_columns] + 0.5).tolist() == list(range(-3, 4))  # days −3 … 3: 28 December … 3 January


def test_light_calendar_needs_a_light_map():
    with pytest.raises(InputError, match="light map"):
        light_calendar_figure(make_ancient_year(), longitude_deg=0.0)


def test_epoch_drift_plots_first_and_last_day_per_year():
    scan = make_scan(with_ancient=True)
    fig = epoch_drift_figure(scan)
    ax = fig.axes[0]
    assert ax.get_ylabel() == "Days from the division (days)"
    assert ax.get_xlabel().startswith("Year")
    labels = [line.get_label() for line in ax.get_lines()]
    assert "December solstice: first day" in labels and "December solstice: last day" in labels
    first = next(line for line in ax.get_lines() if line.get_label() == "December solstice: first day")
    assert first.get_xdata().tolist() == [-3199.0, 2027.0]
    assert first.get_ydata().tolist() == [-4.0, -3.0]
    assert "division day" in _texts(ax)
    # Year labels for people: astronomical -3199 is 3200 BC.
    assert ax.xaxis.get_major_formatter()(-3199, 0) == "3200 BC"
    with pytest.raises(InputError, match="no division named"):
        epoch_drift_figure(scan, divisions=["Midsummer"])


def test_epoch_drift_without_light_says_so():
    empty = ScanResult("x", make_scan().settings, 1.0, [make_scan().years[0].__class__(2026, "gregorian", "s", [], [])])
    fig = epoch_drift_figure(empty)
    assert "no light near any division" in " ".join(_texts(fig.axes[0]))


def test_sky_window_chart_across_north():
    t = np.linspace(0, 2 * np.pi, 50)
    outline = ((355.0 + 8 * np.cos(t)) % 360.0, 10.0 + 4 * np.sin(t))  # a window straddling north
    horizon = (np.arange(0.0, 360.0, 5.0), 1.0 + 0.5 * np.sin(np.radians(np.arange(0.0, 360.0, 5.0))))
    track = ("June solstice", np.linspace(330.0, 390.0, 61) % 360.0, np.linspace(5.0, 15.0, 61))
    fig = sky_window_figure([outline], horizon=horizon, sun_tracks=[track])
    ax = fig.axes[0]
    assert ax.get_xlabel() == "Azimuth (degrees from true north, clockwise)"
    assert ax.get_ylabel() == "Altitude (degrees)"
    low, high = ax.get_xlim()
    assert high - low == pytest.approx(16.0 + 30.0, abs=0.5)  # 16° window + 15° margins, not 360°
    labels = [line.get_label() for line in ax.get_lines()]
    assert "Sun, June solstice" in labels and "horizon profile" in labels
    sun = next(line for line in ax.get_lines() if line.get_label() == "Sun, June solstice")
    assert np.nanmax(np.abs(np.diff(sun.get_xdata()))) < 2.0  # no line drawn across the wrap
    assert len(figure_bytes(fig)) > 5_000


def test_flatten_target_recovers_a_tilted_rectangle():
    rng = np.random.default_rng(3)  # random-number-generator seed
    uv_true = rng.uniform([-1.0, -0.25], [1.0, 0.25], size=(300, 2))
    e1 = np.array([1.0, 1.0, 0.0]) / np.sqrt(2)
    e2 = np.array([0.0, 0.0, 1.0])
    pts = uv_true[:, :1] * e1 + uv_true[:, 1:] * e2 + np.array([10.0, 5.0, 2.0])
    uv = flatten_target(pts)
    # The points lie in one plane, so laying them flat keeps every distance between them (a rigid map).
    d3 = np.linalg.norm(pts[:, None, :] - pts[None, :, :], axis=-1)
    d2 = np.linalg.norm(uv[:, None, :] - uv[None, :, :], axis=-1)
    np.testing.assert_allclose(d2, d3, atol=1e-9)
    # A wall: the first axis is level (along e1), the second goes up it.
    assert np.ptp(uv[:, 0]) == pytest.approx(np.ptp(uv_true[:, 0]), rel=1e-9)
    assert np.ptp(uv[:, 1]) == pytest.approx(np.ptp(uv_true[:, 1]), rel=1e-9)


def test_light_patch_strip_has_one_frame_per_instant():
    gx, gz = np.meshgrid(np.linspace(0, 1, 20), np.linspace(0, 0.5, 10))
    pts = np.column_stack([gx.ravel(), np.zeros(gx.size), gz.ravel()])
    lit = np.stack([pts[:, 0] < f for f in (0.2, 0.5, 0.8)])
    fig = light_patch_figure(pts, lit, ["08:50", "08:58", "09:05"])
    frames = [ax for ax in fig.axes if ax.axison]
    assert [ax.get_title() for ax in frames] == ["08:50 — 20% lit", "08:58 — 50% lit", "09:05 — 80% lit"]
    assert frames[0].get_xlabel() == "Along the target, level (m)" and frames[0].get_ylabel() == "Up the target (m)"
    with pytest.raises(InputError, match="do not match"):
        light_patch_figure(pts, lit, ["a", "b"])


def test_window_outline_of_a_tube_is_its_cone():
    """A sample at the bottom of a straight tube sees a cone of half-angle atan(r/L) (closed form)."""
    import trimesh

    from lightpath.light.window import compute_window
    from lightpath.present.window_figures import window_outlines

    tube = trimesh.creation.cylinder(radius=0.5, height=4.0, sections=64)
    tube.update_faces(np.abs(tube.face_normals[:, 2]) < 0.5)  # drop the end caps: an open tube
    tube.remove_unreferenced_vertices()
    tube.apply_transform(trimesh.transformations.rotation_matrix(np.pi / 2, [0, 1, 0]))  # axis to the east
    tube.apply_transform(trimesh.transformations.rotation_matrix(-np.radians(5.0), [0, 1, 0]))  # raised 5°
    axis = np.array([np.cos(np.radians(5.0)), 0.0, np.sin(np.radians(5.0))])
    window = compute_window(tube, [-1.9 * axis], [axis], [1.0], latitude_deg=52.0, resolution_deg=0.1)
    outlines = window_outlines(window)
    assert len(outlines) == 1
    az, alt = (np.radians(v) for v in outlines[0])
    v = np.column_stack([np.sin(az) * np.cos(alt), np.cos(az) * np.cos(alt), np.sin(alt)])
    half_angle = np.degrees(np.arccos(np.clip(v @ axis, -1, 1)))
    # the 64-sided tube's inscribed and circumscribed radii give 7.297° and 7.306°; one cell (0.1°) of tolerance
    np.testing.assert_allclose(half_angle, np.degrees(np.arctan(0.5 / 3.9)), atol=0.1)
    fig = sky_window_figure(outlines)
    low, high = fig.axes[0].get_xlim()
    assert low < 90.0 - 7.0 and high > 90.0 + 7.0


def test_light_calendar_without_light_says_so():
    year = make_scan().years[0]
    dark = year.light_map.__class__(year.light_map.day_jd_ut, year.light_map.minutes, 0 * year.light_map.area_m2)
    fig = light_calendar_figure(year.__class__(2026, "gregorian", "s", [], year.divisions, dark), longitude_deg=0.0)
    assert "no light reaches the target in this year" in _texts(fig.axes[0])
    assert fig.axes[0].yaxis.get_major_formatter()(8.5, 0) == "08:30"


def test_epoch_drift_ticks_on_round_bc_years():
    import dataclasses

    ancient = make_ancient_year()
    years = [dataclasses.replace(ancient, year=y) for y in (-1799, -1649, -1499, -1349, -1199)]
    fig = epoch_drift_figure(ScanResult("x", make_scan().settings, 1.0, years))
    labels = sorted(t.get_text() for t in fig.axes[0].get_xticklabels())
    assert labels == [f"{n} BC" for n in (1200, 1300, 1400, 1500, 1600, 1700, 1800)]
