"""Benchmark the framing test: 1,000 draws of a demo site at one epoch, serial vs 2 local workers vs dask.

Run: ``python benchmarks/bench_frame.py [--site sandwren] [--draws 1000] [--workers 2]``.

The sky window is built once before the clocks start (as a study does).  Then the same framing test
(``--draws`` survey draws of the scene's tolerances at the scene's own epoch with no epoch spread, and
``--null-draws`` null orientations; 1,000 of each by default, on the bent-passage demo) runs

1. serially in this process (the baseline),
2. on a local process pool of ``--workers`` spawned processes (their start-up is timed: it is part of the cost),
3. on a dask ``LocalCluster(n_workers=--workers, processes=True, host="127.0.0.1")`` (the cluster's start-up
   is not timed; scattering the window to it is),

and the speedups over the serial run are printed with the CPU count and the 1-minute load average (other
work on the machine slows the parallel runs first).  The three results must be identical (checked).
Target (issue 8): ≥ 1.7× with 2 workers.
"""

from __future__ import annotations

import argparse
import json
import os
import resource
import time
import warnings

#: The epoch each demo site was built for (see demo_models/*/README.md).
EPOCHS = {"sandwren": -1499, "larchfold": -2599, "quillfield": 2027}


def main() -> None:
    parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    parser.add_argument("--site", choices=tuple(EPOCHS), default="larchfold")
    parser.add_argument("--draws", type=int, default=1000)
    parser.add_argument("--null-draws", type=int, default=1000)
    parser.add_argument("--workers", type=int, default=2)
    parser.add_argument("--samples", type=int, default=100)
    parser.add_argument("--skip-dask", action="store_true")
    parser.add_argument("--dask-trim", action="store_true", help="keep dask's MALLOC_TRIM_THRESHOLD_ for workers")
    args = parser.parse_args()

    from lightpath.commands._common import to_jsonable
    from lightpath.light.options import WindowOptions
    from lightpath.scene import demo_scene_path, load_scene
    from lightpath.sky.sources import SunAccuracyWarning
    from lightpath.study.framing import framing_test
    from lightpath.study.light_days import light_days_for_scene
    from lightpath.study.uncertainty import tolerances_from_table

    # the framing test states an unverified epoch once in its notes; the bench need not print it per run
    warnings.filterwarnings("ignore", category=SunAccuracyWarning)
    scene = load_scene(demo_scene_path(args.site))
    t0 = time.perf_counter()
    light, axis, distance = light_days_for_scene(scene, WindowOptions(samples=args.samples))
    print(f"site {args.site}: window of {args.samples} samples built in {time.perf_counter() - t0:.2f} s (not timed)")
    light.evaluate(EPOCHS[args.site])  # disc fractions of the window: computed once, shipped with it
    tol = tolerances_from_table(scene.tolerances)
    common = dict(year=EPOCHS[args.site], axis_enu=axis, distance_m=distance, tolerances=tol, epoch_sigma_years=0.0,
                  within_days=3, draws=args.draws, null_draws=args.null_draws, seed=0)  # fmt: skip

    def children_cpu_s():
        r = resource.getrusage(resource.RUSAGE_CHILDREN)
        return r.ru_utime + r.ru_stime

    def timed(label, **where):
        light._cache.clear()  # every run starts cold: Sun tracks and look-up screens rebuilt
        c0, w0 = time.process_time(), time.perf_counter()
        result = framing_test(light, **common, **where)
        wall, cpu = time.perf_counter() - w0, time.process_time() - c0
        print(f"{label:<34} {wall:8.2f} s wall  ({cpu:6.2f} s CPU in this process)")
        return wall, cpu, json.dumps(to_jsonable(result), sort_keys=True)

    n = args.draws + args.null_draws + 1
    print(f"{n} evaluations (1 nominal + {args.draws} survey draws + {args.null_draws} null orientations), "
          f"{os.cpu_count()} CPUs, load average {os.getloadavg()[0]:.2f}")  # fmt: skip
    serial, serial_cpu, ref = timed("serial")
    before = children_cpu_s()
    pool, _, out = timed(f"local process pool, {args.workers} workers", workers=args.workers)
    pool_cpu = children_cpu_s() - before  # the workers' CPU, counted once the pool has shut down
    assert out == ref, "the pool's result differs from the serial one"
    print(
        f"  CPU: serial {serial_cpu:.2f} s; pool workers {pool_cpu:.2f} s in all (start-up and imports included); "
        f"CPU-bound speedup {serial_cpu / (pool_cpu / args.workers):.2f}x if every worker had a free core"
    )
    rows = [("local process pool", pool)]
    if not args.skip_dask:
        import dask
        from distributed import Client, LocalCluster

        # dask's nannies start workers with MALLOC_TRIM_THRESHOLD_=65536 (memory handed back to the OS
        # early); the engine's large per-call arrays then cost ~60 % more CPU (measured: 9.4 vs 5.8 ms per
        # evaluation).  --dask-trim keeps dask's default to show it.
        environ = dict(dask.config.get("distributed.nanny.pre-spawn-environ"))
        if not args.dask_trim:
            environ.pop("MALLOC_TRIM_THRESHOLD_", None)
        print(f"dask worker environment: {environ}")
        options = dict(n_workers=args.workers, threads_per_worker=1, processes=True, host="127.0.0.1")
        with (
            dask.config.set({"distributed.nanny.pre-spawn-environ": environ}),
            LocalCluster(**options, dashboard_address=None) as cluster,
            Client(cluster) as client,
        ):
            client.run(lambda: __import__("lightpath.study.light_days"))  # imports happen before the clock
            dask_wall, _, out = timed(f"dask LocalCluster, {args.workers} workers", client=client)
        assert out == ref, "the dask result differs from the serial one"
        rows.append(("dask LocalCluster", dask_wall))
    print(f"per evaluation, serial: {1000 * serial / n:.1f} ms; results identical on every back end")
    for label, wall in rows:
        print(f"speedup {label:<20} {serial / wall:5.2f}x with {args.workers} workers (target >= 1.7x)")
    print(f"load average after: {os.getloadavg()[0]:.2f}")


if __name__ == "__main__":
    main()
