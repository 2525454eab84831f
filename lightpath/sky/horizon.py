"""Horizon profiles: the altitude of the skyline as a function of azimuth.

A :class:`HorizonProfile` is two sorted arrays, azimuth (degrees from true
north, clockwise) and the skyline's **apparent** altitude there (degrees, as a
theodolite or clinometer sees it, refraction included).  Between samples the
altitude is interpolated linearly in azimuth, wrapping at 360°.  The profile
knows nothing of dates; the engine compares the Sun's apparent altitude with
it.

>>> h = HorizonProfile(np.array([0.0, 90.0, 180.0, 270.0]), np.array([1.0, 3.0, 1.0, -1.0]))
>>> float(h.altitude_at(45.0)), float(h.altitude_at(315.0)), float(h.altitude_at(360.0))
(2.0, 0.0, 1.0)

References
----------
Bowditch, N. (2002). *The American Practical Navigator*, Pub. No. 9, NIMA, ch. 16 "Instruments for
celestial navigation" and Table 22: dip of the sea horizon D ≈ 1.76′ √h (h in metres), terrestrial
refraction included (from memory).
"""

from __future__ import annotations

import csv
import math
import os
import re
from dataclasses import dataclass, field
from pathlib import Path

import numpy as np

from lightpath.errors import InputError
from lightpath.files import write_text_atomic
from lightpath.sky.angles import parse_angle_deg

__all__ = [
    "ALTITUDE_HEADERS",
    "AZIMUTH_HEADERS",
    "EARTH_RADIUS_M",
    "MAX_AZIMUTH_GAP_DEG",
    "HorizonProfile",
    "flat_horizon",
    "horizon_dip_deg",
    "read_horizon_csv",
    "write_horizon_csv",
]

#: Mean Earth radius, metres (IUGG mean radius R1 = 6371.0088 km; Moritz 2000, Geodetic Reference System 1980).
EARTH_RADIUS_M = 6_371_008.8

#: A CSV profile whose largest azimuth gap (wrapping at 360°) exceeds this is rejected, degrees.  Our own
#: choice: a 30° gap spans two months of sunrise travel near the equinoxes, too much to interpolate blindly.
MAX_AZIMUTH_GAP_DEG = 30.0


def _as_float_array(values, name: str) -> np.ndarray:
    arr = np.asarray(values, dtype=float).reshape(-1)
    if arr.size == 0:
        raise InputError(f"horizon profile: {name} is empty")
    if not np.all(np.isfinite(arr)):
        raise InputError(f"horizon profile: {name} has non-finite values")
    return arr


@dataclass(frozen=True, eq=False)
class HorizonProfile:
    """The skyline's apparent altitude against true azimuth.

    Parameters
    ----------
    azimuth_deg : (N,) azimuths, degrees from true north clockwise, any order, any range (taken modulo 360).
    altitude_deg : (N,) apparent altitude of the skyline at those azimuths, degrees (−90..90).
    source : a short description for reports (``"flat"``, a file name, ``"terrain"``).

    The arrays are stored sorted by azimuth in [0, 360) (duplicates of the same azimuth keep their mean).

    >>> h = flat_horizon(0.5)
    >>> float(h.altitude_at(123.0))
    -0.5
    >>> h.altitude_at(np.array([10.0, 370.0])).tolist()
    [-0.5, -0.5]
    """

    azimuth_deg: np.ndarray
    altitude_deg: np.ndarray
    source: str = field(default="", compare=False)

    def __post_init__(self) -> None:
        az = np.mod(_as_float_array(self.azimuth_deg, "azimuth_deg"), 360.0)
        alt = _as_float_array(self.altitude_deg, "altitude_deg")
        if az.shape != alt.shape:
            raise InputError(f"horizon profile: {az.size} azimuths but {alt.size} altitudes")
        if np.any(np.abs(alt) > 90.0):
            raise InputError("horizon profile: altitude_deg beyond -90..90 degrees")
        order = np.argsort(az, kind="stable")
        az, alt = az[order], alt[order]
        uniq, inverse = np.unique(az, return_inverse=True)
        if uniq.size != az.size:  # average repeated azimuths
            alt = np.bincount(inverse, weights=alt) / np.bincount(inverse)
            az = uniq
        az.setflags(write=False)
        alt.setflags(write=False)
        object.__setattr__(self, "azimuth_deg", az)
        object.__setattr__(self, "altitude_deg", alt)

    def __eq__(self, other: object) -> bool:
        if not isinstance(other, HorizonProfile):
            return NotImplemented
        return bool(
            np.array_equal(self.azimuth_deg, other.azimuth_deg)
            and np.array_equal(self.altitude_deg, other.altitude_deg)
        )

    def __hash__(self) -> int:
        return hash((self.azimuth_deg.tobytes(), self.altitude_deg.tobytes()))

    def altitude_at(self, azimuth_deg: np.ndarray | float) -> np.ndarray:
        """Skyline apparent altitude (degrees) at ``azimuth_deg`` (degrees, any range; vectorized; nan stays nan).

        Linear interpolation in azimuth, wrapping at 360°.

        >>> h = HorizonProfile(np.array([350.0, 10.0]), np.array([2.0, 4.0]))
        >>> float(h.altitude_at(0.0))
        3.0
        """
        az = np.asarray(azimuth_deg, dtype=float)
        if self.azimuth_deg.size == 1:
            out = np.full(az.shape, self.altitude_deg[0])
        else:
            out = np.interp(np.mod(az, 360.0), self.azimuth_deg, self.altitude_deg, period=360.0)
        return np.where(np.isnan(az), np.nan, out)

    def shifted(self, delta_deg: float) -> HorizonProfile:
        """The same profile raised by ``delta_deg`` degrees of altitude (negative lowers it).

        Used for survey tolerances on the horizon altitude.

        >>> float(flat_horizon().shifted(0.25).altitude_at(0.0))
        0.25
        """
        return HorizonProfile(self.azimuth_deg, np.clip(self.altitude_deg + float(delta_deg), -90.0, 90.0), self.source)

    def rotated(self, delta_deg: float) -> HorizonProfile:
        """The same skyline turned by ``delta_deg`` degrees of azimuth (clockwise positive).

        >>> h = HorizonProfile(np.array([0.0, 90.0, 180.0, 270.0]), np.array([0.0, 4.0, 0.0, 0.0]))
        >>> float(h.rotated(10.0).altitude_at(100.0))
        4.0
        """
        return HorizonProfile(self.azimuth_deg + float(delta_deg), self.altitude_deg, self.source)

    def summary(self) -> dict:
        """Minimum, maximum and mean altitude (degrees) with the azimuths of the extremes, for reports."""
        i_min, i_max = int(np.argmin(self.altitude_deg)), int(np.argmax(self.altitude_deg))
        return {
            "source": self.source,
            "points": int(self.azimuth_deg.size),
            "min_altitude_deg": float(self.altitude_deg[i_min]),
            "min_at_azimuth_deg": float(self.azimuth_deg[i_min]),
            "max_altitude_deg": float(self.altitude_deg[i_max]),
            "max_at_azimuth_deg": float(self.azimuth_deg[i_max]),
            "mean_altitude_deg": float(np.mean(self.altitude_deg)),
        }


def flat_horizon(dip_deg: float = 0.0) -> HorizonProfile:
    """A level skyline at apparent altitude ``-dip_deg`` (degrees) all round.

    ``dip_deg`` is the dip of the visible horizon below the astronomical horizon for an elevated observer
    (see :func:`horizon_dip_deg`); 0 for the astronomical horizon itself.

    >>> float(flat_horizon(0.3).altitude_at(200.0))
    -0.3
    """
    dip = float(dip_deg)
    if not (math.isfinite(dip) and -90.0 <= dip <= 90.0):
        raise InputError(f"horizon dip {dip_deg!r} is outside -90..90 degrees")
    altitude = np.array([0.0 - dip])  # 0.0 - 0.0 is +0.0, not -0.0
    return HorizonProfile(np.array([0.0]), altitude, source="flat" if dip == 0 else f"flat, dip {dip:g} deg")


def horizon_dip_deg(height_m: np.ndarray | float, *, refraction: bool = True) -> np.ndarray:
    """Dip of the sea-level horizon below the astronomical horizon for an eye ``height_m`` metres up, degrees.

    With ``refraction=True`` (default) the navigator's formula with the usual terrestrial refraction,
    D = 1.76′ √h (Bowditch 2002, Table 22; the Nautical Almanac's dip table uses the same, from memory).
    With ``refraction=False`` the geometric dip of a spherical Earth, D = arccos(R / (R + h)).
    Vectorized; negative heights give nan.

    >>> round(float(horizon_dip_deg(100.0)) * 60, 1)   # arcminutes, refraction included
    17.6
    >>> round(float(horizon_dip_deg(100.0, refraction=False)) * 60, 1)   # geometric
    19.3

    References
    ----------
    Bowditch, N. (2002). *The American Practical Navigator*, Pub. No. 9, Table 22 "Dip of the sea horizon".
    """
    h = np.asarray(height_m, dtype=float)
    with np.errstate(invalid="ignore"):
        if refraction:
            dip = 1.76 / 60.0 * np.sqrt(h)  # Bowditch (2002) Table 22: D = 1.76' sqrt(h[m])
        else:
            dip = np.degrees(np.arccos(EARTH_RADIUS_M / (EARTH_RADIUS_M + h)))  # right triangle at the tangent
    return np.where(h >= 0, dip, np.nan)


#: Header names accepted for the two columns (any case).
AZIMUTH_HEADERS = ("azimuth_deg", "azimuth", "az")
ALTITUDE_HEADERS = ("altitude_deg", "altitude", "alt")
_NORTH_LINE = re.compile(r"#\s*north\s*:\s*(?P<north>[A-Za-z]+)\s*(?:,\s*declination\s+(?P<dec>.+?))?\s*$", re.I)
_NORTH_FORMS = "'# north: true' or '# north: magnetic, declination 1.5' (east positive, or 1°30' W)"


def _north_line(line: str, path: Path, lineno: int) -> tuple[str, float | None] | None:
    """A ``# north: ...`` comment → (north, declination_deg or None); None for any other comment."""
    if not re.match(r"#\s*north\s*:", line, re.I):
        return None
    m = _NORTH_LINE.match(line)
    if m is None or m["north"].lower() not in ("true", "magnetic") or (m["dec"] and m["north"].lower() == "true"):
        raise InputError(f"{path}: line {lineno}: north line not understood; accepted: {_NORTH_FORMS}")
    dec = None
    if m["dec"]:
        dec = parse_angle_deg(m["dec"], kind="longitude", name=f"{path}: line {lineno}, declination")
    return m["north"].lower(), dec


def _cell_value(cell: str, decimal_comma: bool, where: str) -> float:
    if decimal_comma and "," in cell and "." not in cell:
        cell = cell.replace(",", ".")
    return parse_angle_deg(cell, kind="angle", name=where)


def read_horizon_csv(
    path: str | os.PathLike,
    *,
    max_gap_deg: float = MAX_AZIMUTH_GAP_DEG,
    north: str | None = None,
    declination_deg: float | None = None,
) -> HorizonProfile:
    """Read a skyline profile from a CSV file with an azimuth and an altitude column.

    The header names the columns: ``azimuth_deg``, ``azimuth`` or ``az`` and ``altitude_deg``, ``altitude`` or
    ``alt`` (any case, any order; other columns are ignored).  Cells are separated by commas or by semicolons
    (then a decimal comma is accepted too) and hold decimal degrees or degrees-minutes-seconds (``120°30'``,
    see :mod:`lightpath.sky.angles`).  Rows may come at any spacing and in any order; altitudes are apparent
    degrees.  Blank lines and lines starting with ``#`` are skipped, except a north line:
    ``# north: magnetic, declination 1.5`` (east positive; ``1°30' W`` also) says the azimuths are compass
    bearings, turned here to true azimuths (true = magnetic + declination).  ``north`` (``"true"`` or
    ``"magnetic"``) and ``declination_deg`` say the same from outside (a scene's ``horizon.north``); the file's
    own north line must agree with ``north``, and its declination is used before ``declination_deg``.

    Raises :class:`~lightpath.errors.InputError` naming the file, line and column (never the file's text) for:
    a missing file, a header without both columns, a cell that is not an angle, an altitude beyond ±90°, fewer
    than 3 distinct azimuths, a largest azimuth gap (wrapping at 360°) wider than ``max_gap_deg`` (default
    30°), a north line not understood, or magnetic north without a declination.

    >>> import tempfile, pathlib
    >>> p = pathlib.Path(tempfile.mkdtemp()) / "h.csv"
    >>> _ = p.write_text("azimuth_deg,altitude_deg\\n0,1\\n120,2\\n240,1.5\\n")
    >>> read_horizon_csv(p, max_gap_deg=120).altitude_at(60.0).item()
    1.5
    >>> _ = p.write_text("# north: magnetic, declination 2 W\\nAz;Alt\\n2;1,0\\n122;2\\n242°00';1°30'\\n")
    >>> read_horizon_csv(p, max_gap_deg=120).altitude_at(60.0).item()
    1.5
    """
    path = Path(path)
    if north not in (None, "true", "magnetic"):
        raise InputError(f"north: {north!r} is not one of true, magnetic")
    try:
        text = path.read_text(encoding="utf-8-sig")
    except FileNotFoundError:
        raise InputError(f"{path}: horizon file not found") from None
    except (OSError, UnicodeDecodeError) as exc:
        raise InputError(f"{path}: horizon file cannot be read ({type(exc).__name__})") from None
    rows = []
    columns: tuple[int, int] | None = None
    width, delimiter, file_north = 0, ",", None
    for lineno, line in enumerate(text.splitlines(), start=1):
        stripped = line.strip()
        if not stripped:
            continue
        if stripped.startswith("#"):
            said = _north_line(stripped, path, lineno)
            if said is not None:
                file_north = said
            continue
        if columns is None:
            delimiter = ";" if ";" in stripped else ","
        cells = [c.strip() for c in next(csv.reader([stripped], delimiter=delimiter))]
        if all(c == "" for c in cells):
            continue
        if columns is None:
            names = [c.lower() for c in cells]
            found = [next((i for i, n in enumerate(names) if n in options), None)
                     for options in (AZIMUTH_HEADERS, ALTITUDE_HEADERS)]  # fmt: skip
            if None in found:
                raise InputError(
                    f"{path}: line {lineno}: the header needs an azimuth column ({', '.join(AZIMUTH_HEADERS)}) "
                    f"and an altitude column ({', '.join(ALTITUDE_HEADERS)}), separated by commas or semicolons"
                )
            columns, width = (found[0], found[1]), len(cells)
            continue
        if len(cells) != width:
            raise InputError(f"{path}: line {lineno}: expected {width} cells like the header, got {len(cells)}")
        values = [
            _cell_value(cells[col], delimiter == ";", f"{path}: line {lineno}, column {col + 1} ({label})")
            for col, label in zip(columns, ("azimuth", "altitude"), strict=True)
        ]
        if abs(values[1]) > 90.0:
            raise InputError(f"{path}: line {lineno}, column {columns[1] + 1}: altitude is outside -90..90 degrees")
        rows.append(values)
    if columns is None:
        raise InputError(f"{path}: empty horizon file (expected a header such as 'azimuth_deg,altitude_deg')")
    data = np.array(rows, dtype=float).reshape(-1, 2)
    az = np.unique(np.mod(data[:, 0], 360.0))
    if az.size < 3:
        raise InputError(f"{path}: horizon needs at least 3 distinct azimuths, found {az.size}")
    gaps = np.diff(np.concatenate([az, [az[0] + 360.0]]))
    k = int(np.argmax(gaps))
    if gaps[k] > max_gap_deg:
        raise InputError(
            f"{path}: azimuth gap of {gaps[k]:.1f} deg after {az[k]:g} deg is wider than {max_gap_deg:g} deg; "
            "add rows covering 0-360"
        )
    said_north, said_declination = file_north if file_north is not None else (None, None)
    if said_north is not None and north is not None and said_north != north:
        raise InputError(f"{path}: its north line says {said_north} north but the scene says {north} north")
    if (said_north or north or "true") == "true":
        return HorizonProfile(data[:, 0], data[:, 1], source=path.name)
    turn = said_declination if said_declination is not None else declination_deg
    if turn is None:
        raise InputError(
            f"{path}: azimuths from magnetic north but no declination: add one to the north line "
            f"({_NORTH_FORMS}) or give the scene's horizon.declination_deg or site.survey_date"
        )
    source = f"{path.name} (magnetic bearings + declination {turn:.3f} deg)"
    return HorizonProfile(data[:, 0] + turn, data[:, 1], source=source)


def write_horizon_csv(path: str | os.PathLike, profile: HorizonProfile, *, comment: str | None = None) -> Path:
    """Write ``profile`` as ``azimuth_deg,altitude_deg`` CSV, atomically; returns the path.

    ``comment`` (optional) is written as ``#`` lines above the header.

    >>> import tempfile, pathlib
    >>> p = pathlib.Path(tempfile.mkdtemp()) / "h.csv"
    >>> h = HorizonProfile(np.arange(0.0, 360.0, 10.0), np.full(36, 1.25))
    >>> read_horizon_csv(write_horizon_csv(p, h)) == h
    True
    """
    lines = []
    if comment:
        lines += [f"# {line}" for line in str(comment).splitlines()]
    lines.append("azimuth_deg,altitude_deg")
    lines += [f"{a:.6f},{b:.6f}" for a, b in zip(profile.azimuth_deg, profile.altitude_deg, strict=True)]
    return write_text_atomic(path, "\n".join(lines) + "\n")
