"""ΔT = TT − UT1, its uncertainty, and conversions between TT and UT.

ΔT comes from skyfield's built-in model, which joins three published pieces:

* 1973-01-02 … 2027-01-23: daily IERS values (``finals2000A``, measurements and
  the IERS predictions bundled with skyfield 1.55);
* 720 BC … 1973: the cubic splines of Morrison, Stephenson, Hohenkerk & Zawilski
  (2021), Table S15 (the 2020 addendum to Stephenson et al. 2016);
* beyond both ends: the long-term parabola of Stephenson, Morrison & Hohenkerk
  (2016), ΔT = −320 s + 32.5 s · ((year − 1825)/100)², joined to the splines by
  800-year connecting splines.

Its uncertainty σ is one continuous curve, each era from its own source:

* before AD 1200: σ = 0.8·t² s, t = (year − 1820)/100 (Morrison & Stephenson
  2004, stated for 1000 BC – AD 1200 and extrapolated before 1000 BC, where it
  reaches about half an hour at 3000 BC and about 3 h at 10,000 BC);
* AD 1200 – 1950: the uncertainties Espenak & Meeus (2006) tabulate (30 s at
  1200 down to 0.1 s at 1950), interpolated linearly; their 1200 node is taken
  from the formula (30.8 s, which they round to 30 s) so the two pieces meet;
* 1950 to the first IERS value (1973-01-02): 0.1 s, Espenak & Meeus's value at
  1950; from 1955 atomic time measures ΔT far better than that (Markowitz et
  al. 1958), so 0.1 s bounds it;
* IERS daily values (1973-01-02 … 2027-01-23): 0.1 s (our choice: it covers the
  IERS predictions a year ahead; measured values are better than 1 ms);
* after the last IERS value: 0.1 s plus the growth of the Morrison & Stephenson
  (2004) curve since then, 0.1 + 0.8·(t² − t_end²) s (our join: no published σ
  exists for future ΔT; 1.1 s by 2056, 2.9 s by 2100, 8.2 s by 2200).

The UT calendar date of an event is in doubt when UT ± 2σ straddles a UT
midnight (:func:`ut_date_uncertain`): an event at 09:04 UT keeps its date even
when σ is half an hour.

>>> from lightpath.sky.calendar import julian_day
>>> round(float(delta_t_s(2451545.0)), 1)   # J2000.0: ≈ 63.8 s (IERS)
63.8
>>> round(float(delta_t_sigma_s(2451545.0)), 1)
0.1
>>> jd_ut = julian_day(-2599, 3, [19 + 9.07 / 24, 19 + 0.67 / 24])   # 2600 BC, 09:04 and 00:40 UT
>>> [bool(v) for v in ut_date_uncertain(tt_from_ut(jd_ut))]   # 2σ of ΔT ≈ 52 min
[False, True]

References
----------
Morrison, L. V. & Stephenson, F. R. (2004). Historical values of the Earth's clock
error ΔT and the calculation of eclipses. *J. Hist. Astron.* 35, 327–336.

Stephenson, F. R., Morrison, L. V. & Hohenkerk, C. Y. (2016). Measurement of the
Earth's rotation: 720 BC to AD 2015. *Proc. R. Soc. A* 472, 20160404.

Morrison, L. V., Stephenson, F. R., Hohenkerk, C. Y. & Zawilski, M. (2021).
Addendum 2020 to 'Measurement of the Earth's rotation: 720 BC to AD 2015'.
*Proc. R. Soc. A* 477, 20200776.

Markowitz, W., Hall, R. G., Essen, L. & Parry, J. V. L. (1958). Frequency of
cesium in terms of ephemeris time. *Phys. Rev. Lett.* 1, 105–107.

Espenak, F. & Meeus, J. (2006). *Five Millennium Canon of Solar Eclipses:
−1999 to +3000*. NASA/TP-2006-214141.

Rhodes, B. (2019). Skyfield: high precision research-grade positions for planets
and Earth satellites generator. Astrophysics Source Code Library, ascl:1907.024.
"""

from __future__ import annotations

import functools
import warnings

import numpy as np
from numpy.typing import ArrayLike, NDArray

__all__ = [
    "DAY_S",
    "DELTA_T_SIGMA_NOTE",
    "DELTA_T_SOURCE",
    "IERS_SIGMA_S",
    "delta_t_s",
    "delta_t_sigma_s",
    "iers_span_jd_tt",
    "timescale",
    "tt_from_ut",
    "ut_date_uncertain",
    "ut_from_tt",
    "year_of_jd",
]

#: Seconds in a day.
DAY_S = 86400.0

#: The ΔT model used, in words (reported beside results).
DELTA_T_SOURCE = (
    "Stephenson, Morrison & Hohenkerk (2016) with the Morrison et al. (2021) splines for 720 BC-1973 "
    "and their long-term parabola beyond; IERS daily values 1973-2027 (skyfield 1.55 built-in)"
)

#: How σ is obtained, in words.
DELTA_T_SIGMA_NOTE = (
    "sigma = 0.8*t^2 s, t = (year - 1820)/100 (Morrison & Stephenson 2004) before AD 1200, stated for "
    "1000 BC-AD 1200 and extrapolated before; Espenak & Meeus (2006) uncertainties for AD 1200-1950; 0.1 s from "
    "1950 (Espenak & Meeus 2006; atomic time from 1955) and where IERS values exist (1973-2027); after them "
    "0.1 s plus the growth of the Morrison & Stephenson curve since the last IERS value"
)

#: σ where IERS daily values exist (seconds); our choice, see the module notes.
IERS_SIGMA_S = 0.1

# Espenak & Meeus (2006), table of ΔT with its uncertainty, AD 1200-1950 (from memory):
# year -> σ in seconds.  Between nodes σ is interpolated linearly.  The 1200 node is replaced by the
# Morrison & Stephenson (2004) formula's value there (30.75 s; the table rounds it to 30 s) so σ is continuous.
_EM2006_SIGMA_YEARS = np.array([1200.0, 1300.0, 1600.0, 1700.0, 1750.0, 1800.0, 1900.0, 1950.0])
_EM2006_SIGMA_S = np.array([30.0, 20.0, 20.0, 5.0, 2.0, 1.0, 1.0, 0.1])

#: Morrison & Stephenson (2004): σ ≈ 0.8 t² s, t in centuries from 1820.
_MS2004_SIGMA_S_PER_CY2 = 0.8
_MS2004_EPOCH_YEAR = 1820.0

# The UT date of an event is in doubt when UT ± this many σ of ΔT straddles a UT midnight.
_DATE_DOUBT_SIGMAS = 2.0


def _ms2004_sigma_s(year: NDArray) -> NDArray:
    t = (year - _MS2004_EPOCH_YEAR) / 100.0
    return _MS2004_SIGMA_S_PER_CY2 * t * t  # Morrison & Stephenson (2004), section 5


@functools.lru_cache(maxsize=1)
def timescale():
    """skyfield's built-in Timescale, loaded once (no file is read or downloaded)."""
    import skyfield_data
    from skyfield.api import Loader

    with warnings.catch_warnings():
        # skyfield-data warns that its finals2000A.all file is old; the built-in
        # timescale does not read that file, so the warning does not apply here.
        warnings.filterwarnings("ignore", message=r".*finals2000A\.all has expired.*", category=RuntimeWarning)
        path = skyfield_data.get_skyfield_data_path()
    return Loader(path, verbose=False).timescale(builtin=True)


def _out(a: NDArray) -> NDArray:
    return a[()] if a.ndim == 0 else a


def year_of_jd(jd: ArrayLike) -> NDArray:
    """Decimal year (Julian years of 365.25 days from J2000.0) of a Julian day.

    >>> float(year_of_jd(2451545.0))
    2000.0
    """
    jd = np.asarray(jd, dtype=np.float64)
    return _out(2000.0 + (jd - 2451545.0) / 365.25)


def iers_span_jd_tt() -> tuple[float, float]:
    """First and last instant (JD TT) of the IERS daily values inside the model."""
    table_tt = timescale().delta_t_table[0]
    return float(table_tt[0]), float(table_tt[-1])


def delta_t_s(jd_tt: ArrayLike) -> NDArray:
    """ΔT = TT − UT1 in seconds at the given instants (JD TT), any epoch.

    Parameters
    ----------
    jd_tt : Julian date(s) in TT (days); scalar or array; nan gives nan.

    Returns
    -------
    ΔT in seconds, float64, the shape of ``jd_tt``.

    Examples
    --------
    >>> from lightpath.sky.calendar import julian_day
    >>> dt = delta_t_s([julian_day(-500, 1, 1), julian_day(1000, 1, 1)])
    >>> [int(round(v, -1)) for v in dt]
    [16940, 1650]

    References
    ----------
    Stephenson, Morrison & Hohenkerk (2016); Morrison et al. (2021); IERS; via skyfield.
    """
    jd = np.asarray(jd_tt, dtype=np.float64)
    flat = np.atleast_1d(jd).ravel()
    out = np.full(flat.shape, np.nan)
    ok = np.isfinite(flat)
    if ok.any():
        out[ok] = np.asarray(timescale().delta_t_function(flat[ok]), dtype=np.float64)
    return _out(out.reshape(jd.shape))


def delta_t_sigma_s(jd_tt: ArrayLike) -> NDArray:
    """Uncertainty (1σ, seconds) of ΔT at the given instants (JD TT), continuous over all epochs.

    Morrison & Stephenson (2004) before AD 1200, Espenak & Meeus (2006) over AD 1200–1950, 0.1 s from
    1950 through the IERS values, and 0.1 s plus the Morrison & Stephenson growth after them; see the
    module notes and :data:`DELTA_T_SIGMA_NOTE`.

    >>> import numpy as np
    >>> from lightpath.sky.calendar import julian_day
    >>> [round(float(s)) for s in delta_t_sigma_s(julian_day(np.array([-2999, 0, 1600]), 1, 1))]
    [1858, 265, 20]
    >>> round(float(delta_t_sigma_s(julian_day(1965, 1, 1))), 2)
    0.1

    References
    ----------
    Morrison & Stephenson (2004), section 5; Espenak & Meeus (2006); Markowitz et al. (1958).
    """
    jd = np.asarray(jd_tt, dtype=np.float64)
    year = 2000.0 + (jd - 2451545.0) / 365.25
    first, last = iers_span_jd_tt()
    year_last = 2000.0 + (last - 2451545.0) / 365.25
    nodes = _EM2006_SIGMA_S.copy()
    nodes[0] = _ms2004_sigma_s(_EM2006_SIGMA_YEARS[0])  # the two pieces meet at AD 1200
    sigma = np.where(
        year < _EM2006_SIGMA_YEARS[0],
        _ms2004_sigma_s(year),  # Morrison & Stephenson (2004)
        np.interp(year, _EM2006_SIGMA_YEARS, nodes),  # Espenak & Meeus (2006); 0.1 s from 1950 on
    )
    after = jd > last
    growth = _ms2004_sigma_s(np.maximum(year, year_last)) - _ms2004_sigma_s(year_last)
    sigma = np.where(after, IERS_SIGMA_S + growth, sigma)  # our join: the M&S (2004) growth since the last value
    sigma = np.where((jd >= first) & (jd <= last), IERS_SIGMA_S, sigma)  # IERS daily values (our choice)
    sigma = np.where(np.isnan(jd), np.nan, sigma)
    return _out(np.asarray(sigma, dtype=np.float64))


def ut_date_uncertain(jd_tt: ArrayLike, delta_t_override_s: ArrayLike | None = None) -> NDArray:
    """True where the UT calendar date of the instant could change within ±2σ of ΔT (bool, shape of ``jd_tt``).

    UT = TT − ΔT moves with ΔT, so the date is in doubt only when UT − 2σ and
    UT + 2σ fall on different UT days (one of them across a midnight UT): an
    event at 09:04 UT is not in doubt when σ is 30 minutes; one at 00:40 UT is.
    With ``delta_t_override_s`` (ΔT fixed by the user) nothing is in doubt.

    >>> import numpy as np
    >>> from lightpath.sky.calendar import julian_day
    >>> jd_ut = julian_day(np.array([-2599, -2599, 2000]), 1, [1 + 9.07 / 24, 1 + 0.67 / 24, 1 + 0.67 / 24])
    >>> [bool(v) for v in ut_date_uncertain(tt_from_ut(jd_ut))]   # 09:04 and 00:40 UT in 2600 BC; AD 2000
    [False, True, False]

    References
    ----------
    Meeus (1998), ch. 7 (the civil day runs from midnight, JD + 0.5); σ from :func:`delta_t_sigma_s`.
    """
    jd = np.asarray(jd_tt, dtype=np.float64)
    if delta_t_override_s is not None:
        return _out(np.zeros(jd.shape, dtype=bool))
    sigma = np.asarray(delta_t_sigma_s(jd))
    ut = jd - np.asarray(delta_t_s(jd)) / DAY_S + 0.5  # days since a UT midnight at the integers
    half = _DATE_DOUBT_SIGMAS * sigma / DAY_S
    with np.errstate(invalid="ignore"):
        doubt = np.floor(ut - half) != np.floor(ut + half)
    return _out(np.asarray(doubt & np.isfinite(ut)))


def ut_from_tt(jd_tt: ArrayLike, delta_t_override_s: ArrayLike | None = None) -> NDArray:
    """JD UT1 from JD TT: UT1 = TT − ΔT.

    Parameters
    ----------
    jd_tt : Julian date(s) in TT (days).
    delta_t_override_s : ΔT to use instead of the model (seconds); a scalar applies
        to every instant, an array must broadcast against ``jd_tt``.

    >>> round(float(ut_from_tt(2451545.0, delta_t_override_s=86400.0)), 6)
    2451544.0
    """
    jd = np.asarray(jd_tt, dtype=np.float64)
    dt = delta_t_s(jd) if delta_t_override_s is None else np.asarray(delta_t_override_s, dtype=np.float64)
    return _out(np.asarray(jd - dt / DAY_S))


def tt_from_ut(jd_ut: ArrayLike, delta_t_override_s: ArrayLike | None = None) -> NDArray:
    """JD TT from JD UT1, solving TT = UT1 + ΔT(TT) by fixed-point iteration.

    ΔT changes by at most a fraction of a second per day, so three passes
    converge to far better than a microsecond.

    >>> jd_ut = 1000000.25
    >>> round(float(ut_from_tt(tt_from_ut(jd_ut))) - jd_ut, 9)
    0.0
    """
    ut = np.asarray(jd_ut, dtype=np.float64)
    if delta_t_override_s is not None:
        return _out(np.asarray(ut + np.asarray(delta_t_override_s, dtype=np.float64) / DAY_S))
    tt = ut + delta_t_s(ut) / DAY_S
    for _ in range(3):
        tt = ut + delta_t_s(tt) / DAY_S
    return _out(np.asarray(tt))
