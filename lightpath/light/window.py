"""Sky windows: for each target sample, the directions in which it sees open sky.

A sample's window is geometry alone, found once by ray casting and stored on the
site-fixed equatorial grid of :mod:`lightpath.light.grid`, so one window serves
every epoch (the Sun's track is a small circle of near-constant declination in
that grid).  Only the escape of rays from the mesh is stored (the *raw* mask);
the horizon profile is applied when the Sun is looked up
(:mod:`lightpath.light.disc`), so a new horizon needs no new rays.

Where rays are cast
-------------------
Each sample gets a box of (H, δ) cells, all boxes with one shape:

* **with an opening** (the scene's aperture mesh): the box the opening subtends
  from the sample (its vertices and points along its edges), plus a margin of
  0.4° + 2 cells for the Sun's disc.  Which cells' rays pass through the
  opening's pane is resolved coarse-to-fine (rays on a lattice whose step is
  under a third of the pane's narrowest angular width and under ``coarse_deg``,
  then every cell of the lattice squares whose corners disagree, and of their
  neighbours); every cell whose ray passes the pane is then cast against the
  mesh at full resolution, so thin slivers between thick walls are never
  inferred.  Light can only arrive through the opening in a closed model; a
  model with other holes must mark them as openings too.
* **without one**: a search pass casts rays on a lattice of ``search_deg``
  (1° by default) over the whole band; the box covers every escaping lattice
  ray plus two lattice steps and the margin, and every cell within two lattice
  steps of an escaping lattice ray is cast.  A patch of sky narrower than about
  ``search_deg`` that no lattice ray passes is missed: give the opening when you
  have it.

Resolution and minutes: the Sun moves 0.25° of hour angle per minute, so a
0.05° cell is 12 s of time; light start and end times carry about half a cell
of error from the mask's edges (median ≈ 6 s at 0.05°, 18 s at 0.1°; measured
in docs/engine.md).

>>> import numpy as np, trimesh
>>> tube = trimesh.creation.box(extents=(1.0, 1.0, 1.0))  # a closed cube: no sky at all
>>> w = compute_window(tube, [[0.0, 0.0, 0.0]], [[0.0, 0.0, 1.0]], [1.0], latitude_deg=50.0)
>>> bool(w.escape.any())
False

References
----------
Meeus, J. (1998). *Astronomical Algorithms*, 2nd ed., chapter 13 (the equatorial frame).
Wald, I. et al. (2014). Embree: a kernel framework for efficient CPU ray tracing.
*ACM Trans. Graphics* 33(4), 143.
"""

from __future__ import annotations

import hashlib
import io
import json
import math
from collections.abc import Callable
from dataclasses import dataclass, field
from pathlib import Path
from typing import TYPE_CHECKING

import numpy as np
from numpy.typing import ArrayLike, NDArray
from scipy.ndimage import maximum_filter

from lightpath.errors import InputError
from lightpath.files import write_atomic
from lightpath.light.grid import DECLINATION_LIMIT_DEG, SkyGrid, hadec_from_enu
from lightpath.light.rays import RayCaster, origin_offset_m

if TYPE_CHECKING:  # trimesh is needed only to build windows, not to read them (keeps workers light)
    import trimesh

__all__ = ["ALTITUDE_FLOOR_DEG", "SkyWindow", "compute_window", "load_window", "save_window", "window_key"]

#: Directions lower than this apparent altitude (degrees) are not cast: no horizon (dip included) is that low
#: below 10 km of elevation (dip ≈ 1.76′ √h[m], Bowditch 2002, Table 12).
ALTITUDE_FLOOR_DEG = -3.0
#: Box margin around the opening for the disc (semidiameter ≤ 0.272°) and refraction slop, degrees, plus 2 cells.
MARGIN_DEG = 0.4
#: Largest window stored: samples × cells per sample (1 byte each for the mask, 4 for the disc fractions).
MAX_CELLS = 200_000_000
#: Bumped when the window's meaning changes, so old cache files are not reused.
FORMAT_VERSION = 1


@dataclass
class SkyWindow:
    """The raw escape mask of every target sample on a site-fixed (H, δ) grid.

    ``escape[s, i, j]`` is True when a ray from sample ``s`` toward the centre of
    cell (``h0[s] + i`` mod ``grid.n_h``, ``d0[s] + j``) leaves the mesh.  Boxes
    that cover the whole circle of hour angle have ``wrap_cells`` > 0: they start
    ``wrap_cells`` cells before ``h0`` and repeat columns past 360°.
    """

    grid: SkyGrid
    points_m: NDArray  # (S, 3) sample positions, ENU metres
    normals: NDArray  # (S, 3) outward unit normals of the target at the samples
    area_m2: NDArray  # (S,) target area each sample stands for, m²
    h0: NDArray  # (S,) int64 first H cell of each box
    d0: NDArray  # (S,) int64 first δ cell of each box
    escape: NDArray  # (S, nh, nd) bool
    wrap_cells: int = 0
    offset_m: float = 0.0
    rays_cast: int = 0
    key: str = ""
    notes: list[str] = field(default_factory=list)
    horizon: object | None = None  # horizon profile (``.altitude_at(az_deg)``, apparent), applied at look-up
    derived: dict = field(default_factory=dict, repr=False, compare=False)  # tables made from the mask, by key

    @property
    def total_area_m2(self) -> float:
        """Area of the whole target, m²."""
        return float(np.sum(self.area_m2))

    @property
    def samples(self) -> int:
        return int(len(self.area_m2))

    @property
    def latitude_deg(self) -> float:
        return self.grid.latitude_deg

    @property
    def resolution_deg(self) -> float:
        return self.grid.resolution_deg


def _levels(coarse_deg: float, resolution_deg: float) -> tuple[int, ...]:
    k = 1
    while 2 * k * resolution_deg <= coarse_deg + 1e-9:
        k *= 2
    levels = []
    while k >= 1:
        levels.append(k)
        k //= 2
    return tuple(levels)


def _opening_points(opening: trimesh.Trimesh, per_edge: int = 8) -> NDArray:
    """The opening's vertices and points along its edges (great-circle bulges stay inside the box)."""
    v = np.asarray(opening.vertices, dtype=np.float64)
    edges = np.asarray(opening.edges_unique)
    t = np.linspace(0.0, 1.0, per_edge + 1)[1:-1]
    along = v[edges[:, 0], None, :] * (1 - t)[None, :, None] + v[edges[:, 1], None, :] * t[None, :, None]
    return np.vstack([v, along.reshape(-1, 3)])


def _boxes_from_directions(grid: SkyGrid, h_deg: NDArray, d_deg: NDArray, ok: NDArray, margin_deg: float):
    """Per-sample box (h0, width, d0, height, full) from direction samples (S, M) in degrees."""
    res = grid.resolution_deg
    s_count = h_deg.shape[0]
    h0 = np.zeros(s_count, np.int64)
    nh = np.zeros(s_count, np.int64)
    d0 = np.zeros(s_count, np.int64)
    nd = np.zeros(s_count, np.int64)
    full = np.zeros(s_count, bool)
    cosd = math.cos(math.radians(grid.declination_limit_deg))
    for s in range(s_count):  # one pass per sample over its few direction samples, not a hot path
        hs, ds = h_deg[s, ok[s]], d_deg[s, ok[s]]
        if hs.size == 0:
            continue
        order = np.sort(np.mod(hs, 360.0))
        gaps = np.diff(np.concatenate([order, order[:1] + 360.0]))
        g = int(np.argmax(gaps))
        start, span = order[(g + 1) % len(order)], 360.0 - gaps[g]
        m_h = margin_deg / cosd
        if span + 2 * m_h >= 360.0 - 2 * res:
            full[s] = True
        else:
            lo = start - m_h
            h0[s] = int(math.floor((lo + 180.0) / res))
            nh[s] = int(math.ceil((span + 2 * m_h) / res)) + 2
        lo_d = max(ds.min() - margin_deg, -grid.declination_limit_deg)
        hi_d = min(ds.max() + margin_deg, grid.declination_limit_deg)
        if hi_d <= lo_d:
            continue
        d0[s] = int(math.floor((lo_d + grid.declination_limit_deg) / res))
        nd[s] = min(int(math.ceil((hi_d - lo_d) / res)) + 2, grid.n_d - d0[s])
    return h0, nh, d0, nd, full


class _Hits:
    """A caster turned round: True where a ray *hits* the mesh (the opening's pane)."""

    def __init__(self, caster: RayCaster) -> None:
        self.caster = caster

    def escapes(self, origins, directions):
        return ~self.caster.escapes(origins, directions)


def _opening_width_deg(opening: trimesh.Trimesh, points_m: NDArray) -> float:
    """Narrowest angular width of any pane of the opening seen from the farthest sample, degrees."""
    widths = []
    far = 0.0
    for pane in opening.split(only_watertight=False) or [opening]:
        v = np.asarray(pane.vertices, dtype=float)
        centre = v.mean(axis=0)
        axes = np.linalg.svd(v - centre, full_matrices=False)[2]  # principal axes of the pane's corners
        extents = np.sort(np.ptp((v - centre) @ axes.T, axis=0))
        widths.append(extents[-2] if extents.size >= 2 else extents[-1])  # the smallest is the thickness
        far = max(far, float(np.max(np.linalg.norm(points_m - centre, axis=1))))
    return math.degrees(min(widths) / max(far, 1e-9))


def _cast_cells(caster, grid, origins, normals, h_idx, d_idx, s_idx) -> NDArray[np.bool_]:
    """Escape test for cells given by flat index arrays; back-facing and sub-horizon cells are False."""
    dirs = grid.directions(h_idx, d_idx)
    live = np.einsum("ij,ij->i", dirs, normals[s_idx]) > 0.0
    live &= dirs[:, 2] > math.sin(math.radians(ALTITUDE_FLOOR_DEG))
    out = np.zeros(len(dirs), bool)
    idx = np.flatnonzero(live)
    if idx.size:
        out[idx] = caster.escapes(origins[s_idx[idx]], dirs[idx])
    return out, int(idx.size)


def _multilevel(caster, grid, origins, normals, h0, d0, nh, nd, levels, progress=None):
    """Resolve the (S, nh, nd) escape mask coarse-to-fine (see the module notes)."""
    s_count = len(origins)
    k0 = levels[0]
    rays = 0

    def cast(s, i, j):
        nonlocal rays
        out, n = _cast_cells(caster, grid, origins, normals, h0[s] + i, d0[s] + j, s)
        rays += n
        return out

    mh, md = (nh - 1) // k0, (nd - 1) // k0
    s, i, j = np.meshgrid(np.arange(s_count), np.arange(mh + 1) * k0, np.arange(md + 1) * k0, indexing="ij")
    values = cast(s.ravel(), i.ravel(), j.ravel()).reshape(s.shape)
    for step, k in enumerate(levels[1:], start=1):
        r = levels[step - 1] // k
        corners = values[:, :-1, :-1]
        uniform = (corners == values[:, 1:, :-1]) & (corners == values[:, :-1, 1:]) & (corners == values[:, 1:, 1:])
        amb = ~uniform
        grown = amb.copy()  # dilate by one square in H and δ
        grown[:, 1:, :] |= amb[:, :-1, :]
        grown[:, :-1, :] |= amb[:, 1:, :]
        grown[:, :, 1:] |= grown[:, :, :-1].copy()
        grown[:, :, :-1] |= grown[:, :, 1:].copy()
        cells = np.repeat(np.repeat(grown, r, axis=1), r, axis=2)  # (S, Mh*r, Md*r): fine squares
        need = np.zeros((s_count, cells.shape[1] + 1, cells.shape[2] + 1), bool)
        need[:, :-1, :-1] |= cells
        need[:, 1:, :-1] |= cells
        need[:, :-1, 1:] |= cells
        need[:, 1:, 1:] |= cells
        a = np.arange(need.shape[1])
        b = np.arange(need.shape[2])
        new = values[:, np.minimum(a // r, values.shape[1] - 1)][:, :, np.minimum(b // r, values.shape[2] - 1)]
        old = ((a % r) == 0)[:, None] & ((b % r) == 0)[None, :]
        need &= ~old[None]
        ss, ii, jj = np.nonzero(need)
        if ss.size:
            new[ss, ii, jj] = cast(ss, ii * k, jj * k)
        values = new
        if progress is not None:
            progress(step, len(levels) - 1)
    return values, rays


def window_key(mesh_key: str, points_m, normals, area_m2, latitude_deg: float, **params) -> str:
    """A sha256 over everything a window depends on (mesh, samples, latitude, resolution, …)."""
    h = hashlib.sha256()
    h.update(
        json.dumps(
            {"v": FORMAT_VERSION, "mesh": mesh_key, "lat": float(latitude_deg), **params}, sort_keys=True
        ).encode()
    )
    for a in (points_m, normals, area_m2):
        h.update(np.ascontiguousarray(np.asarray(a, dtype=np.float64)).tobytes())
    return h.hexdigest()


def mesh_key(mesh: trimesh.Trimesh, opening: trimesh.Trimesh | None = None) -> str:
    """Content hash of the blocking mesh (and opening) vertices and faces."""
    h = hashlib.sha256()
    for m in (mesh, opening):
        if m is not None:
            h.update(np.ascontiguousarray(np.asarray(m.vertices, dtype=np.float64)).tobytes())
            h.update(np.ascontiguousarray(np.asarray(m.faces, dtype=np.int64)).tobytes())
    return h.hexdigest()


def compute_window(
    mesh: trimesh.Trimesh,
    points_m: ArrayLike,
    normals: ArrayLike,
    area_m2: ArrayLike,
    latitude_deg: float,
    *,
    opening: trimesh.Trimesh | None = None,
    resolution_deg: float = 0.05,
    declination_limit_deg: float = DECLINATION_LIMIT_DEG,
    coarse_deg: float = 0.2,
    search_deg: float = 1.0,
    backend: str = "auto",
    cache_dir: str | Path | None = None,
    content_key: str | None = None,
    progress: Callable[[int, int], None] | None = None,
) -> SkyWindow:
    """Ray-cast the sky window of every target sample.

    Parameters
    ----------
    mesh : all blocking geometry (the target included), site frame East-North-Up metres.
    points_m : (S, 3) target sample positions, metres (on the target surface).
    normals : (S, 3) outward unit normals of the target at the samples (toward the room).
    area_m2 : (S,) target area each sample stands for, m².
    latitude_deg : site latitude, degrees north (fixes the celestial pole in the site frame).
    opening : the aperture's mesh, or None (then a ``search_deg`` lattice finds the sky).
    resolution_deg : cell size of the stored mask, degrees (0.05° ≈ 12 s of the Sun's motion).
    declination_limit_deg : half-width of the grid's declination band, degrees (the Sun's 25.5° by default;
        :data:`~lightpath.light.grid.MOON_DECLINATION_LIMIT_DEG` for moonlight); part of the cache key when
        not the default.
    coarse_deg : first lattice step inside each box, degrees (see the module notes).
    search_deg : lattice step of the whole-band search without an opening, degrees.
    backend : ray backend, ``"auto"``, ``"embree"`` or ``"numpy"``.
    cache_dir : folder for a cached ``.npz`` keyed by everything above, or None (no cache).
    content_key : a content hash of the scene standing for mesh + opening in the key (else hashed here).
    progress : optional ``progress(done, total)`` callback.

    Returns
    -------
    SkyWindow with the raw escape mask (the horizon is applied at look-up).
    """
    pts = np.asarray(points_m, dtype=np.float64).reshape(-1, 3)
    nrm = np.asarray(normals, dtype=np.float64).reshape(-1, 3)
    nrm = nrm / np.linalg.norm(nrm, axis=1, keepdims=True)
    area = np.asarray(area_m2, dtype=np.float64).reshape(-1)
    if not (len(pts) == len(nrm) == len(area)) or len(pts) == 0:
        raise ValueError("points, normals and areas must be non-empty and of one length")
    grid = SkyGrid.make(latitude_deg, resolution_deg, declination_limit_deg)
    params = {
        "res": grid.resolution_deg,
        "coarse": float(coarse_deg),
        "search": float(search_deg),
        "opening": opening is not None,
        "floor": ALTITUDE_FLOOR_DEG,
    }
    if float(declination_limit_deg) != DECLINATION_LIMIT_DEG:  # the Sun's windows keep their keys
        params["band"] = float(declination_limit_deg)
    key = window_key(content_key or mesh_key(mesh, opening), pts, nrm, area, latitude_deg, **params)
    if cache_dir is not None:
        cached = load_window(Path(cache_dir) / f"window-{key[:24]}.npz", key)
        if cached is not None:
            return cached
    caster = RayCaster(mesh, backend=backend)
    offset = origin_offset_m(mesh)
    origins = pts + offset * nrm
    notes: list[str] = []
    rays = 0
    res = grid.resolution_deg
    margin = MARGIN_DEG + 2 * res
    if opening is not None and len(opening.vertices):
        ends = _opening_points(opening)
        v = ends[None, :, :] - pts[:, None, :]
        h, d = hadec_from_enu(latitude_deg, v)
        boxes = _boxes_from_directions(grid, h, d, np.ones(h.shape, bool), margin)
    else:
        step = max(1, int(round(search_deg / res)))
        kk = np.arange(0, grid.n_h, step)
        jj = np.arange(0, grid.n_d, step)
        kg, jg = np.meshgrid(kk, jj, indexing="ij")
        flat_k, flat_j = kg.ravel(), jg.ravel()
        hits = np.zeros((len(pts), flat_k.size), bool)
        for s in range(len(pts)):  # one batched cast per sample
            out, n = _cast_cells(caster, grid, origins, nrm, flat_k, flat_j, np.full(flat_k.size, s))
            hits[s] = out
            rays += n
        h = np.broadcast_to(grid.h_center(flat_k), hits.shape)
        d = np.broadcast_to(grid.d_center(flat_j), hits.shape)
        boxes = _boxes_from_directions(grid, h, d, hits, margin + 2 * step * res)
        lattice = (step, hits.reshape(len(pts), kk.size, jj.size))
        notes.append(f"no opening given: sky found by a {step * res:g}° search lattice; narrower sky can be missed")
    h0, nh_s, d0, nd_s, full = boxes
    levels = _levels(coarse_deg, res)
    k0 = levels[0]
    wrap = 0
    if full.any():
        wrap = int(math.ceil(margin / res)) + k0
        nh_need = grid.n_h + 2 * wrap
        h0 = np.where(full, -wrap, h0)
    else:
        nh_need = int(nh_s.max())
    nd_need = int(max(nd_s.max(), 1))
    nh = int(math.ceil(max(nh_need - 1, 1) / k0)) * k0 + 1
    nd = int(math.ceil(max(nd_need - 1, 1) / k0)) * k0 + 1
    d0 = np.minimum(d0, max(grid.n_d - nd, 0))  # keep boxes inside the band where possible
    if len(pts) * nh * nd > MAX_CELLS:
        raise InputError(
            f"sky window too large: {len(pts)} samples x {nh}x{nd} cells; use fewer samples, a coarser "
            "resolution or give the scene's opening"
        )
    if nh * nd <= 64:
        levels = (1,)
    if opening is not None and len(opening.vertices):
        # which cells' rays pass through the opening: a convex-ish pane, resolved coarse-to-fine with a first
        # step under a third of its narrowest angular width; then every such cell is cast at full resolution
        gate_levels = _levels(min(coarse_deg, _opening_width_deg(opening, pts) / 3.0), res)
        gate_levels = tuple(k for k in levels if k <= gate_levels[0]) or (1,)
        g0 = gate_levels[0]
        if (nh - 1) % g0 or (nd - 1) % g0:
            gate_levels = (1,)
        gate, n = _multilevel(
            _Hits(RayCaster(opening, backend=backend)), grid, origins, nrm, h0, d0, nh, nd, gate_levels, progress
        )
        rays += n
        escape = np.zeros_like(gate)
        s_i, i_i, j_i = np.nonzero(gate)
        if s_i.size:
            out, n = _cast_cells(caster, grid, origins, nrm, h0[s_i] + i_i, d0[s_i] + j_i, s_i)
            escape[s_i, i_i, j_i] = out
            rays += n
    else:
        # every cell within two lattice steps of an escaping lattice ray is cast at full resolution
        step, hits = lattice
        grown = maximum_filter(hits.astype(np.uint8), size=(1, 5, 5), mode=("constant", "wrap", "nearest")) > 0
        i, j = np.meshgrid(np.arange(nh), np.arange(nd), indexing="ij")
        node_k = (np.mod(h0[:, None, None] + i[None], grid.n_h) // step) % hits.shape[1]
        node_j = np.clip((d0[:, None, None] + j[None]) // step, 0, hits.shape[2] - 1)
        gate = grown[np.arange(len(pts))[:, None, None], node_k, node_j]
        escape = np.zeros(gate.shape, bool)
        s_i, i_i, j_i = np.nonzero(gate)
        if s_i.size:
            out, n = _cast_cells(caster, grid, origins, nrm, h0[s_i] + i_i, d0[s_i] + j_i, s_i)
            escape[s_i, i_i, j_i] = out
            rays += n
    window = SkyWindow(
        grid, pts, nrm, area, h0.astype(np.int64), d0.astype(np.int64), escape, wrap, offset, rays, key, notes
    )
    if cache_dir is not None:
        save_window(window, Path(cache_dir) / f"window-{key[:24]}.npz")
    return window


def save_window(window: SkyWindow, path: str | Path) -> Path:
    """Write ``window`` to an ``.npz`` file atomically (mask bit-packed)."""
    g = window.grid
    meta = {
        "lat": g.latitude_deg,
        "res": g.resolution_deg,
        "n_h": g.n_h,
        "n_d": g.n_d,
        "limit": g.declination_limit_deg,
        "wrap": window.wrap_cells,
        "offset": window.offset_m,
        "rays": window.rays_cast,
        "key": window.key,
        "notes": window.notes,
        "shape": list(window.escape.shape),
        "v": FORMAT_VERSION,
    }
    buf = io.BytesIO()
    np.savez_compressed(
        buf,
        meta=np.array(json.dumps(meta)),
        points=window.points_m,
        normals=window.normals,
        area=window.area_m2,
        h0=window.h0,
        d0=window.d0,
        escape=np.packbits(window.escape.ravel()),
    )
    return write_atomic(path, lambda f: f.write(buf.getvalue()))


def load_window(path: str | Path, key: str | None = None) -> SkyWindow | None:
    """Read a window saved by :func:`save_window`; None if missing, unreadable or for another ``key``."""
    path = Path(path)
    if not path.is_file():
        return None
    try:
        with np.load(path, allow_pickle=False) as z:
            meta = json.loads(str(z["meta"]))
            if meta.get("v") != FORMAT_VERSION or (key is not None and meta["key"] != key):
                return None
            shape = tuple(meta["shape"])
            escape = np.unpackbits(z["escape"])[: int(np.prod(shape))].astype(bool).reshape(shape)
            grid = SkyGrid(meta["lat"], meta["res"], meta["n_h"], meta["n_d"], meta["limit"])
            return SkyWindow(
                grid,
                z["points"],
                z["normals"],
                z["area"],
                z["h0"],
                z["d0"],
                escape,
                meta["wrap"],
                meta["offset"],
                meta["rays"],
                meta["key"],
                list(meta["notes"]),
            )
    except (OSError, ValueError, KeyError):
        return None
