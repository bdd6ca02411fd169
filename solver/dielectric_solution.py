"""The solution of a model with dielectric regions: free and total charge, fields both sides.

:class:`DielectricSolution` keeps the public API of :class:`~solver.solution.Solution`:
``strengths`` and ``capacitance_strengths`` hold *free* charge (scaled with eps0), so the
surface charge density, conductor charges and capacitance matrices are free-charge figures;
potentials and fields come from the total (free + bound) charge radiating in vacuum.
It adds the interface figures: total (bound) charge on interfaces, the field on both sides of
each interface panel and the peak field inside each dielectric region (insulation stress).
"""

from __future__ import annotations

import math
from dataclasses import dataclass, field
from functools import cached_property

import numpy as np

from .assembly import mirrored, single_layer_potential_matrix
from .dielectric_mesh import InterfaceMesh
from .kernels import log_gradient_integrals
from .solution import Solution

#: Name used for the surrounding medium in per-region results.
BACKGROUND_NAME = "background"


@dataclass(frozen=True)
class RegionPeakField:
    """Largest field magnitude inside one dielectric region (on its boundary, where |E| peaks).

    Attributes
    ----------
    region : dielectric name, or "background".
    eps_r : its relative permittivity.
    field_V_per_m : largest |E| in the region, V/m.
    location_m : (x, y) where it occurs, metres.
    where : "conductor '<name>'" or "interface".
    at_sharp_corner : True when the peak sits next to a sharp conductor corner or strip edge,
        where the 2-D field is singular and the value grows as the mesh is refined.
    """

    region: str
    eps_r: float
    field_V_per_m: float
    location_m: tuple[float, float]
    where: str
    at_sharp_corner: bool = False


@dataclass(frozen=True)
class DielectricSolution(Solution):
    """A :class:`Solution` of a model with dielectric regions (see the module docstring).

    Extra attributes
    ----------------
    interfaces : InterfaceMesh on the dielectric interfaces (metres).
    total_strengths : (n_conductor + n_interface,) scaled total strengths of the operating point.
    source_starts, source_ends : (n_sources, 2) scaled chord ends of every charged panel.
    source_weights : (n_sources,) curve/chord length factors.
    conductor_eps_r_plus, conductor_eps_r_minus : (n_conductor,) eps_r on each side of
        conductor panels (the back side only for strips, else 0).
    interface_normal_pv : (n_interface,) scaled principal-value normal field at interfaces.
    region_names, region_eps_r : names and eps_r of the dielectric regions (background last).
    interface_region_plus, interface_region_minus : (n_interface,) region index of each side.
    conductor_region_plus, conductor_region_minus : (n_conductor,) region index (-1 inside).
    """

    interfaces: InterfaceMesh = field(default_factory=InterfaceMesh.empty)
    total_strengths: np.ndarray = field(default_factory=lambda: np.zeros(0))
    source_starts: np.ndarray = field(default_factory=lambda: np.zeros((0, 2)))
    source_ends: np.ndarray = field(default_factory=lambda: np.zeros((0, 2)))
    source_weights: np.ndarray = field(default_factory=lambda: np.zeros(0))
    conductor_eps_r_plus: np.ndarray = field(default_factory=lambda: np.zeros(0))
    conductor_eps_r_minus: np.ndarray = field(default_factory=lambda: np.zeros(0))
    conductor_normal_pv: np.ndarray = field(default_factory=lambda: np.zeros(0))
    interface_normal_pv: np.ndarray = field(default_factory=lambda: np.zeros(0))
    region_names: tuple[str, ...] = ()
    region_eps_r: tuple[float, ...] = ()
    interface_region_plus: np.ndarray = field(default_factory=lambda: np.zeros(0, dtype=int))
    interface_region_minus: np.ndarray = field(default_factory=lambda: np.zeros(0, dtype=int))
    conductor_region_plus: np.ndarray = field(default_factory=lambda: np.zeros(0, dtype=int))
    conductor_region_minus: np.ndarray = field(default_factory=lambda: np.zeros(0, dtype=int))

    @property
    def has_dielectrics(self) -> bool:
        return True

    # ---- charges ---------------------------------------------------------------------------
    @cached_property
    def total_surface_charge_density_C_per_m2(self) -> np.ndarray:
        """(n_conductor_panels,) total (free + bound) charge density on conductor panels, C/m^2."""
        return self._to_sigma(self.total_strengths[: self.mesh.n_panels])

    @cached_property
    def interface_charge_density_C_per_m2(self) -> np.ndarray:
        """(n_interface_panels,) bound (polarisation) charge density on interface panels, C/m^2."""
        return self._to_sigma(self.total_strengths[self.mesh.n_panels :])

    # ---- fields ----------------------------------------------------------------------------
    def _weighted(self) -> np.ndarray:
        return self.total_strengths * self.source_weights

    def potential_V(self, points_m: np.ndarray) -> np.ndarray:
        """Potential at (m, 2) points in metres, volts, shape (m,)."""
        pts = np.asarray(points_m, dtype=float).reshape(-1, 2) / self.length_scale_m
        g = single_layer_potential_matrix(pts, self.source_starts, self.source_ends, self._plane_scaled())
        return g @ self._weighted() + self.phi_inf_V

    def field_V_per_m(self, points_m: np.ndarray) -> np.ndarray:
        """Electric field E = -grad(phi) at (m, 2) points in metres, V/m, shape (m, 2).

        On an interface the value is the principal value (the mean of the two sides' normal
        components); use :attr:`interface_fields_V_per_m` for each side.
        """
        ell = self.length_scale_m
        pts = np.asarray(points_m, dtype=float).reshape(-1, 2) / ell
        q = self._weighted()
        e = np.einsum("mnk,n->mk", log_gradient_integrals(pts, self.source_starts, self.source_ends), q)
        plane = self._plane_scaled()
        if plane is not None:
            img = np.einsum(
                "mnk,n->mk", log_gradient_integrals(mirrored(pts, plane), self.source_starts, self.source_ends), q
            )
            img[:, 1] *= -1.0
            e -= img
        return e / ell

    @cached_property
    def surface_field_V_per_m(self) -> np.ndarray:
        """(n_panels,) |E| at the surface of each conductor panel, V/m (on a strip, the larger side).

        At a conductor surface E = sigma_total / eps0 = sigma_free / (eps0 eps_r).
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
    def peak_region_fields(self) -> tuple[RegionPeakField, ...]:
        """Largest |E| inside each dielectric region and the background (insulation stress).

        |E| is subharmonic in a charge-free region, so its largest value lies on the region's
        boundary: on conductor surfaces or interfaces; both are searched.
        """
        ell = self.length_scale_m
        mesh = self.mesh
        q = self.total_strengths[: mesh.n_panels]
        e_pv = self.conductor_normal_pv / ell
        jump = math.pi * q / ell
        e_plus = np.where(mesh.is_strip, np.abs(e_pv + jump), 2.0 * np.abs(jump))
        e_minus = np.where(mesh.is_strip, np.abs(e_pv - jump), 0.0)
        f_plus, f_minus = self.interface_fields_V_per_m
        names = self.model.conductor_names
        corners = mesh.corner_points
        if len(corners) and self.interfaces.n_panels:
            d = np.hypot(*(self.interfaces.points[:, None, :] - corners[None, :, :]).transpose(2, 0, 1)).min(axis=1)
            near_interface = d < 2.0 * self.interfaces.arc_lengths
        else:
            near_interface = np.zeros(self.interfaces.n_panels, dtype=bool)
        near_conductor = mesh.distance_to_corner_m < 2.0 * mesh.lengths
        out = []
        for r, (name, eps_r) in enumerate(zip(self.region_names, self.region_eps_r)):
            best = (-1.0, (math.nan, math.nan), "", False)
            for values, regions, pts, label, near in (
                (e_plus, self.conductor_region_plus, mesh.midpoints, "c", near_conductor),
                (e_minus, self.conductor_region_minus, mesh.midpoints, "c", near_conductor),
                (np.hypot(*f_plus.T), self.interface_region_plus, self.interfaces.points, "i", near_interface),
                (np.hypot(*f_minus.T), self.interface_region_minus, self.interfaces.points, "i", near_interface),
            ):
                mine = np.flatnonzero(regions == r)
                if mine.size == 0:
                    continue
                i = int(mine[np.argmax(values[mine])])
                if values[i] > best[0]:
                    where = f"conductor '{names[mesh.conductor_index[i]]}'" if label == "c" else "interface"
                    best = (float(values[i]), (float(pts[i, 0]), float(pts[i, 1])), where, bool(near[i]))
            if best[0] >= 0:
                out.append(RegionPeakField(name, float(eps_r), best[0], best[1], best[2], best[3]))
        return tuple(out)
