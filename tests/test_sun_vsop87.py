"""The long-term source (VSOP87D) against JPL DE406 for -3000…+3000, and its numerical shortcuts.

tests/data/de406_sun.csv: 600 apparent geocentric Sun positions from JPL DE406 (Standish 1998), PyPI
package de406 1997.1 read with jplephem, made by tools/make_de406_table.py (see tests/data/README.md).
Required (issue 3): the long-term series within 10″ of DE406 over -3000…+3000.
"""

from pathlib import Path

import erfa
import numpy as np
import pytest

from lightpath.sky import vsop87
from lightpath.sky.nodes import chebyshev_blocks
from lightpath.sky.sources import _vsop_columns, choose_source, vsop87_sun_gcrs_apparent_au
from lightpath.sky.sun import geocentric_sun

TABLE = Path(__file__).parent / "data" / "de406_sun.csv"


@pytest.fixture(scope="module")
def de406():
    d = np.loadtxt(TABLE, delimiter=",", comments="#", skiprows=3)
    names = ["jd", "ra_g", "dec_g", "dist", "ra_d", "dec_d", "lon_d"]
    return {n: d[:, i] for i, n in enumerate(names)}


def _sep_arcsec(a, b):
    a = a / np.linalg.norm(a, axis=-1)[..., None]
    b = b / np.linalg.norm(b, axis=-1)[..., None]
    return np.degrees(np.arctan2(np.linalg.norm(np.cross(a, b), axis=-1), np.sum(a * b, axis=-1))) * 3600


def test_table_covers_the_span(de406):
    ep = erfa.epj(de406["jd"], 0.0)
    assert len(ep) == 600 and ep.min() < -2990 and ep.max() > 2990


def test_vsop87_within_10_arcsec_of_de406(de406):
    ref = erfa.s2c(np.radians(de406["ra_g"]), np.radians(de406["dec_g"]))
    sep = _sep_arcsec(vsop87_sun_gcrs_apparent_au(de406["jd"]), ref)
    assert np.max(sep) < 3.5  # measured 3.14″ on 60,000 instants (tools/measure_sun_accuracy.py)
    # the error grows away from the modern era; measured per era (docs/sun-model.md)
    ep = erfa.epj(de406["jd"], 0.0)
    for lo, hi, limit in [(-3000, -2000, 3.5), (-2000, 1000, 1.2), (1000, 2050, 0.6), (2050, 3000, 0.4)]:
        m = (ep >= lo) & (ep < hi)
        assert np.max(sep[m]) < limit, (lo, hi)
    dist = np.linalg.norm(vsop87_sun_gcrs_apparent_au(de406["jd"]), axis=-1)
    assert np.max(np.abs(dist - de406["dist"])) * erfa.DAU / 1000 < 500.0  # km


def test_of_date_pipeline_matches_the_table_with_de421(de406):
    # The table's of-date columns were made by the tool's own ERFA calls; for the rows inside DE421's span the
    # whole lightpath pipeline (DE421 + long-term orientation) must reproduce them to DE421-DE406 differences.
    m = (de406["jd"] > 2414900) & (de406["jd"] < 2471100)
    assert m.sum() >= 10
    g = geocentric_sun(de406["jd"][m], "jpl")
    assert g.source == "JPL DE421 via skyfield"
    d_ra = ((g.right_ascension_deg - de406["ra_d"][m] + 180) % 360 - 180) * 3600 * np.cos(np.radians(de406["dec_d"][m]))
    assert np.max(np.abs(d_ra)) < 0.02
    assert np.max(np.abs(g.declination_deg - de406["dec_d"][m])) * 3600 < 0.02
    assert np.max(np.abs(((g.ecliptic_longitude_deg - de406["lon_d"][m] + 180) % 360 - 180) * 3600)) < 0.02


def test_vsop87_of_date_longitude_within_10_arcsec(de406):
    g = geocentric_sun(de406["jd"], "vsop87")
    d_lon = ((g.ecliptic_longitude_deg - de406["lon_d"] + 180) % 360 - 180) * 3600
    assert np.max(np.abs(d_lon)) < 10.0


def test_truncation_error_is_small():
    # Dropped terms (|A|·12^n < 1e-8) against the complete published series, -10000…+3000: < 0.1″ per coordinate.
    rng = np.random.default_rng(87)  # RNG seed
    lo, hi = erfa.epj2jd(-10000.0), erfa.epj2jd(3000.0)
    jd = (lo[0] + lo[1]) + rng.random(400) * ((hi[0] + hi[1]) - (lo[0] + lo[1]))
    full = vsop87.earth_heliocentric_lbr(jd, tolerance_rad=0.0)
    cut = vsop87.earth_heliocentric_lbr(jd)
    for f, c in zip(full, cut, strict=True):
        assert np.max(np.abs(f - c)) * 206264.8 < 0.1
    assert vsop87.vsop87_term_count() < vsop87.vsop87_term_count(0.0) == 2425


def test_rates_match_numerical_derivative():
    # The rates feed the aberration (20″): they must hold the Earth’s velocity (0.0172 au/day) to 2e-5 of
    # itself (0.0004″ of aberration).
    jd = np.array([-1.9e6, 0.0, 2451545.0, 2.8e6])
    h = 0.01
    rates = vsop87.earth_heliocentric_lbr_rates(jd)
    up = vsop87.earth_heliocentric_lbr(jd + h, tolerance_rad=0.0)
    down = vsop87.earth_heliocentric_lbr(jd - h, tolerance_rad=0.0)
    for r, u, d in zip(rates, up, down, strict=True):
        assert np.max(np.abs(r - (u - d) / (2 * h))) < 0.0172 * 2e-5


def test_bands_add_up_and_slow_band_blocks_reproduce_direct_series():
    # Daily instants for 6 years at 3000 BC: the slow band (periods > 120 d) on 256-day Chebyshev blocks of
    # degree 16 plus the fast band summed directly, against the whole series summed directly.
    jd = erfa.epj2jd(-3000.0)[0] + erfa.epj2jd(-3000.0)[1] + np.arange(0.0, 2192.0, 1.0)
    direct = _vsop_columns(jd)
    assert np.allclose(_vsop_columns(jd, "slow") + _vsop_columns(jd, "fast"), direct, rtol=0, atol=1e-10)
    slow = lambda t: _vsop_columns(t, "slow")  # noqa: E731
    blocks = chebyshev_blocks(slow, jd, 256.0, 16) + _vsop_columns(jd, "fast")
    assert np.max(np.abs(blocks[:, :2] - direct[:, :2])) * 206264.8 < 1e-3  # L, B: arcsec (measured 0.0004″)
    assert np.max(np.abs(blocks[:, 2] - direct[:, 2])) < 1e-8  # R: au (1.5 km)
    assert np.max(np.abs(blocks[:, 3:] - direct[:, 3:])) < 0.0172e-6  # rates: 1e-6 of the orbital speed


def test_source_choice_by_span():
    assert choose_source([2451545.0, 2460000.0]).kind == "jpl"
    assert choose_source([2451545.0, 2500000.0]).kind == "vsop87"  # 2136 is past DE421
