"""An iCalendar (RFC 5545) writer for light events: one VEVENT per event.

Calendar programs import the file and show each event at the right clock time in
the reader's own zone: times are written in UTC with a ``Z`` suffix, which
RFC 5545 §3.3.5 ("form #2, date with UTC time") defines without any VTIMEZONE.
Each event has a stable UID (a hash of the scene and the event's start), so
importing a newer file updates the same calendar entries instead of doubling
them, and a DTSTAMP (§3.8.7.2).  Lines are folded at 75 octets and text is
escaped as §3.1 and §3.3.11 require.

>>> import datetime as dt
>>> entry = CalendarEntry(
...     summary="Light on the back stone", uid_key="Demo site|2027-02-03T08:12:00Z",
...     start_utc=dt.datetime(2027, 2, 3, 8, 12, tzinfo=dt.UTC),
...     end_utc=dt.datetime(2027, 2, 3, 8, 31, tzinfo=dt.UTC), description="Never look at the Sun.")
>>> text = calendar_text([entry], dtstamp=dt.datetime(2026, 12, 1, tzinfo=dt.UTC))
>>> [line for line in text.split("\\r\\n") if line.startswith("DTSTART")]
['DTSTART:20270203T081200Z']

References
----------
Desruisseaux, B. (ed.) (2009). *Internet Calendaring and Scheduling Core Object
Specification (iCalendar)*, RFC 5545, IETF.
"""

from __future__ import annotations

import datetime as _dt
import hashlib
import os
from dataclasses import dataclass
from pathlib import Path

from lightpath.errors import InputError
from lightpath.files import write_text_atomic

__all__ = ["CalendarEntry", "PRODID", "calendar_text", "escape_text", "fold_line", "stable_uid", "write_calendar"]

#: The product identifier written in every file (RFC 5545 §3.7.3).
PRODID = "-//lightpath//light events//EN"

_MAX_OCTETS = 75  # RFC 5545 §3.1: lines SHOULD NOT be longer than 75 octets, excluding the line break


@dataclass(frozen=True)
class CalendarEntry:
    """One calendar event: a light event as a visitor would put it in a diary.

    ``start_utc`` and ``end_utc`` are aware datetimes (any zone; written in UTC).
    ``uid_key`` is hashed into the UID: use the scene name and the event's start.
    ``latitude_deg``/``longitude_deg`` go into GEO (RFC 5545 §3.8.1.6) when given.
    """

    summary: str
    uid_key: str
    start_utc: _dt.datetime
    end_utc: _dt.datetime
    description: str = ""
    location: str = ""
    latitude_deg: float | None = None
    longitude_deg: float | None = None


def stable_uid(key: str) -> str:
    """A UID that depends only on ``key`` (SHA-256, first 32 hex digits) — the same every run.

    >>> stable_uid("scene|2027-02-03T08:12:00Z")[:8], len(stable_uid("x"))
    ('b84cfd3d', 42)
    """
    return hashlib.sha256(key.encode("utf-8")).hexdigest()[:32] + "@lightpath"


def escape_text(text: str) -> str:
    r"""Escape a TEXT value (RFC 5545 §3.3.11): backslash, semicolon, comma and newlines.

    >>> escape_text("a, b; c\\d\ne")
    'a\\, b\\; c\\\\d\\ne'
    """
    out = str(text).replace("\\", "\\\\").replace(";", "\\;").replace(",", "\\,")
    return out.replace("\r\n", "\n").replace("\r", "\n").replace("\n", "\\n")


def fold_line(line: str) -> str:
    """Fold a content line at 75 octets (RFC 5545 §3.1), never inside a UTF-8 character.

    >>> folded = fold_line("DESCRIPTION:" + "x" * 100)
    >>> [len(part) for part in folded.split("\\r\\n")]
    [75, 38]
    """
    data = line.encode("utf-8")
    if len(data) <= _MAX_OCTETS:
        return line
    parts: list[bytes] = []
    start, limit = 0, _MAX_OCTETS
    while start < len(data):
        end = min(start + limit, len(data))
        while end < len(data) and (data[end] & 0xC0) == 0x80:  # don't cut a multi-byte character
            end -= 1
        parts.append(data[start:end])
        start, limit = end, _MAX_OCTETS - 1  # continuation lines start with one space
    return "\r\n ".join(p.decode("utf-8") for p in parts)


def _utc_stamp(moment: _dt.datetime, name: str) -> str:
    if moment.tzinfo is None or moment.utcoffset() is None:
        raise InputError(f"calendar entry: {name} {moment.isoformat()} has no time zone")
    return moment.astimezone(_dt.UTC).strftime("%Y%m%dT%H%M%SZ")


def _event_lines(entry: CalendarEntry, dtstamp: str) -> list[str]:
    if entry.end_utc < entry.start_utc:
        raise InputError(f"calendar entry {entry.summary!r}: end is before start")
    lines = [
        "BEGIN:VEVENT",
        f"UID:{stable_uid(entry.uid_key)}",
        f"DTSTAMP:{dtstamp}",
        f"DTSTART:{_utc_stamp(entry.start_utc, 'start')}",
        f"DTEND:{_utc_stamp(entry.end_utc, 'end')}",
        f"SUMMARY:{escape_text(entry.summary)}",
    ]
    if entry.description:
        lines.append(f"DESCRIPTION:{escape_text(entry.description)}")
    if entry.location:
        lines.append(f"LOCATION:{escape_text(entry.location)}")
    if entry.latitude_deg is not None and entry.longitude_deg is not None:
        lines.append(f"GEO:{entry.latitude_deg:.6f};{entry.longitude_deg:.6f}")  # RFC 5545 §3.8.1.6
    lines += ["TRANSP:TRANSPARENT", "END:VEVENT"]
    return lines


def calendar_text(
    entries: list[CalendarEntry], *, name: str = "Light events", dtstamp: _dt.datetime | None = None
) -> str:
    """The whole iCalendar object as text with CRLF line breaks.

    ``dtstamp`` (default: now, UTC) is when the file was made; pass a fixed value for
    reproducible files.  ``name`` becomes the calendar's display name (``X-WR-CALNAME``).
    """
    stamp = _utc_stamp(dtstamp or _dt.datetime.now(_dt.UTC), "dtstamp")
    lines = [
        "BEGIN:VCALENDAR",
        "VERSION:2.0",
        f"PRODID:{PRODID}",
        "CALSCALE:GREGORIAN",
        "METHOD:PUBLISH",
        f"X-WR-CALNAME:{escape_text(name)}",
    ]
    for entry in entries:
        lines += _event_lines(entry, stamp)
    lines.append("END:VCALENDAR")
    return "".join(fold_line(line) + "\r\n" for line in lines)


def write_calendar(
    path: str | os.PathLike,
    entries: list[CalendarEntry],
    *,
    name: str = "Light events",
    dtstamp: _dt.datetime | None = None,
) -> Path:
    """Write the entries to an ``.ics`` file atomically (temporary file, then rename)."""
    return write_text_atomic(path, calendar_text(entries, name=name, dtstamp=dtstamp))
