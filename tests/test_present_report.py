"""The HTML report: it parses, lists every event, is self-contained, and is written atomically."""

from __future__ import annotations

import csv
import json
from html.parser import HTMLParser

import lxml.html
import pytest
from test_present_fixture import LONGITUDE_DEG, TARGET_AREA_M2, make_scan

import lightpath.files
from lightpath.present.figures import figure_bytes, light_calendar_figure
from lightpath.present.report import CAUTIONS, ReportFigure, ReportTable, report_html, write_report
from lightpath.present.tables import EVENT_COLUMNS, EVENT_HTML_COLUMNS, event_rows, rows_to_csv


@pytest.fixture(scope="module")
def calendar_figure():
    fig = light_calendar_figure(make_scan().years[0], longitude_deg=LONGITUDE_DEG, target_area_m2=TARGET_AREA_M2)
    return ReportFigure("light-calendar", "When light reaches the target", figure_bytes(fig, "png", 60), None)


def _write(tmp_path, figure):
    scan = make_scan(with_ancient=True)
    extra = ReportTable("visit", "Visit plan", [{"date": "2026-12-21", "start": "08:58"}], (("date", "Date"),))
    site = [("Latitude", "53.1° N"), ("Time zone", "Europe/Dublin")]
    return scan, write_report(tmp_path / "out", scan, site=site, figures=[figure], tables=[extra])


def test_report_lists_every_event_and_parses(tmp_path, calendar_figure):
    scan, paths = _write(tmp_path, calendar_figure)
    page = paths["report.html"].read_text(encoding="utf-8")
    HTMLParser().feed(page)  # the standard library parser accepts it
    doc = lxml.html.fromstring(page)
    rows = doc.xpath('//table[@id="event-table"]/tbody/tr')
    events = [e for y in scan.years for e in y.events]
    assert len(rows) == len(events) == 8
    dates = [r.xpath("./td")[0].text_content() for r in rows]
    # year −3199 (3200 BC) and year 2027 begin with the December solstice of the year before them
    assert dates == ["-3200-12-24"] + [f"2026-12-{d}" for d in range(18, 25)]
    headings = [th.text_content() for th in doc.xpath('//table[@id="event-table"]/thead//th')]
    assert headings == [title for _, title in EVENT_HTML_COLUMNS]
    assert len(doc.xpath('//table[@id="division-table"]/tbody/tr')) == 5
    assert len(doc.xpath('//table[@id="visit-table"]/tbody/tr')) == 1
    caution_text = doc.xpath('//div[@class="caution"]')[0].text_content()
    for caution in CAUTIONS:
        assert caution in caution_text
    accuracy = doc.xpath('//h2[@id="accuracy"]/following-sibling::dl[1]')[0].text_content()
    for needle in ("JPL DE421 (skyfield)", "σ up to 6,700 s", "Bennett (1982)", "0.25°", "first-gleam"):
        assert needle in accuracy
    # the settings line, samples and cell size first, at the top of the report and among the notes
    line = "400 target samples, 0.25° window cells, criterion first-gleam, 4 divisions (solar)"
    assert line in doc.xpath('string(//p[@id="settings"])') and line in accuracy


def test_report_is_self_contained(tmp_path, calendar_figure):
    _, paths = _write(tmp_path, calendar_figure)
    doc = lxml.html.fromstring(paths["report.html"].read_bytes())
    for element in doc.iter():
        for attr in ("src", "href", "data", "action", "poster"):
            value = element.get(attr)
            if value is not None:
                assert value.startswith("data:"), f"<{element.tag} {attr}={value[:40]!r}> leaves the file"
    imgs = doc.xpath("//img")
    assert len(imgs) == 1 and imgs[0].get("src").startswith("data:image/png;base64,")
    csp = doc.xpath('//meta[@http-equiv="Content-Security-Policy"]/@content')[0]
    assert "default-src 'none'" in csp


def test_tables_beside_the_report_agree(tmp_path, calendar_figure):
    scan, paths = _write(tmp_path, calendar_figure)
    with open(paths["events.csv"], newline="", encoding="utf-8") as handle:
        header = handle.readline()
        rows = list(csv.DictReader(handle))
    assert header.startswith("# Invented test chamber: 400 target samples, 0.25° window cells")
    assert [r["date"] for r in rows] == [r["date"] for r in event_rows(scan)]
    assert rows[0]["ut_date_uncertain"] == "True" and rows[0]["calendar"] == "julian"
    doc = json.loads(paths["tables.json"].read_text(encoding="utf-8"))
    assert len(doc["events"]) == 8 and doc["events"][1]["start_local_apparent"] == "08:50"
    assert doc["settings"]["criterion"] == "first-gleam"
    assert doc["visit"] == [{"date": "2026-12-21", "start": "08:58"}]
    assert paths["figures/light-calendar.png"].read_bytes() == calendar_figure.png
    assert paths["visit.csv"].read_text() == "date\n2026-12-21\n"


def test_interrupted_write_leaves_no_partial_file(tmp_path, calendar_figure, monkeypatch):
    out = tmp_path / "out"
    _, first = _write(tmp_path, calendar_figure)
    old_page = first["report.html"].read_bytes()
    # Make every writer raise midway: after writing part of its bytes.
    real = lightpath.files.write_atomic

    def broken_write_atomic(path, writer):
        def half_writer(handle):
            class Half:
                def write(self, data):
                    handle.write(data[: len(data) // 2])
                    raise OSError("disk full (simulated)")

            writer(Half())

        return real(path, half_writer)

    monkeypatch.setattr(lightpath.files, "write_atomic", broken_write_atomic)
    scan = make_scan()  # a different report: must not replace the first one
    with pytest.raises(OSError, match="simulated"):
        write_report(out, scan, figures=[calendar_figure])
    leftovers = [p.name for p in out.rglob("*") if p.name.endswith(".part") or p.name.startswith(".")]
    assert leftovers == []
    assert first["report.html"].read_bytes() == old_page  # the earlier report is untouched
    assert (
        first["events.csv"].read_text().endswith(rows_to_csv(event_rows(make_scan(with_ancient=True)), EVENT_COLUMNS))
    )


def test_every_value_is_escaped():
    scan = make_scan()
    page = report_html(scan, site=[("Name", "<script>alert(1)</script>")], title="A & B")
    assert "<script>alert(1)" not in page and "&lt;script&gt;alert(1)" in page
    assert "<title>A &amp; B</title>" in page
