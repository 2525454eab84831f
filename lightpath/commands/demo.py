"""``lightpath demo [--out DIR]``: inspect, divide the year, scan and report on the bundled demo sites.

The three demo sites are invented (no real monument is meant); see ``demo_models/*/README.md`` (installed as
``lightpath/demo_models/``).  Each shows one capability: ``sandwren``, a rock-cut window in the southern
hemisphere lit at a cross-quarter sunset in 1500 BC (a Julian-calendar year); ``larchfold``, a bent passage lit
at a sixteenth-of-the-year sunrise over a skyline computed from a ridge in 2600 BC (sixteen divisions);
``quillfield``, a modern reading room's equinox niche in AD 2027 (visit planning in a time zone with
daylight-saving time).  For each one the demo loads the scene (as ``lightpath inspect``), works out the
divisions of the year at its epoch (as ``lightpath year``), scans the year for light and writes the full
report (as ``lightpath report``, with a visit plan for next year and an epoch-drift span), calling the Python
API directly.  It ends by printing where the reports are.

>>> import argparse
>>> p = argparse.ArgumentParser(); add_arguments(p)
>>> p.parse_args([]).out
'lightpath-demo'
"""

from __future__ import annotations

import argparse
import datetime as _dt
import html
import json
import sys
import time
import warnings
from dataclasses import dataclass
from pathlib import Path

from lightpath.commands._common import (
    add_engine_options,
    add_output_options,
    engine_options,
    print_json,
    progress_bar,
    to_jsonable,
)
from lightpath.errors import InputError
from lightpath.files import write_text_atomic

__all__ = ["DEMO_RUNS", "DemoRun", "HELP", "NAME", "add_arguments", "run", "run_demo"]

NAME = "demo"
HELP = "run everything on the bundled demo sites and write their reports (about a minute)"


@dataclass(frozen=True)
class DemoRun:
    """What the demo does with one bundled site: its epoch, the span of years for the drift figure and the
    number of divisions of the year its tables show."""

    site: str
    year: int
    drift_years: tuple[int, ...]
    parts: int = 8


#: The demo's runs: each site at the epoch it was built for (see its README), drift over six centuries.
DEMO_RUNS = (
    DemoRun("sandwren", -1499, (-1799, -1649, -1499, -1349, -1199)),
    DemoRun("larchfold", -2599, (-2899, -2749, -2599, -2449, -2299), parts=16),
    DemoRun("quillfield", 2027, (1427, 1627, 1827, 2027, 2227)),
)


def add_arguments(parser: argparse.ArgumentParser) -> None:
    """Options of ``lightpath demo``."""
    parser.add_argument(
        "--out", default="lightpath-demo", metavar="DIR", help="folder to write into (default ./lightpath-demo)"
    )
    parser.add_argument("--visit-year", type=int, metavar="Y", help="year of the visit plans (default: next year)")
    parser.add_argument("--sites", default=",".join(r.site for r in DEMO_RUNS), metavar="A,B",
                        help="which demo sites (default all: sandwren,larchfold,quillfield)")  # fmt: skip
    add_engine_options(parser, divisions=False)  # each site's divisions are its own (DEMO_RUNS)
    add_output_options(parser)


def _index_html(rows: list[dict]) -> str:
    items = "".join(
        f'<li><a href="{html.escape(r["report"])}">{html.escape(r["label"])}</a>: {r["events"]} light event(s) in '
        f"{html.escape(r['year_label'])}; {r['visit_events']} in {r['visit_year']} ({html.escape(r['timezone'])})</li>"
        for r in rows
    )
    return (
        '<!DOCTYPE html><html lang="en"><head><meta charset="utf-8"><title>lightpath demo</title></head><body>'
        "<h1>lightpath demo: three invented sites</h1>"
        "<p>No real monument is meant. Each report opens without a network connection.</p>"
        f"<ul>{items}</ul></body></html>\n"
    )


def run_demo(
    out_dir: str | Path,
    *,
    sites: list[str] | None = None,
    options=None,
    window_options=None,
    visit_year: int | None = None,
    progress=None,
) -> list[dict]:
    """Run the demo into ``out_dir``; returns one summary dict per site (paths, counts, seconds).

    ``options`` and ``window_options`` are the engine's :class:`~lightpath.light.options.ScanOptions`
    and :class:`~lightpath.light.options.WindowOptions` (defaults when None); each site's number of
    divisions comes from :data:`DEMO_RUNS`.
    """
    from dataclasses import replace

    from lightpath.commands.year import year_document
    from lightpath.light.options import ScanOptions, WindowOptions
    from lightpath.present.scene_report import make_report
    from lightpath.scene import demo_scene_path, load_scene
    from lightpath.site.report import scene_summary
    from lightpath.site.sampling import sample_target
    from lightpath.sky.calendar import year_label
    from lightpath.sky.sources import SunAccuracyWarning

    out = Path(out_dir)
    step = progress or (lambda n=1: None)
    runs = {r.site: r for r in DEMO_RUNS}
    chosen = sites or list(runs)
    unknown = [s for s in chosen if s not in runs]
    if unknown:
        raise InputError(f"--sites: {unknown[0]!r} is not one of {', '.join(runs)}")
    visit_year = visit_year or _dt.date.today().year + 1
    options = options if options is not None else ScanOptions()
    window_options = window_options if window_options is not None else WindowOptions()
    rows = []
    for name in chosen:
        demo = runs[name]
        started = time.perf_counter()
        scene = load_scene(demo_scene_path(name))
        summary = scene_summary(
            scene, sample_target(scene.target, count=window_options.samples, seed=window_options.seed)
        )
        write_text_atomic(out / name / "inspect.json", json.dumps(to_jsonable(summary), indent=2) + "\n")
        step(1)
        with warnings.catch_warnings(record=True) as caught:  # accuracy notices: kept once, in the summary
            warnings.simplefilter("always", SunAccuracyWarning)
            year_doc = year_document(demo.year, scene.observer, parts=demo.parts, scheme="longitude",
                                     horizon=scene.horizon)  # fmt: skip
        notices = [str(w.message) for w in caught if issubclass(w.category, SunAccuracyWarning)]
        for w in caught:
            if not issubclass(w.category, SunAccuracyWarning):
                warnings.warn_explicit(w.message, w.category, w.filename, w.lineno)
        write_text_atomic(out / name / "year.json", json.dumps(to_jsonable(year_doc), indent=2) + "\n")
        step(1)
        result = make_report(scene, demo.year, out_dir=out / name, visit_year=visit_year,
                             drift_years=list(demo.drift_years), options=replace(options, parts=demo.parts),
                             window_options=window_options, progress=step)  # fmt: skip
        rows.append(
            {
                "site": name,
                "label": str(scene.label),
                "year": demo.year,
                "year_label": year_label(demo.year),
                "events": sum(len(y.events) for y in result.scan.years),
                "visit_year": visit_year,
                "visit_events": len(result.visit.events) if result.visit is not None else 0,
                "timezone": scene.observer.timezone or "UTC",
                "report": f"{name}/report.html",
                "files": {k: str(v) for k, v in result.paths.items()},
                "seconds": round(time.perf_counter() - started, 2),
                "notices": list(dict.fromkeys(notices + result.warnings)),
            }
        )
    write_text_atomic(out / "index.html", _index_html(rows))
    return rows


def run(args: argparse.Namespace) -> int:
    sites = [s.strip() for s in str(args.sites).split(",") if s.strip()]
    window_options, options = engine_options(args)
    started = time.perf_counter()
    total = len(sites) * (2 + 6 + 3 + 2)
    with progress_bar("demo", total, args.quiet) as advance:
        rows = run_demo(args.out, sites=sites, options=options, window_options=window_options,
                        visit_year=args.visit_year, progress=advance)  # fmt: skip
    seconds = round(time.perf_counter() - started, 1)
    index = Path(args.out) / "index.html"
    if args.json:
        print_json({"index": str(index), "sites": rows, "seconds": seconds})
        return 0
    for r in rows:
        print(f"{r['label']}: {r['events']} light event(s) in {r['year_label']}, "
              f"{r['visit_events']} in {r['visit_year']} — {Path(args.out) / r['report']}")  # fmt: skip
    print(f"All reports: {index}  ({seconds:.0f} s)")
    if not args.quiet:
        for notice in dict.fromkeys(n for r in rows for n in r["notices"]):
            print(f"notice: {notice}", file=sys.stderr)
    return 0
