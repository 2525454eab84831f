"""``lightpath inspect SCENE.toml``: what a scene file loads — frame, target, samples, horizon, warnings.

>>> import argparse
>>> p = argparse.ArgumentParser(); add_arguments(p)
>>> p.parse_args(["a.toml", "--samples", "50"]).samples
50
"""

from __future__ import annotations

import argparse

from lightpath.commands._common import add_output_options, print_json

__all__ = ["NAME", "HELP", "add_arguments", "run", "format_summary"]

NAME = "inspect"
HELP = "show what a scene file loads: frame, target area, samples, horizon and warnings"


def add_arguments(parser: argparse.ArgumentParser) -> None:
    parser.add_argument("scene", metavar="SCENE.toml", help="the scene file")
    parser.add_argument("--samples", type=int, default=1000, help="target samples to make (default 1000)")
    parser.add_argument("--seed", type=int, default=0, help="random-number-generator seed for the samples (default 0)")
    add_output_options(parser)


def _fmt(values, digits: int = 3) -> str:
    return "[" + ", ".join(f"{v:.{digits}f}" for v in values) + "]"


def format_summary(s: dict) -> str:
    """The human-readable text of a :func:`lightpath.site.report.scene_summary` dict."""
    site, mesh, tgt, hz = s["site"], s["mesh"], s["target"], s["horizon"]
    refraction = site["refraction"] or "none (geometric)"
    lines = [
        f"scene     {s['label']}  ({s['scene']})",
        f"site      latitude {site['latitude_deg']:.5f} deg, longitude {site['longitude_deg']:.5f} deg east, "
        f"elevation {site['elevation_m']:g} m, time zone {site['timezone'] or 'not given'}",
        f"air       {site['temperature_c']:g} C, {site['pressure_mbar']:g} mbar, refraction {refraction}",
        f"frame     {s['frame']['axes']}; files: {', '.join(s['frame']['files'])}",
    ]
    lines += ["          file-to-site matrix " + _fmt(row, 6) for row in s["frame"]["file_to_site"][:3]]
    sv = s.get("survey") or {}
    if "crs" in sv:
        lines.append(
            f"survey    {sv['crs']} easting {sv['easting_m']:.3f} m, northing {sv['northing_m']:.3f} m; "
            f"grid convergence {sv['convergence_deg']:.4f} deg, scale factor {sv['scale_factor']:.6f} (pyproj)"
        )
    if "declination_deg" in sv:
        lines.append(
            f"magnetic  declination {sv['declination_deg']:.3f} deg (east positive) from {sv['declination_model']} "
            f"for {sv['survey_date']} at the site"
        )
    lines += [
        f"mesh      {mesh['triangles']} triangles, extents E/N/U {_fmt(mesh['extents_m'], 2)} m, "
        f"watertight {'yes' if mesh['watertight'] else 'no'}",
        f"target    {tgt['triangles']} triangles, area {tgt['area_m2']:.4f} m2, centre {_fmt(tgt['centre_m'])} m"
        + (
            f", facing azimuth {tgt['mean_normal_azimuth_deg']:.1f} deg"
            f" altitude {tgt['mean_normal_altitude_deg']:.1f} deg"
            if "mean_normal_azimuth_deg" in tgt
            else ""
        ),
    ]
    op = s["opening"]
    if op:
        lines.append(
            f"opening   {op['triangles']} triangles, area {op['area_m2']:.4f} m2, seen from the target at azimuth "
            f"{op['seen_from_target_azimuth_deg']:.2f} deg, altitude {op['seen_from_target_altitude_deg']:.2f} deg, "
            f"{op['distance_from_target_m']:.2f} m away"
        )
    else:
        lines.append("opening   none given")
    if "samples" in s:
        sm = s["samples"]
        lines.append(
            f"samples   {sm['count']} (seed {sm['seed']}), {sm['area_each_m2']:.3g} m2 each, "
            f"offset {sm['offset_m']:.2g} m along the normals"
        )
    lines.append(
        f"horizon   {hz['source']}: {hz['points']} points, altitude {hz['min_altitude_deg']:.2f} deg "
        f"(azimuth {hz['min_at_azimuth_deg']:g}) to {hz['max_altitude_deg']:.2f} deg "
        f"(azimuth {hz['max_at_azimuth_deg']:g})"
    )
    if s["tolerances"]:
        lines.append("tolerance " + ", ".join(f"{k} {v:g}" for k, v in s["tolerances"].items()))
    if "leak_check" in s:
        lc = s["leak_check"]
        lines.append(
            f"leaks     {lc['rays']} random rays from the target: {lc['escape_share']:.2%} reach the sky, "
            f"{lc['leak_share']:.2%} without crossing the opening"
        )
    lines += [f"warning   {w}" for w in s["warnings"]] or ["warnings  none"]
    return "\n".join(lines)


def run(args: argparse.Namespace) -> int:
    from lightpath.errors import InputError
    from lightpath.scene import load_scene
    from lightpath.site.report import scene_summary
    from lightpath.site.sampling import sample_target

    if args.samples < 1:
        raise InputError(f"--samples: {args.samples} must be a positive whole number")
    scene = load_scene(args.scene)
    samples = None
    if scene.report.target_area_m2 > 0:
        samples = sample_target(scene.target, count=args.samples, seed=args.seed)
    summary = scene_summary(scene, samples)
    summary["survey"] = scene.survey
    if samples is not None:
        from lightpath.site.checks import covered_fraction, covered_warnings

        covered = covered_fraction(scene.mesh, samples.points_m, samples.normals)
        summary["samples"]["covered_share"] = covered
        summary["warnings"] += covered_warnings(covered)
    if samples is not None and scene.opening is not None:
        from lightpath.site.checks import leak_fraction, leak_warnings

        count = min(len(samples), 300)
        leak, escape = leak_fraction(scene.mesh, scene.opening, samples.points_m[:count], samples.normals[:count])
        summary["leak_check"] = {"rays": count * 32, "leak_share": leak, "escape_share": escape}
        summary["warnings"] += leak_warnings(leak)
    if args.json:
        print_json(summary)
    else:
        print(format_summary(summary))
    return 0
