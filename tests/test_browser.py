"""End to end in a real browser: the report opens in headless Chromium, every figure decodes, nothing
is logged to the console, and a screenshot is saved.

Needs Debian's ``chromium`` package (``.ci/run`` installs it when absent); skipped with that reason only
when no Chromium binary can be found.
"""

from __future__ import annotations

import shutil
import subprocess

import lxml.html
import numpy as np
import pytest
from test_present_fixture import LONGITUDE_DEG, TARGET_AREA_M2, make_scan

from lightpath.present.figures import epoch_drift_figure, figure_bytes, light_calendar_figure
from lightpath.present.report import ReportFigure, write_report
from lightpath.present.window_figures import light_patch_figure, sky_window_figure

CHROMIUM = shutil.which("chromium") or shutil.which("chromium-browser")

pytestmark = [
    pytest.mark.browser,
    pytest.mark.skipif(CHROMIUM is None, reason="no chromium binary on PATH (Debian package 'chromium')"),
]

_FLAGS = [
    "--headless",
    "--no-sandbox",
    "--disable-gpu",
    "--disable-quic",
    "--no-first-run",
    "--disable-background-networking",
    "--disable-component-update",
    "--disable-sync",
    "--disable-dev-shm-usage",
    "--hide-scrollbars",
]


def _figures() -> list[ReportFigure]:
    scan = make_scan(with_ancient=True)
    t = np.linspace(0, 2 * np.pi, 40)
    outline = (135.0 + 3 * np.cos(t), 2.0 + 1.5 * np.sin(t))
    track = ("December solstice", np.linspace(120.0, 150.0, 30), np.linspace(-3.0, 6.0, 30))
    gx, gz = np.meshgrid(np.linspace(0, 1, 16), np.linspace(0, 0.5, 8))
    pts = np.column_stack([gx.ravel(), np.zeros(gx.size), gz.ravel()])
    figs = {
        "light-calendar": light_calendar_figure(scan.years[1], longitude_deg=LONGITUDE_DEG, target_area_m2=0.5),
        "sky-window": sky_window_figure([outline], sun_tracks=[track]),
        "light-patch": light_patch_figure(pts, np.stack([pts[:, 0] < f for f in (0.3, 0.6)]), ["08:52", "08:58"]),
        "epoch-drift": epoch_drift_figure(scan),
    }
    return [ReportFigure(name, name.replace("-", " "), figure_bytes(fig, "png", 50)) for name, fig in figs.items()]


def _chromium(args: list[str], profile, timeout: float = 60.0) -> subprocess.CompletedProcess:
    return subprocess.run(
        [CHROMIUM, *_FLAGS, f"--user-data-dir={profile}", *args],
        capture_output=True,
        text=True,
        timeout=timeout,
        check=False,
    )


@pytest.fixture(scope="module")
def report_path(tmp_path_factory):
    out = tmp_path_factory.mktemp("browser-report")
    scan = make_scan(with_ancient=True)
    paths = write_report(out, scan, site=[("Latitude", "53.1° N")], figures=_figures())
    assert scan.target_area_m2 == TARGET_AREA_M2
    return paths["report.html"]


def test_every_figure_loads_and_nothing_is_logged(report_path, tmp_path):
    proc = _chromium(
        ["--enable-logging=stderr", "--v=0", "--virtual-time-budget=5000", "--dump-dom", report_path.as_uri()],
        tmp_path / "profile",
    )
    assert proc.returncode == 0, proc.stderr[-2000:]
    doc = lxml.html.fromstring(proc.stdout)
    check = doc.get_element_by_id("figure-check")
    assert check.get("data-total") == "4", check.text_content()
    assert check.get("data-loaded") == "4", check.text_content()
    assert check.get("data-errors") == "0"
    console = [line for line in proc.stderr.splitlines() if ":CONSOLE" in line or "Refused to" in line]
    assert console == [], "\n".join(console)


def test_screenshot(report_path, tmp_path):
    shot = tmp_path / "report.png"  # kept in pytest's temporary folder for a person to look at
    proc = _chromium([f"--screenshot={shot}", "--window-size=1200,2000", report_path.as_uri()], tmp_path / "p2")
    assert proc.returncode == 0, proc.stderr[-2000:]
    data = shot.read_bytes()
    assert data[:8] == b"\x89PNG\r\n\x1a\n" and len(data) > 50_000  # a full page, not a blank one
