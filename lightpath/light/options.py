"""The engine's settings, each default written once: the window's, the scan's and one realisation's.

Every command, study and the report build these objects and hand them down; nothing else
writes a default for them.  ``docs/engine.md`` lists them.

>>> WindowOptions().samples, WindowOptions().resolution_deg
(400, 0.05)
>>> ScanOptions().criterion, ScanOptions().parts
('first-gleam', 8)
"""

from __future__ import annotations

import math
from dataclasses import dataclass, field
from pathlib import Path

import numpy as np

from lightpath.errors import InputError
from lightpath.light.disc import CRITERIA
from lightpath.light.grid import DECLINATION_LIMIT_DEG, MOON_DECLINATION_LIMIT_DEG
from lightpath.light.track import Air

__all__ = ["BODIES", "Conditions", "split_settings", "MAX_SAMPLES", "ScanOptions", "WindowOptions"]

#: Most target samples one window may take.
MAX_SAMPLES = 1_000_000
#: Accepted window cell sizes, degrees.
RESOLUTION_RANGE_DEG = (0.01, 1.0)
#: The bodies whose light the engine follows, and the declination band each needs of a window (degrees).
BODIES = {"sun": DECLINATION_LIMIT_DEG, "moon": MOON_DECLINATION_LIMIT_DEG}
#: Accepted declination bands of a window, degrees.
BAND_RANGE_DEG = (DECLINATION_LIMIT_DEG, 45.0)
#: Accepted Sun altitudes below which moonlight counts, degrees (astronomical twilight .. the horizon).
SUN_BELOW_RANGE_DEG = (-18.0, 0.0)


def _whole(value, name: str, low: int, high: int) -> int:
    if isinstance(value, bool) or not isinstance(value, int | np.integer) or not low <= int(value) <= high:
        raise InputError(f"{name}: {value!r} is not a whole number in {low}..{high}")
    return int(value)


@dataclass(frozen=True)
class WindowOptions:
    """How a target's sky window is made (:func:`lightpath.light.scan.prepare_window`).

    samples : target samples (area-weighted, stratified), 1..1,000,000.
    seed : seed of the sampling (same seed, same window), ≥ 0.
    resolution_deg : cell size of the window's hour-angle/declination grid, degrees (0.01..1).
    cache_dir : folder for cached windows, or None.
    declination_limit_deg : half-width of the window's declination band, degrees: the Sun's 25.5° by default;
        moonlight needs 31° (:meth:`for_body`).
    """

    samples: int = 400
    seed: int = 0
    resolution_deg: float = 0.05
    cache_dir: str | Path | None = None
    declination_limit_deg: float = DECLINATION_LIMIT_DEG

    def for_body(self, body: str) -> WindowOptions:
        """These options with a declination band wide enough for ``body`` (``"sun"`` or ``"moon"``).

        >>> WindowOptions().for_body("moon").declination_limit_deg
        31.0
        """
        from dataclasses import replace

        if body not in BODIES:
            raise InputError(f"body: {body!r} is not one of {', '.join(BODIES)}")
        return replace(self, declination_limit_deg=max(float(self.declination_limit_deg), BODIES[body]))

    def check(self) -> WindowOptions:
        """Itself, or :class:`InputError` naming the first setting out of range."""
        _whole(self.samples, "samples", 1, MAX_SAMPLES)
        _whole(self.seed, "seed", 0, 2**63 - 1)
        r = self.resolution_deg
        lo, hi = RESOLUTION_RANGE_DEG
        if isinstance(r, bool) or not isinstance(r, int | float | np.floating) or not lo <= float(r) <= hi:
            raise InputError(f"resolution_deg: {r!r} is not a cell size in {lo:g}..{hi:g} degrees")
        b = self.declination_limit_deg
        lo, hi = BAND_RANGE_DEG
        if isinstance(b, bool) or not isinstance(b, int | float | np.floating) or not lo <= float(b) <= hi:
            raise InputError(f"declination_limit_deg: {b!r} is not a band half-width in {lo:g}..{hi:g} degrees")
        return self


@dataclass(frozen=True)
class ScanOptions:
    """How each year is swept and summed up: everything but the window, the site and the years.

    criterion : ``first-gleam``, ``half-disc`` or ``full-disc``.
    scheme, parts : divisions of the year (:func:`lightpath.sky.divisions.divisions`).
    source : Sun position source (``auto``, ``jpl``, ``vsop87``).
    delta_t_s : fixed ΔT in seconds, or None for the model (with its σ).
    calendar : ``auto``, ``julian`` or ``gregorian`` for the dates shown.
    step_min : the sweep's fine sampling step, minutes (:func:`lightpath.light.sweep.find_light`).
    body : whose light: ``"sun"`` (the default) or ``"moon"`` (:class:`~lightpath.light.moontrack.MoonTrack`).
    sun_below_deg : moonlight counts only while the Sun's apparent altitude is below this, degrees: −6°, the end
        of civil twilight (common practice, no published source).
    min_illuminated_fraction : moonlight counts only while the Moon's illuminated fraction is at least this (0..1).
    """

    criterion: str = "first-gleam"
    scheme: str = "longitude"
    parts: int = 8
    source: str = "auto"
    delta_t_s: float | None = None
    calendar: str = "auto"
    step_min: float = 1.0
    body: str = "sun"
    sun_below_deg: float = -6.0
    min_illuminated_fraction: float = 0.0

    def check(self) -> ScanOptions:
        """Itself, or :class:`InputError` for an unknown name or a number out of range."""
        from lightpath.sky.calendar import CALENDARS
        from lightpath.sky.divisions import MAX_PARTS, SCHEMES

        if self.criterion not in CRITERIA:
            raise InputError(f"criterion: {self.criterion!r} is not one of {', '.join(CRITERIA)}")
        if self.scheme not in SCHEMES:
            raise InputError(f"scheme: {self.scheme!r} is not one of {', '.join(SCHEMES)}")
        _whole(self.parts, "parts", 2, MAX_PARTS)
        if self.calendar not in CALENDARS:
            raise InputError(f"calendar: {self.calendar!r} is not one of {', '.join(CALENDARS)}")
        if self.delta_t_s is not None and not (
            isinstance(self.delta_t_s, int | float) and math.isfinite(self.delta_t_s) and abs(self.delta_t_s) <= 1e6
        ):
            raise InputError("delta_t_s: not a number of seconds in -1000000..1000000")
        if not (isinstance(self.step_min, int | float) and 0.05 <= float(self.step_min) <= 5.0):
            raise InputError("step_min: not a number of minutes in 0.05..5")
        if self.body not in BODIES:
            raise InputError(f"body: {self.body!r} is not one of {', '.join(BODIES)}")
        lo, hi = SUN_BELOW_RANGE_DEG
        if not (isinstance(self.sun_below_deg, int | float) and lo <= float(self.sun_below_deg) <= hi):
            raise InputError(f"sun_below_deg: {self.sun_below_deg!r} is not an altitude in {lo:g}..{hi:g} degrees")
        f = self.min_illuminated_fraction
        if not (isinstance(f, int | float) and 0.0 <= float(f) <= 1.0):
            raise InputError(f"min_illuminated_fraction: {f!r} is not a fraction in 0..1")
        return self


@dataclass(frozen=True)
class Conditions:
    """One realisation of the structure and its sky (studies vary these; a plain scan uses the defaults).

    rotation : 3×3 rotation (ENU) of the structure about the target, or None.
    air : temperature, pressure and anomalous refraction (:class:`~lightpath.light.track.Air`), or None
        for the observer's air.
    horizon_offset_deg : degrees added to the horizon profile's apparent altitudes.
    delta_t_z : ΔT off its model value by this many σ (moves the divisions' local days only).
    limb_darkening_u : linear limb-darkening coefficient of the disc, or None for a uniform disc.
    """

    rotation: np.ndarray | None = field(default=None, compare=False)
    air: Air | None = None
    horizon_offset_deg: float = 0.0
    delta_t_z: float = 0.0
    limb_darkening_u: float | None = None


def split_settings(
    settings: dict, window: WindowOptions | None = None, scan: ScanOptions | None = None
) -> tuple[WindowOptions, ScanOptions]:
    """Keyword settings (e.g. ``samples=200, parts=4``) laid over window and scan options, both checked.

    >>> w, s = split_settings({"samples": 200, "parts": 4})
    >>> (w.samples, w.resolution_deg, s.parts)
    (200, 0.05, 4)
    """
    from dataclasses import fields, replace

    window = window if window is not None else WindowOptions()
    scan = scan if scan is not None else ScanOptions()
    w_names = {f.name for f in fields(WindowOptions)}
    s_names = {f.name for f in fields(ScanOptions)}
    unknown = sorted(set(settings) - w_names - s_names)
    if unknown:
        raise TypeError(f"unknown setting {unknown[0]!r}; settings are {', '.join(sorted(w_names | s_names))}")
    window = replace(window, **{k: v for k, v in settings.items() if k in w_names})
    scan = replace(scan, **{k: v for k, v in settings.items() if k in s_names})
    window, scan = window.check(), scan.check()
    return window.for_body(scan.body), scan
