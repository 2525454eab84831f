"""Civil clock times against the IANA tz database (read through zoneinfo) across daylight-saving changes."""

from __future__ import annotations

import datetime as dt
from zoneinfo import ZoneInfo

import pytest

from lightpath.errors import InputError
from lightpath.present.civil import (
    civil_datetime,
    civil_iso,
    has_civil_time,
    jd_from_datetime,
    jd_from_local_date,
    parse_local_date,
    time_zone,
    utc_datetime,
)

# Source for the offsets: IANA tz database via zoneinfo. Europe/Dublin left winter time (GMT, +00:00) for
# summer time (IST, +01:00) at 2026-03-29 01:00 UTC; America/New_York went from EDT (-04:00) back to EST
# (-05:00) at 2026-11-01 06:00 UTC.
JD_2026_03_29 = 2461128.5  # 0h UT, Meeus (1998) ch. 7 algorithm via lightpath.sky.calendar (checked below)


def test_reference_julian_day():
    from lightpath.sky.calendar import julian_day

    assert float(julian_day(2026, 3, 29)) == JD_2026_03_29


@pytest.mark.parametrize(
    ("minutes_ut", "expected"),
    [
        (59, "2026-03-29T00:59:00+00:00"),  # a minute before the change: still GMT
        (60, "2026-03-29T02:00:00+01:00"),  # the change: clocks jump from 01:00 to 02:00
        (8 * 60 + 15, "2026-03-29T09:15:00+01:00"),
    ],
)
def test_dublin_spring_forward(minutes_ut, expected):
    jd = JD_2026_03_29 + minutes_ut / 1440.0
    assert civil_datetime(jd, "Europe/Dublin").isoformat() == expected
    # the same instant, computed by zoneinfo directly from a UTC datetime
    direct = (dt.datetime(2026, 3, 29, tzinfo=dt.UTC) + dt.timedelta(minutes=minutes_ut)).astimezone(
        ZoneInfo("Europe/Dublin")
    )
    assert civil_datetime(jd, "Europe/Dublin") == direct
    assert civil_datetime(jd, "Europe/Dublin").utcoffset() == direct.utcoffset()


def test_new_york_fall_back_repeats_an_hour():
    jd_0h = 2461345.5  # 2026-11-01 0h UT
    first = civil_datetime(jd_0h + 5.5 / 24, "America/New_York")  # 05:30 UT = 01:30 EDT
    second = civil_datetime(jd_0h + 6.5 / 24, "America/New_York")  # 06:30 UT = 01:30 EST
    assert first.isoformat() == "2026-11-01T01:30:00-04:00"
    assert second.isoformat() == "2026-11-01T01:30:00-05:00"
    assert civil_iso([jd_0h + 5.5 / 24, jd_0h + 6.5 / 24], "America/New_York") == [
        first.isoformat(),
        second.isoformat(),
    ]


def test_round_trips():
    for jd in (2451545.0, 2461128.5 + 1 / 24, 2461345.77):
        assert jd_from_datetime(utc_datetime(jd)) == pytest.approx(jd, abs=1 / 86400)
    # Local midnight on the day summer time starts in Dublin is still GMT: 00:00 UT.
    assert jd_from_local_date(dt.date(2026, 3, 29), "Europe/Dublin") == JD_2026_03_29
    # Noon that day is IST: 11:00 UT.
    assert jd_from_local_date(dt.date(2026, 3, 29), "Europe/Dublin", hour=12) == pytest.approx(
        JD_2026_03_29 + 11 / 24, abs=1e-9
    )


def test_ancient_dates_have_no_civil_time():
    assert civil_iso([1000000.0], "Europe/Dublin") == [None]
    assert not has_civil_time(float("nan"))
    with pytest.raises(InputError, match="civil-time span"):
        utc_datetime(1000000.0)


def test_bad_input_names_the_option():
    with pytest.raises(InputError, match="--tz: 'Mars/Olympus' is not an IANA time zone"):
        time_zone("Mars/Olympus", option="--tz")
    with pytest.raises(InputError, match="--from: '2027-02-30' is not a date"):
        parse_local_date("2027-02-30", option="--from")
    with pytest.raises(InputError, match="before 1900"):
        parse_local_date("1850-01-01", option="--from")
    with pytest.raises(InputError, match="no time zone"):
        jd_from_datetime(dt.datetime(2026, 1, 1))
