"""The boundary-element system: conductors in piecewise-homogeneous dielectrics.

A homogeneous medium is the special case with no interfaces; there is one system for both.

Formulation (Rao, Sarkar & Harrington, "The electrostatic field of conducting bodies in
multiple dielectric media", IEEE Trans. MTT 32(11), 1984): every charge — free charge on
conductors and bound (polarisation) charge on conductor surfaces and interfaces — is treated
as *total* charge radiating in vacuum. Unknowns are scaled total strengths
q = sigma_total * ell / (2 pi eps0) (volts) on conductor panels and interface panels, where
ell is the model's length scale and coordinates are divided by ell, then the potential of
each floating conductor and, without a ground plane, the potential at infinity phi_inf.

Rows:
  * conductor panel i on conductor k:
        -sum_j q_j [G_j(x_i) - G_j(x_i*)] + phi_inf - V_k(floating) = V_k(fixed)
    (the image term only with a ground plane, the phi_inf column only without one);
  * interface panel i: normal D continuous, eps+ E_n+ = eps- E_n-, with
    E_n+- = E_pv . n +- sigma / (2 eps0), which gives the second-kind equation
        pi q_i + lambda_i sum_j D_ij q_j = 0,   lambda = (eps+ - eps-) / (eps+ + eps-),
    D_ij the principal-value normal derivative of panel j's log integral at point i;
  * floating conductor k: its *free* charge is given;
  * no ground plane: total charge zero (with phi_inf). The neutrality row makes the system
    independent of the unit of length: the plain log-kernel system is singular when the
    logarithmic capacity of the boundary is exactly 1.

Free charge on a conductor panel: sigma_free = D_n+ - D_n- with D_n- = 0 inside a closed
conductor, so sigma_free = eps_r+ sigma_total; on a strip
    sigma_free = (eps_r+ + eps_r-)/2 sigma_total + eps0 (eps_r+ - eps_r-) E_pv . n.

Curved interfaces: between two panels on the same circle the normal-derivative kernel is
exactly 1/(2R) (|x - t|^2 = 2 R n_x . (x - t) on a circle), so D_ij = +-(arc length)/(2R)
is used there instead of the flat-chord value; with collocation points on the true circle
this removes the first-order error that flat panels with constant bound charge leave on
curved interfaces.
"""

from __future__ import annotations

from collections.abc import Callable, Sequence
from dataclasses import dataclass

import numpy as np
import scipy.sparse

from solver.bem.kernels import log_normal_derivative_integrals, log_potential_integrals
from solver.mesh.interfaces import InterfaceMesh
from solver.mesh.panels import PanelMesh


@dataclass(frozen=True)
class SystemLayout:
    """Where each unknown sits in the system vector.

    Conductor panels first, then interface panels, one potential per floating conductor (in
    ``floating`` order), then phi_inf when ``has_phi_inf``.
    """

    n_conductor_panels: int
    n_interface_panels: int
    floating: tuple[int, ...]
    has_phi_inf: bool

    @property
    def n_panels(self) -> int:
        return self.n_conductor_panels + self.n_interface_panels

    @property
    def size(self) -> int:
        return self.n_panels + len(self.floating) + int(self.has_phi_inf)


@dataclass(frozen=True)
class SourcePanels:
    """Every charged panel (conductors first, then interfaces) in scaled coordinates.

    ``weights`` turn a strength per unit curve length into a strength on the flat chord that
    represents the panel in potential evaluations (arc length / chord length; 1 when straight).
    """

    starts: np.ndarray
    ends: np.ndarray
    weights: np.ndarray
    curve_lengths: np.ndarray


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


def source_panels(mesh: PanelMesh, interfaces: InterfaceMesh, ell: float) -> SourcePanels:
    """The charged panels of a problem, coordinates divided by ``ell`` (metres)."""
    # An arc panel radiates from its chord moved 2/3 of the sagitta toward the arc: the
    # centroid of the arc, so that its far field matches the arc's to one more order.
    shift = (2.0 / 3.0) * (interfaces.points - 0.5 * (interfaces.starts + interfaces.ends))
    starts = np.vstack([mesh.starts, interfaces.starts + shift]) / ell
    ends = np.vstack([mesh.ends, interfaces.ends + shift]) / ell
    chord = np.concatenate([mesh.lengths, interfaces.chord_lengths])
    curve = np.concatenate([mesh.lengths, interfaces.arc_lengths])
    return SourcePanels(starts, ends, curve / chord, curve / ell)


def normal_derivative_matrix(
    points: np.ndarray,
    normals: np.ndarray,
    sources: SourcePanels,
    plane: float | None,
    self_columns: np.ndarray | None = None,
) -> np.ndarray:
    """sum of panel j's field kernel . n_i at points i (scaled), with the ground-plane image.

    E_pv . n at point i equals (matrix @ q) / ell. ``self_columns[i]`` names the panel that
    point i is the midpoint of: its entry is set to the principal value 0 exactly (a point
    a rounding error off a slanted panel would otherwise get the one-sided value +-pi).
    """
    d = log_normal_derivative_integrals(points, normals, sources.starts, sources.ends)
    if self_columns is not None:
        d[np.arange(len(points)), self_columns] = 0.0
    if plane is not None:
        d -= log_normal_derivative_integrals(
            mirrored(points, plane), normals * np.array([1.0, -1.0]), sources.starts, sources.ends
        )
    return d * sources.weights[None, :]


def interface_rows(
    interfaces: InterfaceMesh, sources: SourcePanels, n_conductor_panels: int, ell: float, plane: float | None
) -> np.ndarray:
    """D (n_interface x n_panels): E_pv . n at interface collocation points per unit strength."""
    pts = interfaces.points / ell
    own = n_conductor_panels + np.arange(interfaces.n_panels)
    d = normal_derivative_matrix(pts, interfaces.normals, sources, None, own)
    cid = interfaces.circle_id
    if (cid >= 0).any():
        same = (cid[:, None] == cid[None, :]) & (cid[:, None] >= 0)
        on = cid >= 0
        radius = np.where(on, interfaces.circle_radius, 1.0)
        exact = interfaces.circle_outward[:, None] * (interfaces.arc_lengths / (2.0 * radius))[None, :]
        block = d[:, n_conductor_panels:]
        block[same] = exact[same]
    if plane is not None:
        d -= log_normal_derivative_integrals(
            mirrored(pts, plane), interfaces.normals * np.array([1.0, -1.0]), sources.starts, sources.ends
        ) * sources.weights[None, :]
    return d


def free_charge_operator(
    mesh: PanelMesh, eps_plus: np.ndarray, eps_minus: np.ndarray, n_interface: int,
    sources: SourcePanels, ell: float, plane: float | None,
) -> scipy.sparse.csr_matrix:
    """F (n_conductor_panels x n_panels): free strengths on conductor panels = F @ total strengths.

    Sparse: eps_r on the diagonal, and a dense row only for a strip between two media (a
    dense F would be one more matrix the size of the system's).
    """
    nc = mesh.n_panels
    n = nc + n_interface
    scale = np.where(mesh.is_strip, 0.5 * (eps_plus + eps_minus), eps_plus)
    rows, cols, values = [np.arange(nc)], [np.arange(nc)], [np.asarray(scale, dtype=float)]
    jump = mesh.is_strip & (eps_plus != eps_minus)
    if jump.any():
        dense = normal_derivative_matrix(
            mesh.midpoints[jump] / ell, mesh.normals[jump], sources, plane, np.flatnonzero(jump)
        )
        dense *= ((eps_plus - eps_minus)[jump] / (2.0 * np.pi))[:, None]
        rows.append(np.repeat(np.flatnonzero(jump), n))
        cols.append(np.tile(np.arange(n), int(jump.sum())))
        values.append(dense.ravel())
    # duplicate entries (a strip's diagonal) are summed
    return scipy.sparse.csr_matrix(
        (np.concatenate(values), (np.concatenate(rows), np.concatenate(cols))), shape=(nc, n)
    )


def assemble_system(
    mesh: PanelMesh,
    interfaces: InterfaceMesh,
    roles: Sequence[str],
    free_charge_rows: scipy.sparse.csr_matrix,
    sources: SourcePanels,
    plane: float | None,
    ell: float,
    panel_block: Callable[[np.ndarray, np.ndarray, np.ndarray, float | None], np.ndarray] | None = None,
) -> tuple[np.ndarray, SystemLayout, np.ndarray]:
    """System matrix, its layout and the interface D rows (n_interface x n_panels).

    ``free_charge_rows`` (n_conductor_panels x n_panels) maps total strengths to free
    strengths on conductor panels (see :func:`free_charge_operator`); ``plane`` is the
    ground-plane height divided by ``ell`` (metres), or None. ``panel_block`` replaces
    :func:`single_layer_potential_matrix` for the conductor rows (same arguments and values;
    :mod:`solver.bem.geometry_update` passes one that reuses blocks of an earlier matrix); when
    it has a ``writable_matrix(size)`` method returning a (size, size) array (or None), the
    system is assembled in that array and the block may be its top-left corner, written in
    place (no copy of the matrix).
    """
    nc, ni = mesh.n_panels, interfaces.n_panels
    floating = tuple(k for k, role in enumerate(roles) if role == "floating")
    layout = SystemLayout(nc, ni, floating, plane is None)
    n = layout.n_panels
    writable = getattr(panel_block, "writable_matrix", None)
    a = None if writable is None else writable(layout.size)
    if a is None:
        a = np.zeros((layout.size, layout.size))
    else:  # an earlier matrix the block is written into: clear what the block does not write
        a[nc:, :] = 0.0
        a[:nc, n:] = 0.0
    mids = mesh.midpoints / ell
    conductor_rows = (panel_block or single_layer_potential_matrix)(mids, sources.starts, sources.ends, plane)
    if not _is_corner_view(conductor_rows, a):
        a[:nc, :n] = conductor_rows
    if ni:
        a[:nc, :n] *= sources.weights[None, :]
    d_int = interface_rows(interfaces, sources, nc, ell, plane) if ni else np.zeros((0, n))
    if ni:
        a[nc:n, :n] = interfaces.contrast[:, None] * d_int
        a[nc:n, nc:n][np.diag_indices(ni)] += np.pi
    for f, k in enumerate(floating):
        on_k = mesh.conductor_index == k
        a[:nc, n + f][on_k] = -1.0
        a[n + f, :n] = free_charge_rows[on_k].T @ sources.curve_lengths[:nc][on_k]
    if layout.has_phi_inf:
        a[:nc, -1] = 1.0
        a[-1, :n] = sources.curve_lengths
    return a, layout, d_int


def _is_corner_view(block: np.ndarray, a: np.ndarray) -> bool:
    """True when ``block`` is ``a[:rows, :cols]`` itself (the same memory, nothing to copy)."""
    return (block.base is a and block.ctypes.data == a.ctypes.data and block.strides == a.strides)


def right_hand_sides(
    mesh: PanelMesh, layout: SystemLayout, potentials_V: np.ndarray, floating_charge_scaled: np.ndarray
) -> np.ndarray:
    """Right-hand side columns, one per column of ``potentials_V`` (shape (n_conductors, m)).

    ``floating_charge_scaled`` (n_conductors, m) holds Q_k / (2 pi eps0) for floating
    conductors (free charge, C/m, divided by 2 pi eps0: volts).
    """
    potentials_V = np.atleast_2d(np.asarray(potentials_V, dtype=float).T).T
    b = np.zeros((layout.size, potentials_V.shape[1]))
    fixed_rows = ~np.isin(mesh.conductor_index, layout.floating)
    b[: mesh.n_panels][fixed_rows] = potentials_V[mesh.conductor_index[fixed_rows]]
    for f, k in enumerate(layout.floating):
        b[layout.n_panels + f] = floating_charge_scaled[k]
    return b
