"""The CIO locator ``s`` for the long-term precession, by integrating its definition.

Earth rotation is the Earth rotation angle (ERA) of UT1, measured on the true
equator from the celestial intermediate origin (CIO); sidereal time is ERA minus
the equation of the origins, which needs the CIO locator ``s``.  ``s`` is fixed
by the motion of the pole (Capitaine, Guinot & McCarthy 2000; IERS Conventions
2010, eq. 5.11)::

    s(t) = −∫ (X·dY/dt − Y·dX/dt) / (1 + Z) dt  (+ constant),

with X, Y, Z the pole's GCRS unit vector.  The IAU 2006 series for ``s + XY/2``
(``erfa.s06``, Capitaine & Wallace 2006) is a polynomial in time fitted near
J2000; with the long-term pole of Vondrák et al. (2011) it departs from the
integral by 0.05″ at AD 1000, 11′ at 3000 BC and 60° at 10,000 BC — an error in
the Earth's orientation that exceeds the ΔT uncertainty there.  This module
integrates the definition instead, once, over Julian epochs −10001…+3001 at
one-year nodes with the long-term pole (``erfa.ltpb``; precession and frame
bias), and interpolates (cubic Lagrange).  The nutation adds to ``s + XY/2`` a
steady drift (its ellipse sweeps area at a constant rate: IAU 2006's linear term
less the precession-only slope, 3.9 mas per century) and periodic terms, of
which the two largest, in Ω and 2Ω (2.6 mas), are kept; the rest are below
0.04 mas within ten years of J2000.

Against ``erfa.s06`` the result differs by < 0.3 mas over 1950–2050, < 3.5 mas over
1800–2200 and 0.04″ at AD 1000 (``tests/test_cio.py``).

>>> round(float(s_plus_half_xy_rad(2451545.0)) * 206264.806e6)  # μas: 94 − 2640.73 sin Ω − 63.53 sin 2Ω
-2008

References
----------
Capitaine, N., Guinot, B., & McCarthy, D. D. (2000). Definition of the Celestial
Ephemeris Origin and of UT1 in the International Celestial Reference Frame.
*A&A* 355, 398–405.

Capitaine, N., & Wallace, P. T. (2006). High precision methods for locating the
celestial intermediate pole and origin. *A&A* 450, 855–872 (Table 5: the series
for s + XY/2).

Petit, G., & Luzum, B. (eds.) (2010). *IERS Conventions (2010)*, IERS Technical
Note 36, §5.5.6 (eq. 5.11).

Vondrák, J., Capitaine, N., & Wallace, P. (2011). New precession expressions,
valid for long time intervals. *A&A* 534, A22.
"""

from __future__ import annotations

import functools

import erfa
import numpy as np
from numpy.typing import ArrayLike, NDArray

from lightpath.sky.nodes import lagrange4_weights

__all__ = ["IAU2006_S_POLYNOMIAL_RAD", "cio_locator_rad", "s_plus_half_xy_rad"]

_ARCSEC = np.pi / (180.0 * 3600.0)
#: Polynomial part of the IAU 2006 series for s + XY/2, radians per power of Julian centuries from J2000
#: (Capitaine & Wallace 2006, Table 5: 94, 3808.65, −122.68, −72574.11, 27.98, 15.62 μas; from memory,
#: checked against ``erfa.s06`` in tests/test_cio.py).  Used only to set the integral's constant.
IAU2006_S_POLYNOMIAL_RAD = np.array([94.00, 3808.65, -122.68, -72574.11, 27.98, 15.62]) * 1e-6 * _ARCSEC
#: The two largest periodic terms of that series (Table 5, from memory, checked against erfa.s06):
#: −2640.73 μas sin Ω − 63.53 μas sin 2Ω.
_OMEGA_TERMS_RAD = np.array([-2640.73, -63.53]) * 1e-6 * _ARCSEC

_J2000 = 2451545.0
_FIRST_EPOCH, _LAST_EPOCH = -10001.0, 3001.0  # Julian epochs of the first and last nodes
_STEP_YEARS = 1.0
_DIFF_YEARS = 0.5 / 365.25  # half-width of the central difference for dX/dt, dY/dt


def _pole(epoch: NDArray) -> tuple[NDArray, NDArray, NDArray]:
    """X, Y, Z of the long-term mean pole (with frame bias) in the GCRS at Julian epochs."""
    m = erfa.ltpb(epoch)
    return m[..., 2, 0], m[..., 2, 1], m[..., 2, 2]


@functools.cache
def _nodes() -> NDArray:
    """s + XY/2 (precession only, radians) at one-year nodes from Julian epoch −10001 to +3001."""
    epoch = np.arange(_FIRST_EPOCH, _LAST_EPOCH + 0.5 * _STEP_YEARS, _STEP_YEARS)
    x, y, z = _pole(epoch)
    xp, yp, _ = _pole(epoch + _DIFF_YEARS)
    xm, ym, _ = _pole(epoch - _DIFF_YEARS)
    dx, dy = (xp - xm) / (2 * _DIFF_YEARS), (yp - ym) / (2 * _DIFF_YEARS)
    rate = -(x * dy - y * dx) / (1.0 + z)  # ds/dt, radians per Julian year
    from scipy.integrate import cumulative_simpson  # here: scipy.integrate takes 0.5 s to import

    s = cumulative_simpson(rate, dx=_STEP_YEARS, initial=0.0)
    s_plus = s + x * y / 2.0
    i0 = int(round((2000.0 - _FIRST_EPOCH) / _STEP_YEARS))
    centuries = (epoch - 2000.0) / 100.0
    # The nutation's secular share: its ellipse sweeps a steady area, so s drifts at a constant rate
    # (IAU 2006's linear term, 3808.65 μas per century, less the precession-only slope at J2000).
    slope = 100.0 * (rate[i0] + (dx[i0] * y[i0] + x[i0] * dy[i0]) / 2.0)  # d(s + XY/2)/dt at J2000, per century
    drift = (IAU2006_S_POLYNOMIAL_RAD[1] - slope) * centuries
    # constant: equal to the IAU 2006 polynomial at J2000 (94 μas)
    return s_plus - s_plus[i0] + drift + IAU2006_S_POLYNOMIAL_RAD[0]


def _interpolate(values: NDArray, epoch: NDArray) -> NDArray:
    """4-point (cubic) Lagrange interpolation on the uniform node grid."""
    u = (epoch - _FIRST_EPOCH) / _STEP_YEARS
    k = np.clip(np.floor(u), 1, values.size - 3)
    i = k.astype(int)
    w = lagrange4_weights(u - k)
    return w[0] * values[i - 1] + w[1] * values[i] + w[2] * values[i + 1] + w[3] * values[i + 2]


def s_plus_half_xy_rad(jd_tt: ArrayLike) -> NDArray:
    """s + X·Y/2 (radians) at TT Julian dates, long-term: the integrated CIO locator plus its Ω terms.

    Any shape; ``nan`` gives ``nan``.  Valid for Julian epochs −10000…+3000.
    """
    jd = np.asarray(jd_tt, dtype=float)
    ok = np.isfinite(jd)
    epoch = 2000.0 + (np.where(ok, jd, _J2000) - _J2000) / 365.25
    omega = erfa.faom03((epoch - 2000.0) / 100.0)  # mean longitude of the Moon's node (IERS 2003)
    periodic = _OMEGA_TERMS_RAD[0] * np.sin(omega) + _OMEGA_TERMS_RAD[1] * np.sin(2.0 * omega)
    return np.where(ok, _interpolate(_nodes(), epoch) + periodic, np.nan)


def cio_locator_rad(jd_tt: ArrayLike, x: ArrayLike, y: ArrayLike) -> NDArray:
    """The CIO locator s (radians) for a pole at GCRS coordinates ``x``, ``y`` (from the full NPB matrix).

    >>> from lightpath.sky.orientation import bias_precession_nutation_matrix
    >>> m = bias_precession_nutation_matrix(2460000.5)
    >>> s = float(cio_locator_rad(2460000.5, m[2, 0], m[2, 1]))
    >>> f"{(s - float(erfa.s06(2460000.5, 0.0, m[2, 0], m[2, 1]))) * 206264806:.2f} mas"  # against IAU 2006
    '-0.03 mas'
    """
    return s_plus_half_xy_rad(jd_tt) - np.asarray(x) * np.asarray(y) / 2.0
