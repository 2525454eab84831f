"""A small hand-built scan result that the presentation tests draw, tabulate and write.

This is a test fixture, not data shown to users: an invented site at 53.1° N 7.4° W
lit for a few minutes after dawn on seven days around the December solstice of 2026 (the first
division of the year 2027: year Y's divisions run from the December solstice of Y − 1), plus one event
in 3200 BC (Julian calendar) so ancient dates are exercised too.  Days are local apparent day numbers
(integer Julian day numbers).
"""

from __future__ import annotations

import numpy as np

from lightpath.light.results import DivisionLight, LightEvent, LightMap, ScanResult, ScanSettings, YearScan
from lightpath.sky.calendar import julian_day

LONGITUDE_DEG = -7.4
LATITUDE_DEG = 53.1
TARGET_AREA_M2 = 0.5
TIMEZONE = "Europe/Dublin"
LIT_DAYS = list(range(18, 25))  # December 18..24, 2026
START_MIN, END_MIN = 530, 547  # local apparent time 08:50 .. 09:07


def _lat_to_ut(day_jd_0h: float, minutes: float) -> float:
    """Local apparent time → UT ignoring the equation of time (good enough for a fixture)."""
    return day_jd_0h + minutes / 1440.0 - LONGITUDE_DEG / 360.0


def day_number(year: int, month: int, day: int, calendar: str = "gregorian") -> int:
    """The Julian day number (noon) of a calendar date."""
    return int(julian_day(year, month, day, calendar) + 0.5)


SOLSTICE_DAY = day_number(2026, 12, 21)


def make_events() -> list[LightEvent]:
    events = []
    for d in LIT_DAYS:
        jd0 = float(julian_day(2026, 12, d, "gregorian"))
        start, end = _lat_to_ut(jd0, START_MIN), _lat_to_ut(jd0, END_MIN)
        events.append(
            LightEvent(
                day=day_number(2026, 12, d),
                calendar="gregorian",
                start_jd_ut=start,
                end_jd_ut=end,
                peak_jd_ut=(start + end) / 2,
                start_local_apparent_h=START_MIN / 60.0,
                end_local_apparent_h=END_MIN / 60.0,
                peak_local_apparent_h=(START_MIN + END_MIN) / 120.0,
                duration_min=17.0,
                peak_area_m2=0.2 - 0.02 * abs(d - 21),
                peak_fraction=(0.2 - 0.02 * abs(d - 21)) / TARGET_AREA_M2,
                sun_azimuth_deg=133.5,
                sun_altitude_deg=0.9,
                division="december_solstice",
                division_day=SOLSTICE_DAY,
                offset_days=d - 21,
                delta_t_s=70.0,
                delta_t_sigma_s=2.0,
            )
        )
    return events


#: Rows of the fixture's light map: local apparent days from 2026-12-11 to 2027-12-20.
MAP_FIRST_DAY, MAP_LAST_DAY = day_number(2026, 12, 11), day_number(2027, 12, 20)


def make_light_map() -> LightMap:
    days = np.arange(MAP_FIRST_DAY, MAP_LAST_DAY + 1)
    day_jd_ut = days - 0.5 - LONGITUDE_DEG / 360.0  # UT at local (mean ≈ apparent) midnight
    minutes = np.arange(0.0, 1440.0, 5.0)
    area = np.zeros((days.size, minutes.size))
    in_time = (minutes >= START_MIN) & (minutes <= END_MIN)
    for d in LIT_DAYS:
        area[day_number(2026, 12, d) - MAP_FIRST_DAY, in_time] = 0.2 - 0.02 * abs(d - 21)
    return LightMap(day_jd_ut=day_jd_ut, minutes=minutes, area_m2=area)


def make_divisions() -> list[DivisionLight]:
    names = ["december_solstice", "march_equinox", "june_solstice", "september_equinox"]
    dates = [(2026, 12, 21), (2027, 3, 20), (2027, 6, 21), (2027, 9, 23)]
    out = []
    for i, (name, (y, m, d)) in enumerate(zip(names, dates, strict=True)):
        lit = name == "december_solstice"
        day = day_number(y, m, d)
        out.append(
            DivisionLight(
                scheme="solar",
                index=i,
                name=name,
                jd_tt=float(julian_day(y, m, d + 0.65, "gregorian")),
                day=day,
                calendar="gregorian",
                first_day=day - 3 if lit else None,
                last_day=day + 3 if lit else None,
                days=7 if lit else 0,
                first_offset_days=-3 if lit else None,
                last_offset_days=3 if lit else None,
                nearest_offset_days=0 if lit else None,
            )
        )
    return out


def make_ancient_year() -> YearScan:
    jd0 = float(julian_day(-3200, 12, 24, "julian"))
    start, end = _lat_to_ut(jd0, 535), _lat_to_ut(jd0, 549)
    day = day_number(-3200, 12, 24, "julian")
    solstice = day + 1
    event = LightEvent(
        day=day, calendar="julian", start_jd_ut=start, end_jd_ut=end, peak_jd_ut=(start + end) / 2,
        start_local_apparent_h=535 / 60, end_local_apparent_h=549 / 60, peak_local_apparent_h=542 / 60,
        duration_min=14.0, peak_area_m2=0.15, peak_fraction=0.3, sun_azimuth_deg=134.9, sun_altitude_deg=0.8,
        division="december_solstice", division_day=solstice, offset_days=-1, delta_t_s=79000.0,
        delta_t_sigma_s=6700.0, ut_date_uncertain=True,
    )  # fmt: skip
    division = DivisionLight(
        "solar", 0, "december_solstice", float(jd0 + 1.4), solstice, "julian", solstice - 4, solstice + 4, 9, -4, 4,
        -1,
    )  # fmt: skip
    return YearScan(-3199, "julian", "VSOP87D (test)", [event], [division])


def make_scan(with_ancient: bool = False) -> ScanResult:
    settings = ScanSettings(
        criterion="first-gleam", scheme="solar", parts=4, samples=400, seed=7, resolution_deg=0.25,
        refraction="bennett1982", source="JPL DE421 (skyfield)",
    )  # fmt: skip
    years = [YearScan(2027, "gregorian", "JPL DE421 (skyfield)", make_events(), make_divisions(), make_light_map())]
    if with_ancient:
        years.insert(0, make_ancient_year())
    return ScanResult(scene="Invented test chamber", settings=settings, target_area_m2=TARGET_AREA_M2, years=years)


def test_fixture_events_sit_inside_the_light_map():
    scan = make_scan()
    lmap = scan.years[0].light_map
    lit_rows = np.nonzero(lmap.area_m2.max(axis=1) > 0)[0]
    assert lit_rows.size == len(scan.years[0].events) == 7
