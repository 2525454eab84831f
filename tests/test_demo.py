"""``lightpath demo``: runs end to end on a bundled site through the command line, and its files hold up."""

from __future__ import annotations

import json

import icalendar
import lxml.html

from lightpath.cli import main


def test_demo_on_one_site(tmp_path, capsys):
    out = tmp_path / "demo"
    argv = [
        "demo",
        "--out",
        str(out),
        "--sites",
        "quillfield",
        "--samples",
        "60",
        "--visit-year",
        "2028",
        "--quiet",
        "--no-cache",
    ]
    code = main(argv)
    assert code == 0
    printed = capsys.readouterr().out
    assert "Quillfield Reading Room (invented)" in printed and f"All reports: {out / 'index.html'}" in printed
    for name in ("inspect.json", "year.json", "report.html", "events.csv", "divisions.csv", "tables.json",
                 "visit.csv", "visit.ics", "figures/light-calendar.png", "figures/sky-window.svg",
                 "figures/light-patch.png", "figures/epoch-drift.png"):  # fmt: skip
        assert (out / "quillfield" / name).stat().st_size > 0, name
    tables = json.loads((out / "quillfield" / "tables.json").read_text(encoding="utf-8"))
    events = tables["events"]
    # The site's README says it was built for sunrise light at the March equinox of AD 2027.
    assert events and {e["division"] for e in events} >= {"march_equinox"}
    march = [e for e in events if e["division"] == "march_equinox"]
    assert all(abs(e["offset_days"]) < 30 for e in march)
    assert all(e["sun_azimuth_deg"] < 180 for e in march)  # morning light: the Sun is in the east
    # the settings asked for on the command line are the ones the report states (samples and cell size first)
    assert tables["settings"]["samples"] == 60 and tables["settings_line"].startswith("60 target samples, 0.05° ")
    assert (out / "quillfield" / "events.csv").read_text(encoding="utf-8").startswith("# ")
    doc = lxml.html.fromstring((out / "quillfield" / "report.html").read_bytes())
    assert "60 target samples" in doc.xpath('string(//p[@id="settings"])')
    assert len(doc.xpath('//table[@id="event-table"]/tbody/tr')) == len(events)
    assert len(doc.xpath("//img")) == 4
    cal = icalendar.Calendar.from_ical((out / "quillfield" / "visit.ics").read_bytes())
    visit = json.loads(json.dumps(tables["visit"]))
    assert len(list(cal.walk("VEVENT"))) == len(visit) > 0
    index = lxml.html.fromstring((out / "index.html").read_bytes())
    assert index.xpath("//a/@href") == ["quillfield/report.html"]


def test_demo_rejects_an_unknown_site(tmp_path, capsys):
    assert main(["demo", "--out", str(tmp_path), "--sites", "atlantis", "--quiet"]) == 2
    assert "--sites: 'atlantis' is not one of sandwren, larchfold, quillfield" in capsys.readouterr().err
