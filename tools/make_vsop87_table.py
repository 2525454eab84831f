"""Write lightpath/sky/data/vsop87d_earth.npz: the full VSOP87D series for the Earth.

VSOP87D gives the heliocentric ecliptic longitude L, latitude B (radians) and
radius vector R (au) of the Earth, referred to the mean ecliptic and equinox
of date, as sums over powers of τ (Julian millennia of TT from J2000):

    X = Σ_n τ^n Σ_k A_k cos(B_k + C_k τ)

The coefficients are read from the PyPI package ``astronomia`` (module
``astronomia.vsop87d_dict``), which carries the complete VSOP87D tables of
Bretagnon & Francou (1988) as published with the theory.  ``astronomia`` is
needed only to run this script, never by lightpath itself::

    /tmp/dev/bin/pip install astronomia==3.0.5
    /tmp/dev/bin/python tools/make_vsop87_table.py

The file stores, for each of L, B, R, four arrays sorted by power then by
falling amplitude: ``<X>_power`` (int8), ``<X>_A``, ``<X>_B``, ``<X>_C``
(float64), and a ``provenance`` string.

References
----------
Bretagnon, P., & Francou, G. (1988). Planetary theories in rectangular and
spherical variables. VSOP 87 solutions. *Astronomy and Astrophysics* 202, 309–315.
"""

from __future__ import annotations

import argparse
import hashlib
from importlib.metadata import version
from pathlib import Path

import numpy as np

OUT = Path(__file__).resolve().parents[1] / "lightpath" / "sky" / "data" / "vsop87d_earth.npz"


def build() -> dict[str, np.ndarray]:
    from astronomia.vsop87d_dict import _planets  # the published VSOP87D coefficient tables

    arrays: dict[str, np.ndarray] = {}
    counts = []
    digest = hashlib.sha256()
    for coord in "LBR":
        series = _planets[("Earth", coord)]
        powers, amp, phase, freq = [], [], [], []
        for power, terms in enumerate(series):
            terms = sorted(terms, key=lambda t: -abs(t[0]))
            for a, b, c in terms:
                powers.append(power)
                amp.append(a)
                phase.append(b)
                freq.append(c)
                digest.update(np.array([power, a, b, c], dtype=float).tobytes())
            counts.append(f"{coord}{power}:{len(terms)}")
        arrays[f"{coord}_power"] = np.asarray(powers, dtype=np.int8)
        arrays[f"{coord}_A"] = np.asarray(amp, dtype=float)
        arrays[f"{coord}_B"] = np.asarray(phase, dtype=float)
        arrays[f"{coord}_C"] = np.asarray(freq, dtype=float)
    arrays["provenance"] = np.array(
        "VSOP87D Earth, heliocentric L B R (rad, rad, au), mean ecliptic and equinox of date, "
        "tau = Julian millennia TT from J2000; Bretagnon & Francou (1988), A&A 202, 309. "
        f"Coefficients from PyPI astronomia {version('astronomia')} (astronomia.vsop87d_dict). "
        f"Terms per series: {' '.join(counts)}. SHA-256 of (power, A, B, C) rows: {digest.hexdigest()}. "
        "Written by tools/make_vsop87_table.py."
    )
    return arrays


def main() -> None:
    parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    parser.add_argument("--out", type=Path, default=OUT, help="where to write the .npz (default: %(default)s)")
    args = parser.parse_args()
    arrays = build()
    args.out.parent.mkdir(parents=True, exist_ok=True)
    np.savez_compressed(args.out, **arrays)
    print(f"wrote {args.out} ({args.out.stat().st_size} bytes)")
    print(str(arrays["provenance"]))


if __name__ == "__main__":
    main()
