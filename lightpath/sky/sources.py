"""Where the Sun's geocentric position comes from: a JPL kernel or the VSOP87D series.

Both sources end in the same thing — the Sun's **apparent** geocentric
position in the GCRS, in au — and share everything after it (precession,
nutation, Earth rotation, parallax, refraction; see :mod:`lightpath.sky.sun`).

* ``"jpl"``: JPL DE421 from skyfield-data (1899-07-29 … 2053-10-09), or any
  ``.bsp`` kernel given by path, through skyfield (:mod:`lightpath.sky.jpl`).
* ``"vsop87"``: VSOP87D for the Earth (Bretagnon & Francou 1988), geocentric by
  reversing the heliocentric vector, annual aberration from the series' own
  velocity (ERFA ``ab``), then from the VSOP87 mean ecliptic and equinox of date
  (equinox by the precession of Laskar 1986) to the GCRS with the long-term
  ecliptic matrix of Vondrák et al. (2011) (:func:`vsop87_frame_matrix`).
  Heliocentric light time is left out on purpose: the Sun's motion about the
  barycentre during the 8.3 minutes of light time and its share in the Earth's
  barycentric velocity cancel to first order.
* ``"auto"``: DE421 when every instant lies inside its span, else VSOP87D.

Every source covers at most Julian epochs −10000 … +3000; instants outside (or
outside a kernel's own span) raise :class:`~lightpath.errors.InputError`.

>>> src = choose_source([2451545.0])
>>> src.name
'JPL DE421 via skyfield'
>>> choose_source([0.0]).name  # 4713 BC
'VSOP87D (Bretagnon & Francou 1988)'

References
----------
Bretagnon, P., & Francou, G. (1988). *A&A* 202, 309–315 (VSOP87).
Laskar, J. (1986). *A&A* 157, 59–70 (general precession in longitude).
Vondrák, J., Capitaine, N., & Wallace, P. (2011). *A&A* 534, A22.
Urban, S. E., & Seidelmann, P. K. (eds.) (2013). *Explanatory Supplement to the
Astronomical Almanac*, 3rd ed., eq. 7.40 (aberration, as in ERFA ``ab``).
"""

from __future__ import annotations

import os
import warnings
from dataclasses import dataclass

import erfa
import numpy as np
from numpy.typing import ArrayLike, NDArray

from lightpath.errors import InputError
from lightpath.sky import jpl, orientation, vsop87
from lightpath.sky.nodes import chebyshev_blocks
from lightpath.threads import split_map

__all__ = [
    "LONG_TERM_SPAN_JULIAN_YEARS",
    "SOURCES",
    "SunAccuracyWarning",
    "VSOP87_NAME",
    "VSOP87_VERIFIED_JULIAN_YEARS",
    "SunSource",
    "choose_source",
    "long_term_span_jd_tt",
    "vsop87_frame_matrix",
    "vsop87_sun_gcrs_apparent_au",
    "warn_if_unverified",
]

#: Julian epochs (years) that any source may be asked for.
LONG_TERM_SPAN_JULIAN_YEARS = (-10000.0, 3000.0)
#: Julian epochs over which VSOP87D is checked here against JPL DE406 (outside: extrapolated).
VSOP87_VERIFIED_JULIAN_YEARS = (-3000.0, 3000.0)
#: Accepted ``source`` words besides a path to a ``.bsp`` file.
SOURCES = ("auto", "jpl", "vsop87")
VSOP87_NAME = "VSOP87D (Bretagnon & Francou 1988)"

_C_AU_PER_DAY = erfa.DC  # speed of light, au/day
# VSOP87's slow band (periods > 120 days) is sampled on 256-day Chebyshev blocks of degree 16 when that
# saves work, its fast band (158 terms: the Earth about the Earth–Moon barycentre, Mercury's terms)
# is summed at every instant; the ecliptic matrix on 512-day blocks of degree 6.
# Interpolation error < 0.001″ (tests/test_sun_vsop87.py).
_SLOW_BLOCK_DAYS = 256.0
_SLOW_DEGREE = 16
_MATRIX_BLOCK_DAYS = 512.0
_MATRIX_DEGREE = 6


def long_term_span_jd_tt() -> tuple[float, float]:
    """The span −10000.0 … +3000.0 (Julian epochs) as TT Julian dates."""
    lo, hi = LONG_TERM_SPAN_JULIAN_YEARS
    return float(erfa.epj2jd(lo)[0] + erfa.epj2jd(lo)[1]), float(erfa.epj2jd(hi)[0] + erfa.epj2jd(hi)[1])


@dataclass(frozen=True)
class SunSource:
    """A source of the Sun's apparent geocentric position.

    ``kind`` is ``"jpl"`` (with ``path`` to the kernel) or ``"vsop87"``; ``name``
    is what results report as their ``source``.
    """

    name: str
    kind: str
    path: str | None = None

    def gcrs_apparent_au(self, jd_tt: ArrayLike) -> NDArray:
        """Apparent geocentric GCRS position of the Sun (au), shape ``jd_tt.shape + (3,)``."""
        if self.kind == "jpl":
            return jpl.sun_gcrs_apparent_au(jpl.load_kernel(self.path), jd_tt)
        return vsop87_sun_gcrs_apparent_au(jd_tt)


def _vsop_columns(jd: NDArray, band: str = "all") -> NDArray:
    """(n, 6): VSOP87D L, B, R and their rates per day at instants ``jd`` (one band of terms)."""
    L, B, R = vsop87.earth_heliocentric_lbr(jd, band=band)
    dL, dB, dR = vsop87.earth_heliocentric_lbr_rates(jd, band=band)
    return np.stack([L, B, R, dL, dB, dR], axis=-1)


def vsop87_frame_matrix(jd_tt: ArrayLike) -> NDArray:
    """GCRS → VSOP87D's mean ecliptic and equinox of date, shape (..., 3, 3); ``v_vsop = M @ v_gcrs``.

    VSOP87D's equinox of date carries the general precession in longitude of Laskar (1986), built
    into its series; our pipeline uses Vondrák et al. (2011).  The ecliptics of date agree (to
    < 3.2″ over −3000…+3000, measured against DE406), the equinoxes do not (3″ per millennium near
    J2000, ~150″ at 3000 BC between Laskar's and Lieske's polynomials), so ``M = R3(−Δp) · E`` with
    ``E`` the long-term ecliptic matrix (``erfa.ltecm``) and Δp = p_A(Laskar 1986) − p_A(Vondrák 2011).

    >>> m = vsop87_frame_matrix(np.array([2451545.0, 625400.0]))
    >>> m.shape
    (2, 3, 3)
    """
    jd = np.asarray(jd_tt, dtype=float)
    dp = orientation.general_precession_laskar1986_rad(jd) - orientation.general_precession_vondrak2011_rad(jd)
    c, s = np.cos(dp), np.sin(dp)
    r3 = np.zeros(jd.shape + (3, 3))
    r3[..., 0, 0], r3[..., 0, 1], r3[..., 1, 0], r3[..., 1, 1], r3[..., 2, 2] = c, -s, s, c, 1.0  # R3(−Δp), ERFA form
    return np.matmul(r3, orientation.ecliptic_matrix(jd))


def _ecliptic_matrix_columns(jd: NDArray) -> NDArray:
    return vsop87_frame_matrix(jd).reshape(-1, 9)


def vsop87_sun_gcrs_apparent_au(jd_tt: ArrayLike) -> NDArray:
    """Apparent geocentric GCRS position of the Sun (au) from VSOP87D, shape ``jd_tt.shape + (3,)``.

    >>> p = vsop87_sun_gcrs_apparent_au(2451545.0)
    >>> round(float(np.linalg.norm(p)), 6)
    0.983328
    """
    jd = np.asarray(jd_tt, dtype=float)
    slow = chebyshev_blocks(lambda t: _vsop_columns(t, "slow"), jd, _SLOW_BLOCK_DAYS, _SLOW_DEGREE)
    # VSOP87 ecliptic and equinox of date → GCRS: Laskar (1986) equinox back to Vondrák et al. (2011), then ltecm^T
    ecm = chebyshev_blocks(_ecliptic_matrix_columns, jd, _MATRIX_BLOCK_DAYS, _MATRIX_DEGREE)
    flat = split_map(_apparent_gcrs, jd.reshape(-1), slow.reshape(-1, 6), ecm.reshape(-1, 9))
    return flat.reshape(jd.shape + (3,))


def _apparent_gcrs(jd: NDArray, slow: NDArray, ecm: NDArray) -> NDArray:
    """(n, 3) apparent GCRS Sun (au) from VSOP87's slow band (n, 6) and frame matrices (n, 9) at 1-D ``jd``."""
    L, B, R, dL, dB, dR = np.moveaxis(slow + _vsop_columns(jd, "fast"), -1, 0)
    cl, sl, cb, sb = np.cos(L), np.sin(L), np.cos(B), np.sin(B)
    # heliocentric Earth in the VSOP87 ecliptic of date, and its velocity (au, au/day)
    earth = np.stack([R * cb * cl, R * cb * sl, R * sb], axis=-1)
    vel = np.stack(
        [
            dR * cb * cl - R * sb * dB * cl - R * cb * sl * dL,
            dR * cb * sl - R * sb * dB * sl + R * cb * cl * dL,
            dR * sb + R * cb * dB,
        ],
        axis=-1,
    )
    # geometric geocentric Sun = -earth; aberration by the Earth's velocity (ERFA ab, Urban & Seidelmann eq. 7.40)
    beta = vel / _C_AU_PER_DAY
    bm1 = np.sqrt(1.0 - np.sum(beta**2, axis=-1))
    direction = erfa.ab(-earth / R[..., None], beta, R, bm1)
    apparent_ecl = direction * R[..., None]
    return np.einsum("nji,nj->ni", ecm.reshape(-1, 3, 3), apparent_ecl)


class SunAccuracyWarning(UserWarning):
    """The Sun was computed where its accuracy has not been checked against a JPL ephemeris."""


def warn_if_unverified(source: SunSource, jd_tt: ArrayLike) -> None:
    """Warn (:class:`SunAccuracyWarning`) when VSOP87D is used before Julian epoch −3000.

    DE406, the reference used here, ends at 3000 BC; VSOP87's authors state ~1″ only within ±4000
    years of J2000.  Earlier positions are extrapolated: see docs/sun-model.md for the estimate.
    """
    if source.kind != "vsop87":
        return
    jd = np.asarray(jd_tt, dtype=float)
    lo = float(sum(erfa.epj2jd(VSOP87_VERIFIED_JULIAN_YEARS[0])))
    if np.any(jd[np.isfinite(jd)] < lo):
        warnings.warn(
            "Sun positions before 3000 BC come from VSOP87D beyond the span checked against JPL DE406 "
            "(3000 BC to AD 3000, within 3.2 arcsec there); estimated, not measured, error: ~3 arcsec by "
            "5000 BC, ~11 arcsec by 10,000 BC (docs/sun-model.md)",
            SunAccuracyWarning,
            stacklevel=3,
        )


def _check_long_term_span(jd: NDArray) -> None:
    lo, hi = long_term_span_jd_tt()
    bad = np.isfinite(jd) & ((jd < lo) | (jd > hi))
    if np.any(bad):
        first = float(jd[bad].flat[0])
        year = float(orientation.julian_epoch(first))
        raise InputError(
            f"instant JD {first:.5f} (TT, Julian epoch {year:.1f}) is outside the supported span "
            f"of Julian epochs {LONG_TERM_SPAN_JULIAN_YEARS[0]:g}..{LONG_TERM_SPAN_JULIAN_YEARS[1]:g}"
        )


def choose_source(jd_tt: ArrayLike, source: str = "auto", ephemeris_path: str | None = None) -> SunSource:
    """Pick the Sun source for a set of instants.

    Parameters
    ----------
    jd_tt : every instant the request will ask for (TT Julian dates); ``nan`` ignored.
    source : ``"auto"`` (DE421 when all instants lie in its span, else VSOP87D),
        ``"jpl"`` (DE421, or ``ephemeris_path``), ``"vsop87"``, or a path to a ``.bsp``.
    ephemeris_path : a user JPL kernel (e.g. DE440/DE441) to use instead of DE421.

    Raises
    ------
    InputError : unknown ``source``, missing or unusable kernel file, an instant outside
        Julian epochs −10000…+3000, or (kernel sources) outside the kernel's own span.
    """
    jd = np.asarray(jd_tt, dtype=float)
    _check_long_term_span(jd)
    if source not in SOURCES:
        if str(source).lower().endswith(".bsp") or os.path.sep in str(source):
            ephemeris_path, source = str(source), "jpl"
        else:
            raise InputError(f"source {source!r} is not one of {', '.join(SOURCES)} or a path to a .bsp kernel")
    if source == "vsop87":
        if ephemeris_path is not None:
            raise InputError("ephemeris_path: a kernel file was given together with source 'vsop87'; choose one")
        return SunSource(VSOP87_NAME, "vsop87")
    path = str(ephemeris_path) if ephemeris_path is not None else jpl.DE421_PATH
    kernel = jpl.load_kernel(path)
    if source == "auto" and ephemeris_path is None:
        lo, hi = jpl.kernel_span_jd_tt(kernel)
        finite = jd[np.isfinite(jd)]
        margin = jpl._SPAN_MARGIN_DAYS
        if finite.size and (finite.min() < lo + margin or finite.max() > hi - margin):
            return SunSource(VSOP87_NAME, "vsop87")
    jpl.check_in_kernel_span(jd, kernel, path)
    return SunSource(jpl.kernel_label(path), "jpl", path)
