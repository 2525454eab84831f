"""The outline of a sky window in azimuth/altitude: the sky some part of the target sees through the opening.

Geometry made from the engine's :class:`lightpath.light.window.SkyWindow` for the report's sky-window
chart (:mod:`lightpath.present.window_figures` draws it).

>>> import numpy as np
>>> centred_azimuth(np.array([350.0, 10.0]), 0.0).tolist()
[-10.0, 10.0]

References
----------
Meeus, J. (1998). *Astronomical Algorithms*, 2nd ed., eqs. 13.5-13.6 (hour angle and declination to
azimuth and altitude).
"""

from __future__ import annotations

from typing import Any

import numpy as np

__all__ = ["centred_azimuth", "circular_mean_deg", "window_outlines"]


def centred_azimuth(azimuth_deg: np.ndarray, centre_deg: float) -> np.ndarray:
    """Azimuths moved into ``centre_deg ± 180°`` so a window across north draws in one piece.

    >>> centred_azimuth(np.array([350.0, 10.0]), 0.0).tolist()
    [-10.0, 10.0]
    """
    return (np.asarray(azimuth_deg, dtype=float) - centre_deg + 180.0) % 360.0 - 180.0 + centre_deg


def circular_mean_deg(azimuth_deg: np.ndarray) -> float:
    """Circular mean of azimuths (degrees, 0..360); 180 when there are none."""
    a = np.radians(azimuth_deg[np.isfinite(azimuth_deg)])
    if a.size == 0:
        return 180.0
    return float(np.degrees(np.arctan2(np.sin(a).mean(), np.cos(a).mean())) % 360.0)


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
    h = centred_azimuth(np.asarray(grid.h_center(k), dtype=float), circular_mean_deg(grid.h_center(k) % 360.0))
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
