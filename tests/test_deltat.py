"""ΔT, its σ and the TT/UT conversions, checked against published tables."""

import numpy as np
import pytest
from skyfield.functions import load_bundled_npy

from lightpath.sky.calendar import calendar_date, julian_day
from lightpath.sky.deltat import (
    DELTA_T_SIGMA_NOTE,
    DELTA_T_SOURCE,
    IERS_SIGMA_S,
    delta_t_s,
    delta_t_sigma_s,
    iers_span_jd_tt,
    tt_from_ut,
    ut_date_uncertain,
    ut_from_tt,
    year_of_jd,
)


def _ms2004_table():
    """Morrison & Stephenson (2004) smoothed ΔT table, as bundled by skyfield 1.55
    (``morrison_stephenson_deltat.npy``: JD TT, ΔT s); the same values as the Espenak &
    Meeus (2006) table (17,190 s at -500, 10,580 s at 0, 1,570 s at 1000)."""
    jd, dt = load_bundled_npy("morrison_stephenson_deltat.npy")
    return jd, dt


def test_espenak_meeus_values_are_in_the_bundled_table():
    # Espenak & Meeus (2006), NASA/TP-2006-214141, ΔT table (from memory): -500, 0, 1000.
    jd, dt = _ms2004_table()
    years = [calendar_date(j)[0] + (1 if calendar_date(j)[1] == 12 else 0) for j in jd]
    table = dict(zip(years, dt, strict=True))
    assert (table[-500], table[0], table[1000]) == (17190.0, 10580.0, 1570.0)


def test_agrees_with_morrison_stephenson_2004_within_2_sigma_before_ad_1000():
    # Morrison & Stephenson (2004) table (bundled by skyfield) against the 2016/2020 model, -500..1000.
    # Tolerance: 2σ of Morrison & Stephenson (2004), σ = 0.8 t^2 s, the stated accuracy of the table.
    jd, dt = _ms2004_table()
    years = year_of_jd(jd)
    use = (years > -501) & (years < 1001)
    assert use.sum() >= 16
    ours = delta_t_s(jd[use])
    sigma = delta_t_sigma_s(jd[use])
    assert np.all(np.abs(ours - dt[use]) <= 2.0 * sigma)


def test_medieval_revision_is_bounded():
    # Stephenson et al. (2016) revised ΔT upward over AD 1100-1500 relative to Morrison & Stephenson
    # (2004) (bundled table): the two differ by up to about 190 s there (our measurement); it stays
    # below 4 minutes, i.e. well under 1 degree of Earth rotation.
    jd, dt = _ms2004_table()
    years = year_of_jd(jd)
    use = (years > 1050) & (years < 1550)
    diff = delta_t_s(jd[use]) - dt[use]
    assert np.all(diff > 0.0) and np.all(diff < 240.0)


def test_knots_of_stephenson_2016_table_s15():
    # Morrison, Stephenson, Hohenkerk & Zawilski (2021) Table S15 (2020 addendum), as bundled by skyfield
    # (delta_t.npz): each row (x0, x1, a3, a2, a1, a0) is a cubic over years x0..x1 with ΔT(x0) = a0.
    # This checks our epoch handling (JD TT -> year) against the published knots, 720 BC..1900.
    s15 = load_bundled_npy("delta_t.npz")["Table-S15.2020.txt"]
    x0, a0 = s15[0], s15[5]
    use = x0 <= 1900
    # skyfield's year argument is (JD TT - 1721045.0) / 365.25.
    jd = 1721045.0 + x0[use] * 365.25
    np.testing.assert_allclose(delta_t_s(jd), a0[use], atol=0.01)


def test_long_term_parabola_far_back_and_ahead():
    # Stephenson, Morrison & Hohenkerk (2016): ΔT = -320 + 32.5 ((y - 1825)/100)^2 s outside the splines.
    for year in (-10000, -5000, 3000):
        jd = 1721045.0 + year * 365.25
        expected = -320.0 + 32.5 * ((year - 1825) / 100.0) ** 2
        assert delta_t_s(jd) == pytest.approx(expected, rel=1e-4)


def test_modern_values_iers():
    # IERS: ΔT = 32.184 s + (TAI - UTC) - (UT1 - UTC).
    # 2000-01-01 0h UTC: TAI-UTC = 32 s, UT1-UTC = +0.3554 s (IERS Bulletin B, from memory) -> 63.83 s;
    # Espenak & Meeus (2006) give 63.8 s for 2000.0 (from memory).
    assert delta_t_s(julian_day(2000, 1, 1.0)) == pytest.approx(63.83, abs=0.05)
    # 2020-01-01: TAI-UTC = 37 s, UT1-UTC = -0.1772 s (IERS Bulletin A, from memory) -> 69.36 s.
    assert delta_t_s(julian_day(2020, 1, 1.0)) == pytest.approx(69.36, abs=0.05)
    # Morrison & Stephenson (2004) table (bundled by skyfield): 29 s at 1950, table rounded to 1 s.
    assert delta_t_s(julian_day(1950, 1, 1.0)) == pytest.approx(29.0, abs=1.0)


def test_sigma_formula_and_floors():
    # Morrison & Stephenson (2004): σ = 0.8 t^2 s, t = (year - 1820)/100.
    for year in (-10000, -3000, -1000, 0, 1000):
        jd = 2451545.0 + (year - 2000) * 365.25
        assert delta_t_sigma_s(jd) == pytest.approx(0.8 * ((year - 1820) / 100.0) ** 2, rel=1e-12)
    # Espenak & Meeus (2006) uncertainty column (from memory): ±20 s at 1600, ±1 s at 1900, ±0.1 s at 1950.
    assert delta_t_sigma_s(julian_day(1600, 1, 1)) == pytest.approx(20.0, abs=0.5)
    assert delta_t_sigma_s(julian_day(1900, 1, 1)) == pytest.approx(1.0, abs=0.05)
    assert delta_t_sigma_s(julian_day(1950, 1, 1)) == pytest.approx(0.1, abs=0.001)
    first, last = iers_span_jd_tt()
    assert delta_t_sigma_s(np.array([first, (first + last) / 2, last])) == pytest.approx(IERS_SIGMA_S)
    # Orders of magnitude stated in DESIGN.md: ~30 min at 3000 BC, hours by 10,000 BC.
    assert 25 * 60 < delta_t_sigma_s(julian_day(-2999, 1, 1)) < 35 * 60
    assert delta_t_sigma_s(julian_day(-9999, 1, 1)) > 2 * 3600
    assert "1000 BC-AD 1200" in DELTA_T_SIGMA_NOTE and "extrapolated" in DELTA_T_SIGMA_NOTE
    assert "Stephenson" in DELTA_T_SOURCE


def test_sigma_grows_into_the_past():
    jd = julian_day(np.arange(-10000, 1200, 50), 1, 1)
    sigma = delta_t_sigma_s(jd)
    assert np.all(np.diff(sigma) < 0)


def test_ut_date_uncertain_per_event():
    # The UT date is in doubt only when UT ± 2σ straddles a UT midnight (Meeus 1998 ch. 7: days start at JD + 0.5).
    # 3200 BC: σ = 0.8 t² s (Morrison & Stephenson 2004) ≈ 2016 s, so 2σ ≈ 67 min.
    hours = np.array([9 + 4 / 60, 0 + 40 / 60, 23.5, 1.5, 22.5, 12.0])
    jd_ut = julian_day(-3199, 11, 3 + hours / 24)
    flags = ut_date_uncertain(tt_from_ut(jd_ut))
    assert flags.tolist() == [False, True, True, False, False, False]
    assert flags.dtype == bool
    two_sigma_h = 2 * delta_t_sigma_s(tt_from_ut(jd_ut[0])) / 3600
    assert 1.0 < two_sigma_h < 1.25
    # modern dates: 2σ = 0.2 s, only the last fifth of a second before midnight is in doubt
    jd_modern = julian_day(2000, 1, 1.0) - np.array([0.05, 0.5]) / 86400
    assert ut_date_uncertain(tt_from_ut(jd_modern)).tolist() == [True, False]
    assert not ut_date_uncertain(tt_from_ut(jd_ut), delta_t_override_s=0.0).any()  # ΔT fixed by the user
    assert not ut_date_uncertain(np.nan)


def test_sigma_is_continuous_and_small_where_atomic_time_measures_delta_t():
    # 1955-1972: atomic time (Markowitz et al. 1958) measures ΔT to far better than Espenak & Meeus's (2006)
    # 0.1 s at 1950; σ stays at 0.1 s up to and through the IERS values.
    jd = julian_day(np.arange(1950, 1974), 1, 1.0)
    assert np.all(delta_t_sigma_s(jd) == pytest.approx(0.1))
    # no jump at the ends of any piece: AD 1200, 1950, both ends of the IERS values
    first, last = iers_span_jd_tt()
    for edge in (julian_day(1200, 1, 1.0), julian_day(1950, 1, 1.0), first, last):
        before, after = delta_t_sigma_s(np.array([edge - 1.0, edge + 1.0]))
        assert abs(after - before) < 0.01
    # after the IERS values σ grows smoothly from 0.1 s (our join with the Morrison & Stephenson 2004 growth)
    future = delta_t_sigma_s(np.linspace(last, julian_day(2200, 1, 1.0), 1000))
    assert np.all(np.diff(future) >= 0) and future[0] == pytest.approx(0.1)
    t_end = ((2000 + (last - 2451545.0) / 365.25) - 1820) / 100
    assert future[-1] == pytest.approx(0.1 + 0.8 * (3.8**2 - t_end**2), abs=0.01)


def test_round_trip_tt_ut_over_the_span():
    jd_tt = np.linspace(julian_day(-9999, 1, 1), julian_day(2999, 12, 31), 20001)
    back = tt_from_ut(ut_from_tt(jd_tt))
    assert np.max(np.abs(back - jd_tt)) * 86400.0 < 1e-4  # seconds; float64 JD resolves ~40 µs
    assert np.allclose((jd_tt - ut_from_tt(jd_tt)) * 86400.0, delta_t_s(jd_tt), atol=1e-4)


def test_override_scalar_and_array():
    jd = np.array([1e6, 2e6, 2451545.0])
    assert np.allclose(ut_from_tt(jd, 100.0), jd - 100.0 / 86400.0)
    assert np.allclose(tt_from_ut(jd, 100.0), jd + 100.0 / 86400.0)
    dts = np.array([1.0, 2.0, 3.0])
    assert np.allclose(ut_from_tt(jd, dts), jd - dts / 86400.0)


def test_shapes_scalars_and_nan():
    assert np.ndim(delta_t_s(2451545.0)) == 0
    assert delta_t_s(np.zeros((2, 3)) + 2451545.0).shape == (2, 3)
    out = delta_t_s([np.nan, 2451545.0])
    assert np.isnan(out[0]) and np.isfinite(out[1])
    assert np.isnan(delta_t_sigma_s(np.nan))
    # Array and scalar evaluations agree.
    jd = julian_day(np.array([-3000, 500, 1990]), 6, 1)
    assert np.array_equal(delta_t_s(jd), np.array([delta_t_s(j) for j in jd]))
