"""Where the Sun rises and sets: azimuths for a declination, on a flat horizon or a skyline profile.

For a Sun of fixed declination δ seen from latitude φ, the rising (setting) azimuth is where the chosen
point of the disc meets the skyline:

* ``limb="centre"`` — the centre of the disc on the skyline (the usual almanac sunrise uses the upper limb);
* ``limb="upper"`` — the upper limb on the skyline: the **first gleam** at sunrise, the last gleam at sunset;
* ``limb="lower"`` — the lower limb on the skyline: the **full disc** just clear at sunrise, the last moment
  of the full disc at sunset.

The skyline altitude is *apparent* (as measured in the field); refraction is removed at the skyline's own
altitude (the limb point is seen there), so the geocentric geometric altitude of the disc centre at the event is

    h0 = geometric(a_skyline) − k·s + π·cos(h0),      k = 0 (centre), +1 (upper limb), −1 (lower limb),

with s the Sun's semidiameter and π its horizontal parallax (8.794″ at 1 au; Meeus 1998 ch. 40).  The
declination is held fixed during the day (the Sun's declination moves at most 0.4° per day, near the
equinoxes; between sunrise and sunset that moves the azimuth by up to ~0.2°: evaluate at the instant you
care about).  Geocentric declination is used with the topocentric correction only through π (the Sun's
parallax in declination is < 9″).

On a flat horizon (``horizon=None`` or a constant profile) the hour angle comes from the closed form
cos H₀ = (sin h0 − sin φ sin δ) / (cos φ cos δ) (Meeus 1998 eq. 15.1).  On a profile the Sun's diurnal
circle is sampled every 0.05° of hour angle (12 s of time) and the first upward (last downward) crossing of
the skyline is refined by bisection to 1e-9° of hour angle; skyline features narrower than about 0.05° of
azimuth can be missed.

>>> rise, set_ = rise_set_azimuths(0.0, 0.0, refraction=None, semidiameter_deg=0.0, horizontal_parallax_deg=0.0)
>>> round(float(rise), 6), round(float(set_), 6)
(90.0, 270.0)
>>> rise, set_ = rise_set_azimuths([-23.44, 23.44], 53.0)   # disc centre, Bennett refraction, sea-level air
>>> rise.round(2).tolist(), set_.round(2).tolist()
([130.37, 47.6], [229.63, 312.4])

References
----------
Meeus, J. (1998). *Astronomical Algorithms*, 2nd ed., Willmann-Bell: eq. 13.5–13.6 (azimuth and altitude
from hour angle), eq. 15.1 (hour angle at a given altitude), ch. 40 (solar parallax 8.794″).

Smart, W. M. (1977). *Textbook on Spherical Astronomy*, 6th ed., Cambridge University Press, ch. II
(the astronomical triangle; on the horizon cos A = sin δ / cos φ).

Bennett, G. G. (1982). The calculation of astronomical refraction in marine navigation. *Journal of
Navigation* 35, 255–259 (through :mod:`lightpath.sky.refraction`).

:func:`rise_set_instants` gives the *instants* of the same events (upper limb at apparent altitude 0 by
default, the almanac definition; Meeus 1998 ch. 15 and Urban & Seidelmann 2012 ch. 14 use a fixed −50′
for the centre instead), over a flat horizon or a skyline, from the Sun's topocentric geometric altitude.

Urban, S. E. & Seidelmann, P. K., eds. (2012). *Explanatory Supplement to the Astronomical Almanac*, 3rd ed.,
University Science Books, ch. 14 (sunrise and sunset: the upper limb on the horizon).
"""

from __future__ import annotations

from collections.abc import Callable
from typing import Literal

import numpy as np
from numpy.typing import ArrayLike, NDArray

from lightpath.errors import InputError
from lightpath.sky.horizon import HorizonProfile, horizon_dip_deg
from lightpath.sky.refraction import REFRACTION_MODELS, geometric_altitude

__all__ = [
    "LIMBS",
    "MEAN_SEMIDIAMETER_DEG",
    "SOLAR_PARALLAX_DEG",
    "azimuth_altitude_from_hour_angle",
    "rise_set_azimuths",
    "rise_set_instants",
]

Limb = Literal["centre", "upper", "lower"]

#: Accepted ``limb`` values: disc centre, upper limb (first gleam), lower limb (full disc).
LIMBS = ("centre", "upper", "lower")
_LIMB_SIGN = {"centre": 0.0, "upper": 1.0, "lower": -1.0}

#: Mean apparent semidiameter of the Sun, degrees (959.63″ at 1 au; Meeus 1998 ch. 55, from memory → 0.26656°).
MEAN_SEMIDIAMETER_DEG = 0.2666

#: Equatorial horizontal parallax of the Sun at 1 au, degrees (8.794″; Meeus 1998 ch. 40).
SOLAR_PARALLAX_DEG = 8.794 / 3600.0

_INSTANT_BISECT_STEPS = 24  # 1 min / 2**24 ≈ 4 µs
_PROFILE_STEP_DEG = 0.05  # hour-angle sampling of the diurnal circle on a skyline profile
_BISECT_STEPS = 40  # 0.05° / 2**40 ≈ 5e-14°


def azimuth_altitude_from_hour_angle(
    hour_angle_deg: ArrayLike, declination_deg: ArrayLike, latitude_deg: ArrayLike
) -> tuple[NDArray, NDArray]:
    """Azimuth (from north, clockwise) and geometric altitude of a point of given hour angle and declination.

    All in degrees; broadcasts over its inputs.

    >>> az, alt = azimuth_altitude_from_hour_angle(-90.0, 0.0, 45.0)
    >>> round(float(az), 9), round(float(alt), 9)
    (90.0, 0.0)

    References
    ----------
    Meeus (1998) eq. 13.5 and 13.6, with the azimuth counted from north instead of south.
    """
    h = np.radians(np.asarray(hour_angle_deg, dtype=float))
    d = np.radians(np.asarray(declination_deg, dtype=float))
    p = np.radians(np.asarray(latitude_deg, dtype=float))
    sin_alt = np.sin(p) * np.sin(d) + np.cos(p) * np.cos(d) * np.cos(h)  # Meeus (1998) eq. 13.6
    # Meeus (1998) eq. 13.5 turned to north-based azimuth: tan A = -cos δ sin H / (sin δ cos φ - cos δ cos H sin φ)
    y = -np.cos(d) * np.sin(h)
    x = np.sin(d) * np.cos(p) - np.cos(d) * np.cos(h) * np.sin(p)
    az = np.mod(np.degrees(np.arctan2(y, x)), 360.0)
    return az, np.degrees(np.arcsin(np.clip(sin_alt, -1.0, 1.0)))


def _check(limb: str, refraction: str | None) -> None:
    if limb not in LIMBS:
        raise InputError(f"limb {limb!r} is not one of {', '.join(LIMBS)}")
    if refraction is not None and refraction not in REFRACTION_MODELS:
        raise InputError(f"refraction {refraction!r} is not one of {', '.join(REFRACTION_MODELS)} or None")


def _centre_altitude_at_event(skyline_apparent_deg, limb, refraction, pressure_mbar, temperature_c, s_deg, p_deg):
    """Geocentric geometric altitude (deg) of the disc centre when the chosen limb sits on the skyline."""
    topo_limb = geometric_altitude(skyline_apparent_deg, refraction, pressure_mbar, temperature_c)
    topo_centre = topo_limb - _LIMB_SIGN[limb] * s_deg
    # topocentric = geocentric − π cos h (Meeus 1998 ch. 40), so geocentric = topocentric + π cos h.
    return topo_centre + p_deg * np.cos(np.radians(topo_centre))


def _flat(dec, lat, h0):
    d, p, a0 = np.radians(dec), np.radians(lat), np.radians(h0)
    with np.errstate(invalid="ignore", divide="ignore"):
        cos_h = (np.sin(a0) - np.sin(p) * np.sin(d)) / (np.cos(p) * np.cos(d))  # Meeus (1998) eq. 15.1
    ok = np.abs(cos_h) <= 1.0
    h_deg = np.degrees(np.arccos(np.where(ok, cos_h, np.nan)))
    rise, _ = azimuth_altitude_from_hour_angle(-h_deg, dec, lat)
    set_, _ = azimuth_altitude_from_hour_angle(h_deg, dec, lat)
    return rise, set_


def _profile(dec, lat, profile: HorizonProfile, target):
    """First up-crossing and last down-crossing of the skyline along the diurnal circle, per declination."""
    grid = np.arange(-180.0, 180.0 + 0.5 * _PROFILE_STEP_DEG, _PROFILE_STEP_DEG)  # from lower culmination
    dec_col = dec.reshape(-1, 1)

    def excess(hour_angle):  # > 0 where the chosen limb is above the skyline
        az, alt = azimuth_altitude_from_hour_angle(hour_angle, dec_col, lat)
        return alt - target(profile.altitude_at(az))

    g = excess(grid[None, :])
    above = g > 0.0
    up = ~above[:, :-1] & above[:, 1:]
    down = above[:, :-1] & ~above[:, 1:]
    n = dec.size
    rows = np.arange(n)
    has_up, has_down = up.any(axis=1), down.any(axis=1)
    i_up = np.argmax(up, axis=1)
    i_down = up.shape[1] - 1 - np.argmax(down[:, ::-1], axis=1)

    def refine(i, rising):
        lo, hi = grid[i].astype(float), grid[i + 1].astype(float)
        for _ in range(_BISECT_STEPS):
            mid = 0.5 * (lo + hi)
            pos = excess(mid[:, None])[rows, 0] > 0.0
            go_hi = pos if rising else ~pos  # keep the crossing inside [lo, hi]
            hi = np.where(go_hi, mid, hi)
            lo = np.where(go_hi, lo, mid)
        return 0.5 * (lo + hi)

    h_rise = np.where(has_up, refine(i_up, True), np.nan)
    h_set = np.where(has_down, refine(i_down, False), np.nan)
    rise, _ = azimuth_altitude_from_hour_angle(h_rise, dec, lat)
    set_, _ = azimuth_altitude_from_hour_angle(h_set, dec, lat)
    return rise, set_


def rise_set_azimuths(
    declination_deg: ArrayLike,
    latitude_deg: float,
    *,
    horizon: HorizonProfile | None = None,
    limb: Limb = "centre",
    refraction: str | None = "bennett1982",
    pressure_mbar: float = 1010.0,
    temperature_c: float = 10.0,
    semidiameter_deg: ArrayLike = MEAN_SEMIDIAMETER_DEG,
    elevation_m: float = 0.0,
    horizontal_parallax_deg: float = SOLAR_PARALLAX_DEG,
) -> tuple[NDArray, NDArray]:
    """Sunrise and sunset azimuths (degrees from true north, clockwise) for Sun declinations.

    Parameters
    ----------
    declination_deg : geocentric apparent declination(s) of the Sun, degrees; any shape.
    latitude_deg : observer's latitude, degrees north.
    horizon : skyline profile (apparent altitudes); ``None`` = a level horizon, dipped for ``elevation_m``.
    limb : ``"centre"``, ``"upper"`` (first gleam at sunrise / last gleam at sunset) or ``"lower"`` (full disc).
    refraction : ``"bennett1982"``, ``"saemundsson1986"`` or ``None`` (geometric).
    pressure_mbar, temperature_c : air for the refraction model (millibars, degrees Celsius).
    semidiameter_deg : the Sun's apparent semidiameter, degrees (scalar or broadcasting with the declinations).
    elevation_m : height of the eye above a *level* horizon such as the sea, metres; only used when
        ``horizon`` is None, to dip it by 1.76′·√h (Bowditch 2002, via :func:`horizon_dip_deg`).  It is not
        the site's height above sea level: inland, describe the real skyline with a profile.
    horizontal_parallax_deg : the Sun's horizontal parallax, degrees (8.794″ at 1 au; 0 to ignore it).

    Returns
    -------
    (rise_azimuth_deg, set_azimuth_deg), arrays shaped like ``declination_deg``; nan where the chosen limb
    never crosses the skyline that day (polar day or night, or a Sun hidden all day by the skyline).
    On a profile with several crossings, sunrise is the first upward crossing after lower culmination and
    sunset the last downward one.

    Examples
    --------
    Closed form (refraction off, disc centre, altitude 0): cos A = sin δ / cos φ.

    >>> rise, _ = rise_set_azimuths(20.0, 40.0, refraction=None, semidiameter_deg=0.0, horizontal_parallax_deg=0.0)
    >>> round(float(rise), 6) == round(float(np.degrees(np.arccos(np.sin(np.radians(20)) / np.cos(np.radians(40))))), 6)
    True
    """
    _check(limb, refraction)
    dec = np.asarray(declination_deg, dtype=float)
    lat = float(latitude_deg)
    if not (np.isfinite(lat) and -90.0 <= lat <= 90.0):
        raise InputError(f"latitude {latitude_deg!r} is outside -90..90 degrees")
    shape = dec.shape
    flat_dec = dec.reshape(-1)
    s_deg = np.broadcast_to(np.asarray(semidiameter_deg, dtype=float), shape).reshape(-1)

    def target(skyline):
        return _centre_altitude_at_event(
            skyline,
            limb,
            refraction,
            pressure_mbar,
            temperature_c,
            s_deg.reshape(-1, *([1] * (skyline.ndim - 1))),
            horizontal_parallax_deg,
        )

    constant = None
    if horizon is None:
        if not (np.isfinite(elevation_m) and elevation_m >= 0.0):
            raise InputError(f"elevation_m {elevation_m!r} must be >= 0 metres above the level horizon")
        constant = -float(horizon_dip_deg(elevation_m))
    elif np.ptp(horizon.altitude_deg) == 0.0:
        constant = float(horizon.altitude_deg[0])
    if constant is not None:
        h0 = _centre_altitude_at_event(
            np.full(flat_dec.shape, constant),
            limb,
            refraction,
            pressure_mbar,
            temperature_c,
            s_deg,
            horizontal_parallax_deg,
        )
        rise, set_ = _flat(flat_dec, lat, h0)
    elif flat_dec.size == 0:
        rise, set_ = flat_dec.copy(), flat_dec.copy()
    else:
        rise, set_ = _profile(flat_dec, lat, horizon, target)
    rise = np.where(np.isnan(flat_dec), np.nan, rise).reshape(shape)
    set_ = np.where(np.isnan(flat_dec), np.nan, set_).reshape(shape)
    return (rise[()], set_[()]) if not shape else (rise, set_)


#: ``sun_fn(jd_ut) -> (azimuth_deg, topocentric geometric altitude_deg, semidiameter_deg)`` at UT instants.
SunTrack = Callable[[NDArray], tuple[NDArray, NDArray, NDArray]]


def _sun_track(observer, source: str) -> SunTrack:
    from lightpath.sky.deltat import tt_from_ut
    from lightpath.sky.sun import sun_position

    def track(jd_ut: NDArray):
        pos = sun_position(tt_from_ut(jd_ut), observer, source=source)
        return pos.azimuth_deg, pos.altitude_geometric_deg, pos.semidiameter_deg

    return track


def rise_set_instants(
    day_start_jd_ut: ArrayLike,
    observer,
    *,
    horizon: HorizonProfile | None = None,
    limb: Limb = "upper",
    source: str = "auto",
    sun_fn: SunTrack | None = None,
    step_min: float = 1.0,
) -> tuple[NDArray, NDArray]:
    """Sunrise and sunset instants (JD UT) in the 24 h after each ``day_start_jd_ut``; nan when there is none.

    Sunrise is the first instant of the day at which the chosen point of the disc (``"upper"`` limb by
    default) rises to the skyline's apparent altitude, sunset the last at which it sinks to it.  Refraction
    (the observer's model and air) is removed at the skyline's altitude, where the limb is seen, so the event
    is when the Sun's topocentric geometric altitude h satisfies

        h + k·s = geometric(a_skyline(A)),      k = +1 (upper limb), 0 (centre), −1 (lower limb),

    with s the topocentric semidiameter and A the Sun's azimuth; on the astronomical horizon (``horizon``
    None) a_skyline = 0, so the upper limb stands at apparent altitude 0 — the same rule as
    :func:`rise_set_azimuths`.  The day is sampled every ``step_min`` minutes and each crossing refined by
    bisection to a few microseconds; skyline features passed in less than a step can be missed.

    Parameters
    ----------
    day_start_jd_ut : start(s) of the days (e.g. local midnights), JD UT; any shape.
    observer : :class:`~lightpath.sky.observer.Observer` (site and air).
    horizon : skyline profile (apparent altitudes), or None for the astronomical horizon (apparent 0°).
    limb : ``"upper"`` (first/last gleam; the almanac sunrise), ``"centre"`` or ``"lower"``.
    source : Sun source for :func:`lightpath.sky.sun.sun_position` (ΔT from the model).
    sun_fn : instead of ``source``, a function of JD UT giving (azimuth, geometric altitude, semidiameter), deg.
    step_min : sampling step, minutes.

    Returns
    -------
    (rise_jd_ut, set_jd_ut), shaped like ``day_start_jd_ut``.

    Examples
    --------
    >>> from lightpath.sky.calendar import julian_day
    >>> from lightpath.sky.observer import Observer
    >>> rise, set_ = rise_set_instants(julian_day(2027, 3, 20.0), Observer(0.0, 0.0), source="jpl")
    >>> round(float((set_ - rise) * 24), 2)   # equator at the equinox: the day outlasts the night by refraction
    12.11

    References
    ----------
    Urban & Seidelmann (2012) ch. 14; Meeus (1998) ch. 15 (a sampled altitude with interpolation) and ch. 16.
    """
    _check(limb, observer.refraction)
    starts = np.asarray(day_start_jd_ut, dtype=float)
    shape = starts.shape
    start = starts.reshape(-1)
    sun_fn = sun_fn or _sun_track(observer, source)
    k = _LIMB_SIGN[limb]
    step = float(step_min) / 1440.0

    def excess(jd: NDArray) -> NDArray:  # > 0 where the chosen limb is above the skyline
        az, alt, semi = (np.asarray(v, dtype=float) for v in sun_fn(jd))
        sky = np.zeros_like(alt) if horizon is None else np.asarray(horizon.altitude_at(az), dtype=float)
        if observer.refraction is not None:
            sky = geometric_altitude(sky, observer.refraction, observer.pressure_mbar, observer.temperature_c)
        return alt + k * semi - sky

    n_steps = int(np.ceil(1.0 / step))
    grid = start[:, None] + np.arange(n_steps + 1)[None, :] * step
    up = excess(grid.ravel()).reshape(grid.shape) > 0.0
    rising = ~up[:, :-1] & up[:, 1:]
    setting = up[:, :-1] & ~up[:, 1:]
    i_rise = np.argmax(rising, axis=1)
    i_set = rising.shape[1] - 1 - np.argmax(setting[:, ::-1], axis=1)

    def refine(i: NDArray, found: NDArray, going_up: bool) -> NDArray:
        lo = start + i * step
        hi = lo + step
        for _ in range(_INSTANT_BISECT_STEPS):
            mid = 0.5 * (lo + hi)
            above = excess(mid) > 0.0
            to_lo = above if going_up else ~above  # the crossing lies before mid
            hi = np.where(to_lo, mid, hi)
            lo = np.where(to_lo, lo, mid)
        return np.where(found & np.isfinite(start), 0.5 * (lo + hi), np.nan)

    rise = refine(i_rise, rising.any(axis=1), True).reshape(shape)
    set_ = refine(i_set, setting.any(axis=1), False).reshape(shape)
    return (rise[()], set_[()]) if not shape else (rise, set_)
