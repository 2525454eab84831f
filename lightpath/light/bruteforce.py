"""The reference path: a ray from every sample toward points of the Sun's disc at every instant.

No sky window, no convolution, no interpolation: for each instant and sample
the disc is sampled with a fixed equal-area pattern of points (Vogel's
sunflower spiral), a ray is cast toward each point, and the point counts as
seen if the ray escapes the mesh and the point is above the horizon profile.
The visible fraction is the share of points seen, so it moves in steps of
1/K: ``first-gleam`` is one point seen, ``half-disc`` half of them,
``full-disc`` all of them.  The outermost points sit at 0.99 of the radius, so
first gleam here comes up to ~0.01 × 0.27° (≈ 1 s of time) late.

It is thousands of times slower than the window path for long sweeps; the
tests and ``benchmarks/bench_scan.py`` compare the two.  Instants can be
restricted to those when the Sun is above the horizon and (with an opening)
within the opening's angular reach from the target — pure geometry, no window.

>>> p = disc_pattern(7)
>>> p.shape, bool(np.all(np.hypot(p[:, 0], p[:, 1]) < 1.0))
((7, 2), True)

References
----------
Vogel, H. (1979). A better way to construct the sunflower head. *Mathematical
Biosciences* 44, 179-189 (the equal-area spiral of points).
"""

from __future__ import annotations

import math

import numpy as np
import trimesh
from numpy.typing import ArrayLike, NDArray

from lightpath.light.disc import CRITERIA, SEMIDIAMETER_DEG
from lightpath.light.rays import RayCaster, origin_offset_m
from lightpath.light.window import ALTITUDE_FLOOR_DEG

__all__ = ["brute_force_fraction", "brute_force_lit_area", "disc_pattern", "opening_reach"]

#: Rays per batch handed to the ray caster.
BATCH_RAYS = 2_000_000


def disc_pattern(count: int = 64) -> NDArray:
    """(count, 2) points of the unit disc, equal area each (Vogel 1979), in units of the radius."""
    k = np.arange(count) + 0.5
    r = np.sqrt(k / count)  # equal-area radii
    theta = k * math.pi * (3.0 - math.sqrt(5.0))  # golden angle
    return np.column_stack([r * np.cos(theta), r * np.sin(theta)])


def _disc_directions(sun_enu: NDArray, pattern: NDArray, semidiameter_deg: float) -> NDArray:
    """(M, K, 3) unit directions toward the pattern's points on the disc around each Sun direction."""
    s = sun_enu / np.linalg.norm(sun_enu, axis=1, keepdims=True)
    helper = np.where(np.abs(s[:, 2:3]) < 0.9, [[0.0, 0.0, 1.0]], [[1.0, 0.0, 0.0]])
    u = np.cross(helper, s)
    u /= np.linalg.norm(u, axis=1, keepdims=True)
    v = np.cross(s, u)
    t = math.tan(math.radians(semidiameter_deg))
    d = s[:, None, :] + t * (pattern[None, :, 0:1] * u[:, None, :] + pattern[None, :, 1:2] * v[:, None, :])
    return d / np.linalg.norm(d, axis=2, keepdims=True)


def brute_force_fraction(
    mesh: trimesh.Trimesh,
    points_m: ArrayLike,
    normals: ArrayLike,
    sun_enu: ArrayLike,
    *,
    horizon=None,
    pattern: NDArray | None = None,
    semidiameter_deg: float = SEMIDIAMETER_DEG,
    caster: RayCaster | None = None,
) -> NDArray:
    """Visible fraction of the disc (M, S) by casting a ray per sample per disc point per instant.

    Parameters
    ----------
    mesh : blocking geometry, ENU metres.
    points_m, normals : (S, 3) samples and their unit normals (origins are offset by
        :func:`lightpath.light.rays.origin_offset_m` along them, as in the window path).
    sun_enu : (M, 3) apparent Sun directions.
    horizon : profile with ``altitude_at(az_deg)`` (apparent), or None (0°).
    pattern : (K, 2) disc points (default :func:`disc_pattern` (64)).
    """
    pts = np.asarray(points_m, float).reshape(-1, 3)
    nrm = np.asarray(normals, float).reshape(-1, 3)
    nrm = nrm / np.linalg.norm(nrm, axis=1, keepdims=True)
    pattern = disc_pattern() if pattern is None else np.asarray(pattern, float)
    caster = caster or RayCaster(mesh)
    origins = pts + origin_offset_m(mesh) * nrm
    sun = np.asarray(sun_enu, float).reshape(-1, 3)
    m_count, s_count, k_count = len(sun), len(pts), len(pattern)
    seen = np.zeros((m_count, s_count), np.int64)
    per = max(1, BATCH_RAYS // max(1, s_count * k_count))
    for a in range(0, m_count, per):
        dirs = _disc_directions(sun[a : a + per], pattern, semidiameter_deg)  # (m, K, 3)
        alt = np.degrees(np.arcsin(np.clip(dirs[..., 2], -1, 1)))
        az = np.degrees(np.arctan2(dirs[..., 0], dirs[..., 1])) % 360.0
        sky = alt > (0.0 if horizon is None else horizon.altitude_at(az))
        sky &= alt > ALTITUDE_FLOOR_DEG
        m = len(dirs)
        live = sky[:, None, :] & (np.einsum("mkc,sc->msk", dirs, nrm) > 0.0)  # (m, S, K)
        mi, si, ki = np.nonzero(live)
        ok = np.zeros(live.shape, bool)
        if mi.size:
            ok[mi, si, ki] = caster.escapes(origins[si], dirs[mi, ki])
        seen[a : a + m] = ok.sum(axis=2)
    return seen / k_count


def brute_force_lit_area(fraction: ArrayLike, area_m2: ArrayLike, criterion: str, k_count: int = 64) -> NDArray:
    """Lit area (M,) m² from brute-force fractions: first-gleam ≥ 1 point, half-disc ≥ ½, full-disc ≥ 0.99."""
    f = np.asarray(fraction, float)
    if criterion not in CRITERIA:
        raise ValueError(f"criterion {criterion!r} is not one of {', '.join(CRITERIA)}")
    threshold = {"first-gleam": 0.5 / k_count, "half-disc": 0.5, "full-disc": 0.99}[criterion]
    return (f >= threshold).astype(float) @ np.asarray(area_m2, float)


def opening_reach(points_m: ArrayLike, opening: trimesh.Trimesh, sun_enu: ArrayLike, margin_deg: float = 1.0):
    """(M,) bool: the Sun direction lies within the opening's bounding cone from some sample (+ margin).

    Geometry only (the opening's bounding sphere and the disc), used to skip
    instants at which no ray could pass the opening.
    """
    pts = np.asarray(points_m, float).reshape(-1, 3)
    v = np.asarray(opening.vertices, float)
    centre = 0.5 * (v.min(axis=0) + v.max(axis=0))
    radius = float(np.max(np.linalg.norm(v - centre, axis=1)))  # a sphere holding every corner
    to = centre[None, :] - pts
    dist = np.linalg.norm(to, axis=1)
    half = np.degrees(np.arcsin(np.clip(radius / np.maximum(dist, 1e-12), 0.0, 1.0)))
    half = np.where(dist <= radius, 180.0, half) + SEMIDIAMETER_DEG + margin_deg
    s = np.asarray(sun_enu, float).reshape(-1, 3)
    s = s / np.linalg.norm(s, axis=1, keepdims=True)
    unit = (to / dist[:, None]).T
    limit = np.cos(np.radians(np.minimum(half, 180.0)))[None, :]
    out = np.zeros(len(s), bool)
    step = max(1, 4_000_000 // max(len(pts), 1))
    for a in range(0, len(s), step):  # (M, S) in chunks
        out[a : a + step] = np.any(s[a : a + step] @ unit >= limit, axis=1)
    return out
