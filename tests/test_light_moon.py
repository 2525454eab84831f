"""Moonlight through the engine: the Moon's track, the gate, the disc, and a slit aimed at a moonrise.

References: the Moon's place is :func:`lightpath.sky.moon.moon_position` (JPL DE421 through skyfield in 1900–2050,
checked against skyfield in ``tests/test_moon_skyfield.py``); the brute-force path
(:mod:`lightpath.light.bruteforce`, a ray per disc point per instant) is the geometric reference.
"""

from __future__ import annotations

import functools

import numpy as np
import pytest

from lightpath.errors import InputError
from lightpath.light.bruteforce import brute_force_fraction, brute_force_lit_area
from lightpath.light.grid import MOON_DECLINATION_LIMIT_DEG
from lightpath.light.moontrack import MoonTrack, relative_brightness
from lightpath.light.options import ScanOptions, WindowOptions
from lightpath.light.sweep import find_light
from lightpath.light.window import compute_window
from lightpath.light.year import year_light, year_sky
from lightpath.site.builders import Slot, slit_shrine
from lightpath.site.sampling import sample_target
from lightpath.sky.moon import moon_position
from lightpath.sky.observer import Observer
from lightpath.sky.vectors import enu_from_azalt

SITE = Observer(latitude_deg=30.0, longitude_deg=31.0, elevation_m=0.0)
DELTA_T_S = 69.0
T0 = 2460740.5  # 2025 March 15, 0h TT: the month of the major standstill's southern extreme
# The Moon's apparent place at 2025-03-25 23:07 TT from this site (moon_position, DE421): altitude 2°, rising at
# azimuth 125.514°, declination −28.65° (near the major standstill's southern extreme), Sun at −55°.
MOONRISE_AZ = 125.514
# 2025-03-21 13:46 TT: the Moon at altitude 2°, rising at azimuth 71.115° in daylight (Sun at +28°).
DAYTIME_MOONRISE_AZ = 71.115


@functools.lru_cache(maxsize=4)
def slit(azimuth_deg: float, band_deg: float = MOON_DECLINATION_LIMIT_DEG):
    """(model, samples, window) of a 6 cm slit shrine looking out to ``azimuth_deg`` (window band ±band_deg)."""
    model = slit_shrine(azimuth_deg, slit=Slot(width_m=0.06, height_m=0.3, sill_m=0.5), image=(-0.05, 0.05, 0.45, 0.6))
    s = sample_target(model.target(), count=16, seed=0)
    window = compute_window(model.blocking_mesh(), s.points_m, s.normals, s.area_m2, SITE.latitude_deg,
                            opening=model.opening(), resolution_deg=0.05, declination_limit_deg=band_deg)  # fmt: skip
    return model, s, window


@functools.lru_cache(maxsize=4)
def track(sun_below_deg: float = -6.0) -> MoonTrack:
    return MoonTrack(SITE, T0, T0 + 30.0, delta_t_s=DELTA_T_S, sun_below_deg=sun_below_deg)


def sweep(window, tr: MoonTrack):
    return find_light(window, tr.bound(), T0, T0 + 30.0, "first-gleam", semidiameter_deg=tr.disc_semidiameter_deg,
                      screen_step_d=tr.screen_step_d, screen_slop_deg=tr.screen_slop_deg)  # fmt: skip


@pytest.mark.parametrize(("latitude_deg", "source", "jd0"), [(30.0, "auto", T0), (60.0, "auto", T0),
                                                             (56.0, "vsop87", 1721058.0 - 1000 * 365.25)])  # fmt: skip
def test_track_interpolation_within_2_arcsec_of_direct_moon_position(latitude_deg, source, jd0):
    """10-minute nodes: the interpolated topocentric direction stays within 2″ of moon_position (measured ≈ 0.7″)."""
    tr = MoonTrack(Observer(latitude_deg, 31.0), jd0, jd0 + 20.0, source=source)
    t = jd0 + np.random.default_rng(1).uniform(0.0, 20.0, 2000)
    p, d = tr.ungated(t), tr.direct(t)
    u = enu_from_azalt(p.azimuth_deg, p.altitude_geometric_deg)
    v = enu_from_azalt(d.azimuth_deg, d.altitude_geometric_deg)
    err_arcsec = np.degrees(np.arccos(np.clip(np.sum(u * v, axis=-1), -1.0, 1.0))) * 3600.0
    assert err_arcsec.max() < 2.0
    assert np.max(np.abs(p.semidiameter_deg - d.semidiameter_deg)) < 1e-5
    assert np.max(np.abs(p.illuminated_fraction - d.illuminated_fraction)) < 1e-4
    # the Sun's apparent altitude where a gate acts (−18..−3°): within 0.02° (measured 0.008°, ≈ 2 s of time);
    # near the horizon refraction bends it by up to 0.1° between nodes, deep at night the curvature by 0.03°
    low = (d.sun_altitude_deg < -3.0) & (d.sun_altitude_deg > -18.0)
    assert np.max(np.abs(p.sun_altitude_deg - d.sun_altitude_deg)[low]) < 0.02


def test_slit_aimed_at_a_moonrise_matches_brute_force():
    """Every minute the brute force (rays toward 64 points of the disc at moon_position's direction and size)
    finds lit lies inside an interval of the engine, and every interval holds brute-force minutes."""
    model, s, window = slit(MOONRISE_AZ)
    tr = track()
    intervals = sweep(window, tr)
    assert intervals, "the slit aimed at the moonrise must see the Moon"
    peak = tr.ungated(np.array([x.peak_jd_tt for x in intervals]))
    assert np.all(peak.sun_altitude_deg < -6.0)
    # brute force at every minute the Moon is near the slit's azimuth and low
    t = T0 + np.arange(0.0, 30.0, 1.0 / 1440.0)
    p = moon_position(t, SITE, delta_t_s=DELTA_T_S)
    near = (np.abs((p.azimuth_deg - MOONRISE_AZ + 180.0) % 360.0 - 180.0) < 3.0) & (np.abs(p.altitude_deg - 2.0) < 4)
    near &= p.sun_altitude_deg < -6.0
    d = enu_from_azalt(p.azimuth_deg[near], p.altitude_deg[near])
    sd = np.asarray(p.semidiameter_deg)[near]
    mesh = model.blocking_mesh()
    f = np.vstack([brute_force_fraction(mesh, s.points_m, s.normals, d[i : i + 1], semidiameter_deg=float(sd[i]))
                   for i in range(len(d))])  # fmt: skip
    lit = t[near][brute_force_lit_area(f, s.area_m2, "first-gleam") > 0]
    assert lit.size >= 10
    starts = np.array([x.start_jd_tt for x in intervals])
    ends = np.array([x.end_jd_tt for x in intervals])
    slack = 15.0 / 86400.0  # bisection (5 s) plus the disc's rounding to one radius a span (≈ 3 s here)
    inside = (lit[:, None] >= starts[None, :] - slack) & (lit[:, None] <= ends[None, :] + slack)
    assert inside.any(axis=1).all()
    for a, b in zip(starts, ends, strict=True):
        mine = lit[(lit >= a - slack) & (lit <= b + slack)]
        assert mine.size
        # the truth lies within the minute outside the brute force's first and last lit minutes
        assert mine[0] - a < (60.0 + 15.0) / 86400.0 and b - mine[-1] < (60.0 + 15.0) / 86400.0


def test_no_moonlight_while_the_sun_is_up():
    """A slit aimed at a daytime moonrise: light only when the gate is opened (Sun below +90°)."""
    _, _, window = slit(DAYTIME_MOONRISE_AZ)
    gated = sweep(window, track(-6.0))
    open_gate = sweep(window, track(90.0))
    assert open_gate, "the Moon does pass the slit (in daylight)"
    day = np.array([x.peak_jd_tt for x in open_gate])
    assert np.any(track(90.0).ungated(day).sun_altitude_deg > 0.0)
    assert all(track(-6.0).ungated(x.peak_jd_tt).sun_altitude_deg < -6.0 for x in gated)
    assert len(gated) < len(open_gate)


def test_the_gate_is_bisected_like_any_edge_of_light():
    """With the gate's Sun altitude set inside a pass, the interval starts or ends where the Sun crosses it
    (moon_position's Sun altitude, 5-s bisection)."""
    _, _, window = slit(MOONRISE_AZ)
    whole = sweep(window, track(-6.0))
    x = max(whole, key=lambda i: i.end_jd_tt - i.start_jd_tt)
    mid = 0.5 * (x.start_jd_tt + x.end_jd_tt)
    threshold = float(track().direct(mid).sun_altitude_deg)
    tr = MoonTrack(SITE, T0, T0 + 30.0, delta_t_s=DELTA_T_S, sun_below_deg=threshold)
    cut = [i for i in sweep(window, tr) if i.end_jd_tt > x.start_jd_tt and i.start_jd_tt < x.end_jd_tt]
    assert len(cut) == 1
    edge = cut[0].end_jd_tt if abs(cut[0].end_jd_tt - mid) < abs(cut[0].start_jd_tt - mid) else cut[0].start_jd_tt
    assert abs(edge - mid) * 86400.0 < 10.0


def test_a_window_too_narrow_for_the_moon_is_refused():
    _, _, window = slit(MOONRISE_AZ, 25.5)
    sky = year_sky(SITE, 2025, ScanOptions(body="moon", delta_t_s=DELTA_T_S))
    with pytest.raises(InputError, match="declination_limit_deg"):
        year_light(window, sky)


def test_year_of_moonlight_events_carry_phase_and_brightness():
    """A year through the one path (year_sky → year_light → light_events) with body "moon"."""
    from lightpath.light.events import light_events

    _, _, window = slit(MOONRISE_AZ)
    options = ScanOptions(body="moon", delta_t_s=DELTA_T_S)
    light = year_light(window, year_sky(SITE, 2025, options))
    events = light_events(light, window.total_area_m2)
    assert events
    for e in events:
        assert e.body == "moon" and np.isnan(e.sun_azimuth_deg) and e.sun_altitude_deg < -6.0
        assert abs(((e.moon_azimuth_deg - MOONRISE_AZ + 180.0) % 360.0) - 180.0) < 1.0
        assert 0.0 <= e.moon_illuminated_fraction <= 1.0
        # Krisciunas & Schaefer (1991) eq. 20 at the event's phase angle
        assert e.moon_relative_brightness == pytest.approx(float(relative_brightness(e.moon_phase_angle_deg)))
        # Meeus (1998) eq. 48.1: k = (1 + cos i) / 2
        assert e.moon_illuminated_fraction == pytest.approx((1 + np.cos(np.radians(e.moon_phase_angle_deg))) / 2, 1e-4)


def test_relative_brightness_of_the_phase_law():
    """Krisciunas & Schaefer (1991) eq. 20: V(α) − V(0) = 0.026|α| + 4e-9 α⁴ magnitudes."""
    assert float(relative_brightness(0.0)) == 1.0
    assert float(relative_brightness(-90.0)) == pytest.approx(10 ** (-0.4 * (2.34 + 4e-9 * 90**4)))
    assert np.all(np.diff(relative_brightness(np.linspace(0, 180, 19))) < 0)


def test_window_options_for_the_moon():
    assert WindowOptions().for_body("moon").declination_limit_deg == MOON_DECLINATION_LIMIT_DEG
    assert WindowOptions().for_body("sun").declination_limit_deg == 25.5
    with pytest.raises(InputError, match="body"):
        ScanOptions(body="venus").check()
    with pytest.raises(InputError, match="sun_below_deg"):
        ScanOptions(body="moon", sun_below_deg=5.0).check()


def test_scan_command_with_body_moon(capsys, tmp_path):
    """``lightpath scan DEMO --body moon``: moonlight events with the Moon's numbers in JSON and CSV; bad gate → 2."""
    import csv
    import json

    from lightpath.cli import main
    from lightpath.scene import demo_scene_path

    scene = str(demo_scene_path("quillfield"))
    out_csv = tmp_path / "moon.csv"
    args = ["scan", scene, "--year", "2025", "--body", "moon", "--samples", "40", "--no-cache", "--quiet"]
    assert main([*args, "--json", "--csv", str(out_csv)]) == 0
    data = json.loads(capsys.readouterr().out)
    assert data["settings"]["body"] == "moon" and data["settings"]["sun_below_deg"] == -6.0
    events = data["years"][0]["events"]
    assert events and all(e["body"] == "moon" and e["sun_altitude_deg"] < -6.0 for e in events)
    rows = list(csv.DictReader(line for line in out_csv.read_text().splitlines() if not line.startswith("#")))
    assert len(rows) == len(events) and float(rows[0]["moon_illuminated_fraction"]) >= 0.0
    assert main([*args, "--sun-below", "3"]) == 2
    assert "--sun-below" in capsys.readouterr().err


def test_a_slit_aimed_at_the_southern_extreme_sees_moonlight_only_in_its_standstill_season():
    """A slit aimed at the 2025 southern-extreme moonrise, scanned 2017–2034, year by year through the one path.

    The Moon's monthly southern extreme swings between −(ε + i) and −(ε − i) over the 18.6-year nodal cycle
    (Thom 1971; Ruggles 1999, ch. 3, from memory): the slit (its sill and lintel pass a few degrees of altitude,
    about 2° of declination at this azimuth) sees the Moon only in the months whose southern extreme comes within
    2° of the major standstill's (−28.73° in March 2025, :func:`lightpath.sky.standstills.standstill_seasons`,
    JPL DE421): one run of years around 2025, shorter than a third of the cycle, none at the minor standstill of 2034.
    """
    from lightpath.light.events import light_events
    from lightpath.sky.moon import geocentric_moon
    from lightpath.sky.standstills import standstill_seasons

    _, _, window = slit(MOONRISE_AZ)
    season = next(s for s in standstill_seasons(2020, 2030) if (s.kind, s.direction) == ("major", "south"))
    lit_years, peaks = set(), []
    for year in range(2017, 2035):
        events = light_events(year_light(window, year_sky(SITE, year, ScanOptions(body="moon"))), window.total_area_m2)
        lit_years.update({year} if events else set())
        peaks += [e.peak_jd_ut for e in events]
    assert 2025 in lit_years and 2034 not in lit_years
    assert lit_years == set(range(min(lit_years), max(lit_years) + 1))  # one season, no stray years
    assert (max(peaks) - min(peaks)) / 365.25 < 18.6 / 3
    declination = geocentric_moon(np.array(peaks)).declination_deg
    assert np.all(np.abs(declination - season.extreme_declination_deg) < 2.0)
