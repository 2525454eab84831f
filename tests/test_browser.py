"""End to end in a real browser: the report opens in headless Chromium, every figure decodes, nothing
is logged to the console, and a screenshot is saved.

Needs Debian's ``chromium`` package (``.ci/run`` installs it when absent); skipped with that reason only
when no Chromium binary can be found.
"""

from __future__ import annotations

import shutil
import subprocess

import lxml.html
import pytest

from lightpath.present.scene_report import make_report
from lightpath.scene import demo_scene_path

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
    """A real report: the engine on the bundled reading-room site, with a visit plan and an epoch-drift span."""
    out = tmp_path_factory.mktemp("browser-report")
    result = make_report(demo_scene_path("quillfield"), 2027, out_dir=out, visit_year=2028, drift_years=[1827, 2027],
                         samples=60, formats=("png",))  # fmt: skip
    assert result.scan.years[0].events
    return result.paths["report.html"]


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
