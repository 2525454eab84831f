"""Displayed clock times are rounded to the nearest minute, and local apparent dates sit beside LAT times."""

from __future__ import annotations

import numpy as np
import pytest
import skyfield_data
from skyfield import almanac
from skyfield.api import Loader

from lightpath.present.visits import _clock
from lightpath.sky.calendar import julian_day
from lightpath.sky.instants import (
    format_instant,
    format_local_apparent,
    format_time_of_day,
    local_apparent_day_number,
)

LOAD = Loader(skyfield_data.get_skyfield_data_path())


def test_time_of_day_rounds_to_the_nearest_minute():
    # hand-made cases: 08:54:55 is nearer 08:55 than 08:54; 08:54:29 stays 08:54
    assert format_time_of_day((8 + 54 / 60 + 55 / 3600) / 24) == "08:55"
    assert format_time_of_day((8 + 54 / 60 + 29 / 3600) / 24) == "08:54"
    assert format_time_of_day(np.array([(23 + 59 / 60 + 40 / 3600) / 24])).tolist() == ["00:00"]


def test_instants_carry_a_rounded_midnight_into_the_next_day():
    jd = julian_day(2027, 9, 22.0, "gregorian") + (23 + 59 / 60 + 40 / 3600) / 24  # 23:59:40 UT
    assert format_instant(jd, seconds=False) == "2027-09-23T00:00"
    assert format_instant(jd - 45 / 86400, seconds=False) == "2027-09-22T23:59"  # 23:58:55 → 23:59


def test_local_apparent_clock_and_date_round_together():
    day = int(round(julian_day(2027, 9, 22.0, "gregorian") + 0.5))  # day number of 2027-09-22
    dates, clocks = format_local_apparent([day, day, day], np.array([23 + 59 / 60 + 40 / 3600, 8.915, np.nan]))
    assert dates.tolist()[:2] == ["2027-09-23", "2027-09-22"]
    assert clocks.tolist() == ["00:00", "08:55", "--:--"]


def test_visit_table_clock_rounds_and_does_not_truncate():
    jd = julian_day(2027, 3, 29.0, "gregorian") + (7 + 54 / 60 + 55 / 3600) / 24  # 07:54:55 UT = 08:54:55 IST
    assert _clock(jd, "Europe/Dublin") == "08:55"  # Irish summer time is UTC+1 (IANA tz database via zoneinfo)


def test_september_equinox_2027_has_its_local_apparent_date_at_40n_91_7w():
    # skyfield (DE421) almanac.seasons gives the instant; skyfield's apparent hour angle of the Sun at 91.7° W
    # gives its local apparent time, 12 h + HA.  The local apparent date is the day whose apparent midnight
    # precedes the instant: near LAT 00:02 it is the 23rd, though local mean time is still the 22nd.
    from skyfield.api import wgs84

    eph = LOAD("de421.bsp")
    ts = LOAD.timescale(builtin=True)
    times, kinds = almanac.find_discrete(ts.utc(2027, 9, 1), ts.utc(2027, 10, 1), almanac.seasons(eph))
    t = times[list(kinds).index(2)]  # 2 = September equinox
    site = eph["earth"] + wgs84.latlon(40.0, -91.7)
    ha, _, _ = site.at(t).observe(eph["sun"]).apparent().hadec()
    lat_h = (12.0 + ha.hours) % 24.0
    jd_ut = float(t.ut1)
    assert lat_h < 0.1  # a few minutes after local apparent midnight
    assert format_instant(jd_ut - 91.7 / 360.0, seconds=False).startswith("2027-09-22T23:")  # local mean: the 22nd
    day = local_apparent_day_number(jd_ut, -91.7, lat_h)
    date, clock = format_local_apparent(day, lat_h, "gregorian")
    assert (date, clock) == ("2027-09-23", "00:02")


def test_year_command_prints_the_local_apparent_date(capsys):
    from lightpath.cli import main

    assert main(["year", "--site=40,-91.7", "--year", "2027", "--scheme", "days"]) == 0
    line = next(x for x in capsys.readouterr().out.splitlines() if x.strip().startswith("september_equinox"))
    assert "2027-09-23  00:02 LAT" in line  # see the skyfield check above


@pytest.mark.parametrize("hours", [0.0, 6.5, 12.0, 23.99])
def test_day_number_is_the_day_of_noon(hours):
    # at 0° longitude with no equation of time, LAT = UT: the day number is the JD at noon of the UT date
    jd0 = julian_day(2000, 1, 1.0)
    assert local_apparent_day_number(jd0 + hours / 24, 0.0, hours) == 2451545
