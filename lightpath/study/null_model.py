"""The null model of a framing test: the same opening turned to a random azimuth.

Null model "random orientation over the sunrise (sunset) arc": the structure is
rotated rigidly about the vertical through the target so that the azimuth its
opening faces is uniform over the arc of the horizon where the Sun rises (if
the opening faces east of the meridian) or sets (if it faces west) at the site
in the epoch studied, between the rising points of the two solstices
(declination ±ε, ε the obliquity of that epoch from the Vondrák et al. 2011
long-term precession; disc centre on the site's skyline, Bennett refraction).
The question it answers: *would a builder who oriented this opening at random
towards the rising Sun have framed this division (or any division) as well?*

Statistics (all from counts):

- the **null rate** k/n — the share of random orientations that frame the
  division (light on a day within ±DAYS of it);
- the **p-value** (k'+1)/(n+1), where k' counts random orientations whose light
  comes at least as close to the division as the surveyed one does (a Monte
  Carlo p-value that never reports 0; Davison & Hinkley 1997, eq. 4.11;
  North, Curtis & Sham 2002);
- the **effect size** as the difference and the ratio of the observed framing
  probability (under the survey's tolerances) and the null rate.

For a narrow slit the null rate has a closed form (:func:`slit_null_rate`).
The Sun's rising azimuth runs over an interval [a_lo, a_hi] during the ±DAYS
around a division (its "run"); an opening whose window covers azimuths
[A + l, A + u] when it faces A frames the division when the two intervals meet,
i.e. when a_lo − u ≤ A ≤ a_hi − l, an interval of length (u − l) + (a_hi − a_lo)
= window width + run.  With A uniform on the arc [α₀, α₁], the chance is the
length of [a_lo − u, a_hi − l] ∩ [α₀, α₁] over α₁ − α₀, i.e. (w + r)/arc away
from the arc's ends.

>>> round(slit_null_rate(2.0, 4.0, (60.0, 120.0), (88.0, 92.0)), 6)  # (2 + 4) / 60
0.1
>>> monte_carlo_p_value(0, 999)
0.001

References
----------
Vondrák, J., Capitaine, N. & Wallace, P. (2011). New precession expressions, valid for
long time intervals. *A&A* 534, A22 (through pyerfa ``ltpecl``/``ltpequ``).
Davison, A. C. & Hinkley, D. V. (1997). *Bootstrap Methods and their Application*,
Cambridge University Press, §4.2 (Monte Carlo tests, p = (1 + k)/(n + 1)).
North, B. V., Curtis, D. & Sham, P. C. (2002). A note on the calculation of empirical
p values from Monte Carlo procedures. *Am. J. Hum. Genet.* 71, 439-441.
Smart, W. M. (1977). *Textbook on Spherical Astronomy*, 6th ed., ch. II (cos A = sin δ / cos φ).
"""

from __future__ import annotations

import math
from dataclasses import dataclass

import numpy as np
from numpy.typing import ArrayLike, NDArray

from lightpath.errors import InputError
from lightpath.study.uncertainty import NULL_STREAM

__all__ = [
    "NULL_MODEL_NAME",
    "NullArc",
    "monte_carlo_p_value",
    "null_azimuths",
    "obliquity_deg",
    "side_for",
    "slit_null_rate",
    "sun_arc",
]

NULL_MODEL_NAME = "random orientation over the sunrise/sunset arc"


def obliquity_deg(year: ArrayLike) -> NDArray:
    """Mean obliquity of the ecliptic, degrees, for a Julian epoch (≈ astronomical year), any epoch.

    The angle between the ecliptic pole and the mean equator's pole of Vondrák et al. (2011).

    >>> round(float(obliquity_deg(2000.0)), 4)
    23.4393
    >>> round(float(obliquity_deg(-3199.0)), 3)
    24.037
    """
    import erfa

    years = np.asarray(year, dtype=float)
    ecl, equ = erfa.ltpecl(years), erfa.ltpequ(years)  # Vondrák et al. (2011): ecliptic and equator poles
    out = np.degrees(np.arccos(np.clip(np.sum(ecl * equ, axis=-1), -1.0, 1.0)))
    return out.reshape(np.shape(year))


@dataclass(frozen=True)
class NullArc:
    """Where the null model points the opening: azimuths ``low_deg``…``high_deg`` (degrees from north)."""

    side: str  # "sunrise" or "sunset"
    low_deg: float
    high_deg: float
    obliquity_deg: float

    @property
    def width_deg(self) -> float:
        """Width of the arc, degrees."""
        return self.high_deg - self.low_deg

    def describe(self) -> str:
        """One line naming the null model and its arc."""
        return (
            f"{NULL_MODEL_NAME}: the structure turned about the vertical through the target so that its opening "
            f"faces an azimuth uniform over the {self.side} arc {self.low_deg:.2f}°–{self.high_deg:.2f}° "
            f"(the Sun's {self.side} points between the solstices, obliquity {self.obliquity_deg:.3f}°)"
        )


def side_for(facing_azimuth_deg: float) -> str:
    """``"sunrise"`` for an opening facing east of the meridian (0–180°), else ``"sunset"``.

    >>> side_for(120.0), side_for(250.0)
    ('sunrise', 'sunset')
    """
    return "sunrise" if 0.0 <= float(facing_azimuth_deg) % 360.0 < 180.0 else "sunset"


def sun_arc(
    latitude_deg: float,
    year: float,
    side: str,
    *,
    horizon=None,
    refraction: str | None = "bennett1982",
    pressure_mbar: float = 1010.0,
    temperature_c: float = 10.0,
) -> NullArc:
    """The arc of horizon azimuths where the Sun rises (or sets) over the year at ``year``.

    Parameters
    ----------
    latitude_deg : site latitude, degrees north.
    year : epoch (astronomical year) for the obliquity.
    side : ``"sunrise"`` or ``"sunset"``.
    horizon : a :class:`lightpath.sky.horizon.HorizonProfile` (apparent skyline) or None (level).

    >>> arc = sun_arc(0.0, 2000, "sunrise", refraction=None)
    >>> round(arc.low_deg, 3), round(arc.high_deg, 3)  # at the equator the arc is 90° ± ε (Smart 1977)
    (66.561, 113.439)
    """
    from lightpath.sky.riseset import rise_set_azimuths

    if side not in ("sunrise", "sunset"):
        raise InputError(f"null model side {side!r} is not sunrise or sunset")
    eps = float(obliquity_deg(float(year)))
    extra = {} if refraction is not None else {"semidiameter_deg": 0.0, "horizontal_parallax_deg": 0.0}
    rise, set_ = rise_set_azimuths(
        np.array([eps, -eps]),
        latitude_deg,
        horizon=horizon,
        refraction=refraction,
        pressure_mbar=pressure_mbar,
        temperature_c=temperature_c,
        **extra,
    )
    az = rise if side == "sunrise" else set_
    if not np.all(np.isfinite(az)):
        raise InputError(
            f"latitude {latitude_deg:g}: the Sun does not rise and set at both solstices; "
            "the sunrise/sunset null model needs a site outside the polar circles"
        )
    return NullArc(side=side, low_deg=float(np.min(az)), high_deg=float(np.max(az)), obliquity_deg=eps)


def null_azimuths(arc: NullArc, n: int, *, seed: int, start: int = 0) -> NDArray:
    """``n`` facing azimuths (degrees) uniform on ``arc``; number *i* from its own child SeedSequence.

    Uses the null stream of the study's seed (independent of the survey draws), so orientation *i*
    is the same whatever ``n`` and however the work is split.

    >>> arc = NullArc("sunrise", 50.0, 130.0, 24.0)
    >>> a = null_azimuths(arc, 4, seed=1)
    >>> bool(np.all((a >= 50) & (a <= 130))), bool(null_azimuths(arc, 2, seed=1, start=2)[0] == a[2])
    (True, True)
    """
    if isinstance(n, bool) or not isinstance(n, int) or n < 0:
        raise InputError(f"--null-draws: {n!r} is not a whole number ≥ 0")
    root = np.random.SeedSequence(int(seed), spawn_key=(NULL_STREAM,))
    u = np.array(
        [
            np.random.default_rng(np.random.SeedSequence(root.entropy, spawn_key=(NULL_STREAM, i))).random()
            for i in range(start, start + n)
        ]
    )
    return arc.low_deg + u * arc.width_deg


def monte_carlo_p_value(k: int, n: int) -> float:
    """(k + 1)/(n + 1): the Monte Carlo p-value of k null draws at least as extreme out of n (Davison & Hinkley 1997).

    >>> monte_carlo_p_value(9, 99)
    0.1
    """
    if n < 0 or k < 0 or k > n:
        raise ValueError(f"counts k={k}, n={n} must satisfy 0 ≤ k ≤ n")
    return (k + 1) / (n + 1)


def slit_null_rate(
    window_width_deg: float,
    run_width_deg: float,
    arc: tuple[float, float] | NullArc,
    run_deg: tuple[float, float],
    window_offsets_deg: tuple[float, float] | None = None,
) -> float:
    """Closed-form null rate for an opening of azimuth width w framing a division whose run is [a_lo, a_hi].

    Parameters
    ----------
    window_width_deg : azimuth width w of the window on the horizon, degrees (used when
        ``window_offsets_deg`` is None, as a window centred on the facing azimuth: l, u = ∓w/2).
    run_width_deg : a_hi − a_lo, degrees (checked against ``run_deg``).
    arc : (α₀, α₁) or a :class:`NullArc`, the facing azimuths of the null model.
    run_deg : (a_lo, a_hi), the Sun's rising (setting) azimuths over the ±DAYS around the division.
    window_offsets_deg : (l, u), the window's azimuths relative to the facing azimuth.

    Returns
    -------
    |[a_lo − u, a_hi − l] ∩ [α₀, α₁]| / (α₁ − α₀), the chance a uniform facing azimuth frames the run.
    """
    lo_arc, hi_arc = (arc.low_deg, arc.high_deg) if isinstance(arc, NullArc) else arc
    a_lo, a_hi = run_deg
    if not math.isclose(a_hi - a_lo, run_width_deg, abs_tol=1e-9):
        raise ValueError("run_width_deg must equal run_deg[1] - run_deg[0]")
    l, u = window_offsets_deg if window_offsets_deg is not None else (-window_width_deg / 2, window_width_deg / 2)
    lo, hi = max(a_lo - u, lo_arc), min(a_hi - l, hi_arc)
    return max(0.0, hi - lo) / (hi_arc - lo_arc)
