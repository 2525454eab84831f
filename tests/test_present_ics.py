"""The iCalendar writer: files made with the `icalendar` library, read back with it, following RFC 5545."""

from __future__ import annotations

import datetime as dt
import zoneinfo

import icalendar
import pytest

from lightpath.errors import InputError
from lightpath.present.ics import CalendarEntry, calendar_bytes, calendar_text, stable_uid, write_calendar

STAMP = dt.datetime(2026, 12, 1, 9, 0, tzinfo=dt.UTC)
DUBLIN = zoneinfo.ZoneInfo("Europe/Dublin")


def _entries(reminder_min=30.0):
    return [
        CalendarEntry(
            summary="Light on the back stone, Invented chamber",
            uid_key="Invented chamber|2026-12-21T08:58:00Z",
            start=dt.datetime(2026, 12, 21, 8, 58, tzinfo=DUBLIN),
            end=dt.datetime(2026, 12, 21, 9, 15, tzinfo=DUBLIN),
            description="Expected start 08:58 (earliest 08:56, latest 09:01).\nNever look at the Sun; follow the "
            "site's rules, and its managers' instructions — ΔT ≈ 69 s.",
            location="Invented chamber; 53.1°N, 7.4°W",
            latitude_deg=53.1,
            longitude_deg=-7.4,
            reminder_min=reminder_min,
        ),
        CalendarEntry(  # Irish summer time (UTC+1)
            summary="Evening light",
            uid_key="Invented chamber|2027-06-21T20:10:00Z",
            start=dt.datetime(2027, 6, 21, 21, 10, tzinfo=DUBLIN),
            end=dt.datetime(2027, 6, 21, 21, 30, tzinfo=DUBLIN),
            reminder_min=reminder_min,
        ),
    ]


def test_round_trip_through_icalendar(tmp_path):
    path = write_calendar(tmp_path / "visit.ics", _entries(), name="Visit plan", dtstamp=STAMP)
    cal = icalendar.Calendar.from_ical(path.read_bytes())
    assert str(cal["VERSION"]) == "2.0" and str(cal["PRODID"]).startswith("-//lightpath")
    assert str(cal["X-WR-CALNAME"]) == "Visit plan"
    first, second = list(cal.walk("VEVENT"))
    assert first.decoded("DTSTART") == dt.datetime(2026, 12, 21, 8, 58, tzinfo=dt.UTC)  # Irish winter time = UTC
    assert first.decoded("DTEND") == dt.datetime(2026, 12, 21, 9, 15, tzinfo=dt.UTC)
    assert first.decoded("DTSTAMP") == STAMP
    assert str(first["SUMMARY"]) == "Light on the back stone, Invented chamber"
    assert "Never look at the Sun" in str(first["DESCRIPTION"]) and "\n" in str(first["DESCRIPTION"])
    assert "ΔT ≈ 69 s" in str(first["DESCRIPTION"])
    assert str(first["LOCATION"]) == "Invented chamber; 53.1°N, 7.4°W"
    assert first["GEO"].latitude == pytest.approx(53.1) and first["GEO"].longitude == pytest.approx(-7.4)
    assert str(first["UID"]) == stable_uid("Invented chamber|2026-12-21T08:58:00Z")
    # 21:10 Irish summer time is 20:10 UTC
    assert second.decoded("DTSTART") == dt.datetime(2027, 6, 21, 20, 10, tzinfo=dt.UTC)


def test_times_are_in_the_site_zone_with_a_vtimezone():
    text = calendar_text(_entries(), dtstamp=STAMP)
    assert "DTSTART;TZID=Europe/Dublin:20270621T211000" in text
    zones = list(icalendar.Calendar.from_ical(text).walk("VTIMEZONE"))
    assert [str(z["TZID"]) for z in zones] == ["Europe/Dublin"]
    # the written rules alone (not the reader's tz database) give both events' offsets: Irish winter time is
    # UTC+0, summer time UTC+1 from the last Sunday of March (2027-03-28, EU rule)
    tz = zones[0].to_tz()
    assert dt.datetime(2026, 12, 21, 8, 58, tzinfo=tz).utcoffset() == dt.timedelta(0)
    assert dt.datetime(2027, 6, 21, 21, 10, tzinfo=tz).utcoffset() == dt.timedelta(hours=1)
    assert dt.datetime(2027, 3, 27, 12, 0, tzinfo=tz).utcoffset() == dt.timedelta(0)


def test_utc_entries_are_written_with_z_and_no_vtimezone():
    def at(day, hour, zone):
        return dt.datetime(2027, 1, day, hour, 4, tzinfo=zone)

    utc = [
        CalendarEntry("a", "k", at(2, 3, dt.UTC), at(2, 4, dt.UTC)),
        CalendarEntry("b", "k2", at(3, 3, zoneinfo.ZoneInfo("UTC")), at(3, 4, zoneinfo.ZoneInfo("UTC"))),
    ]
    text = calendar_text(utc)
    assert "DTSTART:20270102T030400Z" in text and "DTSTART:20270103T030400Z" in text and "VTIMEZONE" not in text


def test_each_event_has_a_reminder_before_it():
    cal = icalendar.Calendar.from_ical(calendar_bytes(_entries(reminder_min=45)))
    for event in cal.walk("VEVENT"):
        (alarm,) = event.walk("VALARM")
        assert str(alarm["ACTION"]) == "DISPLAY"
        assert alarm.decoded("TRIGGER") == -dt.timedelta(minutes=45)
    assert "VALARM" not in calendar_text(_entries(reminder_min=None))


def test_two_runs_give_identical_bytes_and_stable_uids():
    a, b = calendar_bytes(_entries()), calendar_bytes(_entries())
    assert a == b
    # without a given stamp, DTSTAMP is the earliest start (derived from the inputs, not the clock)
    first = next(iter(icalendar.Calendar.from_ical(a).walk("VEVENT")))
    assert first.decoded("DTSTAMP") == dt.datetime(2026, 12, 21, 8, 58, tzinfo=dt.UTC)
    later = calendar_text(_entries(), dtstamp=STAMP + dt.timedelta(days=3))
    uids = [str(e["UID"]) for e in icalendar.Calendar.from_ical(a).walk("VEVENT")]
    assert uids == [str(e["UID"]) for e in icalendar.Calendar.from_ical(later).walk("VEVENT")]
    assert len(set(uids)) == 2


def test_file_format_follows_rfc5545():
    text = calendar_text(_entries(), dtstamp=STAMP)
    assert text.endswith("\r\n") and "\n" not in text.replace("\r\n", "")
    for line in text.split("\r\n"):
        assert len(line.encode("utf-8")) <= 75  # RFC 5545 §3.1
    assert text.count("BEGIN:VEVENT") == 2 and text.count("END:VEVENT") == 2


def test_bad_entries_are_refused():
    naive = dt.datetime(2027, 1, 1, 8, 0)
    with pytest.raises(InputError, match="time zone"):
        calendar_text([CalendarEntry("x", "k", naive, naive)])
    start = dt.datetime(2027, 1, 1, 8, 0, tzinfo=dt.UTC)
    with pytest.raises(InputError, match="end is before start"):
        calendar_text([CalendarEntry("x", "k", start, start - dt.timedelta(minutes=1))])
    with pytest.raises(InputError, match="reminder"):
        calendar_text([CalendarEntry("x", "k", start, start, reminder_min=-5)])
