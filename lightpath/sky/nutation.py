"""Nutation at any epoch: IAU 2000B near J2000, its series with the full fundamental arguments far from it.

IAU 2000B (McCarthy & Luzum 2003, ``erfa.nut00b``) keeps the 77 largest
luni-solar terms of IAU 2000A and evaluates them with *linear* fundamental
arguments.  Near J2000 that costs under 1 mas; far from it the arguments drift
from the full polynomials of Simon et al. (1994) that IAU 2000A uses (the
Moon's mean anomaly by 31.9″·T², T in centuries), and Δψ parts from 2000A by
up to 1.5″ around 3000 BC and 6″ around 9000 BC (measured against ``erfa.nut00a``).

:func:`nutation_rad` therefore gives

* 1900–2100: IAU 2000B exactly (``erfa.nut00b``; the JPL years stay bit-identical);
* before 1800 and after 2200: the **long-term form** — the same 77 terms (the
  IAU 2000A luni-solar series of Mathews, Herring & Buffett 2002, as tabulated
  in skyfield's ``nutationlib``) with the Simon et al. (1994) polynomial
  arguments, plus 2000B's fixed planetary offset (−0.135 mas, +0.388 mas).
  It stays within 3.3 mas (Δψ) and 1.8 mas (Δε) of full IAU 2000A
  (``erfa.nut00a``) over 10,000 BC – AD 3000 (2000B itself: 2.8 mas over
  1900–2100, 1.5″ near 3000 BC), at about the cost of 2000B;
* between: a linear blend of the two over a century (within 3.1 mas of 2000A there).

>>> import numpy as np
>>> dpsi, deps = nutation_rad(np.array([2451545.0]))
>>> bool(np.all(dpsi == erfa.nut00b(2451545.0, 0.0)[0]))
True

References
----------
McCarthy, D. D. & Luzum, B. J. (2003). An abridged model of the precession-nutation of the celestial pole.
*Celestial Mechanics and Dynamical Astronomy* 85, 37–49 (IAU 2000B).
Mathews, P. M., Herring, T. A. & Buffett, B. A. (2002). Modeling of nutation and precession: new nutation
series for nonrigid Earth and insights into the Earth's interior. *J. Geophys. Res.* 107, B4 (IAU 2000A).
Simon, J. L., Bretagnon, P., Chapront, J., Chapront-Touzé, M., Francou, G. & Laskar, J. (1994). Numerical
expressions for precession formulae and mean elements for the Moon and the planets. *A&A* 282, 663–683, §3.4.
"""

from __future__ import annotations

import functools

import erfa
import numpy as np
from numpy.typing import ArrayLike, NDArray

from lightpath.threads import split_map

__all__ = ["IAU2000B_YEARS", "LONG_TERM_YEARS", "nutation_long_term_rad", "nutation_rad"]

#: Years over which IAU 2000B is used as it is.
IAU2000B_YEARS = (1900.0, 2100.0)
#: Before the first and after the second of these years only the long-term form is used.
LONG_TERM_YEARS = (1800.0, 2200.0)

_CHUNK = 8192  # instants per pass (keeps the (n, 77) work arrays small)
_TERMS = 77  # the luni-solar terms IAU 2000B keeps (McCarthy & Luzum 2003)
_ASEC_RAD = np.pi / (180.0 * 3600.0)
_UNIT_RAD = 1e-7 * _ASEC_RAD  # the series' unit: 0.1 µas
_PLANETARY_OFFSET_RAD = (-0.135e-3 * _ASEC_RAD, 0.388e-3 * _ASEC_RAD)  # McCarthy & Luzum (2003), mas → rad


@functools.cache
def _series():
    """The first 77 luni-solar terms of IAU 2000A and the Simon et al. (1994) argument polynomials."""
    from skyfield import nutationlib as n

    poly = np.stack([n.fa0, n.fa1, n.fa2, n.fa3, n.fa4], axis=1)  # (5 arguments, 5 powers), arcseconds
    multipliers = np.ascontiguousarray(np.asarray(n.nals_t[:_TERMS], dtype=float).T)  # (5, 77)
    lon = np.asarray(n.lunisolar_longitude_coefficients[:_TERMS], dtype=float) * _UNIT_RAD
    obl = np.asarray(n.lunisolar_obliquity_coefficients[:_TERMS], dtype=float) * _UNIT_RAD
    return poly, multipliers, lon, obl


def _long_term_chunk(jd_tt: NDArray) -> NDArray:
    """(n, 2) Δψ, Δε in radians; elementwise sums only, so any split of the instants gives the same bits."""
    poly, multipliers, lon, obl = _series()
    out = np.empty((jd_tt.size, 2))
    for lo in range(0, jd_tt.size, _CHUNK):
        t = (jd_tt[lo : lo + _CHUNK] - 2451545.0) / 36525.0
        phase = np.zeros((t.size, _TERMS))
        for k in range(5):
            c = poly[k]
            arcsec = c[0] + t * (c[1] + t * (c[2] + t * (c[3] + t * c[4])))  # Simon et al. (1994) §3.4
            arg = np.fmod(arcsec, 1296000.0) * _ASEC_RAD  # l, l', F, D, Ω
            phase += arg[:, None] * multipliers[k][None, :]
        s, c = np.sin(phase), np.cos(phase)
        tt = t[:, None]
        out[lo : lo + _CHUNK, 0] = (s * (lon[:, 0] + tt * lon[:, 1]) + c * lon[:, 2]).sum(axis=1)
        out[lo : lo + _CHUNK, 1] = (c * (obl[:, 0] + tt * obl[:, 1]) + s * obl[:, 2]).sum(axis=1)
    out[:, 0] += _PLANETARY_OFFSET_RAD[0]
    out[:, 1] += _PLANETARY_OFFSET_RAD[1]
    return out


def nutation_long_term_rad(jd_tt: ArrayLike) -> tuple[NDArray, NDArray]:
    """(Δψ, Δε), radians: IAU 2000B's 77 terms with the full Simon et al. (1994) fundamental arguments.

    >>> dpsi, deps = nutation_long_term_rad(np.array([2451545.0]))
    >>> round(float(dpsi[0] / _ASEC_RAD), 3), round(float(deps[0] / _ASEC_RAD), 3)
    (-13.932, -5.769)
    """
    jd = np.asarray(jd_tt, dtype=float)
    out = split_map(_long_term_chunk, jd.reshape(-1))
    return out[:, 0].reshape(jd.shape), out[:, 1].reshape(jd.shape)


def nutation_rad(jd_tt: ArrayLike) -> tuple[NDArray, NDArray]:
    """Nutation in longitude and obliquity (Δψ, Δε), radians, at TT instants of any epoch (see the module notes)."""
    jd = np.asarray(jd_tt, dtype=float)
    year = 2000.0 + (jd - 2451545.0) / 365.25
    (b0, b1), (l0, l1) = IAU2000B_YEARS, LONG_TERM_YEARS
    weight = np.clip(np.maximum((b0 - year) / (b0 - l0), (year - b1) / (l1 - b1)), 0.0, 1.0)  # share of long-term
    weight = np.where(np.isnan(year), 0.0, weight)
    dpsi, deps = erfa.nut00b(jd, 0.0)
    far = weight > 0.0
    if np.any(far):
        lt_psi, lt_eps = nutation_long_term_rad(jd[far])
        w = weight[far]
        dpsi = np.array(dpsi, dtype=float, copy=True)
        deps = np.array(deps, dtype=float, copy=True)
        dpsi[far] = (1.0 - w) * dpsi[far] + w * lt_psi
        deps[far] = (1.0 - w) * deps[far] + w * lt_eps
    return dpsi, deps
