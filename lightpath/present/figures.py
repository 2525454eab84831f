"""Figures over the year and over the epochs: the light calendar and the epoch drift.

Both are drawn from the engine's results (:mod:`lightpath.light.results`) and
return :class:`matplotlib.figure.Figure` objects made without pyplot (no global
state, no display needed); :func:`save_figure` writes PNG, SVG or PDF atomically.
Colours are colour-blind safe: the *cividis* colormap (Nuñez, Anderton &
Renslow 2018) for lit area, and the Okabe & Ito (2008) palette for lines.

>>> import numpy as np
>>> from lightpath.light.results import LightMap, YearScan
>>> days = 2461041.5 + np.arange(-10.0, 365.0)    # UT at local midnight on the prime meridian, from 2025-12-22
>>> minutes = np.arange(0.0, 1440.0, 10.0)
>>> area = np.zeros((days.size, minutes.size)); area[5:20, 50:54] = 0.2   # a run across 1 January
>>> scan = YearScan(2026, "gregorian", "test", [], [], LightMap(days, minutes, area))
>>> fig = light_calendar_figure(scan, longitude_deg=0.0)
>>> fig.axes[0].get_xlabel()
'Local apparent day (Gregorian calendar; day 1 = 1 January 2026)'

References
----------
Nuñez, J. R., Anderton, C. R. & Renslow, R. S. (2018). Optimizing colormaps with
consideration for color vision deficiency. *PLoS ONE* 13(7), e0199239.
Okabe, M. & Ito, K. (2008). *Color Universal Design (CUD): how to make figures and
presentations that are friendly to colorblind people*. J*Fly, https://jfly.uni-koeln.de/color/.
"""

from __future__ import annotations

import io
import os
from collections.abc import Sequence
from pathlib import Path

import numpy as np
from matplotlib.backends.backend_agg import FigureCanvasAgg
from matplotlib.figure import Figure
from matplotlib.ticker import FuncFormatter, MaxNLocator

from lightpath.errors import InputError
from lightpath.files import write_bytes_atomic
from lightpath.light.results import ScanResult, YearScan
from lightpath.present.tables import day_date, division_label
from lightpath.sky.calendar import julian_day, year_label

__all__ = [
    "FIGURE_FORMATS",
    "clock_label",
    "LINE_COLOURS",
    "day_of_year",
    "epoch_drift_figure",
    "figure_bytes",
    "light_calendar_figure",
    "local_days",
    "new_figure",
    "save_figure",
]

#: File formats :func:`save_figure` writes, by suffix.
FIGURE_FORMATS = ("png", "svg", "pdf")

#: Okabe & Ito (2008) colour-blind-safe palette (black first dropped: used for the horizon).
LINE_COLOURS = ("#0072B2", "#E69F00", "#009E73", "#CC79A7", "#56B4E9", "#D55E00", "#F0E442")


def new_figure(width_in: float = 9.0, height_in: float = 5.0) -> Figure:
    """A matplotlib Figure with an Agg canvas, made without pyplot."""
    fig = Figure(figsize=(width_in, height_in), layout="constrained")
    FigureCanvasAgg(fig)
    return fig


def figure_bytes(fig: Figure, fmt: str = "png", dpi: float = 110.0) -> bytes:
    """The figure rendered as PNG, SVG or PDF bytes (no creation date inside, so runs compare equal)."""
    fmt = fmt.lower()
    if fmt not in FIGURE_FORMATS:
        raise InputError(f"figure format {fmt!r} is not one of {', '.join(FIGURE_FORMATS)}")
    metadata = {"png": {"Software": None}, "svg": {"Date": None}, "pdf": {"CreationDate": None}}[fmt]
    buffer = io.BytesIO()
    fig.savefig(buffer, format=fmt, dpi=dpi, metadata=metadata)
    return buffer.getvalue()


def save_figure(fig: Figure, path: str | os.PathLike, dpi: float = 150.0) -> Path:
    """Write the figure to ``path`` atomically, in the format its suffix names (.png, .svg, .pdf)."""
    path = Path(path)
    fmt = path.suffix.lstrip(".").lower()
    if fmt not in FIGURE_FORMATS:
        raise InputError(f"figure file {str(path)!r}: suffix must be one of .png, .svg, .pdf")
    return write_bytes_atomic(path, figure_bytes(fig, fmt, dpi))


def local_days(day_jd_ut: np.ndarray, longitude_deg: float) -> np.ndarray:
    """Local apparent day numbers (integer Julian day numbers) of light-map rows given as UT at local midnight.

    Local mean time is UT + longitude/360 days; local apparent midnight differs from local mean midnight
    by the equation of time (< 17 min), so rounding gives the day.

    >>> local_days(np.array([2461041.75, 2461042.75]), -90.0).tolist()   # 90° W: midnight at 06 UT
    [2461042, 2461043]
    """
    return np.rint(np.asarray(day_jd_ut, dtype=np.float64) + longitude_deg / 360.0 + 0.5).astype(np.int64)


def day_of_year(day_jd_ut: np.ndarray, year: int, calendar: str, longitude_deg: float) -> np.ndarray:
    """Day of the year (1 = 1 January; 0, −1, … the December before) of days given as UT at local midnight.

    >>> day_of_year(np.array([2461040.75, 2461041.75, 2461042.75]), 2026, "gregorian", -90.0)
    array([0, 1, 2])
    """
    return local_days(day_jd_ut, longitude_deg) - _jan1_day(year, calendar) + 1


def _jan1_day(year: int, calendar: str) -> int:
    """Julian day number of 1 January of ``year`` (noon of that day)."""
    return int(round(float(julian_day(year, 1, 1, calendar if calendar in ("julian", "gregorian") else "auto")) + 0.5))


def clock_label(hours: float) -> str:
    """Hours after midnight as ``HH:MM`` (rounded to the minute).

    >>> clock_label(18.25), clock_label(8.9999)
    ('18:15', '09:00')
    """
    minutes = int(round(float(hours) * 60.0)) % 1440
    return f"{minutes // 60:02d}:{minutes % 60:02d}"


def light_calendar_figure(
    year_scan: YearScan,
    *,
    longitude_deg: float,
    target_area_m2: float | None = None,
    title: str | None = None,
) -> Figure:
    """Day of the year × local apparent time, shaded by the lit area of the target, divisions marked.

    Parameters
    ----------
    year_scan : a :class:`YearScan` with its ``light_map`` (run the scan with ``with_light_map``).
    longitude_deg : the site's longitude, degrees east (to find the local day of each map row).
    target_area_m2 : when given, shade by the lit fraction of the target (0..1) instead of m².
    title : the figure title (default names the year).
    """
    light_map = year_scan.light_map
    if light_map is None:
        raise InputError("light calendar: the scan has no light map (scan with with_light_map=True)")
    doy = day_of_year(light_map.day_jd_ut, year_scan.year, year_scan.calendar, longitude_deg)
    minutes = np.asarray(light_map.minutes, dtype=np.float64)
    area = np.asarray(light_map.area_m2, dtype=np.float64)
    value = area / target_area_m2 if target_area_m2 else area
    hours = minutes / 60.0
    step_h = float(np.median(np.diff(hours))) if hours.size > 1 else 1.0
    hour_edges = np.concatenate([hours - step_h / 2, [hours[-1] + step_h / 2]])
    day_edges = np.concatenate([doy - 0.5, [doy[-1] + 0.5]])

    fig = new_figure(9.5, 5.2)
    ax = fig.add_subplot()
    lit = np.where(value > 0, value, np.nan)
    mesh = ax.pcolormesh(day_edges, hour_edges, lit.T, cmap="cividis", shading="flat", vmin=0.0, rasterized=True)
    ax.set_facecolor("#f4f4f4")
    rows, cols = np.nonzero(value > 0)
    if cols.size:
        low, high = hours[cols.min()] - 1.0, hours[cols.max()] + 1.0
        ax.set_ylim(max(low, hour_edges[0]), min(high, hour_edges[-1]))
    else:
        ax.set_ylim(hour_edges[0], hour_edges[-1])
        ax.text(0.5, 0.5, "no light reaches the target in this year", transform=ax.transAxes, ha="center")
    ax.set_xlim(day_edges[0], day_edges[-1])
    cal_name = year_scan.calendar.capitalize()
    jan1 = _jan1_day(year_scan.year, year_scan.calendar)

    def date_tick(v, _pos):  # the date of day-of-year v (MM-DD), in the year's calendar
        text = day_date(int(round(v)) + jan1 - 1, year_scan.calendar)
        return text[-5:] if text else ""

    cal = year_scan.calendar if year_scan.calendar in ("julian", "gregorian") else "auto"
    firsts = [  # the first of each month from the December before the year to the January after it
        int(round(float(julian_day(year_scan.year + (m - 1) // 12 - 1, (m - 1) % 12 + 1, 1, cal)) + 0.5)) - jan1 + 1
        for m in range(12, 26)
    ]
    ax.set_xticks([x for x in firsts if day_edges[0] <= x <= day_edges[-1]])
    ax.xaxis.set_major_formatter(FuncFormatter(date_tick))
    ax.set_xlabel(f"Local apparent day ({cal_name} calendar; day 1 = 1 January {year_label(year_scan.year)})")
    ax.set_ylabel("Local apparent solar time (h)")
    ax.yaxis.set_major_formatter(FuncFormatter(lambda v, _pos: clock_label(v)))
    bar = fig.colorbar(mesh, ax=ax, pad=0.01)
    bar.set_label("Lit fraction of the target" if target_area_m2 else "Lit area of the target (m²)")
    for division in year_scan.divisions:
        x = float(division.day - jan1 + 1)
        if not day_edges[0] <= x <= day_edges[-1]:
            continue
        ax.axvline(x, color="#D55E00", lw=0.9, ls="--", alpha=0.9)
        ax.annotate(
            division_label(division.name), (x, 1.0), xycoords=("data", "axes fraction"), xytext=(2, -4),
            textcoords="offset points", rotation=90, va="top", ha="left", fontsize=7, color="#8a3300",
        )  # fmt: skip
    ax.set_title(title or f"When sunlight reaches the target, year {year_label(year_scan.year)}")
    return fig


def epoch_drift_figure(scan: ScanResult, *, divisions: Sequence[str] | None = None, title: str | None = None) -> Figure:
    """First and last day of light around each division, as days from the division, against the year.

    Parameters
    ----------
    scan : a :class:`ScanResult` over several years.
    divisions : names of the divisions to draw (default: every division with light in some year).
    title : the figure title.
    """
    years = np.array([y.year for y in scan.years], dtype=float)
    order = np.argsort(years)
    series: dict[str, tuple[np.ndarray, np.ndarray]] = {}
    for i, year_scan in enumerate(scan.years):
        for d in year_scan.divisions:
            first, last = series.setdefault(d.name, (np.full(years.size, np.nan), np.full(years.size, np.nan)))
            first[i] = np.nan if d.first_offset_days is None else d.first_offset_days
            last[i] = np.nan if d.last_offset_days is None else d.last_offset_days
    names = list(divisions) if divisions is not None else [n for n, (f, _) in series.items() if np.isfinite(f).any()]
    unknown = [n for n in names if n not in series]
    if unknown:
        raise InputError(f"epoch drift: no division named {unknown[0]!r}; known: {', '.join(series)}")

    fig = new_figure(9.0, 5.0)
    ax = fig.add_subplot()
    x = years[order]
    for k, name in enumerate(names):
        first, last = (s[order] for s in series[name])
        colour = LINE_COLOURS[k % len(LINE_COLOURS)]
        ax.fill_between(x, first, last, color=colour, alpha=0.18, lw=0)
        ax.plot(x, first, "-o", color=colour, ms=3, lw=1.2, label=f"{division_label(name)}: first day")
        ax.plot(x, last, "--s", color=colour, ms=3, lw=1.2, label=f"{division_label(name)}: last day")
    ax.axhline(0.0, color="black", lw=0.8)
    ax.annotate("division day", (x.min() if x.size else 0, 0), xytext=(2, 3), textcoords="offset points", fontsize=8)
    if x.size and x.max() <= 0:  # all BC: put the ticks on round BC years (astronomical −1799 is 1800 BC)
        bc = MaxNLocator(nbins=7, integer=True).tick_values(1 - x.max(), 1 - x.min())
        ax.set_xticks([1 - b for b in bc if 1 - x.max() <= b <= 1 - x.min()])
    ax.xaxis.set_major_formatter(FuncFormatter(lambda v, _pos: year_label(round(v))))
    ax.set_xlabel("Year (BC/AD; computed in astronomical numbering)")
    ax.set_ylabel("Days from the division (days)")
    if not names:
        ax.text(0.5, 0.5, "no light near any division in these years", transform=ax.transAxes, ha="center")
    else:
        ax.legend(fontsize=7, ncols=2, loc="best")
    ax.grid(True, lw=0.4, alpha=0.5)
    ax.set_title(title or "How the days of light move against the divisions over the years")
    return fig
