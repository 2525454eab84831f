"""Regenerate the three demo sites in lightpath/demo_models/ from the parametric builders.

Run:  python tools/make_demo_models.py          (writes mesh, scene, horizon CSV and README of each site)
      python tools/make_demo_models.py --check  (then runs the engine on each site for its epoch and prints
                                                 the runs of days with light around each division)

The sites are invented (names, stories, coordinates).  Each opening is aimed with the closed form for the
azimuth of the Sun at a given altitude h on a given declination δ at latitude φ,

    cos A = (sin δ − sin φ sin h) / (cos φ cos h)          (Meeus 1998, eq. 13.6 solved for A; h = 0 gives
                                                            the familiar cos A = sin δ / cos φ)

with δ from the obliquity ε of the chosen epoch (Vondrák, Capitaine & Wallace 2011 long-term precession,
ERFA ``ltpecl``/``ltpequ``: ε is the angle between the ecliptic and equator poles) and the Sun's ecliptic
longitude λ of the division (sin δ = sin ε sin λ, ecliptic latitude 0), and h the *geometric* altitude
of a Sun standing ``AIM_ABOVE_HORIZON_DEG`` above the horizon profile: apparent altitude minus Bennett
(1982) refraction.  This is rough on purpose (no nutation, aberration or parallax: < 0.01° in δ) — the
engine finds the real dates; the aim only has to put light within a few days of the division.

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
from lightpath.sky.horizon import HorizonProfile, write_horizon_csv  # noqa: E402

OUT = ROOT / "lightpath" / "demo_models"

# ---- the numbers (edit these to re-aim) ----------------------------------------------------------------------
SITES = {
    "passage": dict(
        title="Fernmoor Passage Chamber",
        latitude_deg=53.452,
        longitude_deg=-7.118,
        elevation_m=96.0,
        timezone="Europe/Dublin",
        epoch_year=-3199,  # 3200 BC, astronomical numbering
        division="December solstice",
        ecliptic_longitude_deg=270.0,
        event="rise",
        aim_above_horizon_deg=1.6,
        horizon=lambda az: 0.55 + 0.35 * np.sin(np.radians(2 * az + 30)) + 0.15 * np.sin(np.radians(5 * az)),
    ),
    "shrine": dict(
        title="Kestrel Rock Shrine",
        latitude_deg=29.861,
        longitude_deg=32.947,
        elevation_m=412.0,
        timezone="Africa/Cairo",
        epoch_year=-1499,  # 1500 BC
        division="cross-quarter day between the June solstice and the September equinox (λ = 135°)",
        ecliptic_longitude_deg=135.0,
        event="set",
        aim_above_horizon_deg=3.2,
        horizon=lambda az: 0.6 + 2.6 * np.exp(-(((az - 290.0) / 35.0) ** 2)) + 0.3 * np.sin(np.radians(3 * az)),
    ),
    "window": dict(
        title="Saltgate Window Room",
        latitude_deg=38.947,
        longitude_deg=-2.254,
        elevation_m=705.0,
        timezone="Europe/Madrid",
        epoch_year=2026,
        division="March equinox",
        ecliptic_longitude_deg=0.0,
        event="rise",
        aim_above_horizon_deg=4.0,
        horizon=lambda az: 1.1 + 0.6 * np.cos(np.radians(az - 80.0)) + 0.2 * np.sin(np.radians(4 * az)),
    ),
}
HORIZON_STEP_DEG = 2.0


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


def aim(site: dict) -> dict:
    """Declination, and the azimuth/altitude where the Sun stands ``aim_above_horizon_deg`` over the horizon."""
    eps = obliquity_deg(site["epoch_year"])
    dec = math.degrees(math.asin(math.sin(math.radians(eps)) * math.sin(math.radians(site["ecliptic_longitude_deg"]))))
    az = 90.0 if site["event"] == "rise" else 270.0
    for _ in range(20):  # the horizon depends on the azimuth: iterate to a fixed point
        apparent = float(site["horizon"](az)) + site["aim_above_horizon_deg"]
        geometric = apparent - bennett_refraction_deg(apparent)
        az = sun_azimuth_at_altitude_deg(dec, site["latitude_deg"], geometric, site["event"])
    flat_rise = sun_azimuth_at_altitude_deg(dec, site["latitude_deg"], 0.0, site["event"])
    return dict(
        obliquity_deg=eps,
        declination_deg=dec,
        azimuth_deg=az,
        apparent_altitude_deg=apparent,
        flat_horizon_azimuth_deg=flat_rise,
    )


def lit_fraction(model, azimuth_deg: float, altitude_deg: float, samples: int = 400) -> float:
    """Share of target samples that see the Sun's centre at (azimuth, altitude) — a geometric check only."""
    from lightpath.site.sampling import sample_target
    from lightpath.site.terrain import enu_directions

    s = sample_target(model.target(), count=samples, seed=0)
    d = np.broadcast_to(enu_directions(np.array(azimuth_deg), np.array(altitude_deg)), s.points_m.shape)
    return float(np.mean(~model.blocking_mesh().ray.intersects_any(s.points_m, d)))


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

{story}

- Coordinates: latitude {latitude_deg}° N, longitude {longitude_deg}° E (negative = west), elevation {elevation_m} m.
  Invented: no real monument is meant.
- Aimed at: **{division}**, sun{event}, at the epoch {epoch_text} (astronomical year {epoch_year}).
- Aim: obliquity {obliquity_deg:.3f}° (Vondrák et al. 2011), declination {declination_deg:.3f}°; the opening's axis
  points to azimuth {azimuth_deg:.2f}° (true north, clockwise), where the Sun's centre stands at apparent altitude
  {apparent_altitude_deg:.2f}° over the horizon profile (on a flat horizon it would {event} at azimuth
  {flat_horizon_azimuth_deg:.2f}°). Share of target samples that see the Sun's centre in that direction: {lit:.0%}.
- Files: `scene.toml` (the scene), `{mesh}` (metres, z up, parts as OBJ groups: {parts}), `horizon.csv`
  (an invented skyline, apparent altitudes every {step:g}°).
- Regenerate or re-aim: edit the numbers at the top of `tools/make_demo_models.py` and run it.

**Safety:** never look at the Sun directly or through optics; real chambers can be unstable, confined or
protected — enter only with the permission of the site's managers and follow their rules.
"""

STORIES = {
    "passage": "A long stone passage runs into a mound to a corbelled chamber. The doorway was closed by a slab, and "
    "the only way light could enter was a narrow slot over the entrance lintel. Around the December solstice a "
    "few minutes after sunrise a beam runs up the gently rising passage to the chamber's back stone.",
    "shrine": "A small room cut into a west-facing cliff. Its front is a two-metre thickness of rock pierced by a "
    "slit five centimetres wide; on the back wall a carved panel is touched by the setting Sun on the days "
    "around the cross-quarter day that falls between the June solstice and the September equinox (and, the "
    "Sun's declination being the same, around the one between the March equinox and the June solstice).",
    "window": "A thick-walled room with one small high window facing east. Opposite the window is a niche; "
    "in the days around the March (and September) equinox the rising Sun's light falls into it.",
}


def check(name: str, site: dict) -> None:
    """Run the engine on the regenerated site for its epoch and print where light falls (needs lightpath.light)."""
    from lightpath.light.scan import scan_scene
    from lightpath.scene import load_scene

    result = scan_scene(load_scene(OUT / name / "scene.toml"), [site["epoch_year"]], samples=300)
    year = result.years[0]
    for run in year.divisions:
        if run.first_date:
            print(
                f"    light around {run.name}: {run.first_date} .. {run.last_date} ({year.calendar}), "
                f"{run.days} days, {run.first_offset_days:+.0f} .. {run.last_offset_days:+.0f} days from it"
            )


def main(argv: list[str] | None = None) -> None:
    argv = sys.argv[1:] if argv is None else argv
    for name, site in SITES.items():
        folder = OUT / name
        folder.mkdir(parents=True, exist_ok=True)
        a = aim(site)
        model = demo_chamber(name, round(a["azimuth_deg"], 2))
        mesh_name = f"{name}.obj"
        export_obj(model, folder / mesh_name, header=f"{site['title']} (invented demo site)")
        az = np.arange(0.0, 360.0, HORIZON_STEP_DEG)
        write_horizon_csv(
            folder / "horizon.csv",
            HorizonProfile(az, np.round(site["horizon"](az), 3)),
            comment=f"{site['title']} (invented): apparent skyline altitude, degrees",
        )
        year = site["epoch_year"]
        epoch_text = f"{1 - year} BC" if year <= 0 else f"AD {year}"
        fields = dict(
            site,
            **a,
            mesh=mesh_name,
            opening=model.opening_parts[0],
            epoch_text=epoch_text,
            temperature_c=5.0 if name == "passage" else 20.0,
            epoch_sigma=100.0 if year < 0 else 0.0,
            story=STORIES[name],
            parts=", ".join(model.parts),
            step=HORIZON_STEP_DEG,
            lit=lit_fraction(model, a["azimuth_deg"], a["apparent_altitude_deg"]),
        )
        (folder / "scene.toml").write_text(SCENE.format(**fields))
        (folder / "README.md").write_text(README.format(**fields))
        for p in folder.iterdir():
            p.chmod(0o644)  # package data: readable by everyone (atomic writes create 0600 files)
        size = sum(p.stat().st_size for p in folder.iterdir())
        print(f"{name}: azimuth {a['azimuth_deg']:.2f} deg, lit {fields['lit']:.0%}, {size / 1e3:.0f} kB")
        if "--check" in argv:
            check(name, site)


if __name__ == "__main__":
    main()
