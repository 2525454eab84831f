"""The Moon's track for the engine: the Sun's track (:class:`~lightpath.light.track.SunTrack`) fed by
:func:`lightpath.sky.moon.moon_position`, with finer nodes, the Moon's size and phase, and a gate.

The engine looks the body up by linear interpolation of its topocentric geometric hour angle and declination
between nodes.  The Moon's diurnal parallax (up to about 1°) bends its topocentric path more than the Sun's
8.8″ do, and its declination moves up to about 6.5° a day, so the nodes are 10 minutes apart
(:data:`MOON_NODE_D`): measured against direct :func:`~lightpath.sky.moon.moon_position` calls the interpolation
errs by at most about 1″ (``tests/test_light_moon.py`` holds it below 2″).

Besides the Sun track's fields the nodes keep the Moon's topocentric semidiameter, its illuminated fraction and
phase angle, and the Sun's apparent altitude.  **The gate**: moonlight counts only while the Sun's apparent
altitude is below ``sun_below_deg`` (−6°, the end of civil twilight: common practice, no published source) and
the illuminated fraction is at least ``min_illuminated_fraction``.  :meth:`MoonTrack.positions` returns the
nadir (altitude −90°, below every horizon, so no light) for gated instants; the sweep therefore finds a
gate's opening and closing like any other edge of light and bisects them.  The declination stays the Moon's,
so the sweep's declination screen is unaffected.

**One disc per year.** The window's disc tables are made for one radius; the track gives the median of its
nodes' semidiameters rounded to :data:`SEMIDIAMETER_STEP_DEG`, so every year of a span reuses the same tables.
The true semidiameter runs 0.245–0.279°; a disc too small or too large by up to 0.017° moves first gleam and
last light by that angle over the Moon's rate across the window's edge (about 0.24° a minute in hour angle on a
perpendicular crossing): a few seconds, measured in ``docs/moon.md``.

>>> from lightpath.sky.observer import Observer
>>> t = MoonTrack(Observer(30.0, 31.0), 2460755.0, 2460756.0)
>>> t.body, round(t.disc_semidiameter_deg, 3) in (0.25, 0.255, 0.26, 0.265, 0.27, 0.275)
('moon', True)

References
----------
Meeus, J. (1998). *Astronomical Algorithms*, 2nd ed., ch. 40 (parallax), 48 (illuminated fraction).
Krisciunas, K., & Schaefer, B. E. (1991). A model of the brightness of moonlight. *PASP* 103, 1033–1039
(eq. 20: the Moon's magnitude against its phase angle).
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np
from numpy.typing import ArrayLike, NDArray

from lightpath.light.track import Air, SunTrack, TrackPositions
from lightpath.sky.observer import Observer

__all__ = ["MOON_NODE_D", "SEMIDIAMETER_STEP_DEG", "MoonTrack", "MoonTrackPositions", "relative_brightness"]

#: Spacing of the Moon track's nodes, days (10 minutes).
MOON_NODE_D = 1.0 / 144.0
#: The year's disc radius is the median semidiameter rounded to this, degrees (so tables are reused).
SEMIDIAMETER_STEP_DEG = 0.005


def relative_brightness(phase_angle_deg: ArrayLike) -> NDArray:
    """The Moon's brightness against the full Moon's at the same distance, from its phase angle (degrees).

    Krisciunas & Schaefer (1991) eq. 20: V = −12.73 + 0.026 |α| + 4 × 10⁻⁹ α⁴ (α in degrees), so the ratio
    is 10^(−0.4 (0.026 |α| + 4 × 10⁻⁹ α⁴)).  The opposition surge makes the full Moon about ten times
    brighter than a quarter Moon; the law is fitted for |α| up to about 150°.

    >>> round(float(relative_brightness(90.0)), 3)  # first or last quarter
    0.091
    """
    a = np.abs(np.asarray(phase_angle_deg, dtype=float))
    return 10.0 ** (-0.4 * (0.026 * a + 4e-9 * a**4))  # Krisciunas & Schaefer (1991) eq. 20


@dataclass(frozen=True)
class MoonTrackPositions(TrackPositions):
    """The Moon at some instants (see :class:`~lightpath.light.track.TrackPositions`; ``local_apparent_time_h``
    is the Sun's local apparent time), plus: ``semidiameter_deg`` (topocentric), ``illuminated_fraction``
    (0..1), ``phase_angle_deg`` (Sun–Moon–Earth, 0 at full Moon), ``sun_altitude_deg`` (the Sun's apparent
    altitude) and ``gated`` (True where the gate shuts the light out: azimuth and altitudes are then those of
    the nadir).
    """

    semidiameter_deg: NDArray | None = None
    illuminated_fraction: NDArray | None = None
    phase_angle_deg: NDArray | None = None
    sun_altitude_deg: NDArray | None = None
    gated: NDArray | None = None


class MoonTrack(SunTrack):
    """The Moon seen from ``observer`` between two TT instants, nodes every 10 minutes (see the module notes).

    Parameters
    ----------
    observer, jd_tt_start, jd_tt_end, source, delta_t_s : as for :class:`~lightpath.light.track.SunTrack`
        (``source``: ``auto``, ``jpl``, ``vsop87`` — the long-term theories).
    sun_below_deg : light counts only while the Sun's apparent altitude is below this, degrees.
    min_illuminated_fraction : light counts only while the illuminated fraction is at least this.
    """

    body = "moon"
    node_d = MOON_NODE_D
    # the topocentric declination moves up to ~0.27°/h (geocentric) + ~0.13°/h (parallax): 0.2° in half an hour
    screen_step_d = 1.0 / 24.0
    screen_slop_deg = 0.5

    def __init__(
        self,
        observer: Observer,
        jd_tt_start: float,
        jd_tt_end: float,
        source: str = "auto",
        delta_t_s: float | None = None,
        sun_below_deg: float = -6.0,
        min_illuminated_fraction: float = 0.0,
    ) -> None:
        self.sun_below_deg = float(sun_below_deg)
        self.min_illuminated_fraction = float(min_illuminated_fraction)
        super().__init__(observer, jd_tt_start, jd_tt_end, source, delta_t_s)

    def _keep(self, pos) -> None:
        self.semidiameter_deg = np.asarray(pos.semidiameter_deg, dtype=float)
        self.illuminated_fraction = np.asarray(pos.illuminated_fraction, dtype=float)
        self.phase_angle_deg = np.asarray(pos.phase_angle_deg, dtype=float)
        self.sun_altitude_deg = np.asarray(pos.sun_altitude_deg, dtype=float)
        step = SEMIDIAMETER_STEP_DEG
        self.disc_semidiameter_deg = float(np.round(np.median(self.semidiameter_deg) / step) * step)

    def ungated(self, jd_tt: ArrayLike, air: Air | None = None) -> MoonTrackPositions:
        """The Moon at ``jd_tt`` with its size, phase and the Sun's altitude; ``gated`` says where the gate
        shuts, but the directions are the Moon's everywhere."""
        p = SunTrack.positions(self, jd_tt, air)
        flat = np.asarray(p.jd_tt, dtype=np.float64).reshape(-1)
        i, w = self._weights(flat)
        shape = np.shape(p.jd_tt)

        def at(values: NDArray) -> NDArray:
            return self._lerp(values, i, w).reshape(shape)

        sun_alt, frac = at(self.sun_altitude_deg), at(self.illuminated_fraction)
        gated = (sun_alt >= self.sun_below_deg) | (frac < self.min_illuminated_fraction)
        return MoonTrackPositions(
            **{k: getattr(p, k) for k in TrackPositions.__dataclass_fields__},
            semidiameter_deg=at(self.semidiameter_deg),
            illuminated_fraction=frac,
            phase_angle_deg=at(self.phase_angle_deg),
            sun_altitude_deg=sun_alt,
            gated=gated,
        )

    def positions(self, jd_tt: ArrayLike, air: Air | None = None) -> MoonTrackPositions:
        """The Moon at ``jd_tt`` as the sweep sees it: the nadir where the gate shuts (see the module notes)."""
        from dataclasses import replace

        p = self.ungated(jd_tt, air)
        if not np.any(p.gated):
            return p
        g = p.gated

        def nadir(values: NDArray, value: float) -> NDArray:
            return np.where(g, value, values)

        return replace(
            p,
            azimuth_deg=nadir(p.azimuth_deg, 0.0),
            altitude_deg=nadir(p.altitude_deg, -90.0),
            altitude_geometric_deg=nadir(p.altitude_geometric_deg, -90.0),
        )

    def direct(self, jd_tt: ArrayLike):
        """The Moon computed directly (:func:`lightpath.sky.moon.moon_position`, not interpolated) at ``jd_tt``."""
        from lightpath.sky.moon import moon_position

        return moon_position(jd_tt, self.observer, source=self.source_option, delta_t_s=self.delta_t_option_s)
