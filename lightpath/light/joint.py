"""The skyline and the structure cutting the Sun's disc together: the share of the seen disc above the skyline.

:func:`lightpath.light.disc.disc_fraction` multiplies the window fraction of
the disc by :func:`joint_ratio` when both the skyline and an edge of the
structure cut the disc.  The skyline is a straight line at its apparent
altitude at the Sun's azimuth, ``z`` disc radii above the disc's centre.  The
disc is cut into :data:`JOINT_ROWS` strips parallel to that line; the share of
each strip seen through the sky window is sampled at points along its middle
(nearest cell of the raw escape mask, as the window's own convolution reads
it), and the strip the line crosses is sampled again along the middles of its
parts above and below the line.  The ratio is

    Σ strips  (share seen) × (strip area above the line)
    ─────────────────────────────────────────────────────
    Σ strips  (share seen) × (strip area),

the share of the window-visible disc that stands above the skyline: 1 when the
skyline is below the disc, the circular segment above the line when the window
sees the whole disc, 0 when the window sees only what the skyline hides.

>>> round(float(strip_area(-1.0, 1.0)), 6) == round(np.pi, 6)   # the whole unit disc
True

References
----------
Weisstein, E. W. "Circular Segment", MathWorld (segment area of a disc cut by a line).
"""

from __future__ import annotations

import math

import numpy as np
from numpy.typing import ArrayLike, NDArray

from lightpath.light.grid import hadec_from_enu
from lightpath.light.window import SkyWindow

__all__ = ["JOINT_ROWS", "joint_ratio", "strip_area"]

#: Strips (parallel to the skyline) of the joint rule; each is sampled at about as many points.
JOINT_ROWS = 48
#: (instant, sample) pairs handled at once.
_JOINT_CHUNK = 4096


def strip_area(t0: NDArray, t1: NDArray) -> NDArray:
    """∫ 2 √(1 − t²) dt from t0 to t1 (unit-circle strip area), t clipped to [−1, 1]."""

    def s(t):
        t = np.clip(t, -1.0, 1.0)
        return t * np.sqrt(1.0 - t * t) + np.arcsin(t)

    return s(t1) - s(t0)


def _joint_pattern(rows: int = JOINT_ROWS):
    """Points of the unit disc in strips parallel to the x axis: (P, 2) points, (P,) strip index, strip edges."""
    edges = np.linspace(-1.0, 1.0, rows + 1)
    mid = 0.5 * (edges[:-1] + edges[1:])
    pts, strip = [], []
    for j, y in enumerate(mid):
        half = math.sqrt(max(0.0, 1.0 - y * y))
        n = max(2, int(round(rows * half)))
        x = (np.arange(n) + 0.5) / n * 2.0 * half - half
        pts.append(np.column_stack([x, np.full(n, y)]))
        strip.append(np.full(n, j))
    return np.vstack(pts), np.concatenate(strip), edges


def joint_ratio(
    window: SkyWindow, sun: NDArray, k: NDArray, z: NDArray, rotation: ArrayLike | None, semidiameter_deg: float
) -> NDArray:
    """Share of the window-visible disc above the skyline line at ``z`` (disc radii above the centre), per pair.

    ``sun`` (n, 3) unit apparent directions (ENU), ``k`` (n,) samples.  The strip the line crosses is sampled
    again along the middles of its parts above and below the line, so an edge of the structure lying on the
    skyline is resolved.  nan where no sampled point of the disc is in the window (the caller then keeps the
    product of the two fractions).
    """
    pattern, strip, edges = _joint_pattern()
    rows = len(edges) - 1
    counts = np.bincount(strip, minlength=rows).astype(float)
    whole = strip_area(edges[:-1], edges[1:])  # strip areas of the unit disc (∫ 2√(1 − t²) dt)
    u = (np.arange(rows) + 0.5) / rows * 2.0 - 1.0  # extra row: points across the chord, in chord half-lengths
    out = np.full(len(sun), np.nan)
    for lo in range(0, len(sun), _JOINT_CHUNK):
        s = sun[lo : lo + _JOINT_CHUNK]
        kk = k[lo : lo + _JOINT_CHUNK]
        zz = np.clip(z[lo : lo + _JOINT_CHUNK], -1.0, 1.0)
        cut = np.clip(np.searchsorted(edges, zz, side="right") - 1, 0, rows - 1)  # the strip the line crosses
        extra = []
        for y in (0.5 * (zz + edges[cut + 1]), 0.5 * (edges[cut] + zz)):  # middles of its parts above, below
            half = np.sqrt(np.clip(1.0 - y * y, 0.0, 1.0))
            extra.append(np.stack([u[None, :] * half[:, None], np.broadcast_to(y[:, None], (len(s), rows))], axis=2))
        pts = np.concatenate([np.broadcast_to(pattern, (len(s), *pattern.shape)), *extra], axis=1)
        seen = _seen(window, s, kk, pts, rotation, semidiameter_deg)
        n = len(pattern)
        share = np.zeros((len(s), rows))
        for r in range(rows):
            share[:, r] = seen[:, :n][:, strip == r].sum(axis=1) / counts[r]
        above = strip_area(np.maximum(edges[None, :-1], zz[:, None]), edges[None, 1:])
        above = np.where(edges[None, 1:] > zz[:, None], above, 0.0)
        rows_i = np.arange(len(s))
        cut_above = seen[:, n : n + rows].mean(axis=1) * above[rows_i, cut]
        cut_below = seen[:, n + rows :].mean(axis=1) * (whole[cut] - above[rows_i, cut])
        part = share * above
        part[rows_i, cut] = cut_above
        whole_seen = share * whole[None, :]
        whole_seen[rows_i, cut] = cut_above + cut_below
        total = whole_seen.sum(axis=1)
        ok = total > 0.0
        out[lo : lo + _JOINT_CHUNK][ok] = part.sum(axis=1)[ok] / total[ok]
    return out


def _seen(
    window: SkyWindow, sun: NDArray, k: NDArray, pts: NDArray, rotation: ArrayLike | None, semidiameter_deg: float
) -> NDArray[np.bool_]:
    """(n, P) whether each disc point (unit-disc coordinates: across, up) is in sample k's raw escape mask."""
    up = np.array([0.0, 0.0, 1.0]) - sun[:, 2:3] * sun  # local vertical across the disc, then the horizontal
    up /= np.linalg.norm(up, axis=1, keepdims=True)
    side = np.cross(up, sun)
    t = math.tan(math.radians(semidiameter_deg))
    d = sun[:, None, :] + t * (pts[..., 0:1] * side[:, None, :] + pts[..., 1:2] * up[:, None, :])
    if rotation is not None:
        d = d @ np.asarray(rotation, dtype=np.float64)  # rows of Rᵀ·d: the structure turns, the sky stays
    grid, wrap = window.grid, window.wrap_cells
    _, nh, nd = window.escape.shape
    h, dec = hadec_from_enu(grid.latitude_deg, d)
    fh, fd = grid.fractional_index(h, dec)
    i = np.mod(np.rint(fh).astype(np.int64) - window.h0[k, None] - wrap, grid.n_h) + wrap
    j = np.rint(fd).astype(np.int64) - window.d0[k, None]
    inside = (i >= 0) & (i < nh) & (j >= 0) & (j < nd)
    seen = np.zeros(i.shape, bool)
    seen[inside] = window.escape[np.broadcast_to(k[:, None], i.shape)[inside], i[inside], j[inside]]
    return seen
