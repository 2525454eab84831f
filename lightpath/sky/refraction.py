"""Atmospheric refraction near the horizon: Bennett (1982) and Sæmundsson (1986).

Refraction ``R`` lifts a body: apparent altitude = geometric altitude + R.
Both published formulas give ``R`` in arcminutes for a standard atmosphere
(1010 mbar, 10 °C) and are scaled to other air by the factor
``(P / 1010) · (283 / (273 + T))`` (Meeus 1998, chapter 16).  Each carries the
small constant Meeus gives to make ``R`` exactly zero at the zenith (0.08″ and
0.12″), so refraction is never negative.

* :func:`refraction_bennett1982` takes the **apparent** altitude (what an
  observer sees) — R ≈ 34.5′ at 0°.
* :func:`refraction_saemundsson1986` takes the **geometric** (true) altitude.

:func:`apparent_altitude` and :func:`geometric_altitude` turn one into the
other with either model (or none) and are exact inverses of each other (Newton
iteration to better than 1e-9°).

Below the horizon.  Both formulas reach a largest value a little below the
horizon (Bennett at an apparent altitude of −1.696°, Sæmundsson at a geometric
altitude of −1.901°) and then fall off to nonsense (Bennett's has a pole at
−4.4°).  Below those points we hold ``R`` at that largest value (≈ 0.95° for
Bennett, ≈ 0.74° for Sæmundsson at standard air), so altitude maps stay
continuous, monotonic and invertible for any input; a sun that far below a
sea horizon is not seen anyway, and a sight line dipping below the astronomical
horizon from a height is rare and uncertain far beyond either formula.

>>> round(float(refraction_bennett1982(0.0)) * 60, 1)  # arcminutes at the horizon
34.5
>>> h = apparent_altitude(0.0)
>>> round(float(h), 4)
0.4822
>>> round(float(geometric_altitude(h)), 9)
0.0

References
----------
Bennett, G. G. (1982). The calculation of astronomical refraction in marine
navigation. *Journal of Navigation* 35(2), 255–259.

Sæmundsson, Þ. (1986). Astronomical refraction. *Sky and Telescope* 72, 70.

Meeus, J. (1998). *Astronomical Algorithms*, 2nd ed., Willmann-Bell,
chapter 16 "Atmospheric Refraction".
"""

from __future__ import annotations

from typing import Literal

import numpy as np
from numpy.typing import ArrayLike, NDArray

from lightpath.errors import InputError

__all__ = [
    "REFRACTION_MODELS",
    "apparent_altitude",
    "geometric_altitude",
    "refraction_bennett1982",
    "refraction_saemundsson1986",
]

RefractionModel = Literal["bennett1982", "saemundsson1986"] | None

#: Accepted model names (``None`` = no refraction).
REFRACTION_MODELS = ("bennett1982", "saemundsson1986")

#: Standard air of both formulas (Meeus 1998, ch. 16): millibars, degrees Celsius.
STANDARD_PRESSURE_MBAR = 1010.0
STANDARD_TEMPERATURE_C = 10.0

# Bennett (1982): R' = 1 / tan(h0 + 7.31 / (h0 + 4.4)), h0 apparent, degrees → arcminutes.
_B_A, _B_B = 7.31, 4.4
# Sæmundsson (1986): R' = 1.02 / tan(h + 10.3 / (h + 5.11)), h geometric, degrees → arcminutes.
_S_K, _S_A, _S_B = 1.02, 10.3, 5.11
# Meeus (1998) ch. 16: adding these (arcminutes) makes each formula give exactly R = 0 at the zenith
# (otherwise -0.08″ and -0.12″); computed here as -k·cot(90° + a/(90+b)) rather than typed in.
_B_ZENITH_ARCMIN = float(-1.0 / np.tan(np.radians(90.0 + _B_A / (90.0 + _B_B))))  # 0.0013515′
_S_ZENITH_ARCMIN = float(-_S_K / np.tan(np.radians(90.0 + _S_A / (90.0 + _S_B))))  # 0.0019279′
# Where each formula peaks (d arg / dh = 0 → h = sqrt(a) - b); R is held constant below.
_B_FLOOR_DEG = float(np.sqrt(_B_A) - _B_B)  # -1.6963° apparent
_S_FLOOR_DEG = float(np.sqrt(_S_A) - _S_B)  # -1.9006° geometric


def _air_factor(pressure_mbar: ArrayLike, temperature_c: ArrayLike) -> NDArray:
    # Meeus (1998) ch. 16: R scales with (P/1010)·(283/(273+T)).
    p = np.asarray(pressure_mbar, dtype=float)
    t = np.asarray(temperature_c, dtype=float)
    return (p / STANDARD_PRESSURE_MBAR) * (283.0 / (273.0 + t))


def _cot_model(
    h_deg: NDArray, k: float, a: float, b: float, floor_deg: float, zenith_arcmin: float
) -> tuple[NDArray, NDArray]:
    """R (degrees) = (k·cot(h + a/(h+b)) + c)/60 for h ≥ floor, held constant below; and dR/dh."""
    hc = np.maximum(h_deg, floor_deg)
    arg_rad = np.radians(hc + a / (hc + b))
    sin_arg = np.sin(arg_rad)
    r_deg = (k * np.cos(arg_rad) / sin_arg + zenith_arcmin) / 60.0
    # d/dh cot(x) = -csc²(x)·dx/dh, x in radians; dx/dh = (1 - a/(h+b)²)·π/180.
    dr = -(k / 60.0) / sin_arg**2 * (1.0 - a / (hc + b) ** 2) * (np.pi / 180.0)
    dr = np.where(h_deg > floor_deg, dr, 0.0)
    return r_deg, dr


# (k, a, b, floor_deg, zenith_arcmin) of each formula for _cot_model.
_COEFFS = {
    "bennett1982": (1.0, _B_A, _B_B, _B_FLOOR_DEG, _B_ZENITH_ARCMIN),  # Bennett (1982); Meeus (1998) ch. 16
    "saemundsson1986": (_S_K, _S_A, _S_B, _S_FLOOR_DEG, _S_ZENITH_ARCMIN),  # Sæmundsson (1986); Meeus (1998) ch. 16
}


def _model(name: str, h_deg: NDArray) -> tuple[NDArray, NDArray]:
    """R at standard air (degrees) and dR/dh of the formula ``name`` at its own kind of altitude ``h_deg``."""
    return _cot_model(h_deg, *_COEFFS[name])


def _scaled(name: str, altitude_deg: ArrayLike, pressure_mbar: ArrayLike, temperature_c: ArrayLike) -> NDArray:
    """R (degrees) of the formula ``name`` in the given air: the body of both public ``refraction_*`` functions."""
    r, _ = _model(name, np.asarray(altitude_deg, dtype=float))
    return r * _air_factor(pressure_mbar, temperature_c)


def refraction_bennett1982(
    apparent_altitude_deg: ArrayLike,
    pressure_mbar: ArrayLike = STANDARD_PRESSURE_MBAR,
    temperature_c: ArrayLike = STANDARD_TEMPERATURE_C,
) -> NDArray:
    """Refraction in degrees for an **apparent** altitude, Bennett (1982).

    Parameters
    ----------
    apparent_altitude_deg : apparent (refracted) altitude of the point seen, degrees.
    pressure_mbar : air pressure, millibars (hPa); 0 turns refraction off.
    temperature_c : air temperature, degrees Celsius.

    Returns
    -------
    Refraction R in degrees (geometric = apparent − R), same shape as the broadcast inputs.
    Held at its largest value (0.948° at standard air) below −1.696° apparent.

    >>> round(float(refraction_bennett1982(0.0, 1010.0, 10.0)), 4)
    0.5746
    >>> refraction_bennett1982([45.0, 10.0]).round(5)
    array([0.0166 , 0.08988])

    References
    ----------
    Bennett, G. G. (1982). *Journal of Navigation* 35, 255–259; Meeus (1998) ch. 16
    for the pressure and temperature factor.
    """
    return _scaled("bennett1982", apparent_altitude_deg, pressure_mbar, temperature_c)


def refraction_saemundsson1986(
    geometric_altitude_deg: ArrayLike,
    pressure_mbar: ArrayLike = STANDARD_PRESSURE_MBAR,
    temperature_c: ArrayLike = STANDARD_TEMPERATURE_C,
) -> NDArray:
    """Refraction in degrees for a **geometric** (true) altitude, Sæmundsson (1986).

    Parameters
    ----------
    geometric_altitude_deg : geometric (unrefracted) altitude, degrees.
    pressure_mbar : air pressure, millibars (hPa).
    temperature_c : air temperature, degrees Celsius.

    Returns
    -------
    Refraction R in degrees (apparent = geometric + R). Held at its largest value
    (0.744° at standard air) below −1.901° geometric.

    >>> round(float(refraction_saemundsson1986(0.0)) * 60, 2)  # arcminutes
    28.98

    References
    ----------
    Sæmundsson, Þ. (1986). *Sky and Telescope* 72, 70; Meeus (1998) ch. 16.
    """
    return _scaled("saemundsson1986", geometric_altitude_deg, pressure_mbar, temperature_c)


def _check_model(model: str | None) -> None:
    if model is not None and model not in REFRACTION_MODELS:
        raise InputError(f"refraction model {model!r} is not one of {', '.join(REFRACTION_MODELS)} or None")


_NEWTON_STEPS = 6  # quadratic convergence from a start within ~0.3°: far below 1e-9° after 6 steps


def _convert(
    altitude_deg: ArrayLike,
    model: RefractionModel,
    pressure_mbar: ArrayLike,
    temperature_c: ArrayLike,
    to_apparent: bool,
) -> NDArray:
    """Geometric → apparent (``to_apparent``) or apparent → geometric altitude, degrees, by ``model``.

    The formula whose argument is the given altitude (Sæmundsson towards apparent, Bennett towards
    geometric) applies directly; the other is inverted by Newton's method from the first one's answer.
    """
    _check_model(model)
    h = np.asarray(altitude_deg, dtype=float)
    if model is None:
        return h.copy()
    f = _air_factor(pressure_mbar, temperature_c)
    s = 1.0 if to_apparent else -1.0  # apparent = geometric + f·R
    direct = "saemundsson1986" if to_apparent else "bennett1982"
    if model == direct:
        r, _ = _model(direct, h)
        return h + s * f * r
    # solve x - s·f·R(x) = h for x, the altitude the model takes as argument
    x = h + s * f * _model(direct, h)[0]
    for _ in range(_NEWTON_STEPS):
        r, dr = _model(model, x)
        x = x - (x - s * f * r - h) / (1.0 - s * f * dr)
    return x


def apparent_altitude(
    geometric_altitude_deg: ArrayLike,
    model: RefractionModel = "bennett1982",
    pressure_mbar: ArrayLike = STANDARD_PRESSURE_MBAR,
    temperature_c: ArrayLike = STANDARD_TEMPERATURE_C,
) -> NDArray:
    """Apparent altitude (degrees) seen for a geometric altitude, by ``model``.

    ``model`` is ``"bennett1982"``, ``"saemundsson1986"`` or ``None`` (returns the
    geometric altitude unchanged).  The exact inverse of :func:`geometric_altitude`.

    >>> round(float(apparent_altitude(-0.5746)), 4)  # a sun whose centre sits on the sea horizon
    0.0
    >>> apparent_altitude([10.0, np.nan], model=None)
    array([10., nan])
    """
    return _convert(geometric_altitude_deg, model, pressure_mbar, temperature_c, to_apparent=True)


def geometric_altitude(
    apparent_altitude_deg: ArrayLike,
    model: RefractionModel = "bennett1982",
    pressure_mbar: ArrayLike = STANDARD_PRESSURE_MBAR,
    temperature_c: ArrayLike = STANDARD_TEMPERATURE_C,
) -> NDArray:
    """Geometric altitude (degrees) of a point seen at an apparent altitude, by ``model``.

    The exact inverse of :func:`apparent_altitude` (to better than 1e-9°).

    >>> round(float(geometric_altitude(0.0)), 4)
    -0.5746
    >>> round(float(geometric_altitude(0.0, "saemundsson1986")), 4)
    -0.5739
    """
    return _convert(apparent_altitude_deg, model, pressure_mbar, temperature_c, to_apparent=False)
