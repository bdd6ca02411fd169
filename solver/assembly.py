"""The single-layer boundary-element system for conductors in a homogeneous medium.

Unknowns are scaled panel strengths q_j = sigma_j * ell / (2 pi eps) (volts), where ell is the
model's length scale and coordinates are divided by ell, plus the potential of each floating
conductor and, without a ground plane, the constant potential at infinity phi_inf.

Rows:
  * one collocation row per panel i on conductor k:
        -sum_j q_j [G_j(x_i) - G_j(x_i*)] + phi_inf - V_k(floating) = V_k(fixed)
    (the image term only with a ground plane, the phi_inf column only without one);
  * one charge row per floating conductor:  sum_{j in k} L_j q_j = Q_k / (2 pi eps);
  * without a ground plane, charge neutrality: sum_j L_j q_j = 0.

The neutrality row (with phi_inf) makes the system independent of the unit of length: the
plain log-kernel system is singular when the logarithmic capacity of the boundary is 1.
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

from .kernels import log_potential_integrals
from .panels import PanelMesh


@dataclass(frozen=True)
class SystemLayout:
    """Where each unknown sits in the system vector.

    ``n_panels`` panel strengths first, then one potential per floating conductor (in
    ``floating`` order), then phi_inf when ``has_phi_inf``.
    """

    n_panels: int
    floating: tuple[int, ...]
    has_phi_inf: bool

    @property
    def size(self) -> int:
        return self.n_panels + len(self.floating) + int(self.has_phi_inf)


def mirrored(points: np.ndarray, plane_y: float) -> np.ndarray:
    """Points reflected in the horizontal line y = ``plane_y``."""
    out = np.array(points, dtype=float, copy=True)
    out[:, 1] = 2.0 * plane_y - out[:, 1]
    return out


def single_layer_potential_matrix(
    targets: np.ndarray, starts: np.ndarray, ends: np.ndarray, plane_y: float | None
) -> np.ndarray:
    """-[G_j(x_i) - G_j(x_i*)]: potential (V) at each target per unit scaled strength of each panel."""
    g = -log_potential_integrals(targets, starts, ends)
    if plane_y is not None:
        g += log_potential_integrals(mirrored(targets, plane_y), starts, ends)
    return g


def assemble_single_layer(
    mesh: PanelMesh, roles: list[str], ell: float, plane_y_m: float | None
) -> tuple[np.ndarray, SystemLayout]:
    """System matrix (size x size) for ``mesh`` with per-conductor ``roles``.

    ``ell`` is the length scale (m) that coordinates are divided by; ``plane_y_m`` the ground
    plane height in metres or None.
    """
    starts, ends = mesh.starts / ell, mesh.ends / ell
    mids = 0.5 * (starts + ends)
    plane = None if plane_y_m is None else plane_y_m / ell
    floating = tuple(k for k, role in enumerate(roles) if role == "floating")
    layout = SystemLayout(mesh.n_panels, floating, plane is None)
    n = mesh.n_panels
    a = np.zeros((layout.size, layout.size))
    a[:n, :n] = single_layer_potential_matrix(mids, starts, ends, plane)
    lengths = mesh.lengths / ell
    for f, k in enumerate(floating):
        on_k = mesh.conductor_index == k
        a[:n, n + f][on_k] = -1.0
        a[n + f, :n][on_k] = lengths[on_k]
    if layout.has_phi_inf:
        a[:n, -1] = 1.0
        a[-1, :n] = lengths
    return a, layout


def right_hand_sides(
    mesh: PanelMesh, layout: SystemLayout, potentials_V: np.ndarray, floating_charge_scaled: np.ndarray
) -> np.ndarray:
    """Right-hand side columns, one per column of ``potentials_V`` (shape (n_conductors, m)).

    ``floating_charge_scaled`` (n_conductors, m) holds Q_k / (2 pi eps) for floating conductors.
    """
    potentials_V = np.atleast_2d(np.asarray(potentials_V, dtype=float).T).T
    m = potentials_V.shape[1]
    b = np.zeros((layout.size, m))
    fixed_rows = np.ones(mesh.n_panels, dtype=bool)
    for k in layout.floating:
        fixed_rows &= mesh.conductor_index != k
    b[: mesh.n_panels][fixed_rows] = potentials_V[mesh.conductor_index[fixed_rows]]
    for f, k in enumerate(layout.floating):
        b[mesh.n_panels + f] = floating_charge_scaled[k]
    return b
