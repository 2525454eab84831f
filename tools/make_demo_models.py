"""Regenerate the three invented demo sites in demo_models/ from the parametric builders.

Run:  python tools/make_demo_models.py          (writes mesh, scene, horizon CSV and README of each site)
      python tools/make_demo_models.py --check  (then runs the engine on each site for its epoch and prints
                                                 the runs of days with light around each division)

The sites are invented (names, stories, coordinates); each lies in a different region and epoch and shows a
different capability:

- ``sandwren``: a rock-cut window in a semi-arid upland of the southern hemisphere, 1500 BC, lit by the setting
  Sun around a cross-quarter day (a southern-hemisphere site, an ancient Julian-calendar year);
- ``larchfold``: a bent passage in a forested upland, 2600 BC, lit at sunrise around a sixteenth of the year,
  with a skyline computed from an invented ridge (terrain → horizon profile, sixteen divisions);
- ``quillfield``: a niche in a modern reading room, AD 2027, lit at sunrise around the equinoxes (visit
  planning in a modern time zone with daylight-saving time).

Each opening is aimed with the closed form for the azimuth of the Sun at a given altitude h on a given
declination δ at latitude φ,

    cos A = (sin δ − sin φ sin h) / (cos φ cos h)          (Meeus 1998, eq. 13.6 solved for A; h = 0 gives
                                                            the familiar cos A = sin δ / cos φ)

with δ from the obliquity ε of the chosen epoch (Vondrák, Capitaine & Wallace 2011 long-term precession,
ERFA ``ltpecl``/``ltpequ``: ε is the angle between the ecliptic and equator poles) and the Sun's ecliptic
longitude λ of the division (sin δ = sin ε sin λ, ecliptic latitude 0), and h either the *geometric* altitude
of a Sun standing ``aim_above_horizon_deg`` above the horizon profile (apparent altitude minus Bennett (1982)
refraction) or, for ``aim = "sightline"``, the altitude of the line from the target's centre to the opening's
centre (a bent passage: the opening's axis is then turned so that this line, not the entrance axis, points
at the Sun).  This is rough on purpose (no nutation, aberration or parallax: < 0.01° in δ) — the engine finds
the real dates; the aim only has to put light within a few days of the division.

To re-aim a site, change the numbers in SITES below and run the script again; the chambers' sizes are in
``lightpath.site.builders.demo_chamber`` (shared with ``benchmarks/bench_scan.py``).
"""

from __future__ import annotations

import math
import sys
from pathlib import Path

import numpy as np

ROOT = Path(__file__).resolve().parents[1]
sys.path.insert(0, str(ROOT))

from lightpath.site.builders import demo_chamber  # noqa: E402
from lightpath.site.export import export_obj  # noqa: E402
from lightpath.site.terrain import skyline_from_terrain  # noqa: E402
from lightpath.sky.horizon import HorizonProfile, write_horizon_csv  # noqa: E402

OUT = ROOT / "demo_models"


def ridge_terrain(
    crest_azimuth_deg: float,
    crest_distance_m: float,
    crest_height_m: float,
    saddle_offset_m: float,
    saddle_depth_m: float,
    half_width_m: float = 700.0,
    extent_m: float = 14_000.0,
    cell_m: float = 100.0,
):
    """An invented ridge as a height-field mesh (site frame, metres): a crest whose nearest point lies at
    ``crest_distance_m`` towards ``crest_azimuth_deg``, ``crest_height_m`` high above the site, running across
    that direction, with a Gaussian cross-section (``half_width_m``) and a saddle ``saddle_depth_m`` deep
    centred ``saddle_offset_m`` along the crest (positive: clockwise of the crest azimuth, seen from the site)."""
    import trimesh

    n = int(round(2 * extent_m / cell_m)) + 1
    x, y = np.meshgrid(np.linspace(-extent_m, extent_m, n), np.linspace(-extent_m, extent_m, n), indexing="xy")
    a = math.radians(crest_azimuth_deg)
    across = x * math.sin(a) + y * math.cos(a) - crest_distance_m  # towards the crest azimuth
    along = x * math.cos(a) - y * math.sin(a)  # clockwise along the crest
    crest = crest_height_m - saddle_depth_m * np.exp(-(((along - saddle_offset_m) / 1500.0) ** 2))
    z = -2.0 + crest * np.exp(-((across / half_width_m) ** 2))  # a plain 2 m below the site's reference point
    vertices = np.column_stack([x.ravel(), y.ravel(), z.ravel()])
    i = np.arange(n - 1)[:, None] * n + np.arange(n - 1)[None, :]
    faces = np.concatenate([np.stack([i, i + 1, i + n], -1), np.stack([i + 1, i + n + 1, i + n], -1)]).reshape(-1, 3)
    return trimesh.Trimesh(vertices, faces, process=False)


def ridge_horizon(step_deg: float, eye_m: float = 1.5, **ridge) -> tuple[np.ndarray, np.ndarray]:
    """Skyline (azimuths, apparent altitudes, degrees) of :func:`ridge_terrain` seen from ``eye_m`` above the site
    point, with the Earth's curvature and terrestrial refraction (``lightpath.site.terrain``)."""
    sky = skyline_from_terrain(ridge_terrain(**ridge), (0.0, 0.0, eye_m), step_deg=step_deg)
    return sky.azimuth_deg, np.round(sky.altitude_deg, 3)


def formula_horizon(formula, step_deg: float) -> tuple[np.ndarray, np.ndarray]:
    """Skyline from a formula of azimuth (degrees → apparent altitude, degrees)."""
    az = np.arange(0.0, 360.0, step_deg)
    return az, np.round(formula(az), 3)


# ---- the numbers (edit these to re-aim) ----------------------------------------------------------------------
SITES = {
    "sandwren": dict(
        title="Sandwren Rock Window",
        latitude_deg=-29.861,
        longitude_deg=22.814,
        elevation_m=1183.0,
        timezone="Africa/Johannesburg",
        epoch_year=-1499,  # 1500 BC, astronomical numbering
        division="cross-quarter day between the December solstice and the March equinox (λ = 315°)",
        division_key="cross_quarter_feb",
        parts=8,
        ecliptic_longitude_deg=315.0,
        event="set",
        aim="above_horizon",
        aim_above_horizon_deg=3.0,
        temperature_c=24.0,
        horizon=lambda step: formula_horizon(
            lambda az: 0.35 + 1.1 * np.exp(-(((az - 262.0) / 30.0) ** 2)) + 0.2 * np.sin(np.radians(3 * az)), step
        ),
        horizon_note="an invented skyline of low flat-topped hills on a dry plateau, from a formula",
        story="A square room cut into the flank of a sandstone outcrop on a dry, grassy plateau. Its west side is "
        "a metre and a half of living rock pierced by one small window; on the back wall a pecked panel is touched "
        "by the setting Sun on the days around the late-summer cross-quarter day (early February in our calendar; "
        "the Sun's declination being the same, also around the cross-quarter day of early November).",
    ),
    "larchfold": dict(
        title="Larchfold Bent Passage",
        latitude_deg=53.452,
        longitude_deg=104.637,
        elevation_m=548.0,
        timezone="Asia/Irkutsk",
        epoch_year=-2599,  # 2600 BC
        division="the sixteenth of the year between the February cross-quarter day and the March equinox "
        "(λ = 337.5°, division 3 of 16)",
        division_key="division_3_of_16",
        parts=16,
        ecliptic_longitude_deg=337.5,
        event="rise",
        aim="sightline",
        temperature_c=-8.0,
        horizon=lambda step: ridge_horizon(
            step,
            crest_azimuth_deg=105.0,
            crest_distance_m=2600.0,
            crest_height_m=190.0,
            saddle_offset_m=250.0,
            saddle_depth_m=120.0,
        ),
        horizon_note="the skyline of an invented ridge 2.6 km to the east-south-east with a saddle, computed from "
        "a height-field mesh by ray casting (`lightpath.site.terrain.skyline_from_terrain`, with the Earth's "
        "curvature and terrestrial refraction)",
        story="A dry-stone passage runs into a low terrace cut in a hillside above a river valley, turning a few "
        "degrees to the left half-way in and opening into a small square room. The entrance looks across the "
        "valley to a wooded ridge; sunlight that comes through the saddle of that ridge reaches a flat slab set "
        "upright against the room's far wall only on the mornings around the sixteenth of the year that falls "
        "between the late-winter cross-quarter day and the March equinox — and, the Sun's declination being the "
        "same, around the one in mid-October.",
    ),
    "quillfield": dict(
        title="Quillfield Reading Room",
        latitude_deg=38.947,
        longitude_deg=-98.412,
        elevation_m=562.0,
        timezone="America/Chicago",
        epoch_year=2027,
        division="March equinox",
        division_key="march_equinox",
        parts=8,
        ecliptic_longitude_deg=0.0,
        event="rise",
        aim="above_horizon",
        aim_above_horizon_deg=4.0,
        temperature_c=12.0,
        horizon=lambda step: formula_horizon(
            lambda az: 0.4 + 0.5 * np.exp(-(((az - 98.0) / 12.0) ** 2)) + 0.1 * np.sin(np.radians(4 * az)), step
        ),
        horizon_note="an invented skyline of a flat plain with a line of trees and a grain store to the east, "
        "from a formula",
        story="A modern reading room in a small prairie town, built in 2024 with one deep, high window in its "
        "thick east wall. Opposite the window is a niche holding the town's founding charter; on the mornings "
        "around the March (and September) equinox the rising Sun's light falls into it, and the library opens "
        "early for visitors. The dates and clock times of the next visit, in the town's time zone with "
        "daylight-saving time, come from `lightpath visit`.",
    ),
}
HORIZON_STEP_DEG = 1.0


def obliquity_deg(year: float) -> float:
    """Mean obliquity of the ecliptic at Julian epoch ``year``, degrees (Vondrák et al. 2011 via ERFA)."""
    import erfa

    ecl, equ = erfa.ltpecl(float(year)), erfa.ltpequ(float(year))
    return math.degrees(math.acos(float(np.dot(ecl, equ))))


def bennett_refraction_deg(apparent_altitude_deg: float) -> float:
    """Bennett (1982): R = cot(h_a + 7.31/(h_a + 4.4)) arcminutes, h_a apparent altitude in degrees."""
    h = apparent_altitude_deg
    return 1.0 / math.tan(math.radians(h + 7.31 / (h + 4.4))) / 60.0


def sun_azimuth_at_altitude_deg(declination_deg: float, latitude_deg: float, altitude_deg: float, event: str):
    """Azimuth of the Sun at geometric altitude h on declination δ, rising (east) or setting (west) branch."""
    d, p, h = (math.radians(x) for x in (declination_deg, latitude_deg, altitude_deg))
    cos_a = (math.sin(d) - math.sin(p) * math.sin(h)) / (math.cos(p) * math.cos(h))  # Meeus (1998) eq. 13.6
    a = math.degrees(math.acos(max(-1.0, min(1.0, cos_a))))
    return a if event == "rise" else 360.0 - a


SCENE = """# {title} — an invented demo site (no real place).  Regenerate with tools/make_demo_models.py.
# Aimed at {division}, {epoch_text}, sun{event} (see README.md).

[site]
label = "{title} (invented)"
latitude_deg = {latitude_deg}
longitude_deg = {longitude_deg}
elevation_m = {elevation_m}
timezone = "{timezone}"

[model]
file = "{mesh}"
unit = "m"
up_axis = "z"
north_axis = "y"
north = "true"

[target]
groups = ["target"]

[opening]
groups = ["{opening}"]

[horizon]
kind = "csv"
file = "horizon.csv"

[atmosphere]
temperature_c = {temperature_c}
refraction = "bennett1982"

[tolerances]
opening_azimuth_deg = 0.5
opening_tilt_deg = 0.3
target_position_m = 0.05
horizon_altitude_deg = 0.2
temperature_c = 8.0
pressure_mbar = 15.0
epoch_years = {epoch_sigma}
"""

README = """# {title} (invented demo site)

**Invented:** the name, the story, the building and the coordinates are made up for lightpath's demo; no real
monument or place is meant.

{story}

- Coordinates: latitude {latitude_deg}° (negative = south), longitude {longitude_deg}° (negative = west),
  elevation {elevation_m} m; time zone {timezone}.
- Aimed at: **{division}**, sun{event}, at the epoch {epoch_text} (astronomical year {epoch_year}).
  {date_note}
- Aim: obliquity {obliquity_deg:.3f}° (Vondrák et al. 2011), declination {declination_deg:.3f}°; {aim_text}
  Share of target samples that see the Sun's centre in that direction: {lit:.0%}.
- Skyline: {horizon_note}.
- Files: `scene.toml` (the scene), `{mesh}` (metres, z up, parts as OBJ groups: {parts}), `horizon.csv`
  (apparent altitudes every {step:g}°).
- Try: `lightpath inspect demo_models/{name}/scene.toml`, then
  `lightpath scan demo_models/{name}/scene.toml --year "{epoch_text}" --parts {parts_count}`.
- Regenerate or re-aim: edit the numbers at the top of `tools/make_demo_models.py` and run it.

**Safety:** never look at the Sun directly or through optics; real chambers can be unstable, confined or
protected — enter only with the permission of the site's managers and follow their rules.
"""


def sightline(model) -> tuple[float, float]:
    """Azimuth and geometric altitude (degrees) of the line from the target's centre to the opening's centre."""
    target = model.target()
    opening = model.opening()
    v = np.asarray(opening.triangles_center.mean(axis=0)) - np.asarray(target.triangles_center.mean(axis=0))
    az = math.degrees(math.atan2(v[0], v[1])) % 360.0
    alt = math.degrees(math.atan2(v[2], math.hypot(v[0], v[1])))
    return az, alt


def aim(name: str, site: dict, horizon) -> dict:
    """Declination, the Sun's direction to aim at, and the opening azimuth that puts the target in its light."""
    eps = obliquity_deg(site["epoch_year"])
    dec = math.degrees(math.asin(math.sin(math.radians(eps)) * math.sin(math.radians(site["ecliptic_longitude_deg"]))))
    flat = sun_azimuth_at_altitude_deg(dec, site["latitude_deg"], 0.0, site["event"])
    if site["aim"] == "sightline":
        probe = 180.0
        line_az, line_alt = sightline(demo_chamber(name, probe))
        turn = (line_az - probe + 180.0) % 360.0 - 180.0  # the sight line is turned this far from the axis
        az = sun_azimuth_at_altitude_deg(dec, site["latitude_deg"], line_alt, site["event"])
        apparent = line_alt + bennett_refraction_deg(line_alt + 0.5)  # rough inverse of Bennett's formula
        axis = (az - turn) % 360.0
        text = (
            f"the line from the target's centre to the opening's centre is turned {turn:+.2f}° from the entrance "
            f"axis and rises {line_alt:.2f}°, so the entrance axis points to azimuth {axis:.2f}° (true north, "
            f"clockwise) and the line to {az:.2f}°, where the Sun's centre stands at apparent altitude "
            f"{apparent:.2f}° (the skyline there: {float(horizon(az)):.2f}°; on a flat horizon the Sun would "
            f"{site['event']} at azimuth {flat:.2f}°)."
        )
    else:
        az = 90.0 if site["event"] == "rise" else 270.0
        for _ in range(20):  # the horizon depends on the azimuth: iterate to a fixed point
            apparent = float(horizon(az)) + site["aim_above_horizon_deg"]
            geometric = apparent - bennett_refraction_deg(apparent)
            az = sun_azimuth_at_altitude_deg(dec, site["latitude_deg"], geometric, site["event"])
        axis = az
        text = (
            f"the opening's axis points to azimuth {az:.2f}° (true north, clockwise), where the Sun's centre stands "
            f"at apparent altitude {apparent:.2f}°, {site['aim_above_horizon_deg']:g}° over the skyline (on a flat "
            f"horizon it would {site['event']} at azimuth {flat:.2f}°)."
        )
    return dict(
        obliquity_deg=eps,
        declination_deg=dec,
        azimuth_deg=az,
        axis_azimuth_deg=axis,
        apparent_altitude_deg=apparent,
        flat_horizon_azimuth_deg=flat,
        aim_text=text,
    )


def lit_fraction(model, azimuth_deg: float, altitude_deg: float, samples: int = 400) -> float:
    """Share of target samples that see the Sun's centre at (azimuth, altitude) — a geometric check only."""
    from lightpath.site.sampling import sample_target
    from lightpath.site.terrain import enu_directions

    s = sample_target(model.target(), count=samples, seed=0)
    d = np.broadcast_to(enu_directions(np.array(azimuth_deg), np.array(altitude_deg)), s.points_m.shape)
    return float(np.mean(~model.blocking_mesh().ray.intersects_any(s.points_m, d)))


def division_date_note(site: dict, observer_horizon) -> str:
    """The division's date in the epoch's calendar and, for Julian years, in the proleptic Gregorian calendar."""
    from lightpath.sky.divisions import divisions
    from lightpath.sky.observer import Observer

    year = site["epoch_year"]
    observer = Observer(latitude_deg=site["latitude_deg"], longitude_deg=site["longitude_deg"])
    found = {}
    for calendar in ("auto", "gregorian"):
        rows = divisions(year, "longitude", site["parts"], observer=observer, horizon=observer_horizon,
                         calendar=calendar)  # fmt: skip
        found[calendar] = next(r for r in rows if r.name == site["division_key"])
    auto, greg = found["auto"], found["gregorian"]
    if auto.calendar == greg.calendar:
        return f"In that year it fell on {_day(auto.date)} ({auto.calendar.capitalize()}, local date)."
    return (
        f"In that year it fell on {_day(auto.date)} in the {auto.calendar.capitalize()} calendar "
        f"({_day(greg.date)} proleptic {greg.calendar.capitalize()}; local dates): by then the Julian calendar had "
        "drifted against the seasons (see docs/time-and-calendars.md)."
    )


def _day(date: str) -> str:
    """``"-1499-02-16"`` → ``"1500 BC February 16"`` (astronomical year numbering in, people's years out)."""
    from lightpath.sky.calendar import MONTH_NAMES, year_label

    year, month, day = date.rsplit("-", 2)
    return f"{year_label(int(year))} {MONTH_NAMES[int(month) - 1]} {int(day)}"


def check(name: str, site: dict) -> None:
    """Run the engine on the regenerated site for its epoch and print where light falls (needs lightpath.light)."""
    from lightpath.light.scan import scan_scene
    from lightpath.scene import load_scene

    result = scan_scene(load_scene(OUT / name / "scene.toml"), [site["epoch_year"]], samples=300, parts=site["parts"])
    year = result.years[0]
    for run in year.divisions:
        if run.days:
            print(
                f"    light around {run.name}: {run.days} days, {run.first_offset_days:+d} .. "
                f"{run.last_offset_days:+d} days from it ({run.calendar} calendar)"
            )


def main(argv: list[str] | None = None) -> None:
    argv = sys.argv[1:] if argv is None else argv
    for name, site in SITES.items():
        folder = OUT / name
        folder.mkdir(parents=True, exist_ok=True)
        az_grid, alt_grid = site["horizon"](HORIZON_STEP_DEG)
        profile = HorizonProfile(az_grid, alt_grid)
        horizon = profile.altitude_at
        a = aim(name, site, horizon)
        model = demo_chamber(name, round(a["axis_azimuth_deg"], 2))
        mesh_name = f"{name}.obj"
        export_obj(model, folder / mesh_name, header=f"{site['title']} (invented demo site)")
        write_horizon_csv(
            folder / "horizon.csv",
            profile,
            comment=f"{site['title']} (invented): apparent skyline altitude, degrees",
        )
        year = site["epoch_year"]
        epoch_text = f"{1 - year} BC" if year <= 0 else f"AD {year}"
        fields = dict(
            site,
            **a,
            name=name,
            mesh=mesh_name,
            opening=model.opening_parts[0],
            epoch_text=epoch_text,
            epoch_sigma=100.0 if year < 0 else 0.0,
            parts=", ".join(model.parts),
            parts_count=site["parts"],
            step=HORIZON_STEP_DEG,
            lit=lit_fraction(model, a["azimuth_deg"], a["apparent_altitude_deg"]),
            date_note=division_date_note(site, profile),
        )
        (folder / "scene.toml").write_text(SCENE.format(**fields))
        (folder / "README.md").write_text(README.format(**fields))
        for p in folder.iterdir():
            p.chmod(0o644)  # package data: readable by everyone (atomic writes create 0600 files)
        size = sum(p.stat().st_size for p in folder.iterdir())
        print(f"{name}: axis {a['axis_azimuth_deg']:.2f} deg, lit {fields['lit']:.0%}, {size / 1e3:.0f} kB")
        print(f"    {fields['date_note']}")
        if "--check" in argv:
            check(name, site)


if __name__ == "__main__":
    main()
