"""The Sun against skyfield + JPL DE421 at 1,000 random instants 1900-2050 (reference library).

skyfield (Rhodes 2019) with DE421 (Folkner et al. 2009) from skyfield-data, IAU 2000A nutation and IAU 2006
precession: topocentric apparent altitude/azimuth with refraction off, geocentric apparent RA/Dec of date and
the ecliptic longitude of date.  Tolerances (issue 3): < 1″ for the kernel source, < 5″ for VSOP87D.
Both sides use skyfield's ΔT so that only the Sun and the Earth's orientation are compared.
"""

import warnings

import numpy as np
import pytest

from lightpath.sky.observer import Observer
from lightpath.sky.sun import geocentric_sun, sun_position

TOLERANCE_ARCSEC = {"jpl": 1.0, "vsop87": 5.0}


@pytest.fixture(scope="module")
def reference():
    from skyfield.api import Loader, wgs84
    from skyfield.framelib import ecliptic_frame

    from lightpath.sky.jpl import _skyfield_data_dir

    with warnings.catch_warnings():
        warnings.simplefilter("ignore")
        load = Loader(_skyfield_data_dir())
        ts = load.timescale(builtin=True)
        eph = load("de421.bsp")
    rng = np.random.default_rng(20260)  # fixed RNG seed: the same instants every run
    jd = 2415020.5 + rng.random(1000) * (2469807.5 - 2415020.5)  # 1900-01-01 .. 2050-01-01
    sites = np.array([[51.0, -3.0, 100.0], [-35.0, 20.0, 10.0], [28.0, 35.0, 60.0], [65.0, -20.0, 30.0]])
    site_of = np.arange(jd.size) % len(sites)
    t = ts.tt_jd(jd)
    geo = eph["earth"].at(t).observe(eph["sun"]).apparent()
    ra, dec, _ = geo.radec(epoch="date")
    lat_e, lon_e, _ = geo.frame_latlon(ecliptic_frame)
    alt = np.empty(jd.size)
    az = np.empty(jd.size)
    for k, (la, lo, h) in enumerate(sites):
        m = site_of == k
        tk = ts.tt_jd(jd[m])
        a, z, _ = (eph["earth"] + wgs84.latlon(la, lo, h)).at(tk).observe(eph["sun"]).apparent().altaz()
        alt[m], az[m] = a.degrees, z.degrees
    return {
        "jd": jd,
        "delta_t": np.asarray(t.delta_t),
        "sites": sites,
        "site_of": site_of,
        "alt": alt,
        "az": az,
        "ra": ra._degrees,
        "dec": dec.degrees,
        "lon_ecl": lon_e.degrees,
    }


def _wrap_arcsec(d_deg):
    return ((d_deg + 180.0) % 360.0 - 180.0) * 3600.0


@pytest.mark.parametrize("source", ["jpl", "vsop87"])
def test_topocentric_altaz_matches_skyfield(reference, source):
    r = reference
    worst = 0.0
    for k, (la, lo, h) in enumerate(r["sites"]):
        m = r["site_of"] == k
        obs = Observer(la, lo, h, refraction=None)
        p = sun_position(r["jd"][m], obs, source=source, delta_t_s=r["delta_t"][m])
        d_alt = (p.altitude_deg - r["alt"][m]) * 3600
        d_az = _wrap_arcsec(p.azimuth_deg - r["az"][m]) * np.cos(np.radians(r["alt"][m]))
        worst = max(worst, float(np.max(np.hypot(d_alt, d_az))))
        assert np.array_equal(p.altitude_deg, p.altitude_geometric_deg)  # refraction off
    assert worst < TOLERANCE_ARCSEC[source]


@pytest.mark.parametrize("source", ["jpl", "vsop87"])
def test_geocentric_of_date_matches_skyfield(reference, source):
    r = reference
    g = geocentric_sun(r["jd"], source)
    d_ra = _wrap_arcsec(g.right_ascension_deg - r["ra"]) * np.cos(np.radians(r["dec"]))
    d_dec = (g.declination_deg - r["dec"]) * 3600
    d_lon = _wrap_arcsec(g.ecliptic_longitude_deg - r["lon_ecl"])
    assert np.max(np.hypot(d_ra, d_dec)) < TOLERANCE_ARCSEC[source]
    assert np.max(np.abs(d_lon)) < TOLERANCE_ARCSEC[source]
