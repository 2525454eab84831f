"""Measure the Sun's accuracy per era and per source, for docs/sun-model.md and docs/accuracy.md.

* 1900–2050: lightpath (DE421 source and VSOP87D source) against skyfield + DE421 topocentric apparent
  altitude/azimuth (refraction off, skyfield's ΔT on both sides) at random instants and four sites.
* −3000…+3000: the VSOP87D source's apparent geocentric GCRS direction against JPL DE406 (PyPI ``de406``
  via ``jplephem.ephem``, computed as in ``tools/make_de406_table.py``) on a dense grid, per 1000-year era;
  and the along-track (ecliptic longitude) offset, fitted by a quadratic in time to give an *estimate*
  (not a measurement) for −10000…−3000.

    /tmp/dev/bin/python tools/measure_sun_accuracy.py [--package-dir DIR] [--n-random N] [--n-de406 N]
"""

from __future__ import annotations

import argparse
import sys
import warnings
from pathlib import Path

import erfa
import numpy as np

sys.path.insert(0, str(Path(__file__).resolve().parent))


def _sep_arcsec(a, b):
    a = a / np.linalg.norm(a, axis=-1)[..., None]
    b = b / np.linalg.norm(b, axis=-1)[..., None]
    return np.degrees(np.arctan2(np.linalg.norm(np.cross(a, b), axis=-1), np.sum(a * b, axis=-1))) * 3600


def modern(n: int) -> None:
    from skyfield.api import Loader, wgs84

    from lightpath.sky.jpl import _skyfield_data_dir
    from lightpath.sky.observer import Observer
    from lightpath.sky.sun import sun_position

    with warnings.catch_warnings():
        warnings.simplefilter("ignore")
        load = Loader(_skyfield_data_dir())
        ts, eph = load.timescale(builtin=True), load("de421.bsp")
    rng = np.random.default_rng(1900)  # RNG seed
    jd = 2415020.5 + rng.random(n) * (2469807.5 - 2415020.5)
    sites = [(51.0, -3.0, 100.0), (-35.0, 20.0, 10.0), (28.0, 35.0, 60.0), (65.0, -20.0, 30.0)]
    out = {"jpl": [], "vsop87": []}
    for k, (la, lo, h) in enumerate(sites):
        part = jd[k :: len(sites)]
        t = ts.tt_jd(part)
        alt, az, _ = (eph["earth"] + wgs84.latlon(la, lo, h)).at(t).observe(eph["sun"]).apparent().altaz()
        for src in out:
            p = sun_position(part, Observer(la, lo, h, refraction=None), source=src, delta_t_s=np.asarray(t.delta_t))
            d_alt = (p.altitude_deg - alt.degrees) * 3600
            d_az = ((p.azimuth_deg - az.degrees + 180) % 360 - 180) * 3600 * np.cos(alt.radians)
            out[src].append(np.hypot(d_alt, d_az))
    print(f"1900-2050, {n} random instants, topocentric alt/az vs skyfield+DE421 (arcsec):")
    for src, parts in out.items():
        s = np.concatenate(parts)
        print(f"  {src:7s} max {s.max():.4f}  rms {np.sqrt(np.mean(s**2)):.4f}")


def ancient(n: int, package_dir: str | None) -> None:
    import make_de406_table as tool
    from jplephem.ephem import Ephemeris

    from lightpath.sky.sources import vsop87_sun_gcrs_apparent_au

    eph = Ephemeris(tool._import_de406(package_dir))
    jd = np.linspace(float(eph.jalpha) + 1.0, float(eph.jomega) - 1.0, n) + 0.123
    ref, _ = tool.apparent_sun(eph, jd)
    ours = vsop87_sun_gcrs_apparent_au(jd)
    sep = _sep_arcsec(ours, ref)
    ep = erfa.epj(jd, 0.0)
    print(f"-3000..+3000, {n} instants, VSOP87D source vs JPL DE406, apparent geocentric direction (arcsec):")
    for lo in range(-3000, 3000, 1000):
        m = (ep >= lo) & (ep < lo + 1000)
        print(f"  {lo:+5d}..{lo + 1000:+5d}  max {sep[m].max():6.2f}  rms {np.sqrt(np.mean(sep[m] ** 2)):6.2f}")
    m = (ep >= 1900) & (ep < 2050)
    print(f"  1900..2050   max {sep[m].max():6.2f}  rms {np.sqrt(np.mean(sep[m] ** 2)):6.2f}")
    print(f"  all          max {sep.max():6.2f} (at Julian epoch {ep[np.argmax(sep)]:.0f})")
    # along-track offset in the long-term ecliptic of date, fitted by a quadratic in millennia
    ecm = erfa.ltecm(ep)
    l1, _ = erfa.c2s(np.einsum("nij,nj->ni", ecm, ours))
    l2, _ = erfa.c2s(np.einsum("nij,nj->ni", ecm, ref))
    dl = ((l1 - l2 + np.pi) % (2 * np.pi) - np.pi) * 206264.806
    t = (ep - 2000.0) / 1000.0
    coeff = np.polyfit(t, dl, 2)
    print(f"  along-track offset fit: {coeff[2]:+.2f} {coeff[1]:+.2f}·T {coeff[0]:+.3f}·T² arcsec (T millennia)")
    for year in (-5000, -8000, -10000):
        tt = (year - 2000) / 1000
        print(f"    extrapolated to {year}: {np.polyval(coeff, tt):+.0f}″ (estimate, not measured)")


def main() -> None:
    parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    parser.add_argument("--package-dir", help="directory holding the unpacked de406 package")
    parser.add_argument("--n-random", type=int, default=4000)
    parser.add_argument("--n-de406", type=int, default=60000)
    args = parser.parse_args()
    warnings.simplefilter("ignore")
    modern(args.n_random)
    ancient(args.n_de406, args.package_dir)


if __name__ == "__main__":
    main()
