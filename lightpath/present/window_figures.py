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

import numpy as np
from matplotlib import colormaps
from matplotlib.figure import Figure

from lightpath.errors import InputError
from lightpath.present.figures import LINE_COLOURS, new_figure
from lightpath.study.window_outline import centred_azimuth, circular_mean_deg, window_outlines

__all__ = [
    "centred_azimuth",
    "flatten_target",
    "light_patch_figure",
    "sky_window_figure",
    "target_plane",
    "window_outlines",
]


def _break_jumps(x: np.ndarray, y: np.ndarray, jump_deg: float = 90.0) -> tuple[np.ndarray, np.ndarray]:
    """Insert nan where consecutive x values jump (a wrap), so lines are not drawn across the chart."""
    cut = np.nonzero(np.abs(np.diff(x)) > jump_deg)[0] + 1
    return np.insert(x, cut, np.nan), np.insert(y, cut, np.nan)


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
    centre = circular_mean_deg(all_az)
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
    if len(sun_tracks) < len(LINE_COLOURS):
        colours = [LINE_COLOURS[k + 1] for k in range(len(sun_tracks))]
    else:  # many divisions: an ordered sequence through the year from viridis
        colours = [colormaps["viridis"](v) for v in np.linspace(0.0, 0.9, len(sun_tracks))]
    for k, (label, az, alt) in enumerate(sun_tracks):
        x, y = _break_jumps(centred_azimuth(np.asarray(az, dtype=float), centre), np.asarray(alt, dtype=float))
        colour = colours[k]
        ax.plot(x, y, color=colour, lw=1.4, label=f"Sun, {label}")
    ax.set_xlim(x_low, x_high)
    ax.set_ylim(y_low, y_high)
    ax.xaxis.set_major_formatter(lambda v, _pos: f"{v % 360:.0f}°")
    ax.set_xlabel("Azimuth (degrees from true north, clockwise)")
    ax.set_ylabel("Altitude (degrees)")
    ax.grid(True, lw=0.4, alpha=0.5)
    ax.legend(fontsize=7, loc="upper right", ncols=2 if len(sun_tracks) > 6 else 1)
    ax.set_title(title or "Sky seen through the opening, with the Sun's path on the division days")
    return fig


def target_plane(points_enu_m: np.ndarray, facing_enu: np.ndarray | None = None) -> tuple[np.ndarray, np.ndarray]:
    """The target's own plane: (origin (3,), axes (2, 3)), as seen from the side it faces.

    The plane's normal is the direction of least spread of the points (principal component
    analysis, Pearson 1901), turned toward ``facing_enu`` (e.g. the mean of the samples'
    normals) when given, else upward.  A wall (normal within 64° of horizontal) is drawn as a
    viewer in front of it sees it: first axis horizontal to the right, second axis up the wall.
    A floor or ceiling is drawn with east to the right and north (or south, for a ceiling
    seen from below) up.  The origin is the points' mean.

    >>> origin, axes = target_plane(np.array([[0, 0, 0], [2, 0, 0], [0, 0, 1], [2, 0, 1.0]]), [0, -1, 0])
    >>> axes.round(6).tolist()   # a wall facing south: east to the right, up the wall
    [[1.0, 0.0, 0.0], [0.0, 0.0, 1.0]]
    """
    pts = np.asarray(points_enu_m, dtype=float)
    if pts.ndim != 2 or pts.shape[1] != 3 or pts.shape[0] < 3:
        raise InputError("light patch: target points must be an (N, 3) array with N ≥ 3")
    origin = pts.mean(axis=0)
    _, _, vt = np.linalg.svd(pts - origin, full_matrices=False)  # Pearson (1901): principal axes
    normal = vt[2]
    toward = np.array([0.0, 0.0, 1.0]) if facing_enu is None else np.asarray(facing_enu, dtype=float)
    if normal @ toward < 0:
        normal = -normal
    up = np.array([0.0, 0.0, 1.0])
    if abs(normal[2]) < 0.9:
        right = np.cross(up, normal)  # viewer looks along −normal: right = up × normal
        right /= np.linalg.norm(right)
    else:
        right = np.array([1.0, 0.0, 0.0])
    return origin, np.stack([right, np.cross(normal, right)])


def flatten_target(points_enu_m: np.ndarray) -> np.ndarray:
    """Target sample points (N, 3; East-North-Up, metres) → (N, 2) coordinates in the target's plane, metres.

    See :func:`target_plane` for the axes.
    """
    origin, axes = target_plane(points_enu_m)
    return (np.asarray(points_enu_m, dtype=float) - origin) @ axes.T


def _inside_triangles(px: np.ndarray, tri_uv: np.ndarray, chunk: int = 2_000_000) -> np.ndarray:
    """Which points (M, 2) lie in any of the triangles (T, 3, 2): barycentric signs, in chunks."""
    inside = np.zeros(len(px), dtype=bool)
    a, b, c = tri_uv[:, 0], tri_uv[:, 1], tri_uv[:, 2]
    v0, v1 = b - a, c - a
    den = v0[:, 0] * v1[:, 1] - v0[:, 1] * v1[:, 0]
    ok = np.abs(den) > 1e-15
    a, v0, v1, den = a[ok], v0[ok], v1[ok], den[ok]
    step = max(1, chunk // max(len(a), 1))
    for k in range(0, len(px), step):
        p = px[k : k + step, None, :] - a[None, :, :]
        s = (p[..., 0] * v1[None, :, 1] - p[..., 1] * v1[None, :, 0]) / den
        t = (v0[None, :, 0] * p[..., 1] - v0[None, :, 1] * p[..., 0]) / den
        inside[k : k + step] = ((s >= -1e-9) & (t >= -1e-9) & (s + t <= 1 + 1e-9)).any(axis=1)
    return inside


def light_patch_figure(
    points_enu_m: np.ndarray,
    lit: np.ndarray,
    labels: Sequence[str],
    *,
    title: str | None = None,
    columns: int = 3,
    area_m2: np.ndarray | None = None,
    triangles_enu_m: np.ndarray | None = None,
    facing_enu: np.ndarray | None = None,
) -> Figure:
    """A strip of frames: the target laid flat, lit parts bright, at each instant.

    Parameters
    ----------
    points_enu_m : (N, 3) target sample points, East-North-Up metres.
    lit : (F, N) booleans, True where sample n is lit in frame f.
    labels : F frame labels (e.g. local apparent times ``"07:42"``).
    title : the figure title.
    columns : frames per row.
    area_m2 : (N,) area each sample stands for (m²), to give each frame's lit share by area.
    triangles_enu_m : (T, 3, 3) the target's triangles (ENU metres), to draw its true outline; without
        them the outline is guessed from the samples' spacing.
    facing_enu : the direction the target faces (e.g. mean sample normal), for the side it is seen from.

    Each pixel takes the state of its nearest sample, so the frames show patches rather than dots.
    """
    lit = np.atleast_2d(np.asarray(lit, dtype=bool))
    origin, plane_axes = target_plane(points_enu_m, facing_enu)
    uv = (np.asarray(points_enu_m, dtype=float) - origin) @ plane_axes.T
    weights = None if area_m2 is None else np.asarray(area_m2, dtype=float)
    if lit.shape[1] != uv.shape[0] or lit.shape[0] != len(labels):
        raise InputError(f"light patch: lit flags {lit.shape} do not match {len(labels)} frames × {uv.shape[0]} points")
    frames = lit.shape[0]
    cols = max(1, min(columns, frames))
    rows = int(np.ceil(frames / cols))
    span = np.ptp(uv, axis=0)
    aspect = float(span[1] / span[0]) if span[0] > 0 else 1.0
    fig = new_figure(2.6 * cols + 0.6, max(2.0, 2.6 * cols * aspect / cols) * rows + 0.8)
    axes = fig.subplots(rows, cols, squeeze=False, sharex=True, sharey=True)
    # Each pixel shows its nearest sample (a Voronoi picture of the samples), blank away from the target.
    from matplotlib.colors import ListedColormap
    from scipy.spatial import cKDTree

    tree = cKDTree(uv)
    # Typical distance between samples: the side of the square each one stands for when areas are given,
    # else the 95th percentile of nearest-neighbour distances (the target's stratified samples leave few gaps).
    if weights is not None and weights.sum() > 0:
        spacing = float(np.sqrt(weights.sum() / uv.shape[0]))
    else:
        spacing = float(np.percentile(tree.query(uv, k=2)[0][:, 1], 95)) if uv.shape[0] > 1 else 1.0
    tri_uv = None
    if triangles_enu_m is not None and len(triangles_enu_m) <= 50_000:
        tri_uv = (np.asarray(triangles_enu_m, dtype=float).reshape(-1, 3) - origin) @ plane_axes.T
        tri_uv = tri_uv.reshape(-1, 3, 2)
        low, high = tri_uv.reshape(-1, 2).min(axis=0), tri_uv.reshape(-1, 2).max(axis=0)
    else:
        low, high = uv.min(axis=0) - spacing / 2, uv.max(axis=0) + spacing / 2
    nx = 240
    ny = max(8, int(round(nx * (high[1] - low[1]) / max(high[0] - low[0], 1e-12))))
    gx, gy = np.meshgrid(np.linspace(low[0], high[0], nx), np.linspace(low[1], high[1], ny))
    pixels = np.column_stack([gx.ravel(), gy.ravel()])
    dist, nearest = tree.query(pixels)
    inside = (_inside_triangles(pixels, tri_uv) if tri_uv is not None else dist <= spacing).reshape(gx.shape)
    nearest = nearest.reshape(gx.shape)
    cmap = ListedColormap(["#3b3b4f", "#FDE725"])  # unlit, lit: the ends of viridis' lightness range
    extent = (low[0], high[0], low[1], high[1])
    for f, ax in enumerate(axes.flat):
        if f >= frames:
            ax.set_axis_off()
            continue
        picture = np.where(inside, lit[f][nearest].astype(float), np.nan)
        ax.imshow(picture, origin="lower", extent=extent, cmap=cmap, vmin=0, vmax=1, interpolation="nearest")
        ax.set_aspect("equal")
        area_share = lit[f].mean() if weights is None else float(weights[lit[f]].sum() / weights.sum())
        ax.set_title(f"{labels[f]} — {area_share:.0%} lit", fontsize=8)
        ax.set_facecolor("white")
    wall = abs(np.cross(plane_axes[0], plane_axes[1])[2]) < 0.9
    for ax in axes[-1]:
        ax.set_xlabel("Along the target, level (m)" if wall else "East (m)")
    for ax in axes[:, 0]:
        ax.set_ylabel("Up the target (m)" if wall else "North on the target (m)")
    fig.suptitle(
        title or "Where the light falls on the target (target laid flat in its own plane; lit parts in yellow)"
    )
    return fig
