"""Where the field peaks: the largest surface field on each conductor and in each region."""

from __future__ import annotations

import math
from dataclasses import dataclass
from typing import Protocol

import numpy as np

from solver.mesh.interfaces import InterfaceMesh
from solver.mesh.panels import PanelMesh
from solver.model.model import Model


class RegionSides(Protocol):
    """What :func:`region_peaks` reads: the meshes and the region on each side of every panel
    (a :class:`~solver.bem.solution.Solution` has all of it; no import of it is needed here)."""

    @property
    def model(self) -> Model: ...
    @property
    def mesh(self) -> PanelMesh: ...
    @property
    def interfaces(self) -> InterfaceMesh: ...
    @property
    def region_names(self) -> tuple[str, ...]: ...
    @property
    def region_eps_r(self) -> tuple[float, ...]: ...
    @property
    def conductor_region_plus(self) -> np.ndarray: ...
    @property
    def conductor_region_minus(self) -> np.ndarray: ...
    @property
    def interface_region_plus(self) -> np.ndarray: ...
    @property
    def interface_region_minus(self) -> np.ndarray: ...


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


def conductor_peaks(model: Model, mesh: PanelMesh, surface_field_V_per_m: np.ndarray) -> tuple[PeakField, ...]:
    """Largest of ``surface_field_V_per_m`` (n_panels,) on each conductor, in model order."""
    peaks = []
    e = surface_field_V_per_m
    for k, conductor in enumerate(model.conductors):
        idx = np.flatnonzero(mesh.conductor_index == k)
        i = int(idx[np.argmax(e[idx])])
        near = mesh.distance_to_corner_m[i] < 2.0 * mesh.lengths[i] + 1e-15
        exponent = None
        if near:
            mine = mesh.corner_conductor == k
            d = np.hypot(*(mesh.corner_points[mine] - mesh.midpoints[i]).T)
            beta = mesh.corner_opening_rad[mine][np.argmin(d)]
            exponent = float(math.pi / beta - 1.0)
        peaks.append(
            PeakField(conductor.name, float(e[i]), (float(mesh.midpoints[i, 0]), float(mesh.midpoints[i, 1])),
                      i, bool(near), exponent)
        )
    return tuple(peaks)


def region_peaks(
    solution: RegionSides, e_plus: np.ndarray, e_minus: np.ndarray, f_plus: np.ndarray, f_minus: np.ndarray
) -> tuple[RegionPeakField, ...]:
    """Largest field per region from the field magnitudes on both sides of conductor panels
    (``e_plus``, ``e_minus``) and of interface panels (``f_plus``, ``f_minus``), V/m."""
    mesh, interfaces = solution.mesh, solution.interfaces
    names = solution.model.conductor_names
    corners = mesh.corner_points
    if len(corners) and interfaces.n_panels:
        d = np.hypot(*(interfaces.points[:, None, :] - corners[None, :, :]).transpose(2, 0, 1)).min(axis=1)
        near_interface = d < 2.0 * interfaces.arc_lengths
    else:
        near_interface = np.zeros(interfaces.n_panels, dtype=bool)
    near_conductor = mesh.distance_to_corner_m < 2.0 * mesh.lengths
    out = []
    for r, (name, eps_r) in enumerate(zip(solution.region_names, solution.region_eps_r)):
        best: tuple[float, tuple[float, float], str, bool] = (-1.0, (math.nan, math.nan), "", False)
        for values, regions, pts, label, near in (
            (e_plus, solution.conductor_region_plus, mesh.midpoints, "c", near_conductor),
            (e_minus, solution.conductor_region_minus, mesh.midpoints, "c", near_conductor),
            (f_plus, solution.interface_region_plus, interfaces.points, "i", near_interface),
            (f_minus, solution.interface_region_minus, interfaces.points, "i", near_interface),
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
