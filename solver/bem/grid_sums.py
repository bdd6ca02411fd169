"""Potential and gradient of panel charges on a regular grid of points, fast (for field maps).

The sum S(t) = sum_j q_j integral over panel j of ln|t - z| ds(z) and its gradient are
wanted at every node of a regular nx x ny grid. Direct summation costs (grid nodes x panels);
this module uses the precorrected-FFT idea (Phillips & White, "A precorrected-FFT method for
electrostatic analysis of complicated 3-D structures", IEEE Trans. CAD 16, 1997; the
particle-mesh split of Hockney & Eastwood, "Computer simulation using particles", 1981):

1. *Far part, by FFT.* Panels are cut into sub-panels no longer than a grid step. Each
   sub-panel's charge, at :data:`GAUSS_POINTS` Gauss-Legendre points, is spread onto the
   :data:`STENCIL` x :data:`STENCIL` lattice nodes around each point with tensor-product
   Lagrange weights (they reproduce polynomials of degree STENCIL - 1, so the spread charge
   acts like the point charge at distances of many grid steps). The lattice charge is then
   convolved with ln r, d/dx ln r and d/dy ln r by FFT (the lattice extends the grid to cover
   every source).
2. *Near part, corrected.* For the targets in a window of :data:`WINDOW` lattice steps around
   each sub-panel's home cell, the lattice value of that cell's spread charge is subtracted
   and the true value added: the closed-form panel integral (:mod:`solver.bem.kernels`) for
   the 6 x 6 nodes around the cell, and the cell's multipole expansion (exact moments of the
   straight sub-panels, :data:`MULTIPOLE_TERMS` terms; a sub-panel lies within 1.21 steps
   of its cell's centre and the nearest target outside the core is 1.5 steps farther out, so
   the series converges at least as (1.21 / 2.5)^P) farther out. Both corrections are fixed
   matrices per grid (the window offsets are the same for every cell), so they cost one
   matrix product over the occupied cells. On oblong cells the window and core span equal
   distances in x and y (more nodes along the shorter step).

Stated accuracy (tested against the closed-form sums in tests/solver/figures/test_grid_maps.py,
on four samples, nodes next to the boundary included): 1e-6 of the largest |S| and 2e-5 of
the largest |grad S| over the grid; measured 4e-8 and 1e-6 on the busbar sample at 512 x 512.
"""

from __future__ import annotations

from dataclasses import dataclass
from functools import lru_cache

import numpy as np
import scipy.fft
import scipy.sparse

from solver.bem.kernels import log_potential_and_gradient_pairs

#: Lagrange nodes per direction used to spread a point charge onto the lattice.
STENCIL = 6

#: Gauss-Legendre points per sub-panel when spreading its charge.
GAUSS_POINTS = 3

#: Half width of the corrected window around a sub-panel's home cell, in steps of the larger
#: grid step (5 misses the stated accuracy on the microstrip sample's oblong cells).
WINDOW = 6

#: Terms of the cell multipole expansions used between the exact core and the window's edge.
MULTIPOLE_TERMS = 24

#: Half width (nodes) of the core around a home cell where panel integrals are exact.
_CORE = 2

#: Nodes a home cell's spread charges may reach on either side (stencil 6 from a point up to
#: half a step outside its home cell).
_PATCH_LO, _PATCH_HI = -3, 4

#: Threads of each FFT (all processors: the transforms of a large map split along the other
#: axis, which helps when a processor is free; pocketfft's idle workers wait without spinning:
#: at load 2.4 on the 2-core machine the 512 x 512 map took the same time either way, measured).
FFT_WORKERS = -1

#: Largest lattice accepted (nodes per side); beyond it the caller sums another way.
MAX_LATTICE_SIDE = 4096


@dataclass(frozen=True)
class _Lattice:
    x0: float
    y0: float
    hx: float
    hy: float
    nx: int
    ny: int
    grid_i0: int  # lattice index of the grid's first node
    grid_j0: int


def _subpanels(starts: np.ndarray, ends: np.ndarray, q: np.ndarray, step: float):
    """Cut panels into pieces no longer than ``step``; the density q is unchanged on each."""
    length = np.hypot(*(ends - starts).T)
    pieces = np.maximum(1, np.ceil(length / step).astype(np.int64))
    owner = np.repeat(np.arange(len(starts)), pieces)
    first = np.cumsum(pieces) - pieces
    k = np.arange(len(owner)) - first[owner]
    frac0 = k / pieces[owner]
    frac1 = (k + 1) / pieces[owner]
    d = ends[owner] - starts[owner]
    return starts[owner] + frac0[:, None] * d, starts[owner] + frac1[:, None] * d, q[owner]


def _lagrange_weights(f: np.ndarray) -> np.ndarray:
    """(m, STENCIL) weights of nodes floor-2 ... floor+3 for fractional positions f in [0, 1)."""
    nodes = np.arange(STENCIL) - (STENCIL // 2 - 1)
    w = np.ones((len(f), STENCIL))
    for a in range(STENCIL):
        for b in range(STENCIL):
            if a != b:
                w[:, a] *= (f - nodes[b]) / (nodes[a] - nodes[b])
    return w


def _held(n: int, size: int, step: float) -> np.ndarray:
    """Offsets 0 ... size / 2 (length units) of a circular axis of even ``size`` holding
    offsets -(n-1) ... n-1; NaN where no offset is held."""
    off = np.arange(size // 2 + 1, dtype=float)
    off[off >= n] = np.nan
    return off * step


def _even_length(n: int) -> int:
    """The least fast FFT length >= 2 n - 1 that is even (the symmetric transforms below)."""
    size = scipy.fft.next_fast_len(2 * n - 1, real=True)
    while size % 2:
        size = scipy.fft.next_fast_len(size + 1, real=True)
    return size


def _symmetric_transform(values: np.ndarray, axis: int, odd: bool) -> np.ndarray:
    """The DFT along ``axis`` of the circular sequence of even length 2 (m - 1) whose first m
    entries are ``values`` (entry m - 1 zero), extended evenly (v[N - k] = v[k]) or oddly
    (v[N - k] = -v[k]): the first m frequencies, real for an even sequence (a DCT-I) and
    -i times a real DST-I for an odd one (entry 0 unused, zero)."""
    if not odd:
        return scipy.fft.dct(values, type=1, axis=axis, workers=FFT_WORKERS)
    inner = np.take(values, np.arange(1, values.shape[axis] - 1), axis=axis)
    out = np.zeros(values.shape)
    index = [slice(None)] * values.ndim
    index[axis] = slice(1, values.shape[axis] - 1)
    out[tuple(index)] = scipy.fft.dst(inner, type=1, axis=axis, workers=FFT_WORKERS)
    return out


@lru_cache(maxsize=4)
def _kernel_spectra(nx: int, ny: int, hx: float, hy: float, shape: tuple[int, int]):
    """rfft2 of ln r, d/dx ln r and d/dy ln r at the lattice offsets (0 at the origin and where
    no offset is held), laid out circularly on ``shape`` (even sides) for a linear convolution.

    ln r is even in x and y, d/dx ln r odd in x and even in y (d/dy the other way), so each
    spectrum is a real cosine or sine transform of the quarter of offsets >= 0 (a quarter of
    the kernel values and of the transform work; the lattice kernels are the same)."""
    dx, dy = np.meshgrid(_held(nx, shape[1], hx), _held(ny, shape[0], hy))
    r2 = dx * dx + dy * dy
    unused = ~np.isfinite(r2) | (r2 == 0)
    r2[unused] = 1.0
    dx[unused] = 0.0
    dy[unused] = 0.0
    log = 0.5 * np.log(r2)
    log[unused] = 0.0
    rows = shape[0] // 2

    def spectrum(kernel: np.ndarray, odd_x: bool, odd_y: bool) -> np.ndarray:
        half = _symmetric_transform(_symmetric_transform(kernel, 1, odd_x), 0, odd_y)
        sign = -1.0 if odd_y else 1.0
        full = np.concatenate([half, sign * half[rows - 1:0:-1]], axis=0)  # frequencies N - k
        if odd_x != odd_y:
            return -1j * full  # one sine transform: -i times real
        return full if not odd_x else -full + 0j

    return spectrum(log, False, False), spectrum(dx / r2, True, False), spectrum(dy / r2, False, True)


@lru_cache(maxsize=4)
def _window_operator(hx: float, hy: float):
    """The correction of one cell over its window of targets, as one real matrix.

    Returns (offsets_i, offsets_j, core, operator): target offsets (nodes) relative to the
    home node, the mask of core targets (exact panel integrals there), and the
    (2 (P + 1) + patch, 3 window) matrix taking a cell's data [Re moments, Im moments, spread
    patch charges] to its correction of (S, dS/dx, dS/dy) on the window: the multipole
    expansion outside the core minus the lattice value of the spread charges everywhere.
    """
    (wx, wy), (cx, cy) = _half_widths(hx, hy, WINDOW), _half_widths(hx, hy, _CORE)
    ti_grid, tj_grid = np.meshgrid(np.arange(-wx, wx + 2), np.arange(-wy, wy + 2))  # (rows j, cols i)
    ti, tj = ti_grid.ravel(), tj_grid.ravel()
    pn = np.arange(_PATCH_LO, _PATCH_HI + 1)
    pi_grid, pj_grid = np.meshgrid(pn, pn)
    pi, pj = pi_grid.ravel(), pj_grid.ravel()
    dx = (ti[None, :] - pi[:, None]) * hx
    dy = (tj[None, :] - pj[:, None]) * hy
    r2 = dx * dx + dy * dy
    zero = r2 == 0
    r2[zero] = 1.0
    spread = [0.5 * np.log(r2), dx / r2, dy / r2]
    for k in spread:
        k[zero] = 0.0
    scale = max(hx, hy)
    w = ((ti - 0.5) * hx + 1j * (tj - 0.5) * hy) / scale  # target - cell centre, in steps
    core = (np.abs(ti - 0.5) <= cx - 0.5) & (np.abs(tj - 0.5) <= cy - 0.5)
    k = np.arange(1, MULTIPOLE_TERMS + 1)[:, None]
    pot = np.vstack([np.log(np.abs(w) * scale)[None, :] + 0j, -1.0 / (k * w[None, :] ** k)])
    grad = 1.0 / w[None, :] ** np.arange(1, MULTIPOLE_TERMS + 2)[:, None] / scale
    pot[:, core] = 0.0
    grad[:, core] = 0.0
    from_re = np.hstack([pot.real, grad.real, -grad.imag])
    from_im = np.hstack([-pot.imag, -grad.imag, -grad.real])
    from_patch = -np.hstack(spread)
    return ti, tj, core, np.vstack([from_re, from_im, from_patch])


def _half_widths(hx: float, hy: float, steps: int) -> tuple[int, int]:
    """Nodes along x and y spanning ``steps`` of the larger grid step (equal distances on a
    grid of oblong cells)."""
    big = max(hx, hy)
    return int(np.ceil(steps * big / hx - 1e-9)), int(np.ceil(steps * big / hy - 1e-9))


def _lattice_for(x: np.ndarray, y: np.ndarray, sources: np.ndarray) -> _Lattice | None:
    hx, hy = x[1] - x[0], y[1] - y[0]
    mx, my = _half_widths(hx, hy, WINDOW)
    lo = np.minimum(sources.min(axis=0), [x[0], y[0]])
    hi = np.maximum(sources.max(axis=0), [x[-1], y[-1]])
    i_lo = int(np.floor((lo[0] - x[0]) / hx)) - mx - 6
    j_lo = int(np.floor((lo[1] - y[0]) / hy)) - my - 6
    i_hi = int(np.ceil((hi[0] - x[0]) / hx)) + mx + 6
    j_hi = int(np.ceil((hi[1] - y[0]) / hy)) + my + 6
    nx, ny = i_hi - i_lo + 1, j_hi - j_lo + 1
    if max(nx, ny) > MAX_LATTICE_SIDE:
        return None
    return _Lattice(x[0] + i_lo * hx, y[0] + j_lo * hy, hx, hy, nx, ny, -i_lo, -j_lo)


def is_regular(axis: np.ndarray) -> bool:
    """True for an increasing, evenly spaced axis of at least 2 points (to 1e-9 of a step)."""
    if len(axis) < 2:
        return False
    d = np.diff(axis)
    return bool(d[0] > 0 and np.all(np.abs(d - d[0]) <= 1e-9 * d[0]))


def grid_potential_and_gradient_sums(
    x: np.ndarray, y: np.ndarray, starts: np.ndarray, ends: np.ndarray, strengths: np.ndarray,
    skip: np.ndarray | None = None,
) -> tuple[np.ndarray, np.ndarray] | None:
    """S and grad S at the nodes of the grid x (nx,) by y (ny,), or None when the lattice
    covering the grid and the sources would be too large (sum another way then).

    Parameters
    ----------
    x, y : evenly spaced axes (length unit of the panels).
    starts, ends : (n, 2) panel ends.
    strengths : (n,) density on each panel (any unit).
    skip : (ny, nx) bool, optional. Nodes whose values are not wanted (inside metal, masked
        by the caller): they get no exact near-field terms, and their values are not the sums.

    Returns
    -------
    S : (ny, nx) sum of q_j times the integral of ln|t - z| over panel j (strength x length).
    grad : (ny, nx, 2) its gradient.
    """
    x, y = np.asarray(x, float), np.asarray(y, float)
    starts, ends = np.asarray(starts, float).reshape(-1, 2), np.asarray(ends, float).reshape(-1, 2)
    q = np.asarray(strengths, float)
    keep = q != 0
    starts, ends, q = starts[keep], ends[keep], q[keep]
    if len(q) == 0:
        return np.zeros((len(y), len(x))), np.zeros((len(y), len(x), 2))
    lat = _lattice_for(x, y, np.vstack([starts, ends]))
    if lat is None:
        return None
    hx, hy = lat.hx, lat.hy
    a, b, qs = _subpanels(starts, ends, q, min(hx, hy))
    mid = 0.5 * (a + b)
    home_i = np.floor((mid[:, 0] - lat.x0) / hx).astype(np.int64)
    home_j = np.floor((mid[:, 1] - lat.y0) / hy).astype(np.int64)
    length = np.hypot(*(b - a).T)

    # 1. spread the Gauss points' charges onto the lattice
    gx_, gw = np.polynomial.legendre.leggauss(GAUSS_POINTS)
    pts = (0.5 * (a + b))[:, None, :] + gx_[None, :, None] * (0.5 * (b - a))[:, None, :]
    charge = (qs * length)[:, None] * (0.5 * gw)[None, :]
    pts, charge = pts.reshape(-1, 2), charge.ravel()
    owner = np.repeat(np.arange(len(qs)), GAUSS_POINTS)
    u, v = (pts[:, 0] - lat.x0) / hx, (pts[:, 1] - lat.y0) / hy
    fi, fj = np.floor(u).astype(np.int64), np.floor(v).astype(np.int64)
    wi, wj = _lagrange_weights(u - fi), _lagrange_weights(v - fj)
    s0 = STENCIL // 2 - 1
    node_i = fi[:, None] - s0 + np.arange(STENCIL)[None, :]
    node_j = fj[:, None] - s0 + np.arange(STENCIL)[None, :]
    w2 = charge[:, None, None] * wj[:, :, None] * wi[:, None, :]  # (m, j, i)
    flat_j = np.broadcast_to(node_j[:, :, None], w2.shape)
    flat_i = np.broadcast_to(node_i[:, None, :], w2.shape)
    lattice_charge = np.bincount(
        (flat_j * lat.nx + flat_i).ravel(), w2.ravel(), minlength=lat.nx * lat.ny
    ).reshape(lat.ny, lat.nx)

    # 2. convolve by FFT
    shape = (_even_length(lat.ny), _even_length(lat.nx))
    spectra = _kernel_spectra(lat.nx, lat.ny, hx, hy, shape)
    # rfft2 and irfft2 one axis at a time: the charge fills only the first lat.ny of the padded
    # rows and only the first lat.ny rows of the result are wanted, so the row transforms of
    # the padding are skipped (the same sums as the 2-D transforms, to rounding)
    qhat = scipy.fft.fft(scipy.fft.rfft(lattice_charge, shape[1], axis=1, workers=FFT_WORKERS), shape[0], axis=0,
                         workers=FFT_WORKERS)
    s, sx, sy = (
        scipy.fft.irfft(scipy.fft.ifft(qhat * k, axis=0, workers=FFT_WORKERS)[: lat.ny], shape[1], axis=1,
                        workers=FFT_WORKERS)[:, : lat.nx]
        for k in spectra
    )

    # 3. corrections in each occupied cell's window, and exact integrals in its core
    cell_ids, cell_of_sub = np.unique(home_j * lat.nx + home_i, return_inverse=True)
    n_cells = len(cell_ids)
    ci, cj = cell_ids % lat.nx, cell_ids // lat.nx
    ti, tj, core, operator = _window_operator(hx, hy)
    n_patch = _PATCH_HI - _PATCH_LO + 1
    pi_ = flat_i - home_i[owner][:, None, None] - _PATCH_LO
    pj_ = flat_j - home_j[owner][:, None, None] - _PATCH_LO
    patch_index = (cell_of_sub[owner][:, None, None] * n_patch + pj_) * n_patch + pi_
    patches = np.bincount(patch_index.ravel(), w2.ravel(), minlength=n_cells * n_patch * n_patch)
    # multipole moments of each cell about its centre, in units of the larger step
    scale = max(hx, hy)
    zc = (lat.x0 + (ci + 0.5) * hx) + 1j * (lat.y0 + (cj + 0.5) * hy)
    za = (a[:, 0] + 1j * a[:, 1] - zc[cell_of_sub]) / scale
    zb = (b[:, 0] + 1j * b[:, 1] - zc[cell_of_sub]) / scale
    rot = np.conj((zb - za) / np.where(length > 0, length / scale, 1.0))
    k = np.arange(MULTIPOLE_TERMS + 1)
    per_sub = rot[:, None] * (zb[:, None] ** (k + 1) - za[:, None] ** (k + 1)) / (k + 1) * (qs * scale)[:, None]
    per_sub[:, 0] = qs * length  # the total charge (real)
    gather = scipy.sparse.csr_matrix(
        (np.ones(len(qs)), (cell_of_sub, np.arange(len(qs)))), shape=(n_cells, len(qs))
    )
    moments = gather @ per_sub
    data = np.hstack([moments.real, moments.imag, patches.reshape(n_cells, n_patch * n_patch)])
    size = lat.nx * lat.ny

    # corrections and exact terms only at wanted grid nodes (not at lattice nodes outside the
    # grid, nor at skipped ones): fewer terms to compute and to add up
    wanted_nodes = np.zeros((lat.ny, lat.nx), dtype=bool)
    rows = slice(lat.grid_j0, lat.grid_j0 + len(y))
    cols = slice(lat.grid_i0, lat.grid_i0 + len(x))
    wanted_nodes[rows, cols] = True if skip is None else ~np.asarray(skip, dtype=bool).reshape(len(y), len(x))
    wanted = wanted_nodes.ravel()
    core_i, core_j = ti[core], tj[core]
    core_target = ((home_j[:, None] + core_j[None, :]) * lat.nx + (home_i[:, None] + core_i[None, :])).ravel()
    sub = np.repeat(np.arange(len(qs)), len(core_i))
    kept = wanted[core_target]
    core_target, sub = core_target[kept], sub[kept]
    tgt = np.column_stack([lat.x0 + (core_target % lat.nx) * hx, lat.y0 + (core_target // lat.nx) * hy])
    exact = np.stack(log_potential_and_gradient_pairs(tgt, a[sub], b[sub])) * qs[sub]
    window_target = ((cj[:, None] + tj[None, :]) * lat.nx + (ci[:, None] + ti[None, :])).ravel()
    kept = wanted[window_target]
    target = np.concatenate([window_target[kept], core_target])
    n_window = len(ti)

    def corrected(k: int, layer: np.ndarray) -> np.ndarray:
        """Layer k (S, dS/dx, dS/dy) on the grid with the window corrections (the product
        taken one layer at a time: its columns are the windows of S, then dS/dx, then dS/dy)."""
        correction = data @ operator[:, k * n_window:(k + 1) * n_window]  # (cells, window)
        added = np.bincount(target, np.concatenate([correction.ravel()[kept], exact[k]]), minlength=size)
        return layer[rows, cols] + added.reshape(lat.ny, lat.nx)[rows, cols]

    s, sx, sy = (corrected(k, layer) for k, layer in enumerate((s, sx, sy)))
    return s, np.stack([sx, sy], axis=-1)
