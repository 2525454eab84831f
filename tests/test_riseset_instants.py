"""Sunrise and sunset instants (upper limb at apparent altitude 0, or on a skyline) against skyfield's almanac."""

from __future__ import annotations

import numpy as np
import pytest
import skyfield_data
from skyfield import almanac
from skyfield.api import Loader, wgs84

from lightpath.sky.calendar import julian_day
from lightpath.sky.horizon import HorizonProfile
from lightpath.sky.observer import Observer
from lightpath.sky.refraction import geometric_altitude
from lightpath.sky.riseset import rise_set_azimuths, rise_set_instants

LOAD = Loader(skyfield_data.get_skyfield_data_path())
TS = LOAD.timescale(builtin=True)
EPH = LOAD("de421.bsp")
SEMIDIAMETER_1AU_DEG = 959.63 / 3600.0  # Auwers (1891), the Sun's radius at 1 au
DAYS = [(2027, 3, 20.0), (2027, 6, 21.0), (2027, 12, 21.0)]


def _skyfield_events(observer: Observer, start_jd_ut: float, skyline_apparent_deg: float):
    """skyfield almanac.find_risings/find_settings (DE421) for the centre at the geometric altitude our rule gives:
    geometric(skyline) − s, s = 959.63″ / distance (au) that day, refraction Bennett (1982) for the site's air."""
    where = EPH["earth"] + wgs84.latlon(observer.latitude_deg, observer.longitude_deg, elevation_m=observer.elevation_m)
    t0, t1 = TS.ut1_jd(start_jd_ut), TS.ut1_jd(start_jd_ut + 1.0)
    dist = where.at(TS.ut1_jd(start_jd_ut + 0.5)).observe(EPH["sun"]).distance().au
    centre = float(geometric_altitude(skyline_apparent_deg, "bennett1982", observer.pressure_mbar,
                                      observer.temperature_c)) - SEMIDIAMETER_1AU_DEG / dist  # fmt: skip
    r, r_ok = almanac.find_risings(where, EPH["sun"], t0, t1, horizon_degrees=centre)
    s, s_ok = almanac.find_settings(where, EPH["sun"], t0, t1, horizon_degrees=centre)
    return r.ut1[r_ok], s.ut1[s_ok]


@pytest.mark.parametrize("latitude", [0.0, 53.0, 65.0])
def test_upper_limb_on_the_astronomical_horizon_matches_skyfield(latitude):
    observer = Observer(latitude, -7.4, 0.0)
    starts = np.array([julian_day(*d, "gregorian") - observer.longitude_deg / 360.0 for d in DAYS])
    rises, sets = rise_set_instants(starts, observer, source="jpl")
    for k, start in enumerate(starts):
        r, s = _skyfield_events(observer, start, 0.0)
        assert len(r) == 1 and len(s) == 1
        assert abs(rises[k] - r[0]) * 86400 < 2.0  # the bound: within 2 s of skyfield (DE421)
        assert abs(sets[k] - s[0]) * 86400 < 2.0


def test_over_a_skyline_profile_matches_skyfield_on_a_level_skyline_and_rises_later():
    observer = Observer(53.0, -7.4, 0.0)
    start = julian_day(2027, 6, 21.0, "gregorian")
    skyline = HorizonProfile(np.array([0.0, 120.0, 240.0]), np.array([1.2, 1.2, 1.2]))
    rise, set_ = rise_set_instants(start, observer, horizon=skyline, source="jpl")
    r, s = _skyfield_events(observer, start, 1.2)
    assert abs(rise - r[0]) * 86400 < 2.0 and abs(set_ - s[0]) * 86400 < 2.0
    flat_rise, flat_set = rise_set_instants(start, observer, source="jpl")
    assert rise > flat_rise + 5 / 1440 and set_ < flat_set - 5 / 1440  # a 1.2° skyline: over 5 min at 53°


def test_uneven_skyline_puts_the_limb_on_the_skyline_and_agrees_with_rise_set_azimuths():
    from lightpath.sky.deltat import tt_from_ut
    from lightpath.sky.sun import sun_position

    observer = Observer(53.0, -7.4, 0.0)
    start = julian_day(2027, 3, 20.0, "gregorian")
    az = np.arange(0.0, 360.0, 5.0)
    skyline = HorizonProfile(az, 1.0 + 0.8 * np.sin(np.radians(3 * az)))  # invented for the test
    rise, set_ = rise_set_instants(start, observer, horizon=skyline, source="jpl")
    pos = sun_position(tt_from_ut(np.array([rise, set_])), observer, source="jpl")
    # the upper limb's apparent altitude there equals the skyline's at the Sun's azimuth
    limb_geo = pos.altitude_geometric_deg + pos.semidiameter_deg
    sky_geo = geometric_altitude(skyline.altitude_at(pos.azimuth_deg), "bennett1982", 1010.0, 10.0)
    np.testing.assert_allclose(limb_geo, sky_geo, atol=1e-6)
    # and the azimuth is the one rise_set_azimuths(limb="upper") gives for that declination (Meeus 1998 eq. 15.1)
    az_rise, az_set = rise_set_azimuths(pos.declination_deg, 53.0, horizon=skyline, limb="upper",
                                        semidiameter_deg=pos.semidiameter_deg)  # fmt: skip
    assert az_rise[0] == pytest.approx(pos.azimuth_deg[0], abs=0.01)
    assert az_set[1] == pytest.approx(pos.azimuth_deg[1], abs=0.01)


def test_polar_night_has_no_sunrise_and_nan_passes_through():
    rises, sets = rise_set_instants(np.array([julian_day(2027, 12, 21.0), np.nan]), Observer(78.2, 15.6), source="jpl")
    assert np.isnan(rises).all() and np.isnan(sets).all()
