"""The lunar year's structure: the 18.6-year nodal cycle, standstill seasons and their extreme declinations.

The Moon's orbit is tilted by i ≈ 5.145° to the ecliptic and its node regresses once in 18.61 years.
When the ascending node sits at the March equinox (mean node longitude 0°) the Moon's monthly swing in
declination is widest, reaching about ±(ε + i) — the **major standstill**; half a cycle later (node at
180°) it is narrowest, about ±(ε − i) — the **minor standstill** (ε the obliquity; common values, no
published source needed).  Each month the Moon reaches a northern and a southern extreme; near a
standstill those extremes change slowly for a year or two: that span is the **standstill season**.

:func:`standstill_seasons` finds, for a span of years,

* the instants of the mean node at 0° and 180° of the long-term theory (:mod:`lightpath.sky.elp`);
* every monthly extreme of the geocentric apparent declination (true equator of date; sampled every
  6 hours over ±2.5 years of each node instant, refined on a 15-minute grid and a parabola through the
  three best points), from :func:`lightpath.sky.moon.geocentric_moon` (JPL DE421 or the long-term theory);
* for each of the four seasons of a cycle (major north, major south, minor north, minor south) the
  extreme reached (the largest northern or southern declination at a major standstill, the smallest at
  a minor one), when, and the season: the first and last monthly extremes within ``band_deg`` of it
  (0.5° by default: our choice; the envelope of the monthly extremes moves by about i·(1 − cos Ω), so
  0.5° spans roughly ±1.3 years about the node instant);
* ΔT and its σ at the extreme, and ``moon_shift_deg``: how far the Moon moves against the Sun in σ.
  The extreme declination and the rise/set azimuths for a declination depend on TT only; ΔT's σ moves
  the clock (UT) time of the extreme and which moonrise falls nearest it.

:func:`extreme_rise_set_azimuths` gives the moonrise and moonset azimuths of those declinations on a
site's horizon (flat or a skyline profile) with the Moon's parallax and semidiameter at the extreme.

>>> s = standstill_seasons(2024, 2025)
>>> [(x.kind, x.direction) for x in s]
[('major', 'north'), ('major', 'south')]
>>> round(s[0].extreme_declination_deg, 1), round(s[1].extreme_declination_deg, 1)
(28.7, -28.7)

References
----------
Meeus, J. (1998). *Astronomical Algorithms*, 2nd ed., ch. 52 (maximum declinations of the Moon).
Chapront, J., & Francou, G. (2003). *A&A* 404, 735–742 (ELP/MPP02 mean node).
Morrison, L. V., & Stephenson, F. R. (2004). *J. Hist. Astron.* 35, 327–336 (ΔT and its σ).
"""

from __future__ import annotations

from dataclasses import dataclass

import erfa
import numpy as np
from numpy.typing import NDArray

from lightpath.errors import InputError
from lightpath.sky import deltat
from lightpath.sky.elp import mean_node_of_date_deg
from lightpath.sky.horizon import HorizonProfile
from lightpath.sky.moon import MOON_SPAN_JULIAN_YEARS, MOON_SYNODIC_RATE_DEG_PER_H, geocentric_moon
from lightpath.sky.riseset import rise_set_azimuths

__all__ = [
    "MAX_SPAN_YEARS",
    "NODAL_PERIOD_DAYS",
    "StandstillSeason",
    "extreme_rise_set_azimuths",
    "node_instants",
    "standstill_seasons",
]

#: Mean regression period of the lunar node: 6798.38 days = 18.61 years (Meeus 1998 ch. 47, from memory).
NODAL_PERIOD_DAYS = 6798.38
#: Longest span one call may ask for, years.
MAX_SPAN_YEARS = 600
_YEAR_D = 365.25
_WINDOW_D = 2.5 * _YEAR_D  # monthly extremes searched within this of each node instant
_COARSE_D = 0.25
_FINE_D = 1.0 / 96.0
_MARGIN_YEARS = 3.0  # node instants need ±2.5 years of Moon inside its span
_EARTH_RADIUS_KM = 6378.137
_MOON_RADIUS_KM = 1737.4


@dataclass(frozen=True)
class StandstillSeason:
    """One standstill season: ``kind`` ``"major"``/``"minor"``, ``direction`` ``"north"``/``"south"``.

    node_jd_tt : the mean node at 0° (major) or 180° (minor), TT.
    start_jd_tt, end_jd_tt : first and last monthly extremes within ``band_deg`` of the season's extreme.
    extreme_jd_tt, extreme_declination_deg : the season's extreme (geocentric apparent, true equator of date).
    months : number of monthly extremes in the season.
    distance_km, horizontal_parallax_deg, semidiameter_deg : the Moon at the extreme (geocentric).
    delta_t_s, delta_t_sigma_s : ΔT and its 1σ at the extreme, seconds.
    moon_shift_deg : the Moon's mean motion against the Sun during σ (its place at a given local time).
    source : where the Moon came from.
    """

    kind: str
    direction: str
    node_jd_tt: float
    start_jd_tt: float
    end_jd_tt: float
    extreme_jd_tt: float
    extreme_declination_deg: float
    months: int
    band_deg: float
    distance_km: float
    horizontal_parallax_deg: float
    semidiameter_deg: float
    delta_t_s: float
    delta_t_sigma_s: float
    moon_shift_deg: float
    source: str


def _jd_of_year(year: float) -> float:
    return float(sum(erfa.epj2jd(year)))


def node_instants(first_year: int, last_year: int) -> list[tuple[str, float]]:
    """(``"major"``/``"minor"``, TT Julian date) of the mean node at 0°/180° from Jan 1 of ``first_year`` to
    Dec 31 of ``last_year`` (Julian epochs, astronomical numbering), in time order.

    >>> [(k, round(float(deltat.year_of_jd(j)), 1)) for k, j in node_instants(2000, 2030)]
    [('major', 2006.5), ('minor', 2015.8), ('major', 2025.1)]
    """
    lo, hi = _jd_of_year(first_year), _jd_of_year(last_year + 1)
    grid = np.arange(lo - 30.0, hi + 30.0, 20.0)
    node = mean_node_of_date_deg(grid)
    out: list[tuple[str, float]] = []
    for kind, target in (("major", 0.0), ("minor", 180.0)):
        rel = (node - target + 180.0) % 360.0 - 180.0  # decreasing through 0 (the node regresses)
        cross = np.nonzero((rel[:-1] > 0.0) & (rel[1:] <= 0.0))[0]
        for i in cross:
            a, b = grid[i], grid[i + 1]
            for _ in range(40):  # bisection to ~1e-10 day
                mid = 0.5 * (a + b)
                r = (float(mean_node_of_date_deg(mid)) - target + 180.0) % 360.0 - 180.0
                a, b = (mid, b) if r > 0.0 else (a, mid)
            t = 0.5 * (a + b)
            if lo <= t < hi:
                out.append((kind, t))
    return sorted(out, key=lambda kt: kt[1])


def _monthly_extremes(lo: float, hi: float, source: str) -> tuple[NDArray, NDArray, NDArray, str]:
    """Instants (TT), declinations (deg) and +1/−1 (north/south) of every monthly extreme in [lo, hi]."""
    t = np.arange(lo, hi, _COARSE_D)
    g = geocentric_moon(t, source)
    d = g.declination_deg
    is_max = (d[1:-1] > d[:-2]) & (d[1:-1] >= d[2:])
    is_min = (d[1:-1] < d[:-2]) & (d[1:-1] <= d[2:])
    idx = np.nonzero(is_max | is_min)[0] + 1
    sign = np.where(is_max[idx - 1], 1.0, -1.0)
    offsets = np.arange(-_COARSE_D, _COARSE_D + 0.5 * _FINE_D, _FINE_D)
    fine_t = t[idx][:, None] + offsets[None, :]
    fd = geocentric_moon(fine_t, source).declination_deg * sign[:, None]
    k = np.clip(np.argmax(fd, axis=1), 1, offsets.size - 2)
    rows = np.arange(idx.size)
    y0, y1, y2 = fd[rows, k - 1], fd[rows, k], fd[rows, k + 1]
    denom = y0 - 2.0 * y1 + y2
    x = np.where(denom != 0.0, 0.5 * (y0 - y2) / denom, 0.0)  # vertex of the parabola through three points
    jd = fine_t[rows, k] + x * _FINE_D
    dec = sign * (y1 - 0.25 * (y0 - y2) * x)
    return jd, dec, sign, g.source


def _check_span(first_year: int, last_year: int) -> None:
    lo, hi = MOON_SPAN_JULIAN_YEARS[0] + _MARGIN_YEARS, MOON_SPAN_JULIAN_YEARS[1] - _MARGIN_YEARS
    for option, year in (("--from", first_year), ("--to", last_year)):
        if not lo <= year <= hi:
            raise InputError(f"{option}: year {year} is outside {lo:g}..{hi:g} (astronomical numbering)")
    if last_year < first_year:
        raise InputError(f"--to: year {last_year} is before --from {first_year}")
    if last_year - first_year + 1 > MAX_SPAN_YEARS:
        raise InputError(f"--to: the span {first_year}..{last_year} is longer than {MAX_SPAN_YEARS} years")


def standstill_seasons(
    first_year: int, last_year: int, *, source: str = "auto", band_deg: float = 0.5
) -> list[StandstillSeason]:
    """The standstill seasons whose mean-node instant lies in ``first_year`` … ``last_year`` (Julian epochs,
    astronomical numbering, −2997…+2997, at most :data:`MAX_SPAN_YEARS`), in time order, each of the four
    kinds (major/minor × north/south) once per node instant.

    ``source``: as :func:`lightpath.sky.moon.moon_position` (``"auto"``: JPL DE421 where it covers the
    search window, else the long-term theory).  ``band_deg`` > 0: how close to the season's extreme a
    monthly extreme must come to count in the season.
    """
    _check_span(int(first_year), int(last_year))
    if not (np.isfinite(band_deg) and 0.0 < band_deg <= 5.0):
        raise InputError(f"--band: {band_deg!r} is outside 0..5 degrees")
    seasons: list[StandstillSeason] = []
    for kind, node_jd in node_instants(int(first_year), int(last_year)):
        jd, dec, sign, src = _monthly_extremes(node_jd - _WINDOW_D, node_jd + _WINDOW_D, source)
        for direction, s in (("north", 1.0), ("south", -1.0)):
            sel = sign == s
            t, a = jd[sel], dec[sel] * s  # a > 0: distance from the equator
            best = int(np.argmax(a) if kind == "major" else np.argmin(a))
            within = np.abs(a - a[best]) <= band_deg
            # the season: the run of consecutive months around the extreme within the band
            i0 = best
            while i0 > 0 and within[i0 - 1]:
                i0 -= 1
            i1 = best
            while i1 < a.size - 1 and within[i1 + 1]:
                i1 += 1
            g = geocentric_moon(t[best], source)
            dist = float(g.distance_km)
            sigma = float(deltat.delta_t_sigma_s(t[best]))
            seasons.append(
                StandstillSeason(
                    kind=kind,
                    direction=direction,
                    node_jd_tt=float(node_jd),
                    start_jd_tt=float(t[i0]),
                    end_jd_tt=float(t[i1]),
                    extreme_jd_tt=float(t[best]),
                    extreme_declination_deg=float(a[best] * s),
                    months=int(i1 - i0 + 1),
                    band_deg=float(band_deg),
                    distance_km=dist,
                    horizontal_parallax_deg=float(np.degrees(np.arcsin(_EARTH_RADIUS_KM / dist))),
                    semidiameter_deg=float(np.degrees(np.arcsin(_MOON_RADIUS_KM / dist))),
                    delta_t_s=float(deltat.delta_t_s(t[best])),
                    delta_t_sigma_s=sigma,
                    moon_shift_deg=sigma / 3600.0 * MOON_SYNODIC_RATE_DEG_PER_H,
                    source=src,
                )
            )
    return seasons


def extreme_rise_set_azimuths(
    seasons: list[StandstillSeason],
    latitude_deg: float,
    *,
    horizon: HorizonProfile | None = None,
    limb: str = "centre",
    refraction: str | None = "bennett1982",
    pressure_mbar: float = 1010.0,
    temperature_c: float = 10.0,
) -> tuple[NDArray, NDArray]:
    """Moonrise and moonset azimuths (degrees from true north) of each season's extreme declination on a
    flat horizon (``horizon=None``) or a skyline profile, with the Moon's parallax and semidiameter at the
    extreme (:func:`lightpath.sky.riseset.rise_set_azimuths`; the parallax lowers the Moon by π·cos h).
    nan where the Moon at that declination never crosses the skyline.
    """
    rises, sets = [], []
    for s in seasons:
        r, st = rise_set_azimuths(
            s.extreme_declination_deg,
            latitude_deg,
            horizon=horizon,
            limb=limb,  # type: ignore[arg-type]
            refraction=refraction,
            pressure_mbar=pressure_mbar,
            temperature_c=temperature_c,
            semidiameter_deg=s.semidiameter_deg,
            horizontal_parallax_deg=s.horizontal_parallax_deg,
        )
        rises.append(float(r))
        sets.append(float(st))
    return np.array(rises), np.array(sets)
