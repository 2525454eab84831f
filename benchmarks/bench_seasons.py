"""Benchmark: every quarter day of 13,000 consecutive years, against skyfield's almanac.seasons as baseline.

Run: ``python benchmarks/bench_seasons.py [--years N]``.  Prints wall times, the per-year cost of each
method and their ratio (ours / skyfield) measured in the same run, and the largest difference from
skyfield over the baseline's years.  The wall time depends on what else runs on the machine: the CPU time
and the 1-minute load average are printed beside it.  Target (issue 4): 13,000 years in under 30 s on the
2-core dev machine.

Baseline: skyfield 1.55 ``almanac.find_discrete(..., almanac.seasons(eph))`` with JPL DE421 (skyfield-data)
for 1900–2049 (150 years, the span DE421 covers); ours for the same years with ``source="auto"`` and with
``source="vsop87"``, then ours for −10000…+2999 (``source="auto"``).
"""

from __future__ import annotations

import argparse
import json
import os
import time
import warnings

import numpy as np


def _skyfield_seasons(first: int, last: int):
    import skyfield_data
    from skyfield import almanac
    from skyfield.api import Loader

    with warnings.catch_warnings():
        warnings.simplefilter("ignore")
        load = Loader(skyfield_data.get_skyfield_data_path(), verbose=False)
        ts = load.timescale(builtin=True)
        eph = load("de421.bsp")
        t0 = time.perf_counter()
        t, which = almanac.find_discrete(ts.tt(first, 1, 1), ts.tt(last + 1, 1, 1), almanac.seasons(eph))
        elapsed = time.perf_counter() - t0
    return elapsed, t.tt, which


def main() -> int:
    parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    parser.add_argument("--years", type=int, default=13_000, help="number of consecutive years from -10000")
    args = parser.parse_args()

    from lightpath.sky.seasons import QUARTER_NAMES, YEAR_MIN, quarter_days

    quarter_days(2000)  # warm caches (ephemeris, series tables) outside the timings
    quarter_days(2000, source="vsop87")

    base_first, base_last = 1900, 2049
    base_years = np.arange(base_first, base_last + 1)
    sky_s, sky_tt, which = _skyfield_seasons(base_first, base_last)
    out = {"baseline": "skyfield almanac.seasons, DE421", "baseline_years": int(base_years.size)}
    out["skyfield_s"] = round(sky_s, 3)
    for source in ("auto", "vsop87"):
        t0 = time.perf_counter()
        q = quarter_days(base_years, source=source)
        dt = time.perf_counter() - t0
        ours = np.column_stack([q.jd_tt(n) for n in QUARTER_NAMES]).reshape(-1)
        ref = np.sort(sky_tt)
        # skyfield lists them in time order starting with the March equinox of 1900; so do our rows.
        diff_min = np.abs(np.sort(ours) - ref[: ours.size]).max() * 1440.0
        out[f"ours_{source}_150y_s"] = round(dt, 3)
        out[f"ratio_per_year_{source}_vs_skyfield"] = round(dt / sky_s, 3)
        out[f"max_diff_vs_skyfield_{source}_min"] = round(float(diff_min), 4)

    years = np.arange(YEAR_MIN, YEAR_MIN + args.years)
    t0, c0 = time.perf_counter(), time.process_time()
    q = quarter_days(years)
    dt, cpu = time.perf_counter() - t0, time.process_time() - c0
    per_year_ours = dt / years.size
    per_year_sky = sky_s / base_years.size
    out.update(
        {
            "years": int(years.size),
            "span": [int(years[0]), int(years[-1])],
            "source": q.source,
            "ours_s": round(dt, 2),
            "ours_cpu_s": round(cpu, 2),
            "load_average_1min": round(os.getloadavg()[0], 2),
            "ours_per_year_ms": round(per_year_ours * 1e3, 4),
            "skyfield_per_year_ms": round(per_year_sky * 1e3, 4),
            "ratio_per_year_vs_skyfield": round(per_year_ours / per_year_sky, 3),
            "target_s": 30.0,
            "within_target": bool(dt < 30.0),
        }
    )
    print(json.dumps(out, indent=2))
    return 0


if __name__ == "__main__":
    raise SystemExit(main())
