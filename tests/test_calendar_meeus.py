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
