"""Earth orientation valid over ±10,000 years: long-term precession, nutation, Earth rotation.

* Precession: Vondrák, Capitaine & Wallace (2011) long-term expressions, through
  ERFA (``erfa.ltp``, ``erfa.ltpb``, ``erfa.ltecm``, ``erfa.ltpecl``,
  ``erfa.ltpequ``), valid for ±200,000 years about J2000.  The IAU 2006
  polynomials drift from them by about 12″ at 3000 BC and over 15′ at 10,000 BC.
* Nutation: IAU 2000B (McCarthy & Luzum 2003, ``erfa.nut00b``), good to 1 mas
  over 1995–2050, used as it is over 1900–2100; before 1800 and after 2200 its
  77 terms are evaluated with the full fundamental arguments of Simon et al.
  (1994), as IAU 2000A does (:mod:`lightpath.sky.nutation`): 2000B's linear
  arguments alone would part from 2000A by 1.5″ in Δψ at 3000 BC, 6″ at 9000 BC.
* Mean obliquity of date: the angle between the long-term ecliptic pole and the
  long-term equator pole (Vondrák et al. 2011), so ecliptic and equator agree
  with the precession used.
* Earth rotation: Greenwich apparent sidereal time from ``erfa.gst06`` with our
  long-term bias-precession-nutation matrix, i.e. the Earth rotation angle of
  UT1 minus the equation of the origins; the CIO locator ``s`` is integrated
  from its definition for the long-term pole (:mod:`lightpath.sky.cio`).  The
  IAU 2006 series for ``s`` (``erfa.s06``) would part from it by 11′ of
  rotation at 3000 BC and 60° at 10,000 BC.
* Polar motion is ignored (< 0.5″).

All angles are degrees at the public boundary unless a name says ``_rad``.
Instants are Julian dates of TT (``jd_tt``) or UT1 (``jd_ut``).

>>> round(float(mean_obliquity_deg(2451545.0)), 6)
23.439279
>>> m = bias_precession_nutation_matrix(np.array([2451545.0, 2460000.0]))
>>> m.shape
(2, 3, 3)

References
----------
Vondrák, J., Capitaine, N., & Wallace, P. (2011). New precession expressions,
valid for long time intervals. *Astronomy & Astrophysics* 534, A22 (erratum
2012, A&A 541, C1).

Simon, J. L., et al. (1994). Numerical expressions for precession formulae and mean elements for the Moon
and the planets. *A&A* 282, 663–683 (fundamental arguments).

McCarthy, D. D., & Luzum, B. J. (2003). An abridged model of the precession-
nutation of the celestial pole. *Celestial Mechanics and Dynamical Astronomy* 85, 37–49.

Laskar, J. (1986). Secular terms of classical planetary theories using the
results of general theory. *A&A* 157, 59–70 (general precession in longitude).

Capitaine, N., & Wallace, P. T. (2006). High precision methods for locating
the celestial intermediate pole and origin. *A&A* 450, 855–872 (``s06``, ``eors``).

Petit, G., & Luzum, B. (eds.) (2010). *IERS Conventions (2010)*, IERS
Technical Note 36, chapter 5 (Earth rotation angle, eq. 5.15).
"""

from __future__ import annotations

import erfa
import numpy as np
from numpy.typing import ArrayLike, NDArray

from lightpath.sky import cio
from lightpath.sky.nutation import nutation_rad

__all__ = [
    "bias_precession_matrix",
    "bias_precession_nutation_matrix",
    "earth_rotation_angle_deg",
    "ecliptic_matrix",
    "general_precession_laskar1986_rad",
    "general_precession_vondrak2011_rad",
    "equation_of_origins_deg",
    "greenwich_apparent_sidereal_time_deg",
    "julian_epoch",
    "mean_obliquity_deg",
    "nutation_deg",
    "nutation_iau2000b_deg",
    "precession_matrix",
    "true_obliquity_deg",
]

_RAD_DEG = 180.0 / np.pi


def _jd(jd: ArrayLike) -> NDArray:
    return np.asarray(jd, dtype=float)


def julian_epoch(jd_tt: ArrayLike) -> NDArray:
    """Julian epoch (years of 365.25 days from J2000.0, plus 2000) of a TT Julian date.

    >>> float(julian_epoch(2451545.0))
    2000.0
    """
    return erfa.epj(_jd(jd_tt), 0.0)


def precession_matrix(jd_tt: ArrayLike) -> NDArray:
    """Long-term precession matrix, J2000 mean equator and equinox → mean of date, shape (..., 3, 3).

    Vondrák, Capitaine & Wallace (2011), via ``erfa.ltp``; ``v_date = P @ v_j2000``.
    """
    return erfa.ltp(julian_epoch(jd_tt))


def bias_precession_matrix(jd_tt: ArrayLike) -> NDArray:
    """Frame bias and long-term precession, GCRS → mean equator and equinox of date, shape (..., 3, 3).

    Vondrák et al. (2011) with the IAU 2006 frame bias, via ``erfa.ltpb``.
    """
    return erfa.ltpb(julian_epoch(jd_tt))


def ecliptic_matrix(jd_tt: ArrayLike) -> NDArray:
    """GCRS → mean ecliptic and equinox of date (long-term), shape (..., 3, 3).

    Vondrák et al. (2011) via ``erfa.ltecm``; ``v_ecliptic = E @ v_gcrs``.
    """
    return erfa.ltecm(julian_epoch(jd_tt))


def general_precession_laskar1986_rad(jd_tt: ArrayLike) -> NDArray:
    """General precession in longitude p_A of Laskar (1986), radians, from J2000.

    The precession built into VSOP87D's "mean ecliptic and equinox of date": the secular
    (zero-frequency) terms of VSOP87D's Earth longitude, minus the Earth's mean motion in the fixed
    frame, reproduce these coefficients through τ⁵ to the printed digits (``tests/test_sun_vsop87.py``).
    Coefficients from memory (Laskar 1986; T in Julian millennia from J2000).

    >>> round(float(general_precession_laskar1986_rad(2451545.0 + 36525.0)) * 206264.806, 3)  # AD 2100
    5030.209
    """
    tm = (_jd(jd_tt) - 2451545.0) / 365250.0
    coeffs = (0.00017451, -0.0018055, -0.235316, 0.07732, 111.1971, 50290.966)  # T^6 … T^1, arcsec
    return np.polyval(coeffs + (0.0,), tm) / 206264.80624709636  # Laskar (1986) p_A


def general_precession_vondrak2011_rad(jd_tt: ArrayLike) -> NDArray:
    """General precession in longitude p_A of the long-term model (Vondrák et al. 2011), radians.

    Found geometrically from ``erfa.ltecm``: p_A is the longitude of the node of the ecliptic of
    date on the J2000 ecliptic, measured in the ecliptic of date from the equinox of date, minus
    the same node's longitude in the J2000 ecliptic (the definition of Lieske et al. 1977).  Within
    a micro-arcsecond of J2000, where the node is undefined, the IAU 2006 polynomial
    (5028.796195″t + 1.1054348″t², t in centuries) is used.

    >>> round(float(general_precession_vondrak2011_rad(2451545.0 + 36525.0)) * 206264.806, 3)  # AD 2100
    5029.901
    """
    jd = _jd(jd_tt)
    ecm = erfa.ltecm(julian_epoch(jd))
    e0 = erfa.ltecm(2000.0)
    node = np.cross(e0[2], ecm[..., 2, :])
    norm = np.linalg.norm(node, axis=-1)
    with np.errstate(invalid="ignore", divide="ignore"):
        node = node / norm[..., None]
        a = np.einsum("...ij,...j->...i", ecm, node)
        b = np.einsum("ij,...j->...i", e0, node)
        p = np.arctan2(a[..., 1], a[..., 0]) - np.arctan2(b[..., 1], b[..., 0])
    p = (p + np.pi) % (2.0 * np.pi) - np.pi
    t = (jd - 2451545.0) / 36525.0
    near = (5028.796195 * t + 1.1054348 * t**2) / 206264.80624709636  # Capitaine et al. (2003) P03 p_A
    return np.where(norm > 1e-11, p, near)


def mean_obliquity_deg(jd_tt: ArrayLike) -> NDArray:
    """Mean obliquity of the ecliptic of date, degrees: angle between the long-term poles.

    Ecliptic pole from ``erfa.ltpecl`` and equator pole from ``erfa.ltpequ``
    (Vondrák et al. 2011), both referred to the J2000 frame.  Within 0.05″ of
    the IAU 2006 value (``erfa.obl06``) over 1800–2200.

    >>> round(float(mean_obliquity_deg(2451545.0 - 5000 * 365.25)), 3)  # 3000 BC
    24.019
    """
    epj = julian_epoch(jd_tt)
    with np.errstate(invalid="ignore"):  # nan instants give nan quietly
        pecl = erfa.ltpecl(epj)
        pequ = erfa.ltpequ(epj)
    # angle between unit vectors, via atan2(|a×b|, a·b) for full precision
    cross = np.linalg.norm(np.cross(pecl, pequ), axis=-1)
    dot = np.sum(pecl * pequ, axis=-1)
    return np.arctan2(cross, dot) * _RAD_DEG


def nutation_iau2000b_deg(jd_tt: ArrayLike) -> tuple[NDArray, NDArray]:
    """Nutation in longitude and in obliquity (Δψ, Δε), degrees, IAU 2000B.

    McCarthy & Luzum (2003) via ``erfa.nut00b``.

    >>> dpsi, deps = nutation_iau2000b_deg(2448908.5)  # 1992 Oct 13.0 TD
    >>> round(float(dpsi) * 3600, 2), round(float(deps) * 3600, 2)
    (15.91, -0.31)
    """
    dpsi, deps = erfa.nut00b(_jd(jd_tt), 0.0)
    return dpsi * _RAD_DEG, deps * _RAD_DEG


def nutation_deg(jd_tt: ArrayLike) -> tuple[NDArray, NDArray]:
    """Nutation (Δψ, Δε), degrees, at any epoch: IAU 2000B near J2000, its long-term form far from it.

    See :mod:`lightpath.sky.nutation`.

    >>> dpsi, deps = nutation_deg(2448908.5)  # 1992 Oct 13.0 TD: IAU 2000B itself
    >>> round(float(dpsi) * 3600, 2), round(float(deps) * 3600, 2)
    (15.91, -0.31)
    """
    dpsi, deps = nutation_rad(_jd(jd_tt))
    return dpsi * _RAD_DEG, deps * _RAD_DEG


def true_obliquity_deg(jd_tt: ArrayLike) -> NDArray:
    """True obliquity of date, degrees: long-term mean obliquity + Δε (:func:`nutation_deg`)."""
    return mean_obliquity_deg(jd_tt) + nutation_deg(jd_tt)[1]


def nutation_matrix(eps_mean_rad: ArrayLike, dpsi_rad: ArrayLike, deps_rad: ArrayLike) -> NDArray:
    """Nutation matrix, mean of date → true of date: R1(−ε−Δε)·R3(−Δψ)·R1(ε), shape (..., 3, 3)."""
    return erfa.numat(eps_mean_rad, dpsi_rad, deps_rad)


def bias_precession_nutation_matrix(jd_tt: ArrayLike) -> NDArray:
    """GCRS → true equator and equinox of date, long-term, shape (..., 3, 3).

    ``N(nutation_deg, long-term mean obliquity) @ B·P(Vondrák et al. 2011)``.
    """
    jd = _jd(jd_tt)
    dpsi, deps = nutation_rad(jd)
    eps = mean_obliquity_deg(jd) / _RAD_DEG
    return np.matmul(erfa.numat(eps, dpsi, deps), bias_precession_matrix(jd))


def earth_rotation_angle_deg(jd_ut: ArrayLike) -> NDArray:
    """Earth rotation angle of UT1, degrees in [0, 360).

    IERS Conventions (2010) eq. 5.15, via ``erfa.era00``.
    """
    return erfa.era00(_jd(jd_ut), 0.0) * _RAD_DEG


def equation_of_origins_deg(jd_tt: ArrayLike, rnpb: ArrayLike) -> NDArray:
    """Equation of the origins (ERA − GAST), degrees, for a GCRS → true-of-date matrix ``rnpb``.

    Capitaine & Wallace (2006) via ``erfa.eors``, with the CIO locator ``s`` integrated for the
    long-term pole (:mod:`lightpath.sky.cio`).
    """
    rnpb = np.asarray(rnpb, dtype=float)
    s = cio.cio_locator_rad(_jd(jd_tt), rnpb[..., 2, 0], rnpb[..., 2, 1])
    return erfa.eors(rnpb, s) * _RAD_DEG


def greenwich_apparent_sidereal_time_deg(jd_ut: ArrayLike, jd_tt: ArrayLike, rnpb: ArrayLike) -> NDArray:
    """Greenwich apparent sidereal time, degrees in [0, 360), with our long-term matrix ``rnpb``.

    ERA(UT1) − equation of the origins (the form of ``erfa.gst06``), with the integrated CIO locator.

    >>> jd = 2451545.0
    >>> round(float(greenwich_apparent_sidereal_time_deg(jd, jd, bias_precession_nutation_matrix(jd))), 4)
    280.4571
    """
    gst = earth_rotation_angle_deg(jd_ut) - equation_of_origins_deg(jd_tt, rnpb)
    return np.mod(gst, 360.0)
