"""Nystrom solve of the first-kind single-layer equation on high-order panels.

Unknowns are the scaled total charge strengths q at the Gauss-Legendre nodes of every panel
(q = sigma ell / (2 pi eps0), as in :mod:`solver.bem.assembly`), then the potential of each
floating conductor and, without a ground plane, the potential at infinity. Each node x_i on
conductor k gives one row

    -int q log|x_i - y| ds(y) [+ int q log|x_i* - y| ds(y)] + phi_inf - V_k(floating) = V_k(fixed),

the integrals by the Gauss-Legendre rule or, near and on the panel, by the product rules of
:mod:`solver.bem.high_order.product_rules` (Nystrom discretisation with product integration;
Kress, "Linear Integral Equations", 1989/2014, ch. 12 on first-kind log-kernel equations).
Floating conductors' free charges and, without a ground plane, total neutrality close the
system exactly as in the low-order system (:mod:`solver.bem.assembly`).

Only a homogeneous medium is handled here (any background eps_r); models with dielectric
regions of other permittivity are declined with :class:`HighOrderUnsupported`, and the
caller uses the low-order system of :mod:`solver.bem.system` instead.
"""

from __future__ import annotations

import math

import numpy as np
import scipy.linalg

from solver.bem.blas_threads import blas_threads_for
from solver.bem.high_order.memory import check_system_memory
from solver.bem.high_order.operator import potential_and_field, potential_matrix
from solver.bem.superposition import UnitSolutions, solve_columns
from solver.bem.system import check_charge_balance, check_field_is_driven
from solver.constants import EPSILON_0_F_PER_M
from solver.errors import InvalidModelError, MeshTooLargeError, NonFiniteResultError, SolverError
from solver.mesh.curved_panels import CurvedPanels
from solver.model.model import Model


class HighOrderUnsupported(SolverError):
    """The high-order path does not handle this model (the low-order path does)."""


def check_supported(model: Model) -> None:
    """Raise HighOrderUnsupported for models with permittivity contrast."""
    if any(d.eps_r != model.background_eps_r for d in model.dielectrics):
        raise HighOrderUnsupported(
            "The high-order solver handles conductors in one homogeneous medium only; this model has "
            "dielectric regions of another permittivity, so the low-order boundary-element solver is used."
        )


def length_scale_m(panels: CurvedPanels) -> float:
    """Diagonal of the bounding box of the panel ends, metres (the unit inside the solve)."""
    a, b = panels.ends
    pts = np.vstack([a, b])
    return float(np.hypot(*(pts.max(axis=0) - pts.min(axis=0)))) or 1.0


class NodalSolve:
    """The factorised system of one model on one set of panels, and its solution columns.

    Attributes
    ----------
    model, panels : what was solved (``panels`` in metres); scaled : the panels divided by ell.
    ell : length scale, metres; plane : ground-plane height / ell, or None.
    total : (n_nodes, 1 + n_drivers) scaled total strengths: the operating point, then one
        column per driver (see :mod:`solver.bem.superposition`).
    floating_potentials : (n_floating, 1 + n_drivers) V; phi_inf : (1 + n_drivers,) V.
    n_unknowns : size of the linear system; memory_bytes : its estimated peak memory
        (:mod:`solver.bem.high_order.memory`), checked before the matrix is allocated.
    """

    def __init__(self, model: Model, panels: CurvedPanels) -> None:
        if not model.conductors:
            raise InvalidModelError("The model has no conductors; draw at least one.")
        check_supported(model)
        check_charge_balance(model)
        check_field_is_driven(model)
        self.model, self.panels = model, panels
        self.ell = length_scale_m(panels)
        self.scaled = panels.scaled(1.0 / self.ell)
        plane = model.ground_plane
        self.plane = None if plane is None else plane.y * model.metres_per_unit / self.ell
        self.eps_b = float(model.background_eps_r)
        roles = [c.role for c in model.conductors]
        self.floating = tuple(k for k, r in enumerate(roles) if r == "floating")
        self.node_conductor = np.repeat(panels.conductor_index, panels.order)
        n = panels.n_nodes
        self.has_phi_inf = self.plane is None
        size = n + len(self.floating) + int(self.has_phi_inf)
        self.n_unknowns = size
        n_rhs = 1 + sum(c.role != "reference" for c in model.conductors)
        title = f"'{model.title}'" if model.title else "the model"
        self.memory_bytes = check_system_memory(size, n_rhs, f"{title} on {panels.n_panels:,} panels")
        try:
            # Assembled in blocks straight into place; factorised in place as a.T (Fortran order).
            a = np.zeros((size, size))
            potential_matrix(self.scaled.nodes.reshape(-1, 2), self.scaled, self.plane, out=a[:n, :n])
        except MemoryError:
            raise MeshTooLargeError(
                f"Not enough memory for the high-order system of {size} unknowns; ask for a looser "
                "tolerance or close other programs."
            ) from None
        w = self.scaled.weights.reshape(-1)
        for f, k in enumerate(self.floating):
            on_k = self.node_conductor == k
            a[:n, n + f][on_k] = -1.0
            a[n + f, :n] = np.where(on_k, self.eps_b * w, 0.0)
        if self.has_phi_inf:
            a[:n, -1] = 1.0
            a[-1, :n] = w
            if all(r == "floating" for r in roles):
                a[-1, :] = 0.0
                a[-1, -1] = 1.0
        if not all(np.isfinite(a[rows]).all() for rows in np.array_split(np.arange(size), max(1, size // 512))):
            raise NonFiniteResultError(
                f"The high-order system of {size} unknowns holds non-finite entries (coincident outlines); "
                "check the drawing for repeated or overlapping outlines."
            )
        self._solve(a)

    def _solve(self, a: np.ndarray) -> None:
        model, n = self.model, self.panels.n_nodes
        fixed, floating, potentials, charges = solve_columns(model)
        self.fixed = fixed
        b = np.zeros((a.shape[0], potentials.shape[1]))
        fixed_rows = ~np.isin(self.node_conductor, self.floating)
        b[:n][fixed_rows] = potentials[self.node_conductor[fixed_rows]]
        for f, k in enumerate(self.floating):
            b[n + f] = charges[k]
        with blas_threads_for(a.shape[0]):
            # a.T is Fortran-ordered, so LAPACK factorises it without a copy; trans=1 then solves a x = b.
            lu = scipy.linalg.lu_factor(a.T, overwrite_a=True, check_finite=False)
            x = scipy.linalg.lu_solve(lu, b, trans=1, check_finite=False)
        if not np.isfinite(x).all():
            raise NonFiniteResultError(
                "The high-order solve gave non-finite charges (the system is singular for this model); "
                "check for a conductor without a return path or parts that touch."
            )
        self.total = x[:n]
        self.floating_potentials = x[n : n + len(self.floating)]
        self.phi_inf = x[-1] if self.has_phi_inf else np.zeros(x.shape[1])
        self.potentials = potentials

    def conductor_charges_scaled(self, column: int) -> np.ndarray:
        """(n_conductors,) free charge / (2 pi eps0) of solution ``column``, volts."""
        out = np.zeros(len(self.model.conductors))
        np.add.at(out, self.node_conductor, self.eps_b * self.scaled.weights.reshape(-1) * self.total[:, column])
        return out

    def capacitance_maxwell_F_per_m(self) -> np.ndarray:
        """Maxwell capacitance matrix over the fixed conductors, F/m (unsymmetrised)."""
        cols = [self.conductor_charges_scaled(1 + j) for j in range(len(self.fixed))]
        c = 2 * math.pi * EPSILON_0_F_PER_M * np.column_stack(cols) if cols else np.zeros((0, 0))
        return c[list(self.fixed)] if cols else c

    def strip_normal_fields(self) -> np.ndarray:
        """(n_nodes, 1 + n_drivers) scaled principal-value normal field at strip nodes (0 elsewhere)."""
        out = np.zeros_like(self.total)
        strip = np.repeat(self.panels.is_strip, self.panels.order)
        if strip.any():
            pts = self.scaled.nodes.reshape(-1, 2)[strip]
            normals = self.scaled.normals.reshape(-1, 2)[strip]
            _, e = potential_and_field(pts, self.scaled, self.total, self.plane)
            out[strip] = np.einsum("mc,mck->mk", normals, e)
        return out

    def unit_solutions(self, normal_pv: np.ndarray) -> UnitSolutions:
        """The driver columns as :class:`UnitSolutions` (free = eps_r x total strengths)."""
        return UnitSolutions(
            self.fixed, self.floating, self.total[:, 1:].copy(), self.eps_b * self.total[:, 1:],
            self.phi_inf[1:].copy(), self.floating_potentials[:, 1:].copy(), normal_pv[:, 1:].copy(),
            np.zeros((0, self.total.shape[1] - 1)),
        )


__all__ = ["NodalSolve", "HighOrderUnsupported", "check_supported", "length_scale_m"]
