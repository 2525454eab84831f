"""Figures of the opening and the target: the sky-window chart and the light patch.

* :func:`sky_window_figure` draws, in azimuth/altitude, the part of the sky seen
  through the opening (its outline), the site's horizon profile and the Sun's
  track on chosen days (e.g. each division of the year).
* :func:`light_patch_figure` lays the target flat in its own plane — the two
  principal axes of its sample points (principal component analysis, Pearson 1901)
  — and shows which samples are lit at a few instants: a strip of frames through
  one light event.

Both take plain arrays, so they present whatever the engine computed and compute
no light themselves.

>>> import numpy as np
>>> pts = np.array([[0, 0, 0], [2, 0, 0], [0, 0, 1], [2, 0, 1.0]])   # a 2 m × 1 m wall facing south
>>> uv = flatten_target(pts)
>>> np.round(np.ptp(uv, axis=0), 6).tolist()
[2.0, 1.0]

References
----------
Pearson, K. (1901). On lines and planes of closest fit to systems of points in space.
*Philosophical Magazine* 2(11), 559-572.
"""

from __future__ import annotations

from collections.abc import Sequence
from typing import Any

import numpy as np
from matplotlib.figure import Figure

from lightpath.errors import InputError
from lightpath.present.figures import LINE_COLOURS, new_figure

__all__ = ["centred_azimuth", "flatten_target", "light_patch_figure", "sky_window_figure", "window_outlines"]


def centred_azimuth(azimuth_deg: np.ndarray, centre_deg: float) -> np.ndarray:
    """Azimuths moved into ``centre_deg ± 180°`` so a window across north draws in one piece.

    >>> centred_azimuth(np.array([350.0, 10.0]), 0.0).tolist()
    [-10.0, 10.0]
    """
    return (np.asarray(azimuth_deg, dtype=float) - centre_deg + 180.0) % 360.0 - 180.0 + centre_deg


def _circular_mean_deg(azimuth_deg: np.ndarray) -> float:
    a = np.radians(azimuth_deg[np.isfinite(azimuth_deg)])
    if a.size == 0:
        return 180.0
    return float(np.degrees(np.arctan2(np.sin(a).mean(), np.cos(a).mean())) % 360.0)


def _break_jumps(x: np.ndarray, y: np.ndarray, jump_deg: float = 90.0) -> tuple[np.ndarray, np.ndarray]:
    """Insert nan where consecutive x values jump (a wrap), so lines are not drawn across the chart."""
    cut = np.nonzero(np.abs(np.diff(x)) > jump_deg)[0] + 1
    return np.insert(x, cut, np.nan), np.insert(y, cut, np.nan)


def window_outlines(window: Any, min_fraction: float = 0.0) -> list[tuple[np.ndarray, np.ndarray]]:
    """Outlines, in azimuth/altitude (degrees), of the sky seen by more than ``min_fraction`` of the target.

    ``window`` is the engine's :class:`lightpath.light.window.SkyWindow` (raw escape masks of every
    sample on the site-fixed hour-angle/declination grid; the horizon is not in it).  The share of the
    target's area that sees each cell is contoured (contourpy's marching squares) between cell centres,
    and the contour lines are turned from (H, δ) into azimuth/altitude (Meeus 1998 eqs. 13.5-13.6).
    ``min_fraction=0`` outlines the sky seen from any part of the target.
    """
    import contourpy

    from lightpath.light.grid import enu_from_hadec

    grid = window.grid
    escape = np.asarray(window.escape, dtype=bool)
    s_idx, i_idx, j_idx = np.nonzero(escape)
    if s_idx.size == 0:
        return []
    k = np.mod(window.h0[s_idx] + i_idx - window.wrap_cells, grid.n_h)
    j = window.d0[s_idx] + j_idx
    cell = k.astype(np.int64) * grid.n_d + j
    pairs = np.unique(s_idx.astype(np.int64) * (grid.n_h * grid.n_d) + cell)  # each sample counts a cell once
    sample, cell = np.divmod(pairs, grid.n_h * grid.n_d)
    weight = np.asarray(window.area_m2, dtype=float)[sample] / float(np.sum(window.area_m2))
    k, j = np.divmod(cell, grid.n_d)
    # Hour angles unwrapped around their circular mean, so a window across H = ±180° stays in one piece.
    h = centred_azimuth(np.asarray(grid.h_center(k), dtype=float), _circular_mean_deg(grid.h_center(k) % 360.0))
    h_min, j_min = float(h.min()), int(j.min())
    kk = np.rint((h - h_min) / grid.resolution_deg).astype(np.int64) + 1  # one empty cell of padding round it
    jj = j - j_min + 1
    share = np.zeros((kk.max() + 2, jj.max() + 2))
    np.add.at(share, (kk, jj), weight)
    h_axis = h_min + (np.arange(share.shape[0]) - 1) * grid.resolution_deg
    d_axis = np.asarray(grid.d_center(np.arange(share.shape[1]) + j_min - 1), dtype=float)
    # "Seen by any sample": half the smallest sample's share puts the line midway between cell centres.
    level = min_fraction if min_fraction > 0 else 0.5 * float(weight.min())
    lines = contourpy.contour_generator(d_axis, h_axis, share, line_type="Separate").lines(level)
    out = []
    for line in lines:
        d_deg, h_deg = line[:, 0], line[:, 1]
        v = enu_from_hadec(grid.latitude_deg, h_deg, d_deg)
        azimuth = np.degrees(np.arctan2(v[:, 0], v[:, 1])) % 360.0
        altitude = np.degrees(np.arcsin(np.clip(v[:, 2], -1.0, 1.0)))
        out.append((azimuth, altitude))
    return out


def sky_window_figure(
    outlines: Sequence[tuple[np.ndarray, np.ndarray]],
    *,
    horizon: tuple[np.ndarray, np.ndarray] | None = None,
    sun_tracks: Sequence[tuple[str, np.ndarray, np.ndarray]] = (),
    margin_deg: float = 15.0,
    title: str | None = None,
) -> Figure:
    """The sky seen through the opening, the horizon and the Sun's tracks, in azimuth/altitude.

    Parameters
    ----------
    outlines : closed outlines of the window, each ``(azimuth_deg, altitude_deg)`` arrays
        (azimuth from true north clockwise; altitude geometric, degrees).
    horizon : the horizon profile ``(azimuth_deg, altitude_deg)``, or None for a flat horizon.
    sun_tracks : ``(label, azimuth_deg, altitude_deg)`` of the Sun's centre on chosen days
        (apparent altitude, degrees).
    margin_deg : sky shown around the window, degrees.
    title : the figure title.
    """
    if not outlines:
        raise InputError("sky-window chart: no window outline to draw (the opening sees no sky?)")
    all_az = np.concatenate([np.asarray(a, dtype=float) for a, _ in outlines])
    all_alt = np.concatenate([np.asarray(h, dtype=float) for _, h in outlines])
    centre = _circular_mean_deg(all_az)
    az_c = centred_azimuth(all_az, centre)
    x_low, x_high = np.nanmin(az_c) - margin_deg, np.nanmax(az_c) + margin_deg
    y_low = max(-5.0, np.nanmin(all_alt) - margin_deg)
    y_high = min(90.0, np.nanmax(all_alt) + margin_deg)

    fig = new_figure(9.0, 5.0)
    ax = fig.add_subplot()
    for k, (az, alt) in enumerate(outlines):
        x = centred_azimuth(np.asarray(az, dtype=float), centre)
        ax.fill(x, alt, facecolor="#56B4E9", alpha=0.35, edgecolor="#0072B2", lw=1.2,
                label="sky seen through the opening" if k == 0 else None)  # fmt: skip
    if horizon is not None:
        h_az, h_alt = (np.asarray(v, dtype=float) for v in horizon)
        order = np.argsort(centred_azimuth(h_az, centre))
        hx = centred_azimuth(h_az, centre)[order]
        ax.fill_between(hx, -90.0, h_alt[order], color="#7a6a55", alpha=0.5, lw=0)
        ax.plot(hx, h_alt[order], color="black", lw=1.0, label="horizon profile")
    else:
        ax.axhspan(-90.0, 0.0, color="#7a6a55", alpha=0.5, lw=0)
        ax.axhline(0.0, color="black", lw=1.0, label="flat horizon (0°)")
    for k, (label, az, alt) in enumerate(sun_tracks):
        x, y = _break_jumps(centred_azimuth(np.asarray(az, dtype=float), centre), np.asarray(alt, dtype=float))
        colour = LINE_COLOURS[(k + 1) % len(LINE_COLOURS)]
        ax.plot(x, y, color=colour, lw=1.4, label=f"Sun, {label}")
    ax.set_xlim(x_low, x_high)
    ax.set_ylim(y_low, y_high)
    ax.xaxis.set_major_formatter(lambda v, _pos: f"{v % 360:.0f}°")
    ax.set_xlabel("Azimuth (degrees from true north, clockwise)")
    ax.set_ylabel("Altitude (degrees)")
    ax.grid(True, lw=0.4, alpha=0.5)
    ax.legend(fontsize=7, loc="upper right")
    ax.set_title(title or "Sky seen through the opening, with the Sun's path on the division days")
    return fig


def flatten_target(points_enu_m: np.ndarray) -> np.ndarray:
    """Target sample points (N, 3; East-North-Up, metres) → (N, 2) coordinates in the target's plane.

    The axes are the two principal directions of the points (largest spread first), origin
    at their mean; each axis is signed so that its largest component is positive, so the
    picture is the same on every run.
    """
    pts = np.asarray(points_enu_m, dtype=float)
    if pts.ndim != 2 or pts.shape[1] != 3 or pts.shape[0] < 3:
        raise InputError("light patch: target points must be an (N, 3) array with N ≥ 3")
    centred = pts - pts.mean(axis=0)
    _, _, vt = np.linalg.svd(centred, full_matrices=False)  # Pearson (1901): principal axes
    axes = vt[:2]
    signs = np.sign(axes[np.arange(2), np.argmax(np.abs(axes), axis=1)])
    return centred @ (axes * signs[:, None]).T


def light_patch_figure(
    points_enu_m: np.ndarray,
    lit: np.ndarray,
    labels: Sequence[str],
    *,
    title: str | None = None,
    columns: int = 4,
) -> Figure:
    """A strip of frames: the target laid flat, lit samples bright, at each instant.

    Parameters
    ----------
    points_enu_m : (N, 3) target sample points, East-North-Up metres.
    lit : (F, N) booleans, True where sample n is lit in frame f.
    labels : F frame labels (e.g. local apparent times ``"07:42"``).
    title : the figure title.
    columns : frames per row.
    """
    lit = np.atleast_2d(np.asarray(lit, dtype=bool))
    uv = flatten_target(points_enu_m)
    if lit.shape[1] != uv.shape[0] or lit.shape[0] != len(labels):
        raise InputError(f"light patch: lit flags {lit.shape} do not match {len(labels)} frames × {uv.shape[0]} points")
    frames = lit.shape[0]
    cols = max(1, min(columns, frames))
    rows = int(np.ceil(frames / cols))
    span = np.ptp(uv, axis=0)
    aspect = float(span[1] / span[0]) if span[0] > 0 else 1.0
    fig = new_figure(2.6 * cols + 0.6, max(2.0, 2.6 * cols * aspect / cols) * rows + 0.8)
    axes = fig.subplots(rows, cols, squeeze=False, sharex=True, sharey=True)
    size = float(np.clip(4000.0 / uv.shape[0], 2.0, 30.0))
    for f, ax in enumerate(axes.flat):
        if f >= frames:
            ax.set_axis_off()
            continue
        ax.scatter(uv[~lit[f], 0], uv[~lit[f], 1], s=size, color="#3b3b4f", marker="s", lw=0)
        ax.scatter(uv[lit[f], 0], uv[lit[f], 1], s=size, color="#FDE725", marker="s", lw=0)
        ax.set_aspect("equal")
        ax.set_title(f"{labels[f]} — {lit[f].mean():.0%} lit", fontsize=8)
        ax.set_facecolor("#20202a")
    for ax in axes[-1]:
        ax.set_xlabel("Along the target (m)")
    for ax in axes[:, 0]:
        ax.set_ylabel("Across the target (m)")
    fig.suptitle(title or "Where the light falls on the target (target laid flat, lit samples in yellow)")
    return fig
