"""Atomic file output: write to a temporary file beside the target, then rename.

A reader never sees a half-written file, and an interrupted run leaves any
earlier version of the file untouched.
"""

from __future__ import annotations

import os
import tempfile
from collections.abc import Callable
from pathlib import Path
from typing import IO

__all__ = ["write_atomic", "write_text_atomic", "write_bytes_atomic"]


def write_atomic(path: str | os.PathLike, writer: Callable[[IO[bytes]], None]) -> Path:
    """Call ``writer(fileobj)`` on a temporary file and move it to ``path``.

    The temporary file lives in the target's folder (so the rename is atomic on
    POSIX) and is removed if ``writer`` raises.

    >>> import tempfile, pathlib
    >>> d = pathlib.Path(tempfile.mkdtemp())
    >>> p = write_atomic(d / "a.txt", lambda f: f.write(b"hello"))
    >>> p.read_text()
    'hello'
    """
    path = Path(path)
    path.parent.mkdir(parents=True, exist_ok=True)
    fd, tmp = tempfile.mkstemp(prefix=f".{path.name}.", suffix=".part", dir=path.parent)
    try:
        os.chmod(tmp, 0o666 & ~_umask())  # mkstemp makes 0600; give the file the usual mode
        with os.fdopen(fd, "wb") as handle:
            writer(handle)
            handle.flush()
            os.fsync(handle.fileno())
        os.replace(tmp, path)
    except BaseException:
        try:
            os.unlink(tmp)
        except FileNotFoundError:
            pass
        raise
    return path


def _umask() -> int:
    mask = os.umask(0)
    os.umask(mask)
    return mask


def write_bytes_atomic(path: str | os.PathLike, data: bytes) -> Path:
    """Write ``data`` to ``path`` atomically."""
    return write_atomic(path, lambda handle: handle.write(data))


def write_text_atomic(path: str | os.PathLike, text: str, encoding: str = "utf-8") -> Path:
    """Write ``text`` to ``path`` atomically."""
    return write_bytes_atomic(path, text.encode(encoding))
