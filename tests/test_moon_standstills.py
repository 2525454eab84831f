"""Lunar standstills: the nodal cycle, the seasons and their extreme declinations, the extremes' moonrise azimuths.

Facts of the trade (common values, no published source needed): i ≈ 5.145° (the mean inclination of the lunar
orbit; it swings by about ±0.15° with the Sun's pull, so monthly extremes reach ε ± i within about 0.2°); the
node regresses in 18.6 years; major standstill seasons around 2006, 2024–2025 and about 2043, minor ones
between them.  ε is the long-term mean obliquity of date (Vondrák et al. 2011).
"""

import numpy as np
import pytest

from lightpath.errors import InputError
from lightpath.sky import deltat, orientation
from lightpath.sky.standstills import extreme_rise_set_azimuths, node_instants, standstill_seasons

INCLINATION_DEG = 5.145  # common value
SWING_DEG = 0.2  # the inclination swings by about ±0.15° (common value), nutation tilts the equator by ≤ 9.2″


@pytest.fixture(scope="module")
def recent():
    return standstill_seasons(2000, 2045)


def _year(jd):
    return float(deltat.year_of_jd(jd))


def test_nodal_cycle_period():
    instants = node_instants(1900, 2050)
    majors = [t for k, t in instants if k == "major"]
    assert len(majors) >= 8
    period_years = np.diff(majors) / 365.25
    assert np.all(np.abs(period_years - 18.61) < 0.02)  # 18.6-year cycle
    kinds = [k for k, _ in instants]
    assert all(a != b for a, b in zip(kinds, kinds[1:], strict=False))  # major and minor alternate


def test_recent_and_next_major_seasons(recent):
    majors = [s for s in recent if s.kind == "major"]
    years = sorted({round(_year(s.extreme_jd_tt)) for s in majors})
    assert years[0] in (2006, 2007) and 2025 in years and years[-1] in (2043, 2044)
    # the 2024–2025 season covers both years
    season = [s for s in majors if 2023 < _year(s.extreme_jd_tt) < 2027]
    assert len(season) == 2
    for s in season:
        assert _year(s.start_jd_tt) < 2024.5 and _year(s.end_jd_tt) > 2025.5
        assert s.source == "JPL DE421 via skyfield"


@pytest.mark.parametrize("kind", ["major", "minor"])
def test_extremes_reach_epsilon_plus_minus_i(recent, kind):
    for s in (x for x in recent if x.kind == kind):
        eps = float(orientation.mean_obliquity_deg(s.extreme_jd_tt))
        expected = eps + INCLINATION_DEG if kind == "major" else eps - INCLINATION_DEG
        sign = 1.0 if s.direction == "north" else -1.0
        assert abs(s.extreme_declination_deg - sign * expected) < SWING_DEG
        assert s.start_jd_tt <= s.extreme_jd_tt <= s.end_jd_tt and s.months >= 12


def test_major_standstill_2500_bc_with_a_larger_obliquity():
    seasons = standstill_seasons(-2510, -2490)  # long-term theory: DE421 does not reach
    major = [s for s in seasons if s.kind == "major"]
    assert major and major[0].source.startswith("ELP/MPP02")
    for s in major:
        eps = float(orientation.mean_obliquity_deg(s.extreme_jd_tt))  # ≈ 23.98° then
        assert abs(abs(s.extreme_declination_deg) - (eps + INCLINATION_DEG)) < SWING_DEG
        # ΔT's σ ≈ 0.8·t² s (Morrison & Stephenson 2004): ~25 min, the Moon ~0.2° against the Sun
        assert 1000.0 < s.delta_t_sigma_s < 2000.0 and 0.1 < s.moon_shift_deg < 0.3


def test_extreme_moonrise_azimuth_closed_form(recent):
    # flat horizon, no refraction, disc centre: the topocentric centre on the horizon is the geocentric centre at
    # altitude h0 = π (horizontal parallax); cos H = (sin h0 − sin φ sin δ)/(cos φ cos δ) (Meeus 1998 eq. 15.1) and
    # the azimuth from H, δ, φ (Meeus eq. 13.5)
    lat = 55.0
    rise, set_ = extreme_rise_set_azimuths(recent, lat, refraction=None)
    for s, r, st in zip(recent, rise, set_, strict=True):
        d, p, h0 = np.radians([s.extreme_declination_deg, lat, s.horizontal_parallax_deg])
        cos_h = (np.sin(h0) - np.sin(p) * np.sin(d)) / (np.cos(p) * np.cos(d))
        ha = -np.arccos(cos_h)
        az = np.degrees(np.arctan2(np.sin(ha), np.cos(ha) * np.sin(p) - np.tan(d) * np.cos(p))) + 180.0
        assert r == pytest.approx(az % 360.0, abs=1e-6)
        assert st == pytest.approx(360.0 - r, abs=1e-6)


def test_far_north_the_major_moon_never_sets():
    seasons = [s for s in standstill_seasons(2024, 2026) if s.direction == "north"]
    rise, _ = extreme_rise_set_azimuths(seasons, 70.0, refraction=None)
    assert np.all(np.isnan(rise))  # δ ≈ 28.7° > 90° − 70°: circumpolar


@pytest.mark.parametrize(
    ("first", "last", "words"),
    [(-3100, -3000, "--from: year -3100 is outside"), (2000, 3100, "--to: year 3100 is outside"),
     (2000, 1990, "before --from"), (1000, 1700, "longer than 600 years")],
)  # fmt: skip
def test_span_checked_before_work(first, last, words):
    with pytest.raises(InputError, match=words):
        standstill_seasons(first, last)
