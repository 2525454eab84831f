"""A self-contained HTML report of a scan, with its tables as CSV and JSON beside it.

The HTML file needs nothing outside itself: figures are embedded as base64 PNG
``data:`` URIs, styles and the small self-check script are inline, and a
Content-Security-Policy forbids every other source, so opening it makes no
network request.  On load the script counts the figures that decoded and writes
the count into the page (``#figure-check``), which the browser test reads.

Every file is written atomically (temporary file, then rename), so an
interrupted run never leaves a half-written report.

>>> from lightpath.light.results import ScanResult, ScanSettings
>>> settings = ScanSettings("first-gleam", "solar", 4, 200, 1, 0.25, "bennett1982", "JPL DE421 (skyfield)")
>>> page = report_html(ScanResult("Demo", settings, 1.0, []), site=[("Latitude", "52.0°")])
>>> "<h1>" in page and "http" not in page.split("<body")[1]
True
"""

from __future__ import annotations

import base64
import html
import json
import os
from collections.abc import Callable, Sequence
from dataclasses import dataclass
from pathlib import Path
from typing import Any

import numpy as np

from lightpath.files import write_bytes_atomic, write_text_atomic
from lightpath.light.results import ScanResult
from lightpath.present.tables import (
    DIVISION_COLUMNS,
    EVENT_COLUMNS,
    EVENT_HTML_COLUMNS,
    MOON_EVENT_COLUMNS,
    division_rows,
    event_rows,
    rows_to_csv,
    rows_to_html,
    settings_line,
    tables_document,
)
from lightpath.sky.calendar import year_label

__all__ = ["CAUTIONS", "ReportFigure", "ReportTable", "accuracy_notes", "report_html", "write_report"]

#: Safety and conduct notes printed in every report and calendar entry.
CAUTIONS: tuple[str, ...] = (
    "Never look at the Sun directly or through binoculars, a camera viewfinder or any other optics: "
    "it can blind you in seconds.",
    "Chambers, passages and stones may be unstable, and many sites are protected by law: do not enter, "
    "climb or move anything without permission.",
    "Follow the site's rules and its managers' instructions; ask before visiting at dawn or out of hours.",
    "Times come from a model of the site and its air; weather, refraction and survey errors move them. Arrive early.",
)

_STYLE = """
body{font-family:system-ui,sans-serif;max-width:1100px;margin:1.5em auto;padding:0 1em;color:#1d1d24;line-height:1.45}
h1{font-size:1.6em;margin-bottom:.2em}h2{border-bottom:1px solid #ccd;padding-bottom:.15em;margin-top:1.6em}
table{border-collapse:collapse;font-size:.82em;margin:.6em 0 1.2em;display:block;overflow-x:auto}
th,td{border:1px solid #ccd;padding:.25em .45em;text-align:left;white-space:nowrap}
th{background:#eef0f6}caption{text-align:left;font-weight:600;padding:.3em 0}
dl.pairs{display:grid;grid-template-columns:max-content 1fr;gap:.2em 1em}dl.pairs dt{font-weight:600}
figure{margin:1em 0 1.6em}figure img{max-width:100%;height:auto;border:1px solid #dde}
figcaption{font-size:.9em;color:#444}
.caution{background:#fff4e0;border-left:5px solid #D55E00;padding:.6em 1em}
.muted{color:#555;font-size:.85em}
"""

_CHECK_SCRIPT = """
(function(){
  var errors=[];
  window.addEventListener('error',function(e){errors.push(String(e.message||'resource failed'));},true);
  window.addEventListener('load',function(){
    var imgs=document.querySelectorAll('img'),ok=0;
    for(var i=0;i<imgs.length;i++){if(imgs[i].complete&&imgs[i].naturalWidth>0){ok++;}}
    var p=document.getElementById('figure-check');
    p.setAttribute('data-loaded',String(ok));p.setAttribute('data-total',String(imgs.length));
    p.setAttribute('data-errors',String(errors.length));
    p.textContent='Figures shown: '+ok+' of '+imgs.length+(errors.length?' ('+errors.length+' errors)':'')+'.';
  });
})();
"""

_CSP = "default-src 'none'; img-src data:; style-src 'unsafe-inline'; script-src 'unsafe-inline'"


@dataclass(frozen=True)
class ReportFigure:
    """A figure for the report: ``name`` is the file stem, ``png`` the embedded image, ``svg`` a vector copy."""

    name: str
    caption: str
    png: bytes
    svg: bytes | None = None
    alt: str = ""


@dataclass(frozen=True)
class ReportTable:
    """An extra table for the report (e.g. the visit plan), also written as ``<name>.csv``."""

    name: str
    title: str
    rows: list[dict[str, Any]]
    columns: tuple[tuple[str, str], ...]
    note: str = ""


def accuracy_notes(scan: ScanResult) -> list[tuple[str, str]]:
    """(label, text) pairs stating how the numbers were made and how far they can be trusted."""
    s = scan.settings
    events = [e for y in scan.years for e in y.events]
    dt = np.array([e.delta_t_s for e in events], dtype=float)
    sigma = np.array([e.delta_t_sigma_s for e in events], dtype=float)
    if s.delta_t_s is not None:
        dt_text = f"fixed by the user at {s.delta_t_s:g} s"
    elif dt.size and np.isfinite(dt).any():
        top = float(np.nanmax(sigma))
        digits = 0 if np.nanmax(dt) >= 1000 else 1
        dt_text = (
            f"{np.nanmin(dt):,.{digits}f} to {np.nanmax(dt):,.{digits}f} s over the events, "
            f"σ up to {top:,.{0 if top >= 10 else 1}f} s (Morrison & Stephenson 2004)"
        )
    else:
        dt_text = "no event, so no ΔT was needed"
    refraction = {
        "bennett1982": "Bennett (1982), scaled by pressure and temperature",
        "saemundsson1986": "Sæmundsson (1986), scaled by pressure and temperature",
        None: "none (geometric altitudes)",
    }.get(s.refraction, str(s.refraction))
    used = sorted({y.source for y in scan.years if y.source})
    sources = ", ".join(used) if used else s.source
    notes = [
        ("Settings", settings_line(s)),
        (
            "Days",
            f"{s.day_convention}s at the site; each light run is reported whole, once, under the division "
            "of the year it belongs to (year Y's divisions run from the December solstice of Y − 1)",
        ),
        ("Sun position", sources if s.source in ("auto", *used) else f"{s.source}: {sources}"),
        ("ΔT = TT − UT", dt_text + "; it moves UT and civil clock times, hardly the local apparent times"),
        ("Refraction", refraction + "; near the horizon its σ is about 0.18° (Sampson et al. 2003)"),
        ("Sky-window resolution", f"{s.resolution_deg:g}° on the hour-angle/declination grid"),
        ("Light criterion", f"{s.criterion} of the Sun's disc (0.53° wide)"),
        ("Target samples", f"{s.samples} points (random-number-generator seed {s.seed})"),
        ("Divisions", f"scheme {s.scheme!r}, {s.parts} parts of the year"),
    ]
    return notes + [("Note", n) for n in list(scan.notes) + [n for y in scan.years for n in y.notes]]


def _pairs(pairs: Sequence[tuple[str, str]]) -> str:
    items = "".join(f"<dt>{html.escape(str(k))}</dt><dd>{html.escape(str(v))}</dd>" for k, v in pairs)
    return f'<dl class="pairs">{items}</dl>'


def report_html(
    scan: ScanResult,
    *,
    site: Sequence[tuple[str, str]] = (),
    figures: Sequence[ReportFigure] = (),
    tables: Sequence[ReportTable] = (),
    accuracy: Sequence[tuple[str, str]] | None = None,
    cautions: Sequence[str] = CAUTIONS,
    title: str | None = None,
    made_with: str = "",
) -> str:
    """The report as one HTML document (a string); every value is escaped."""
    years = ", ".join(year_label(y.year) for y in scan.years) or "no year"
    moon = getattr(scan.settings, "body", "sun") == "moon"
    title = title or f"{'Moonlight' if moon else 'Sunlight'} on the target: {scan.scene}"
    events, divisions = event_rows(scan), division_rows(scan)
    moon_columns = MOON_EVENT_COLUMNS if moon else ()
    parts = [
        "<!DOCTYPE html>",
        '<html lang="en"><head><meta charset="utf-8">',
        f'<meta http-equiv="Content-Security-Policy" content="{_CSP}">',
        '<meta name="viewport" content="width=device-width, initial-scale=1">',
        f"<title>{html.escape(title)}</title><style>{_STYLE}</style>",
        f"<script>{_CHECK_SCRIPT}</script></head><body>",
        f"<h1>{html.escape(title)}</h1>",
        f'<p class="muted">Years: {html.escape(years)}. {html.escape(made_with)}</p>',
        f'<p class="muted" id="settings">Settings: {html.escape(settings_line(scan.settings))}.</p>',
        '<p id="figure-check" class="muted">Figures not checked yet.</p>',
        '<h2 id="cautions">Before you go</h2><div class="caution"><ul>',
        "".join(f"<li>{html.escape(c)}</li>" for c in cautions),
        "</ul></div>",
        '<h2 id="site">The site</h2>',
        _pairs(site),
        '<h2 id="accuracy">How the numbers were made</h2>',
        _pairs(accuracy if accuracy is not None else accuracy_notes(scan)),
        '<h2 id="events">Light events</h2>',
        f"<p>{len(events)} event(s). Dates are the day at the site in local apparent solar time; "
        "years in astronomical numbering (0 = 1 BC, −3199 = 3200 BC), calendar named on each row.</p>",
        rows_to_html(events, EVENT_HTML_COLUMNS + moon_columns, table_id="event-table"),
        '<h2 id="divisions">Light around the divisions of the year</h2>',
        rows_to_html(divisions, DIVISION_COLUMNS, table_id="division-table"),
    ]
    for table in tables:
        parts += [f'<h2 id="{html.escape(table.name)}">{html.escape(table.title)}</h2>']
        if table.note:
            parts.append(f"<p>{html.escape(table.note)}</p>")
        parts.append(rows_to_html(table.rows, table.columns, table_id=f"{table.name}-table"))
    if figures:
        parts.append('<h2 id="figures">Figures</h2>')
    for fig in figures:
        data = base64.b64encode(fig.png).decode("ascii")
        parts.append(
            f'<figure id="fig-{html.escape(fig.name)}"><img src="data:image/png;base64,{data}" '
            f'alt="{html.escape(fig.alt or fig.caption)}"><figcaption>{html.escape(fig.caption)}</figcaption></figure>'
        )
    parts.append(
        '<p class="muted">Tables also beside this file as events.csv, divisions.csv and tables.json; '
        "figures as PNG and SVG in figures/.</p></body></html>"
    )
    return "\n".join(parts)


def write_report(
    out_dir: str | os.PathLike,
    scan: ScanResult,
    *,
    site: Sequence[tuple[str, str]] = (),
    figures: Sequence[ReportFigure] = (),
    tables: Sequence[ReportTable] = (),
    accuracy: Sequence[tuple[str, str]] | None = None,
    title: str | None = None,
    made_with: str = "",
    progress: Callable[[int], None] | None = None,
) -> dict[str, Path]:
    """Write report.html, events.csv, divisions.csv, tables.json and figures/*.png|svg into ``out_dir``.

    Returns the written paths by name. Each file is written atomically; ``progress(1)`` is
    called after each file.
    """
    out = Path(out_dir)
    step = progress or (lambda n=1: None)
    written: dict[str, Path] = {}
    document = tables_document(scan)
    document["settings_line"] = settings_line(scan.settings)
    document["accuracy"] = [{"item": k, "value": v} for k, v in (accuracy or accuracy_notes(scan))]
    document["site"] = [{"item": k, "value": v} for k, v in site]
    for table in tables:
        document[table.name] = table.rows
        written[f"{table.name}.csv"] = write_text_atomic(
            out / f"{table.name}.csv", rows_to_csv(table.rows, table.columns)
        )
        step(1)
    header = f"# {scan.scene}: {settings_line(scan.settings)}\n"  # a comment line: pandas reads it with comment="#"
    columns = EVENT_COLUMNS + (MOON_EVENT_COLUMNS if getattr(scan.settings, "body", "sun") == "moon" else ())
    written["events.csv"] = write_text_atomic(out / "events.csv", header + rows_to_csv(event_rows(scan), columns))
    step(1)
    written["divisions.csv"] = write_text_atomic(
        out / "divisions.csv", header + rows_to_csv(division_rows(scan), DIVISION_COLUMNS)
    )
    step(1)
    text = json.dumps(document, indent=2, ensure_ascii=False, allow_nan=False, default=_json_default)
    written["tables.json"] = write_text_atomic(out / "tables.json", text + "\n")
    step(1)
    for fig in figures:
        written[f"figures/{fig.name}.png"] = write_bytes_atomic(out / "figures" / f"{fig.name}.png", fig.png)
        if fig.svg is not None:
            written[f"figures/{fig.name}.svg"] = write_bytes_atomic(out / "figures" / f"{fig.name}.svg", fig.svg)
        step(1)
    page = report_html(
        scan, site=site, figures=figures, tables=tables, accuracy=accuracy, title=title, made_with=made_with
    )
    written["report.html"] = write_text_atomic(out / "report.html", page)
    step(1)
    return written


def _json_default(value: Any) -> Any:
    if isinstance(value, np.generic):
        return value.item()
    if isinstance(value, np.ndarray):
        return value.tolist()
    raise TypeError(f"not JSON serialisable: {type(value).__name__}")
