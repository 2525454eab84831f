"""Write tests/data/de406_moon.csv: the geometric geocentric Moon from JPL DE406 for −3000 … +3000.

DE406 (Standish 1998) covers JD 625360.5 – 2816848.5 (3000 BC – AD 3000).  The PyPI package ``de406``
(1997.1) carries its Chebyshev coefficients, read here with jplephem's ``jplephem.ephem.Ephemeris``; the
package is found as in ``tools/make_de406_table.py`` (installed, ``--package-dir``, or ``pip download``).

For each instant (TT used as TDB; the difference is < 2 ms, < 0.001″ of lunar motion) the script takes
DE406's geocentric Moon (ICRF, km) and turns it, without lightpath, into the mean ecliptic and equinox of
date of the long-term precession model (ERFA ``ltecm``, Vondrák, Capitaine & Wallace 2011): ecliptic
longitude and latitude of date and the distance.  No light time or aberration: geometric positions.

Columns: jd_tt, longitude_date_deg, latitude_date_deg, distance_km, x_icrf_km, y_icrf_km, z_icrf_km.
Instants: one random instant in each of 600 equal slices of DE406's span (numpy default_rng(4060)).

    python tools/make_de406_moon_table.py [--package-dir DIR]

References
----------
Standish, E. M. (1998). JPL Planetary and Lunar Ephemerides, DE405/LE405. JPL IOM 312.F-98-048.
Vondrák, J., Capitaine, N., & Wallace, P. (2011). *A&A* 534, A22.
"""

from __future__ import annotations

import argparse
from pathlib import Path

import erfa
import numpy as np
from make_de406_table import _import_de406

OUT = Path(__file__).resolve().parents[1] / "tests" / "data" / "de406_moon.csv"
N_SLICES = 600
RNG_SEED = 4060  # random-number-generator seed for the instants


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
    icrf = np.asarray(eph.position("moon", jd)).T  # geocentric Moon, km
    ecl = np.einsum("nij,nj->ni", erfa.ltecm(erfa.epj(jd, 0.0)), icrf)
    dist = np.linalg.norm(ecl, axis=1)
    lon = np.degrees(erfa.anp(np.arctan2(ecl[:, 1], ecl[:, 0])))
    lat = np.degrees(np.arcsin(ecl[:, 2] / dist))
    header = (
        "# Geometric geocentric Moon from JPL DE406 (PyPI de406 1997.1 via jplephem.ephem), "
        "written by tools/make_de406_moon_table.py\n"
        "# longitude/latitude in the mean ecliptic and equinox of date of Vondrak et al. (2011) (ERFA ltecm)\n"
        "jd_tt,longitude_date_deg,latitude_date_deg,distance_km,x_icrf_km,y_icrf_km,z_icrf_km\n"
    )
    args.out.parent.mkdir(parents=True, exist_ok=True)
    with open(args.out, "w") as fh:
        fh.write(header)
        for t, a, b, d, (x, y, z) in zip(jd, lon, lat, dist, icrf, strict=True):
            fh.write(f"{t:.6f},{a:.9f},{b:.9f},{d:.4f},{x:.4f},{y:.4f},{z:.4f}\n")


if __name__ == "__main__":
    main()
