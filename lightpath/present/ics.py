"""iCalendar (RFC 5545) files of light events, written with the `icalendar` library: one VEVENT per event.

Each event is written in its own time zone: an entry whose start is in an IANA zone (a
:class:`zoneinfo.ZoneInfo`) gets ``DTSTART;TZID=…`` and the file a VTIMEZONE for that zone over the
years of the events (RFC 5545 §3.6.5), so calendar programs show the site's clock time even in another
zone; an entry in UTC is written with a ``Z`` suffix (§3.3.5, form #2).  Each event carries a VALARM
reminder (§3.6.6) some minutes before it.  The UID is a hash of the scene and the event's start and the
DTSTAMP is derived from the entries (the earliest start, unless a stamp is given), so the same plan
always gives the same bytes and importing a newer file updates the same entries instead of doubling them.
Folding at 75 octets and text escaping (§3.1, §3.3.11) are the library's.

>>> import datetime as dt, zoneinfo
>>> entry = CalendarEntry(
...     summary="Light on the back stone", uid_key="Demo site|2027-02-03T08:12:00Z",
...     start=dt.datetime(2027, 2, 3, 8, 12, tzinfo=zoneinfo.ZoneInfo("Europe/Dublin")),
...     end=dt.datetime(2027, 2, 3, 8, 31, tzinfo=zoneinfo.ZoneInfo("Europe/Dublin")))
>>> text = calendar_text([entry])
>>> [line for line in text.split("\\r\\n") if line.startswith(("DTSTART;", "DTSTAMP", "TRIGGER"))]
['DTSTART;TZID=Europe/Dublin:20270203T081200', 'DTSTAMP:20270203T081200Z', 'TRIGGER:-PT30M']

References
----------
Desruisseaux, B. (ed.) (2009). *Internet Calendaring and Scheduling Core Object
Specification (iCalendar)*, RFC 5545, IETF.
"""

from __future__ import annotations

import datetime as _dt
import hashlib
import math
import os
from dataclasses import dataclass
from pathlib import Path

from lightpath.errors import InputError
from lightpath.files import write_bytes_atomic

__all__ = ["CalendarEntry", "PRODID", "REMINDER_MIN", "calendar_bytes", "calendar_text", "stable_uid", "write_calendar"]

#: The product identifier written in every file (RFC 5545 §3.7.3).
PRODID = "-//lightpath//light events//EN"
#: Minutes before an event that its reminder (VALARM) goes off, unless an entry says otherwise.
REMINDER_MIN = 30.0


@dataclass(frozen=True)
class CalendarEntry:
    """One calendar event: a light event as a visitor would put it in a diary.

    ``start`` and ``end`` are aware datetimes: in an IANA zone (:class:`zoneinfo.ZoneInfo`, written with
    its TZID and a VTIMEZONE) or in UTC (written with ``Z``).
    ``uid_key`` is hashed into the UID: use the scene name and the event's start.
    ``latitude_deg``/``longitude_deg`` go into GEO (RFC 5545 §3.8.1.6) when given.
    ``reminder_min`` : minutes before the start that a display alarm goes off (None: no alarm).
    """

    summary: str
    uid_key: str
    start: _dt.datetime
    end: _dt.datetime
    description: str = ""
    location: str = ""
    latitude_deg: float | None = None
    longitude_deg: float | None = None
    reminder_min: float | None = REMINDER_MIN


def stable_uid(key: str) -> str:
    """A UID that depends only on ``key`` (SHA-256, first 32 hex digits) — the same every run.

    >>> stable_uid("scene|2027-02-03T08:12:00Z")[:8], len(stable_uid("x"))
    ('b84cfd3d', 42)
    """
    return hashlib.sha256(key.encode("utf-8")).hexdigest()[:32] + "@lightpath"


def _checked(moment: _dt.datetime, name: str, summary: str) -> _dt.datetime:
    if not isinstance(moment, _dt.datetime) or moment.tzinfo is None or moment.utcoffset() is None:
        raise InputError(f"calendar entry {summary!r}: {name} {moment!r} is not a datetime with a time zone")
    if getattr(moment.tzinfo, "key", None) in (None, "UTC", "Etc/UTC"):  # a fixed offset or UTC: written in UTC
        return moment.astimezone(_dt.UTC)
    return moment


def _event(entry: CalendarEntry, dtstamp: _dt.datetime):
    import icalendar

    start = _checked(entry.start, "start", entry.summary)
    end = _checked(entry.end, "end", entry.summary)
    if end < start:
        raise InputError(f"calendar entry {entry.summary!r}: end is before start")
    event = icalendar.Event()
    event.add("uid", stable_uid(entry.uid_key))
    event.add("dtstamp", dtstamp)
    event.add("dtstart", start)
    event.add("dtend", end)
    event.add("summary", entry.summary)
    if entry.description:
        event.add("description", entry.description)
    if entry.location:
        event.add("location", entry.location)
    if entry.latitude_deg is not None and entry.longitude_deg is not None:
        event.add("geo", (round(float(entry.latitude_deg), 6), round(float(entry.longitude_deg), 6)))
    event.add("transp", "TRANSPARENT")
    if entry.reminder_min is not None:
        if not (math.isfinite(entry.reminder_min) and 0 <= entry.reminder_min <= 7 * 1440):
            raise InputError(f"calendar entry {entry.summary!r}: reminder {entry.reminder_min!r} is not 0..10080 min")
        alarm = icalendar.Alarm()
        alarm.add("action", "DISPLAY")
        alarm.add("trigger", -_dt.timedelta(minutes=float(entry.reminder_min)))  # §3.8.6.3, before DTSTART
        alarm.add("description", entry.summary)
        event.add_component(alarm)
    return event


def calendar_bytes(
    entries: list[CalendarEntry], *, name: str = "Light events", dtstamp: _dt.datetime | None = None
) -> bytes:
    """The whole iCalendar object as bytes (UTF-8, CRLF line breaks).

    ``dtstamp`` is written as every event's DTSTAMP; by default the earliest start among the entries
    (1970-01-01 for none), so that the file depends only on its entries.  ``name`` becomes the calendar's
    display name (``X-WR-CALNAME``).
    """
    import icalendar

    if dtstamp is None:
        starts = [_checked(e.start, "start", e.summary).astimezone(_dt.UTC) for e in entries]
        dtstamp = min(starts) if starts else _dt.datetime(1970, 1, 1, tzinfo=_dt.UTC)
    elif dtstamp.tzinfo is None or dtstamp.utcoffset() is None:
        raise InputError(f"calendar: dtstamp {dtstamp.isoformat()} has no time zone")
    dtstamp = dtstamp.astimezone(_dt.UTC).replace(microsecond=0)
    cal = icalendar.Calendar()
    cal.add("version", "2.0")
    cal.add("prodid", PRODID)
    cal.add("calscale", "GREGORIAN")
    cal.add("method", "PUBLISH")
    cal.add("x-wr-calname", name)
    for entry in entries:
        cal.add_component(_event(entry, dtstamp))
    if entries:
        years = [e.start.year for e in entries] + [e.end.year for e in entries]
        cal.add_missing_timezones(first_date=_dt.date(min(years), 1, 1), last_date=_dt.date(max(years) + 1, 1, 1))
    return cal.to_ical()


def calendar_text(
    entries: list[CalendarEntry], *, name: str = "Light events", dtstamp: _dt.datetime | None = None
) -> str:
    """:func:`calendar_bytes` as text."""
    return calendar_bytes(entries, name=name, dtstamp=dtstamp).decode("utf-8")


def write_calendar(
    path: str | os.PathLike,
    entries: list[CalendarEntry],
    *,
    name: str = "Light events",
    dtstamp: _dt.datetime | None = None,
) -> Path:
    """Write the entries to an ``.ics`` file atomically (temporary file, then rename)."""
    return write_bytes_atomic(path, calendar_bytes(entries, name=name, dtstamp=dtstamp))
