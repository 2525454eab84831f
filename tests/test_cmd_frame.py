"""``lightpath frame`` and ``lightpath epochs`` on a demo site: JSON, determinism, exit codes, atomic output."""

from __future__ import annotations

import json

import pytest

from lightpath.cli import main
from lightpath.scene import demo_scene_path

ROCK = str(demo_scene_path("sandwren"))
FAST = ["--samples", "16", "--resolution", "0.1", "--workers", "1", "--quiet"]


def _run(capsys, argv):
    code = main(argv)
    out = capsys.readouterr()
    return code, out.out, out.err


def test_frame_json_is_deterministic_and_complete(capsys, tmp_path):
    argv = ["frame", ROCK, "--epoch", "1500 BC±0", "--division", "cross_quarter_feb", "--draws", "6",
            "--null-draws", "6", "--seed", "4", "--json", *FAST]  # fmt: skip
    code, first, _ = _run(capsys, [*argv, "--output", str(tmp_path / "frame.json")])
    assert code == 0
    code, second, _ = _run(capsys, argv)
    assert code == 0 and first == second  # the same seed, the same JSON
    doc = json.loads(first)
    assert json.loads((tmp_path / "frame.json").read_text()) == doc
    assert doc["epoch_year"] == -1499 and doc["epoch_sigma_years"] == 0.0 and doc["seed"] == 4
    assert doc["null_model"]["name"] == "random orientation over the sunrise/sunset arc"
    assert doc["null_model"]["side"] == "sunset"  # the rock window looks west-south-west
    (d,) = doc["divisions"]
    assert d["name"] == "cross_quarter_feb" and d["calendar"] == "julian"
    assert d["observed_nearest_day"] == 0  # the demo is built to frame this division
    assert 1 / 7 - 1e-6 <= d["p_value"] <= 1 and 0 <= d["probability"] <= 1
    assert set(d["first_day_percentiles"]) == {"p5", "p25", "p50", "p75", "p95"}


def test_frame_text_names_the_null_model(capsys):
    code, out, _ = _run(capsys, ["frame", ROCK, "--epoch", "-1499", "--division", "cross_quarter_feb",
                                 "--draws", "3", "--null-draws", "3", *FAST])  # fmt: skip
    assert code == 0
    assert "null model    random orientation over the sunrise/sunset arc" in out
    assert "cross-quarter day (February)" in out and "± 100 years" in out  # the scene's epoch_years


@pytest.mark.parametrize(
    ("extra", "message"),
    [
        (["--epoch", "1500 BX"], "--epoch"),
        (["--epoch", "-1499", "--division", "midwinter"], "--division: 'midwinter'"),
        (["--epoch", "-1499", "--tolerance", "azimuth=1"], "unknown key 'azimuth'"),
        (["--epoch", "-1499", "--tolerance", "opening_azimuth_deg"], "--tolerance"),
        (["--epoch", "-1499", "--within", "61"], "--within"),
        (["--epoch", "-1499", "--workers", "0"], "--workers"),
        (["--epoch", "-1499", "--cluster", "tcp://127.0.0.1:9"], "--cluster"),
    ],
)
def test_frame_bad_input_exits_2(capsys, extra, message):
    code, out, err = _run(capsys, ["frame", ROCK, "--draws", "1", "--null-draws", "1", *FAST, *extra])
    assert code == 2, err
    assert message in err and "Traceback" not in err and len(err.strip().splitlines()) == 1


def test_epochs_json(capsys):
    argv = ["epochs", ROCK, "--division", "cross_quarter_feb", "--from", "2000 BC", "--to", "1000 BC",
            "--step", "500", "--draws", "3", "--json", *FAST]  # fmt: skip
    code, out, _ = _run(capsys, argv)
    assert code == 0
    doc = json.loads(out)
    assert [r["year"] for r in doc["rows"]] == [-1999, -1499, -999]
    row = doc["rows"][1]
    assert row["year"] == -1499 and row["inside"] is True
    assert doc["spans_inside"] and doc["spans_inside"][0]["from_year"] <= -1499 <= doc["spans_inside"][0]["to_year"]
    code, _, err = _run(capsys, ["epochs", ROCK, "--division", "cross_quarter_feb", "--from", "0", "--to", "-10",
                                 *FAST])  # fmt: skip
    assert code == 2 and "--to" in err
