"""The Sun from a JPL planetary kernel (.bsp) through skyfield, offline.

The default kernel is DE421 as shipped by the ``skyfield-data`` package (no
download, ever).  Any other SPK file with the Sun (10) and the Earth (399, via
the Earth–Moon barycentre 3) can be given by path, e.g. DE440 or DE441.

:func:`sun_gcrs_apparent_au` returns the Sun's **apparent** geocentric position
in the GCRS (light time, annual aberration and gravitational deflection as
skyfield's ``earth.at(t).observe(sun).apparent()`` computes them), in au.
Everything after that vector — precession, nutation, Earth rotation — is
lightpath's own long-term pipeline, shared with the VSOP87 source.

>>> kernel = load_kernel(DE421_PATH)
>>> lo, hi = kernel_span_jd_tt(kernel)
>>> lo, hi
(2414864.5, 2471184.5)

References
----------
Folkner, W. M., Williams, J. G., & Boggs, D. H. (2009). The Planetary and Lunar
Ephemeris DE421. *IPN Progress Report* 42-178.

Rhodes, B. (2019). Skyfield: high precision research-grade positions for planets
and Earth satellites generator. Astrophysics Source Code Library, ascl:1907.024.
"""

from __future__ import annotations

import atexit
import functools
import os
import warnings

import numpy as np
from numpy.typing import ArrayLike, NDArray

from lightpath.errors import InputError
from lightpath.sky.deltat import timescale

__all__ = ["DE421_PATH", "kernel_label", "kernel_span_jd_tt", "load_kernel", "sun_gcrs_apparent_au"]


def _skyfield_data_dir() -> str:
    import skyfield_data

    with warnings.catch_warnings():  # skyfield-data warns about its Earth-orientation file's age; not used here
        warnings.simplefilter("ignore")
        return skyfield_data.get_skyfield_data_path()


#: DE421 as bundled by skyfield-data (covers 1899-07-29 … 2053-10-09).
DE421_PATH = os.path.join(_skyfield_data_dir(), "de421.bsp")

# Light from the Sun takes ~500 s; keep instants this far (days) inside the kernel's coverage.
_SPAN_MARGIN_DAYS = 0.02


@functools.cache
def load_kernel(path: str):
    """Open a JPL SPK kernel from a local file (never downloads); InputError if missing or unusable."""
    from skyfield.jpllib import SpiceKernel

    if not os.path.isfile(path):
        raise InputError(f"ephemeris_path: file {path!r} does not exist (give a JPL .bsp kernel such as de440.bsp)")
    try:
        kernel = SpiceKernel(path)
    except Exception as exc:  # noqa: BLE001 - any failure to parse is the user's file
        raise InputError(f"ephemeris_path: {path!r} is not a readable JPL SPK kernel ({type(exc).__name__})") from None
    atexit.register(kernel.close)  # the kernel stays open (cached) for the whole run
    pairs = {(s.center, s.target) for s in kernel.segments}
    for need in ((0, 10), (0, 3), (3, 399)):
        if need not in pairs:
            raise InputError(
                f"ephemeris_path: {path!r} lacks segment {need[0]}->{need[1]}; it needs the Sun (0->10) and "
                "the Earth (0->3, 3->399)"
            )
    return kernel


def kernel_span_jd_tt(kernel) -> tuple[float, float]:
    """(first, last) Julian date (TDB ≈ TT) covered by every segment the Sun and the Earth need."""
    lo, hi = -np.inf, np.inf
    for seg in kernel.segments:
        if (seg.center, seg.target) in ((0, 10), (0, 3), (3, 399)):
            lo = max(lo, float(seg.spk_segment.start_jd))
            hi = min(hi, float(seg.spk_segment.end_jd))
    return lo, hi


def kernel_label(path: str) -> str:
    """A short name for results, e.g. ``"JPL DE421 via skyfield"``."""
    stem = os.path.splitext(os.path.basename(path))[0]
    return f"JPL {stem.upper()} via skyfield" if stem.lower().startswith("de") else f"JPL kernel {stem} via skyfield"


def check_in_kernel_span(jd_tt: NDArray, kernel, path: str) -> None:
    """InputError naming the first instant outside the kernel's own coverage."""
    lo, hi = kernel_span_jd_tt(kernel)
    jd = np.asarray(jd_tt, dtype=float)
    bad = np.isfinite(jd) & ((jd < lo + _SPAN_MARGIN_DAYS) | (jd > hi - _SPAN_MARGIN_DAYS))
    if np.any(bad):
        first = float(jd[bad].flat[0])
        raise InputError(
            f"instant JD {first:.5f} (TT) is outside the span of {os.path.basename(path)}: "
            f"JD {lo:.1f}..{hi:.1f}; use the long-term source (source 'vsop87') or a kernel that covers it"
        )


def sun_gcrs_apparent_au(kernel, jd_tt: ArrayLike) -> NDArray:
    """Apparent geocentric GCRS position of the Sun, au, shape ``jd_tt.shape + (3,)``.

    ``earth.at(t).observe(sun).apparent()`` in skyfield: light time, aberration,
    gravitational deflection.  ``nan`` instants give ``nan`` rows.
    """
    jd = np.asarray(jd_tt, dtype=float)
    flat = jd.reshape(-1)
    out = np.full((flat.size, 3), np.nan)
    ok = np.isfinite(flat)
    if np.any(ok):
        t = timescale().tt_jd(flat[ok])
        pos = kernel["earth"].at(t).observe(kernel["sun"]).apparent().position.au
        out[ok] = np.asarray(pos).reshape(3, -1).T
    return out.reshape(jd.shape + (3,))
