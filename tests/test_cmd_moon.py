"""``lightpath moon``: JSON shape, text output and one-line errors for bad input."""

import json

import pytest

from lightpath.cli import main

SITE = "55.0,-7.0,60"


def test_json_lists_the_2024_2025_major_standstill(capsys):
    assert main(["moon", "--site", SITE, "--from", "2020", "--to", "2030", "--json"]) == 0
    doc = json.loads(capsys.readouterr().out)
    assert doc["span"] == {"from_year": 2020, "to_year": 2030} and doc["horizon"].startswith("flat")
    kinds = [(r["kind"], r["direction"]) for r in doc["seasons"]]
    assert kinds == [("major", "north"), ("major", "south")]
    north, south = doc["seasons"]
    assert 28.5 < north["extreme_declination_deg"] < 28.9 and -28.9 < south["extreme_declination_deg"] < -28.5
    assert north["extreme"]["date"].startswith("2025") and north["extreme"]["calendar"] == "gregorian"
    assert 0.0 < north["moonrise_azimuth_deg"] < 90.0 < south["moonrise_azimuth_deg"] < 180.0
    assert north["moonset_azimuth_deg"] > 270.0
    for key in ("delta_t_s", "delta_t_sigma_s", "moon_shift_deg", "season_start", "season_end", "months", "source"):
        assert key in north
    assert "TT only" in doc["delta_t_effect"]


def test_text_output_names_calendar_and_delta_t(capsys):
    assert main(["moon", "--site", SITE, "--from", "2600 BC", "--to", "2580 BC"]) == 0
    out = capsys.readouterr().out
    assert "major north" in out and "minor south" in out
    assert "julian calendar" in out and "ΔT" in out and "ELP/MPP02" in out


def test_horizon_profile(tmp_path, capsys):
    skyline = tmp_path / "skyline.csv"
    skyline.write_text("azimuth_deg,altitude_deg\n" + "".join(f"{az},2\n" for az in range(0, 360, 20)))
    assert main(["moon", "--site", SITE, "--from", "2024", "--to", "2025", "--horizon", str(skyline), "--json"]) == 0
    raised = json.loads(capsys.readouterr().out)
    assert main(["moon", "--site", SITE, "--from", "2024", "--to", "2025", "--json"]) == 0
    flat = json.loads(capsys.readouterr().out)
    # a higher skyline: the northern moonrise moves further from north, the southern one closer to south
    assert raised["seasons"][0]["moonrise_azimuth_deg"] > flat["seasons"][0]["moonrise_azimuth_deg"]
    assert raised["seasons"][1]["moonrise_azimuth_deg"] > flat["seasons"][1]["moonrise_azimuth_deg"]


@pytest.mark.parametrize(
    ("args", "words"),
    [
        (["--from", "2000", "--to", "2700"], "--to: the span 2000..2700 is longer than 600 years"),
        (["--from", "3100 BC", "--to", "3000 BC"], "--from: year -3099 is outside"),
        (["--from", "2050", "--to", "2040"], "--to: year 2040 is before --from 2050"),
        (["--from", "soon", "--to", "2040"], "--from"),
    ],
)
def test_bad_input_is_one_line_and_exit_2(capsys, args, words):
    assert main(["moon", "--site", SITE, *args]) == 2
    err = capsys.readouterr().err.strip()
    assert words in err and "\n" not in err
