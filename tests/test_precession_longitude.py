"""General precession in longitude p_A (Laskar 1986, Vondrák et al. 2011) and the VSOP87D frame matrix.

References used below:
- pyerfa ``erfa.p06e``: IAU 2006 precession angles (Capitaine, Wallace & Chapront 2003, A&A 412, 567, "P03");
  output 12 is p_A, rad.  Its polynomial 5028.796195″t + 1.1054348″t² (t in Julian centuries) is from memory.
- pyerfa ``erfa.ltpecl``, ``erfa.ltpequ``, ``erfa.ltecm``, ``erfa.ltp``, ``erfa.ltpb``: the long-term model of
  Vondrák, Capitaine & Wallace (2011), A&A 534, A22.
- Laskar, J. (1986), A&A 157, 59-70: p_A = 50290.966″T + 111.1971″T² + … (T in Julian millennia), from memory.
"""

import erfa
import numpy as np
import pytest

from lightpath.sky.orientation import general_precession_laskar1986_rad, general_precession_vondrak2011_rad
from lightpath.sky.sources import vsop87_frame_matrix

AS = 206264.80624709636  # arcsec per radian
J2000 = 2451545.0


def _jd(epoch):
    a, b = erfa.epj2jd(np.asarray(epoch, dtype=float))
    return a + b


def _pa_iau2006(jd):
    return erfa.p06e(jd, 0.0)[12]  # pyerfa p06e: p_A, rad


def _rate_arcsec_per_century(f, h_cy=0.01):
    return (f(J2000 + h_cy * 36525.0) - f(J2000 - h_cy * 36525.0)) / (2 * h_cy) * AS


def _unit(v):
    return v / np.linalg.norm(v, axis=-1)[..., None]


@pytest.mark.parametrize(
    ("lo", "hi", "bound"),
    [(1000.0, 3000.0, 0.06), (0.0, 4000.0, 0.7)],  # measured 0.055″ and 0.647″ (2001 epochs each)
)
def test_vondrak_against_iau2006_near_j2000(lo, hi, bound):
    jd = _jd(np.linspace(lo, hi, 2001))
    d = (general_precession_vondrak2011_rad(jd) - _pa_iau2006(jd)) * AS
    assert np.max(np.abs(d)) < bound


def test_vondrak_at_j2000_value_rate_and_switch():
    assert abs(float(general_precession_vondrak2011_rad(J2000))) < 1e-15
    # IAU 2006 rate 5028.796195″/cy (Capitaine et al. 2003, from memory), here via erfa.p06e numerically
    rate_iau = _rate_arcsec_per_century(_pa_iau2006)
    assert abs(rate_iau - 5028.796195) < 1e-4
    assert abs(_rate_arcsec_per_century(general_precession_vondrak2011_rad) - rate_iau) < 1e-3  # measured 1.1e-5
    # across the switch to the polynomial within a micro-arcsecond of J2000: both branches follow erfa.p06e
    jd = J2000 + np.array([-10.0, -1e-3, -1e-6, 0.0, 1e-6, 1e-3, 10.0])
    d = (general_precession_vondrak2011_rad(jd) - _pa_iau2006(jd)) * AS
    assert np.max(np.abs(d)) < 1e-6  # measured 3e-9″


@pytest.mark.parametrize("epoch", [-10000.0, -3000.0, 1000.0, 3000.0])
def test_vondrak_matches_geometric_definition(epoch):
    # Lieske et al. (1977) definition: the node N of the ecliptic of date on the J2000 ecliptic has longitude
    # Π_A in the J2000 frame and Π_A + p_A in the frame of date; equinox = cross(equator pole, ecliptic pole).
    p0, q0 = erfa.ltpecl(2000.0), erfa.ltpequ(2000.0)
    p, q = erfa.ltpecl(epoch), erfa.ltpequ(epoch)
    g0, g, n = _unit(np.cross(q0, p0)), _unit(np.cross(q, p)), _unit(np.cross(p0, p))
    big_pi = np.arctan2(np.dot(p0, np.cross(g0, n)), np.dot(g0, n))
    lon_date = np.arctan2(np.dot(p, np.cross(g, n)), np.dot(g, n))
    expected = (lon_date - big_pi + np.pi) % (2 * np.pi) - np.pi
    got = float(general_precession_vondrak2011_rad(_jd(epoch)))
    assert abs(got - expected) * AS < 1e-3  # < 1 mas (measured < 1e-10 mas)


def test_laskar_at_j2000_value_and_rate():
    assert float(general_precession_laskar1986_rad(J2000)) == 0.0
    rate_per_millennium = _rate_arcsec_per_century(general_precession_laskar1986_rad) * 10.0
    assert abs(rate_per_millennium - 50290.966) < 1e-3  # Laskar (1986), from memory; measured 8e-5


def test_laskar_parts_from_iau2006_at_the_rate_difference():
    # Rate difference 5029.0966 − 5028.796195 = 0.300405″/cy (both from memory, see module docstring);
    # quadratic 1.111971 − 1.1054348 = 0.0065″/cy².  Over ±500 years: fitted slope 0.300402″/cy,
    # max |difference| 1.665″, max residual after the slope 0.164″.
    epoch = np.linspace(1500.0, 2500.0, 1001)
    t = (epoch - 2000.0) / 100.0
    jd = _jd(epoch)
    d = (general_precession_laskar1986_rad(jd) - _pa_iau2006(jd)) * AS
    slope = np.polyfit(t, d, 3)[-2]
    assert abs(slope - 0.300405) < 1e-4
    assert np.max(np.abs(d)) < 1.7
    assert np.max(np.abs(d - 0.300405 * t)) < 0.17


@pytest.mark.parametrize("f", [general_precession_laskar1986_rad, general_precession_vondrak2011_rad])
def test_precession_broadcasts_and_propagates_nan(f):
    jd = J2000 + np.arange(6.0).reshape(2, 3) * 36525.0 - 90000.0
    out = f(jd)
    assert out.shape == (2, 3)
    assert np.allclose(out.ravel(), [f(x) for x in jd.ravel()], rtol=0, atol=1e-15)
    assert np.shape(f(J2000)) == ()
    with np.errstate(invalid="ignore"):
        res = f(np.array([np.nan, J2000 + 1e5]))
    assert np.isnan(res[0]) and np.isfinite(res[1])


def test_frame_matrix_is_a_rotation_whose_third_row_is_the_long_term_pole():
    epoch = np.linspace(-10000.0, 3000.0, 131)
    m = vsop87_frame_matrix(_jd(epoch))
    assert m.shape == (131, 3, 3)
    assert np.max(np.abs(m @ np.swapaxes(m, -1, -2) - np.eye(3))) < 1e-12  # measured 1.3e-14
    assert np.max(np.abs(np.linalg.det(m) - 1.0)) < 1e-12
    # ltpecl is in the J2000 mean frame; the matrix starts from the GCRS, so the pole goes through ERFA's frame
    # bias B = ltp(epoch)^T ltpb(epoch) (the raw ltpecl differs by the 23-mas bias, 1.0e-7).
    bias = np.swapaxes(erfa.ltp(epoch), -1, -2) @ erfa.ltpb(epoch)
    pole_gcrs = np.einsum("ni,nij->nj", erfa.ltpecl(epoch), bias)
    assert np.max(np.abs(m[:, 2, :] - pole_gcrs)) < 1e-12  # measured 3e-16


def test_frame_matrix_at_j2000_and_shapes():
    assert np.max(np.abs(vsop87_frame_matrix(J2000) - erfa.ltecm(2000.0))) < 1e-12  # Δp = 0 at J2000
    assert vsop87_frame_matrix(np.float64(J2000)).shape == (3, 3)
    jd = _jd(np.array([[-3000.0, 0.0, 1000.0], [2000.0, 2500.0, 3000.0]]))
    m = vsop87_frame_matrix(jd)
    assert m.shape == (2, 3, 3, 3)
    assert np.allclose(m[1, 2], vsop87_frame_matrix(jd[1, 2]), rtol=0, atol=1e-15)
