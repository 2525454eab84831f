"""``lightpath sun``: output keys, runs, outside checks and bad input (exit code 2, one line, no traceback)."""

import json
import subprocess
import sys

import numpy as np
import pytest

from lightpath.cli import main
from lightpath.sky.calendar import julian_day

SITE = "52.9137,-8.6612,60"  # invented site in the Irish midlands


def _json(capsys, argv):
    code = main(argv)
    captured = capsys.readouterr()
    assert code == 0, captured.err
    return json.loads(captured.out)


KEYS = {
    "jd_tt",
    "jd_ut",
    "delta_t_s",
    "delta_t_sigma_s",
    "azimuth_deg",
    "altitude_deg",
    "altitude_geometric_deg",
    "declination_deg",
    "equation_of_time_min",
    "local_apparent_time",
    "date",
    "calendar",
    "source",
    "ut_date_uncertain",
}


def test_single_instant_json_keys(capsys):
    row = _json(capsys, ["sun", "--site", SITE, "--at", "2027-02-03T07:40", "--json"])
    assert KEYS <= set(row)
    assert row["date"] == "2027-02-03" and row["calendar"] == "gregorian"
    assert row["jd_ut"] == pytest.approx(julian_day(2027, 2, 3 + (7 + 40 / 60) / 24), abs=1e-8)
    assert (row["jd_tt"] - row["jd_ut"]) * 86400 == pytest.approx(row["delta_t_s"], abs=1e-3)
    assert row["ut_date_uncertain"] is False
    assert isinstance(row["source"], str) and row["source"]


def test_nrel_spa_example_through_the_command(capsys):
    # Reda & Andreas (2004), NREL/TP-560-34302, worked example (from memory): 2003-10-17 12:30:30 local time
    # at UTC-7, 39.742476 N, 105.1786 W, 1830.14 m, 820 mbar, 11 °C, ΔT 67 s -> topocentric zenith 50.11162°,
    # azimuth 194.34024°.  SPA states ±0.0003° for its own algorithm; our Sun and refraction (Bennett 1982,
    # SPA uses a Sæmundsson-type formula) differ at the 0.001° level, so 0.002° here.
    row = _json(
        capsys,
        [
            "sun",
            "--site",
            "39.742476,-105.1786,1830.14",
            "--at",
            "2003-10-17T12:30:30-07:00",
            "--pressure",
            "820",
            "--temperature",
            "11",
            "--delta-t",
            "67",
            "--json",
        ],
    )
    assert row["delta_t_s"] == pytest.approx(67.0)
    assert 90.0 - row["altitude_deg"] == pytest.approx(50.11162, abs=0.002)
    assert row["azimuth_deg"] == pytest.approx(194.34024, abs=0.002)


def test_local_apparent_date_far_east(capsys):
    # At 170° E, LAT 08:00 on 3200 BC-06-21 is about 20:40 UT on the day before (UT = LAT - 170°/15° - EoT).
    row = _json(capsys, ["sun", "--site=-40,170", "--at", "3200 BC-06-21T08:00 LAT", "--json"])
    assert row["local_apparent_date"] == "-3199-06-21"
    assert row["date"] == "-3199-06-20"
    assert row["local_apparent_time"] == "08:00:00"


def test_run_with_to_and_step(capsys):
    rows = _json(
        capsys,
        ["sun", "--site", SITE, "--at", "2027-02-03T06:00", "--to", "2027-02-03T08:00", "--step", "30", "--json"],
    )
    assert [r["ut"] for r in rows] == [
        "2027-02-03T06:00:00",
        "2027-02-03T06:30:00",
        "2027-02-03T07:00:00",
        "2027-02-03T07:30:00",
        "2027-02-03T08:00:00",
    ]
    # The Sun climbs in the morning.
    assert np.all(np.diff([r["altitude_geometric_deg"] for r in rows]) > 0)


def test_long_run_ends_on_the_last_minute(capsys):
    # ΔT drifts by tens of milliseconds over a year; the count of steps is taken in UT, as written.
    rows = _json(
        capsys, ["sun", "--site", SITE, "--at", "2027-01-01", "--to", "2027-12-31T23:00", "--step", "60", "--json"]
    )
    assert len(rows) == 365 * 24
    assert rows[-1]["ut"] == "2027-12-31T23:00:00"


def test_lat_instant_is_apparent_noon(capsys):
    # LAT 12:00 = the Sun on the local meridian: hour angle 0, azimuth 180° north of the tropics.
    row = _json(capsys, ["sun", "--site", SITE, "--at", "2027-02-03T12:00 LAT", "--json"])
    assert row["local_apparent_time"] == "12:00:00"
    assert row["hour_angle_deg"] == pytest.approx(0.0, abs=1e-5)
    assert row["azimuth_deg"] == pytest.approx(180.0, abs=1e-4)
    # Meeus (1998) ch. 28: the equation of time is about -13.7 min in early February (from memory);
    # apparent noon at 8.6612° W then comes at about 12:00 + 25.9 min + 13.7 min UT.
    assert row["equation_of_time_min"] == pytest.approx(-13.7, abs=0.5)
    ut_h = (row["jd_ut"] + 0.5) % 1 * 24
    assert ut_h == pytest.approx(12 + 8.6612 / 15 - row["equation_of_time_min"] / 60, abs=1e-4)


def test_ancient_lat_run_and_uncertain_date(capsys):
    rows = _json(
        capsys,
        ["sun", "--site", SITE, "--at", "3200 BC-12-21T08:00 LAT", "--to", "3200 BC-12-21T10:00 LAT", "--json"],
    )
    assert [r["local_apparent_time"] for r in rows] == ["08:00:00", "09:00:00", "10:00:00"]
    assert all(r["calendar"] == "julian" for r in rows)
    # 08:00-10:00 LAT at 8.66° W is about 08:30-10:30 UT: 2σ of ΔT (≈ 67 min) cannot reach a UT midnight
    assert not any(r["ut_date_uncertain"] for r in rows)
    late = _json(capsys, ["sun", "--site", SITE, "--at", "3200 BC-12-21T23:00 LAT", "--json"])
    assert late["ut_date_uncertain"]  # ≈ 23:30 UT: within 2σ of midnight UT
    assert rows[0]["delta_t_sigma_s"] > 1800  # Morrison & Stephenson (2004), extrapolated: ≈ 0.8 t² s


def test_ancient_december_solstice_declination_is_minus_the_obliquity(capsys):
    # Noon each day across the December solstice of 3200 BC: the lowest declination must be minus the
    # obliquity of date.  Reference: pyerfa ltpecl/ltpequ (Vondrák, Capitaine & Wallace 2011), mean obliquity
    # as the angle between the ecliptic and equator poles.  Tolerance 0.005°: nutation in obliquity
    # (≤ 9.2″, IAU 2000B) plus once-a-day sampling (< 0.001°).
    import erfa

    rows = _json(
        capsys,
        [
            "sun",
            "--site",
            SITE,
            "--at",
            "3200 BC-12-01T12:00 LAT",
            "--to",
            "3199 BC-02-15T12:00 LAT",
            "--step",
            "1440",
            "--json",
        ],
    )
    decl = np.array([r["declination_deg"] for r in rows])
    low = rows[int(decl.argmin())]
    epj = erfa.epj(low["jd_tt"], 0.0)
    obliquity = np.degrees(np.arccos(np.dot(erfa.ltpecl(epj), erfa.ltpequ(epj))))
    assert decl.min() == pytest.approx(-obliquity, abs=0.005)
    # The Julian calendar runs ahead of the seasons by ~1 day per 128 years: the solstice of 3200 BC falls
    # in mid-January 3199 BC (Julian), not near December 21 (our computation; common practice, no source).
    assert low["date"].startswith("-3198-01-")


def test_one_source_for_a_whole_run(monkeypatch):
    # A run that starts before JPL DE421 (from 1899-07-29) and goes on inside it is computed with one source,
    # even when it is split into chunks.
    import lightpath.commands.sun as cmd
    from lightpath.sky.observer import Observer

    monkeypatch.setattr(cmd, "_CHUNK", 2)
    jd = julian_day(np.array([1850, 1900, 1950, 2000]), 1, 1.0)
    rows = cmd.sun_rows(jd, Observer(latitude_deg=50.0, longitude_deg=0.0))
    assert len(rows) == 4 and len({r["source"] for r in rows}) == 1 and "VSOP87" in rows[0]["source"]
    inside = cmd.sun_rows(jd[2:], Observer(latitude_deg=50.0, longitude_deg=0.0))
    assert {r["source"] for r in inside} == {"JPL DE421 via skyfield"}


def test_span_error_writes_nothing_on_stdout(capsys):
    argv = ["sun", "--site", SITE, "--at", "2999-12-01", "--to", "3001-01-01", "--step", "1440", "--json"]
    assert main(argv) == 2
    captured = capsys.readouterr()
    assert captured.out == "" and "3000" in captured.err


def test_table_output(capsys):
    assert main(["sun", "--site", SITE, "--at", "3200 BC-11-03T00:10"]) == 0
    out = capsys.readouterr().out
    assert "azimuth" in out and "-3199-11-03T00:10:00" in out and "julian" in out
    assert "straddles a midnight UT" in out  # 00:10 UT with 2σ ≈ 67 min (Morrison & Stephenson 2004)


def test_delta_t_override(capsys):
    row = _json(capsys, ["sun", "--site", SITE, "--at", "1000 BC-06-21T04:00", "--delta-t", "0", "--json"])
    assert row["jd_tt"] == pytest.approx(row["jd_ut"], abs=1e-9)
    assert row["ut_date_uncertain"] is False


@pytest.mark.parametrize(
    "argv, words",
    [
        (["--site", "95,0", "--at", "2027-02-03"], "latitude: 95"),
        (["--site", "50,200", "--at", "2027-02-03"], "longitude: 200"),
        (["--site", SITE, "--at", "0 BC-06-21"], "no such year"),
        (["--site", SITE, "--at", "2027-04-31"], "April has 30 days"),
        (["--site", SITE, "--at", "2027-13-01"], "month 13"),
        (["--site", SITE, "--at", "12000 BC-06-21"], "-10000"),
        (["--site", SITE, "--at", "3001-06-21"], "3000"),
        (["--site", SITE, "--at", "2027-02-03", "--ephemeris", "/no/such/de440.bsp"], "not found"),
        (["--site", SITE, "--at", "2027-02-03", "--to", "2027-02-01"], "comes before"),
        (["--site", SITE, "--at", "2027-02-03", "--to", "2029-02-03", "--step", "1"], "at most 1,000,000"),
        (["--site", SITE, "--at", "2027-02-03", "--to", "2027-02-04", "--step", "0"], "positive"),
        (["--site", SITE, "--at", "2027-02-03", "--step", "5"], "needs --to"),
        (["--site", SITE, "--at", "2027-02-03", "--pressure", "5000"], "--pressure"),
        (["--site", SITE, "--at", "2027-02-03", "--temperature", "99"], "--temperature"),
        (["--site", SITE, "--at", "2027-02-03", "--delta-t", "nan"], "--delta-t"),
    ],
)
def test_bad_input_exit_2(capsys, argv, words):
    assert main(["sun", *argv]) == 2
    err = capsys.readouterr().err
    assert words in err
    assert err.count("\n") == 1 and "Traceback" not in err


def test_subprocess_bad_date_exit_2():
    proc = subprocess.run(
        [sys.executable, "-m", "lightpath", "sun", "--site", SITE, "--at", "2027-04-31"],
        capture_output=True,
        text=True,
    )
    assert proc.returncode == 2
    assert "April has 30 days" in proc.stderr and "Traceback" not in proc.stderr
    assert proc.stdout == ""
