"""The single-layer operator of many conductor panels, applied by a fast multipole method.

For conductor panels in a homogeneous medium the system's panel block is
A[i, j] = -[G_j(x_i) - G_j(x_i*)] (:mod:`solver.bem.assembly`; the image term only with a
ground plane). :class:`FastSingleLayer` applies it in O(n) memory:

* far interactions: each panel is replaced by :data:`QUADRATURE_POINTS` Gauss-Legendre
  points carrying charge q_j L_j w_g / 2 (and their mirror images with the opposite sign),
  summed by pyfmmlib's 2-D Laplace fast multipole method (``lfmm2dparttarg``, kernel
  c ln r; Greengard & Rokhlin, "A fast algorithm for particle simulations", J. Comput. Phys.
  73, 1987);
* near interactions: for every target closer than :data:`NEAR_PANEL_LENGTHS` panel lengths
  to a panel's midpoint (or whose mirror image is), a sparse correction replaces the
  quadrature value by the closed-form integral of :mod:`solver.bem.kernels`, so self and
  neighbour terms are exact.

With 4 points and targets at least 3 panel lengths away, the Gauss-Legendre error on the
logarithm is about rho^(-8) with rho = d' + sqrt(d'^2 + 1), d' = 2 d / L >= 6 (the Bernstein
ellipse bound, common practice): below 1e-8 of the panel's contribution.
"""

from __future__ import annotations

import numpy as np
import scipy.sparse
from scipy.spatial import cKDTree

from solver.bem.kernels import (
    log_potential_and_gradient_pairs,
    log_potential_and_gradient_sums,
    log_potential_pairs,
)
from solver.errors import SolverError

#: Gauss-Legendre points per panel for far interactions (even, so no point sits on a midpoint).
QUADRATURE_POINTS = 4

#: Targets nearer than this many panel lengths to a panel's midpoint get the exact integral.
NEAR_PANEL_LENGTHS = 3.0

#: Requested accuracy of pyfmmlib (2: about 5e-7, 3: about 5e-10, 4: about 5e-13 relative).
FMM_PRECISION = 3

#: Pairs evaluated at once when building the near-field corrections.
_PAIR_CHUNK = 200_000

try:
    import pyfmmlib
except ImportError:  # pragma: no cover - pyfmmlib is a declared dependency
    pyfmmlib = None


def fmm_available() -> bool:
    """True when the fast multipole library can be imported."""
    return pyfmmlib is not None


def gauss_points(starts: np.ndarray, ends: np.ndarray, order: int = QUADRATURE_POINTS):
    """Gauss-Legendre points (n * order, 2) on each panel and their weights (n * order,) in
    length units (L_j w_g / 2); points of panel j are rows j * order ... j * order + order - 1."""
    x, w = np.polynomial.legendre.leggauss(order)
    mid, half = 0.5 * (starts + ends), 0.5 * (ends - starts)
    pts = mid[:, None, :] + x[None, :, None] * half[:, None, :]
    length = np.hypot(half[:, 0], half[:, 1]) * 2.0
    return pts.reshape(-1, 2), (0.5 * length[:, None] * w[None, :]).ravel()


def _mirror(points: np.ndarray, plane: float) -> np.ndarray:
    out = points.copy()
    out[:, 1] = 2.0 * plane - out[:, 1]
    return out


def _near_pairs(targets: np.ndarray, starts: np.ndarray, ends: np.ndarray) -> tuple[np.ndarray, np.ndarray]:
    """(target index, panel index) of every target within NEAR_PANEL_LENGTHS L_j of panel j's midpoint."""
    mid = 0.5 * (starts + ends)
    radius = NEAR_PANEL_LENGTHS * np.hypot(*(ends - starts).T)
    lists = cKDTree(targets).query_ball_point(mid, radius)
    counts = np.fromiter((len(x) for x in lists), dtype=np.int64, count=len(lists))
    panel = np.repeat(np.arange(len(mid)), counts)
    target = np.fromiter((i for x in lists for i in x), dtype=np.int64, count=int(counts.sum()))
    return target, panel


def near_pair_estimate(n_panels: int, has_plane: bool) -> int:
    """Rough number of near pairs for memory estimates (a target sees about 2 x 3 + 2 panels
    of its own outline within 3 panel lengths, more where outlines come close)."""
    return int(n_panels * (4 * NEAR_PANEL_LENGTHS + 4) * (2 if has_plane else 1))


class FastSingleLayer:
    """y = A q for the conductor-panel block A[i, j] = -[G_j(x_i) - G_j(x_i*)].

    Parameters
    ----------
    targets : (m, 2) collocation points (scaled).
    starts, ends : (n, 2) panel ends (scaled).
    plane : ground-plane height (scaled) or None.
    """

    def __init__(self, targets: np.ndarray, starts: np.ndarray, ends: np.ndarray, plane: float | None) -> None:
        if pyfmmlib is None:
            raise SolverError(
                "The fast solver for large models needs the package 'pyfmmlib', which is not "
                "installed; install it (pip install pyfmmlib) or choose a coarser mesh density."
            )
        self.targets, self.starts, self.ends, self.plane = targets, starts, ends, plane
        nodes, weights = gauss_points(starts, ends)
        self.node_weights = weights
        if plane is not None:
            nodes = np.vstack([nodes, _mirror(nodes, plane)])
        self.sources = np.ascontiguousarray(nodes.T)
        n_src, n_trg = self.sources.shape[1], len(targets)
        # pyfmmlib checks the sizes of the arrays it does not use: allocate them once.
        self._unused = {
            "dipstr": np.zeros(n_src, complex), "dipvec": np.zeros((2, n_src)),
            "fldtarg": np.zeros((2, n_trg), complex), "hesstarg": np.zeros((3, n_trg), complex),
        }
        self._targets_t = np.ascontiguousarray(targets.T)
        self.correction = self._corrections()

    def _corrections(self) -> scipy.sparse.csr_matrix:
        """Sparse (m, n): exact minus quadrature value of the signed kernel on near pairs."""
        m, n = len(self.targets), len(self.starts)
        x, w = np.polynomial.legendre.leggauss(QUADRATURE_POINTS)
        images = [(self.targets, -1.0)]
        if self.plane is not None:
            images.append((_mirror(self.targets, self.plane), 1.0))
        rows, cols, vals = [], [], []
        for pts, sign in images:
            t_idx, p_idx = _near_pairs(pts, self.starts, self.ends)
            for a in range(0, len(t_idx), _PAIR_CHUNK):
                ti, pj = t_idx[a : a + _PAIR_CHUNK], p_idx[a : a + _PAIR_CHUNK]
                s, e, tg = self.starts[pj], self.ends[pj], pts[ti]
                exact = log_potential_pairs(tg, s, e)
                mid, half = 0.5 * (s + e), 0.5 * (e - s)
                length = 2.0 * np.hypot(half[:, 0], half[:, 1])
                approx = np.zeros(len(ti))
                for xg, wg in zip(x, w):
                    d = tg - (mid + xg * half)
                    with np.errstate(divide="ignore"):
                        approx += 0.5 * wg * length * 0.5 * np.log(d[:, 0] ** 2 + d[:, 1] ** 2)
                rows.append(ti)
                cols.append(pj)
                vals.append(sign * (exact - approx))
        return scipy.sparse.csr_matrix(
            (np.concatenate(vals), (np.concatenate(rows), np.concatenate(cols))), shape=(m, n)
        )

    def far(self, q: np.ndarray) -> np.ndarray:
        """-(sum over quadrature points of c ln|x - y|), with images: the far part of A q."""
        c = (np.repeat(q, QUADRATURE_POINTS) * self.node_weights).astype(complex)
        if self.plane is not None:
            c = np.concatenate([c, -c])
        n_src, n_trg = self.sources.shape[1], len(self.targets)
        out = pyfmmlib.lfmm2dparttarg(
            iprec=FMM_PRECISION, nsource=n_src, source=self.sources, ifcharge=1, charge=c,
            ifdipole=0, dipstr=self._unused["dipstr"], dipvec=self._unused["dipvec"],
            ifpot=0, iffld=0, ifhess=0, ntarget=n_trg, target=self._targets_t,
            ifpottarg=1, pottarg=np.zeros(n_trg, complex), iffldtarg=0, fldtarg=self._unused["fldtarg"],
            ifhesstarg=0, hesstarg=self._unused["hesstarg"],
        )
        if out[0] != 0:
            raise SolverError(f"The fast multipole evaluation failed (library error code {out[0]}); "
                              "solve with a coarser mesh density.")
        return -out[4].real

    def apply(self, q: np.ndarray) -> np.ndarray:
        """A q for one strength vector (n,)."""
        return self.far(q) + self.correction @ q


#: Above this many (target, panel) pairs, potential-and-gradient sums use the FMM.
FMM_EVALUATION_PAIRS = 50_000_000


def _fmm_charges(
    sources: np.ndarray, charges: np.ndarray, targets: np.ndarray, with_gradient: bool
) -> tuple[np.ndarray, np.ndarray]:
    """sum_k c_k ln|x - y_k| and its gradient at (m, 2) targets, by pyfmmlib."""
    n_src, n_trg = len(sources), len(targets)
    out = pyfmmlib.lfmm2dparttarg(
        iprec=FMM_PRECISION, nsource=n_src, source=np.ascontiguousarray(sources.T), ifcharge=1,
        charge=charges.astype(complex), ifdipole=0, dipstr=np.zeros(n_src, complex),
        dipvec=np.zeros((2, n_src)), ifpot=0, iffld=0, ifhess=0, ntarget=n_trg,
        target=np.ascontiguousarray(targets.T), ifpottarg=1, pottarg=np.zeros(n_trg, complex),
        iffldtarg=int(with_gradient), fldtarg=np.zeros((2, n_trg), complex),
        ifhesstarg=0, hesstarg=np.zeros((3, n_trg), complex),
    )
    if out[0] != 0:
        raise SolverError(f"The fast multipole evaluation failed (library error code {out[0]}); "
                          "evaluate fewer points at once.")
    return out[4].real, out[5].real.T


def fmm_potential_and_gradient_sums(
    targets: np.ndarray, starts: np.ndarray, ends: np.ndarray, strengths: np.ndarray
) -> tuple[np.ndarray, np.ndarray]:
    """As :func:`solver.bem.kernels.log_potential_and_gradient_sums` for one strength column,
    by the FMM with exact near-field corrections (about 1e-8 relative to the sum of |terms|).

    Returns
    -------
    phi : (m,), grad : (m, 2).
    """
    targets = np.asarray(targets, dtype=float).reshape(-1, 2)
    q = np.asarray(strengths, dtype=float)
    nodes, weights = gauss_points(starts, ends)
    phi, grad = _fmm_charges(nodes, np.repeat(q, QUADRATURE_POINTS) * weights, targets, True)
    t_idx, p_idx = _near_pairs(targets, starts, ends)
    x, w = np.polynomial.legendre.leggauss(QUADRATURE_POINTS)
    for a in range(0, len(t_idx), _PAIR_CHUNK):
        ti, pj = t_idx[a : a + _PAIR_CHUNK], p_idx[a : a + _PAIR_CHUNK]
        s, e, tg = starts[pj], ends[pj], targets[ti]
        g, gx, gy = log_potential_and_gradient_pairs(tg, s, e)
        mid, half = 0.5 * (s + e), 0.5 * (e - s)
        length = 2.0 * np.hypot(half[:, 0], half[:, 1])
        for xg, wg in zip(x, w):
            d = tg - (mid + xg * half)
            r2 = d[:, 0] ** 2 + d[:, 1] ** 2
            c = 0.5 * wg * length
            with np.errstate(divide="ignore", invalid="ignore"):
                g -= c * 0.5 * np.log(r2)
                gx -= c * d[:, 0] / r2
                gy -= c * d[:, 1] / r2
        qj = q[pj]
        phi += np.bincount(ti, qj * g, minlength=len(targets))
        grad[:, 0] += np.bincount(ti, qj * gx, minlength=len(targets))
        grad[:, 1] += np.bincount(ti, qj * gy, minlength=len(targets))
    return phi, grad


def potential_and_gradient_sums(
    targets: np.ndarray, starts: np.ndarray, ends: np.ndarray, strengths: np.ndarray
) -> tuple[np.ndarray, np.ndarray]:
    """phi = sum_j q_j G_j and its gradient at (m, 2) targets: closed forms for every pair
    (identical to rounding) up to :data:`FMM_EVALUATION_PAIRS` pairs, the FMM with exact
    near-field corrections above (about 1e-8 relative; for maps and field lines)."""
    targets = np.asarray(targets, dtype=float).reshape(-1, 2)
    if len(targets) * len(starts) > FMM_EVALUATION_PAIRS and fmm_available() and np.ndim(strengths) == 1:
        return fmm_potential_and_gradient_sums(targets, starts, ends, strengths)
    return log_potential_and_gradient_sums(targets, starts, ends, strengths)
