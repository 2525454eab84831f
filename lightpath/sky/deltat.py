"""ΔT = TT − UT1, its uncertainty, and conversions between TT and UT.

ΔT comes from skyfield's built-in model, which joins three published pieces:

* 1973-01-02 … 2027-01-23: daily IERS values (``finals2000A``, measurements and
  the IERS predictions bundled with skyfield 1.55);
* 720 BC … 1973: the cubic splines of Morrison, Stephenson, Hohenkerk & Zawilski
  (2021), Table S15 (the 2020 addendum to Stephenson et al. 2016);
* beyond both ends: the long-term parabola of Stephenson, Morrison & Hohenkerk
  (2016), ΔT = −320 s + 32.5 s · ((year − 1825)/100)², joined to the splines by
  800-year connecting splines.

Its uncertainty σ follows Morrison & Stephenson (2004), σ ≈ 0.8·t² s with
t = (year − 1820)/100.  They state it for 1000 BC – AD 1200; here it is also used
(extrapolated) before 1000 BC, where it reaches about half an hour at 3000 BC and
about 3 h at 10,000 BC, and after AD 1200, with a floor taken from the uncertainties that
Espenak & Meeus (2006) tabulate for AD 1200–1950 (the formula alone gives
nearly zero around 1820).  Where IERS values exist, σ is 0.1 s (our choice:
it covers IERS predictions a year ahead; measured values are better than 1 ms).
After 2027 no published σ exists; the same formula is used and probably
understates it.

>>> from lightpath.sky.calendar import julian_day
>>> round(float(delta_t_s(2451545.0)), 1)   # J2000.0: ≈ 63.8 s (IERS)
63.8
>>> round(float(delta_t_sigma_s(2451545.0)), 1)
0.1
>>> bool(ut_date_uncertain(julian_day(-3199, 11, 3)))   # 3200 BC
True

References
----------
Morrison, L. V. & Stephenson, F. R. (2004). Historical values of the Earth's clock
error ΔT and the calculation of eclipses. *J. Hist. Astron.* 35, 327–336.

Stephenson, F. R., Morrison, L. V. & Hohenkerk, C. Y. (2016). Measurement of the
Earth's rotation: 720 BC to AD 2015. *Proc. R. Soc. A* 472, 20160404.

Morrison, L. V., Stephenson, F. R., Hohenkerk, C. Y. & Zawilski, M. (2021).
Addendum 2020 to 'Measurement of the Earth's rotation: 720 BC to AD 2015'.
*Proc. R. Soc. A* 477, 20200776.

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
    "sigma = 0.8*t^2 s, t = (year - 1820)/100 (Morrison & Stephenson 2004), stated for 1000 BC-AD 1200 and "
    "extrapolated beyond; at least the Espenak & Meeus (2006) uncertainties for AD 1200-1950; 0.1 s where "
    "IERS values exist (1973-2027)"
)

#: σ where IERS daily values exist (seconds); our choice, see the module notes.
IERS_SIGMA_S = 0.1

# Espenak & Meeus (2006), table of ΔT with its uncertainty, AD 1200-1950 (from memory):
# year -> σ in seconds.  Between nodes σ is interpolated linearly.
_EM2006_SIGMA_YEARS = np.array([1200.0, 1300.0, 1600.0, 1700.0, 1750.0, 1800.0, 1900.0, 1950.0])
_EM2006_SIGMA_S = np.array([30.0, 20.0, 20.0, 5.0, 2.0, 1.0, 1.0, 0.1])

# Beyond 2σ ≥ 1 h the UT calendar date of an event near midnight UT, or near dawn
# far east or west of Greenwich, may change.
_DATE_UNCERTAIN_2SIGMA_S = 3600.0


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
    """Uncertainty (1σ, seconds) of ΔT at the given instants (JD TT).

    σ = 0.8·t² s with t = (year − 1820)/100 (Morrison & Stephenson 2004), raised to
    at least the Espenak & Meeus (2006) uncertainties over AD 1200–1950 and set to
    0.1 s where IERS values exist; see :data:`DELTA_T_SIGMA_NOTE`.

    >>> import numpy as np
    >>> from lightpath.sky.calendar import julian_day
    >>> [round(float(s)) for s in delta_t_sigma_s(julian_day(np.array([-2999, 0, 1600]), 1, 1))]
    [1858, 265, 20]

    References
    ----------
    Morrison & Stephenson (2004), section 5; Espenak & Meeus (2006).
    """
    jd = np.asarray(jd_tt, dtype=np.float64)
    year = 2000.0 + (jd - 2451545.0) / 365.25
    t = (year - 1820.0) / 100.0
    sigma = 0.8 * t * t  # Morrison & Stephenson (2004): σ ≈ 0.8 t² s
    in_em = (year >= _EM2006_SIGMA_YEARS[0]) & (year <= _EM2006_SIGMA_YEARS[-1])
    floor = np.interp(year, _EM2006_SIGMA_YEARS, _EM2006_SIGMA_S)
    sigma = np.where(in_em, np.maximum(sigma, floor), sigma)
    first, last = iers_span_jd_tt()
    sigma = np.where((jd >= first) & (jd <= last), IERS_SIGMA_S, sigma)
    # Between 1950 and the IERS table, and just after it, keep at least the IERS floor.
    sigma = np.where(np.isnan(jd), np.nan, np.maximum(sigma, IERS_SIGMA_S))
    return _out(sigma)


def ut_date_uncertain(jd_tt: ArrayLike) -> NDArray:
    """True where 2σ of ΔT is one hour or more (bool array, shape of ``jd_tt``).

    The UT clock time of an event then moves by hours within the uncertainty,
    so its UT calendar date (and that of any event within a few hours of
    midnight UT, such as a sunrise far from Greenwich) can change.  With the
    σ model used here this holds before about 2920 BC.

    >>> import numpy as np
    >>> from lightpath.sky.calendar import julian_day
    >>> [bool(v) for v in ut_date_uncertain(julian_day(np.array([-3199, -2899, 2000]), 1, 1))]
    [True, False, False]
    """
    sigma = np.asarray(delta_t_sigma_s(jd_tt))
    return _out(np.asarray(2.0 * sigma >= _DATE_UNCERTAIN_2SIGMA_S))


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
