"""``lightpath frame SCENE.toml --epoch Y[±S]``: does the opening frame a division of the year, and would chance?

Examples (shell)::

    lightpath frame passage/scene.toml --epoch "3200 BC±100"
    lightpath frame shrine/scene.toml --epoch -1499 --division cross_quarter_aug --within 5 --draws 1000 --json
    lightpath frame site.toml --epoch 2500BC --workers 8
    lightpath frame site.toml --epoch 2500BC --cluster tcp://10.0.0.5:8786

The survey's tolerances come from the scene's ``[tolerances]`` table (one-sigma), with ``--tolerance KEY=VALUE``
overriding; the epoch's spread comes from ``--epoch Y±S`` (or the scene's ``epoch_years``).  See
``docs/framing-test.md`` for the method, the null model and how to read the numbers.

>>> p = argparse.ArgumentParser(); add_arguments(p)
>>> a = p.parse_args(["s.toml", "--epoch", "3200 BC", "--tolerance", "opening_azimuth_deg=1"])
>>> a.within, a.draws, a.tolerance
(3, 200, ['opening_azimuth_deg=1'])
"""

from __future__ import annotations

import argparse
import json
import os

from lightpath.commands._common import add_output_options, print_json, progress_bar, to_jsonable
from lightpath.errors import InputError
from lightpath.files import write_text_atomic

__all__ = ["HELP", "NAME", "add_arguments", "add_study_options", "open_study", "run", "study_backend"]

NAME = "frame"
HELP = "framing test: probability that light reaches the target near each division, against a null model"


def add_study_options(parser: argparse.ArgumentParser, *, draws: int) -> None:
    """Options shared by ``frame`` and ``epochs``: window, divisions, tolerances, execution, output."""
    from lightpath.light.disc import CRITERIA
    from lightpath.sky.divisions import SCHEMES

    parser.add_argument("scene", metavar="SCENE.toml", help="the scene file")
    parser.add_argument("--scheme", choices=SCHEMES, default="longitude", help="how the year is divided")
    parser.add_argument("--parts", type=int, default=8, metavar="N", help="divisions of the year (default 8)")
    parser.add_argument("--criterion", choices=tuple(CRITERIA), default="first-gleam", help="what counts as light")
    parser.add_argument("--span", type=int, default=None, metavar="DAYS",
                        help="days searched each side of a division (default: half a part, at most 30)")  # fmt: skip
    parser.add_argument("--draws", type=int, default=draws, metavar="N", help=f"Monte Carlo draws (default {draws})")
    parser.add_argument("--tolerance", action="append", default=[], metavar="KEY=VALUE",
                        help="override a one-sigma tolerance of the scene, e.g. opening_azimuth_deg=0.5")  # fmt: skip
    parser.add_argument("--samples", type=int, default=100, metavar="N", help="target samples (default 100)")
    parser.add_argument("--resolution", type=float, default=0.05, metavar="DEG", help="window cell, degrees")
    parser.add_argument("--cache", metavar="DIR", default=None, help="folder to cache sky windows in")
    parser.add_argument("--source", choices=("auto", "jpl", "vsop87"), default="auto", help="Sun position source")
    parser.add_argument("--workers", type=int, default=os.cpu_count() or 1, metavar="N",
                        help="local worker processes (default: one per CPU)")  # fmt: skip
    parser.add_argument("--cluster", metavar="ADDRESS", default=None,
                        help="run the draws on the dask scheduler at ADDRESS (tcp://host:8786) instead")  # fmt: skip
    parser.add_argument("--seed", type=int, default=0, help="seed of the Monte Carlo draws (default 0)")
    parser.add_argument("--output", metavar="FILE", default=None, help="also write the JSON result to FILE")
    add_output_options(parser)


def add_arguments(parser: argparse.ArgumentParser) -> None:
    """Options of ``lightpath frame``."""
    add_study_options(parser, draws=200)
    parser.add_argument("--epoch", required=True, metavar="Y[±S]", help="the building's epoch, e.g. '3200 BC±100'")
    parser.add_argument("--division", default="all", metavar="NAME|all", help="division to test (default all)")
    parser.add_argument("--within", type=int, default=3, metavar="DAYS",
                        help="framed = light on a day within ±DAYS of the division (default 3)")  # fmt: skip
    parser.add_argument("--null-draws", type=int, default=200, metavar="N", help="null orientations (default 200)")


def _tolerances(scene, overrides: list[str]):
    from lightpath.study.uncertainty import tolerances_from_table

    table = dict(scene.tolerances)
    for item in overrides:
        key, sep, value = item.partition("=")
        if not sep:
            raise InputError(f"--tolerance: {item!r} is not KEY=VALUE (e.g. opening_azimuth_deg=0.5)")
        if key.strip() == "delta_t":
            table["delta_t"] = value.strip().lower() in ("1", "true", "yes", "on")
            continue
        try:
            table[key.strip()] = float(value)
        except ValueError:
            raise InputError(f"--tolerance: {item!r}: the value must be a number") from None
    return tolerances_from_table(table, source="--tolerance / [tolerances]")


def open_study(args: argparse.Namespace, names: tuple[str, ...] | None):
    """(scene, LightDays, axis_enu, distance_m, Tolerances) from the shared options."""
    from lightpath.scene import load_scene
    from lightpath.study.light_days import default_span_days, light_days_for_scene

    if args.parts < 2:
        raise InputError(f"--parts: {args.parts} must be 2 or more")
    for option, value, low in (
        ("--draws", args.draws, 0),
        ("--samples", args.samples, 1),
        ("--workers", args.workers, 1),
    ):
        if value < low:
            raise InputError(f"{option}: {value} must be {low} or more")
    scene = load_scene(args.scene)
    span = args.span if args.span is not None else default_span_days(args.parts)
    quiet = args.quiet or args.json
    with progress_bar("sky window", 100, quiet=quiet) as advance:
        done = [0]

        def window_progress(k, total):
            step = int(100 * k / max(total, 1)) - done[0]
            if step > 0:
                done[0] += step
                advance(step)

        light, axis, distance = light_days_for_scene(
            scene, samples=args.samples, resolution_deg=args.resolution, cache_dir=args.cache,
            progress=window_progress, criterion=args.criterion, scheme=args.scheme, parts=args.parts, names=names,
            span_days=span, source=args.source,
        )  # fmt: skip
    return scene, light, axis, distance, _tolerances(scene, args.tolerance)


def study_backend(args: argparse.Namespace):
    """(workers, dask client or None, description) from ``--workers`` / ``--cluster``."""
    from lightpath.study.execution import connect_cluster, describe_backend

    client = connect_cluster(args.cluster) if args.cluster else None
    return args.workers, client, describe_backend(args.workers, client)


def _emit(args, result, text_lines) -> None:
    doc = to_jsonable(result)
    if args.output:
        write_text_atomic(args.output, json.dumps(doc, indent=2, ensure_ascii=False) + "\n")
    if args.json:
        print_json(doc)
    else:
        print("\n".join(text_lines))
        if args.output and not args.quiet:
            print(f"\nwrote {args.output}")


def _days(first, last) -> str:
    if first is None:
        return "none"
    return f"{first:+.0f}..{last:+.0f}"


def _range(p: dict) -> str:
    if p.get("p5") is None:
        return "-"
    return f"{p['p5']:+.0f}..{p['p95']:+.0f}"


def format_text(result, backend: str) -> list[str]:
    """The human-readable report of a :class:`~lightpath.study.framing.FramingResult`."""
    from lightpath.sky.calendar import year_label

    spread = f" ± {result.epoch_sigma_years:g} years (one sigma)" if result.epoch_sigma_years else ""
    tol = ", ".join(f"{k} {v:g}" for k, v in result.tolerances.items() if not isinstance(v, bool) and v)
    lines = [
        f"framing test  {result.scene}",
        f"epoch         {year_label(result.epoch_year)} (astronomical {result.epoch_year}){spread}",
        f"divisions     scheme {result.scheme}, {result.parts} parts; criterion {result.criterion}; framed = light "
        f"within ±{result.within_days} days (search ±{result.span_days} days)",
        f"draws         {result.draws} survey draws, {result.null_draws} null orientations, seed {result.seed}; "
        f"ran on {backend}",
        f"tolerances    {tol or 'none'}; ΔT σ {'drawn' if result.tolerances.get('delta_t') else 'off'}",
        f"null model    {result.null_model['description']}",
        f"              reference azimuth {result.null_model['reference_azimuth_deg']:.2f}° "
        f"(opening's axis at {result.facing_azimuth_deg:.2f}°)",
        "",
        f"{'division':<20} {'date':<12} {'lit run':>10} {'P(framed)':>9} {'95% interval':>14} "
        f"{'first p5..p95':>14} {'last p5..p95':>13} {'null':>6} {'any':>6} {'p':>7} {'p(any)':>7} {'h':>6}",
    ]
    for d in result.divisions:
        lo, hi = d.probability_interval
        lines.append(
            f"{d.name:<20} {d.date:<12} {_days(d.observed_first_day, d.observed_last_day):>10} "
            f"{d.probability:>9.3f} {f'{lo:.3f}-{hi:.3f}':>14} {_range(d.first_day_percentiles):>14} "
            f"{_range(d.last_day_percentiles):>13} {d.null_rate:>6.3f} {d.null_rate_any:>6.3f} "
            f"{d.p_value:>7.4f} {d.p_value_any:>7.4f} {d.effect_cohen_h:>6.2f}"
        )
    cal = result.divisions[0].calendar if result.divisions else ""
    lines += [
        "",
        f"dates: local mean solar days, {cal} calendar, astronomical years; day offsets from the division's day",
        "P(framed): share of survey draws with light within the window; null / any: share of null orientations "
        "framing this division / any division; p, p(any): (k+1)/(n+1) for a null orientation bringing light at least "
        "as close; h: Cohen's effect size of P(framed) against the null rate",
    ]
    lines += [f"note: {n}" for n in result.notes]
    return lines


def run(args: argparse.Namespace) -> int:
    """Run ``lightpath frame``; returns the exit code."""
    from lightpath.study.framing import framing_test
    from lightpath.study.uncertainty import parse_epoch

    year, sigma = parse_epoch(args.epoch)
    spread_given = any(mark in args.epoch for mark in ("±", "+/-", "+-"))
    if args.null_draws < 0:
        raise InputError(f"--null-draws: {args.null_draws} must be 0 or more")
    names = None if args.division == "all" else (args.division,)
    scene, light, axis, distance, tol = open_study(args, names)
    workers, client, backend = study_backend(args)
    total = 1 + args.draws + args.null_draws
    try:
        with progress_bar("framing draws", total, quiet=args.quiet or args.json) as advance:
            result = framing_test(
                light, year=year, axis_enu=axis, distance_m=distance, tolerances=tol,
                epoch_sigma_years=sigma if spread_given else None, within_days=args.within, draws=args.draws,
                null_draws=args.null_draws, seed=args.seed, workers=workers, client=client, progress=advance,
                scene_label=scene.label,
            )  # fmt: skip
    finally:
        if client is not None:
            client.close()
    _emit(args, result, format_text(result, backend))
    return 0
