"""The solution of a solve: charges, capacitance matrices, fields at points and on surfaces.

A :class:`Solution` is an immutable value produced by :func:`solver.solve`. Arrays are in SI
units; points are (m, 2) arrays in metres. One type serves every model: a homogeneous medium
is a model without dielectric interfaces (``interfaces.n_panels == 0``).

Charges come in two kinds (see :mod:`solver.bem.assembly`): *free* charge on conductors, which
the surface charge density, conductor charges and capacitance matrices report, and *total*
(free + bound) charge, which radiates in vacuum and gives potentials and fields.
"""

from __future__ import annotations

import math
from dataclasses import dataclass, field, replace
from functools import cached_property

import numpy as np

from solver.bem.assembly import mirrored, single_layer_potential_matrix
from solver.bem.capacitance import mutual_from_maxwell
from solver.bem.fast_operator import potential_and_gradient_sums
from solver.bem.peaks import PeakField, RegionPeakField, conductor_peaks, region_peaks
from solver.bem.superposition import UnitSolutions
from solver.constants import EPSILON_0_F_PER_M
from solver.errors import NoReferenceError, SuperpositionError
from solver.mesh.interfaces import InterfaceMesh
from solver.mesh.panels import PanelMesh
from solver.model.model import Model

__all__ = ["PeakField", "RegionPeakField", "Solution", "relative_change"]

#: Name used for the surrounding medium in per-region results.
BACKGROUND_NAME = "background"


@dataclass(frozen=True)
class Solution:
    """Result of solving a model with the boundary-element method.

    Attributes
    ----------
    model : the Model that was solved.
    mesh : the PanelMesh on the conductors.
    interfaces : the InterfaceMesh on dielectric interfaces (empty in a homogeneous medium).
    length_scale_m : the length unit used inside the solve (metres).
    strengths : (n_conductor_panels,) scaled *free* strengths of the operating point,
        sigma_free * ell / (2 pi eps0).
    capacitance_strengths : (n_conductor_panels, n_signal) free strengths for V_j = 1 V on
        each signal conductor.
    total_strengths : (n_conductor_panels + n_interface_panels,) scaled *total* strengths of
        the operating point (free + bound), which radiate in vacuum.
    phi_inf_V : potential at infinity of the operating point (0 with a ground plane).
    conductor_potentials_V : potential of every conductor (model order), V.
    source_starts, source_ends : (n_sources, 2) scaled chord ends of every charged panel.
    source_weights : (n_sources,) curve/chord length factors.
    conductor_eps_r_plus, conductor_eps_r_minus : (n_conductor_panels,) eps_r on each side
        of conductor panels (the back side only for strips, else 0).
    conductor_normal_pv, interface_normal_pv : scaled principal-value normal field at
        strip panels (0 elsewhere) and at interface panels.
    region_names, region_eps_r : names and eps_r of the dielectric regions (background last).
    interface_region_plus, interface_region_minus : (n_interface,) region index of each side.
    conductor_region_plus, conductor_region_minus : (n_conductor,) region index (-1 inside).
    n_unknowns : size of the linear system that was solved.
    estimated_relative_error : relative change of the capacitance matrix (or of the conductor
        charges when there is no return path) against a mesh at half the resolution; None when
        no estimate was made.
    coarse_mesh_panels : conductor panels of that coarser mesh.
    coarse : the solution on that coarser mesh (None when no estimate was made); figures that
        refine (hot spots) start from this pair instead of solving the model again.
    unit_solutions : one solution per fixed conductor at 1 V and per floating conductor at unit
        charge, for :meth:`with_potentials`; None when not kept.
    stage_seconds : wall time of each stage of :func:`solver.solve` that made this solution
        (e.g. ``(("meshing", 0.01), ("assembling", 0.2), ...)``), seconds; empty when unknown.
    """

    model: Model
    mesh: PanelMesh
    interfaces: InterfaceMesh
    length_scale_m: float
    strengths: np.ndarray
    capacitance_strengths: np.ndarray
    total_strengths: np.ndarray
    phi_inf_V: float
    conductor_potentials_V: np.ndarray
    source_starts: np.ndarray
    source_ends: np.ndarray
    source_weights: np.ndarray
    conductor_eps_r_plus: np.ndarray
    conductor_eps_r_minus: np.ndarray
    conductor_normal_pv: np.ndarray
    interface_normal_pv: np.ndarray
    region_names: tuple[str, ...]
    region_eps_r: tuple[float, ...]
    interface_region_plus: np.ndarray
    interface_region_minus: np.ndarray
    conductor_region_plus: np.ndarray
    conductor_region_minus: np.ndarray
    n_unknowns: int
    estimated_relative_error: float | None = None
    coarse_mesh_panels: int | None = None
    coarse: Solution | None = field(default=None, compare=False, repr=False)
    unit_solutions: UnitSolutions | None = None
    stage_seconds: tuple[tuple[str, float], ...] = field(default=(), compare=False)

    #: The permittivity the scaled strengths refer to (vacuum), F/m.
    permittivity_F_per_m = EPSILON_0_F_PER_M

    # ---- names -------------------------------------------------------------------------
    @property
    def conductor_names(self) -> tuple[str, ...]:
        return self.model.conductor_names

    @property
    def signal_names(self) -> tuple[str, ...]:
        """Rows and columns of the capacitance matrices (the fixed-potential conductors)."""
        return self.model.signal_names

    @property
    def has_dielectrics(self) -> bool:
        """True when some dielectric region's eps_r differs from the background's."""
        background = self.region_eps_r[-1]
        return any(eps_r != background for eps_r in self.region_eps_r[:-1])

    # ---- charges -----------------------------------------------------------------------
    def _to_sigma(self, strengths: np.ndarray) -> np.ndarray:
        return 2 * math.pi * EPSILON_0_F_PER_M * strengths / self.length_scale_m

    @cached_property
    def surface_charge_density_C_per_m2(self) -> np.ndarray:
        """(n_panels,) free surface charge density on each conductor panel, C/m^2
        (both sides of a strip added)."""
        return self._to_sigma(self.strengths)

    @cached_property
    def total_surface_charge_density_C_per_m2(self) -> np.ndarray:
        """(n_conductor_panels,) total (free + bound) charge density on conductor panels, C/m^2."""
        return self._to_sigma(self.total_strengths[: self.mesh.n_panels])

    @cached_property
    def interface_charge_density_C_per_m2(self) -> np.ndarray:
        """(n_interface_panels,) bound (polarisation) charge density on interface panels, C/m^2."""
        return self._to_sigma(self.total_strengths[self.mesh.n_panels :])

    def _conductor_sums(self, per_panel: np.ndarray) -> np.ndarray:
        n_cond = len(self.model.conductors)
        lengths = self.mesh.lengths[:, None] if per_panel.ndim == 2 else self.mesh.lengths
        weights = per_panel * lengths
        out = np.zeros((n_cond,) + weights.shape[1:])
        np.add.at(out, self.mesh.conductor_index, weights)
        return out

    @cached_property
    def conductor_charges_C_per_m(self) -> np.ndarray:
        """Net free charge per unit length of every conductor (model order), C/m."""
        return self._conductor_sums(self.surface_charge_density_C_per_m2)

    @property
    def has_capacitance(self) -> bool:
        """True when the model has a return path (reference conductor or ground plane)."""
        return self.model.has_return_path and len(self.signal_names) > 0

    @cached_property
    def capacitance_maxwell_unsymmetrised_F_per_m(self) -> np.ndarray:
        """The Maxwell matrix as computed, before symmetrisation, F/m; its asymmetry is an
        accuracy check (see :attr:`capacitance_asymmetry`)."""
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
        return charges[signal]

    @cached_property
    def capacitance_maxwell_F_per_m(self) -> np.ndarray:
        """Maxwell capacitance matrix per unit length, F/m, over :attr:`signal_names`.

        C_ij is the free charge on conductor i with conductor j at 1 V and every other fixed or
        reference conductor at 0 V (floating conductors carry no net charge); symmetrised.
        Raises NoReferenceError when the model has no return path.
        """
        c = self.capacitance_maxwell_unsymmetrised_F_per_m
        return 0.5 * (c + c.T)

    @cached_property
    def capacitance_asymmetry(self) -> float:
        """Largest |C_ij - C_ji| relative to the largest |C_ij| of the computed matrix."""
        c = self.capacitance_maxwell_unsymmetrised_F_per_m
        scale = float(np.abs(c).max())
        return float(np.abs(c - c.T).max() / scale) if scale > 0 else 0.0

    @cached_property
    def capacitance_mutual_F_per_m(self) -> np.ndarray:
        """Mutual ("circuit") form of the capacitance matrix, F/m (see capacitance module)."""
        return mutual_from_maxwell(self.capacitance_maxwell_F_per_m)

    # ---- operating point -----------------------------------------------------------------
    def with_potentials(
        self, potentials_V: dict[str, float], charges_C_per_m: dict[str, float] | None = None
    ) -> Solution:
        """The solution at other conductor potentials (and floating charges), without a solve.

        The operating point is superposed from the stored unit solutions (see
        :mod:`solver.bem.superposition`), in microseconds; it equals a full solve at those
        potentials to rounding (about 1e-12 relative). Capacitance matrices and the error
        estimate are kept (they do not depend on the operating point).

        Without a return path the error estimate is of the conductor charges, which change with
        the potentials: it is made again from the superposed coarser solution of the estimate
        (the same number a fresh solve of both meshes would give).

        Parameters
        ----------
        potentials_V : {conductor name: volts}; only fixed conductors' potentials act
            (reference conductors stay at 0 V, floating ones take what results).
        charges_C_per_m : {floating conductor name: net free charge, C/m}, optional.

        Returns
        -------
        Solution

        Raises
        ------
        KeyError : a name is not a conductor of the model.
        SuperpositionError : the solution cannot be carried to other potentials (no unit
            solutions; or an estimate of the charges without its coarser solution); re-solve.

        Examples
        --------
        >>> sol = solve(model)  # doctest: +SKIP
        >>> sol.with_potentials({"L1": 12e3, "L2": -6e3}).conductor_charges_C_per_m  # doctest: +SKIP
        """
        model = self.model.with_potentials(potentials_V)
        if charges_C_per_m:
            model = model.with_conductors(tuple(
                replace(c, charge_C_per_m=float(charges_C_per_m[c.name])) if c.name in charges_C_per_m else c
                for c in model.conductors
            ))
            unknown = set(charges_C_per_m) - set(model.conductor_names)
            if unknown:
                raise KeyError(f"No conductor named '{sorted(unknown)[0]}'.")
        units = self.unit_solutions
        if units is None or not units.matches(model):
            raise SuperpositionError(
                "This solution kept no unit solutions for these conductors, so other potentials "
                "cannot be superposed: solve the model again (solver.solve) at the new potentials."
            )
        estimate_moves = self.estimated_relative_error is not None and not self.has_capacitance
        if estimate_moves and self.coarse is None:
            raise SuperpositionError(
                "The error estimate of this solution (no return path: it is of the conductor "
                "charges) cannot be carried to other potentials without its coarser solution: "
                "solve the model again (solver.solve) at the new potentials."
            )
        # The coarser solution of the error estimate moves with the potentials too, so that
        # figures refining from the pair (hot spots) see the new operating point.
        coarse = None if self.coarse is None else self.coarse.with_potentials(potentials_V, charges_C_per_m)
        moved = replace(self, model=model, coarse=coarse, **units.superposed(model))
        if estimate_moves:
            assert coarse is not None
            moved = replace(moved, estimated_relative_error=relative_change(moved, coarse))
        return moved

    # ---- fields ------------------------------------------------------------------------
    def _plane_scaled(self) -> float | None:
        plane = self.model.ground_plane
        return None if plane is None else plane.y * self.model.metres_per_unit / self.length_scale_m

    def _weighted(self) -> np.ndarray:
        return self.total_strengths * self.source_weights

    def potential_V(self, points_m: np.ndarray) -> np.ndarray:
        """Potential at (m, 2) points in metres, volts, shape (m,).

        Inside a conductor the value is that conductor's potential (to solver accuracy).
        """
        pts = np.asarray(points_m, dtype=float).reshape(-1, 2) / self.length_scale_m
        g = single_layer_potential_matrix(pts, self.source_starts, self.source_ends, self._plane_scaled())
        return g @ self._weighted() + self.phi_inf_V

    def field_V_per_m(self, points_m: np.ndarray) -> np.ndarray:
        """Electric field E = -grad(phi) at (m, 2) points in metres, V/m, shape (m, 2).

        On an interface the value is the principal value (the mean of the two sides' normal
        components); use :attr:`interface_fields_V_per_m` for each side.
        """
        return self.potential_and_field(points_m)[1]

    def potential_and_field(self, points_m: np.ndarray) -> tuple[np.ndarray, np.ndarray]:
        """Potential (V, shape (m,)) and field E = -grad(phi) (V/m, shape (m, 2)) at (m, 2)
        points in metres, from one pass over the panels (the same logarithms and angles).

        Equal to :meth:`potential_V` and :meth:`field_V_per_m` to rounding (about 1e-13
        relative); above ``fast_operator.FMM_EVALUATION_PAIRS`` (points x panels, e.g. a
        512 x 512 map) the sums are done by the fast multipole method with exact near-field
        terms, to about 1e-8 relative. Principal value on interfaces, as :meth:`field_V_per_m`.
        """
        ell = self.length_scale_m
        pts = np.asarray(points_m, dtype=float).reshape(-1, 2) / ell
        q = self._weighted()
        g, grad = potential_and_gradient_sums(pts, self.source_starts, self.source_ends, q)
        phi = -g
        e = grad
        plane = self._plane_scaled()
        if plane is not None:
            g_img, grad_img = potential_and_gradient_sums(
                mirrored(pts, plane), self.source_starts, self.source_ends, q
            )
            phi += g_img
            grad_img[:, 1] *= -1.0
            e -= grad_img
        return phi + self.phi_inf_V, e / ell

    def potential_and_field_on_grid(
        self, x_m: np.ndarray, y_m: np.ndarray, skip: np.ndarray | None = None
    ) -> tuple[np.ndarray, np.ndarray]:
        """Potential (V, shape (ny, nx)) and field E = -grad(phi) (V/m, shape (ny, nx, 2)) at
        the nodes of the grid ``x_m`` x ``y_m`` (metres), for maps.

        Evenly spaced axes are summed by :mod:`solver.bem.grid_sums` (FFT on a lattice with
        exact near-field corrections; about 1e-6 of the largest |phi| and 2e-5 of the
        largest |E| from the direct sums, tested), other axes point by point as
        :meth:`potential_and_field`. Values inside conductors are not meaningful here (the
        caller masks them); ``skip`` ((ny, nx) bool, optional) marks nodes the caller masks,
        which the grid sums then spend no exact near-field terms on (their values are not
        the sums).
        """
        from solver.bem.grid_sums import grid_potential_and_gradient_sums, is_regular

        x_m, y_m = np.asarray(x_m, dtype=float), np.asarray(y_m, dtype=float)
        ell = self.length_scale_m
        summed = None
        if is_regular(x_m) and is_regular(y_m):
            starts, ends, q = self.source_starts, self.source_ends, self._weighted()
            plane = self._plane_scaled()
            if plane is not None:  # image panels carry the opposite charge
                starts = np.vstack([starts, mirrored(starts, plane)])
                ends = np.vstack([ends, mirrored(ends, plane)])
                q = np.concatenate([q, -q])
            summed = grid_potential_and_gradient_sums(x_m / ell, y_m / ell, starts, ends, q, skip)
        if summed is None:
            xx, yy = np.meshgrid(x_m, y_m)
            phi, e = self.potential_and_field(np.column_stack([xx.ravel(), yy.ravel()]))
            return phi.reshape(len(y_m), len(x_m)), e.reshape(len(y_m), len(x_m), 2)
        s, grad = summed
        return -s + self.phi_inf_V, grad / ell

    @cached_property
    def surface_field_V_per_m(self) -> np.ndarray:
        """(n_panels,) |E| at the surface of each conductor panel, V/m (on a strip, the larger side).

        At a conductor surface E = sigma_total / eps0 = sigma_free / (eps0 eps_r). On a strip
        each side carries its own share of charge: E = |E_pv . n +- sigma / (2 eps0)|.
        """
        ell = self.length_scale_m
        q = self.total_strengths[: self.mesh.n_panels]
        out = 2.0 * math.pi * np.abs(q) / ell
        strip = self.mesh.is_strip
        if strip.any():
            e_pv, jump = self.conductor_normal_pv[strip] / ell, math.pi * q[strip] / ell
            out[strip] = np.maximum(np.abs(e_pv + jump), np.abs(e_pv - jump))
        return out

    @cached_property
    def interface_fields_V_per_m(self) -> tuple[np.ndarray, np.ndarray]:
        """Field vectors (n_interface, 2) on the "+" (normal) side and the "-" side, V/m.

        Tangential E is continuous; the normal parts satisfy eps+ E_n+ = eps- E_n-.
        """
        ell = self.length_scale_m
        ifc = self.interfaces
        if ifc.n_panels == 0:
            z = np.zeros((0, 2))
            return z, z
        tangents = np.column_stack([-ifc.normals[:, 1], ifc.normals[:, 0]])
        e = self.field_V_per_m(ifc.points)
        e_t = np.einsum("ij,ij->i", e, tangents)
        q = self.total_strengths[self.mesh.n_panels :]
        e_n_plus = (self.interface_normal_pv + math.pi * q) / ell
        e_n_minus = (self.interface_normal_pv - math.pi * q) / ell
        plus = e_t[:, None] * tangents + e_n_plus[:, None] * ifc.normals
        minus = e_t[:, None] * tangents + e_n_minus[:, None] * ifc.normals
        return plus, minus

    @cached_property
    def peak_surface_fields(self) -> tuple[PeakField, ...]:
        """Largest surface field on each conductor, in model order."""
        return conductor_peaks(self.model, self.mesh, self.surface_field_V_per_m)

    @cached_property
    def peak_region_fields(self) -> tuple[RegionPeakField, ...]:
        """Largest |E| inside each dielectric region and the background (insulation stress).

        Empty when the model has no dielectric regions. |E| is subharmonic in a charge-free
        region, so its largest value lies on the region's boundary: on conductor surfaces or
        interfaces; both are searched.
        """
        if not self.model.dielectrics:
            return ()
        ell = self.length_scale_m
        q = self.total_strengths[: self.mesh.n_panels]
        e_pv = self.conductor_normal_pv / ell
        jump = math.pi * q / ell
        e_plus = np.where(self.mesh.is_strip, np.abs(e_pv + jump), 2.0 * np.abs(jump))
        e_minus = np.where(self.mesh.is_strip, np.abs(e_pv - jump), 0.0)
        f_plus, f_minus = self.interface_fields_V_per_m
        return region_peaks(
            self, e_plus, e_minus, np.hypot(*f_plus.T), np.hypot(*f_minus.T)
        )


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
