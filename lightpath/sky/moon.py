"""The Moon's apparent place for any epoch from −3000 to +3000: geocentric and topocentric, azimuth and altitude.

The same pipeline as the Sun (:mod:`lightpath.sky.sun`), with another source of the geocentric vector:

1. apparent geocentric GCRS vector of the Moon: JPL DE421 through skyfield
   (``earth.at(t).observe(moon).apparent()``) for 1900–2050, or the long-term theory of
   :mod:`lightpath.sky.elp` (ELP/MPP02 mean arguments fitted to JPL DE405/DE406 with Meeus's abridged
   ELP-2000/82 series) before and after;
2. the long-term precession-nutation matrix, Earth rotation (ERA − equation of the origins, the CIO
   locator integrated along the long-term pole), ΔT — the Sun's own code;
3. topocentric: the observer's WGS84 position subtracted — the Moon's parallax reaches about 1° —,
   diurnal aberration, then refraction of the disc centre by the observer's model.

Besides the Sun's fields (``azimuth_deg``, ``altitude_deg`` (apparent), ``altitude_geometric_deg``,
``declination_deg``, ``jd_ut``, ``delta_t_s``, ``delta_t_sigma_s`` …) a :class:`MoonPosition` carries the
topocentric ``semidiameter_deg`` (from the true distance), ``distance_km``, ``horizontal_parallax_deg``,
the geocentric ``phase_angle_deg`` (Sun–Moon–Earth) and ``illuminated_fraction`` (1 + cos i)/2 (Meeus 1998
eq. 48.1), the Sun's apparent altitude ``sun_altitude_deg`` and local apparent (solar) time, and
``delta_t_sigma_deg``: how far the Moon moves against the Sun during ΔT's σ (its mean synodic motion,
0.508° per hour) — the uncertainty of its place at a given local apparent time (≈ 0.26° at 3000 BC).

Accuracy (``docs/moon.md``): the DE421 path matches skyfield + DE421 topocentric az/alt to < 0.1″; the
long-term theory is within 25″ in longitude and 7″ in latitude of JPL DE406 over −3000…+3000.  Outside
Julian epochs −3000…+3000 (DE406's span) the Moon is refused.

>>> from lightpath.sky.observer import Observer
>>> p = moon_position(2451545.0, Observer(51.48, 0.0), delta_t_s=63.8)
>>> p.source
'JPL DE421 via skyfield'
>>> round(float(p.distance_km))  # J2000.0: 402,449 km (geocentric)
402449

References
----------
Folkner, W. M., Williams, J. G., & Boggs, D. H. (2009). The Planetary and Lunar Ephemeris DE421.
*IPN Progress Report* 42-178.

Chapront, J., & Francou, G. (2003). The lunar theory ELP revisited. *A&A* 404, 735–742.

Meeus, J. (1998). *Astronomical Algorithms*, 2nd ed., ch. 40 (parallax), 47 (the Moon), 48 (illuminated
fraction).

Archinal, B. A., et al. (2018). Report of the IAU Working Group on Cartographic Coordinates and Rotational
Elements: 2015. *Celest. Mech. Dyn. Astron.* 130, 22 (lunar mean radius 1737.4 km).
"""

from __future__ import annotations

import functools
import os
from dataclasses import dataclass

import erfa
import numpy as np
from numpy.typing import ArrayLike, NDArray

from lightpath.errors import InputError
from lightpath.sky import elp, jpl, orientation, sun
from lightpath.sky.apparent import angles_of_date, apparent_columns, delta_t_with_sigma, topocentric_columns
from lightpath.sky.deltat import timescale
from lightpath.sky.nodes import lagrange_on_grid
from lightpath.sky.observer import Observer
from lightpath.sky.sources import choose_source
from lightpath.sky.tables import Tabular
from lightpath.threads import split_map

__all__ = [
    "MOON_RADIUS_KM",
    "MOON_SOURCES",
    "MOON_SPAN_JULIAN_YEARS",
    "MOON_SYNODIC_RATE_DEG_PER_H",
    "GeocentricMoon",
    "MoonPosition",
    "MoonSource",
    "choose_moon_source",
    "geocentric_moon",
    "moon_position",
]

#: Mean radius of the Moon, km (Archinal et al. 2018, IAU WGCCRE).
MOON_RADIUS_KM = 1737.4
#: Equatorial radius of the Earth, km (WGS84), for the horizontal parallax sin π = a / r.
_EARTH_RADIUS_KM = 6378.137
#: Julian epochs over which the Moon is given (the span of JPL DE406, against which the theory is checked).
MOON_SPAN_JULIAN_YEARS = (-3000.0, 3000.0)
#: Mean motion of the Moon against the Sun: 360° per synodic month of 29.530589 days (Meeus 1998 ch. 49), °/h.
MOON_SYNODIC_RATE_DEG_PER_H = 360.0 / (29.530589 * 24.0)
#: Accepted ``source`` words besides a path to a ``.bsp`` kernel; ``"vsop87"`` means the long-term theories.
MOON_SOURCES = ("auto", "jpl", "elp", "vsop87")

_KM_PER_AU = erfa.DAU / 1000.0
_DAY_S = 86400.0
_R2D = 180.0 / np.pi
# Dense sets: the core from nodes 1.5 hours apart, cubic Lagrange between them.  The geocentric vector turns
# 13°/day: the error is 0.023·(ωh)⁴ of the distance, 0.0002″ (nodes.py); direct evaluation when sparser.
_NODE_STEP_DAYS = 1.0 / 16.0


@dataclass(frozen=True)
class MoonSource:
    """A source of the Moon's apparent geocentric position: ``kind`` ``"jpl"`` (with ``path``) or ``"elp"``."""

    name: str
    kind: str
    path: str | None = None

    def gcrs_apparent_au(self, jd_tt: ArrayLike) -> NDArray:
        """Apparent geocentric GCRS position of the Moon (au), shape ``jd_tt.shape + (3,)``."""
        if self.kind == "jpl":
            return _jpl_moon_au(_moon_kernel(self.path), jd_tt)
        return elp.moon_gcrs_apparent_au(jd_tt)


@functools.cache
def _moon_kernel(path: str):
    kernel = jpl.load_kernel(path)
    if (3, 301) not in {(s.center, s.target) for s in kernel.segments}:
        raise InputError(f"ephemeris_path: {path!r} lacks segment 3->301 (the Moon); use a kernel such as de440.bsp")
    return kernel


def _jpl_moon_au(kernel, jd_tt: ArrayLike) -> NDArray:
    """``earth.at(t).observe(moon).apparent()`` in skyfield (light time, aberration, deflection), au."""
    jd = np.asarray(jd_tt, dtype=float)
    flat = jd.reshape(-1)
    out = np.full((flat.size, 3), np.nan)
    ok = np.isfinite(flat)
    if np.any(ok):
        t = timescale().tt_jd(flat[ok])
        pos = np.asarray(kernel["earth"].at(t).observe(kernel["moon"]).apparent().position.au).reshape(3, -1)
        # the apparent direction at the geocentric distance: the length of skyfield's vector carries the
        # Earth's barycentric motion during the light time (~37 km), which would bias the parallax by 0.3″
        geometric = np.asarray((kernel["moon"] - kernel["earth"]).at(t).position.au).reshape(3, -1)
        out[ok] = (pos * (np.linalg.norm(geometric, axis=0) / np.linalg.norm(pos, axis=0))).T
    return out.reshape(jd.shape + (3,))


def _check_span(jd: NDArray) -> None:
    lo, hi = (float(sum(erfa.epj2jd(y))) for y in MOON_SPAN_JULIAN_YEARS)
    bad = np.isfinite(jd) & ((jd < lo) | (jd > hi))
    if np.any(bad):
        first = float(jd[bad].flat[0])
        raise InputError(
            f"instant JD {first:.5f} (TT, Julian epoch {float(orientation.julian_epoch(first)):.1f}) is outside "
            f"the Moon's span, Julian epochs {MOON_SPAN_JULIAN_YEARS[0]:g}..{MOON_SPAN_JULIAN_YEARS[1]:g}"
        )


def choose_moon_source(jd_tt: ArrayLike, source: str = "auto", ephemeris_path: str | None = None) -> MoonSource:
    """Pick the Moon's source for a set of instants, as :func:`lightpath.sky.sources.choose_source` does for
    the Sun: ``"auto"`` (DE421 when every instant lies in its span, else the long-term theory), ``"jpl"``,
    ``"elp"`` (or ``"vsop87"``: the long-term theories), or a path to a ``.bsp`` kernel with the Moon.

    >>> choose_moon_source([2451545.0]).kind, choose_moon_source([1000000.0]).kind
    ('jpl', 'elp')
    """
    jd = np.asarray(jd_tt, dtype=float)
    _check_span(jd)
    if source not in MOON_SOURCES:
        if not (str(source).lower().endswith(".bsp") or os.path.sep in str(source)):
            raise InputError(f"source {source!r} is not one of {', '.join(MOON_SOURCES)} or a path to a .bsp kernel")
        ephemeris_path, source = str(source), "jpl"
    if source in ("elp", "vsop87"):
        if ephemeris_path is not None:
            raise InputError(f"ephemeris_path: a kernel file was given together with source {source!r}; choose one")
        return MoonSource(elp.ELP_NAME, "elp")
    sun_src = choose_source(jd, source, ephemeris_path)  # the same span rules and kernel checks as the Sun
    if sun_src.kind != "jpl":
        return MoonSource(elp.ELP_NAME, "elp")
    _moon_kernel(sun_src.path)
    return MoonSource(sun_src.name, "jpl", sun_src.path)


def _sun_source_for(src: MoonSource, jd: NDArray):
    return choose_source(jd, "jpl", src.path) if src.kind == "jpl" else choose_source(jd, "vsop87")


def _core_at(src, jd_tt: NDArray) -> NDArray:
    """(…, 5): true-of-date apparent vector (au), equation of the origins, true obliquity (the Sun's core)."""
    return lagrange_on_grid(lambda u: apparent_columns(src, u), np.asarray(jd_tt, dtype=float), _NODE_STEP_DAYS)


@dataclass(frozen=True)
class GeocentricMoon:
    """Geocentric apparent Moon, true equator/ecliptic and equinox of date; arrays shaped like ``jd_tt``.

    Angles in degrees; distance_km geocentric; phase_angle_deg and illuminated_fraction geocentric.
    """

    jd_tt: NDArray
    ecliptic_longitude_deg: NDArray
    ecliptic_latitude_deg: NDArray
    right_ascension_deg: NDArray
    declination_deg: NDArray
    distance_km: NDArray
    phase_angle_deg: NDArray
    illuminated_fraction: NDArray
    source: str


def _phase_angle_deg(moon_cols: NDArray, sun_cols: NDArray) -> NDArray:
    """Sun–Moon–Earth angle from the two true-of-date geocentric vectors (Meeus 1998 eq. 48.2, vector form)."""
    m, s = moon_cols[..., :3], sun_cols[..., :3]
    to_sun, to_earth = s - m, -m
    cos_i = np.sum(to_sun * to_earth, axis=-1) / (np.linalg.norm(to_sun, axis=-1) * np.linalg.norm(m, axis=-1))
    return np.degrees(np.arccos(np.clip(cos_i, -1.0, 1.0)))


def geocentric_moon(jd_tt: ArrayLike, source: str = "auto", ephemeris_path: str | None = None) -> GeocentricMoon:
    """Geocentric apparent Moon of date for TT Julian dates (any shape; nan propagates).

    >>> g = geocentric_moon(2448724.5)  # Meeus (1998) Example 47.a: apparent λ 133.167265°, β −3.229126°
    >>> f"{float(g.ecliptic_longitude_deg):.3f} {float(g.ecliptic_latitude_deg):.3f}"
    '133.167 -3.229'
    """
    jd = np.asarray(jd_tt, dtype=float)
    src = choose_moon_source(jd, source, ephemeris_path)
    cols = _core_at(src, jd)
    ra, dec, dist, lon, lat = angles_of_date(cols)
    phase = _phase_angle_deg(cols, sun.sun_apparent_columns(_sun_source_for(src, jd), jd))
    return GeocentricMoon(
        jd_tt=jd,
        ecliptic_longitude_deg=lon * _R2D,
        ecliptic_latitude_deg=lat * _R2D,
        right_ascension_deg=ra * _R2D,
        declination_deg=dec * _R2D,
        distance_km=dist * _KM_PER_AU,
        phase_angle_deg=phase,
        illuminated_fraction=(1.0 + np.cos(np.radians(phase))) / 2.0,  # Meeus (1998) eq. 48.1
        source=src.name,
    )


@dataclass(frozen=True)
class MoonPosition(Tabular):
    """The Moon seen from a site; every array has the shape of ``jd_tt``.

    Times: jd_tt, jd_ut (UT1), delta_t_s, delta_t_sigma_s (seconds; σ = 0 when ΔT was given).
    Angles in degrees: azimuth_deg (true north, clockwise), altitude_deg (apparent: refracted by the
    observer's model), altitude_geometric_deg (topocentric, unrefracted), right_ascension_deg /
    declination_deg (geocentric apparent, true equator of date), hour_angle_deg (local, geocentric),
    ecliptic_longitude_deg / ecliptic_latitude_deg (geocentric apparent, of date), semidiameter_deg
    (topocentric, from the true distance), horizontal_parallax_deg (equatorial, geocentric distance),
    phase_angle_deg (Sun–Moon–Earth, geocentric; 0 at full Moon), illuminated_fraction (0..1),
    sun_altitude_deg (the Sun's apparent altitude), delta_t_sigma_deg (the Moon's motion against the Sun
    during ΔT's σ). distance_km (geocentric), distance_au (the same in au), equation_of_time_min and
    local_apparent_time_h (the Sun's: local apparent solar time, 0..24 h), source.
    """

    _columnar = True

    jd_tt: NDArray
    jd_ut: NDArray
    delta_t_s: NDArray
    delta_t_sigma_s: NDArray
    azimuth_deg: NDArray
    altitude_deg: NDArray
    altitude_geometric_deg: NDArray
    right_ascension_deg: NDArray
    declination_deg: NDArray
    hour_angle_deg: NDArray
    ecliptic_longitude_deg: NDArray
    ecliptic_latitude_deg: NDArray
    distance_km: NDArray
    distance_au: NDArray
    semidiameter_deg: NDArray
    horizontal_parallax_deg: NDArray
    phase_angle_deg: NDArray
    illuminated_fraction: NDArray
    sun_altitude_deg: NDArray
    delta_t_sigma_deg: NDArray
    equation_of_time_min: NDArray
    local_apparent_time_h: NDArray
    source: str


def moon_position(
    jd_tt: ArrayLike,
    observer: Observer,
    *,
    source: str = "auto",
    delta_t_s: ArrayLike | None = None,
    ephemeris_path: str | None = None,
) -> MoonPosition:
    """Topocentric apparent azimuth and altitude of the Moon's centre (and its geocentric place, phase and
    size) at TT instants; called exactly as :func:`lightpath.sky.sun.sun_position`.

    Parameters
    ----------
    jd_tt : Julian dates of TT, any shape (nan propagates); Julian epochs −3000…+3000.
    observer : site and air (:class:`~lightpath.sky.observer.Observer`).
    source : ``"auto"``, ``"jpl"``, ``"elp"`` (or ``"vsop87"``) or a path to a ``.bsp`` kernel.
    delta_t_s : ΔT = TT − UT1 in seconds overriding the model (then σ = 0).
    ephemeris_path : a user JPL kernel instead of DE421.
    """
    jd = np.asarray(jd_tt, dtype=float)
    src = choose_moon_source(jd, source, ephemeris_path)
    moon_cols = _core_at(src, jd).reshape(-1, 5)
    sun_cols = sun.sun_apparent_columns(_sun_source_for(src, jd), jd).reshape(-1, 5)
    dt_s, dt_sigma = delta_t_with_sigma(jd, delta_t_s)
    jd_ut = (jd - dt_s / _DAY_S).reshape(-1)
    topo = functools.partial(topocentric_columns, observer=observer)
    m = split_map(topo, moon_cols, jd_ut)
    s = split_map(topo, sun_cols, jd_ut)
    lat_ecl = angles_of_date(moon_cols)[4]
    phase = _phase_angle_deg(moon_cols, sun_cols)

    def shaped(a: NDArray) -> NDArray:
        return np.ascontiguousarray(a).reshape(jd.shape)

    dist_au, r_topo_au = m[:, 7], m[:, 8]
    return MoonPosition(
        jd_tt=jd,
        jd_ut=shaped(jd_ut),
        delta_t_s=dt_s,
        delta_t_sigma_s=dt_sigma,
        azimuth_deg=shaped(m[:, 0]),
        altitude_deg=shaped(m[:, 1]),
        altitude_geometric_deg=shaped(m[:, 2]),
        right_ascension_deg=shaped(m[:, 3]),
        declination_deg=shaped(m[:, 4]),
        hour_angle_deg=shaped(m[:, 5]),
        ecliptic_longitude_deg=shaped(m[:, 6]),
        ecliptic_latitude_deg=shaped(lat_ecl * _R2D),
        distance_km=shaped(dist_au * _KM_PER_AU),
        distance_au=shaped(dist_au),
        semidiameter_deg=shaped(np.degrees(np.arcsin(MOON_RADIUS_KM / (r_topo_au * _KM_PER_AU)))),
        horizontal_parallax_deg=shaped(np.degrees(np.arcsin(_EARTH_RADIUS_KM / (dist_au * _KM_PER_AU)))),
        phase_angle_deg=shaped(phase),
        illuminated_fraction=shaped((1.0 + np.cos(np.radians(phase))) / 2.0),  # Meeus (1998) eq. 48.1
        sun_altitude_deg=shaped(s[:, 1]),
        delta_t_sigma_deg=dt_sigma / 3600.0 * MOON_SYNODIC_RATE_DEG_PER_H,
        equation_of_time_min=shaped(s[:, 9]),
        local_apparent_time_h=shaped(s[:, 10]),
        source=src.name,
    )
