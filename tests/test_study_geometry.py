"""Test geometries for the study layer: slit shrines built from survey numbers, and their sky windows.

Other study tests import :func:`slit_window` from here.  The checks in this file tie the study's
day-by-day light search (:class:`lightpath.study.light_days.LightDays`) to the engine's own sweep.
"""

from __future__ import annotations

import functools

import numpy as np
import pytest

from lightpath.light.sweep import find_light
from lightpath.light.window import compute_window
from lightpath.site.builders import Slot, slit_shrine
from lightpath.site.sampling import sample_target
from lightpath.site.targets import area_centroid_m
from lightpath.sky.divisions import divisions
from lightpath.sky.observer import Observer
from lightpath.sky.sun import sun_position
from lightpath.study.light_days import LightDays

SITE = Observer(latitude_deg=30.0, longitude_deg=31.0, elevation_m=0.0)
EPOCH = -1499  # 1500 BC


def division_of(name: str, year: int = EPOCH, observer: Observer = SITE, scheme: str = "longitude", parts: int = 8):
    """The :class:`~lightpath.sky.divisions.Division` called ``name`` (with the site's sunrise azimuths)."""
    return {d.name: d for d in divisions(year, scheme, parts, observer=observer)}[name]


@functools.lru_cache(maxsize=8)
def slit_window(
    azimuth_deg: float,
    *,
    slit: tuple[float, float, float] = (0.06, 0.3, 0.5),
    image: tuple[float, float, float, float] = (-0.05, 0.05, 0.45, 0.6),
    samples: int = 16,
    resolution_deg: float = 0.05,
    latitude_deg: float = SITE.latitude_deg,
):
    """(sky window, axis target→opening in ENU metres) of a slit shrine looking out to ``azimuth_deg``.

    ``slit`` = (width, height, sill) and ``image`` = (y0, y1, z0, z1) in metres, as in
    :func:`lightpath.site.builders.slit_shrine`.
    """
    width, height, sill = slit
    model = slit_shrine(azimuth_deg, slit=Slot(width_m=width, height_m=height, sill_m=sill), image=image)
    s = sample_target(model.target(), count=samples, seed=0)
    window = compute_window(model.blocking_mesh(), s.points_m, s.normals, s.area_m2, latitude_deg,
                            opening=model.opening(), resolution_deg=resolution_deg)  # fmt: skip
    axis = area_centroid_m(model.opening()) - area_centroid_m(model.target())
    return window, axis


def test_light_days_match_the_engine_sweep_with_a_direct_sun():
    """The study's days of light equal the engine's sweep run with the Sun computed directly (no track)."""
    from lightpath.light.runs import local_apparent_day_number

    div = division_of("cross_quarter_nov")
    window, _ = slit_window(round(div.sunrise_azimuth_deg, 3))
    light = LightDays(window, SITE, names=("cross_quarter_nov",))
    runs = light.evaluate(EPOCH)
    assert runs[0, 0] == 0.0  # aimed at the division's sunrise: light on the day itself

    def sun(jd_tt):
        return sun_position(jd_tt, SITE)

    intervals = find_light(window, sun, div.jd_tt - 40.0, div.jd_tt + 40.0, "first-gleam")
    peaks = sun(np.array([i.peak_jd_tt for i in intervals]))
    days = local_apparent_day_number(peaks.jd_ut, SITE.longitude_deg, peaks.local_apparent_time_h)
    day0 = int(light.division_days(EPOCH)[0])
    engine_days = sorted({int(d) - day0 for d in days})
    first, last = int(runs[0, 1]), int(runs[0, 2])
    assert engine_days, "the engine finds light too"
    # the division's run is the engine's run of consecutive days around day 0
    assert all(d in engine_days for d in range(first, last + 1))
    assert first - 1 not in engine_days and last + 1 not in engine_days


def test_window_sees_where_it_was_aimed():
    window, axis = slit_window(100.0)
    azimuth = np.degrees(np.arctan2(axis[0], axis[1])) % 360
    assert azimuth == pytest.approx(100.0, abs=1e-6)
    assert window.escape.any()


def test_position_shift_as_rotation_matches_a_recast_window():
    """A target moved 5 cm in its plane: the small-angle rotation (Δ/d) stands for re-casting the window.

    Thin opening (5 cm wall): agreement to a few thousandths of a degree; thick openings vignette and the
    approximation loses accuracy (measured in docs/framing-test.md).
    """
    from lightpath.light.disc import lit_area_weighted
    from lightpath.light.grid import enu_from_hadec
    from lightpath.study.uncertainty import rotation_from_vector, shift_rotation_vector

    model = slit_shrine(
        100.0, rock_m=0.05, slit=Slot(width_m=0.1, height_m=0.3, sill_m=0.5), image=(-0.1, 0.1, 0.5, 0.7)
    )
    s = sample_target(model.target(), count=32, seed=0)
    mesh, opening, lat = model.blocking_mesh(), model.opening(), 30.0
    axis = area_centroid_m(opening) - area_centroid_m(model.target())
    dist = float(np.linalg.norm(axis))
    base = compute_window(mesh, s.points_m, s.normals, s.area_m2, lat, opening=opening, resolution_deg=0.05)
    h, d = np.meshgrid(np.arange(-105.0, -75.0, 0.08), np.arange(-20.0, 20.0, 0.08))
    dirs = enu_from_hadec(lat, h.ravel(), d.ravel())

    def centroid(area):
        v = (dirs * (area / area.sum())[:, None]).sum(axis=0)
        return v / np.linalg.norm(v)

    def angle_deg(a, b):
        return float(np.degrees(np.arccos(np.clip(a @ b, -1.0, 1.0))))

    c0 = centroid(lit_area_weighted(base, dirs))
    normal = s.normals[0]
    for delta in ([0.0, 0.0, 0.05], np.cross(normal, [0.0, 0.0, 1.0]) * 0.05):
        delta = np.asarray(delta, dtype=float)
        moved = compute_window(mesh, s.points_m + delta, s.normals, s.area_m2, lat, opening=opening,
                               resolution_deg=0.05)  # fmt: skip
        exact = centroid(lit_area_weighted(moved, dirs))
        rot = rotation_from_vector(shift_rotation_vector(axis, dist, -delta))  # opening moves −Δ relative to it
        approx = centroid(lit_area_weighted(base, dirs, rotation=rot))
        shift = angle_deg(exact, c0)
        assert shift > 0.2  # 5 cm at ~4 m is up to 0.7°; part of it is cut by the slit's ends
        assert angle_deg(exact, approx) < 0.02 * shift
