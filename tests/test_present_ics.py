"""The iCalendar writer: its files round-trip through the `icalendar` library and follow RFC 5545."""

from __future__ import annotations

import datetime as dt

import icalendar
import pytest

from lightpath.errors import InputError
from lightpath.present.ics import CalendarEntry, calendar_text, fold_line, stable_uid, write_calendar

STAMP = dt.datetime(2026, 12, 1, 9, 0, tzinfo=dt.UTC)


def _entries():
    dublin = __import__("zoneinfo").ZoneInfo("Europe/Dublin")
    return [
        CalendarEntry(
            summary="Light on the back stone, Invented chamber",
            uid_key="Invented chamber|2026-12-21T08:58:00Z",
            start_utc=dt.datetime(2026, 12, 21, 8, 58, tzinfo=dt.UTC),
            end_utc=dt.datetime(2026, 12, 21, 9, 15, tzinfo=dt.UTC),
            description="Expected start 08:58 (earliest 08:56, latest 09:01).\nNever look at the Sun; follow the "
            "site's rules, and its managers' instructions — ΔT ≈ 69 s.",
            location="Invented chamber; 53.1°N, 7.4°W",
            latitude_deg=53.1,
            longitude_deg=-7.4,
        ),
        CalendarEntry(  # given in local summer time: must be written in UTC
            summary="Evening light",
            uid_key="Invented chamber|2027-06-21T20:10:00Z",
            start_utc=dt.datetime(2027, 6, 21, 21, 10, tzinfo=dublin),
            end_utc=dt.datetime(2027, 6, 21, 21, 30, tzinfo=dublin),
        ),
    ]


def test_round_trip_through_icalendar(tmp_path):
    path = write_calendar(tmp_path / "visit.ics", _entries(), name="Visit plan", dtstamp=STAMP)
    cal = icalendar.Calendar.from_ical(path.read_bytes())
    assert str(cal["VERSION"]) == "2.0" and str(cal["PRODID"]).startswith("-//lightpath")
    events = list(cal.walk("VEVENT"))
    assert len(events) == 2
    first, second = events
    assert first.decoded("DTSTART") == dt.datetime(2026, 12, 21, 8, 58, tzinfo=dt.UTC)
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


def test_file_format_follows_rfc5545():
    text = calendar_text(_entries(), dtstamp=STAMP)
    assert text.endswith("\r\n") and "\n" not in text.replace("\r\n", "")
    for line in text.split("\r\n"):
        assert len(line.encode("utf-8")) <= 75  # RFC 5545 §3.1
    assert "DTSTART:20261221T085800Z" in text
    assert text.count("BEGIN:VEVENT") == 2 and text.count("END:VEVENT") == 2


def test_uid_is_stable_and_distinct():
    a = calendar_text(_entries(), dtstamp=STAMP)
    b = calendar_text(_entries(), dtstamp=STAMP + dt.timedelta(days=3))
    uid = [line for line in a.split("\r\n") if line.startswith("UID:")]
    assert uid == [line for line in b.split("\r\n") if line.startswith("UID:")]
    assert len(set(uid)) == 2


def test_folding_keeps_multibyte_characters_whole():
    line = "DESCRIPTION:" + "ΔT " * 60
    folded = fold_line(line)
    parts = folded.split("\r\n")
    assert all(len(p.encode("utf-8")) <= 75 for p in parts)
    assert "".join(p[1:] if i else p for i, p in enumerate(parts)) == line  # unfolding gives it back


def test_naive_times_are_refused():
    bad = CalendarEntry("x", "k", dt.datetime(2027, 1, 1), dt.datetime(2027, 1, 1, 1))
    with pytest.raises(InputError, match="no time zone"):
        calendar_text([bad])
