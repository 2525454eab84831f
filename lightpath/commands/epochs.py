"""``lightpath epochs SCENE.toml --division NAME --from Y1 --to Y2``: when did the opening frame that division?

Examples (shell)::

    lightpath epochs demo_models/sandwren/scene.toml --division cross_quarter_feb --from "2500 BC" --to "500 BC"
    lightpath epochs demo_models/larchfold/scene.toml --parts 16 --division division_3_of_16 --from -3000 --to -2000

For every year from Y1 to Y2 (step S) the run of light days nearest the division, for the surveyed geometry
and its spread over Monte Carlo draws of the scene's tolerances, and the spans of years during which the
division's own day falls inside the run.  See ``docs/framing-test.md``.

>>> p = argparse.ArgumentParser(); add_arguments(p)
>>> a = p.parse_args(["s.toml", "--division", "june_solstice", "--from", "3000 BC", "--to", "1000 BC"])
>>> a.step, a.draws
(100, 20)
"""

from __future__ import annotations

import argparse

from lightpath.commands._common import progress_bar
from lightpath.commands.frame import STUDY_FLAGS, add_study_options, as_option_error, emit, open_study, study_backend
from lightpath.errors import InputError
from lightpath.present.tables import settings_line

__all__ = ["HELP", "NAME", "add_arguments", "format_text", "run"]

NAME = "epochs"
HELP = "alignment epochs: how the light days drift against a division of the year over a span of years"


def add_arguments(parser: argparse.ArgumentParser) -> None:
    """Options of ``lightpath epochs``."""
    add_study_options(parser, draws=20)
    parser.add_argument("--division", required=True, metavar="NAME", help="the division, e.g. cross_quarter_nov")
    parser.add_argument("--from", dest="from_year", required=True, metavar="Y1", help="first year, e.g. '4000 BC'")
    parser.add_argument("--to", dest="to_year", required=True, metavar="Y2", help="last year (included)")
    parser.add_argument("--step", type=int, default=100, metavar="S", help="years between rows (default 100)")


def _days(x) -> str:
    return "-" if x is None else f"{x:+.0f}"


def format_text(result, backend: str) -> list[str]:
    """The human-readable report of an :class:`~lightpath.study.epochs.EpochsResult`."""
    from lightpath.present.tables import day_date, division_label
    from lightpath.sky.calendar import year_label

    tol = ", ".join(f"{k} {v:g}" for k, v in result.tolerances.items() if not isinstance(v, bool) and v)
    lines = [
        f"alignment epochs  {result.scene}",
        f"division          {division_label(result.division)} (scheme {result.scheme}, {result.parts} parts); "
        f"criterion {result.criterion}; the light runs that belong to it",
        f"draws             {result.draws} per year, seed {result.seed}; tolerances {tol or 'none'}; ran on {backend}",
        "",
        f"{'year':>9} {'date':<12} {'first':>6} {'last':>6} {'inside':>6} {'P(inside)':>9} "
        f"{'first p5..p95':>14} {'last p5..p95':>13}",
    ]
    for r in result.rows:
        fp, lp = r.first_day_percentiles, r.last_day_percentiles
        f_rng = "-" if fp["p5"] is None else f"{fp['p5']:+.0f}..{fp['p95']:+.0f}"
        l_rng = "-" if lp["p5"] is None else f"{lp['p5']:+.0f}..{lp['p95']:+.0f}"
        lines.append(
            f"{year_label(r.year):>9} {day_date(r.division_day, r.calendar):<12} {_days(r.first_day):>6} "
            f"{_days(r.last_day):>6} "
            f"{'yes' if r.inside else 'no':>6} {r.probability_inside:>9.3f} {f_rng:>14} {l_rng:>13}"
        )

    def spans(items) -> str:
        return ", ".join(f"{year_label(s['from_year'])} to {year_label(s['to_year'])}" for s in items) or "none"

    cal = result.rows[0].calendar if result.rows else ""
    lines += [
        "",
        f"division's day inside the run (surveyed geometry): {spans(result.spans_inside)}",
        f"inside with probability >= 0.5 over the draws:       {spans(result.spans_likely)}",
        "drift of the run's ends: first day "
        + ("-" if result.drift_first_days_per_century is None else f"{result.drift_first_days_per_century:+.2f}")
        + ", last day "
        + ("-" if result.drift_last_days_per_century is None else f"{result.drift_last_days_per_century:+.2f}")
        + " days per century (least squares)",
        f"dates: local apparent days, {cal} calendar, astronomical years; first/last: days from the division's day",
    ]
    if result.settings is not None:
        lines.append(f"settings: {settings_line(result.settings)}")
    lines += [f"note: {n}" for n in result.notes]
    return lines


def run(args: argparse.Namespace) -> int:
    """Run ``lightpath epochs``; returns the exit code."""
    from lightpath.sky.calendar import year_from_label
    from lightpath.study.epochs import alignment_epochs

    y1 = year_from_label(args.from_year, "--from")
    y2 = year_from_label(args.to_year, "--to")
    if args.step < 1:
        raise InputError(f"--step: {args.step} must be 1 or more years")
    scene, light, axis, distance, tol = open_study(args, (args.division,))
    workers, client, backend = study_backend(args)
    n_years = len(range(y1, y2 + 1, args.step)) if y2 >= y1 else 0
    try:
        with progress_bar("epoch draws", n_years * (1 + args.draws), quiet=args.quiet or args.json) as advance:
            result = alignment_epochs(
                light, division=args.division, from_year=y1, to_year=y2, step_years=args.step, axis_enu=axis,
                distance_m=distance, tolerances=tol, draws=args.draws, seed=args.seed, workers=workers,
                client=client, progress=advance, scene_label=scene.label,
            )  # fmt: skip
    except InputError as exc:
        raise as_option_error(exc, STUDY_FLAGS) from None
    finally:
        if client is not None:
            client.close()
    emit(args, result, format_text(result, backend))
    return 0
