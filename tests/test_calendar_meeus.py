"""Julian days against Meeus (1998), *Astronomical Algorithms*, 2nd ed., chapter 7."""

import numpy as np
import pytest
from hypothesis import given
from hypothesis import strategies as st

from lightpath.sky.calendar import calendar_date, julian_day

# Meeus (1998), Table 7.a "Examples of Julian Days": (year, month, day, calendar, JD).
MEEUS_TABLE_7A = [
    (2000, 1, 1.5, "gregorian", 2451545.0),
    (1999, 1, 1.0, "gregorian", 2451179.5),
    (1987, 1, 27.0, "gregorian", 2446822.5),
    (1987, 6, 19.5, "gregorian", 2446966.0),
    (1988, 1, 27.0, "gregorian", 2447187.5),
    (1988, 6, 19.5, "gregorian", 2447332.0),
    (1900, 1, 1.0, "gregorian", 2415020.5),
    (1600, 1, 1.0, "gregorian", 2305447.5),
    (1600, 12, 31.0, "gregorian", 2305812.5),
    (837, 4, 10.3, "julian", 2026871.8),
    (-123, 12, 31.0, "julian", 1676496.5),
    (-122, 1, 1.0, "julian", 1676497.5),
    (-1000, 7, 12.5, "julian", 1356001.0),
    (-1000, 2, 29.0, "julian", 1355866.5),
    (-1001, 8, 17.9, "julian", 1355671.4),
    (-4712, 1, 1.5, "julian", 0.0),
]


@pytest.mark.parametrize("year, month, day, calendar, jd", MEEUS_TABLE_7A)
def test_table_7a_forward(year, month, day, calendar, jd):
    assert julian_day(year, month, day) == pytest.approx(jd, abs=1e-6)
    assert julian_day(year, month, day, calendar=calendar) == pytest.approx(jd, abs=1e-6)


@pytest.mark.parametrize("year, month, day, calendar, jd", MEEUS_TABLE_7A)
def test_table_7a_backward(year, month, day, calendar, jd):
    y, m, d = calendar_date(jd)
    assert (y, m) == (year, month)
    assert d == pytest.approx(day, abs=1e-6)


def test_example_7a_sputnik():
    # Meeus (1998) Example 7.a: launch of Sputnik 1, 1957 October 4.81 -> JD 2436116.31.
    assert julian_day(1957, 10, 4.81) == pytest.approx(2436116.31, abs=1e-6)


def test_example_7b_year_333():
    # Meeus (1998) Example 7.b: 333 January 27 at 12h (Julian calendar) -> JD 1842713.0.
    assert julian_day(333, 1, 27.5) == pytest.approx(1842713.0, abs=1e-6)


def test_gregorian_reform_is_contiguous():
    # Meeus (1998) ch. 7: 1582 October 4 (Julian) is followed by October 15 (Gregorian).
    assert julian_day(1582, 10, 15.0) - julian_day(1582, 10, 4.0) == pytest.approx(1.0)


def test_vectorized_matches_scalar():
    rows = np.array(MEEUS_TABLE_7A, dtype=object)
    jd = julian_day(rows[:, 0].astype(int), rows[:, 1].astype(int), rows[:, 2].astype(float))
    np.testing.assert_allclose(jd, rows[:, 4].astype(float), atol=1e-6)


@given(
    st.integers(min_value=-13000, max_value=3000),
    st.integers(min_value=1, max_value=12),
    st.integers(min_value=1, max_value=28),
    st.sampled_from(["julian", "gregorian"]),
)
def test_round_trip_any_epoch(year, month, day, calendar):
    jd = julian_day(year, month, day + 0.25, calendar=calendar)
    assert calendar_date(jd, calendar=calendar) == (year, month, pytest.approx(day + 0.25, abs=1e-6))


# --- formatting, labels, day of the year and validation -----------------------------------------------------

import datetime  # noqa: E402

from lightpath.errors import InputError  # noqa: E402
from lightpath.sky.calendar import (  # noqa: E402
    date_label,
    day_of_year,
    days_in_month,
    format_date,
    is_leap_year,
    validate_date,
    year_from_label,
)


def test_format_date_astronomical_years():
    assert format_date(julian_day(-3199, 11, 3.9)) == "-3199-11-03"
    assert format_date(julian_day(-43, 3, 15.0)) == "-0043-03-15"
    assert format_date(julian_day(0, 1, 1.0)) == "0000-01-01"
    assert format_date(julian_day(2027, 2, 3.999)) == "2027-02-03"
    assert format_date(julian_day(-9999, 1, 1.0)) == "-9999-01-01"
    out = format_date(np.array([[2451545.0, 0.0]]))
    assert out.shape == (1, 2) and out.tolist() == [["2000-01-01", "-4712-01-01"]]


def test_format_date_forced_calendars():
    # Meeus (1998) ch. 7: 1582 October 4 (Julian) is followed by 1582 October 15 (Gregorian).
    jd = julian_day(1582, 10, 15.0)
    assert format_date(jd) == "1582-10-15"
    assert format_date(jd, calendar="julian") == "1582-10-05"
    assert format_date(julian_day(1000, 1, 1.0), calendar="gregorian") == "1000-01-06"


@given(st.integers(min_value=1, max_value=3_652_059))
def test_format_date_matches_python_datetime(ordinal):
    # Python's datetime uses the proleptic Gregorian calendar; ordinal 1 = 0001-01-01 = JD 1721425.5.
    jd = ordinal + 1721424.5
    expected = datetime.date.fromordinal(ordinal).isoformat()
    assert format_date(jd, calendar="gregorian") == expected
    assert int(day_of_year(jd, calendar="gregorian")) == datetime.date.fromordinal(ordinal).timetuple().tm_yday


def test_date_label():
    assert date_label(julian_day(-3199, 11, 3.5)) == "3200 BC November 3 (Julian)"
    assert date_label(julian_day(2027, 2, 3.0)) == "2027 February 3 (Gregorian)"
    assert date_label(julian_day(2027, 2, 3.0), calendar="julian") == "2027 January 21 (Julian)"


def test_day_of_year_meeus_examples():
    # Meeus (1998) Example 7.f: 1978 November 14 is day 318; Example 7.g: 1988 April 22 is day 113.
    assert day_of_year(julian_day(1978, 11, 14.0)) == 318
    assert day_of_year(julian_day(1988, 4, 22.5)) == 113
    assert day_of_year(julian_day(-3199, 12, 31.9)) == 365  # 3200 BC is not a Julian leap year
    assert day_of_year(julian_day(-3200, 12, 31.0)) == 366  # 3201 BC is
    # 1582 under the default calendar: October 4 (Julian) is day 277 and the next day, October 15, day 278.
    assert day_of_year(julian_day(1582, 10, 4.0)) == 277
    assert day_of_year(julian_day(1582, 10, 15.0)) == 278
    assert day_of_year(np.array([2451545.0, 2451910.0])).tolist() == [1, 366]


@given(st.integers(min_value=1, max_value=9999))
def test_gregorian_leap_years_match_python(year):
    import calendar as pycal

    assert bool(is_leap_year(year, "gregorian")) == pycal.isleap(year)
    assert int(days_in_month(year, 2, "gregorian")) == pycal.monthrange(year, 2)[1]


@pytest.mark.parametrize(
    "date, calendar, words",
    [
        ((2027, 4, 31), "auto", "April has 30 days"),
        ((2027, 13, 1), "auto", "month 13"),
        ((2027, 0, 1), "auto", "month 0"),
        ((2027, 1, 0), "auto", "day 0"),
        ((1900, 2, 29), "auto", "February has 28 days"),
        ((-3199, 2, 29), "julian", "February has 28 days"),
        ((1582, 10, 10), "auto", "does not exist in the default calendar"),
    ],
)
def test_validate_date_rejects(date, calendar, words):
    with pytest.raises(InputError, match=words):
        validate_date(*date, calendar=calendar)


def test_validate_date_accepts():
    assert validate_date(1900, 2, 29, calendar="julian") == "julian"
    assert validate_date(1582, 10, 10, calendar="gregorian") == "gregorian"
    assert validate_date(1582, 10, 4) == "julian"
    assert validate_date(-3200, 2, 29.75) == "julian"


def test_year_labels():
    assert year_from_label("3200 BC") == -3199
    assert year_from_label("1 BC") == 0
    assert year_from_label("3200 bce") == -3199
    assert year_from_label("AD 1") == 1
    assert year_from_label("1 AD") == 1
    assert year_from_label("-3199") == -3199
    for bad in ("0 BC", "0 AD", "-5 BC", "BC", "twelve"):
        with pytest.raises(InputError):
            year_from_label(bad)


@pytest.mark.parametrize("day", [5.0, 10.0, 14.99])
def test_julian_day_refuses_the_reform_gap_with_the_parsers_message(day):
    # Meeus (1998) ch. 7: in the default calendar 1582 October 4 (Julian) is followed by October 15 (Gregorian),
    # so October 5-14 name no day; julian_day and validate_date refuse them with one message.
    with pytest.raises(InputError) as from_jd:
        julian_day(1582, 10, day)
    with pytest.raises(InputError) as from_parser:
        validate_date(1582, 10, day)
    assert str(from_jd.value) == str(from_parser.value)
    with pytest.raises(InputError, match="1582-10-14"):
        julian_day([1582, 1582], [10, 10], [4.0, 14.5])  # one bad element in an array is enough
    # forcing a calendar names a real day: Gregorian 1582-10-10 is Julian 1582-09-30 (Meeus 1998 ch. 7)
    assert julian_day(1582, 10, 10.0, "gregorian") == julian_day(1582, 9, 30.0, "julian")
    assert julian_day(1582, 10, 4.99) < julian_day(1582, 10, 15.0)  # the days either side still work
