"""The framing test for lunar claims on slit shrines aimed at, and away from, the major standstill's southern
moonrise of 2025 (the extremes of March 2025: JPL DE421 through ``lightpath.sky.standstills``)."""

from __future__ import annotations

import functools

import numpy as np
import pytest

from lightpath.errors import InputError
from lightpath.light.window import compute_window
from lightpath.site.builders import Slot, slit_shrine
from lightpath.site.sampling import sample_target
from lightpath.site.targets import area_centroid_m
from lightpath.sky.observer import Observer
from lightpath.sky.standstills import extreme_rise_set_azimuths, standstill_seasons
from lightpath.study.lunar_framing import lunar_framing
from lightpath.study.uncertainty import Tolerances

SITE = Observer(latitude_deg=30.0, longitude_deg=31.0, elevation_m=0.0)
YEAR = 2025
# a survey good to 0.1° in azimuth (our choice), refraction's spread as Sampson et al. (2003) by default
TOLERANCES = Tolerances(opening_azimuth_deg=0.1)


@functools.lru_cache(maxsize=1)
def southern_moonrise_az() -> float:
    """Moonrise azimuth of the major standstill's southern extreme nearest 2025 at the site (flat horizon)."""
    seasons = [s for s in standstill_seasons(2020, 2030) if s.kind == "major" and s.direction == "south"]
    rises, _ = extreme_rise_set_azimuths(seasons[:1], SITE.latitude_deg)
    return float(rises[0])


@functools.lru_cache(maxsize=4)
def slit(azimuth_deg: float, band_deg: float = 31.0):
    model = slit_shrine(azimuth_deg, slit=Slot(width_m=0.06, height_m=0.3, sill_m=0.5), image=(-0.05, 0.05, 0.45, 0.6))
    s = sample_target(model.target(), count=16, seed=0)
    window = compute_window(model.blocking_mesh(), s.points_m, s.normals, s.area_m2, SITE.latitude_deg,
                            opening=model.opening(), resolution_deg=0.05, declination_limit_deg=band_deg)  # fmt: skip
    return window, area_centroid_m(model.opening()) - area_centroid_m(model.target())


def test_slit_aimed_at_the_southern_extreme_frames_it():
    """Aimed 0.3° south of the extreme's moonrise (the Moon climbs southward, the slit sees up to ~3.6°)."""
    window, axis = slit(round(southern_moonrise_az() + 0.3, 3))
    r = lunar_framing(window, SITE, YEAR, axis, tolerances=TOLERANCES, draws=6, null_draws=12, seed=1)
    assert r.side == "moonrise" and r.extreme_declination_deg < -28.0
    assert r.nominal_closeness_deg <= 0.5
    assert r.probability >= 5 / 6
    assert r.null_rate < 0.5
    assert r.p_value < 0.5


def test_slit_aimed_elsewhere_on_the_arc_does_not():
    window, axis = slit(round(southern_moonrise_az() - 12.0, 3))
    r = lunar_framing(window, SITE, YEAR, axis, tolerances=TOLERANCES, draws=6, null_draws=0, seed=1)
    assert not (r.nominal_closeness_deg <= 0.5)
    assert r.probability <= 1 / 6
    lo, hi = r.null_arc_deg
    assert lo < r.facing_azimuth_deg < hi  # it looks at the arc, just not at the extreme


def test_window_band_must_cover_the_moon():
    window, axis = slit(round(southern_moonrise_az(), 3), 25.5)
    with pytest.raises(InputError, match="for_body"):
        lunar_framing(window, SITE, YEAR, axis, draws=0, null_draws=0)
    assert np.isfinite(southern_moonrise_az())


def test_frame_command_tests_a_lunar_claim(tmp_path, capsys):
    """``frame --body moon`` on a [build] slit shrine aimed 0.3° south of the 2025 southern-extreme moonrise."""
    import json

    from lightpath.cli import main

    scene = tmp_path / "shrine.toml"
    scene.write_text(
        f"[site]\nlatitude_deg = {SITE.latitude_deg}\nlongitude_deg = {SITE.longitude_deg}\n\n"
        f'[build]\nkind = "slit_shrine"\nbearing_deg = {round(southern_moonrise_az() + 0.3, 3)}\nnorth = "true"\n'
        "depth_m = 4.0\nwidth_m = 2.5\nheight_m = 2.2\nrock_m = 1.5\n"
        "slit = {width_m = 0.06, height_m = 0.3, sill_m = 0.5}\nimage = [-0.05, 0.05, 0.45, 0.6]\n",
        encoding="utf-8",
    )
    argv = [str(scene), "--epoch", str(YEAR), "--body", "moon", "--samples", "16", "--draws", "2",
            "--null-draws", "3", "--tolerance", "opening_azimuth_deg=0.1", "--workers", "1", "--quiet"]  # fmt: skip
    assert main(["frame", *argv, "--json"]) == 0
    doc = json.loads(capsys.readouterr().out)
    assert doc["kind"] == "major" and doc["direction"] == "south" and doc["side"] == "moonrise"
    assert doc["nominal_closeness_deg"] <= 0.5 and len(doc["closeness_deg"]) == 2
    assert main(["frame", *argv]) == 0
    text = capsys.readouterr().out
    assert "major standstill's southern moonrise" in text and "P(framed)" in text and "moonlight" in text
    assert main(["frame", *argv, "--division", "june_solstice"]) == 2
    assert "--standstill" in capsys.readouterr().err
