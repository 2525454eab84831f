"""Write tests/data/de406_sun.csv: the apparent geocentric Sun from JPL DE406 for −3000 … +3000.

DE406 (Standish 1998) is the JPL long ephemeris covering JD 625360.5 – 2816912.5
(3000 BC Feb 23 – AD 3000 May 6).  The PyPI package ``de406`` (1997.1) carries
its Chebyshev coefficients as numpy arrays, read here with jplephem's
``jplephem.ephem.Ephemeris``.  Neither is a lightpath dependency: this script
finds an installed ``de406``, or a directory given with ``--package-dir``, or
else fetches the 178 MB sdist with ``pip download`` into a temporary directory.

For each instant (TT; TDB − TT < 2 ms, ignored) the script computes, on its own
and without lightpath:

* the Earth = EMB − Moon/(1 + EMRAT), barycentric, and its velocity;
* the Sun's light-time-corrected position relative to the Earth (three
  iterations), then annual aberration with the Earth's barycentric velocity
  (ERFA ``ab``) — the apparent GCRS/ICRF direction (no deflection: the Sun is
  the deflecting body);
* the same vector in the true equator and equinox of date, through the
  long-term precession of Vondrák et al. (2011) (ERFA ``ltpb``), full IAU 2000A
  nutation (``nut00a``; 2000B's linear arguments would drift by 1.5″ at 3000 BC)
  about the long-term mean obliquity (angle between ``ltpecl`` and ``ltpequ``),
  and the ecliptic longitude of date with the true obliquity.

Columns: jd_tt, ra_gcrs_deg, dec_gcrs_deg, distance_au, ra_date_deg,
dec_date_deg, ecliptic_longitude_date_deg.  Instants: one random instant in
each of 600 equal slices of DE406's span (numpy default_rng(406)).

    python tools/make_de406_table.py [--package-dir DIR]

References
----------
Standish, E. M. (1998). JPL Planetary and Lunar Ephemerides, DE405/LE405.
JPL Interoffice Memorandum IOM 312.F-98-048 (DE406 is its long-span version).
Vondrák, J., Capitaine, N., & Wallace, P. (2011). *A&A* 534, A22.
Mathews, P. M., Herring, T. A., & Buffett, B. A. (2002). *J. Geophys. Res.* 107, B4 (IAU 2000A nutation).
"""

from __future__ import annotations

import argparse
import glob
import importlib
import os
import subprocess
import sys
import tarfile
import tempfile
from pathlib import Path

import erfa
import numpy as np

OUT = Path(__file__).resolve().parents[1] / "tests" / "data" / "de406_sun.csv"
N_SLICES = 600
RNG_SEED = 406  # random-number-generator seed for the instants


def _import_de406(package_dir: str | None):
    if package_dir:
        sys.path.insert(0, package_dir)
    try:
        return importlib.import_module("de406")
    except ImportError:
        pass
    tmp = tempfile.mkdtemp(prefix="de406-")
    subprocess.run(
        [sys.executable, "-m", "pip", "download", "--no-deps", "--no-binary", ":all:", "de406==1997.1", "-d", tmp],
        check=True,
    )
    (archive,) = glob.glob(os.path.join(tmp, "de406-*.tar.gz"))
    with tarfile.open(archive) as tar:
        tar.extractall(tmp, filter="data")
    sys.path.insert(0, os.path.join(tmp, "de406-1997.1"))
    return importlib.import_module("de406")


def apparent_sun(eph, jd_tt: np.ndarray) -> tuple[np.ndarray, np.ndarray]:
    """Apparent geocentric GCRS unit vectors (n, 3) and geometric light-time distances (au)."""
    km_per_au = erfa.DAU / 1000.0
    emb, emb_v = eph.position_and_velocity("earthmoon", jd_tt)
    moon, moon_v = eph.position_and_velocity("moon", jd_tt)
    earth = (emb - moon * eph.earth_share) / km_per_au  # (3, n) au
    earth_v = (emb_v - moon_v * eph.earth_share) / km_per_au  # au/day
    tau = np.zeros_like(jd_tt)
    for _ in range(3):  # light time
        sun = eph.position("sun", jd_tt - tau) / km_per_au
        vec = sun - earth
        dist = np.linalg.norm(vec, axis=0)
        tau = dist / erfa.DC
    pnat = (vec / dist).T
    beta = (earth_v / erfa.DC).T
    bm1 = np.sqrt(1.0 - np.sum(beta**2, axis=1))
    sun_dist_from_earth = np.linalg.norm((eph.position("sun", jd_tt) / km_per_au - earth), axis=0)
    return erfa.ab(pnat, beta, sun_dist_from_earth, bm1), dist


def of_date(jd_tt: np.ndarray, gcrs_unit: np.ndarray) -> tuple[np.ndarray, np.ndarray, np.ndarray]:
    """RA, Dec (true equator/equinox of date) and ecliptic longitude of date, radians."""
    epj = erfa.epj(jd_tt, 0.0)
    pecl, pequ = erfa.ltpecl(epj), erfa.ltpequ(epj)
    eps_mean = np.arctan2(np.linalg.norm(np.cross(pecl, pequ), axis=1), np.sum(pecl * pequ, axis=1))
    dpsi, deps = erfa.nut00a(jd_tt, 0.0)  # Mathews et al. (2002): full series and fundamental arguments
    rnpb = erfa.numat(eps_mean, dpsi, deps) @ erfa.ltpb(epj)
    v = np.einsum("nij,nj->ni", rnpb, gcrs_unit)
    ra, dec = erfa.c2s(v)
    eps = eps_mean + deps
    ye = v[:, 1] * np.cos(eps) + v[:, 2] * np.sin(eps)
    lon = np.arctan2(ye, v[:, 0])
    return erfa.anp(ra), dec, erfa.anp(lon)


def main() -> None:
    parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    parser.add_argument("--package-dir", help="directory holding the unpacked de406 package (its parent)")
    parser.add_argument("--out", type=Path, default=OUT)
    args = parser.parse_args()

    from jplephem.ephem import Ephemeris

    eph = Ephemeris(_import_de406(args.package_dir))
    lo, hi = float(eph.jalpha) + 1.0, float(eph.jomega) - 1.0
    rng = np.random.default_rng(RNG_SEED)
    edges = np.linspace(lo, hi, N_SLICES + 1)
    jd = edges[:-1] + rng.random(N_SLICES) * np.diff(edges)
    unit, dist = apparent_sun(eph, jd)
    ra_g, dec_g = erfa.c2s(unit)
    ra_d, dec_d, lon_d = of_date(jd, unit)
    deg = np.degrees
    rows = np.column_stack([jd, deg(erfa.anp(ra_g)), deg(dec_g), dist, deg(ra_d), deg(dec_d), deg(lon_d)])
    header = (
        "# Apparent geocentric Sun from JPL DE406 (PyPI de406 1997.1 via jplephem.ephem), "
        "written by tools/make_de406_table.py\n"
        "# light time + annual aberration (ERFA ab); of-date columns via Vondrak et al. (2011) "
        "ltpb + IAU 2000A nutation (nut00a) about the ltpecl/ltpequ mean obliquity\n"
        "jd_tt,ra_gcrs_deg,dec_gcrs_deg,distance_au,ra_date_deg,dec_date_deg,ecliptic_longitude_date_deg\n"
    )
    args.out.parent.mkdir(parents=True, exist_ok=True)
    with open(args.out, "w") as fh:
        fh.write(header)
        for r in rows:
            fh.write(f"{r[0]:.6f},{r[1]:.10f},{r[2]:.10f},{r[3]:.10f},{r[4]:.10f},{r[5]:.10f},{r[6]:.10f}\n")
    print(f"wrote {args.out}: {len(rows)} instants, JD {jd.min():.1f}..{jd.max():.1f}")


if __name__ == "__main__":
    main()
