"""``lightpath scan`` end to end on a demo scene: JSON shape, CSV, exit codes for bad input."""

from __future__ import annotations

import csv
import json

import pytest

from lightpath.cli import main
from lightpath.scene import demo_scene_path

SCENE = str(demo_scene_path("quillfield"))


def _run(capsys, *args):
    try:
        code = main(["scan", SCENE, *args])
    except SystemExit as exc:  # argparse's own usage errors (unknown choices) exit 2 from the parser
        code = exc.code
    out = capsys.readouterr()
    return code, out.out, out.err


def test_json_has_the_issue_keys(capsys, tmp_path):
    code, out, _ = _run(capsys, "--year", "2027", "--samples", "40", "--cache", str(tmp_path), "--json")
    assert code == 0
    data = json.loads(out)
    assert {"scene", "years"} <= set(data)
    year = data["years"][0]
    assert year["year"] == 2027 and year["calendar"] == "gregorian"
    event_keys = {
        "day",
        "start_jd_ut",
        "end_jd_ut",
        "start_local_apparent_h",
        "end_local_apparent_h",
        "duration_min",
        "peak_area_m2",
        "peak_fraction",
        "sun_azimuth_deg",
        "sun_altitude_deg",
        "division",
        "offset_days",
    }
    assert year["events"] and event_keys <= set(year["events"][0])
    assert {"name", "day", "first_day", "last_day", "days"} <= set(year["divisions"][0])
    assert {"date", "start_local_apparent", "start_civil", "division_offset"} <= set(year["event_rows"][0])
    assert data["settings"]["samples"] == 40 and data["settings"]["resolution_deg"] == 0.05
    # the demo room is aimed at the March equinox of AD 2027 (tools/make_demo_models.py)
    march = [d for d in year["division_rows"] if d["name"] == "march_equinox"][0]
    assert march["days_lit"] > 0 and march["first_date"] <= "2027-03-20" <= march["last_date"]
    assert list(tmp_path.glob("window-*.npz")), "the window was not cached"
    e = year["event_rows"][0]
    assert e["start_civil"].endswith(("+01:00", "+02:00", "Z", "+00:00")) or e["start_civil"][-6] in "+-"


def test_years_span_with_negative_years_and_csv(capsys, tmp_path):
    target = tmp_path / "light.csv"
    code, out, _ = _run(
        capsys, "--years", "-1600:-1400:100", "--samples", "30", "--no-cache", "--quiet", "--csv", str(target)
    )
    assert code == 0 and "Year 1601 BC" in out  # --quiet silences progress, never results
    lines = target.read_text().splitlines()
    assert lines[0].startswith("# lightpath scan") and "30 target samples, 0.05° window cells" in lines[0]
    rows = list(csv.DictReader(lines[1:]))
    assert {r["year"] for r in rows} == {"-1600", "-1500", "-1400"}
    assert all(r["calendar"] == "julian" for r in rows)


def test_table_output_names_the_calendar(capsys):
    code, out, _ = _run(capsys, "--year", "1500 BC", "--samples", "30", "--no-cache")
    assert code == 0 and "julian calendar" in out and "1500 BC" in out


@pytest.mark.parametrize(
    "args",
    [
        ("--year", "2026", "--criterion", "some-light"),
        ("--year", "2026", "--scheme", "moons"),
        ("--year", "99999"),
        ("--years", "-3000:-3500:50"),
        ("--years", "2000:2010:0"),
        ("--year", "0 BC"),
        ("--year", "2026", "--parts", "1"),
        ("--year", "2026", "--samples", "0"),
        ("--year", "2026", "--resolution", "5"),
    ],
)
def test_bad_input_exits_2_with_one_line(capsys, args):
    code, out, err = _run(capsys, *args, "--no-cache", "--quiet")
    assert code == 2
    assert err.strip() and len(err.strip().splitlines()) == 1


def test_missing_scene_exits_2(capsys, tmp_path):
    code = main(["scan", str(tmp_path / "none.toml"), "--year", "2026", "--no-cache"])
    assert code == 2
    assert "no such scene file" in capsys.readouterr().err
