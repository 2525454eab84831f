"""Quarter days (equinoxes and solstices), season lengths and half-years, for any year −10000…+2999.

A quarter day is the instant at which the Sun's **apparent geocentric ecliptic longitude of date** is
0° (March equinox), 90° (June solstice), 180° (September equinox) or 270° (December solstice).  Instants
are found by a vectorized Newton iteration on :func:`lightpath.sky.sun.geocentric_sun` over all requested
years at once, to 1e-8 day; their accuracy is that of the Sun's longitude (1″ of longitude is
about 24 s of time).

Which year a quarter day belongs to
-----------------------------------
The quarter days of year ``Y`` (astronomical numbering, 0 = 1 BC) are the four that fall in year ``Y`` of
the **proleptic Gregorian** calendar.  Over −10000…+3000 the Gregorian calendar keeps each quarter day
within a few days of its present date (March 20, June 21, September 22/23, December 21/22; the test suite
checks that every one falls inside its Gregorian year), so each year has exactly one of each and the
definition does not depend on the calendar chosen for printing.  In the Julian calendar, which drifts a
day in about 128 years against the seasons, the same instant can carry a date in year ``Y + 1``: the
December solstice of year ``Y`` is dated in January (or later) of ``Y + 1`` (Julian) before about 1200 BC
(the change-over is spread over a few decades by the leap-year cycle), and in 10,000 BC the Julian dates
of all four run about 80 days later than today's.

Seasons and half-years of year ``Y`` run from the December solstice of ``Y − 1`` to the December solstice
of ``Y``: ``december_to_march`` (Dec ``Y − 1`` → March ``Y``), ``march_to_june``, ``june_to_september``,
``september_to_december``; ``december_to_june_days`` (Dec ``Y − 1`` → June ``Y``) and
``june_to_december_days`` (June ``Y`` → Dec ``Y``).

>>> q = quarter_days(1962)
>>> round(float(q.june_solstice_jd_tt), 4)      # Meeus (1998) Example 27.a gives JDE 2437837.39245 (±1 min)
2437837.3921
>>> h = half_years([-3999, 2000])
>>> h.december_to_june_days.round(1).tolist(), h.june_to_december_days.round(1).tolist()
([187.0, 181.8], [178.3, 183.5])

References
----------
Meeus, J. (1998). *Astronomical Algorithms*, 2nd ed., Willmann-Bell, ch. 27 "Equinoxes and Solstices"
(definition; Example 27.a; the correction step Δ = 58 sin(k·90° − λ) days shows the rate, ≈ 1°/day).
"""

from __future__ import annotations

from collections.abc import Callable
from dataclasses import dataclass

import numpy as np
from numpy.typing import ArrayLike, NDArray

from lightpath.errors import InputError
from lightpath.sky.calendar import julian_day

__all__ = [
    "PROGRESS_CHUNK_YEARS",
    "QUARTER_LONGITUDES_DEG",
    "QUARTER_NAMES",
    "YEAR_MAX",
    "YEAR_MIN",
    "HalfYears",
    "QuarterDays",
    "SeasonLengths",
    "concrete_source",
    "half_years",
    "longitude_rate_deg_per_day",
    "opening_december_solstice",
    "quarter_days",
    "season_lengths",
    "solar_longitude_instant",
    "year_span_source",
]

#: Supported years (astronomical numbering, inclusive).  The Sun sources cover Julian epochs −10000.0 …
#: +3000.0 (:mod:`lightpath.sky.sources`), i.e. from October of −10001 to January 9 of 3000 (Gregorian): the
#: December solstice that opens −10000 is inside, the quarter days of 3000 are not.
YEAR_MIN, YEAR_MAX = -10000, 2999

#: Names of the quarter days in the order of the calendar year, and their apparent longitudes (degrees).
QUARTER_NAMES = ("march_equinox", "june_solstice", "september_equinox", "december_solstice")
QUARTER_LONGITUDES_DEG = (0.0, 90.0, 180.0, 270.0)

# Starting guesses: the present-day dates (proleptic Gregorian) of the quarter days, month and day.
_GUESS_GREGORIAN = ((3, 20.5), (6, 21.5), (9, 23.0), (12, 21.5))
# Kepler's second law for the Earth–Moon barycentre: n·a²·√(1−e²), degrees/day·au² (Gauss k = 0.01720209895
# rad/day; a = 1.000001 au, e = 0.0167, Meeus 1998 ch. 25), and the general precession (50.29″/yr, Meeus ch. 21).
_KEPLER_RATE_AU2 = float(np.degrees(0.01720209895) * 1.000001**2 * np.sqrt(1.0 - 0.0167**2))
_PRECESSION_DEG_PER_DAY = 50.29 / 3600.0 / 365.25
# Stop once a Newton step is below this (days): with the rate good to 6e-4 the error left is < 1e-8 day.
_STEP_TOLERANCE_DAYS = 1e-5
_MAX_STEPS = 12
# Long runs of years: solve every _ANCHOR_STEP_YEARS-th year first and interpolate the rest's guesses.
_ANCHOR_STEP_YEARS = 32
_TROPICAL_YEAR_DAYS = 365.2422  # only for starting guesses

#: Years solved per chunk when :func:`quarter_days` reports progress.
PROGRESS_CHUNK_YEARS = 1000


def _geocentric_longitude_deg(jd_tt: NDArray, source: str) -> tuple[NDArray, NDArray, str]:
    from lightpath.sky.sun import geocentric_sun

    sun = geocentric_sun(jd_tt, source=source)
    lon = np.asarray(sun.ecliptic_longitude_deg, dtype=float)
    return lon, np.asarray(sun.distance_au, dtype=float), str(sun.source)


def longitude_rate_deg_per_day(distance_au: ArrayLike) -> NDArray:
    """The Sun's rate in apparent longitude of date (degrees/day) at a distance, from Kepler's second law.

    dλ/dt = n·a²·√(1 − e²) / r² + p, with n the Gaussian mean motion (0.98560769°/day), a = 1.000001 au,
    e = 0.0167 and p the general precession in longitude (50.29″ per Julian year).  Within 6e-4 of the
    true rate (measured against central differences of :func:`~lightpath.sky.sun.geocentric_sun` over a
    year at J2000, 3000 BC and 10,000 BC; the Earth's monthly swing about the Earth–Moon barycentre is the
    largest neglected part): Newton steps with it shrink the error ~1700-fold each.

    >>> round(float(longitude_rate_deg_per_day(0.98329)), 4), round(float(longitude_rate_deg_per_day(1.01671)), 4)
    (1.0193, 0.9534)

    References
    ----------
    Gauss's constant k = 0.01720209895 rad/day (IAU 1976); Meeus (1998) ch. 25 (e, a), ch. 21 (precession).
    """
    r = np.asarray(distance_au, dtype=float)
    return _KEPLER_RATE_AU2 / (r * r) + _PRECESSION_DEG_PER_DAY


def concrete_source(jd_tt: ArrayLike, source: str = "auto") -> str:
    """The source that ``"auto"`` picks for this whole set of instants (``"jpl"`` or ``"vsop87"``).

    Iterations evaluate the Sun on shrinking subsets of instants; fixing the source once keeps every
    evaluation of one request on the same source.  Other values are returned unchanged.

    >>> concrete_source([2451545.0]), concrete_source([0.0]), concrete_source([0.0], "jpl")
    ('jpl', 'vsop87', 'jpl')
    """
    if source != "auto":
        return source
    from lightpath.sky.sources import choose_source

    return choose_source(np.asarray(jd_tt, dtype=float), "auto").kind


def _wrap180(x: NDArray) -> NDArray:
    return np.mod(np.asarray(x) + 180.0, 360.0) - 180.0


def solar_longitude_instant(
    longitude_deg: ArrayLike, jd_tt_near: ArrayLike, source: str = "auto"
) -> tuple[NDArray, str]:
    """Instants (JD TT) when the Sun's apparent geocentric longitude of date equals ``longitude_deg``.

    Parameters
    ----------
    longitude_deg : target apparent ecliptic longitude(s) of date, degrees.
    jd_tt_near : starting instant(s), JD TT (days), within ~±60 days of the wanted one (the nearest
        crossing is found); broadcasts with ``longitude_deg``.
    source : Sun position source passed to :func:`lightpath.sky.sun.geocentric_sun`.

    Returns
    -------
    (jd_tt, source_used): array of instants (days; the last Newton step was below 1e-5 day, which leaves
    an error below 1e-8 day) and the source's name.

    Newton's method on all targets at once, with the rate from :func:`longitude_rate_deg_per_day`;
    converged elements drop out of later evaluations.

    >>> jd, _ = solar_longitude_instant(90.0, 2437837.0)
    >>> round(float(jd), 3)
    2437837.392
    """
    target = np.asarray(longitude_deg, dtype=float)
    t = np.asarray(jd_tt_near, dtype=float)
    target, t = np.broadcast_arrays(target, t)
    shape = t.shape
    target, t = target.reshape(-1).copy(), t.reshape(-1).copy()
    source = concrete_source(t, source)
    active = np.arange(t.size)
    used = ""
    for _ in range(_MAX_STEPS):
        if active.size == 0:
            break
        lon, dist, used = _geocentric_longitude_deg(t[active], source)
        step = -_wrap180(lon - target[active]) / longitude_rate_deg_per_day(dist)  # Newton step
        t[active] += step
        active = active[np.abs(step) >= _STEP_TOLERANCE_DAYS]
    else:  # pragma: no cover - converges in 2-4 steps from any guess within weeks
        if active.size:
            raise RuntimeError("solar_longitude_instant: no convergence")
    return t.reshape(shape), used


def _check_years(years: ArrayLike, what: str = "year") -> NDArray:
    y = np.asarray(years)
    if y.dtype.kind == "f":
        if not np.all(np.isfinite(y)) or np.any(y != np.round(y)):
            raise InputError(f"{what}: {years!r} must be whole years (astronomical numbering, 0 = 1 BC)")
    elif y.dtype.kind not in "iu":
        raise InputError(f"{what}: {years!r} must be whole years (astronomical numbering, 0 = 1 BC)")
    y = y.astype(np.int64)
    if y.size and (y.min() < YEAR_MIN or y.max() > YEAR_MAX):
        bad = int(y.min()) if y.min() < YEAR_MIN else int(y.max())
        raise InputError(
            f"{what}: {bad} is outside the supported years {YEAR_MIN}..{YEAR_MAX} (astronomical numbering)"
        )
    return y


@dataclass(frozen=True)
class QuarterDays:
    """The four quarter days of each year (instants in JD TT, days).

    Attributes
    ----------
    years : the years asked for (astronomical numbering).
    march_equinox_jd_tt, june_solstice_jd_tt, september_equinox_jd_tt, december_solstice_jd_tt :
        arrays shaped like ``years``.
    source : name of the Sun position source used.
    """

    years: NDArray
    march_equinox_jd_tt: NDArray
    june_solstice_jd_tt: NDArray
    september_equinox_jd_tt: NDArray
    december_solstice_jd_tt: NDArray
    source: str

    def jd_tt(self, name: str) -> NDArray:
        """The instants of the quarter day called ``name`` (one of :data:`QUARTER_NAMES`)."""
        if name not in QUARTER_NAMES:
            raise InputError(f"quarter day {name!r} is not one of {', '.join(QUARTER_NAMES)}")
        return getattr(self, f"{name}_jd_tt")


def _gregorian_guesses(years: NDArray) -> NDArray:
    month = np.array([m for m, _ in _GUESS_GREGORIAN])
    day = np.array([d for _, d in _GUESS_GREGORIAN])
    return julian_day(years[:, None], month[None, :], day[None, :], calendar="gregorian")


def _quarter_days_unchecked(years: NDArray, source: str) -> QuarterDays:
    y = np.asarray(years, dtype=np.int64)
    flat = y.reshape(-1)
    target = np.broadcast_to(np.array(QUARTER_LONGITUDES_DEG), (flat.size, 4))
    guess = _gregorian_guesses(flat)
    if flat.size:
        source = concrete_source(guess, source)
        lo, hi = int(flat.min()), int(flat.max())
        anchors = np.unique(np.append(np.arange(lo, hi + 1, _ANCHOR_STEP_YEARS), hi))
        if anchors.size * 4 < flat.size:  # long runs: solve anchor years, interpolate the others' guesses
            jd_a, _ = solar_longitude_instant(target[: anchors.size], _gregorian_guesses(anchors), source=source)
            guess = np.column_stack([np.interp(flat, anchors, jd_a[:, i]) for i in range(4)])
    jd, used = solar_longitude_instant(target, guess, source=source)
    cols = [jd[:, i].reshape(y.shape) for i in range(4)]
    cols = [c[()] if c.ndim == 0 else c for c in cols]
    return QuarterDays(y[()] if y.ndim == 0 else y, *cols, source=used)


def quarter_days(
    years: ArrayLike, source: str = "auto", progress: Callable[[int, int], None] | None = None
) -> QuarterDays:
    """Equinoxes and solstices of the given years: instants (JD TT) when the apparent longitude is 0/90/180/270°.

    Parameters
    ----------
    years : year or array of years, astronomical numbering (0 = 1 BC, −2599 = 2600 BC), −10000…+2999.
        The quarter days of ``Y`` are those falling in year ``Y`` of the proleptic Gregorian calendar
        (see the module notes for the Julian calendar).
    source : Sun position source for :func:`lightpath.sky.sun.geocentric_sun` (``"auto"``, ``"jpl"``, ``"vsop87"``).
    progress : optional ``progress(done, total)`` callback, in years; when given, the years are solved in
        chunks of :data:`PROGRESS_CHUNK_YEARS` (same results, the source is chosen once for all of them).

    Returns
    -------
    :class:`QuarterDays` with arrays shaped like ``years`` (scalars for a scalar year).

    Examples
    --------
    >>> q = quarter_days([2000, 2001])
    >>> (q.december_solstice_jd_tt - q.june_solstice_jd_tt).round(2).tolist()
    [183.49, 183.49]

    References
    ----------
    Meeus (1998) ch. 27; the Sun's longitude from :mod:`lightpath.sky.sun`.
    """
    y = _check_years(years)
    if progress is None or y.size <= PROGRESS_CHUNK_YEARS:
        q = _quarter_days_unchecked(y, source)
        if progress is not None:
            progress(y.size, y.size)
        return q
    flat = y.reshape(-1)
    source = concrete_source(_gregorian_guesses(np.array([flat.min(), flat.max()])), source)
    cols: list[list[NDArray]] = [[], [], [], []]
    used = ""
    for lo in range(0, flat.size, PROGRESS_CHUNK_YEARS):
        part = _quarter_days_unchecked(flat[lo : lo + PROGRESS_CHUNK_YEARS], source)
        for i, name in enumerate(QUARTER_NAMES):
            cols[i].append(np.atleast_1d(part.jd_tt(name)))
        used = part.source
        progress(min(lo + PROGRESS_CHUNK_YEARS, flat.size), flat.size)
    return QuarterDays(y, *(np.concatenate(c).reshape(y.shape) for c in cols), source=used)


@dataclass(frozen=True)
class SeasonLengths:
    """Lengths (days) of the four seasons of each year, between consecutive quarter days.

    ``december_to_march_days`` runs from the December solstice of ``Y − 1`` to the March equinox of ``Y``;
    the other three lie inside year ``Y``.  Northern names: spring = ``march_to_june``, summer =
    ``june_to_september``, autumn = ``september_to_december``, winter = ``december_to_march``.
    """

    years: NDArray
    december_to_march_days: NDArray
    march_to_june_days: NDArray
    june_to_september_days: NDArray
    september_to_december_days: NDArray
    source: str


@dataclass(frozen=True)
class HalfYears:
    """Solstice-to-solstice halves (days): Dec ``Y − 1`` → June ``Y`` and June ``Y`` → Dec ``Y``."""

    years: NDArray
    december_to_june_days: NDArray
    june_to_december_days: NDArray
    source: str


def _with_previous_december(years: ArrayLike, source: str) -> tuple[NDArray, QuarterDays, NDArray]:
    y = _check_years(years)
    if y.size:
        source = year_span_source(int(y.min()), int(y.max()), source)
    q = _quarter_days_unchecked(y, source)
    return y, q, _opening_december(q, source)


def _opening_december(q: QuarterDays, source: str) -> NDArray:
    # The December solstice of Y - 1 (for YEAR_MIN it lies in YEAR_MIN - 1, still inside the Sun's span,
    # whose March equinox is not): one more Newton solve from a guess one tropical year before Y's.
    guess = np.asarray(q.december_solstice_jd_tt) - _TROPICAL_YEAR_DAYS  # within minutes of the answer
    prev, _ = solar_longitude_instant(np.full(np.shape(guess), 270.0), guess, source=source)
    return np.asarray(prev)


def opening_december_solstice(years: ArrayLike, source: str = "auto") -> NDArray:
    """The December solstice of ``Y − 1`` that opens each year ``Y`` (JD TT), for ``Y`` in −10000…+2999.

    >>> q, d = quarter_days(2000), opening_december_solstice(2000)
    >>> round(float(q.march_equinox_jd_tt - d), 2)
    88.99
    """
    _, _, prev = _with_previous_december(years, source)
    return prev[()] if prev.ndim == 0 else prev


def year_span_source(first_year: int, last_year: int, source: str = "auto") -> str:
    """The concrete source for everything from the December solstice of ``first_year − 1`` to the end of
    ``last_year`` (see :func:`concrete_source`).

    >>> year_span_source(2000, 2000), year_span_source(-2599, -2599)
    ('jpl', 'vsop87')
    """
    span = julian_day(
        np.array([int(first_year) - 1, int(last_year)]), np.array([12, 12]), np.array([1.0, 31.0]), calendar="gregorian"
    )
    return concrete_source(span, source)


def season_lengths(years: ArrayLike, source: str = "auto") -> SeasonLengths:
    """The four season lengths (days) of each year; see :class:`SeasonLengths` for which quarter days bound them.

    >>> s = season_lengths(2000)
    >>> [round(float(v), 2) for v in (s.march_to_june_days, s.june_to_september_days,
    ...                                s.september_to_december_days, s.december_to_march_days)]
    [92.76, 93.65, 89.84, 88.99]
    """
    y, q, prev_dec = _with_previous_december(years, source)
    return SeasonLengths(
        y,
        q.march_equinox_jd_tt - prev_dec,
        q.june_solstice_jd_tt - q.march_equinox_jd_tt,
        q.september_equinox_jd_tt - q.june_solstice_jd_tt,
        q.december_solstice_jd_tt - q.september_equinox_jd_tt,
        q.source,
    )


def half_years(years: ArrayLike, source: str = "auto") -> HalfYears:
    """December-to-June and June-to-December half-years (days) of each year.

    ``december_to_june_days`` runs from the December solstice of ``Y − 1`` to the June solstice of ``Y``,
    ``june_to_december_days`` from the June to the December solstice of ``Y``.

    >>> h = half_years(1246)
    >>> abs(float(h.december_to_june_days - h.june_to_december_days)) < 0.2
    True
    """
    y, q, prev_dec = _with_previous_december(years, source)
    return HalfYears(y, q.june_solstice_jd_tt - prev_dec, q.december_solstice_jd_tt - q.june_solstice_jd_tt, q.source)
