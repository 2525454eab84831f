"""What the engine returns: plain dataclasses that the reports and studies present.

Dates are written with astronomical year numbering (``"-3199-11-03"`` is
3200 BC November 3) in the calendar named beside them; ``date`` is the day at
the site in local apparent solar time, which stays meaningful when ΔT is
uncertain by hours.  Instants are Julian dates: ``_jd_ut`` (UT1) or ``_jd_tt``.
"""

from __future__ import annotations

from dataclasses import dataclass, field

import numpy as np

__all__ = ["DivisionLight", "LightEvent", "LightMap", "ScanResult", "ScanSettings", "YearScan"]


@dataclass(frozen=True)
class LightEvent:
    """One interval during which sunlight reaches the target (by the chosen criterion)."""

    date: str  # day at the site, local apparent solar time, astronomical year numbering
    calendar: str  # "julian" or "gregorian"
    start_jd_ut: float
    end_jd_ut: float
    peak_jd_ut: float
    start_local_apparent: str  # "HH:MM" local apparent solar time
    end_local_apparent: str
    duration_min: float
    peak_area_m2: float  # lit target area at the peak, m²
    peak_fraction: float  # lit area / target area at the peak, 0..1
    sun_azimuth_deg: float  # at the peak, from true north clockwise
    sun_altitude_deg: float  # at the peak, apparent (refracted)
    nearest_division: str  # name of the nearest division of the year
    offset_days: float  # event date minus that division's instant, days (negative = before)
    delta_t_s: float
    delta_t_sigma_s: float
    start_civil: str | None = None  # ISO 8601 with UTC offset in the site's zone (modern dates only)
    end_civil: str | None = None
    ut_date_uncertain: bool = False  # ΔT's σ could move the UT calendar date


@dataclass(frozen=True)
class DivisionLight:
    """The date range around one division of the year during which light reaches the target."""

    scheme: str
    index: int
    name: str
    jd_tt: float
    date: str
    first_date: str | None  # None when no light near this division
    last_date: str | None
    days: int  # days with light in the run of days around the division
    first_offset_days: float | None = None
    last_offset_days: float | None = None


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
class YearScan:
    """Every light event in one year and the per-division summary."""

    year: int  # astronomical numbering
    calendar: str
    source: str  # Sun source used, e.g. "JPL DE421 (skyfield)" or "VSOP87D (Bretagnon & Francou 1988)"
    events: list[LightEvent]
    divisions: list[DivisionLight]
    light_map: LightMap | None = None
    notes: list[str] = field(default_factory=list)


@dataclass(frozen=True)
class ScanSettings:
    """How a scan was run, reported beside its results."""

    criterion: str  # "first-gleam", "half-disc" or "full-disc"
    scheme: str
    parts: int
    samples: int
    seed: int
    window_resolution_deg: float
    refraction: str | None
    source: str
    delta_t_override_s: float | None = None


@dataclass(frozen=True)
class ScanResult:
    """A scan over one or more years for one scene."""

    scene: str
    settings: ScanSettings
    target_area_m2: float
    years: list[YearScan]
    notes: list[str] = field(default_factory=list)
