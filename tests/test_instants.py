"""Reading and writing instants: forms, calendars, offsets, scales and bad input."""

import datetime

import numpy as np
import pytest
from hypothesis import given
from hypothesis import strategies as st

from lightpath.errors import InputError
from lightpath.sky.calendar import julian_day
from lightpath.sky.deltat import delta_t_s
from lightpath.sky.instants import (
    ParsedInstant,
    format_instant,
    format_time_of_day,
    parse_instant,
    resolve_instant,
)


@pytest.mark.parametrize(
    "text, jd",
    [
        # Meeus (1998) Table 7.a and Example 7.b.
        ("2000-01-01T12:00", 2451545.0),
        ("1987-06-19 12:00", 2446966.0),
        ("333-01-27T12:00", 1842713.0),
        ("0333-01-27T12:00", 1842713.0),
        ("837-04-10T07:12", 2026871.8),
        ("-1000-07-12T12:00", 1356001.0),
        ("1001 BC-07-12T12:00", 1356001.0),
        ("1001 bce-07-12 12:00", 1356001.0),
        ("-4712-01-01T12:00", 0.0),
        ("4713 BC-01-01T12:00", 0.0),
        ("-123-12-31", 1676496.5),
        ("124 BC-12-31", 1676496.5),
        ("AD 333-01-27T12:00", 1842713.0),
        ("+2000-01-01T12:00:00", 2451545.0),
    ],
)
def test_meeus_julian_days(text, jd):
    p = parse_instant(text)
    assert p.scale == "UT"
    assert p.jd == pytest.approx(jd, abs=1e-8)
    assert p.text == text


def test_seconds_and_fractions():
    p = parse_instant("2027-02-03 07:40:30.5")
    assert p.jd == pytest.approx(julian_day(2027, 2, 3 + (7 + 40 / 60 + 30.5 / 3600) / 24), abs=1e-9)
    assert parse_instant("2027-02-03").jd == julian_day(2027, 2, 3.0)


@pytest.mark.parametrize(
    "text",
    [
        "2027-02-03T09:40+02:00",
        "2027-02-03T09:40+0200",
        "2027-02-03T09:40+02",
        "2027-02-03T00:40-07:00",
        "2027-02-03T00:40-0700",
        "2027-02-03T07:40Z",
        "2027-02-03T07:40 UTC",
        "2027-02-03T07:40 UT",
        "2027-02-03T13:10+05:30",
    ],
)
def test_offsets_are_converted_to_ut(text):
    assert parse_instant(text).jd == pytest.approx(parse_instant("2027-02-03T07:40").jd, abs=1e-9)
    assert parse_instant(text).scale == "UT"


def test_offsets_match_python_datetime():
    # Python's datetime: 2027-02-03 00:40-07:00 is 07:40 UTC.
    aware = datetime.datetime.fromisoformat("2027-02-03T00:40-07:00").astimezone(datetime.UTC)
    assert aware.hour == 7 and aware.minute == 40
    # Across midnight and a month boundary.
    assert format_instant(parse_instant("2027-03-01T01:00+03:00").jd) == "2027-02-28T22:00:00"


def test_offset_does_not_switch_calendar_at_1582():
    # 1582-10-15 00:30+02:00 is 1582-10-14 22:30 UT in the Gregorian calendar = 1582-10-04 22:30 Julian.
    p = parse_instant("1582-10-15T00:30+02:00")
    assert p.calendar == "gregorian"
    assert p.jd == pytest.approx(julian_day(1582, 10, 15.0) - 1.5 / 24, abs=1e-9)


def test_julian_date_forms():
    assert parse_instant("JD2451545.0") == ParsedInstant(2451545.0, "UT", "gregorian", "JD2451545.0")
    p = parse_instant("JDE 2451545.25")
    assert (p.jd, p.scale) == (2451545.25, "TT")
    assert parse_instant("jd1000000").jd == 1000000.0
    assert parse_instant("JD-100.5").calendar == "julian"


def test_scales_lat_and_tt():
    p = parse_instant("3200 BC-12-21T08:00 LAT")
    assert p.scale == "LAT" and p.calendar == "julian"
    assert p.jd == pytest.approx(julian_day(-3199, 12, 21 + 8 / 24), abs=1e-9)
    assert parse_instant("2027-02-03T07:40 tt").scale == "TT"


def test_forced_calendar():
    # Meeus (1998) ch. 7: 1582 October 4 Julian is followed by October 15 Gregorian.
    g = parse_instant("1582-10-15", calendar="gregorian")
    j = parse_instant("1582-10-05", calendar="julian")
    assert g.jd == j.jd and (g.calendar, j.calendar) == ("gregorian", "julian")
    assert parse_instant("2027-02-03", calendar="julian").jd - parse_instant("2027-02-03").jd == 13.0


@pytest.mark.parametrize(
    "text, words",
    [
        ("2027-04-31", "April has 30 days"),
        ("2027-13-01", "month 13"),
        ("0 BC-01-01", "no such year"),
        ("2027-02-03T25:00", "no such time of day"),
        ("2027-02-03T07:60", "no such time of day"),
        ("2027-02-03T07:40:60", "no such time of day"),
        ("2027-02-30", "February has 28 days"),
        ("1582-10-10", "does not exist in the default calendar"),
        ("yesterday", "is not a date and time"),
        ("2027/02/03", "is not a date and time"),
        ("2451545.0", "is not a date and time"),
        ("JDx", "is not a date and time"),
        ("2027-02-03T07:40+02:00 LAT", "offset together with LAT"),
        ("2027-02-03T07:40Z LAT", r"Z \(UT\) together with LAT"),
        ("2027-02-03T07:40+19:00", "beyond"),
        ("JD2451545.0 LAT", "time-scale word"),
        ("", "is not a date and time"),
    ],
)
def test_bad_input(text, words):
    with pytest.raises(InputError, match=words) as info:
        parse_instant(text, what="--at")
    message = str(info.value)
    assert message.startswith("--at: ") and "\n" not in message
    # Errors of form list the accepted forms; errors of date name the date and the calendar.
    assert repr(text) in message


def test_format_time_of_day():
    assert format_time_of_day(0.0) == "00:00"
    assert format_time_of_day(0.25) == "06:00"
    assert format_time_of_day(-0.25) == "18:00"
    assert format_time_of_day(0.5 + 29.9 / 86400, seconds=True) == "12:00:30"
    assert format_time_of_day(np.array([0.5, np.nan])).tolist() == ["12:00", "--:--"]


@given(
    st.integers(min_value=-9999, max_value=2999),
    st.integers(min_value=1, max_value=12),
    st.integers(min_value=1, max_value=28),
    st.integers(min_value=0, max_value=23),
    st.integers(min_value=0, max_value=59),
    st.integers(min_value=0, max_value=59),
)
def test_round_trip_text_jd_text(year, month, day, hour, minute, second):
    if (year, month) == (1582, 10) and 5 <= day <= 14:
        return
    y = f"{year:05d}" if year < 0 else f"{year:04d}"
    text = f"{y}-{month:02d}-{day:02d}T{hour:02d}:{minute:02d}:{second:02d}"
    assert format_instant(parse_instant(text).jd) == text


def test_resolve_ut_and_tt():
    p = parse_instant("2000-01-01T12:00")
    jd_tt = resolve_instant(p)
    # UT -> TT adds ΔT (about 63.8 s at 2000.0, IERS).
    assert (jd_tt - 2451545.0) * 86400.0 == pytest.approx(float(delta_t_s(jd_tt)), abs=1e-3)
    assert (resolve_instant(p, delta_t_s=0.0) - 2451545.0) * 86400.0 == pytest.approx(0.0, abs=1e-4)
    assert resolve_instant(parse_instant("JDE2451545.0"), delta_t_s=1000.0) == 2451545.0


def test_resolve_lat_needs_a_site():
    with pytest.raises(InputError, match="needs a site"):
        resolve_instant(parse_instant("2027-02-03T12:00 LAT"))


def _skyfield_hour_angle_deg(jd_tt, lon):
    """Geocentric apparent hour angle of the Sun (GAST + λ − α of date) from skyfield with JPL DE421."""
    import skyfield_data
    from skyfield.api import Loader

    load = Loader(skyfield_data.get_skyfield_data_path())
    ts = load.timescale(builtin=True)
    eph = load("de421.bsp")
    t = ts.tt_jd(jd_tt)
    ra, _, _ = eph["earth"].at(t).observe(eph["sun"]).apparent().radec(epoch="date")
    return t.gast * 15.0 + lon - ra.hours * 15.0


@pytest.mark.filterwarnings("ignore:The file finals2000A.all has expired")
@pytest.mark.parametrize("clock, hour_angle", [("08:00", -60.0), ("12:00", 0.0), ("15:30", 52.5)])
def test_lat_resolves_to_the_suns_hour_angle_skyfield(clock, hour_angle):
    # LAT t is when the Sun's apparent (geocentric) hour angle is (t - 12 h)·15° (Meeus 1998 ch. 28);
    # reference: skyfield + DE421.  Tolerance 1″ of hour angle (0.07 s of time): the Sun source is good to
    # < 1″ in 1900-2050, and skyfield's GAST and ours (ERFA ERA − EO) agree far better.
    from lightpath.sky.observer import Observer

    obs = Observer(latitude_deg=53.452, longitude_deg=104.637, elevation_m=548.0)  # the invented Larchfold site
    jd_tt = resolve_instant(parse_instant(f"2027-02-03T{clock} LAT"), obs)
    ha = _skyfield_hour_angle_deg(jd_tt, 104.637)
    assert ((ha - hour_angle + 180.0) % 360.0 - 180.0) * 3600.0 == pytest.approx(0.0, abs=1.0)


def test_lat_vectorized_matches_scalar_and_keeps_the_date():
    from lightpath.sky.instants import tt_from_lat
    from lightpath.sky.observer import Observer

    obs = Observer(latitude_deg=30.0, longitude_deg=170.0)
    jd_lat = julian_day(-3199, 12, 21 + np.array([0.5, 6.0, 23.5]) / 24)
    many = tt_from_lat(jd_lat, obs)
    one = np.array([tt_from_lat(j, obs) for j in jd_lat])
    np.testing.assert_allclose(many, one, rtol=0, atol=1e-9)
    # Local apparent midnight-ish instants stay on their own local date: UT ≈ LAT - 170°/15° (± EoT).
    from lightpath.sky.deltat import ut_from_tt

    ut = ut_from_tt(many)
    np.testing.assert_allclose(ut, jd_lat - 170.0 / 360.0, atol=20 / 1440)
