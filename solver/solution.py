"""The solution of a solve: panel charges, conductor figures, fields at points.

A :class:`Solution` is an immutable value produced by :func:`solver.solve`. Arrays are in SI
units; points are (m, 2) arrays in metres.
"""

from __future__ import annotations

import math
from dataclasses import dataclass, field
from functools import cached_property

import numpy as np

from .capacitance import mutual_from_maxwell
from .errors import NoReferenceError
from .kernels import log_gradient_integrals, log_normal_derivative_integrals
from .assembly import mirrored, single_layer_potential_matrix
from .model import Model
from .panels import PanelMesh


@dataclass(frozen=True)
class PeakField:
    """Largest surface field on one conductor.

    Attributes
    ----------
    conductor : name of the conductor.
    field_V_per_m : largest |E| on its surface, V/m.
    location_m : (x, y) of the panel midpoint where it occurs, metres.
    panel_index : index of that panel in the mesh.
    at_sharp_corner : True when the peak sits next to a sharp corner or free edge, where the
        2-D field is singular and the value grows as the mesh is refined.
    corner_exponent : for such a peak, the exponent pi/beta - 1 of the charge density
        r^(pi/beta - 1) at that corner (None otherwise).
    """

    conductor: str
    field_V_per_m: float
    location_m: tuple[float, float]
    panel_index: int
    at_sharp_corner: bool
    corner_exponent: float | None = None


@dataclass(frozen=True)
class Solution:
    """Result of solving a model with the single-layer boundary-element method.

    Attributes
    ----------
    model : the Model that was solved.
    mesh : the PanelMesh on the conductors.
    permittivity_F_per_m : permittivity of the medium, eps0 * eps_r, F/m.
    length_scale_m : the length unit used inside the solve (metres).
    strengths : (n_panels,) scaled panel strengths of the operating point (see assembly).
    phi_inf_V : potential at infinity of the operating point (0 with a ground plane).
    conductor_potentials_V : potential of every conductor (model order), V.
    capacitance_strengths : (n_panels, n_signal) strengths for V_j = 1 V on each signal conductor.
    estimated_relative_error : relative change of the capacitance matrix (or of the conductor
        charges when there is no return path) against a mesh at half the resolution; None when
        no estimate was made.
    """

    model: Model
    mesh: PanelMesh
    permittivity_F_per_m: float
    length_scale_m: float
    strengths: np.ndarray
    phi_inf_V: float
    conductor_potentials_V: np.ndarray
    capacitance_strengths: np.ndarray
    estimated_relative_error: float | None = None
    coarse_mesh_panels: int | None = field(default=None)

    # ---- names -------------------------------------------------------------------------
    @property
    def conductor_names(self) -> tuple[str, ...]:
        return self.model.conductor_names

    @property
    def signal_names(self) -> tuple[str, ...]:
        """Rows and columns of the capacitance matrices (the fixed-potential conductors)."""
        return self.model.signal_names

    # ---- charges -----------------------------------------------------------------------
    def _to_sigma(self, strengths: np.ndarray) -> np.ndarray:
        return 2 * math.pi * self.permittivity_F_per_m * strengths / self.length_scale_m

    @cached_property
    def surface_charge_density_C_per_m2(self) -> np.ndarray:
        """(n_panels,) surface charge density on each panel, C/m^2 (both sides of a strip added)."""
        return self._to_sigma(self.strengths)

    def _conductor_sums(self, per_panel: np.ndarray) -> np.ndarray:
        n_cond = len(self.model.conductors)
        weights = per_panel * self.mesh.lengths[:, None] if per_panel.ndim == 2 else per_panel * self.mesh.lengths
        out = np.zeros((n_cond,) + weights.shape[1:])
        np.add.at(out, self.mesh.conductor_index, weights)
        return out

    @cached_property
    def conductor_charges_C_per_m(self) -> np.ndarray:
        """Net charge per unit length of every conductor (model order), C/m."""
        return self._conductor_sums(self.surface_charge_density_C_per_m2)

    @property
    def has_capacitance(self) -> bool:
        """True when the model has a return path (reference conductor or ground plane)."""
        return self.model.has_return_path and len(self.signal_names) > 0

    @property
    def has_dielectrics(self) -> bool:
        """True for a :class:`~solver.dielectric_solution.DielectricSolution` (regions of other eps_r)."""
        return False

    @property
    def peak_region_fields(self) -> tuple:
        """Largest field per dielectric region; empty in a homogeneous medium (see DielectricSolution)."""
        return ()

    @cached_property
    def capacitance_maxwell_F_per_m(self) -> np.ndarray:
        """Maxwell capacitance matrix per unit length, F/m, over :attr:`signal_names`.

        C_ij is the charge on conductor i with conductor j at 1 V and every other fixed or
        reference conductor at 0 V (floating conductors carry no net charge).
        Raises NoReferenceError when the model has no return path.
        """
        if not self.model.has_return_path:
            raise NoReferenceError(
                "No capacitance: the model has neither a reference conductor nor a ground plane. "
                "A 2-D per-unit-length capacitance needs a return path; set one conductor's role "
                "to 'reference' or add a ground plane."
            )
        if not self.signal_names:
            raise NoReferenceError("No capacitance: no conductor has a fixed potential.")
        charges = self._conductor_sums(self._to_sigma(self.capacitance_strengths))
        signal = [i for i, c in enumerate(self.model.conductors) if c.role == "fixed"]
        c = charges[signal]
        return 0.5 * (c + c.T)

    @cached_property
    def capacitance_mutual_F_per_m(self) -> np.ndarray:
        """Mutual ("circuit") form of the capacitance matrix, F/m (see capacitance module)."""
        return mutual_from_maxwell(self.capacitance_maxwell_F_per_m)

    # ---- fields ------------------------------------------------------------------------
    def _plane_scaled(self) -> float | None:
        plane = self.model.ground_plane
        return None if plane is None else plane.y * self.model.metres_per_unit / self.length_scale_m

    def potential_V(self, points_m: np.ndarray) -> np.ndarray:
        """Potential at (m, 2) points in metres, volts, shape (m,).

        Inside a conductor the value is that conductor's potential (to solver accuracy).
        """
        ell = self.length_scale_m
        pts = np.asarray(points_m, dtype=float).reshape(-1, 2) / ell
        g = single_layer_potential_matrix(pts, self.mesh.starts / ell, self.mesh.ends / ell, self._plane_scaled())
        return g @ self.strengths + self.phi_inf_V

    def field_V_per_m(self, points_m: np.ndarray) -> np.ndarray:
        """Electric field E = -grad(phi) at (m, 2) points in metres, V/m, shape (m, 2)."""
        ell = self.length_scale_m
        pts = np.asarray(points_m, dtype=float).reshape(-1, 2) / ell
        starts, ends = self.mesh.starts / ell, self.mesh.ends / ell
        grad = log_gradient_integrals(pts, starts, ends)
        e = np.einsum("mnk,n->mk", grad, self.strengths)
        plane = self._plane_scaled()
        if plane is not None:
            img = np.einsum("mnk,n->mk", log_gradient_integrals(mirrored(pts, plane), starts, ends), self.strengths)
            img[:, 1] *= -1.0
            e -= img
        return e / ell

    @cached_property
    def surface_field_V_per_m(self) -> np.ndarray:
        """(n_panels,) magnitude of the field at the surface of each panel, V/m.

        On closed conductors E = sigma / eps (normal to the surface). On a strip each side
        carries its own share of charge: E = |E_pv . n +- sigma / (2 eps)|, the larger side.
        """
        sigma = self.surface_charge_density_C_per_m2
        out = np.abs(sigma) / self.permittivity_F_per_m
        strip = self.mesh.is_strip
        if strip.any():
            ell = self.length_scale_m
            starts, ends = self.mesh.starts / ell, self.mesh.ends / ell
            mids = 0.5 * (starts + ends)[strip]
            normals = self.mesh.normals[strip]
            d = log_normal_derivative_integrals(mids, normals, starts, ends) @ self.strengths
            plane = self._plane_scaled()
            if plane is not None:
                refl_normals = normals * np.array([1.0, -1.0])
                d -= log_normal_derivative_integrals(mirrored(mids, plane), refl_normals, starts, ends) @ self.strengths
            e_pv = d / ell
            jump = 0.5 * sigma[strip] / self.permittivity_F_per_m
            out[strip] = np.maximum(np.abs(e_pv + jump), np.abs(e_pv - jump))
        return out

    @cached_property
    def peak_surface_fields(self) -> tuple[PeakField, ...]:
        """Largest surface field on each conductor, in model order."""
        peaks = []
        e = self.surface_field_V_per_m
        for k, conductor in enumerate(self.model.conductors):
            idx = np.flatnonzero(self.mesh.conductor_index == k)
            i = int(idx[np.argmax(e[idx])])
            near = self.mesh.distance_to_corner_m[i] < 2.0 * self.mesh.lengths[i] + 1e-15
            exponent = None
            if near:
                mine = self.mesh.corner_conductor == k
                d = np.hypot(*(self.mesh.corner_points[mine] - self.mesh.midpoints[i]).T)
                beta = self.mesh.corner_opening_rad[mine][np.argmin(d)]
                exponent = float(math.pi / beta - 1.0)
            peaks.append(
                PeakField(conductor.name, float(e[i]), tuple(map(float, self.mesh.midpoints[i])), i, bool(near), exponent)
            )
        return tuple(peaks)


def relative_change(fine: Solution, coarse: Solution) -> float:
    """Largest change of the capacitance matrix (or, without a return path, of the conductor
    charges) between two solutions of one model, relative to the largest entry of ``fine``.
    """
    if fine.has_capacitance:
        a, b = fine.capacitance_maxwell_F_per_m, coarse.capacitance_maxwell_F_per_m
    else:
        a, b = fine.conductor_charges_C_per_m, coarse.conductor_charges_C_per_m
    scale = np.abs(a).max()
    return float(np.abs(a - b).max() / scale) if scale > 0 else 0.0
