"""The Moon against skyfield + JPL DE421 (reference library), 1900-2050, and Meeus (1998) Example 47.a.

skyfield (Rhodes 2019) with DE421 (Folkner et al. 2009) from skyfield-data: topocentric apparent
azimuth/altitude (``(earth + wgs84.latlon(...)).at(t).observe(moon).apparent().altaz()``, refraction off),
the topocentric distance and the geocentric illuminated fraction (``almanac.fraction_illuminated``).
Both sides use skyfield's ΔT, so the Moon, the Earth's orientation and the parallax are what is compared.
Tolerance (issue 16): 2″ for the DE421 path; 15″ for the long-term theory (Meeus 1998 ch. 47 states its
abridged series good to about 10″ in longitude and 4″ in latitude, from memory).
"""

import numpy as np
import pytest

from lightpath.errors import InputError
from lightpath.sky.deltat import timescale
from lightpath.sky.jpl import DE421_PATH, load_kernel
from lightpath.sky.moon import geocentric_moon, moon_position
from lightpath.sky.observer import Observer
from lightpath.sky.refraction import apparent_altitude

SITES = [
    (51.1789, -1.8262, 100.0),
    (-33.92, 18.42, 20.0),
    (64.15, -21.94, 50.0),
    (0.0, 100.0, 3000.0),
    (37.0, 25.0, 0.0),
]
_AS = 3600.0


@pytest.fixture(scope="module")
def instants():
    rng = np.random.default_rng(16)
    return np.sort(rng.uniform(2415100.0, 2469700.0, 300))  # 1900 … 2050


def _skyfield_altaz(jd, lat, lon, elev):
    """skyfield's apparent az/alt and the geometric topocentric distance (km; the apparent vector's length
    also carries the Earth's barycentric motion during the light time)."""
    from skyfield.api import wgs84

    kernel = load_kernel(DE421_PATH)
    t = timescale().tt_jd(jd)
    topos = wgs84.latlon(lat, lon, elev)
    alt, az, _ = (kernel["earth"] + topos).at(t).observe(kernel["moon"]).apparent().altaz()
    dist_km = (kernel["moon"] - kernel["earth"] - topos).at(t).distance().km
    return az.degrees, alt.degrees, dist_km


def _separation_arcsec(az1, alt1, az2, alt2):
    daz = ((az1 - az2 + 180.0) % 360.0 - 180.0) * np.cos(np.radians(alt2))
    return np.hypot(daz, alt1 - alt2) * _AS


@pytest.mark.parametrize("site", SITES)
def test_topocentric_azalt_matches_skyfield_de421(instants, site):
    obs = Observer(*site, refraction=None)
    p = moon_position(instants, obs)
    assert p.source == "JPL DE421 via skyfield"
    az, alt, dist_km = _skyfield_altaz(instants, *site)
    assert _separation_arcsec(p.azimuth_deg, p.altitude_geometric_deg, az, alt).max() < 2.0  # issue 16: 2″
    # semidiameter from the true topocentric distance: asin(1737.4 km / d) (Archinal et al. 2018 radius)
    assert np.abs(p.semidiameter_deg - np.degrees(np.arcsin(1737.4 / dist_km))).max() * _AS < 0.01
    assert np.all(p.altitude_deg == p.altitude_geometric_deg)  # refraction off


def test_long_term_theory_through_the_same_pipeline(instants):
    obs = Observer(*SITES[0], refraction=None)
    p = moon_position(instants, obs, source="elp")
    assert p.source.startswith("ELP/MPP02")
    az, alt, _ = _skyfield_altaz(instants, *SITES[0])
    assert _separation_arcsec(p.azimuth_deg, p.altitude_geometric_deg, az, alt).max() < 15.0


def test_illuminated_fraction_and_phase_match_skyfield(instants):
    from skyfield import almanac

    kernel = load_kernel(DE421_PATH)
    g = geocentric_moon(instants)
    ref = almanac.fraction_illuminated(kernel, "moon", timescale().tt_jd(instants))
    assert np.abs(g.illuminated_fraction - ref).max() < 1e-4
    assert np.all((g.phase_angle_deg >= 0.0) & (g.phase_angle_deg <= 180.0))


def test_meeus_example_47a_checked_against_de421():
    # Meeus (1998) Example 47.a, 1992 April 12 0h TD (from memory): geometric λ 133.162655°, β −3.229126°,
    # Δ 368409.7 km; apparent λ = λ + Δψ = 133.167265°.  DE421 first: its geometric geocentric distance is
    # 368405.5 km and its apparent λ, β agree with Meeus's to 2″ and 0.3″ (within his series' accuracy).
    jd = 2448724.5
    kernel = load_kernel(DE421_PATH)
    de421_km = (kernel["moon"] - kernel["earth"]).at(timescale().tt_jd(jd)).distance().km
    assert abs(de421_km - 368409.7) < 10.0  # Meeus's series vs DE421: within its ~10 km
    g = geocentric_moon(jd)  # DE421
    assert abs(float(g.ecliptic_longitude_deg) - 133.167265) * _AS < 10.0  # Meeus's 10″
    assert abs(float(g.ecliptic_latitude_deg) - -3.229126) * _AS < 4.0  # Meeus's 4″
    assert abs(float(g.distance_km) - de421_km) < 0.2
    e = geocentric_moon(jd, source="elp")  # our long-term theory, mean arguments of ELP/MPP02
    assert abs(float(e.ecliptic_longitude_deg) - 133.167265) * _AS < 10.0
    assert abs(float(e.ecliptic_latitude_deg) - -3.229126) * _AS < 4.0


def test_broadcasting_scalar_array_and_nan():
    obs = Observer(52.0, -7.0)
    scalar = moon_position(2451545.0, obs)
    assert np.ndim(scalar.azimuth_deg) == 0 and np.ndim(scalar.illuminated_fraction) == 0
    grid = np.array([[2451545.0, np.nan], [2451545.5, 2451546.0]])
    p = moon_position(grid, obs)
    for name in ("azimuth_deg", "altitude_deg", "declination_deg", "semidiameter_deg", "illuminated_fraction"):
        value = getattr(p, name)
        assert value.shape == (2, 2)
        assert np.isnan(value[0, 1]) and np.all(np.isfinite(value[[0, 1, 1], [0, 0, 1]]))
    assert p.azimuth_deg[0, 0] == pytest.approx(float(scalar.azimuth_deg), abs=1e-9)
    assert p.altitude_deg[0, 0] == pytest.approx(
        float(apparent_altitude(scalar.altitude_geometric_deg, "bennett1982", 1010.0, 10.0)), abs=1e-9
    )


def test_dense_instants_interpolated_as_direct():
    obs = Observer(52.0, -7.0, refraction=None)
    dense = 2460000.5 + np.arange(0.0, 2.0, 1.0 / 1440.0)  # a minute apart: nodes and interpolation
    p = moon_position(dense, obs)
    direct = moon_position(dense[::97].copy(), obs)  # sparse: evaluated directly
    assert (
        _separation_arcsec(p.azimuth_deg[::97], p.altitude_deg[::97], direct.azimuth_deg, direct.altitude_deg).max()
        < 0.01
    )


def test_delta_t_sigma_moves_the_moon_a_quarter_degree_at_3000_bc():
    # ΔT's σ ≈ 0.8·t² s (Morrison & Stephenson 2004), t = (−2999 − 1820)/100 → ~31 min; the Moon moves against the
    # Sun about 0.5°/h, so ≈ 0.26° (issue 16: "about a quarter of a degree").
    p = moon_position(-2999 * 365.25 + 1721058.0, Observer(52.0, -7.0))
    assert 0.2 < float(p.delta_t_sigma_deg) < 0.3
    given = moon_position(2451545.0, Observer(52.0, -7.0), delta_t_s=64.0)
    assert float(given.delta_t_sigma_s) == 0.0 and float(given.delta_t_sigma_deg) == 0.0


@pytest.mark.parametrize(
    ("jd", "source", "words"),
    [(0.0, "auto", "outside the Moon's span"), (2451545.0, "planets", "is not one of")],
)
def test_bad_requests_raise_input_error(jd, source, words):
    with pytest.raises(InputError, match=words):
        moon_position(jd, Observer(52.0, -7.0), source=source)
