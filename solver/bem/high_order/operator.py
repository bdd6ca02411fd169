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

#: Targets x panels handled in one block (bounds the memory of the preimage table).
BLOCK_PAIRS = 4_000_000


def _blocks(m: int, n_panels: int):
    step = max(1, BLOCK_PAIRS // max(n_panels, 1))
    for start in range(0, m, step):
        yield slice(start, min(m, start + step))


def _near_pairs(targets: np.ndarray, panels: CurvedPanels) -> tuple[np.ndarray, np.ndarray, np.ndarray]:
    """Target rows, panel columns and preimages of every pair that needs the product rules."""
    z = preimages(targets, panels)
    rows, cols = np.nonzero(bernstein_rho(z) < near_rho(panels.order))
    return rows, cols, z[rows, cols]


def log_matrix(targets: np.ndarray, panels: CurvedPanels) -> np.ndarray:
    """(m, n_nodes) matrix L with int log|x - y| q(y) ds(y) = L @ q at (m, 2) scaled targets."""
    p = panels.order
    y = panels.nodes.reshape(-1, 2)
    w = panels.weights.reshape(-1)
    out = np.empty((len(targets), panels.n_nodes))
    for block in _blocks(len(targets), panels.n_panels):
        x = targets[block]
        with np.errstate(divide="ignore"):
            g = np.log(np.hypot(x[:, None, 0] - y[None, :, 0], x[:, None, 1] - y[None, :, 1])) * w[None, :]
        rows, cols, z = _near_pairs(x, panels)
        if len(rows):
            weights = log_weights(z, panels, cols) * panels.speeds[cols]
            g.reshape(len(x), panels.n_panels, p)[rows, cols, :] = weights
        out[block] = g
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
    for block in _blocks(len(targets), panels.n_panels):
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


def potential_matrix(targets: np.ndarray, panels: CurvedPanels, plane_y: float | None) -> np.ndarray:
    """(m, n_nodes): potential (V) at scaled targets per unit scaled strength at each node,
    with the ground plane's image charges when ``plane_y`` is given."""
    a = -log_matrix(targets, panels)
    if plane_y is not None:
        a += log_matrix(mirrored(targets, plane_y), panels)
    return a


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
