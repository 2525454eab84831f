"""The long-term CIO locator (lightpath.sky.cio) against pyerfa and an independent quadrature."""

from __future__ import annotations

import erfa
import numpy as np
import pytest
from scipy.integrate import quad

from lightpath.sky import cio

MAS = np.pi / (180.0 * 3600.0 * 1000.0)  # radians per milliarcsecond
J2000 = 2451545.0


def _jd(centuries):
    return J2000 + np.asarray(centuries, dtype=float) * 36525.0


def test_iau2006_polynomial_and_omega_terms_match_erfa_s06():
    # pyerfa s06 with X = Y = 0 is the IAU 2006 series for s + XY/2 (Capitaine & Wallace 2006, Table 5).
    # Polynomial + the two Ω terms leave only small periodic terms near J2000 (next largest ~12 μas),
    # which checks the coefficients written in cio.py; a wrong t³ coefficient would grow as t³.
    t = np.linspace(-0.1, 0.1, 4001)
    omega = erfa.faom03(t)
    model = np.polynomial.polynomial.polyval(t, cio.IAU2006_S_POLYNOMIAL_RAD)
    model += cio._OMEGA_TERMS_RAD[0] * np.sin(omega) + cio._OMEGA_TERMS_RAD[1] * np.sin(2 * omega)
    resid = erfa.s06(_jd(t), 0.0, 0.0, 0.0) - model
    assert np.max(np.abs(resid)) < 0.04 * MAS
    t_far = np.linspace(-3.0, 3.0, 601)  # polynomial alone over ±3 centuries: only periodic terms left (< 5 mas)
    poly_far = np.polynomial.polynomial.polyval(t_far, cio.IAU2006_S_POLYNOMIAL_RAD)
    resid_far = erfa.s06(_jd(t_far), 0.0, 0.0, 0.0) - poly_far
    assert np.max(np.abs(resid_far)) < 5.0 * MAS


@pytest.mark.parametrize(("lo", "hi", "limit_mas"), [(-0.5, 0.5, 0.3), (-2.0, 2.0, 3.5)])
def test_matches_erfa_s06_near_j2000(lo, hi, limit_mas):
    # pyerfa s06 (IAU 2006) is the reference near J2000: < 0.3 mas over 1950–2050, < 3.5 mas over 1800–2200.
    jd = _jd(np.linspace(lo, hi, 2001))
    diff = cio.s_plus_half_xy_rad(jd) - erfa.s06(jd, 0.0, 0.0, 0.0)
    assert np.max(np.abs(diff)) < limit_mas * MAS


def _precession_rate(epoch: float) -> float:
    """ds/dt (rad per Julian year) of the long-term pole, central differences of erfa.ltpb."""
    d = 1e-3
    m, mp, mm = erfa.ltpb(epoch), erfa.ltpb(epoch + d), erfa.ltpb(epoch - d)
    x, y, z = m[2]
    dx, dy = (mp[2, 0] - mm[2, 0]) / (2 * d), (mp[2, 1] - mm[2, 1]) / (2 * d)
    return -(x * dy - y * dx) / (1.0 + z)


@pytest.mark.parametrize("epoch", [1000.0, -3000.0, -7500.0, -10000.0, 3000.0])
def test_integral_matches_adaptive_quadrature(epoch):
    # The definition of s (IERS Conventions 2010, eq. 5.11) integrated by scipy.integrate.quad from J2000,
    # with the same pole (erfa.ltpb); the nutation's drift and Ω terms added as in cio.py.
    integral, _ = quad(_precession_rate, 2000.0, epoch, limit=400, epsabs=1e-13, epsrel=1e-10)
    x0, y0 = erfa.ltpb(2000.0)[2, :2]
    x, y = erfa.ltpb(epoch)[2, :2]
    # precession-only slope of s + XY/2 at J2000, per century, to separate the nutation's drift
    d = 1e-3
    xy = [np.prod(erfa.ltpb(2000.0 + k * d)[2, :2]) / 2 for k in (-1, 1)]
    slope = 100.0 * (_precession_rate(2000.0) + (xy[1] - xy[0]) / (2 * d))
    expected_precession = integral + x * y / 2 - x0 * y0 / 2  # s + XY/2, relative to J2000
    jd = sum(erfa.epj2jd(epoch))
    omega = erfa.faom03((epoch - 2000.0) / 100.0)
    periodic = cio._OMEGA_TERMS_RAD[0] * np.sin(omega) + cio._OMEGA_TERMS_RAD[1] * np.sin(2 * omega)
    drift = (cio.IAU2006_S_POLYNOMIAL_RAD[1] - slope) * (epoch - 2000.0) / 100.0
    got_precession = float(cio.s_plus_half_xy_rad(jd)) - periodic - drift - cio.IAU2006_S_POLYNOMIAL_RAD[0]
    assert got_precession == pytest.approx(expected_precession, abs=0.05 * MAS)


def test_iau2006_series_fails_far_back():
    # Why the module exists: with the long-term pole the IAU 2006 series is off by ~11′ at 3000 BC
    # (Julian epoch −2999) and by tens of degrees at 10,000 BC.
    jd = np.array([sum(erfa.epj2jd(-2999.0)), sum(erfa.epj2jd(-9999.0))])
    diff_arcsec = np.abs(erfa.s06(jd, 0.0, 0.0, 0.0) - cio.s_plus_half_xy_rad(jd)) * 206264.806
    assert 500.0 < diff_arcsec[0] < 800.0
    assert diff_arcsec[1] > 36000.0


def test_shape_and_nan():
    jd = np.array([[J2000, np.nan], [J2000 - 1e6, J2000 + 3e5]])
    out = cio.s_plus_half_xy_rad(jd)
    assert out.shape == (2, 2)
    assert np.isnan(out[0, 1]) and np.isfinite(out[[0, 1, 1], [0, 0, 1]]).all()
