"""Sweeping the Sun across a sky window: every interval of light between two instants.

Coarse to fine, so that a year costs a few thousand look-ups instead of half a million:

1. **days** — the Sun's declination every 6 hours; a 6-hour span is kept only
   if some sample's window reaches that declination (± 0.1° of daily motion,
   ± 1° for refraction, which moves the apparent direction off the geometric
   small circle, plus the angle of any ``rotation``);
2. **coarse** — in kept spans, the Sun every ``coarse_min`` minutes (10); an
   instant is kept if the union of all windows, widened by the Sun's motion in
   one coarse step (0.25° of hour angle per minute), contains its direction;
3. **fine** — around kept instants, the lit area every ``step_min`` minutes (1),
   and, around each unlit local maximum of the best-placed sample's visible
   fraction, three more samples each side (every 15 s by default), so light
   briefer than a step is found when any part of the disc shows at a sample;
4. **refine** — each start and end is bisected on the lit area itself down to
   ``tolerance_s`` seconds (5 s).

A light interval shorter than ``step_min`` / 4 between fine samples, or one of a
first gleam whose disc shows at no fine sample at all (a graze of a corner of
the window), can be missed.

The Sun is given as a function ``sun(jd_tt) → positions`` with array
attributes ``azimuth_deg`` (true north, clockwise), ``altitude_deg`` (apparent)
and ``declination_deg`` — :func:`lightpath.sky.sun.sun_position` bound to an
observer — so the search here knows nothing of ephemerides.
"""

from __future__ import annotations

import math
from collections.abc import Callable
from dataclasses import dataclass

import numpy as np
from numpy.typing import ArrayLike, NDArray
from scipy.ndimage import maximum_filter1d

from lightpath.light.disc import CRITERION_EDGE, SEMIDIAMETER_DEG, disc_fraction, disc_fractions, meets
from lightpath.light.grid import hadec_from_enu
from lightpath.light.search import bisect_crossings, runs_above
from lightpath.light.window import SkyWindow
from lightpath.sky.vectors import enu_from_azalt

__all__ = ["LightInterval", "find_light", "lit_areas", "sun_enu", "union_map"]

MINUTE_D = 1.0 / 1440.0
#: Apparent motion of the Sun in the site's hour angle, degrees per minute (360° per solar day).
H_RATE_DEG_PER_MIN = 0.25
#: Extra samples each side of an unlit local maximum of the best sample's fraction (every step / (PROBES + 1)).
PROBES = 3
#: Widening of the declination test for refraction near the horizon, degrees.
REFRACTION_SLOP_DEG = 1.0


@dataclass(frozen=True)
class LightInterval:
    """One interval of light (instants are Julian dates TT)."""

    start_jd_tt: float
    end_jd_tt: float
    peak_jd_tt: float
    peak_area_m2: float  # lit area by the criterion at the peak, m²
    peak_weighted_m2: float  # disc-weighted lit area at the peak, m²


def sun_enu(sun: Callable, jd_tt: ArrayLike):
    """(positions, apparent unit directions (N, 3)) of the Sun at ``jd_tt``."""
    pos = sun(np.atleast_1d(np.asarray(jd_tt, dtype=np.float64)))
    return pos, enu_from_azalt(pos.azimuth_deg, pos.altitude_deg).reshape(-1, 3)


def union_map(
    window: SkyWindow, limb_darkening_u: float | None = None, semidiameter_deg: float = SEMIDIAMETER_DEG
) -> NDArray[np.bool_]:
    """(n_h, n_d) bool: cells of the whole grid where some sample sees part of the disc (radius in degrees)."""
    key = ("union", limb_darkening_u, float(semidiameter_deg))
    if key in window.derived:
        return window.derived[key]
    frac = disc_fractions(window, semidiameter_deg, limb_darkening_u)
    g = window.grid
    union = np.zeros((g.n_h, g.n_d), bool)
    s, i, j = np.nonzero(frac > 0)
    k = np.mod(window.h0[s] + i, g.n_h)
    jj = window.d0[s] + j
    ok = (jj >= 0) & (jj < g.n_d)
    union[k[ok], jj[ok]] = True
    window.derived[key] = union
    return union


def _in_union(
    window: SkyWindow, directions: NDArray, rotation, limb_darkening_u, semidiameter_deg: float = SEMIDIAMETER_DEG
) -> NDArray[np.bool_]:
    """(M,) bool: the direction's cell, or one within 2 cells, is in the union of the windows."""
    g = window.grid
    key = ("union+2", limb_darkening_u, semidiameter_deg)
    if key not in window.derived:
        u = union_map(window, limb_darkening_u, semidiameter_deg).astype(np.uint8)
        u = maximum_filter1d(u, size=5, axis=0, mode="wrap")
        window.derived[key] = maximum_filter1d(u, size=5, axis=1) > 0
    grown = window.derived[key]
    look = directions if rotation is None else directions @ np.asarray(rotation, dtype=np.float64)
    fh, fd = g.fractional_index(*hadec_from_enu(g.latitude_deg, look))
    k = np.mod(np.rint(fh).astype(np.int64), g.n_h)
    j = np.rint(fd).astype(np.int64)
    out = np.zeros(len(look), bool)
    inside = (j >= 0) & (j < g.n_d)
    out[inside] = grown[k[inside], j[inside]]
    return out


def _widen_h(union: NDArray, cells: int) -> NDArray:
    """Union widened by ``cells`` along the (circular) hour-angle axis."""
    if cells <= 0:
        return union
    return maximum_filter1d(union.astype(np.uint8), size=2 * cells + 1, axis=0, mode="wrap").astype(bool)


def _rotation_angle_deg(rotation) -> float:
    if rotation is None:
        return 0.0
    r = np.asarray(rotation, dtype=np.float64)
    return math.degrees(math.acos(max(-1.0, min(1.0, (np.trace(r) - 1.0) / 2.0))))


def lit_areas(
    window: SkyWindow, directions: NDArray, criterion: str, *, with_max: bool = False, **lookup
) -> tuple[NDArray, ...]:
    """(lit area by the criterion, disc-weighted lit area), both (M,) m², for apparent directions (M, 3).

    With ``with_max`` also the largest visible fraction over the samples (M,).  The fractions are
    interpolated for the criterion's edge (:func:`lightpath.light.disc.disc_fraction`), the weighted area too.
    """
    f = disc_fraction(window, directions, edge=CRITERION_EDGE.get(criterion), **lookup)
    out = (meets(f, criterion).astype(np.float64) @ window.area_m2, f @ window.area_m2)
    return (*out, f.max(axis=1)) if with_max else out


def _merge(starts: NDArray, ends: NDArray) -> list[tuple[float, float]]:
    order = np.argsort(starts)
    out: list[list[float]] = []
    for a, b in zip(starts[order], ends[order], strict=True):
        if out and a <= out[-1][1]:
            out[-1][1] = max(out[-1][1], b)
        else:
            out.append([float(a), float(b)])
    return [(a, b) for a, b in out]


def find_light(
    window: SkyWindow,
    sun: Callable,
    jd_tt_start: float,
    jd_tt_end: float,
    criterion: str = "first-gleam",
    *,
    coarse_min: float = 10.0,
    step_min: float = 1.0,
    tolerance_s: float = 5.0,
    rotation: ArrayLike | None = None,
    horizon_offset_deg: float = 0.0,
    limb_darkening_u: float | None = None,
    semidiameter_deg: float = SEMIDIAMETER_DEG,
    screen_step_d: float = 0.25,
    screen_slop_deg: float = 0.1,
) -> list[LightInterval]:
    """Every interval of light on the target between two instants (Julian dates TT).

    Parameters
    ----------
    window : the sky window (with its ``horizon``).
    sun : ``sun(jd_tt) → positions`` (see the module notes).
    jd_tt_start, jd_tt_end : the span searched, Julian dates TT.
    criterion : ``first-gleam``, ``half-disc`` or ``full-disc``.
    coarse_min, step_min : coarse and fine sampling steps, minutes.
    tolerance_s : bisection tolerance for starts and ends, seconds.
    rotation, horizon_offset_deg, limb_darkening_u, semidiameter_deg : as in
        :func:`lightpath.light.disc.disc_fraction` (the disc's radius: the Sun's mean by default).
    screen_step_d, screen_slop_deg : the declination screen's step (days; 6 hours for the Sun, whose declination
        moves < 0.4° a day) and the declination change it allows within half a step (degrees; the Moon's
        track, :class:`lightpath.light.moontrack.MoonTrack`, gives an hour and 0.5°).

    Returns
    -------
    list of :class:`LightInterval` in time order.
    """
    lookup = {"rotation": rotation, "horizon_offset_deg": horizon_offset_deg, "limb_darkening_u": limb_darkening_u}
    if semidiameter_deg != SEMIDIAMETER_DEG:  # the Sun's calls stay as they were
        lookup["semidiameter_deg"] = semidiameter_deg
    meets(0.0, criterion)  # validates the name
    g = window.grid
    union = union_map(window, limb_darkening_u, semidiameter_deg)
    if not union.any():
        return []
    # 1. days: declination test every 6 hours (the Sun)
    rows = union.any(axis=0)
    slop = screen_slop_deg + REFRACTION_SLOP_DEG + _rotation_angle_deg(rotation)
    rows = maximum_filter1d(rows.astype(np.uint8), size=2 * int(math.ceil(slop / g.resolution_deg)) + 1) > 0
    quarter = float(screen_step_d)
    tq = np.arange(jd_tt_start, jd_tt_end + quarter, quarter)
    pos_q = sun(tq)
    jq = np.floor((np.asarray(pos_q.declination_deg) + g.declination_limit_deg) / g.resolution_deg).astype(int)
    keep_q = rows[np.clip(jq, 0, g.n_d - 1)] & (jq >= -1) & (jq <= g.n_d)
    if not keep_q.any():
        return []
    spans = _merge(tq[keep_q] - quarter, tq[keep_q] + quarter)
    # 2. coarse
    coarse = coarse_min * MINUTE_D
    tc = np.concatenate([np.arange(a, b + coarse, coarse) for a, b in spans])
    tc = tc[(tc >= jd_tt_start - coarse) & (tc <= jd_tt_end + coarse)]
    pos_c, dirs_c = sun_enu(sun, tc)
    look = dirs_c if rotation is None else dirs_c @ np.asarray(rotation, dtype=np.float64)
    h, d = hadec_from_enu(g.latitude_deg, look)
    fh, fd = g.fractional_index(h, d)
    wkey = ("widened", limb_darkening_u, float(coarse_min), semidiameter_deg)
    if wkey not in window.derived:
        grown = _widen_h(union, int(math.ceil(coarse_min * H_RATE_DEG_PER_MIN / g.resolution_deg)) + 2)
        grown = maximum_filter1d(grown.astype(np.uint8), size=2 * int(math.ceil(0.3 / g.resolution_deg)) + 1, axis=1)
        window.derived[wkey] = grown > 0
    widened = window.derived[wkey]
    k = np.mod(np.rint(fh).astype(int), g.n_h)
    j = np.rint(fd).astype(int)
    inside = (j >= 0) & (j < g.n_d)
    keep_c = np.zeros(len(tc), bool)
    keep_c[inside] = widened[k[inside], j[inside]]
    if not keep_c.any():
        return []
    fine_spans = _merge(tc[keep_c] - coarse, tc[keep_c] + coarse)
    # 3. fine
    step = step_min * MINUTE_D
    segments = [np.arange(a, b + 0.5 * step, step) for a, b in fine_spans]
    tf = np.concatenate(segments)
    _, dirs_f = sun_enu(sun, tf)
    area_f, weighted_f, top_f = np.zeros(len(tf)), np.zeros(len(tf)), np.zeros(len(tf))
    # one look-up per instant, not per sample
    possible = _in_union(window, dirs_f, rotation, limb_darkening_u, semidiameter_deg)
    if possible.any():
        area_f[possible], weighted_f[possible], top_f[possible] = lit_areas(
            window, dirs_f[possible], criterion, with_max=True, **lookup
        )
    # probe around unlit local maxima of the best sample's fraction: light shorter than a step hides there
    seg_id = np.repeat(np.arange(len(segments)), [len(x) for x in segments])
    inner = np.zeros(len(tf), bool)
    inner[1:-1] = (top_f[1:-1] >= top_f[:-2]) & (top_f[1:-1] >= top_f[2:]) & (seg_id[:-2] == seg_id[2:])
    probe = inner & (area_f == 0.0) & (top_f > 0.0)
    if probe.any():
        sub = (np.arange(-PROBES, PROBES + 1) / (PROBES + 1.0))[None, :] * step
        sub = sub[:, np.arange(sub.shape[1]) != PROBES]
        tp = (tf[probe][:, None] + sub).ravel()
        ip = np.repeat(seg_id[probe], sub.shape[1])
        _, dirs_p = sun_enu(sun, tp)
        area_p, weighted_p = lit_areas(window, dirs_p, criterion, **lookup)
        tf = np.concatenate([tf, tp])
        seg_id = np.concatenate([seg_id, ip])
        area_f = np.concatenate([area_f, area_p])
        weighted_f = np.concatenate([weighted_f, weighted_p])
        order = np.lexsort((tf, seg_id))
        tf, seg_id, area_f, weighted_f = tf[order], seg_id[order], area_f[order], weighted_f[order]
        segments = [tf[seg_id == k] for k in range(len(segments))]

    def area_at(t):
        _, dirs = sun_enu(sun, t)
        return lit_areas(window, dirs, criterion, **lookup)[0]

    # 4. runs of light in each segment, then every start and end bisected at once
    runs: list[tuple[int, int]] = []
    seg_first: list[bool] = []
    seg_last: list[bool] = []
    offset = 0
    for seg in segments:
        for first, last in runs_above(area_f[offset : offset + len(seg)], 0.0):
            runs.append((first + offset, last + offset))
            seg_first.append(first == 0)
            seg_last.append(last == len(seg) - 1)
        offset += len(seg)
    if not runs:
        return []
    first_i = np.array([r[0] for r in runs])
    last_i = np.array([r[1] for r in runs])
    starts, ends = tf[first_i].copy(), tf[last_i].copy()
    tol = tolerance_s / 86400.0

    def lit(t):
        return area_at(t) > 0.0

    can_s = ~np.array(seg_first)
    can_e = ~np.array(seg_last)
    if can_s.any() or can_e.any():
        below = np.concatenate([tf[first_i[can_s] - 1], tf[last_i[can_e] + 1]])
        above = np.concatenate([tf[first_i[can_s]], tf[last_i[can_e]]])
        refined = bisect_crossings(lit, below, above, tol)
        starts[can_s] = refined[: can_s.sum()]
        ends[can_e] = refined[can_s.sum() :]
    out: list[LightInterval] = []
    for n, (first, last) in enumerate(runs):
        part_a, part_w = area_f[first : last + 1], weighted_f[first : last + 1]
        best = np.flatnonzero(part_a == part_a.max())
        peak = int(best[np.argmax(part_w[best])]) + first
        out.append(
            LightInterval(
                float(starts[n]), float(ends[n]), float(tf[peak]), float(area_f[peak]), float(weighted_f[peak])
            )
        )
    out = [x for x in out if x.end_jd_tt >= jd_tt_start and x.start_jd_tt <= jd_tt_end]
    return sorted(out, key=lambda x: x.start_jd_tt)
