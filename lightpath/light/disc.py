"""The Sun's disc against a sky window: how much of the disc each sample sees.

The fraction of the disc a sample sees is its escape mask convolved with the
disc, evaluated at the Sun's apparent direction.  The convolution is done once
per window on its grid (:func:`disc_fractions`), exactly for a uniform disc
row by row: the disc is an ellipse in (H, δ) cells with semi-axes
``r / cos δ`` and ``r``; each row of cells it crosses contributes the mask
integrated over a segment of equal area (cumulative sums, linear inside a cell).
Optional limb darkening uses the linear law I(μ) = 1 − u (1 − μ) (Milne 1921),
built as a stack of eight uniform discs (layer-cake decomposition).  Look-ups
are bilinear between cell centres.

The horizon profile is applied at look-up: the skyline is a straight line at the
profile's apparent altitude at the Sun's azimuth, and the part of the disc above
it is a circular segment (:func:`horizon_fraction`).  When the skyline cuts the
disc and the structure shows only part of it too, the fraction is that of the
disc points that pass **both** (the joint rule): the disc is cut into
:data:`JOINT_ROWS` strips parallel to the skyline, each strip's share of the disc
seen through the window is sampled at points along its middle (nearest cell of
the raw mask), and the strips count by their exact area above the skyline line.
The result is the window fraction scaled by the share of the window-visible disc
that stands above the skyline, so it equals the window fraction when the
skyline is below the disc and the segment when the window sees the whole disc.
Multiplying the two fractions instead over-counts when the opening sees only the
part of the disc the skyline hides (and under-counts the opposite case).

Criteria, on a sample's visible fraction f of the disc:

* ``first-gleam``: f > 0.001 (a thousandth of the disc, to stay clear of
  rounding; the limb is then ≈ 0.004° inside the sky, about 1 s of time);
* ``half-disc``: f ≥ 0.5;
* ``full-disc``: f ≥ 0.99 (the mask's cells round the disc's edge; 1 % of the
  disc is a segment ≈ 0.017° deep, about 4 s of time).

>>> import numpy as np
>>> round(float(horizon_fraction(0.0, 0.0)), 3)          # centre on the horizon line: half the disc
0.5
>>> [float(x) for x in horizon_fraction([1.0, -1.0], 0.0)]
[1.0, 0.0]

References
----------
Milne, E. A. (1921). Radiative equilibrium in the outer layers of a star.
*MNRAS* 81, 361-375 (the linear limb-darkening law).
Cox, A. N., ed. (2000). *Allen's Astrophysical Quantities*, 4th ed., Springer,
§14.7 (solar limb darkening; u ≈ 0.6 in visible light, from memory).
Auwers, A. (1891). Der Sonnendurchmesser. *Astron. Nachr.* 128, 361 (solar
radius 959.63″ at 1 au, used as the mean semidiameter).
"""

from __future__ import annotations

import math

import numpy as np
from numpy.typing import ArrayLike, NDArray

from lightpath.light.grid import hadec_from_enu
from lightpath.light.joint import JOINT_ROWS, joint_ratio
from lightpath.light.joint import strip_area as _strip_area
from lightpath.light.window import SkyWindow

__all__ = [
    "CRITERIA",
    "CRITERION_EDGE",
    "JOINT_ROWS",
    "LIMB_DARKENING_U",
    "SEMIDIAMETER_DEG",
    "disc_fraction",
    "disc_fractions",
    "horizon_fraction",
    "lit_area",
    "lit_area_weighted",
    "meets",
]

#: Visible-fraction thresholds of the criteria (see the module notes).
CRITERIA = {"first-gleam": 1e-3, "half-disc": 0.5, "full-disc": 0.99}
#: Mean semidiameter of the Sun, degrees: 959.63″ at 1 au (Auwers 1891); it varies ±1.7 % over the year.
SEMIDIAMETER_DEG = 959.63 / 3600.0
#: Linear limb-darkening coefficient for visible light (Cox 2000, from memory).
LIMB_DARKENING_U = 0.6


def _uniform_fractions(window: SkyWindow, radius_deg: float) -> NDArray:
    """Fraction (S, nh, nd) float32 of a uniform disc of ``radius_deg`` centred on each cell that sees sky."""
    mask = window.escape.astype(np.float32)
    s_count, nh, nd = mask.shape
    res = window.grid.resolution_deg
    r_d = radius_deg / res  # semi-axis in δ cells
    cos_max = math.cos(math.radians(window.grid.declination_limit_deg))
    pad = int(math.ceil(r_d / cos_max)) + 2
    width = nh + 2 * pad + 1  # cumulative sums along H, one leading zero
    cum = np.zeros((s_count, nd, width), np.float32)  # rows contiguous in H; exact: counts below 2**24
    np.cumsum(mask.transpose(0, 2, 1), axis=2, out=cum[:, :, pad + 1 : pad + 1 + nh])
    cum[:, :, pad + 1 + nh :] = cum[:, :, pad + nh : pad + nh + 1]
    flat = cum.reshape(-1)
    rows = int(math.ceil(r_d + 0.5))
    # only output rows with sky within the disc's reach can differ from 0
    near = mask.any(axis=1)
    reach = np.zeros_like(near)
    for dj in range(-rows, rows + 1):
        lo, hi = max(0, -dj), min(nd, nd - dj)
        if hi > lo:
            reach[:, lo:hi] |= near[:, lo + dj : hi + dj]
    s_p, j_p = np.nonzero(reach)
    out = np.zeros((s_count, nh, nd), np.float32)
    if s_p.size == 0:
        return out
    delta = np.radians(window.grid.d_center(window.d0[s_p] + j_p))
    r_h = r_d / np.cos(delta)  # semi-axis in H cells, per output row
    acc = np.zeros((s_p.size, nh), np.float32)
    col = np.arange(nh, dtype=np.int64)[None, :]
    for dj in range(-rows, rows + 1):
        t0, t1 = (dj - 0.5) / r_d, (dj + 0.5) / r_d
        if t0 >= 1.0 or t1 <= -1.0:
            continue
        sel = np.flatnonzero((j_p + dj >= 0) & (j_p + dj < nd))
        if sel.size == 0:
            continue
        height = (min(t1, 1.0) - max(t0, -1.0)) * r_d
        # this strip's share of the ellipse as a segment of equal area, half-length a (cells)
        a = r_h[sel] * r_d * _strip_area(np.float64(t0), np.float64(t1)) / (2.0 * height)
        row_start = (s_p[sel] * nd + j_p[sel] + dj) * width
        strip = np.zeros((sel.size, nh), np.float32)
        for sign in (1.0, -1.0):
            # the segment's end for output cell i sits at i + pad + 0.5 ± a = i + K + f
            x = pad + 0.5 + sign * a
            k = np.floor(x).astype(np.int64)
            f = (x - k).astype(np.float32)[:, None]
            idx = (row_start + k)[:, None] + col
            c0 = np.take(flat, idx)
            c1 = np.take(flat, idx + 1)
            strip += np.float32(sign) * (c0 + f * (c1 - c0))
        acc[sel] += np.float32(height) * strip
    acc /= (math.pi * r_h * r_d).astype(np.float32)[:, None]
    out[s_p, :, j_p] = np.clip(acc, 0.0, 1.0)
    return out


def disc_fractions(
    window: SkyWindow, semidiameter_deg: float = SEMIDIAMETER_DEG, limb_darkening_u: float | None = None
) -> NDArray:
    """Visible fraction of the disc (S, nh, nd), float32, with the disc centred on each window cell.

    Parameters
    ----------
    window : the sky window (raw escape mask).
    semidiameter_deg : the Sun's apparent semidiameter, degrees.
    limb_darkening_u : linear limb-darkening coefficient (e.g. :data:`LIMB_DARKENING_U`), or None (uniform).

    Cached on the window for each (semidiameter, u).
    """
    key = (round(float(semidiameter_deg), 9), None if limb_darkening_u is None else float(limb_darkening_u))
    if key in window.derived:
        return window.derived[key]
    if limb_darkening_u is None:
        frac = _uniform_fractions(window, semidiameter_deg)
    else:
        u = float(limb_darkening_u)
        # Layer-cake: I(ρ) = 1 − u(1 − √(1 − ρ²)) = (1 − u) + Σ dy·[ρ ≤ ρ_k]; ρ_k where I = level y_k.
        n = 8
        levels = 1.0 - u + u * (np.arange(n) + 0.5) / n
        mu = (levels - (1.0 - u)) / u
        rho = np.sqrt(np.clip(1.0 - mu * mu, 0.0, 1.0))
        weights = np.concatenate([[1.0 - u], np.full(n, u / n)]) * np.concatenate([[1.0], rho * rho])
        radii = np.concatenate([[1.0], rho])
        frac = np.zeros(window.escape.shape, np.float32)
        for w, r in zip(weights, radii, strict=True):
            if r * semidiameter_deg > 0.25 * window.grid.resolution_deg:
                frac += np.float32(w) * _uniform_fractions(window, r * semidiameter_deg)
            else:  # a disc smaller than a cell: the cell's own mask
                frac += np.float32(w) * window.escape.astype(np.float32)
        frac /= np.float32(weights.sum())
    window.derived[key] = frac
    return frac


def horizon_fraction(
    altitude_deg: ArrayLike, horizon_deg: ArrayLike, semidiameter_deg: float = SEMIDIAMETER_DEG
) -> NDArray:
    """Fraction of a uniform disc whose centre is at apparent ``altitude_deg`` above a straight horizon line.

    A circular segment: f = 1 − (acos z − z √(1 − z²)) / π with z = (altitude − horizon) / semidiameter.
    """
    z = np.clip((np.asarray(altitude_deg, float) - np.asarray(horizon_deg, float)) / semidiameter_deg, -1.0, 1.0)
    return 1.0 - (np.arccos(z) - z * np.sqrt(1.0 - z * z)) / math.pi


def _horizon_altitude(window: SkyWindow, azimuth_deg: NDArray, offset_deg: float) -> NDArray:
    horizon = getattr(window, "horizon", None)
    base = np.zeros_like(azimuth_deg) if horizon is None else np.asarray(horizon.altitude_at(azimuth_deg), float)
    return base + offset_deg


def disc_fraction(
    window: SkyWindow,
    sun_enu: ArrayLike,
    *,
    rotation: ArrayLike | None = None,
    horizon_offset_deg: float = 0.0,
    semidiameter_deg: float = SEMIDIAMETER_DEG,
    limb_darkening_u: float | None = None,
    edge: str | None = None,
) -> NDArray:
    """Visible fraction of the disc (M, S) for apparent Sun directions ``sun_enu`` (M, 3), ENU.

    ``rotation`` (3×3) rotates the whole structure about the target: the look-up
    is then at Rᵀ·s.  The horizon (``window.horizon``, apparent altitudes, raised
    by ``horizon_offset_deg``) stays put.

    ``edge`` chooses what is interpolated between cell centres.  Where the disc
    just enters (or just leaves) the sky, the fraction grows as depth^1.5 (a
    circular segment), so straight bilinear interpolation of it would put first
    gleam up to a cell early.  ``"low"`` interpolates f^(2/3) (linear in the
    limb's depth: for ``first-gleam``), ``"high"`` interpolates (1 − f)^(2/3)
    (for ``full-disc``), None interpolates f itself.
    """
    s = np.asarray(sun_enu, dtype=np.float64).reshape(-1, 3)
    s = s / np.linalg.norm(s, axis=1, keepdims=True)
    frac = _edge_table(window, semidiameter_deg, limb_darkening_u, edge)
    altitude = np.degrees(np.arcsin(np.clip(s[:, 2], -1.0, 1.0)))
    azimuth = np.degrees(np.arctan2(s[:, 0], s[:, 1])) % 360.0
    hfac = horizon_fraction(altitude, _horizon_altitude(window, azimuth, horizon_offset_deg), semidiameter_deg)
    look = s if rotation is None else s @ np.asarray(rotation, dtype=np.float64)  # rows of Rᵀ·s
    h, d = hadec_from_enu(window.grid.latitude_deg, look)
    fh, fd = window.grid.fractional_index(h, d)
    s_count, nh, nd = frac.shape
    out = np.zeros((len(s), s_count), np.float64)
    flat = frac.reshape(-1)
    n_h, wrap = window.grid.n_h, window.wrap_cells
    indptr, members = _sample_blocks(window, semidiameter_deg, limb_darkening_u)
    # the samples that can see part of the disc from each instant's block of cells, as (instant, sample) pairs
    i_glob = np.floor(fh).astype(np.int64)
    j_glob = np.floor(fd).astype(np.int64)
    live = (j_glob >= -1) & (j_glob < window.grid.n_d) & (hfac > 0)
    block = np.where(live, (np.mod(i_glob, n_h) // BLOCK_CELLS) * _n_blocks_d(window) + (j_glob + 1) // BLOCK_CELLS, 0)
    counts = np.where(live, indptr[block + 1] - indptr[block], 0)
    total = int(counts.sum())
    if total == 0:
        return out
    m = np.repeat(np.arange(len(s)), counts)
    first = np.repeat(indptr[block] - (np.cumsum(counts) - counts), counts)
    k = members[first + np.arange(total)]
    lh = np.mod(fh[m] - window.h0[k] - wrap, n_h) + wrap
    ld = fd[m] - window.d0[k]
    ok = (lh >= 0) & (lh < nh - 1) & (ld >= 0) & (ld < nd - 1)
    m, k, x, y = m[ok], k[ok], lh[ok], ld[ok]
    i0, j0 = x.astype(np.int64), y.astype(np.int64)
    fi, fj = x - i0, y - j0
    base = k * (nh * nd) + i0 * nd + j0
    f00, f01 = np.take(flat, base), np.take(flat, base + 1)
    f10, f11 = np.take(flat, base + nd), np.take(flat, base + nd + 1)
    val = (f00 * (1 - fi) + f10 * fi) * (1 - fj) + (f01 * (1 - fi) + f11 * fi) * fj
    if edge == "low":
        val = val**1.5
    elif edge == "high":
        val = 1.0 - val**1.5
    factor = hfac[m]
    both = (factor > 0.0) & (factor < 1.0) & (val > 0.0) & (val < 1.0)  # skyline and structure both cut the disc
    if np.any(both):
        z = (_horizon_altitude(window, azimuth, horizon_offset_deg) - altitude) / semidiameter_deg
        ratio = joint_ratio(window, s[m[both]], k[both], z[m[both]], rotation, semidiameter_deg)
        factor = factor.copy()
        factor[both] = np.where(np.isnan(ratio), factor[both], ratio)
    out[m, k] = val * factor
    return out


#: Side of the blocks of cells (in cells) by which samples are indexed for look-ups.
BLOCK_CELLS = 8


def _n_blocks_d(window: SkyWindow) -> int:
    return (window.grid.n_d + 1) // BLOCK_CELLS + 1


def _sample_blocks(window: SkyWindow, semidiameter_deg: float, limb_darkening_u: float | None):
    """CSR index (indptr, samples): for each block of cells, the samples whose disc fraction can be > 0 there.

    A sample is listed in every block holding a cell (i0, j0) whose bilinear corners touch its cells with
    fraction > 0.  Cached on the window.
    """
    key = ("blocks", round(float(semidiameter_deg), 9), limb_darkening_u)
    if key in window.derived:
        return window.derived[key]
    frac = disc_fractions(window, semidiameter_deg, limb_darkening_u)
    g, b = window.grid, BLOCK_CELLS
    n_bh, n_bd = -(-g.n_h // b), _n_blocks_d(window)
    rows: list[NDArray] = []
    owners: list[NDArray] = []
    any_h = (frac > 0).any(axis=2)
    any_d = (frac > 0).any(axis=1)
    for s in range(frac.shape[0]):  # one small step per sample, once per window
        ih = np.flatnonzero(any_h[s])
        jd = np.flatnonzero(any_d[s])
        if ih.size == 0:
            continue
        g_lo, g_hi = window.h0[s] + ih[0] - 1, window.h0[s] + ih[-1]
        if g_hi - g_lo + 1 >= g.n_h:
            hb = np.arange(n_bh)
        else:
            hb = np.unique(np.mod(np.arange(g_lo, g_hi + 1), g.n_h) // b)
        j_lo, j_hi = window.d0[s] + jd[0] - 1, window.d0[s] + jd[-1]
        db = np.arange((max(j_lo, -1) + 1) // b, (min(j_hi, g.n_d - 1) + 1) // b + 1)
        cells = (hb[:, None] * n_bd + db[None, :]).ravel()
        rows.append(cells)
        owners.append(np.full(cells.size, s, dtype=np.int64))
    if rows:
        cells = np.concatenate(rows)
        who = np.concatenate(owners)
        order = np.argsort(cells, kind="stable")
        cells, who = cells[order], who[order]
        indptr = np.searchsorted(cells, np.arange(n_bh * n_bd + 1))
    else:
        who = np.zeros(0, np.int64)
        indptr = np.zeros(n_bh * n_bd + 1, np.int64)
    window.derived[key] = (indptr.astype(np.int64), who)
    return window.derived[key]


#: Which end of the fraction each criterion tests, for :func:`disc_fraction`'s ``edge``.
CRITERION_EDGE = {"first-gleam": "low", "half-disc": None, "full-disc": "high"}


def _edge_table(window: SkyWindow, semidiameter_deg: float, limb_darkening_u: float | None, edge: str | None):
    frac = disc_fractions(window, semidiameter_deg, limb_darkening_u)
    if edge is None:
        return frac
    if edge not in ("low", "high"):
        raise ValueError(f"edge {edge!r} is not one of low, high, None")
    key = ("edge", edge, round(float(semidiameter_deg), 9), limb_darkening_u)
    if key not in window.derived:
        base = frac if edge == "low" else 1.0 - frac
        window.derived[key] = np.power(np.clip(base, 0.0, 1.0), np.float32(2.0 / 3.0)).astype(np.float32)
    return window.derived[key]


def meets(fraction: ArrayLike, criterion: str) -> NDArray[np.bool_]:
    """Whether visible fractions meet ``criterion`` (``first-gleam``, ``half-disc``, ``full-disc``)."""
    if criterion not in CRITERIA:
        from lightpath.errors import InputError

        raise InputError(f"criterion {criterion!r} is not one of {', '.join(CRITERIA)}")
    f = np.asarray(fraction)
    threshold = CRITERIA[criterion]
    return f > threshold if criterion == "first-gleam" else f >= threshold


def lit_area(
    window: SkyWindow,
    sun_enu: ArrayLike,
    criterion: str,
    *,
    rotation: ArrayLike | None = None,
    horizon_offset_deg: float = 0.0,
    limb_darkening_u: float | None = None,
) -> NDArray:
    """Target area lit (m²) at each apparent Sun direction (M, 3): Σ area of samples meeting ``criterion``.

    ``rotation`` (3×3) rotates the structure about the target (look-up at Rᵀ·s);
    ``horizon_offset_deg`` raises the horizon profile (degrees).
    """
    meets(0.0, criterion)  # checks the name
    f = disc_fraction(
        window,
        sun_enu,
        rotation=rotation,
        horizon_offset_deg=horizon_offset_deg,
        limb_darkening_u=limb_darkening_u,
        edge=CRITERION_EDGE[criterion],
    )
    return meets(f, criterion).astype(np.float64) @ window.area_m2


def lit_area_weighted(
    window: SkyWindow,
    sun_enu: ArrayLike,
    *,
    rotation: ArrayLike | None = None,
    horizon_offset_deg: float = 0.0,
    limb_darkening_u: float | None = None,
) -> NDArray:
    """Disc-weighted lit area (M,), m²: Σ area × visible fraction of the disc."""
    f = disc_fraction(
        window, sun_enu, rotation=rotation, horizon_offset_deg=horizon_offset_deg, limb_darkening_u=limb_darkening_u
    )
    return f @ window.area_m2
