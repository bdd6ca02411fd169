"""The Solution of a high-order solve: the same value as the low-order one, with fields from
the high-order panels.

Every figure downstream (capacitance matrices, charges, surface fields, peaks, hot spots,
superposition of potentials) reads the per-panel arrays of :class:`~solver.bem.solution.Solution`.
Here each Gauss-Legendre node stands for one "panel" of that mesh: centred on the node, along
the tangent, as long as the node's quadrature weight. Sums over those panels are then exactly
the Gauss-Legendre rule (conductor charges and capacitances keep the high-order accuracy),
and the surface charge density and surface field are the nodal values. Potentials and
fields at points come from the exact panels with the product rules near the outline
(:mod:`solver.bem.high_order.operator`), not from the node "panels".
"""

from __future__ import annotations

import math
from dataclasses import dataclass, replace
from functools import cached_property

import numpy as np

from solver.bem.high_order.nodal_peaks import conductor_peak, interpolated_surface_field
from solver.bem.high_order.nystrom import NodalSolve
from solver.bem.high_order.operator import potential_and_field
from solver.bem.peaks import PeakField, conductor_peaks
from solver.bem.solution import BACKGROUND_NAME, Solution
from solver.mesh.curved_panels import CurvedPanels
from solver.mesh.interfaces import InterfaceMesh
from solver.mesh.panels import MeshSettings, PanelMesh
from solver.model.model import Model


@dataclass(frozen=True)
class HighOrderSolution(Solution):
    """A :class:`Solution` from the high-order Nystrom solver; ``panels`` are its exact panels
    (metres) and ``tolerance`` the relative accuracy that was asked for (None: not adaptive)."""

    panels: CurvedPanels | None = None
    tolerance: float | None = None
    stage_seconds: tuple[tuple[str, float], ...] = ()

    def potential_and_field(self, points_m: np.ndarray) -> tuple[np.ndarray, np.ndarray]:
        """Potential (V, (m,)) and field (V/m, (m, 2)) at (m, 2) points in metres, with product
        integration near the outline (accurate up to the surface; principal value on it)."""
        assert self.panels is not None
        ell = self.length_scale_m
        pts = np.asarray(points_m, dtype=float).reshape(-1, 2) / ell
        scaled = self.panels.scaled(1.0 / ell)
        phi, e = potential_and_field(pts, scaled, np.asarray(self.total_strengths, dtype=float)[:, None], self._plane_scaled())
        return phi[:, 0] + self.phi_inf_V, e[:, :, 0] / ell

    @cached_property
    def peak_surface_fields(self) -> tuple[PeakField, ...]:
        """Largest surface field on each conductor, in model order, from the interpolated
        charge density between the nodes (:func:`~solver.bem.high_order.nodal_peaks.conductor_peak`),
        the value the hot spots of a large model show too. ``panel_index`` is the node nearest
        the peak; a peak at a sharp corner keeps its node's (mesh-made) value."""
        nodal = conductor_peaks(self.model, self.mesh, self.surface_field_V_per_m)
        if self.panels is None:
            return nodal
        sampled = interpolated_surface_field(self)
        out = []
        for k, peak in enumerate(nodal):
            if peak.at_sharp_corner:
                out.append(peak)
                continue
            field, where, *_ = conductor_peak(self, k, sampled)
            on_k = np.flatnonzero(self.mesh.conductor_index == k)
            node = int(on_k[np.argmin(np.hypot(*(self.mesh.midpoints[on_k] - np.asarray(where)).T))])
            out.append(replace(peak, field_V_per_m=field, location_m=where, panel_index=node))
        return tuple(out)

    def potential_V(self, points_m: np.ndarray) -> np.ndarray:
        """Potential at (m, 2) points in metres, volts, shape (m,)."""
        return self.potential_and_field(points_m)[0]

    def field_V_per_m(self, points_m: np.ndarray) -> np.ndarray:
        """Electric field E = -grad(phi) at (m, 2) points in metres, V/m, shape (m, 2)."""
        return self.potential_and_field(points_m)[1]


def node_mesh(panels: CurvedPanels, model: Model, settings: MeshSettings) -> PanelMesh:
    """The nodes as a :class:`PanelMesh`: one short straight panel per node, centred on it,
    along the tangent, as long as the node's quadrature weight (metres)."""
    p = panels.order
    nodes = panels.nodes.reshape(-1, 2)
    normals = panels.normals.reshape(-1, 2)
    tangents = np.column_stack([-normals[:, 1], normals[:, 0]])
    half = 0.5 * panels.weights.reshape(-1)[:, None] * tangents
    sign = np.sign(panels.half_sweep)
    arc_radius = np.where(panels.is_arc, sign * np.nan_to_num(panels.radii, nan=1.0), math.inf)
    corners, corner_cond, corner_beta = [], [], []
    for piece in panels.pieces:
        beta = piece.opening_start_rad
        if beta is not None and beta > math.pi + 1e-6:
            corners.append(piece.start)
            corner_cond.append(piece.conductor_index)
            corner_beta.append(beta)
        if piece.is_strip and piece.opening_end_rad is not None and piece.opening_end_rad >= 2 * math.pi - 1e-9:
            corners.append(piece.end)
            corner_cond.append(piece.conductor_index)
            corner_beta.append(piece.opening_end_rad)
    return PanelMesh(
        starts=nodes - half,
        ends=nodes + half,
        conductor_index=np.repeat(panels.conductor_index, p),
        ring_index=np.repeat(panels.ring_index, p),
        is_strip=np.repeat(panels.is_strip, p),
        arc_length_m=panels.arc_position_m.reshape(-1),
        corner_points=np.asarray(corners, dtype=float).reshape(-1, 2),
        corner_conductor=np.asarray(corner_cond, dtype=int),
        corner_opening_rad=np.asarray(corner_beta, dtype=float),
        arc_radius_m=np.repeat(arc_radius, p),
        arc_centre_m=np.repeat(panels.centres, p, axis=0),
        settings=settings,
        model=model,
    )


def high_order_solution(
    solve: NodalSolve,
    settings: MeshSettings,
    estimated_relative_error: float | None = None,
    tolerance: float | None = None,
    stage_seconds: tuple[tuple[str, float], ...] = (),
) -> HighOrderSolution:
    """The :class:`HighOrderSolution` of a finished :class:`NodalSolve`."""
    model, panels = solve.model, solve.panels
    mesh = node_mesh(panels, model, settings)
    n = mesh.n_panels
    normal_pv = solve.strip_normal_fields()
    eps = np.full(n, solve.eps_b)
    region = len(model.dielectrics)
    conductor_potentials = solve.potentials[:, 0].copy()
    for f, k in enumerate(solve.floating):
        conductor_potentials[k] = solve.floating_potentials[f, 0]
    n_fixed = len(solve.fixed)
    empty = np.zeros(0)
    return HighOrderSolution(
        model=model,
        mesh=mesh,
        interfaces=InterfaceMesh.empty(),
        length_scale_m=solve.ell,
        strengths=solve.eps_b * solve.total[:, 0],
        capacitance_strengths=solve.eps_b * solve.total[:, 1 : 1 + n_fixed],
        total_strengths=solve.total[:, 0].copy(),
        phi_inf_V=float(solve.phi_inf[0]),
        conductor_potentials_V=conductor_potentials,
        source_starts=mesh.starts / solve.ell,
        source_ends=mesh.ends / solve.ell,
        source_weights=np.ones(n),
        conductor_eps_r_plus=eps,
        conductor_eps_r_minus=np.where(mesh.is_strip, eps, 0.0),
        conductor_normal_pv=normal_pv[:, 0].copy(),
        interface_normal_pv=empty,
        region_names=tuple(d.name for d in model.dielectrics) + (BACKGROUND_NAME,),
        region_eps_r=tuple(float(d.eps_r) for d in model.dielectrics) + (solve.eps_b,),
        interface_region_plus=np.zeros(0, dtype=int),
        interface_region_minus=np.zeros(0, dtype=int),
        conductor_region_plus=np.full(n, region),
        conductor_region_minus=np.where(mesh.is_strip, region, -1),
        n_unknowns=solve.n_unknowns,
        estimated_relative_error=estimated_relative_error,
        unit_solutions=solve.unit_solutions(normal_pv),
        panels=panels,
        tolerance=tolerance,
        stage_seconds=stage_seconds,
    )


__all__ = ["HighOrderSolution", "high_order_solution", "node_mesh"]
