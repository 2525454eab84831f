"""``lightpath report`` and ``lightpath visit`` on the command line: real runs and one-line errors (exit 2)."""

from __future__ import annotations

import json

import icalendar
import pytest

from lightpath.cli import main
from lightpath.scene import demo_scene_path

ROOM = str(demo_scene_path("quillfield"))


@pytest.mark.parametrize(
    ("argv", "message"),
    [
        (["report", ROOM, "--year", "year one", "--out", "x"], "--year"),
        (["report", ROOM, "--year", "2027", "--visit-year", "1850", "--out", "x"], "--visit-year: '1850' is outside"),
        (["report", ROOM, "--year", "2027", "--drift", "1:2:3:4", "--out", "x"], "--drift"),
        (
            ["report", ROOM, "--year", "2027", "--resolution", "5", "--out", "x"],
            "--resolution: 5.0 is not a cell size in 0.01..1",
        ),
        (["report", "no-such-scene.toml", "--year", "2027", "--out", "x"], "scene file not found"),
        (["visit", ROOM, "--from", "2027-02-30", "--to", "2027-03-01"], "--from: '2027-02-30' is not a date"),
        (["visit", ROOM, "--from", "2027-03-02", "--to", "2027-03-01"], "--to 2027-03-01 is before --from"),
        (["visit", ROOM, "--from", "2027-03-01", "--to", "2027-03-02", "--timezone", "Mars/Base"], "--timezone"),
        (["visit", ROOM, "--from", "2027-03-01", "--to", "2027-03-02", "--sigma", "3"], "--sigma"),
    ],
)
def test_bad_input_is_one_line_and_exit_2(argv, message, capsys, tmp_path, monkeypatch):
    monkeypatch.chdir(tmp_path)
    assert main([*argv, "--quiet"]) == 2
    err = capsys.readouterr().err
    assert message in err and "Traceback" not in err and len(err.strip().splitlines()) == 1


def test_visit_json_and_calendar_file(tmp_path, capsys):
    ics = tmp_path / "equinox.ics"
    argv = ["visit", ROOM, "--from", "2027-03-10", "--to", "2027-03-31", "--ics", str(ics), "--samples", "60",
            "--json", "--quiet", "--no-cache"]  # fmt: skip
    assert main(argv) == 0
    doc = json.loads(capsys.readouterr().out)
    assert doc["settings"]["samples"] == 60 and doc["settings_line"].startswith("60 target samples, 0.05° ")
    assert doc["timezone"] == "America/Chicago" and doc["refraction_cases"][0] == "as given"
    events = doc["events"]
    assert events, "the reading room is built for light around the March equinox"
    # US Central time moves its clocks forward on 2027-03-14 (IANA tz database via zoneinfo): −06:00 before,
    # −05:00 after; the visit's mornings fall on both sides.
    offsets = {e["date"]: e["utc_offset"] for e in events}
    assert all(v == ("-06:00" if d < "2027-03-14" else "-05:00") for d, v in offsets.items())
    assert set(offsets.values()) == {"-06:00", "-05:00"}
    for e in events:
        assert e["sunrise"] < e["earliest_start"] <= e["start"] <= e["latest_start"] < e["sunset"]
        assert e["earliest_end"] <= e["end"] <= e["latest_end"]
    cal = icalendar.Calendar.from_ical(ics.read_bytes())
    assert len(list(cal.walk("VEVENT"))) == len(events)


def test_report_command_writes_its_files(tmp_path, capsys):
    out = tmp_path / "r"
    argv = ["report", ROOM, "--year", "2027", "--out", str(out), "--samples", "40", "--no-svg", "--json", "--quiet",
            "--no-cache"]  # fmt: skip
    assert main(argv) == 0
    doc = json.loads(capsys.readouterr().out)
    assert doc["settings"]["samples"] == 40 and doc["settings_line"].startswith("40 target samples, 0.05° ")
    assert set(doc["files"]) >= {"report.html", "events.csv", "divisions.csv", "tables.json"}
    assert not any(name.endswith(".svg") for name in doc["files"])
    assert doc["events"] > 0 and doc["visit_events"] is None


@pytest.mark.parametrize("command", ["report", "visit", "demo"])
def test_engine_options_have_the_scan_commands_names_and_defaults(command):
    """report, visit and demo take the engine's settings with the same names and defaults as ``scan``."""
    import argparse
    import importlib

    from lightpath.commands._common import engine_options

    def parsed(name, argv):
        parser = argparse.ArgumentParser()
        importlib.import_module(f"lightpath.commands.{name}").add_arguments(parser)
        return parser.parse_args(argv)

    needs = {"report": [ROOM, "--year", "2027", "--out", "x"], "visit": [ROOM, "--from", "2027-01-01", "--to",
             "2027-01-02"], "demo": []}  # fmt: skip
    scan_w, scan_o = engine_options(parsed("scan", [ROOM, "--year", "2027"]))
    w, o = engine_options(parsed(command, needs[command]))
    assert w == scan_w
    assert (o.criterion, o.source, o.delta_t_s, o.calendar, o.step_min) == (
        scan_o.criterion, scan_o.source, scan_o.delta_t_s, scan_o.calendar, scan_o.step_min,
    )  # fmt: skip
    if command != "demo":  # the demo's sites each have their own divisions
        assert o == scan_o
