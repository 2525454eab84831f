"""Errors that lightpath reports to its users.

:class:`InputError` is for anything the user can fix: a malformed date, a
latitude out of range, a missing mesh, an unknown key in a scene file.  Its
message is a single line naming the file or option, the field and what is
accepted.  The command line prints it and exits with code 2, never a
traceback.
"""

from __future__ import annotations

__all__ = ["InputError"]


class InputError(ValueError):
    """Bad input the user can correct; the message is one self-contained line.

    >>> raise InputError("--site: latitude 95 is outside -90..90 degrees")
    Traceback (most recent call last):
    ...
    lightpath.errors.InputError: --site: latitude 95 is outside -90..90 degrees
    """

    def __init__(self, message: str) -> None:
        super().__init__(" ".join(str(message).split()))
