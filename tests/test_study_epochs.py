"""Alignment epochs: a slit aimed at a solstice sunrise in one epoch drifts out of it over millennia."""

from __future__ import annotations

import numpy as np
import pytest
from test_study_geometry import SITE, division_of, slit_window

from lightpath.errors import InputError
from lightpath.study.epochs import alignment_epochs, drift_days_per_century, spans_of
from lightpath.study.light_days import LightDays
from lightpath.study.null_model import obliquity_deg
from lightpath.study.uncertainty import Tolerances

LOW_SLIT = {"slit": (0.04, 0.04, 0.5), "image": (-0.03, 0.03, 0.48, 0.52)}


def test_spans_and_drift_helpers():
    assert spans_of([1, 2, 3, 4, 5], [False, True, True, False, True]) == [(2, 3), (5, 5)]
    assert spans_of([1, 2], [False, False]) == []
    assert drift_days_per_century(np.array([0, 100, 200]), np.array([np.nan, 2.0, 1.0])) == -1.0
    assert drift_days_per_century(np.array([0]), np.array([1.0])) is None


def test_june_solstice_slit_loses_the_sun_as_obliquity_falls():
    """Aimed at the June solstice sunrise of 3000 BC; the solstice Sun then rises further south every century.

    Long-term obliquity (Vondrák et al. 2011, via pyerfa): 24.02° at 3000 BC, 23.44° at AD 2000, so the
    solstice sunrise at latitude 30° moves ~0.7° south; a ~1.7°-wide slit aimed at the old point loses it.
    """
    year0 = -2999
    div = division_of("june_solstice", year=year0)
    window, axis = slit_window(round(div.sunrise_azimuth_deg - 0.6, 2), **LOW_SLIT)
    light = LightDays(window, SITE)
    res = alignment_epochs(light, division="june_solstice", from_year=year0, to_year=1001, step_years=1000,
                           axis_enu=axis, tolerances=Tolerances(opening_azimuth_deg=0.2), draws=8, seed=1)  # fmt: skip
    assert [r.year for r in res.rows] == [-2999, -1999, -999, 1, 1001]
    assert res.rows[0].inside and res.rows[0].nearest_day == 0.0
    assert not res.rows[-1].inside and res.rows[-1].first_day is None  # no light near the solstice any more
    assert res.spans_inside[0]["from_year"] == -2999 and res.spans_inside[0]["to_year"] >= -2999
    assert all(0.0 <= r.probability_inside <= 1.0 for r in res.rows)
    assert res.rows[0].probability_inside > res.rows[-1].probability_inside
    assert float(obliquity_deg(-2999.0)) - float(obliquity_deg(1.0)) > 0.3  # the cause, stated above


def test_epochs_bad_input():
    window, axis = slit_window(100.0)
    light = LightDays(window, SITE)
    with pytest.raises(InputError, match="step_years"):
        alignment_epochs(light, division="march_equinox", from_year=0, to_year=100, step_years=0)
    with pytest.raises(InputError, match="to_year"):
        alignment_epochs(light, division="march_equinox", from_year=100, to_year=0)
    with pytest.raises(InputError, match="division: 'equinox'"):
        alignment_epochs(light, division="equinox", from_year=0, to_year=0)
