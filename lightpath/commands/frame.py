"""``lightpath frame SCENE.toml --epoch Y[±S]``: does the opening frame a division of the year, and would chance?

Examples (shell)::

    lightpath frame demo_models/sandwren/scene.toml --epoch "1500 BC±100"
    lightpath frame demo_models/larchfold/scene.toml --epoch -2599 --parts 16 --within 5 --draws 1000 --json
    lightpath frame site.toml --epoch 2500BC --workers 8
    lightpath frame site.toml --epoch 2500BC --cluster tcp://10.0.0.5:8786

The survey's tolerances come from the scene's ``[tolerances]`` table (one-sigma), with ``--tolerance KEY=VALUE``
overriding; the epoch's spread comes from ``--epoch Y±S`` (or the scene's ``epoch_years``).  See
``docs/framing-test.md`` for the method, the null model and how to read the numbers.

>>> p = argparse.ArgumentParser(); add_arguments(p)
>>> a = p.parse_args(["s.toml", "--epoch", "1500 BC", "--tolerance", "opening_azimuth_deg=1"])
>>> a.within, a.draws, a.tolerance
(3, 200, ['opening_azimuth_deg=1'])
"""

from __future__ import annotations

import argparse
import json
import os

from lightpath.commands._common import (
    add_engine_options,
    add_output_options,
    engine_options,
    print_json,
    progress_bar,
    settings_line,
    to_jsonable,
)
from lightpath.errors import InputError
from lightpath.files import write_text_atomic

__all__ = [
    "HELP",
    "NAME",
    "STUDY_FLAGS",
    "add_arguments",
    "add_study_options",
    "as_option_error",
    "emit",
    "open_study",
    "run",
    "study_backend",
]

NAME = "frame"
#: Lunar claims ``--standstill`` accepts (with ``--body moon``): the standstill's kind and the extreme's direction.
STANDSTILLS = ("major-south", "major-north", "minor-south", "minor-north")
HELP = "framing test: probability that light reaches the target near each division, against a null model"


def add_study_options(parser: argparse.ArgumentParser, *, draws: int) -> None:
    """Options shared by ``frame`` and ``epochs``: the engine's settings, tolerances, execution, output."""
    parser.add_argument("scene", metavar="SCENE.toml", help="the scene file")
    add_engine_options(parser, seed_help="seed of the target sampling and of the Monte Carlo draws")
    parser.add_argument("--draws", type=int, default=draws, metavar="N", help=f"Monte Carlo draws (default {draws})")
    parser.add_argument("--tolerance", action="append", default=[], metavar="KEY=VALUE",
                        help="override a one-sigma tolerance of the scene, e.g. opening_azimuth_deg=0.5")  # fmt: skip
    parser.add_argument("--workers", type=int, default=os.cpu_count() or 1, metavar="N",
                        help="local worker processes (default: one per CPU)")  # fmt: skip
    parser.add_argument("--cluster", metavar="ADDRESS", default=None,
                        help="run the draws on the dask scheduler at ADDRESS (tcp://host:8786) instead")  # fmt: skip
    parser.add_argument("--output", metavar="FILE", default=None, help="also write the JSON result to FILE")
    add_output_options(parser)


def add_arguments(parser: argparse.ArgumentParser) -> None:
    """Options of ``lightpath frame``."""
    add_study_options(parser, draws=200)
    parser.add_argument("--epoch", required=True, metavar="Y[±S]", help="the building's epoch, e.g. '1500 BC±100'")
    parser.add_argument("--division", default="all", metavar="NAME|all", help="division to test (default all)")
    parser.add_argument("--within", type=int, default=3, metavar="DAYS",
                        help="framed = light on a day within ±DAYS of the division (default 3)")  # fmt: skip
    parser.add_argument("--null-draws", type=int, default=200, metavar="N", help="null orientations (default 200)")
    parser.add_argument("--standstill", default="major-south", choices=STANDSTILLS, metavar="KIND-DIRECTION",
                        help="with --body moon: the lunar claim tested, " + ", ".join(STANDSTILLS)
                        + " (default major-south)")  # fmt: skip
    parser.add_argument("--closeness", type=float, default=0.5, metavar="DEG",
                        help="with --body moon: framed = moonlight within DEG of the extreme's declination "
                        "(default 0.5)")  # fmt: skip


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
    from lightpath.study.light_days import light_days_for_scene

    window_options, options = engine_options(args)
    for option, value, low in (("--draws", args.draws, 0), ("--workers", args.workers, 1)):
        if value < low:
            raise InputError(f"{option}: {value} must be {low} or more")
    scene = load_scene(args.scene)
    quiet = args.quiet or args.json
    with progress_bar("sky window", 100, quiet=quiet) as advance:
        done = [0]

        def window_progress(k, total):
            step = int(100 * k / max(total, 1)) - done[0]
            if step > 0:
                done[0] += step
                advance(step)

        light, axis, distance = light_days_for_scene(scene, window_options, options, names=names,
                                                     progress=window_progress)  # fmt: skip
    return scene, light, axis, distance, _tolerances(scene, args.tolerance)


def as_option_error(exc: InputError, flags: dict[str, str]) -> InputError:
    """The same one-line error with an API parameter's name (``within_days:``) replaced by its option's."""
    text = str(exc)
    for name, flag in flags.items():
        if text.startswith(name + ":"):
            return InputError(flag + text[len(name) :])
    return exc


#: API parameters of the studies and the options that set them.
STUDY_FLAGS = {"within_days": "--within", "division": "--division", "step_years": "--step", "to_year": "--to"}


def study_backend(args: argparse.Namespace):
    """(workers, dask client or None, description) from ``--workers`` / ``--cluster``."""
    from lightpath.study.execution import connect_cluster, describe_backend

    client = connect_cluster(args.cluster) if args.cluster else None
    return args.workers, client, describe_backend(args.workers, client)


def emit(args, result, text_lines) -> None:
    """Print a study's result (text, or JSON with ``--json``) and write ``--output``."""
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
    from lightpath.present.tables import day_date, division_label
    from lightpath.sky.calendar import year_label

    spread = f" ± {result.epoch_sigma_years:g} years (one sigma)" if result.epoch_sigma_years else ""
    tol = ", ".join(f"{k} {v:g}" for k, v in result.tolerances.items() if not isinstance(v, bool) and v)
    lines = [
        f"framing test  {result.scene}",
        f"epoch         {year_label(result.epoch_year)} (astronomical {result.epoch_year}){spread}",
        f"divisions     scheme {result.scheme}, {result.parts} parts; criterion {result.criterion}; framed = light "
        f"within ±{result.within_days} days, in a light run of that division",
        f"draws         {result.draws} survey draws, {result.null_draws} null orientations, seed {result.seed}; "
        f"ran on {backend}",
        f"tolerances    {tol or 'none'}; ΔT σ {'drawn' if result.tolerances.get('delta_t') else 'off'}",
        f"null model    {result.null_model['description']}",
        f"              reference azimuth {result.null_model['reference_azimuth_deg']:.2f}° "
        f"(opening's axis at {result.facing_azimuth_deg:.2f}°)",
        "",
        f"{'division':<30} {'date':<12} {'lit run':>10} {'P(framed)':>9} {'95% interval':>14} "
        f"{'first p5..p95':>14} {'last p5..p95':>13} {'null':>6} {'any':>6} {'p':>7} {'p(any)':>7} {'h':>6}",
    ]
    for d in result.divisions:
        lo, hi = d.probability_interval
        lines.append(
            f"{division_label(d.name):<30} {day_date(d.day, d.calendar):<12} "
            f"{_days(d.observed_first_day, d.observed_last_day):>10} "
            f"{d.probability:>9.3f} {f'{lo:.3f}-{hi:.3f}':>14} {_range(d.first_day_percentiles):>14} "
            f"{_range(d.last_day_percentiles):>13} {d.null_rate:>6.3f} {d.null_rate_any:>6.3f} "
            f"{d.p_value:>7.4f} {d.p_value_any:>7.4f} {d.effect_cohen_h:>6.2f}"
        )
    cal = result.divisions[0].calendar if result.divisions else ""
    lines += [
        "",
        f"dates: local apparent days, {cal} calendar, astronomical years; day offsets from the division's day",
        "P(framed): share of survey draws with light within the window; null / any: share of null orientations "
        "framing this division / any division; p, p(any): (k+1)/(n+1) for a null orientation bringing light at least "
        "as close; h: Cohen's effect size of P(framed) against the null rate",
    ]
    if result.settings is not None:
        lines.append(f"settings: {settings_line(result.settings)}")
    lines += [f"note: {n}" for n in result.notes]
    return lines


def run(args: argparse.Namespace) -> int:
    """Run ``lightpath frame``; returns the exit code."""
    from lightpath.study.framing import framing_test
    from lightpath.study.uncertainty import parse_epoch

    year, sigma = parse_epoch(args.epoch)
    if args.body == "moon":
        return run_lunar(args, year)
    spread_given = any(mark in args.epoch for mark in ("±", "+/-", "+-"))
    if args.null_draws < 0:
        raise InputError(f"--null-draws: {args.null_draws} must be 0 or more")
    names = None if args.division == "all" else (args.division,)
    scene, light, axis, distance, tol = open_study(args, names)
    try:
        light.division_names(year)
    except InputError as exc:
        raise as_option_error(exc, STUDY_FLAGS) from None
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
    except InputError as exc:
        raise as_option_error(exc, STUDY_FLAGS) from None
    finally:
        if client is not None:
            client.close()
    emit(args, result, format_text(result, backend))
    return 0


def format_lunar_text(result, scene_label: str, settings) -> list[str]:
    """The human-readable report of a :class:`~lightpath.study.lunar_framing.LunarFraming`."""
    from lightpath.present.tables import ut_label

    lo, hi = result.probability_interval
    near = result.nominal_closeness_deg
    lines = [
        f"lunar framing test  {scene_label}",
        f"claim         the opening frames the {result.kind} standstill's {result.direction}ern {result.side}",
        f"extreme       declination {result.extreme_declination_deg:+.3f}° at {ut_label(result.extreme_jd_tt)} TT; "
        f"moonlight searched ±{result.span_days:g} days",
        f"framed        moonlight at a declination within {result.within_deg:g}° of the extreme",
        f"opening       axis at azimuth {result.facing_azimuth_deg:.2f}°",
        "",
        f"surveyed      closest moonlight {'none' if near != near else f'{near:.3f}° from the extreme'}",
        f"P(framed)     {result.probability:.3f} (95% interval {lo:.3f}-{hi:.3f}) over {len(result.closeness_deg)} "
        "survey draws",
        f"null model    {result.null_model}, azimuths {result.null_arc_deg[0]:.2f}°..{result.null_arc_deg[1]:.2f}°: "
        f"rate {result.null_rate:.3f} over {len(result.null_closeness_deg)} orientations, p {result.p_value:.4f}",
        "",
        "p: (k+1)/(n+1) for a random orientation bringing moonlight at least as close as the surveyed one; "
        "ΔT's σ is not drawn (the extreme's declination does not depend on it)",
    ]
    if settings is not None:
        lines.append(f"settings: {settings_line(settings)}")
    return lines


def run_lunar(args: argparse.Namespace, year: int) -> int:
    """``frame --body moon``: the framing test for a lunar standstill claim (:mod:`lightpath.study.lunar_framing`)."""
    from lightpath.light.scan import scan_settings
    from lightpath.study.lunar_framing import lunar_framing

    if args.division != "all":
        raise InputError("--division: divisions of the year are tested with --body sun; with --body moon use "
                         "--standstill " + "|".join(STANDSTILLS))  # fmt: skip
    if not 0.0 < args.closeness <= 10.0:
        raise InputError(f"--closeness: {args.closeness:g} must be in (0, 10] degrees")
    if args.null_draws < 0:
        raise InputError(f"--null-draws: {args.null_draws} must be 0 or more")
    scene, light, axis, _, tol = open_study(args, None)
    kind, direction = args.standstill.split("-")
    with progress_bar("lunar framing", 1, quiet=args.quiet or args.json) as advance:
        result = lunar_framing(light.window, light.observer, year, axis, kind=kind, direction=direction,
                               tolerances=tol, draws=args.draws, null_draws=args.null_draws, seed=args.seed,
                               within_deg=args.closeness, options=light.options)  # fmt: skip
        advance(1)
    settings = scan_settings(light.window, light.observer, light.options, args.seed)
    emit(args, result, format_lunar_text(result, scene.label, settings))
    return 0
