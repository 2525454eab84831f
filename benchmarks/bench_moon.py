"""Benchmark: a year of moonlight against a year of sunlight on the same scene, one-minute resolution.

Run:  python benchmarks/bench_moon.py [--scene demo_models/quillfield/scene.toml] [--samples 400]

One window per body (the Moon's has a ±31° declination band), then the same years swept with
``ScanOptions(body="sun")`` and ``ScanOptions(body="moon")``; prints the seconds per year of each and their
ratio in one run.  The goal (issue "Moonlight"): the Moon within 3× the Sun.
"""

from __future__ import annotations

import argparse
import time

from lightpath.light.options import ScanOptions, WindowOptions
from lightpath.light.scan import prepare_window, scan_window
from lightpath.scene import load_scene


def main() -> None:
    parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    parser.add_argument("--scene", default="demo_models/quillfield/scene.toml")
    parser.add_argument("--samples", type=int, default=400)
    parser.add_argument("--years", default="2024,2025,2026")
    args = parser.parse_args()
    scene = load_scene(args.scene)
    years = [int(y) for y in args.years.split(",")]
    per_year = {}
    for body in ("sun", "moon"):
        window = prepare_window(scene, WindowOptions(samples=args.samples).for_body(body))
        t = time.perf_counter()
        result = scan_window(window, scene.observer, years, ScanOptions(body=body))
        per_year[body] = (time.perf_counter() - t) / len(years)
        events = sum(len(y.events) for y in result.years)
        print(f"{body:5s}: {per_year[body]:.2f} s a year ({events} events in {len(years)} years)")
    print(f"moon / sun: {per_year['moon'] / per_year['sun']:.2f}")


if __name__ == "__main__":
    main()
