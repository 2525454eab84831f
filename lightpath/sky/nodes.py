"""Evaluate a smooth function of time at coarse nodes and interpolate to many instants.

The Sun's geocentric position changes smoothly (its fastest parts: the Earth's
monthly wobble about the Earth–Moon barycentre, 6″, and nutation terms of 9 and
14 days, < 0.3″), so for dense sets of instants it is far cheaper to evaluate
the costly series at a few nodes and interpolate.  Two schemes, both falling
back to direct evaluation when interpolation would not save work:

* :func:`lagrange_on_grid` — 4-point (cubic) Lagrange interpolation on a uniform
  grid of step ``h`` (Abramowitz & Stegun 1964, eq. 25.2.13).  Error ≈
  0.023·(ωh)⁴·A for a term of amplitude A and angular frequency ω.
* :func:`chebyshev_blocks` — blocks of ``block_days`` with the function sampled
  at ``degree + 1`` Chebyshev points of each block and interpolated by the
  Chebyshev series through them (Press et al. 2007, §5.8).

Only the nodes that some instant needs are evaluated.

>>> f = lambda t: np.stack([np.sin(t / 10.0), np.cos(t / 7.0)], axis=-1)
>>> t = np.linspace(0.0, 100.0, 10_001)
>>> bool(np.abs(lagrange_on_grid(f, t, 0.5) - f(t)).max() < 1e-6)  # 0.023·(h/7)⁴ = 6e-7
True
>>> bool(np.abs(chebyshev_blocks(f, t, 16.0, 12) - f(t)).max() < 1e-12)
True

References
----------
Abramowitz, M., & Stegun, I. A. (1964). *Handbook of Mathematical Functions*,
NBS AMS 55, §25.2 (Lagrange interpolation, eq. 25.2.13).

Press, W. H., Teukolsky, S. A., Vetterling, W. T., & Flannery, B. P. (2007).
*Numerical Recipes*, 3rd ed., §5.8 (Chebyshev approximation).
"""

from __future__ import annotations

from collections.abc import Callable

import numpy as np
from numpy.typing import NDArray

from lightpath.threads import split_map

__all__ = ["chebyshev_blocks", "lagrange4_weights", "lagrange_on_grid"]

Func = Callable[[NDArray], NDArray]
_CLENSHAW_CHUNK = 8192


def _finite_split(t: NDArray) -> tuple[NDArray, NDArray]:
    flat = np.asarray(t, dtype=float).reshape(-1)
    return flat, np.isfinite(flat)


def lagrange_on_grid(func: Func, t: NDArray, step: float, *, min_saving: float = 2.0) -> NDArray:
    """``func(t)`` (shape ``t.shape + (q,)``) by cubic Lagrange interpolation on a grid of ``step``.

    ``func`` maps a 1-D array of instants to an array (n, q).  The grid is
    anchored at multiples of ``step``; nodes k−1, k, k+1, k+2 serve instants in
    [k·step, (k+1)·step).  If fewer than ``min_saving`` instants per node would
    be served, ``func`` is called directly.  ``nan`` instants give ``nan``.
    """
    flat, ok = _finite_split(t)
    tt = flat[ok]
    if tt.size == 0:
        return _direct(func, flat, ok, np.shape(t))
    k = np.floor(tt / step)
    span_nodes = (k.max() - k.min()) + 4.0
    if span_nodes * min_saving > tt.size and _unique_inverse(k)[0].size * min_saving > tt.size:
        return _direct(func, flat, ok, np.shape(t))  # sparse: each instant has its own interval
    needed = np.unique(np.concatenate([k - 1, k, k + 1, k + 2]))
    if needed.size * min_saving > tt.size:
        return _direct(func, flat, ok, np.shape(t))
    values = np.asarray(func(needed * step))
    idx = np.searchsorted(needed, k - 1)
    x = tt / step - k  # 0 ≤ x < 1 inside the central interval
    out = sum(wj[:, None] * values[idx + j] for j, wj in enumerate(lagrange4_weights(x)))
    return _scatter(out, flat, ok, np.shape(t))


def lagrange4_weights(x: NDArray) -> tuple[NDArray, NDArray, NDArray, NDArray]:
    """Weights of the 4-point (cubic) Lagrange formula for nodes at −1, 0, 1, 2 and offsets ``x`` from node 0.

    Abramowitz & Stegun (1964) eq. 25.2.13.

    >>> [float(w) for w in lagrange4_weights(np.array(0.5))]  # midway between nodes 0 and 1
    [-0.0625, 0.5625, 0.5625, -0.0625]
    """
    return (
        -x * (x - 1.0) * (x - 2.0) / 6.0,
        (x + 1.0) * (x - 1.0) * (x - 2.0) / 2.0,
        -(x + 1.0) * x * (x - 2.0) / 2.0,
        (x + 1.0) * x * (x - 1.0) / 6.0,
    )


def _chebyshev_matrix(degree: int) -> tuple[NDArray, NDArray]:
    """Chebyshev points x_j on [-1, 1] and the matrix turning samples there into series coefficients."""
    n = degree + 1
    j = np.arange(n)
    theta = np.pi * (j + 0.5) / n
    x = np.cos(theta)
    # c_k = (2/n) Σ_j f(x_j) cos(k θ_j), c_0 halved (Press et al. 2007, eq. 5.8.7)
    m = (2.0 / n) * np.cos(np.outer(np.arange(n), theta))
    m[0] *= 0.5
    return x, m


def chebyshev_blocks(func: Func, t: NDArray, block_days: float, degree: int, *, min_saving: float = 1.0) -> NDArray:
    """``func(t)`` (shape ``t.shape + (q,)``) through Chebyshev series on blocks of ``block_days``.

    Blocks are anchored at multiples of ``block_days``; each block that holds an
    instant is sampled at ``degree + 1`` Chebyshev points.  Falls back to direct
    evaluation when that would need more than ``len(t) / min_saving`` samples.
    """
    flat, ok = _finite_split(t)
    tt = flat[ok]
    if tt.size == 0:
        return _direct(func, flat, ok, np.shape(t))
    block = np.floor(tt / block_days)
    blocks, inverse = _unique_inverse(block)
    n = degree + 1
    if blocks.size * n * min_saving > tt.size:
        return _direct(func, flat, ok, np.shape(t))
    xj, to_coeff = _chebyshev_matrix(degree)
    half = 0.5 * block_days
    centre = blocks * block_days + half
    samples = np.asarray(func((centre[:, None] + half * xj[None, :]).reshape(-1)))
    q = samples.shape[-1]
    coeffs = np.einsum("kj,bjq->bkq", to_coeff, samples.reshape(blocks.size, n, q))
    out = split_map(lambda u, inv: _clenshaw(coeffs, centre, half, u, inv), tt, inverse)
    return _scatter(out, flat, ok, np.shape(t))


def _unique_inverse(values: NDArray) -> tuple[NDArray, NDArray]:
    """``np.unique(values, return_inverse=True)``, without the sort when ``values`` is already ascending."""
    step = np.diff(values)
    if np.all(step >= 0.0):
        first = np.concatenate([[True], step > 0.0])
        return values[first], np.cumsum(first) - 1
    return np.unique(values, return_inverse=True)


def _clenshaw(coeffs: NDArray, centre: NDArray, half: float, tt: NDArray, inverse: NDArray) -> NDArray:
    """The Chebyshev series of block ``inverse[i]`` at each instant ``tt[i]`` (Press et al. 2007, eq. 5.8.11)."""
    n, q = coeffs.shape[1], coeffs.shape[2]
    out = np.empty((tt.size, q))
    for i in range(0, tt.size, _CLENSHAW_CHUNK):  # chunks keep the gathered coefficients small
        sl = slice(i, i + _CLENSHAW_CHUNK)
        inv = inverse[sl]
        u = (tt[sl] - centre[inv]) / half  # -1 ≤ u < 1
        c = coeffs[inv]  # (m, n, q)
        b1 = np.zeros((u.size, q))
        b2 = np.zeros((u.size, q))
        two_u = (2.0 * u)[:, None]
        for k in range(n - 1, 0, -1):
            b1, b2 = two_u * b1 - b2 + c[:, k], b1
        out[sl] = u[:, None] * b1 - b2 + c[:, 0]
    return out


def _direct(func: Func, flat: NDArray, ok: NDArray, shape: tuple[int, ...]) -> NDArray:
    if not np.any(ok):
        q = np.asarray(func(np.array([0.0]))).shape[-1]
        return np.full(shape + (q,), np.nan)
    return _scatter(np.asarray(func(flat[ok])), flat, ok, shape)


def _scatter(values: NDArray, flat: NDArray, ok: NDArray, shape: tuple[int, ...]) -> NDArray:
    if values.shape[0] == flat.size:  # every instant finite: nothing to scatter
        return values.reshape(shape + (values.shape[-1],))
    out = np.full((flat.size, values.shape[-1]), np.nan)
    out[ok] = values
    return out.reshape(shape + (values.shape[-1],))
