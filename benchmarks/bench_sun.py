"""Benchmark the Sun: lightpath against skyfield + DE421 in one process, and a 12,000-year daily run.

1. One year at one-minute steps (525,960 instants) at one site: topocentric apparent azimuth and
   altitude (refraction off) through ``lightpath.sky.sun.sun_position`` and through skyfield +
   DE421 vectorized (``(earth + wgs84.latlon(...)).at(t).observe(sun).apparent().altaz()``).
   Prints both times, their ratio and the largest differences.  Both use skyfield's ΔT.
2. One instant per day for 12,000 years (−10000 … +2000, ≈ 4.38 M instants) through
   ``sun_position`` (VSOP87D) and ``geocentric_sun``, timed.

Targets (issue 3): ≥ 50× faster than skyfield and within 1″ of it; the daily run < 30 s.
Part 2 runs on the threads of ``lightpath.threads`` (all cores by default) and once more on one thread.
Timings depend on the machine's load (printed at the start); wall and CPU time are both shown, and the
ratio in part 1 is measured in the same process.

    /tmp/dev/bin/python benchmarks/bench_sun.py [--minutes N] [--days N] [--skip-daily]
"""

from __future__ import annotations

import argparse
import os
import time
import warnings

import numpy as np

_SITE = (53.452, 104.637, 548.0)  # the invented demo site of demo_models/larchfold


def _skyfield():
    from skyfield.api import Loader

    from lightpath.sky.jpl import _skyfield_data_dir

    with warnings.catch_warnings():
        warnings.simplefilter("ignore")
        load = Loader(_skyfield_data_dir())
        return load.timescale(builtin=True), load("de421.bsp")


def part_one(n_minutes: int, lat: float, lon: float, elev: float) -> None:
    from skyfield.api import wgs84

    from lightpath.sky.observer import Observer
    from lightpath.sky.sun import sun_position

    ts, eph = _skyfield()
    jd = 2460676.5 + np.arange(n_minutes) / 1440.0  # from 2025-01-01 0h TT
    obs = Observer(lat, lon, elev, refraction=None)
    t = ts.tt_jd(jd)
    delta_t = np.asarray(t.delta_t)
    # warm both (kernel and coefficient loading)
    sun_position(jd[:10], obs, delta_t_s=delta_t[:10])
    (eph["earth"] + wgs84.latlon(lat, lon, elev)).at(t[:10]).observe(eph["sun"]).apparent().altaz()

    t0, c0 = time.perf_counter(), time.process_time()
    p = sun_position(jd, obs, delta_t_s=delta_t)
    t_ours, c_ours = time.perf_counter() - t0, time.process_time() - c0

    t0, c0 = time.perf_counter(), time.process_time()
    alt, az, _ = (eph["earth"] + wgs84.latlon(lat, lon, elev)).at(t).observe(eph["sun"]).apparent().altaz()
    t_sky, c_sky = time.perf_counter() - t0, time.process_time() - c0

    d_alt = (p.altitude_deg - alt.degrees) * 3600
    d_az = ((p.azimuth_deg - az.degrees + 180) % 360 - 180) * 3600 * np.cos(alt.radians)
    print(f"part 1: {n_minutes:,} one-minute instants at ({lat}, {lon}, {elev} m), source {p.source}")
    print(f"  lightpath  {t_ours:8.2f} s wall, {c_ours:8.2f} s CPU")
    print(f"  skyfield   {t_sky:8.2f} s wall, {c_sky:8.2f} s CPU")
    print(f"  ratio      {t_sky / t_ours:8.1f} x faster (wall), {c_sky / c_ours:.1f} x (CPU)")
    print(f"  largest |d altitude|          {np.max(np.abs(d_alt)):.4f} arcsec")
    print(f"  largest |d azimuth|·cos(alt)  {np.max(np.abs(d_az)):.4f} arcsec")
    print(f"  largest separation            {np.max(np.hypot(d_alt, d_az)):.4f} arcsec")


def part_two(n_days: int, lat: float, lon: float, elev: float) -> None:
    import erfa

    from lightpath.sky.observer import Observer
    from lightpath.sky.sources import SunAccuracyWarning
    from lightpath.sky.sun import geocentric_sun, sun_position
    from lightpath.threads import set_thread_count, thread_count

    warnings.simplefilter("ignore", SunAccuracyWarning)  # expected: most of these instants precede 3000 BC
    start = sum(erfa.epj2jd(-10000.0)) + 1.0
    jd = start + np.arange(n_days, dtype=float)
    obs = Observer(lat, lon, elev)
    t0, c0 = time.perf_counter(), time.process_time()
    p = sun_position(jd, obs)
    t_pos, c_pos = time.perf_counter() - t0, time.process_time() - c0
    t0, c0 = time.perf_counter(), time.process_time()
    g = geocentric_sun(jd)
    t_geo, c_geo = time.perf_counter() - t0, time.process_time() - c0
    threads = thread_count()
    set_thread_count(1)
    t0, c0 = time.perf_counter(), time.process_time()
    sun_position(jd, obs)
    t_one, c_one = time.perf_counter() - t0, time.process_time() - c0
    set_thread_count(None)
    years = n_days / 365.25
    print(f"part 2: {n_days:,} daily instants ({years:,.0f} years from Julian epoch -10000), source {p.source}")
    print(f"  sun_position   {t_pos:8.2f} s wall, {c_pos:8.2f} s CPU ({t_pos / n_days * 1e6:.2f} us per instant)")
    print(f"  (threads: {threads}; sun_position on one thread: {t_one:.2f} s wall, {c_one:.2f} s CPU)")
    print(f"  geocentric_sun {t_geo:8.2f} s wall, {c_geo:8.2f} s CPU ({t_geo / n_days * 1e6:.2f} us per instant)")
    assert np.isfinite(p.azimuth_deg).all() and np.isfinite(g.declination_deg).all()


def main() -> None:
    parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    parser.add_argument("--minutes", type=int, default=525_960, help="instants in part 1 (default: one year)")
    parser.add_argument("--days", type=int, default=4_383_000, help="instants in part 2 (default: 12,000 years)")
    parser.add_argument("--skip-daily", action="store_true", help="run part 1 only")
    args = parser.parse_args()
    load = os.getloadavg()[0] if hasattr(os, "getloadavg") else float("nan")
    print(f"machine: {os.cpu_count()} cores, load average {load:.1f} at start")
    part_one(args.minutes, *_SITE)
    if not args.skip_daily:
        part_two(args.days, *_SITE)


if __name__ == "__main__":
    main()
