"""The one Sun track of the engine: the Sun's direction over a span, computed once and looked up.

A :class:`SunTrack` asks :func:`lightpath.sky.sun.sun_position` for the Sun once per hour over a
span of TT instants, in one batched call, and keeps the topocentric *geometric* hour angle and
declination in the site frame (:mod:`lightpath.light.grid`), with ΔT, its σ and local apparent time.
Any instant inside the span is then a linear interpolation: the hour angle runs at 15° an hour
and the declination changes by less than 0.4° a day, so the curvature left over an hour (from
the diurnal parallax, 8.8″, and the Sun's motion) is below 0.1″; ``tests/test_light_track.py``
compares the track with direct calls.

The air is applied on look-up (:meth:`SunTrack.positions`): refraction by the observer's model and
air (or a realisation's :class:`Air`), plus an anomalous refraction that fades with altitude
(:func:`raise_altitude`).  So one track serves every realisation of a study.

>>> from lightpath.sky.observer import Observer
>>> obs = Observer(latitude_deg=36.2, longitude_deg=14.4)
>>> track = SunTrack(obs, 2461000.0, 2461002.0)
>>> p = track.positions(2461000.75)
>>> round(float(p.altitude_geometric_deg), 3) == round(float(track.direct(2461000.75).altitude_geometric_deg), 3)
True

References
----------
Meeus, J. (1998). *Astronomical Algorithms*, 2nd ed., ch. 13 (hour angle and declination) and
ch. 16 (refraction).
Bennett, G. G. (1982). The calculation of astronomical refraction in marine navigation.
*J. Navigation* 35, 255-259 (the taper of an anomalous refraction with altitude).
"""

from __future__ import annotations

import math
from dataclasses import dataclass

import numpy as np
from numpy.typing import ArrayLike, NDArray

from lightpath.light.disc import SEMIDIAMETER_DEG
from lightpath.light.grid import enu_from_hadec, hadec_from_enu
from lightpath.sky.observer import Observer
from lightpath.sky.refraction import apparent_altitude
from lightpath.sky.vectors import azalt_from_enu, enu_from_azalt

__all__ = ["Air", "SunTrack", "TrackPositions", "raise_altitude"]

#: Spacing of the track's nodes, days (one hour).
NODE_D = 1.0 / 24.0
_DAY_S = 86400.0


@dataclass(frozen=True)
class Air:
    """The air of one realisation: temperature (°C), pressure (mbar) and an anomalous refraction (degrees).

    ``anomaly_deg`` lifts the apparent Sun by that much at the horizon, fading higher up (:func:`raise_altitude`).
    """

    temperature_c: float
    pressure_mbar: float
    anomaly_deg: float = 0.0


@dataclass(frozen=True)
class TrackPositions:
    """The Sun at some instants, as the engine uses it (all arrays of the instants' shape).

    Angles in degrees: azimuth from true north clockwise; altitudes apparent (refracted) and geometric;
    declination and hour angle topocentric in the site frame.  ``jd_ut`` = TT − ΔT;
    ``local_apparent_time_h`` in hours, 0..24.
    """

    jd_tt: NDArray
    jd_ut: NDArray
    azimuth_deg: NDArray
    altitude_deg: NDArray
    altitude_geometric_deg: NDArray
    declination_deg: NDArray
    hour_angle_deg: NDArray
    local_apparent_time_h: NDArray
    delta_t_s: NDArray
    delta_t_sigma_s: NDArray
    source: str

    def directions(self) -> NDArray:
        """Apparent unit directions (N, 3), East-North-Up."""
        return enu_from_azalt(self.azimuth_deg, self.altitude_deg).reshape(-1, 3)


def raise_altitude(sun_enu: ArrayLike, offset_deg: float | ArrayLike, *, taper: bool = True) -> NDArray:
    """Sun directions (M, 3) with their altitude raised by ``offset_deg`` (degrees).

    With ``taper`` the offset is scaled by Bennett's refraction at that altitude over its
    value at the horizon, ``R(h)/R(0)``, so an anomalous refraction near the horizon fades
    higher up (R ∝ cot(h + 7.31/(h + 4.4)), Bennett 1982).  Azimuths are unchanged.

    >>> s = raise_altitude([[0.0, 1.0, 0.0]], 0.5)
    >>> round(float(np.degrees(np.arcsin(s[0, 2]))), 6)
    0.5
    """
    s = np.atleast_2d(np.asarray(sun_enu, dtype=float))
    horiz = np.hypot(s[:, 0], s[:, 1])
    alt = np.arctan2(s[:, 2], horiz)
    offset = np.broadcast_to(np.radians(offset_deg), alt.shape)
    if taper:
        h = np.clip(np.degrees(alt), -1.5, 90.0)
        # Bennett (1982): R = cot(h + 7.31 / (h + 4.4)), h in degrees
        r = 1.0 / np.tan(np.radians(h + 7.31 / (h + 4.4)))
        r0 = 1.0 / np.tan(np.radians(7.31 / 4.4))
        offset = offset * np.clip(r / r0, 0.0, None)
    new_alt = alt + offset
    az = np.arctan2(s[:, 0], s[:, 1])
    norm = np.linalg.norm(s, axis=1)
    out = np.stack([np.cos(new_alt) * np.sin(az), np.cos(new_alt) * np.cos(az), np.sin(new_alt)], axis=1)
    return out * norm[:, None]


class SunTrack:
    """The Sun seen from ``observer`` between two TT instants, sampled hourly in one call (see the module notes).

    Parameters
    ----------
    observer : the site (its air is the default air of :meth:`positions`).
    jd_tt_start, jd_tt_end : the span, Julian dates TT (a day more is kept beyond each end).
    source : Sun position source (``auto``, ``jpl``, ``vsop87``).
    delta_t_s : a fixed ΔT (seconds), or None for the model with its σ.

    The class attributes say what the sweep needs to know of the body (:func:`lightpath.light.year.year_light`
    hands them to :func:`lightpath.light.sweep.find_light`): ``node_d`` (node spacing, days),
    ``disc_semidiameter_deg`` (the disc's radius used for the whole span), ``screen_step_d`` and
    ``screen_slop_deg`` (the declination screen's step and the declination change it allows within half a step).
    :class:`lightpath.light.moontrack.MoonTrack` is the Moon's.
    """

    body = "sun"
    node_d = NODE_D
    disc_semidiameter_deg = SEMIDIAMETER_DEG
    screen_step_d = 0.25  # the Sun's declination moves < 0.4° a day: 0.05° in 3 hours
    screen_slop_deg = 0.1

    def __init__(
        self,
        observer: Observer,
        jd_tt_start: float,
        jd_tt_end: float,
        source: str = "auto",
        delta_t_s: float | None = None,
    ) -> None:
        self.observer = observer
        self.source_option = source
        self.delta_t_option_s = delta_t_s
        # a day of nodes beyond each end: searches look a little past the span they are given
        self.t0 = math.floor(float(jd_tt_start) * 24.0) / 24.0 - 1.0
        n = int(math.ceil((float(jd_tt_end) + 1.0 - self.t0) / self.node_d)) + 2
        self.jd_tt = self.t0 + np.arange(n) * self.node_d
        pos = self.direct(self.jd_tt)
        geo = enu_from_azalt(pos.azimuth_deg, pos.altitude_geometric_deg)
        h, d = hadec_from_enu(observer.latitude_deg, geo)
        self.hour_angle_deg = np.degrees(np.unwrap(np.radians(h)))
        self.declination_deg = np.asarray(d, dtype=float)
        self.lat_h = np.degrees(np.unwrap(np.radians(np.asarray(pos.local_apparent_time_h) * 15.0))) / 15.0
        self.delta_t_s = np.broadcast_to(np.asarray(pos.delta_t_s, dtype=float), self.jd_tt.shape).copy()
        self.delta_t_sigma_s = np.broadcast_to(np.asarray(pos.delta_t_sigma_s, dtype=float), self.jd_tt.shape).copy()
        self.source = pos.source
        self._keep(pos)

    def _keep(self, pos) -> None:
        """Keep more of the nodes' positions (a subclass's hook; the Sun needs nothing more)."""

    @property
    def span(self) -> tuple[float, float]:
        """First and last instants the track can give, Julian dates TT."""
        return float(self.jd_tt[0]), float(self.jd_tt[-1])

    def _weights(self, jd_tt: NDArray) -> tuple[NDArray, NDArray]:
        x = (jd_tt - self.t0) / self.node_d
        i = np.clip(np.floor(x).astype(np.int64), 0, len(self.jd_tt) - 2)
        return i, x - i

    def _lerp(self, values: NDArray, i: NDArray, w: NDArray) -> NDArray:
        return values[i] * (1.0 - w) + values[i + 1] * w

    def positions(self, jd_tt: ArrayLike, air: Air | None = None) -> TrackPositions:
        """The Sun at ``jd_tt`` (any shape) with ``air`` (None: the observer's), see :class:`TrackPositions`."""
        t = np.asarray(jd_tt, dtype=np.float64)
        flat = t.reshape(-1)
        lo, hi = self.span
        if flat.size and (np.nanmin(flat) < lo - 1e-9 or np.nanmax(flat) > hi + 1e-9):
            raise ValueError(f"instants outside the {self.body} track's span {lo:.4f}..{hi:.4f} (JD TT)")
        i, w = self._weights(flat)
        h = self._lerp(self.hour_angle_deg, i, w)
        d = self._lerp(self.declination_deg, i, w)
        az, alt_geo = azalt_from_enu(enu_from_hadec(self.observer.latitude_deg, h, d))
        obs = self.observer
        temperature = obs.temperature_c if air is None else air.temperature_c
        pressure = obs.pressure_mbar if air is None else air.pressure_mbar
        alt = apparent_altitude(alt_geo, obs.refraction, pressure, temperature)
        if air is not None and air.anomaly_deg:
            _, alt = azalt_from_enu(raise_altitude(enu_from_azalt(az, alt), air.anomaly_deg))
        dt = self._lerp(self.delta_t_s, i, w)
        shape = t.shape
        return TrackPositions(
            jd_tt=t,
            jd_ut=(flat - dt / _DAY_S).reshape(shape),
            azimuth_deg=np.asarray(az).reshape(shape),
            altitude_deg=np.asarray(alt).reshape(shape),
            altitude_geometric_deg=np.asarray(alt_geo).reshape(shape),
            declination_deg=d.reshape(shape),
            hour_angle_deg=(((h + 180.0) % 360.0) - 180.0).reshape(shape),
            local_apparent_time_h=np.mod(self._lerp(self.lat_h, i, w), 24.0).reshape(shape),
            delta_t_s=dt.reshape(shape),
            delta_t_sigma_s=self._lerp(self.delta_t_sigma_s, i, w).reshape(shape),
            source=self.source,
        )

    def bound(self, air: Air | None = None):
        """``sun(jd_tt) → TrackPositions`` with ``air`` fixed: the form the sweep takes."""

        def sun(jd_tt):
            return self.positions(jd_tt, air)

        return sun

    def direct(self, jd_tt: ArrayLike):
        """The Sun computed directly (not interpolated) at ``jd_tt``: for checks and single instants."""
        from lightpath.sky.sun import sun_position

        return sun_position(jd_tt, self.observer, source=self.source_option, delta_t_s=self.delta_t_option_s)
