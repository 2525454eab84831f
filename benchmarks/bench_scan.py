"""Benchmark of the light engine: the window path against brute force, and a 1,000-year span.

Run:  python benchmarks/bench_scan.py            (about 5-10 minutes on 2 cores)
      python benchmarks/bench_scan.py --quick    (fewer samples and years, a minute or two)

1. A bent passage from the builder (the Larchfold demo's numbers), every solid part subdivided to about
   200,000 triangles and roughened by up to 3 mm (seeded), 2,000 target samples, the year 2600 BC:
   * window path: sky window (ray casting, disc convolution) + sweep, refined to 5 s;
   * brute force: a ray from every sample toward 64 points of the disc at every minute of the year at
     which the Sun's centre is above −1° *and* within the opening's reach from the target (the opening's
     bounding cone + 1°, geometry only: no light can arrive at other instants); its cost per instant is
     also measured on a random sample of all the Sun-up minutes and multiplied out to them all;
   * the lists of days with light must be identical.
2. The same window over 1,000 years at 10-year steps (3100 BC … 2101 BC): time per span.

Speed is the ratio of the two paths in the same run; peak memory from tracemalloc (Python allocations,
numpy included) and the process's maximum resident set size.
"""

from __future__ import annotations

import argparse
import dataclasses
import resource
import sys
import time
import tracemalloc
from pathlib import Path

import numpy as np
import trimesh

sys.path.insert(0, str(Path(__file__).resolve().parents[1]))

from lightpath.light.bruteforce import brute_force_fraction, brute_force_lit_area, opening_reach  # noqa: E402
from lightpath.light.runs import local_apparent_day_number  # noqa: E402
from lightpath.light.scan import prepare_window, scan_window  # noqa: E402
from lightpath.light.sweep import find_light, sun_enu  # noqa: E402
from lightpath.scene import demo_scene_path, load_scene  # noqa: E402
from lightpath.site.builders import demo_chamber  # noqa: E402
from lightpath.sky.calendar import julian_day  # noqa: E402


def rough_chamber(target_faces: int = 200_000, roughness_m: float = 0.003, seed: int = 0):
    """The demo passage rebuilt, solids subdivided to ≥ ``target_faces`` and pushed in by ≤ ``roughness_m``."""
    demo = load_scene(demo_scene_path("larchfold"))
    model = demo_chamber("larchfold", 115.19)  # the Larchfold demo chamber, aimed as shipped
    rng = np.random.default_rng(seed)
    solid = [m for name, m in model.parts.items() if name not in model.opening_parts and name != model.target_part]
    mesh = trimesh.util.concatenate(solid)
    while len(mesh.faces) < target_faces:
        mesh = mesh.subdivide()
    # inward only (boxes overlap at joints by more than this), so no crack opens and nothing pokes the target
    push = rng.uniform(0.0, roughness_m, len(mesh.vertices))
    mesh = trimesh.Trimesh(mesh.vertices - push[:, None] * mesh.vertex_normals, mesh.faces, process=False)
    target = model.target()
    blocking = trimesh.util.concatenate([mesh, target])
    return dataclasses.replace(
        demo, mesh=blocking, target=target, opening=model.opening(), content_hash=f"bench-{len(mesh.faces)}-{seed}"
    )


def sun_for(observer):
    """The Sun computed directly at each instant (the baseline's Sun; the engine uses its track)."""
    from lightpath.sky.sun import sun_position

    return lambda jd_tt: sun_position(jd_tt, observer)


def brute_force_days(scene, window, year, step_min=1.0):
    """(set of local days with light, seconds, instants cast, seconds per instant over all Sun-up minutes)."""
    sun = sun_for(scene.observer)
    t = np.arange(float(julian_day(year, 1, 1.0)), float(julian_day(year + 1, 1, 1.0)), step_min / 1440.0)
    pos, dirs = sun_enu(sun, t)
    up = np.asarray(pos.altitude_deg) > -1.0
    reach = up & opening_reach(window.points_m, scene.opening, dirs)
    start = time.perf_counter()
    frac = brute_force_fraction(scene.mesh, window.points_m, window.normals, dirs[reach], horizon=scene.horizon)
    lit = brute_force_lit_area(frac, window.area_m2, "first-gleam") > 0
    seconds = time.perf_counter() - start
    # cost per instant on a random sample of all Sun-up minutes (most are cheap: rays hit the walls at once)
    rng = np.random.default_rng(1)
    pick = rng.choice(np.flatnonzero(up), size=min(300, int(up.sum())), replace=False)
    t0 = time.perf_counter()
    brute_force_fraction(scene.mesh, window.points_m, window.normals, dirs[pick], horizon=scene.horizon)
    per_up = (time.perf_counter() - t0) / len(pick)
    p = sun(t[reach][lit])
    days = set(local_apparent_day_number(p.jd_ut, scene.observer.longitude_deg, p.local_apparent_time_h).tolist())
    return days, seconds, int(reach.sum()), per_up * float(up.sum()), int(up.sum())


def main() -> int:
    parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    parser.add_argument("--quick", action="store_true", help="500 samples, 100 years: a quick look")
    args = parser.parse_args()
    samples = 500 if args.quick else 2000
    span = list(range(-3099, -2099 + 1, 100 if args.quick else 10))
    year = -2599
    tracemalloc.start()

    t0 = time.perf_counter()
    scene = rough_chamber()
    print(f"chamber: {len(scene.mesh.faces):,} triangles, built in {time.perf_counter() - t0:.1f} s")

    t0 = time.perf_counter()
    window = prepare_window(scene, samples=samples, seed=0)
    t_window = time.perf_counter() - t0
    t0 = time.perf_counter()
    sun = sun_for(scene.observer)
    jd0, jd1 = float(julian_day(year, 1, 1.0)), float(julian_day(year + 1, 1, 1.0))
    fast = find_light(window, sun, jd0, jd1, "first-gleam")
    t_sweep = time.perf_counter() - t0
    peaks = sun(np.array([x.peak_jd_tt for x in fast]))
    fast_days = set(
        local_apparent_day_number(peaks.jd_ut, scene.observer.longitude_deg, peaks.local_apparent_time_h).tolist()
    )
    t_fast = t_window + t_sweep
    print(
        f"window path, {samples} samples, year {year}: window {t_window:.1f} s ({window.rays_cast:,} rays, "
        f"mask {window.escape.shape}), sweep {t_sweep:.2f} s, {len(fast)} intervals on {len(fast_days)} days"
    )

    brute_days, t_brute, n_reach, t_brute_up, n_up = brute_force_days(scene, window, year)
    print(
        f"brute force: {n_reach:,} minutes within the opening's reach (of {n_up:,} Sun-up minutes), "
        f"{t_brute:.1f} s; all Sun-up minutes would take ≈ {t_brute_up:.0f} s"
    )
    print(f"ratio brute/window (reach-limited brute force): {t_brute / t_fast:.1f}x")
    print(f"ratio brute/window (brute force over every Sun-up minute): {t_brute_up / t_fast:.0f}x")
    same = brute_days == fast_days
    print(f"identical day lists: {same} ({len(brute_days)} days by brute force, {len(fast_days)} by the window path)")
    if not same:
        print(f"  only brute force: {sorted(brute_days - fast_days)}; only window: {sorted(fast_days - brute_days)}")

    t0 = time.perf_counter()
    result = scan_window(window, scene.observer, span)
    t_span = time.perf_counter() - t0
    n_events = sum(len(y.events) for y in result.years)
    print(
        f"span {span[0]}…{span[-1]} every {span[1] - span[0]} years ({len(span)} years): {t_span:.1f} s "
        f"({t_span / len(span):.2f} s a year, {n_events} events), window reused"
    )
    current, peak = tracemalloc.get_traced_memory()
    rss_mb = resource.getrusage(resource.RUSAGE_SELF).ru_maxrss / 1024.0
    print(f"peak memory: {peak / 2**20:.0f} MiB traced (numpy included), max RSS {rss_mb:.0f} MiB")
    return 0 if same else 1


if __name__ == "__main__":
    raise SystemExit(main())
