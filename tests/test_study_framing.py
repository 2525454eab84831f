"""The framing test on slit shrines built to frame a division: probability, null model, determinism."""

from __future__ import annotations

import json
import math

import numpy as np
import pytest
from test_study_geometry import EPOCH, SITE, division_of, slit_window

from lightpath.commands._common import to_jsonable
from lightpath.errors import InputError
from lightpath.light.disc import lit_area
from lightpath.light.grid import enu_from_hadec
from lightpath.light.options import ScanOptions
from lightpath.sky.refraction import apparent_altitude
from lightpath.sky.riseset import rise_set_azimuths
from lightpath.sky.sun import sun_position
from lightpath.sky.vectors import azalt_from_enu, enu_from_azalt
from lightpath.study.framing import cohen_h, framing_test, wilson_interval
from lightpath.study.light_days import LightDays
from lightpath.study.null_model import slit_null_rate
from lightpath.study.uncertainty import Tolerances

#: A short, narrow slit whose target sees only a patch of sky ~1.7° wide just above a level horizon.
LOW_SLIT = {"slit": (0.04, 0.04, 0.5), "image": (-0.03, 0.03, 0.48, 0.52)}


def _aimed(name: str, **geometry):
    div = division_of(name)
    window, axis = slit_window(round(div.sunrise_azimuth_deg, 2), **geometry)
    return div, window, axis


def test_statistics_helpers():
    # Wilson (1927) interval of 8/10 (95 %): 0.490–0.943 (recomputed from the closed form)
    assert wilson_interval(8, 10) == (0.4902, 0.9433)
    assert wilson_interval(0, 0) == (0.0, 1.0)
    lo, hi = wilson_interval(50, 100)
    assert lo < 0.5 < hi and hi - 0.5 == pytest.approx(0.5 - lo, abs=1e-4)
    assert cohen_h(0.5, 0.5) == 0.0
    assert cohen_h(1.0, 0.0) == pytest.approx(math.pi)


def test_framed_by_construction_then_less_with_tolerance():
    """Aimed at the cross-quarter sunrise: light on the day itself; the probability falls as σ(azimuth) grows."""
    div, window, axis = _aimed("cross_quarter_nov", **LOW_SLIT)
    light = LightDays(window, SITE, names=("cross_quarter_nov",))
    probabilities = []
    for sigma in (0.0, 1.0, 3.0, 8.0):
        tol = Tolerances(opening_azimuth_deg=sigma, refraction_deg=0.0, delta_t=False)
        res = framing_test(light, year=EPOCH, axis_enu=axis, tolerances=tol, within_days=2, draws=60,
                           null_draws=0, seed=3)  # fmt: skip
        (d,) = res.divisions
        assert d.observed_nearest_day == 0.0
        probabilities.append(d.probability)
    assert probabilities[0] == 1.0
    assert probabilities[0] >= probabilities[1] >= probabilities[2] >= probabilities[3]
    assert probabilities[3] < 0.5
    # the sky's own spreads (refraction σ 0.18°, ΔT) keep a framed division framed
    res = framing_test(light, year=EPOCH, axis_enu=axis, tolerances=Tolerances(), within_days=2, draws=40,
                       null_draws=0, seed=3)  # fmt: skip
    assert res.divisions[0].probability >= 0.95


def _window_rising_azimuths(window, latitude_deg):
    """Sunrise azimuths (disc centre, level horizon) of the Suns whose daily circle lights the target.

    Found independently of the day search: the engine's lit_area over synthetic diurnal circles.
    """
    decs = np.arange(-3.0, 3.0, 0.01)
    hs = np.arange(-96.0, -84.0, 0.03)
    h, d = np.meshgrid(hs, decs)
    az, alt = azalt_from_enu(enu_from_hadec(latitude_deg, h.ravel(), d.ravel()))
    app = apparent_altitude(alt, "bennett1982", SITE.pressure_mbar, SITE.temperature_c)
    s = enu_from_azalt(az, app)
    area = np.zeros(len(s))
    ok = app > -1.0
    area[ok] = lit_area(window, s[ok], "first-gleam")
    lit = decs[(area.reshape(h.shape) > 0).any(axis=1)]
    rise, _ = rise_set_azimuths(np.array([lit.max(), lit.min()]), latitude_deg)
    return float(rise.min()), float(rise.max())


def test_null_rate_of_a_narrow_slit_matches_the_closed_form():
    """Null rate = |[a_lo − u, a_hi − l] ∩ arc| / arc ≈ (window width + run) / arc (derived in null_model)."""
    within = 3
    div, window, axis = _aimed("march_equinox", **LOW_SLIT)
    light = LightDays(window, SITE, names=("march_equinox",))
    n = 400
    res = framing_test(light, year=EPOCH, axis_enu=axis, tolerances=Tolerances.zero(), within_days=within,
                       draws=1, null_draws=n, seed=5)  # fmt: skip
    ref = res.null_model["reference_azimuth_deg"]
    lo_w, hi_w = _window_rising_azimuths(window, SITE.latitude_deg)
    days = np.arange(-within, within + 1)
    run, _ = rise_set_azimuths(sun_position(div.jd_tt + days, SITE).declination_deg, SITE.latitude_deg)
    a_lo, a_hi = float(run.min()), float(run.max())
    arc = (res.null_model["arc_low_deg"], res.null_model["arc_high_deg"])
    expected = slit_null_rate(hi_w - lo_w, a_hi - a_lo, arc, (a_lo, a_hi), window_offsets_deg=(lo_w - ref, hi_w - ref))
    # away from the arc's ends it is (w + r) / arc
    assert expected == pytest.approx((hi_w - lo_w + a_hi - a_lo) / (arc[1] - arc[0]), rel=1e-9)
    sigma = math.sqrt(expected * (1 - expected) / n)  # binomial Monte Carlo error of the simulated rate
    assert res.divisions[0].null_rate == pytest.approx(expected, abs=3 * sigma + 0.005)
    assert 0.03 < expected < 0.2  # a narrow window: a rare alignment by chance
    # k + 1 over n + 1, never 0
    assert res.divisions[0].p_value >= 1 / (n + 1)


def test_same_seed_same_json_and_statistics_are_consistent():
    _, window, axis = _aimed("cross_quarter_feb")
    light = LightDays(window, SITE)
    tol = Tolerances(opening_azimuth_deg=1.0, opening_tilt_deg=0.3, target_position_m=0.02)

    def run(seed):
        res = framing_test(light, year=EPOCH, axis_enu=axis, tolerances=tol, epoch_sigma_years=50.0, within_days=3,
                           draws=12, null_draws=12, seed=seed)  # fmt: skip
        return res, json.dumps(to_jsonable(res), sort_keys=True)

    a, text_a = run(11)
    _, text_b = run(11)
    assert text_a == text_b
    assert a.epoch_sigma_years == 50.0 and a.null_model["side"] == "sunrise"
    assert [d.name for d in a.divisions][:2] == ["december_solstice", "cross_quarter_feb"]
    for d in a.divisions:
        assert 0.0 <= d.probability <= 1.0 and 0.0 <= d.null_rate <= d.null_rate_any <= 1.0
        assert 1 / 13 - 1e-6 <= d.p_value <= 1.0 and d.p_value_any >= d.p_value - 1e-12
    assert a.divisions[1].observed_nearest_day == 0.0


def test_bad_inputs():
    _, window, axis = _aimed("cross_quarter_feb")
    light = LightDays(window, SITE, names=("cross_quarter_feb",))
    with pytest.raises(InputError, match="within_days"):
        framing_test(light, year=EPOCH, axis_enu=axis, within_days=61, draws=1, null_draws=1)
    bad = LightDays(window, SITE, names=("midsummer",))
    with pytest.raises(InputError, match="division: 'midsummer'"):
        framing_test(bad, year=EPOCH, axis_enu=axis, draws=1, null_draws=1)
    with pytest.raises(InputError, match="parts"):
        LightDays(window, SITE, ScanOptions(parts=1))
