"""The Earth by VSOP87D (Bretagnon & Francou 1988): heliocentric L, B, R for any epoch.

VSOP87D gives the Earth's heliocentric ecliptic longitude ``L`` and latitude
``B`` (radians) and radius vector ``R`` (au), referred to the mean ecliptic and
equinox **of date**, as

    X(τ) = Σ_n τ^n Σ_k A_k cos(B_k + C_k τ),   τ = (JD_TT − 2451545) / 365250

(Julian millennia of TT from J2000; TDB − TT < 2 ms is ignored).  The complete
published series (2,425 terms; the coefficient file is made by
``tools/make_vsop87_table.py`` from the PyPI package ``astronomia``) is stored in
``lightpath/sky/data/vsop87d_earth.npz``.

By default the evaluation drops terms whose largest contribution over
−10000…+3000 (``|A|·max(1, |τ|)^n`` with ``|τ| ≤ 12``) is below
``tolerance_rad`` (default 1e-8 rad = 0.002″; :data:`DEFAULT_TOLERANCE_RAD`);
the dropped terms together change each coordinate by less than 0.07″ (measured in
``tests/test_sun_vsop87.py``).  ``tolerance_rad=0`` uses every term.

The authors state VSOP87's precision as about 1″ over 4,000 years either side
of J2000 for the Earth; it is checked here against JPL DE406 for −3000…+3000
(``docs/sun-model.md``).

>>> L, B, R = earth_heliocentric_lbr(2448908.5, tolerance_rad=0.0)  # 1992 Oct 13.0 TD, full series
>>> round(float(np.degrees(L)) % 360, 6), round(float(np.degrees(B)) * 3600, 3), round(float(R), 7)
(19.907297, -0.744, 0.9976085)

(JPL DE421 through skyfield gives the same Sun–Earth distance, 0.9976085 au.)

References
----------
Bretagnon, P., & Francou, G. (1988). Planetary theories in rectangular and
spherical variables. VSOP 87 solutions. *Astronomy and Astrophysics* 202, 309–315.

Meeus, J. (1998). *Astronomical Algorithms*, 2nd ed., chapter 32 and Example 25.b.
"""

from __future__ import annotations

import functools
from importlib import resources

import numpy as np
from numpy.typing import ArrayLike, NDArray

from lightpath.threads import split_map

__all__ = [
    "BANDS",
    "DEFAULT_TOLERANCE_RAD",
    "FAST_PERIOD_DAYS",
    "RATE_TOLERANCE",
    "JULIAN_MILLENNIUM_DAYS",
    "VSOP87_PROVENANCE",
    "earth_heliocentric_lbr",
    "earth_heliocentric_lbr_rates",
    "vsop87_term_count",
]

#: Days in a Julian millennium (the unit of VSOP87's time argument τ).
JULIAN_MILLENNIUM_DAYS = 365250.0
_J2000 = 2451545.0

#: Terms whose largest contribution over −10000…+3000 is below this (radians, or au for R) are dropped.
DEFAULT_TOLERANCE_RAD = 1e-8
_TAU_MAX = 12.0  # |τ| at 10,000 BC

#: Tolerance for the rate series (per Julian millennium): 3e-6 of the Earth's mean motion.
RATE_TOLERANCE = 2e-2

#: Where the coefficients came from (stored inside the coefficient file).
VSOP87_PROVENANCE = "VSOP87D Earth (Bretagnon & Francou 1988), full series via PyPI astronomia 3.0.5"

_CHUNK = 2048  # instants per block: keeps the (block × terms) work arrays around 10 MB

#: Terms with periods shorter than this (days) form the "fast" band (the Earth about the Earth–Moon
#: barycentre and Mercury's terms, 158 terms at the default tolerance); the rest is the "slow" band.
FAST_PERIOD_DAYS = 120.0
_FAST_C = 2.0 * np.pi * JULIAN_MILLENNIUM_DAYS / FAST_PERIOD_DAYS  # rad per Julian millennium
BANDS = ("all", "fast", "slow")


@functools.cache
def _table() -> dict[str, NDArray]:
    path = resources.files("lightpath.sky") / "data" / "vsop87d_earth.npz"
    with resources.as_file(path) as p, np.load(p, allow_pickle=False) as z:
        return {k: z[k].copy() for k in z.files}


@functools.cache
def _terms(coord: str, tolerance: float, rates: bool, band: str = "all") -> tuple[NDArray, NDArray, NDArray, tuple]:
    """(A, B, C, power groups) of the kept terms of one coordinate; groups are (power, start, stop)."""
    if band not in BANDS:
        raise ValueError(f"band {band!r} is not one of {BANDS}")
    t = _table()
    power = t[f"{coord}_power"].astype(int)
    a, b, c = t[f"{coord}_A"], t[f"{coord}_B"], t[f"{coord}_C"]
    size = np.abs(a) * _TAU_MAX ** power.astype(float)
    if rates:  # the derivative's terms scale with A·C
        size = size * np.maximum(np.abs(c), 1.0)
    keep = size >= tolerance
    if band == "fast":
        keep &= np.abs(c) > _FAST_C
    elif band == "slow":
        keep &= np.abs(c) <= _FAST_C
    kept_power = power[keep]  # the table is sorted by power, so each power is one contiguous run
    groups = tuple(
        (n, int(np.searchsorted(kept_power, n, "left")), int(np.searchsorted(kept_power, n, "right")))
        for n in range(int(power.max()) + 1)
    )
    return a[keep], b[keep], c[keep], groups


def vsop87_term_count(tolerance_rad: float = DEFAULT_TOLERANCE_RAD) -> int:
    """Number of VSOP87D Earth terms (L, B and R together) evaluated at this tolerance.

    >>> vsop87_term_count(0.0)
    2425
    """
    return sum(_terms(c, float(tolerance_rad), False)[0].size for c in "LBR")


def _tau(jd_tt: ArrayLike) -> NDArray:
    return (np.asarray(jd_tt, dtype=float) - _J2000) / JULIAN_MILLENNIUM_DAYS


def _horner(tau: NDArray, coeffs: NDArray) -> NDArray:
    """Σ_n coeffs[:, n] τ^n for a block."""
    out = coeffs[:, -1].copy()
    for n in range(coeffs.shape[1] - 2, -1, -1):
        out = out * tau + coeffs[:, n]
    return out


def _power_sums(values: NDArray, amplitude: NDArray, groups: tuple) -> NDArray:
    """(m, n_powers): Σ_k A_k·values[:, k] over each power's run of terms (numpy loops, no BLAS threads)."""
    out = np.zeros((values.shape[0], len(groups)))
    for n, start, stop in groups:
        if stop > start:
            out[:, n] = np.einsum("ij,j->i", values[:, start:stop], amplitude[start:stop])
    return out


def _series(tau: NDArray, coord: str, tolerance: float, band: str = "all") -> NDArray:
    a, b, c, groups = _terms(coord, tolerance, False, band)
    out = np.empty_like(tau)
    for i in range(0, tau.size, _CHUNK):
        tb = tau[i : i + _CHUNK]
        phase = np.multiply.outer(tb, c)
        phase += b
        np.cos(phase, out=phase)
        out[i : i + _CHUNK] = _horner(tb, _power_sums(phase, a, groups))  # X = Σ_n τ^n Σ_k A cos(B + Cτ)
    return out


def _series_rate(tau: NDArray, coord: str, tolerance: float, band: str = "all") -> NDArray:
    """dX/dτ = Σ_n [n τ^(n−1) S_n(τ) − τ^n Σ_k A_k C_k sin(B_k + C_k τ)] per Julian millennium."""
    a, b, c, groups = _terms(coord, tolerance, True, band)
    n_pow = len(groups)
    out = np.empty_like(tau)
    n_factor = np.arange(n_pow, dtype=float)
    for i in range(0, tau.size, _CHUNK):
        tb = tau[i : i + _CHUNK]
        phase = np.multiply.outer(tb, c)
        phase += b
        cos_sum = _power_sums(np.cos(phase), a, groups)
        sin_sum = _power_sums(np.sin(phase), a * c, groups)
        # d/dτ of τ^n S_n: n τ^(n-1) S_n from the cosine sums, then -τ^n Σ A C sin
        shifted = np.zeros_like(cos_sum)
        shifted[:, :-1] = cos_sum[:, 1:] * n_factor[1:]
        out[i : i + _CHUNK] = _horner(tb, shifted) - _horner(tb, sin_sum)
    return out


def earth_heliocentric_lbr(
    jd_tt: ArrayLike, tolerance_rad: float = DEFAULT_TOLERANCE_RAD, band: str = "all"
) -> tuple[NDArray, NDArray, NDArray]:
    """Heliocentric ecliptic longitude, latitude (radians) and distance (au) of the Earth, VSOP87D.

    Referred to the mean ecliptic and equinox of date (VSOP87's own precession).
    ``L`` is not reduced to 0..2π.

    Parameters
    ----------
    jd_tt : Julian dates of TT, any shape.
    tolerance_rad : drop terms smaller than this over −10000…+3000 (0 = full series).
    band : ``"all"``, or only the terms with periods below (``"fast"``) or above (``"slow"``)
        :data:`FAST_PERIOD_DAYS`; ``fast + slow == all``.  The slow band is smooth enough to be
        sampled every few weeks and interpolated.
    """
    tau = np.asarray(_tau(jd_tt))
    flat = tau.reshape(-1)
    tol = float(tolerance_rad)
    return tuple(  # type: ignore[return-value]
        split_map(functools.partial(_series, coord=c, tolerance=tol, band=band), flat).reshape(tau.shape) for c in "LBR"
    )  # type: ignore[return-value]


def earth_heliocentric_lbr_rates(
    jd_tt: ArrayLike, tolerance_rad: float = RATE_TOLERANCE, band: str = "all"
) -> tuple[NDArray, NDArray, NDArray]:
    """Rates dL/dt, dB/dt (radians per day) and dR/dt (au per day) of VSOP87D, for aberration.

    The default tolerance keeps terms with ``|A|·max(1, |C|)·12^n ≥ 0.02`` (per millennium,
    3e-6 of the Earth's mean motion of 6283 rad per millennium), which holds the Earth's
    velocity to ~1.1e-5 of itself (measured) — 0.0002″ of aberration.  ``band`` as in
    :func:`earth_heliocentric_lbr`.
    """
    tau = np.asarray(_tau(jd_tt))
    flat = tau.reshape(-1)
    tol = float(tolerance_rad)
    return tuple(  # type: ignore[return-value]
        (
            split_map(functools.partial(_series_rate, coord=c, tolerance=tol, band=band), flat) / JULIAN_MILLENNIUM_DAYS
        ).reshape(tau.shape)
        for c in "LBR"
    )
