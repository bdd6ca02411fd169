"""The single-layer (log-kernel) operator and its gradient on high-order panels.

With q the scaled surface charge strength at the nodes (see :mod:`solver.bem.assembly` for the
scaling), the potential of the charge on the panels at a scaled point x is

    phi(x) = -int q(y) log|x - y| ds(y)      (+ int q(y) log|x* - y| ds(y) with a ground plane,
                                              x* the mirror image of x),

and the field E1 - i E2 = int q(y) / (x - y) ds(y) (complex notation). Far from a panel the
Gauss-Legendre rule of its nodes is used; where the target lies inside the Bernstein
ellipse on which that rule stops being accurate, the product rules of
:mod:`solver.bem.high_order.product_rules` replace it.
"""

from __future__ import annotations

import numpy as np

from solver.bem.high_order.product_rules import bernstein_rho, cauchy_weights, log_weights, near_rho, preimages
from solver.mesh.curved_panels import CurvedPanels

#: Target x node entries handled in one block: bounds the temporaries of an assembly or
#: evaluation (a few arrays of this many float64 or complex128 values, tens of megabytes).
BLOCK_ENTRIES = 2_000_000


def block_rows(n_nodes: int) -> int:
    """Targets per block for panels with ``n_nodes`` nodes."""
    return max(1, BLOCK_ENTRIES // max(n_nodes, 1))


def _blocks(m: int, n_nodes: int):
    step = block_rows(n_nodes)
    for start in range(0, m, step):
        yield slice(start, min(m, start + step))


def _near_pairs(targets: np.ndarray, panels: CurvedPanels) -> tuple[np.ndarray, np.ndarray, np.ndarray]:
    """Target rows, panel columns and preimages of every pair that needs the product rules."""
    z = preimages(targets, panels)
    rows, cols = np.nonzero(bernstein_rho(z) < near_rho(panels.order))
    return rows, cols, z[rows, cols]


def _log_block(x: np.ndarray, panels: CurvedPanels) -> np.ndarray:
    """(len(x), n_nodes) rows of the log matrix at scaled targets ``x``."""
    p = panels.order
    y = panels.nodes.reshape(-1, 2)
    w = panels.weights.reshape(-1)
    g = np.subtract.outer(x[:, 0], y[:, 0])
    dy = np.subtract.outer(x[:, 1], y[:, 1])
    np.hypot(g, dy, out=g)
    del dy
    with np.errstate(divide="ignore"):
        np.log(g, out=g)
    g *= w[None, :]
    rows, cols, z = _near_pairs(x, panels)
    if len(rows):
        weights = log_weights(z, panels, cols) * panels.speeds[cols]
        g.reshape(len(x), panels.n_panels, p)[rows, cols, :] = weights
    return g


def log_matrix(targets: np.ndarray, panels: CurvedPanels) -> np.ndarray:
    """(m, n_nodes) matrix L with int log|x - y| q(y) ds(y) = L @ q at (m, 2) scaled targets."""
    out = np.empty((len(targets), panels.n_nodes))
    for block in _blocks(len(targets), panels.n_nodes):
        out[block] = _log_block(targets[block], panels)
    return out


def field_sums(targets: np.ndarray, panels: CurvedPanels, q: np.ndarray) -> tuple[np.ndarray, np.ndarray]:
    """int log|x - y| q ds (m, k) and int q / (x - y) ds (m, k) complex at (m, 2) scaled targets
    for the (n_nodes, k) strengths ``q`` (principal value at targets on a panel)."""
    p = panels.order
    q = np.asarray(q, dtype=float).reshape(panels.n_nodes, -1)
    y = panels.nodes.reshape(-1, 2)
    yc = y[:, 0] + 1j * y[:, 1]
    w = panels.weights.reshape(-1)
    wq = w[:, None] * q
    logs = np.empty((len(targets), q.shape[1]))
    cauchy = np.empty((len(targets), q.shape[1]), dtype=complex)
    for block in _blocks(len(targets), panels.n_nodes):
        x = targets[block]
        d = (x[:, 0] + 1j * x[:, 1])[:, None] - yc[None, :]
        with np.errstate(divide="ignore", invalid="ignore"):
            lg = np.log(np.abs(d))
            inv = 1.0 / d
        rows, cols, z = _near_pairs(x, panels)
        # Remove the plain rule on near pairs and add the product rule instead.
        lg3, inv3 = lg.reshape(len(x), panels.n_panels, p), inv.reshape(len(x), panels.n_panels, p)
        lg3[rows, cols, :] = 0.0
        inv3[rows, cols, :] = 0.0
        logs_b = lg @ wq
        cauchy_b = inv @ wq
        if len(rows):
            qp = q.reshape(panels.n_panels, p, -1)[cols] * panels.speeds[cols][:, :, None]
            lw = log_weights(z, panels, cols)
            cw = cauchy_weights(z, panels, cols)
            np.add.at(logs_b, rows, np.einsum("ki,kij->kj", lw, qp))
            np.add.at(cauchy_b, rows, np.einsum("ki,kij->kj", cw, qp))
        logs[block] = logs_b
        cauchy[block] = cauchy_b
    return logs, cauchy


def mirrored(points: np.ndarray, plane_y: float) -> np.ndarray:
    """Points reflected in the horizontal line y = ``plane_y``."""
    out = np.array(points, dtype=float, copy=True)
    out[:, 1] = 2.0 * plane_y - out[:, 1]
    return out


def potential_matrix(
    targets: np.ndarray, panels: CurvedPanels, plane_y: float | None, out: np.ndarray | None = None
) -> np.ndarray:
    """(m, n_nodes): potential (V) at scaled targets per unit scaled strength at each node,
    with the ground plane's image charges when ``plane_y`` is given.

    Assembled in blocks of rows (:data:`BLOCK_ENTRIES` entries each) straight into ``out``
    (an (m, n_nodes) array or view, e.g. the top-left block of the system matrix) when
    given, so that no full-size temporary is made.
    """
    if out is None:
        out = np.empty((len(targets), panels.n_nodes))
    for block in _blocks(len(targets), panels.n_nodes):
        x = targets[block]
        rows = _log_block(x, panels)
        np.negative(rows, out=rows)
        if plane_y is not None:
            rows += _log_block(mirrored(x, plane_y), panels)
        out[block] = rows
    return out


def potential_and_field(
    targets: np.ndarray, panels: CurvedPanels, q: np.ndarray, plane_y: float | None
) -> tuple[np.ndarray, np.ndarray]:
    """Potential (m, k) and scaled field (m, 2, k) at scaled targets for node strengths (n_nodes, k)."""
    logs, cauchy = field_sums(targets, panels, q)
    phi = -logs
    e = np.stack([cauchy.real, -cauchy.imag], axis=1)
    if plane_y is not None:
        logs_i, cauchy_i = field_sums(mirrored(targets, plane_y), panels, q)
        phi += logs_i
        e_img = np.stack([cauchy_i.real, -cauchy_i.imag], axis=1)
        e_img[:, 1] *= -1.0
        e -= e_img
    return phi, e


__all__ = ["log_matrix", "field_sums", "potential_matrix", "potential_and_field", "mirrored"]
