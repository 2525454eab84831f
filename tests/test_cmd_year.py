"""``lightpath year``: JSON shape, CSV output, text output and one-line errors for bad input."""

import csv
import json
import subprocess
import sys

import pytest

from lightpath.cli import main

# The Sun model notes its accuracy before 3000 BC with a warning; these tests ask for such years on purpose.
pytestmark = pytest.mark.filterwarnings("ignore:Sun positions before:UserWarning")

SITE = "52.40,-7.90,60"


def run_json(capsys, *extra):
    assert main(["year", "--site", SITE, "--json", "--quiet", *extra]) == 0
    return json.loads(capsys.readouterr().out)


def test_json_shape(capsys):
    doc = run_json(capsys, "--year", "3200 BC", "--parts", "8")
    assert doc["year"] == -3199 and doc["year_label"] == "3200 BC" and doc["calendar"] == "julian"
    names = [q["name"] for q in doc["quarter_days"]]
    assert names == ["december_solstice", "march_equinox", "june_solstice", "september_equinox", "december_solstice"]
    for q in doc["quarter_days"]:
        assert {"name", "jd_tt", "date"} <= set(q)
    assert set(doc["half_years"]) == {"december_to_june_days", "june_to_december_days"}
    assert abs(sum(doc["half_years"].values()) - sum(doc["seasons_days"].values())) < 1e-9
    assert len(doc["divisions"]) == 32
    keys = {"scheme", "index", "name", "jd_tt", "date", "declination_deg", "sunrise_azimuth_deg", "sunset_azimuth_deg"}
    for d in doc["divisions"]:
        assert keys <= set(d)
        assert 0.0 < d["sunrise_azimuth_deg"] < 180.0 < d["sunset_azimuth_deg"] < 360.0
    # the December solstice of Y − 1 opens both the quarter days and every scheme's divisions
    first = doc["quarter_days"][0]["jd_tt"]
    assert abs(doc["divisions"][0]["jd_tt"] - first) < 1e-9


def test_notes_are_collected_once(capsys):
    assert main(["year", "--site", SITE, "--year", "3200 BC", "--parts", "4", "--json"]) == 0
    captured = capsys.readouterr()
    doc = json.loads(captured.out)
    assert isinstance(doc["notes"], list)
    assert len(doc["notes"]) == len(set(doc["notes"]))
    assert captured.err.count("note:") == len(doc["notes"])


def test_year_forms_agree(capsys):
    a = run_json(capsys, "--year", "3200 BC", "--scheme", "time", "--parts", "4")
    b = run_json(capsys, "--year", "-3199", "--scheme", "time", "--parts", "4")
    assert a == b


def test_calendar_and_scheme_options(capsys):
    doc = run_json(capsys, "--year", "-3199", "--scheme", "days", "--parts", "16", "--calendar", "gregorian")
    assert doc["calendar"] == "gregorian"
    assert {d["part_days"] for d in doc["divisions"]} <= {22.0, 23.0}
    doc = run_json(capsys, "--year", "2027", "--scheme", "longitude", "--parts", "2", "--source", "vsop87")
    assert [d["name"] for d in doc["divisions"]] == ["december_solstice", "june_solstice"]


def test_csv_is_written(tmp_path, capsys):
    out = tmp_path / "div.csv"
    assert main(["year", "--site", SITE, "--year", "2027", "--parts", "4", "--csv", str(out), "--quiet"]) == 0
    text = capsys.readouterr().out
    assert "Quarter days" in text and "Divisions, scheme declination" in text
    rows = list(csv.DictReader(out.open()))
    assert len(rows) == 16 and rows[0]["scheme"] == "longitude" and rows[0]["name"] == "december_solstice"
    assert not list(tmp_path.glob(".*.part"))


def test_horizon_file_changes_azimuths(tmp_path, capsys):
    h = tmp_path / "skyline.csv"
    h.write_text("azimuth_deg,altitude_deg\n" + "".join(f"{a},3.0\n" for a in range(0, 360, 10)))
    flat = run_json(capsys, "--year", "2027", "--scheme", "longitude", "--parts", "4")
    hilly = run_json(capsys, "--year", "2027", "--scheme", "longitude", "--parts", "4", "--horizon", str(h))
    for a, b in zip(flat["divisions"], hilly["divisions"], strict=True):
        assert b["sunrise_azimuth_deg"] > a["sunrise_azimuth_deg"]


@pytest.mark.parametrize(
    "extra,needle",
    [
        (["--year", "2027", "--parts", "1"], "--parts"),
        (["--year", "3001"], "year"),
        (["--year", "0 BC"], "--year"),
        (["--year", "soon"], "--year"),
        (["--year", "2027", "--scheme", "days", "--parts", "400"], "parts"),
    ],
)
def test_bad_input_exit_2(capsys, extra, needle):
    assert main(["year", "--site", SITE, "--quiet", *extra]) == 2
    err = capsys.readouterr().err.strip()
    assert needle in err and "\n" not in err and "Traceback" not in err


@pytest.mark.parametrize(
    "body,needle",
    [
        ("azimuth_deg,altitude_deg\n0,1\n10,abc\n", "not an angle"),
        ("azimuth_deg,altitude_deg\n0,1\n10,1\n20,1\n", "gap"),
        ("azimuth_deg,altitude_deg\n" + "".join(f"{a},95\n" for a in range(0, 360, 10)), "altitude"),
    ],
)
def test_bad_horizon_files_exit_2(tmp_path, capsys, body, needle):
    h = tmp_path / "h.csv"
    h.write_text(body)
    assert main(["year", "--site", SITE, "--year", "2027", "--horizon", str(h), "--quiet"]) == 2
    err = capsys.readouterr().err.strip()
    assert needle in err and "\n" not in err


def test_unknown_scheme_is_exit_2_without_traceback():
    proc = subprocess.run(
        [sys.executable, "-m", "lightpath", "year", "--site", SITE, "--year", "2027", "--scheme", "moon"],
        capture_output=True,
        text=True,
    )
    assert proc.returncode == 2 and "Traceback" not in proc.stderr and "--scheme" in proc.stderr


def test_polar_site_gives_null_azimuths(capsys):
    assert main(["year", "--site", "80,10", "--year", "2027", "--parts", "4", "--scheme", "longitude", "--json"]) == 0
    doc = json.loads(capsys.readouterr().out)
    by = {d["name"]: d for d in doc["divisions"]}
    assert by["june_solstice"]["sunrise_azimuth_deg"] is None  # midnight sun: no rising
    assert by["march_equinox"]["sunrise_azimuth_deg"] is not None
    assert main(["year", "--site", "80,10", "--year", "2027", "--parts", "4", "--scheme", "longitude", "--quiet"]) == 0
    assert "—" in capsys.readouterr().out
