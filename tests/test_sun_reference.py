"""The Sun against published worked examples: Meeus (1998) Examples 25.b and 28.b, NREL SPA (Reda & Andreas 2004)."""

import numpy as np
import pytest

from lightpath.sky.observer import Observer
from lightpath.sky.sun import geocentric_sun, sun_position

SOURCES = ["jpl", "vsop87"]


@pytest.mark.parametrize("source", SOURCES)
def test_meeus_example_25b(source):
    # Meeus (1998) Example 25.b, 1992 Oct 13.0 TD (JDE 2448908.5), full VSOP87 + FK5 + IAU 1980 nutation:
    # apparent α = 13h13m30.749s, δ = -7°47′01.74″ (from memory; skyfield/DE421 agrees to 0.05″).
    # Meeus's nutation model and FK5 frame differ from ours (IAU 2000B, ICRS) by ~0.1″, hence 0.15″.
    g = geocentric_sun(2448908.5, source)
    ra_ref = (13 + 13 / 60 + 30.749 / 3600) * 15.0
    dec_ref = -(7 + 47 / 60 + 1.74 / 3600)
    assert (float(g.right_ascension_deg) - ra_ref) * 3600 * np.cos(np.radians(dec_ref)) == pytest.approx(0, abs=0.15)
    assert (float(g.declination_deg) - dec_ref) * 3600 == pytest.approx(0, abs=0.15)
    assert float(g.distance_au) == pytest.approx(0.99760853, abs=2e-7)  # DE421 through skyfield: 0.9976085
    assert g.source.startswith("JPL DE421" if source == "jpl" else "VSOP87D")


@pytest.mark.parametrize("source", SOURCES)
def test_meeus_example_28b_equation_of_time(source):
    # Meeus (1998) Example 28.b, 1992 Oct 13.0 TD: E = +13m42.6s = 13.710 min (from memory), stated to 0.1 s.
    p = sun_position(2448908.5, Observer(0.0, 0.0), source=source, delta_t_s=0.0)
    assert float(p.equation_of_time_min) == pytest.approx(13.710, abs=0.1 / 60 + 0.001)


@pytest.mark.parametrize("source", SOURCES)
def test_nrel_spa_worked_example(source):
    # Reda & Andreas (2004), NREL/TP-560-34302, worked example: 2003-10-17 12:30:30 local (UTC-7),
    # lat 39.742476°, lon -105.1786°, 1830.14 m, 820 mbar, 11 °C, ΔT 67 s → topocentric zenith 50.11162°,
    # azimuth 194.34024° (from memory; skyfield/DE421 gives 50.1119°, 194.3401°). SPA states ±0.0003°.
    # SPA's refraction is Sæmundsson's formula with its pressure/temperature factor.
    obs = Observer(39.742476, -105.1786, 1830.14, temperature_c=11.0, pressure_mbar=820.0, refraction="saemundsson1986")
    jd_ut = 2452929.5 + (19 + 30 / 60 + 30 / 3600) / 24.0  # 2003-10-17 0h UT = JD 2452929.5
    p = sun_position(jd_ut + 67.0 / 86400, obs, source=source, delta_t_s=67.0)
    assert 90.0 - float(p.altitude_deg) == pytest.approx(50.11162, abs=0.001)
    assert float(p.azimuth_deg) == pytest.approx(194.34024, abs=0.001)
    assert float(p.jd_ut) == pytest.approx(jd_ut, abs=1e-9)


def test_semidiameter_through_the_year():
    # 959.63″ at 1 au (Auwers; Meeus 1998 ch. 55, from memory), scaled by the topocentric distance.
    # Common practice, no published source: about 16′16″ at perihelion (early January) and 15′44″ at
    # aphelion (early July).
    obs = Observer(0.0, 0.0)
    jan = sun_position(2460313.5, obs)  # 2024 Jan 3
    jul = sun_position(2460495.5, obs)  # 2024 Jul 5
    assert float(jan.semidiameter_deg) * 3600 == pytest.approx(16 * 60 + 16, abs=1.0)
    assert float(jul.semidiameter_deg) * 3600 == pytest.approx(15 * 60 + 44, abs=1.0)
    ratio = float(jan.semidiameter_deg) * 3600 * float(jan.distance_au) / 959.63
    assert ratio == pytest.approx(1.0, abs=5e-5)  # topocentric vs geocentric distance: < 4.3e-5


def test_local_apparent_noon_and_hour_angle():
    # Definition: local apparent time is 12 h when the Sun crosses the meridian (hour angle 0), where its
    # azimuth is 180° for a site north of the Sun.
    obs = Observer(52.0, 10.0, refraction=None)
    jd = 2460480.0 + np.linspace(-0.3, 0.3, 20001)
    p = sun_position(jd, obs, delta_t_s=69.0)
    i = np.argmin(np.abs(p.hour_angle_deg))
    assert p.local_apparent_time_h[i] == pytest.approx(12.0, abs=2e-3)
    assert p.azimuth_deg[i] == pytest.approx(180.0, abs=0.01)
    assert np.all((p.local_apparent_time_h >= 0) & (p.local_apparent_time_h < 24))
    assert np.all(np.abs(p.hour_angle_deg) <= 180.0)
