"""Angles as surveyors write them: decimal degrees or degrees-minutes-seconds with a hemisphere letter.

One parser for every place a latitude, longitude or survey angle is typed: scene files, the ``--site`` option,
horizon CSV cells and the Python API.

Accepted forms (spaces optional between the parts):

- decimal degrees: ``41.62``, ``-8.05``, ``+12.5``;
- degrees, minutes and seconds with the marks ``°`` (or ``º``), ``'`` (or ``′``), ``"`` (or ``″`` or ``''``),
  or separated by spaces or colons: ``41°37'12"``, ``8 03 00``, ``41:37:12.5``, ``41°37.2'``;
- a hemisphere letter before or after (``N``/``S`` for latitude, ``E``/``W`` for longitude, any case):
  ``41°37'12"N``, ``8 03 00 W``, ``S 33 51 35``.  South and west are negative.  A letter and a sign together,
  minutes or seconds of 60 or more, decimals anywhere but the last part, or a value out of range are refused.

>>> parse_angle_deg("41°37'12\\"N", kind="latitude")
41.62
>>> parse_angle_deg("8 03 00 W", kind="longitude")
-8.05
>>> parse_angle_deg(-8.05, kind="longitude")
-8.05

References
----------
Bowditch, N. (2002). *The American Practical Navigator*, Pub. No. 9, ch. 1 (latitude and longitude in degrees,
minutes and seconds, named north/south and east/west).
"""

from __future__ import annotations

import math
import re

from lightpath.errors import InputError

__all__ = ["ANGLE_FORMS", "parse_angle_deg"]

#: The accepted forms, for messages.
ANGLE_FORMS = (
    "decimal degrees (41.62, -8.05) or degrees-minutes-seconds with a hemisphere letter (41°37'12\"N, 8 03 00 W)"
)

_HEMISPHERES = {"latitude": {"N": 1.0, "S": -1.0}, "longitude": {"E": 1.0, "W": -1.0}, "angle": {}}
_LIMITS = {"latitude": 90.0, "longitude": 180.0, "angle": 360.0}
_SEPARATORS = re.compile(r"[°º'′’\"″”:\s]+")
_PART = re.compile(r"\d+(\.\d+)?|\.\d+")


def parse_angle_deg(value: str | float | int, *, kind: str = "angle", name: str | None = None) -> float:
    """An angle in decimal degrees from a number or a decimal or degrees-minutes-seconds string.

    Parameters
    ----------
    value : a number (degrees) or a string in one of the forms of the module docstring.
    kind : ``"latitude"`` (N/S letters, ±90°), ``"longitude"`` (E/W letters, ±180°) or ``"angle"`` (no letters,
        ±360°).
    name : what the value is, for messages (a scene key, a command-line option, a file and line); default ``kind``.

    Returns the angle in degrees (south and west negative).  Raises :class:`~lightpath.errors.InputError`
    naming ``name``, what is wrong and the accepted forms; the value itself is not repeated.

    >>> parse_angle_deg("S 33 51 36", kind="latitude")
    -33.86
    >>> parse_angle_deg("91 00 00 N", kind="latitude")
    Traceback (most recent call last):
    ...
    lightpath.errors.InputError: latitude: 91 deg is outside -90..90 degrees
    """
    if kind not in _LIMITS:
        raise ValueError(f"kind must be one of {', '.join(_LIMITS)}")
    limit = _LIMITS[kind]
    name = name or kind
    if isinstance(value, bool):
        raise InputError(f"{name}: true/false is not an angle; accepted: {ANGLE_FORMS}")
    if isinstance(value, (int, float)):
        degrees = float(value)
    elif isinstance(value, str):
        degrees = _parse_text(value, kind, name)
    else:
        raise InputError(f"{name}: not a number or a quoted angle; accepted: {ANGLE_FORMS}")
    if not math.isfinite(degrees):
        raise InputError(f"{name}: not a finite number; accepted: {ANGLE_FORMS}")
    if abs(degrees) > limit:
        raise InputError(f"{name}: {degrees:g} deg is outside {-limit:g}..{limit:g} degrees")
    return round(degrees, 10)


def _parse_text(text: str, kind: str, name: str) -> float:
    s = text.strip().replace("''", '"')
    letters = _HEMISPHERES[kind]
    sign, letter = 1.0, None
    if s and letters and s[-1].upper() in "NSEW":
        letter, s = s[-1].upper(), s[:-1].strip()
    elif s and letters and s[0].upper() in "NSEW":
        letter, s = s[0].upper(), s[1:].strip()
    if letter is not None:
        if letter not in letters:
            allowed = "/".join(letters)
            raise InputError(f"{name}: hemisphere letter {letter} does not fit a {kind} (accepted: {allowed})")
        sign = letters[letter]
    if s[:1] in "+-" and s:
        if letter is not None:
            raise InputError(f"{name}: give a sign or a hemisphere letter, not both; accepted: {ANGLE_FORMS}")
        sign, s = (-1.0 if s[0] == "-" else 1.0), s[1:].strip()
    parts = [p for p in _SEPARATORS.split(s) if p]
    if not 1 <= len(parts) <= 3 or not all(_PART.fullmatch(p) for p in parts):
        raise InputError(f"{name}: not an angle; accepted: {ANGLE_FORMS}")
    if any("." in p for p in parts[:-1]):
        raise InputError(f"{name}: only the last part (degrees, minutes or seconds) may have decimals")
    numbers = [float(p) for p in parts]
    for label, part in zip(("minutes", "seconds"), numbers[1:], strict=False):
        if part >= 60.0:
            raise InputError(f"{name}: {label} {part:g} must be below 60")
    degrees = sum(part / 60.0**i for i, part in enumerate(numbers))
    return sign * degrees
