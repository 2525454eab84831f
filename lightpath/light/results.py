"""What the engine returns: plain dataclasses of numbers that the studies, reports and commands present.

Days are **local apparent days** at the site, as integer Julian day numbers (the day whose noon
is local apparent noon; :func:`lightpath.light.runs.local_apparent_day_number`); ``calendar`` names the
calendar a date made from them is shown in.  Instants are Julian dates: ``_jd_ut`` (UT1) or
``_jd_tt``; times of day are hours of local apparent solar time (``_local_apparent_h``, 0..24).
Nothing here is a formatted string: :mod:`lightpath.present` makes the words.
"""

from __future__ import annotations

from dataclasses import dataclass, field

import numpy as np

from lightpath.sky.tables import Tabular

__all__ = ["DivisionLight", "LightEvent", "LightMap", "ScanResult", "ScanSettings", "YearScan"]


@dataclass(frozen=True)
class LightEvent(Tabular):
    """One interval during which sunlight (or moonlight, ``body`` "moon") reaches the target (by the criterion).

    ``division`` is the division of the year that the event's light run belongs to
    (:func:`lightpath.light.runs.assign_runs`) and ``offset_days`` the event's day minus that division's day.
    """

    _day_columns = ("day", "division_day")

    day: int  # local apparent day at the site (Julian day number)
    calendar: str  # "julian" or "gregorian": the calendar the day is shown in
    start_jd_ut: float
    end_jd_ut: float
    peak_jd_ut: float
    start_local_apparent_h: float  # local apparent solar time, hours 0..24
    end_local_apparent_h: float
    peak_local_apparent_h: float
    duration_min: float
    peak_area_m2: float  # lit target area at the peak, m²
    peak_fraction: float  # lit area / target area at the peak, 0..1
    sun_azimuth_deg: float  # at the peak, from true north clockwise
    sun_altitude_deg: float  # at the peak, apparent (refracted)
    division: str  # the division the light run belongs to
    division_day: int  # that division's local apparent day
    offset_days: int  # day − division_day (negative = before)
    delta_t_s: float
    delta_t_sigma_s: float
    ut_date_uncertain: bool = False  # ΔT's σ (±2σ) could move the UT calendar date of this event
    # moonlight (``body`` "moon"): sun_azimuth_deg is then nan and sun_altitude_deg the Sun's (below the gate)
    body: str = "sun"  # whose light: "sun" or "moon"
    moon_azimuth_deg: float | None = None  # the Moon at the peak, from true north clockwise
    moon_altitude_deg: float | None = None  # apparent (refracted)
    moon_phase_angle_deg: float | None = None  # Sun–Moon–Earth at the peak, 0 at full Moon
    moon_illuminated_fraction: float | None = None  # 0..1 (Meeus 1998 eq. 48.1)
    moon_relative_brightness: float | None = None  # against the full Moon (Krisciunas & Schaefer 1991 eq. 20)


@dataclass(frozen=True)
class DivisionLight(Tabular):
    """The light runs around one division of the year (days are local apparent day numbers)."""

    _day_columns = ("day", "first_day", "last_day")

    scheme: str
    index: int
    name: str
    jd_tt: float  # the division's instant
    day: int  # its local apparent day
    calendar: str
    first_day: int | None  # first lit day of its runs (None when no light belongs to it)
    last_day: int | None
    days: int  # lit days in its runs
    first_offset_days: int | None = None  # first_day − day
    last_offset_days: int | None = None
    nearest_offset_days: int | None = None  # the lit day nearest the division's day, minus day


@dataclass(frozen=True)
class LightMap:
    """Lit target area by day and local apparent time, for the light-calendar figure.

    ``area_m2[i, j]`` is the lit area on day ``day_jd_ut[i]`` (UT at local apparent
    midnight) at local apparent time ``minutes[j]`` (minutes after midnight).
    """

    day_jd_ut: np.ndarray
    minutes: np.ndarray
    area_m2: np.ndarray


@dataclass(frozen=True)
class YearScan(Tabular):
    """Every light event in one year and the per-division summary."""

    _tables = ("events", "divisions")

    year: int  # astronomical numbering
    calendar: str
    source: str  # Sun source used, e.g. "JPL DE421 (skyfield)" or "VSOP87D (Bretagnon & Francou 1988)"
    events: list[LightEvent]
    divisions: list[DivisionLight]
    light_map: LightMap | None = None
    notes: list[str] = field(default_factory=list)


@dataclass(frozen=True)
class ScanSettings(Tabular):
    """How a scan was run, reported beside its results."""

    criterion: str  # "first-gleam", "half-disc" or "full-disc"
    scheme: str
    parts: int
    samples: int
    seed: int
    resolution_deg: float  # the sky window's cell size, degrees
    refraction: str | None
    source: str
    delta_t_s: float | None = None  # a fixed ΔT, or None for the model
    step_min: float = 1.0
    day_convention: str = "local apparent day"
    body: str = "sun"  # whose light: "sun" or "moon"
    sun_below_deg: float | None = None  # moonlight: the Sun's altitude gate, degrees (None for sunlight)
    min_illuminated_fraction: float | None = None  # moonlight: the least illuminated fraction (None for sunlight)


@dataclass(frozen=True)
class ScanResult(Tabular):
    """A scan over one or more years for one scene."""

    _tables = ("events", "divisions")

    scene: str
    settings: ScanSettings
    target_area_m2: float
    years: list[YearScan]
    notes: list[str] = field(default_factory=list)

    def _table_rows(self, table):
        """Every year's rows, each with its ``year`` (astronomical numbering)."""
        return [({"year": y.year}, row) for y in self.years for row in getattr(y, table)]
