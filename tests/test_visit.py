"""The visit planner: refraction cases, event matching, sunrise/sunset, civil clock times, calendar files."""

from __future__ import annotations

import dataclasses
import datetime as dt

import icalendar
import numpy as np
import pytest
import skyfield_data
from skyfield import almanac
from skyfield.api import Loader, wgs84

from lightpath.errors import InputError
from lightpath.light.results import LightEvent, ScanResult, ScanSettings, YearScan
from lightpath.present.civil import jd_from_local_date
from lightpath.present.ics import calendar_text
from lightpath.present.visits import visit_entries, visit_rows, visit_text
from lightpath.sky.observer import Observer
from lightpath.sky.refraction import refraction_bennett1982
from lightpath.study.visit import (
    local_day_start,
    match_events,
    observer_with_refraction_scaled,
    plan_visit,
    sunrise_sunset,
)

LOAD = Loader(skyfield_data.get_skyfield_data_path())
TS = LOAD.timescale(builtin=True)
EPH = LOAD("de421.bsp")
SITE = Observer(53.1, -7.4, 40.0, timezone="Europe/Dublin")  # an invented site in Ireland


def _skyfield_sun(jd_ut, observer):
    """Skyfield (DE421) topocentric azimuth, unrefracted altitude and semidiameter (959.63″ / distance) of the Sun."""
    where = EPH["earth"] + wgs84.latlon(observer.latitude_deg, observer.longitude_deg, elevation_m=observer.elevation_m)
    app = where.at(TS.ut1_jd(np.asarray(jd_ut))).observe(EPH["sun"]).apparent()
    alt, az, dist = app.altaz()
    return az.degrees, alt.degrees, 959.63 / 3600.0 / dist.au


@pytest.mark.parametrize("factor", [0.7, 1.0, 1.3])
def test_scaled_air_scales_refraction(factor):
    scaled = observer_with_refraction_scaled(SITE, factor)
    base = refraction_bennett1982(0.0, SITE.pressure_mbar, SITE.temperature_c)
    assert refraction_bennett1982(0.0, scaled.pressure_mbar, scaled.temperature_c) == pytest.approx(factor * base)
    assert scaled.pressure_mbar <= 1100.0 and scaled.latitude_deg == SITE.latitude_deg


def test_sunrise_sunset_against_skyfield_almanac():
    # Source: skyfield almanac.find_risings/find_settings with JPL DE421, told that the Sun's centre stands at the
    # geometric altitude where the upper limb is at apparent altitude 0: −R(0) (Bennett 1982, site's air) − s.
    from lightpath.sky.refraction import geometric_altitude

    days = [dt.date(2027, 2, 1), dt.date(2027, 6, 21), dt.date(2027, 12, 21)]
    starts = np.array([jd_from_local_date(d, "UTC") for d in days])
    rises, sets = sunrise_sunset(starts, SITE, lambda jd: _skyfield_sun(jd, SITE))
    where = EPH["earth"] + wgs84.latlon(SITE.latitude_deg, SITE.longitude_deg, elevation_m=SITE.elevation_m)
    r0 = float(geometric_altitude(0.0, "bennett1982", SITE.pressure_mbar, SITE.temperature_c))
    for k, start in enumerate(starts):
        t0, t1 = TS.ut1_jd(start), TS.ut1_jd(start + 1)
        semi = float(_skyfield_sun(start + 0.5, SITE)[2])
        r, _ = almanac.find_risings(where, EPH["sun"], t0, t1, horizon_degrees=r0 - semi)
        s, _ = almanac.find_settings(where, EPH["sun"], t0, t1, horizon_degrees=r0 - semi)
        assert rises[k] == pytest.approx(r.ut1[0], abs=2 / 86400)  # 2 s (the semidiameter is held for the day)
        assert sets[k] == pytest.approx(s.ut1[0], abs=2 / 86400)


def test_no_sunrise_in_the_polar_night():
    arctic = Observer(78.2, 15.6, 0.0)  # midwinter at Svalbard's latitude
    rises, sets = sunrise_sunset(np.array([jd_from_local_date(dt.date(2027, 12, 21), "UTC")]), arctic,
                                 lambda jd: _skyfield_sun(jd, arctic))  # fmt: skip
    assert np.isnan(rises[0]) and np.isnan(sets[0])


def test_local_day_start_contains_the_instant():
    jd = np.array([2461437.3, 2461437.9, 2461438.49])
    start = local_day_start(jd, SITE.longitude_deg)
    assert np.all((start <= jd) & (jd < start + 1))


def _event(start_jd: float, minutes: float = 15.0) -> LightEvent:
    """An invented event starting at ``start_jd`` (UT); its day and local apparent times are rough (Greenwich)."""
    end = start_jd + minutes / 1440
    day = int(np.floor(start_jd + 0.5))
    lat_h = (start_jd + 0.5 - day) * 24.0
    return LightEvent(day, "gregorian", start_jd, end, (start_jd + end) / 2, lat_h, lat_h + minutes / 60,
                      lat_h + minutes / 120, minutes, 0.1, 0.2, 130.0, 1.0, "march_equinox", day - 3, 3, 69.0,
                      0.1)  # fmt: skip


def test_match_events_prefers_overlap():
    ref = _event(2461437.87)
    near = _event(2461437.87 + 3 / 1440)
    other_day = _event(2461438.87)
    assert match_events(ref, [other_day, near]) is near
    assert match_events(ref, [other_day]) is None


@dataclasses.dataclass(frozen=True)
class _FakeScene:
    observer: Observer
    label: str = "Invented chamber"


def _stub_scan(calls):
    """A stand-in engine for the planner's bookkeeping: light starts later when refraction is weaker.

    (Rising Sun, light through a notch: more refraction lifts the Sun sooner.) Not a model of any site.
    """

    def scan(scene, years, **options):
        calls.append((scene.observer, tuple(years), options))
        air = (scene.observer.pressure_mbar / 1010.0) * (283.0 / (273.0 + scene.observer.temperature_c))
        events = []
        for day in (0, 1, 2, 40):
            jd0 = jd_from_local_date(dt.date(2027, 3, 27) + dt.timedelta(days=day), "UTC")
            start = jd0 + (7.0 / 24) + (1.0 - air) * 4 / 1440  # 4 min later per unit of missing refraction
            if day == 2 and air < 0.9:
                continue  # a marginal event: gone with weak refraction
            events.append(_event(start))
        settings = ScanSettings("first-gleam", "solar", 8, 100, 1, 0.25, scene.observer.refraction, "test engine")
        return ScanResult(scene.label, settings, 1.0, [YearScan(2027, "gregorian", "test", events, [])])

    return scan


def test_plan_visit_runs_three_refraction_cases_and_keeps_the_span():
    calls = []
    first = jd_from_local_date(dt.date(2027, 3, 27), "Europe/Dublin")
    last = jd_from_local_date(dt.date(2027, 3, 30), "Europe/Dublin")
    plan = plan_visit(_FakeScene(SITE), first, last, scan=_stub_scan(calls), sun_fn=_skyfield_sun,
                      samples=100)  # fmt: skip
    # year 2028's divisions begin at the December solstice of 2027, so the planner scans one year more
    assert len(calls) == 3 and all(c[1] == (2027, 2028) and c[2] == {"samples": 100} for c in calls)
    factors = [(o.pressure_mbar / 1010.0) * (283.0 / (273.0 + o.temperature_c)) for o, _, _ in calls]
    r0 = float(refraction_bennett1982(0.0, SITE.pressure_mbar, SITE.temperature_c))
    base = factors[0]
    assert factors[1] / base == pytest.approx(1 - 0.18 / r0) and factors[2] / base == pytest.approx(1 + 0.18 / r0)
    assert len(plan.events) == 3  # day 40 is outside the span
    spread = plan.events[0].start_spread_min
    assert spread == pytest.approx(4 * 2 * 0.18 / r0 * base, rel=1e-6)
    assert [v.cases_with_light for v in plan.events] == [3, 3, 2]
    assert any("marginal" in n for n in plan.notes)


def test_visit_rows_follow_daylight_saving():
    # Dublin moves to summer time on 2027-03-28 at 01:00 UTC (IANA tz database via zoneinfo): the light that
    # starts near 07:00 UTC shows at 07:0x on the 27th and at 08:0x from the 28th on.
    first = jd_from_local_date(dt.date(2027, 3, 27), "Europe/Dublin")
    last = jd_from_local_date(dt.date(2027, 3, 30), "Europe/Dublin")
    plan = plan_visit(_FakeScene(SITE), first, last, scan=_stub_scan([]), sun_fn=_skyfield_sun)
    rows = visit_rows(plan)
    assert [r["date"] for r in rows] == ["2027-03-27", "2027-03-28", "2027-03-29"]
    assert [r["utc_offset"] for r in rows] == ["+00:00", "+01:00", "+01:00"]
    assert rows[0]["start"].startswith("07:") and rows[1]["start"].startswith("08:")
    assert rows[0]["earliest_start"] <= rows[0]["start"] <= rows[0]["latest_start"]
    assert rows[0]["sunrise"] < rows[0]["start"] < rows[0]["sunset"]
    # the division of the event's light run and the event's own offset, as the engine gave them (numbers)
    assert rows[0]["division"] == "march_equinox" and rows[0]["offset_days"] == 3
    assert rows[0]["local_apparent_date"] == "2027-03-27"
    text = visit_text(plan)
    assert "Europe/Dublin" in text and "Never look at the Sun" in text


def test_visit_calendar_round_trips():
    first = jd_from_local_date(dt.date(2027, 3, 27), "Europe/Dublin")
    last = jd_from_local_date(dt.date(2027, 3, 30), "Europe/Dublin")
    plan = plan_visit(_FakeScene(SITE), first, last, scan=_stub_scan([]), sun_fn=_skyfield_sun)
    text = calendar_text(visit_entries(plan), dtstamp=dt.datetime(2027, 1, 1, tzinfo=dt.UTC))
    events = list(icalendar.Calendar.from_ical(text).walk("VEVENT"))
    assert len(events) == 3
    starts = [e.decoded("DTSTART") for e in events]
    expected = [dt.datetime.fromtimestamp(round((v.earliest_start_jd_ut - 2440587.5) * 86400), dt.UTC)
                for v in plan.events]  # fmt: skip
    assert starts == expected
    assert all("Never look at the Sun" in str(e["DESCRIPTION"]) for e in events)
    # Same plan again: same UIDs (calendar programs update instead of duplicating).
    again = calendar_text(visit_entries(plan), dtstamp=dt.datetime(2027, 2, 1, tzinfo=dt.UTC))
    uids = [str(e["UID"]) for e in events]
    assert uids == [str(e["UID"]) for e in icalendar.Calendar.from_ical(again).walk("VEVENT")]


def test_bad_spans_are_refused():
    with pytest.raises(InputError, match="end must come after"):
        plan_visit(_FakeScene(SITE), 2461440.0, 2461430.0, scan=_stub_scan([]), sun_fn=_skyfield_sun)
    no_refraction = dataclasses.replace(SITE, refraction=None)
    plan = plan_visit(_FakeScene(no_refraction), 2461490.0, 2461500.0, scan=_stub_scan([]),
                      sun_fn=_skyfield_sun)  # fmt: skip
    assert plan.refraction_cases == ["as given"]


def test_sunrise_from_our_sun_matches_skyfield_with_the_same_horizon():
    """Our Sun (lightpath.sky.sun, DE421) + Bennett refraction against skyfield's almanac (DE421) told to use the
    same geometric altitude of the centre at sunrise: the upper limb at apparent 0°, −R(0) − s."""
    from lightpath.sky.refraction import geometric_altitude

    r0 = float(geometric_altitude(0.0, "bennett1982", SITE.pressure_mbar, SITE.temperature_c))
    days = [dt.date(2027, 3, 20), dt.date(2027, 12, 21)]
    starts = np.array([jd_from_local_date(d, "UTC") for d in days])
    rises, sets = sunrise_sunset(starts, SITE, source="jpl")
    where = EPH["earth"] + wgs84.latlon(SITE.latitude_deg, SITE.longitude_deg, elevation_m=SITE.elevation_m)
    for k, start in enumerate(starts):
        t0, t1 = TS.ut1_jd(start), TS.ut1_jd(start + 1)
        horizon = r0 - float(_skyfield_sun(start + 0.5, SITE)[2])
        r, _ = almanac.find_risings(where, EPH["sun"], t0, t1, horizon_degrees=horizon)
        s, _ = almanac.find_settings(where, EPH["sun"], t0, t1, horizon_degrees=horizon)
        # measured ≤ 0.05 s at latitudes 0, 53 and 65 over 2027 (docs/accuracy.md)
        assert rises[k] == pytest.approx(r.ut1[0], abs=1 / 86400)
        assert sets[k] == pytest.approx(s.ut1[0], abs=1 / 86400)
