"""Ray casting against the blocking mesh: does a ray from a point escape to the sky?

Embree (through ``embreex`` and trimesh) is used when it imports; otherwise
trimesh's pure-numpy triangle intersector, which gives the same answers but is
thousands of times slower (a notice says so once, through :mod:`warnings`).

Embree computes in single precision (about 7 significant digits), so a ray that
starts exactly on a surface can hit that surface again.  Ray origins are
therefore pushed off the target along its outward normal by
:func:`origin_offset_m`: ``max(1e-5 × model size, 1 mm)``, a hundred times the
single-precision resolution of the model's coordinates and far below any
survey's tolerance.  trimesh also rescales the model to a ~100-unit box before
handing it to Embree, which keeps the relative precision the same for a
shoebox model and a 1 km terrain model.

>>> import numpy as np, trimesh
>>> box = trimesh.creation.box(extents=(2.0, 2.0, 2.0))
>>> origins = np.zeros((2, 3))
>>> directions = np.array([[0.0, 0.0, 1.0], [1.0, 0.0, 0.0]])
>>> escapes(box, origins, directions).tolist()    # inside a closed box nothing escapes
[False, False]
>>> escapes(box, origins + [0.0, 0.0, 5.0], directions).tolist()  # above it, both escape
[True, True]

References
----------
Wald, I., Woop, S., Benthin, C., Johnson, G. S. & Ernst, M. (2014). Embree: a
kernel framework for efficient CPU ray tracing. *ACM Trans. Graphics* 33(4), 143.
Möller, T. & Trumbore, B. (1997). Fast, minimum storage ray-triangle
intersection. *J. Graphics Tools* 2(1), 21-28 (the numpy fallback, in float64).
"""

from __future__ import annotations

import functools
import warnings
from collections.abc import Callable
from typing import TYPE_CHECKING

import numpy as np
from numpy.typing import ArrayLike, NDArray

if TYPE_CHECKING:  # trimesh is needed only to build windows, not to read them (keeps workers light)
    import trimesh

__all__ = ["RayCaster", "escapes", "origin_offset_m", "ray_backend"]

#: Rays per call to the intersector: bounds memory (~100 bytes per ray) on big batches.
CHUNK_RAYS = 1_000_000

#: Relative origin offset (× model size) and its floor in metres; see the module notes.
OFFSET_RELATIVE = 1e-5
OFFSET_FLOOR_M = 1e-3


@functools.cache
def ray_backend() -> str:
    """``"embree"`` when embreex imports, else ``"numpy"`` (found once, on first use).

    >>> ray_backend() in ("embree", "numpy")
    True
    """
    try:
        import embreex  # noqa: F401
        from trimesh.ray import ray_pyembree  # noqa: F401
    except ImportError:
        return "numpy"
    return "embree"


def __getattr__(name: str) -> str:
    if name == "BACKEND":  # the backend in use, looked up lazily so that importing this module stays cheap
        return ray_backend()
    raise AttributeError(f"module {__name__!r} has no attribute {name!r}")


def origin_offset_m(mesh: trimesh.Trimesh) -> float:
    """Distance (metres) to push ray origins off a surface: ``max(1e-5 × size, 1 mm)``.

    ``size`` is the diagonal of the mesh's bounding box.

    >>> import trimesh
    >>> origin_offset_m(trimesh.creation.box(extents=(10.0, 10.0, 10.0)))
    0.001
    """
    size = float(np.linalg.norm(np.ptp(np.asarray(mesh.bounds), axis=0))) if len(mesh.faces) else 0.0
    return max(OFFSET_RELATIVE * size, OFFSET_FLOOR_M)


class RayCaster:
    """A reusable any-hit query against one mesh (build once, cast many batches).

    Parameters
    ----------
    mesh : the blocking geometry, site frame (East-North-Up metres).
    backend : ``"auto"`` (Embree if available), ``"embree"`` or ``"numpy"``.
    """

    def __init__(self, mesh: trimesh.Trimesh, backend: str = "auto") -> None:
        if backend not in ("auto", "embree", "numpy"):
            raise ValueError(f"ray backend {backend!r} is not one of auto, embree, numpy")
        if backend == "auto":
            backend = ray_backend()
            if backend == "numpy":
                warnings.warn(
                    "embreex is not installed: using the numpy ray intersector, which is thousands of times slower",
                    RuntimeWarning,
                    stacklevel=2,
                )
        self.mesh = mesh
        self.backend = backend
        self._empty = len(mesh.faces) == 0
        self._hit: Callable[[NDArray, NDArray], NDArray] | None = None
        self._intersector = None  # trimesh's Embree intersector (nearest hits), None on the numpy backend
        if self._empty:
            return
        if backend == "embree":
            from trimesh.ray.ray_pyembree import RayMeshIntersector

            self._intersector = RayMeshIntersector(mesh, scale_to_box=True)
            scene = self._intersector._scene

            def hit(o: NDArray, d: NDArray) -> NDArray:
                return scene.run(o, d) >= 0

        else:
            triangles = np.asarray(mesh.triangles, dtype=np.float64)

            def hit(o: NDArray, d: NDArray) -> NDArray:
                return _any_hit_moller_trumbore(triangles, o, d)

        self._hit = hit

    def escapes(self, origins: ArrayLike, directions: ArrayLike) -> NDArray[np.bool_]:
        """True where the ray from ``origins`` (N,3) along ``directions`` (N,3) hits nothing."""
        o = np.asarray(origins, dtype=np.float64).reshape(-1, 3)
        d = np.asarray(directions, dtype=np.float64).reshape(-1, 3)
        if len(o) != len(d):
            raise ValueError(f"origins ({len(o)}) and directions ({len(d)}) differ in length")
        out = np.ones(len(o), dtype=bool)
        if self._empty or len(o) == 0:
            return out
        for start in range(0, len(o), CHUNK_RAYS):
            stop = start + CHUNK_RAYS
            out[start:stop] = ~self._hit(o[start:stop], d[start:stop])
        return out

    def first_hit(self, origins: ArrayLike, directions: ArrayLike) -> tuple[NDArray, NDArray]:
        """The nearest hit of each ray: face index (N,) (−1 where nothing is hit) and point (N, 3) (nan there).

        Embree through trimesh's intersector (scaled to a ~100-unit box), or Möller & Trumbore in float64.
        """
        o = np.asarray(origins, dtype=np.float64).reshape(-1, 3)
        d = np.asarray(directions, dtype=np.float64).reshape(-1, 3)
        if len(o) != len(d):
            raise ValueError(f"origins ({len(o)}) and directions ({len(d)}) differ in length")
        face = np.full(len(o), -1, dtype=np.int64)
        point = np.full((len(o), 3), np.nan)
        if self._empty or len(o) == 0:
            return face, point
        if self._intersector is None:  # the numpy backend (trimesh's own needs rtree)
            return _nearest_moller_trumbore(np.asarray(self.mesh.triangles, dtype=np.float64), o, d)
        for start in range(0, len(o), CHUNK_RAYS):
            stop = start + CHUNK_RAYS
            loc, ray, tri = self._intersector.intersects_location(o[start:stop], d[start:stop], multiple_hits=False)
            face[start + ray] = tri
            point[start + ray] = loc
        return face, point


def _moller_trumbore_chunks(triangles: NDArray, origins: NDArray, directions: NDArray):
    """Yield (slice, t) with t (n, T) the distance along each ray to each triangle, inf where missed (float64)."""
    v0 = triangles[:, 0]
    e1 = triangles[:, 1] - v0
    e2 = triangles[:, 2] - v0
    step = max(1, 2_000_000 // max(len(triangles), 1))
    for a in range(0, len(origins), step):
        o = origins[a : a + step, None, :]
        d = directions[a : a + step, None, :]
        # Möller & Trumbore (1997): barycentric u, v and distance t by Cramer's rule.
        p = np.cross(d, e2[None])
        det = np.einsum("ijk,jk->ij", p, e1)
        with np.errstate(divide="ignore", invalid="ignore"):
            inv = 1.0 / det
            tvec = o - v0[None]
            u = np.einsum("ijk,ijk->ij", tvec, p) * inv
            q = np.cross(tvec, e1[None])
            v = np.einsum("ijk,ijk->ij", d, q) * inv
            t = np.einsum("ijk,jk->ij", q, e2) * inv
        ok = (np.abs(det) > 1e-15) & (u >= 0) & (v >= 0) & (u + v <= 1) & (t > 0)
        yield slice(a, a + step), np.where(ok, t, np.inf)


def _any_hit_moller_trumbore(triangles: NDArray, origins: NDArray, directions: NDArray) -> NDArray[np.bool_]:
    """Any-hit test of every ray against every triangle (float64; O(rays × triangles), chunked)."""
    hit = np.zeros(len(origins), dtype=bool)
    for rows, t in _moller_trumbore_chunks(triangles, origins, directions):
        hit[rows] = np.isfinite(t).any(axis=1)
    return hit


def _nearest_moller_trumbore(triangles: NDArray, origins: NDArray, directions: NDArray) -> tuple[NDArray, NDArray]:
    """Nearest hit of every ray: face index (−1: none) and point (nan: none), float64, chunked."""
    face = np.full(len(origins), -1, dtype=np.int64)
    point = np.full((len(origins), 3), np.nan)
    for rows, t in _moller_trumbore_chunks(triangles, origins, directions):
        k = np.argmin(t, axis=1)
        tk = t[np.arange(len(k)), k]
        hit = np.isfinite(tk)
        idx = np.arange(rows.start, rows.start + len(k))[hit]
        face[idx] = k[hit]
        point[idx] = origins[idx] + tk[hit, None] * directions[idx]
    return face, point


def escapes(
    mesh: trimesh.Trimesh, origins: ArrayLike, directions: ArrayLike, *, backend: str = "auto"
) -> NDArray[np.bool_]:
    """True where a ray leaves ``mesh`` without hitting it (batched, any-hit).

    Parameters
    ----------
    mesh : blocking geometry, site frame metres.
    origins : (N, 3) ray starts, metres (already offset off any surface they lie on).
    directions : (N, 3) ray directions (need not be unit length).
    backend : ``"auto"``, ``"embree"`` or ``"numpy"``.

    Returns
    -------
    (N,) bool array.  For many batches against one mesh, build a :class:`RayCaster` once.
    """
    return RayCaster(mesh, backend=backend).escapes(origins, directions)
