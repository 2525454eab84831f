"""Source choice, bad input, broadcasting, ΔT override and the node interpolation of sun_position."""

import numpy as np
import pytest

from lightpath.errors import InputError
from lightpath.sky import sun as sun_module
from lightpath.sky.apparent import apparent_columns
from lightpath.sky.observer import Observer
from lightpath.sky.sources import choose_source, long_term_span_jd_tt
from lightpath.sky.sun import azalt_from_enu, enu_from_azalt, geocentric_sun, sun_position

OBS = Observer(30.0, 31.0, 50.0)


def test_auto_choice_and_named_sources():
    assert choose_source(2451545.0).name == "JPL DE421 via skyfield"
    assert choose_source(2451545.0, "vsop87").kind == "vsop87"
    assert choose_source([2451545.0, np.nan], "jpl").kind == "jpl"
    assert choose_source(1000000.0).kind == "vsop87"


def test_out_of_span_errors_name_instant_and_span():
    lo, hi = long_term_span_jd_tt()
    with pytest.raises(InputError, match=r"outside the supported span of Julian epochs -10000\.\.3000"):
        choose_source([2451545.0, lo - 1.0])
    with pytest.raises(InputError, match="JD"):
        sun_position(hi + 10.0, OBS)
    with pytest.raises(InputError, match="de421"):
        choose_source(1000000.0, "jpl")


def test_missing_or_bad_kernel_file(tmp_path):
    missing = tmp_path / "de440.bsp"
    # the API layer names its parameter, not a command-line flag
    with pytest.raises(InputError, match="^ephemeris_path: .*de440.bsp.*does not exist"):
        choose_source(2451545.0, ephemeris_path=str(missing))
    with pytest.raises(InputError, match="^ephemeris_path: .*together with source 'vsop87'"):
        choose_source(2451545.0, "vsop87", ephemeris_path=str(missing))
    junk = tmp_path / "junk.bsp"
    junk.write_bytes(b"not a kernel")
    with pytest.raises(InputError, match="junk.bsp"):
        choose_source(2451545.0, str(junk))
    with pytest.raises(InputError, match="auto, jpl, vsop87"):
        choose_source(2451545.0, "vsop2013")


def test_user_kernel_path_is_used():
    from lightpath.sky.jpl import DE421_PATH

    src = choose_source(2451545.0, ephemeris_path=DE421_PATH)
    assert src.kind == "jpl" and src.path == DE421_PATH
    assert sun_position(2451545.0, OBS, source=DE421_PATH).source == "JPL DE421 via skyfield"


def test_broadcasting_scalar_array_nan():
    p = sun_position(2451545.0, OBS)
    assert np.ndim(p.azimuth_deg) == 0 and np.ndim(p.jd_ut) == 0
    jd = np.array([[2451545.0, np.nan, 2451546.0]])
    p = sun_position(jd, OBS)
    for name in ("azimuth_deg", "altitude_deg", "declination_deg", "equation_of_time_min", "delta_t_s"):
        value = getattr(p, name)
        assert value.shape == (1, 3), name
    assert np.isnan(p.azimuth_deg[0, 1]) and np.isfinite(p.azimuth_deg[0, [0, 2]]).all()
    g = geocentric_sun(jd)
    assert g.declination_deg.shape == (1, 3) and np.isnan(g.declination_deg[0, 1])


def test_delta_t_override_and_model():
    jd = 2451545.0
    p = sun_position(jd, OBS, delta_t_s=100.0)
    assert float(p.delta_t_s) == 100.0 and float(p.delta_t_sigma_s) == 0.0
    assert float(p.jd_ut) == pytest.approx(jd - 100.0 / 86400, abs=1e-9)
    q = sun_position(jd, OBS)
    # ΔT at J2000: 63.8 s (IERS; lightpath.sky.deltat)
    assert float(q.delta_t_s) == pytest.approx(63.8, abs=0.2)
    # one second more of ΔT turns the sky back by 15.04″ of hour angle
    r = sun_position(jd, OBS, delta_t_s=float(q.delta_t_s) + 1.0)
    assert (float(q.hour_angle_deg) - float(r.hour_angle_deg)) * 3600 == pytest.approx(15.04, abs=0.05)


@pytest.mark.parametrize("source", ["jpl", "vsop87"])
def test_dense_grid_interpolation_matches_direct(source, monkeypatch):
    # Two days at one-minute steps go through 0.5-day nodes; compare with every instant computed directly.
    jd = 2451545.0 + np.arange(0.0, 2.0, 1.0 / 1440.0)
    obs = Observer(45.0, 7.0, refraction=None)
    fast = sun_position(jd, obs, source=source, delta_t_s=64.0)
    monkeypatch.setattr(sun_module, "sun_apparent_columns", lambda src, t: apparent_columns(src, t))
    slow = sun_position(jd, obs, source=source, delta_t_s=64.0)
    d_alt = np.abs(fast.altitude_deg - slow.altitude_deg) * 3600
    d_az = np.abs(fast.azimuth_deg - slow.azimuth_deg) * np.cos(np.radians(slow.altitude_deg)) * 3600
    assert np.max(d_alt) < 0.001 and np.max(d_az) < 0.001


def test_enu_round_trip_and_shapes():
    az = np.array([0.0, 90.0, 200.0, 359.0])
    alt = np.array([0.0, 10.0, -5.0, 89.0])
    v = enu_from_azalt(az, alt)
    assert v.shape == (4, 3) and np.allclose(np.linalg.norm(v, axis=1), 1.0)
    az2, alt2 = azalt_from_enu(v * 3.0)
    assert np.allclose(az2, az) and np.allclose(alt2, alt)
    assert np.isnan(enu_from_azalt(np.nan, 1.0)[:2]).all() and np.isnan(enu_from_azalt(0.0, np.nan)).all()


def test_refraction_follows_the_observer():
    jd = 2451545.0 + np.linspace(0, 1, 97)
    base = Observer(10.0, 0.0, refraction=None)
    p0 = sun_position(jd, base)
    pb = sun_position(jd, Observer(10.0, 0.0, refraction="bennett1982"))
    ps = sun_position(jd, Observer(10.0, 0.0, refraction="saemundsson1986", pressure_mbar=900.0))
    assert np.array_equal(p0.altitude_deg, p0.altitude_geometric_deg)
    up = p0.altitude_geometric_deg > 0
    assert np.all(pb.altitude_deg[up] > p0.altitude_deg[up])
    assert np.all(ps.altitude_deg[up] > p0.altitude_deg[up])
    assert np.allclose(pb.azimuth_deg, p0.azimuth_deg)


@pytest.mark.parametrize("source", ["jpl", "vsop87"])
def test_daily_instants_through_chebyshev_blocks_match_direct(source, monkeypatch):
    # Three years of daily instants use the Chebyshev blocks (VSOP87 slow band, precession, nutation);
    # compare with every part summed directly at every instant.
    from lightpath.sky import sources as sources_module

    start = 2415100.5 if source == "jpl" else 625500.5  # 1900 / 3000 BC
    jd = start + np.arange(0.0, 1096.0, 1.0) + 0.37
    obs = Observer(45.0, 7.0, refraction=None)
    fast = sun_position(jd, obs, source=source, delta_t_s=64.0)

    def direct(func, t, *args, **kwargs):
        return func(np.asarray(t, dtype=float).reshape(-1)).reshape(np.shape(t) + (-1,))

    monkeypatch.setattr(sun_module, "chebyshev_blocks", direct)
    monkeypatch.setattr(sources_module, "chebyshev_blocks", direct)
    slow = sun_position(jd, obs, source=source, delta_t_s=64.0)
    d_alt = np.abs(fast.altitude_deg - slow.altitude_deg) * 3600
    d_az = np.abs(fast.azimuth_deg - slow.azimuth_deg) * np.cos(np.radians(slow.altitude_deg)) * 3600
    assert np.max(d_alt) < 0.001 and np.max(d_az) < 0.001


def test_warning_before_3000_bc_only_for_vsop87():
    import warnings

    from lightpath.sky.sources import SunAccuracyWarning

    with pytest.warns(SunAccuracyWarning, match="3000 BC"):
        geocentric_sun(-100000.0)  # 4987 BC
    with warnings.catch_warnings():
        warnings.simplefilter("error", SunAccuracyWarning)
        geocentric_sun(1000000.0)  # 1975 BC: checked span
        sun_position(2451545.0, OBS)
