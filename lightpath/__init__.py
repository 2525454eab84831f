"""lightpath: when sunlight enters an opening and reaches a chosen surface inside.

A small public API for notebooks; the command line is a thin layer over it.

>>> import lightpath
>>> obs = lightpath.Observer(latitude_deg=38.947, longitude_deg=-98.412)
>>> jd = lightpath.julian_day(2027, 6, 21.5 + 6.5 / 24)  # 18:30 UT, near local noon at 98.4° W
>>> sun = lightpath.sun_position(jd, obs)
>>> bool(sun.altitude_deg > 70)
True

Names are imported on first use, so ``import lightpath`` stays quick.
"""

from __future__ import annotations

import importlib
from typing import Any

__version__ = "0.1.0"

# name -> module that defines it (layers: sky, site, scene, light, study, present).
_EXPORTS = {
    # sky: time, calendars, the Sun, the year
    "InputError": "lightpath.errors",
    "Observer": "lightpath.sky.observer",
    "julian_day": "lightpath.sky.calendar",
    "calendar_date": "lightpath.sky.calendar",
    "format_date": "lightpath.sky.calendar",
    "date_label": "lightpath.sky.calendar",
    "parse_instant": "lightpath.sky.instants",
    "to_jd_tt": "lightpath.sky.moments",
    "to_jd_ut": "lightpath.sky.moments",
    "to_year": "lightpath.sky.moments",
    "to_frame": "lightpath.sky.tables",
    "SunPosition": "lightpath.sky.sun",
    "MoonPosition": "lightpath.sky.moon",
    "Division": "lightpath.sky.divisions",
    "year_structure": "lightpath.sky.year_structure",
    "YearStructure": "lightpath.sky.year_structure",
    "QuarterDay": "lightpath.sky.year_structure",
    "resolve_instant": "lightpath.sky.instants",
    "delta_t_s": "lightpath.sky.deltat",
    "delta_t_sigma_s": "lightpath.sky.deltat",
    "sun_position": "lightpath.sky.sun",
    "geocentric_sun": "lightpath.sky.sun",
    "enu_from_azalt": "lightpath.sky.sun",
    "azalt_from_enu": "lightpath.sky.sun",
    "refraction_bennett1982": "lightpath.sky.refraction",
    "refraction_saemundsson1986": "lightpath.sky.refraction",
    "quarter_days": "lightpath.sky.seasons",
    "season_lengths": "lightpath.sky.seasons",
    "half_years": "lightpath.sky.seasons",
    "divisions": "lightpath.sky.divisions",
    "rise_set_azimuths": "lightpath.sky.riseset",
    "HorizonProfile": "lightpath.sky.horizon",
    "flat_horizon": "lightpath.sky.horizon",
    "read_horizon_csv": "lightpath.sky.horizon",
    # site: chambers and target samples (geometry)
    "sample_target": "lightpath.site",
    "passage_chamber": "lightpath.site",
    "slit_shrine": "lightpath.site",
    "window_room": "lightpath.site",
    # scene: scene files (site geometry + observer, horizon, air)
    "Scene": "lightpath.scene",
    "load_scene": "lightpath.scene",
    "scene_from_model": "lightpath.scene",
    "demo_scene_path": "lightpath.scene",
    "DEMO_SITES": "lightpath.scene",
    "standard_pressure_mbar": "lightpath.scene",
    # light: the engine
    "prepare_window": "lightpath.light.scan",
    "scan_scene": "lightpath.light.scan",
    "scan_window": "lightpath.light.scan",
    "scan_year": "lightpath.light.scan",
    "ScanOptions": "lightpath.light.options",
    "WindowOptions": "lightpath.light.options",
    "Conditions": "lightpath.light.options",
    "year_sky": "lightpath.light.year",
    "year_light": "lightpath.light.year",
    "SunTrack": "lightpath.light.track",
    "LightEvent": "lightpath.light.results",
    "DivisionLight": "lightpath.light.results",
    "ScanResult": "lightpath.light.results",
    "YearScan": "lightpath.light.results",
    "ScanSettings": "lightpath.light.results",
    "LightDays": "lightpath.study.light_days",
    # study: claims and visits
    "framing_test": "lightpath.study.framing",
    "FramingResult": "lightpath.study.framing",
    "DivisionFraming": "lightpath.study.framing",
    "LunarFraming": "lightpath.study.lunar_framing",
    "alignment_epochs": "lightpath.study.epochs",
    "EpochsResult": "lightpath.study.epochs",
    "EpochRow": "lightpath.study.epochs",
    "visit_scene": "lightpath.study.visit",
    "VisitPlan": "lightpath.study.visit",
    "VisitEvent": "lightpath.study.visit",
    # present: reports
    "make_report": "lightpath.present.scene_report",
}

__all__ = ["__version__", *_EXPORTS]


def __getattr__(name: str) -> Any:
    module = _EXPORTS.get(name)
    if module is None:
        raise AttributeError(f"module 'lightpath' has no attribute {name!r}")
    value = getattr(importlib.import_module(module), name)
    globals()[name] = value
    return value


def __dir__() -> list[str]:
    return sorted(__all__)
