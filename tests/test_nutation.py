"""Nutation at any epoch against full IAU 2000A (pyerfa ``nut00a``; Mathews, Herring & Buffett 2002)."""

from __future__ import annotations

import erfa
import numpy as np

from lightpath.sky.nutation import nutation_long_term_rad, nutation_rad
from lightpath.sky.orientation import nutation_deg

MAS = np.pi / (180.0 * 3600.0 * 1000.0)


def _jd(year_from, year_to, n):
    return 2451545.0 + (np.linspace(year_from, year_to, n) - 2000.0) * 365.25


def test_far_epochs_follow_iau2000a_where_2000b_drifts():
    jd = _jd(-10000, 3000, 4001)
    full = np.array(erfa.nut00a(jd, 0.0))  # pyerfa: IAU 2000A, full series and Simon et al. (1994) arguments
    ours = np.array(nutation_rad(jd))
    abridged = np.array(erfa.nut00b(jd, 0.0))
    # the long-term form keeps only 2000B's truncation: measured 3.3 mas (2000B itself: 2.8 mas over 1900-2100)
    assert np.max(np.abs(ours - full)) < 4.0 * MAS
    # 2000B's linear arguments alone: 1.5″ near 3000 BC, 6″ near 9000 BC (what the long-term form removes)
    bc3000 = np.abs(jd - _jd(-3000, -3000, 1)) < 36525.0
    assert np.max(np.abs(abridged[0] - full[0])[bc3000]) > 1000.0 * MAS


def test_modern_years_are_iau2000b_bit_for_bit_and_the_blend_has_no_jump():
    modern = _jd(1900.001, 2099.999, 5000)
    assert np.array_equal(np.array(nutation_rad(modern)), np.array(erfa.nut00b(modern, 0.0)))
    blend = np.concatenate([_jd(1790, 1910, 3000), _jd(2090, 2210, 3000)])
    full = np.array(erfa.nut00a(blend, 0.0))
    assert np.max(np.abs(np.array(nutation_rad(blend)) - full)) < 4.0 * MAS  # measured 3.1 mas


def test_long_term_form_is_the_same_on_any_split_and_shape():
    jd = _jd(-5000, -4990, 30000)
    whole = np.array(nutation_long_term_rad(jd))
    parts = np.concatenate([np.array(nutation_long_term_rad(jd[:777])), np.array(nutation_long_term_rad(jd[777:]))], 1)
    assert np.array_equal(whole, parts)
    dpsi, deps = nutation_deg(2451545.0 - 5000 * 365.25)
    assert np.ndim(dpsi) == 0 and abs(float(dpsi)) < 20.0 / 3600.0
