"""The assembled boundary-element system of one model on one mesh (the "System" stage).

Model -> Mesh -> **System** -> Solution: :func:`build_system` meshes the dielectric interfaces
at the conductor mesh's settings, splits conductor panels where an interface meets them, and
assembles the matrix of :mod:`solver.bem.assembly`. The value is frozen; solving it is
:func:`solver.bem.solve.solve_system`.
"""

from __future__ import annotations

import dataclasses
from dataclasses import dataclass

import numpy as np
import scipy.sparse

from solver.bem.assembly import (
    SourcePanels,
    SystemLayout,
    assemble_system,
    free_charge_operator,
    source_panels,
)
from solver.errors import InvalidModelError, MeshTooLargeError, NetChargeError, NoFieldError
from solver.mesh.interfaces import (
    InterfaceMesh,
    conductor_side_regions,
    conductor_snap_distances_m,
    discretize_interfaces,
    region_permittivities,
)
from solver.mesh.junctions import split_at_junctions
from solver.mesh.panels import PanelMesh
from solver.model.geometry import conductor_geometries
from solver.model.model import Model


@dataclass(frozen=True)
class BoundarySystem:
    """A model's boundary-element system, ready to factorise.

    Attributes
    ----------
    model, mesh, interfaces : what was assembled (``mesh`` split at interface junctions).
    length_scale_m : coordinates are divided by this inside the system, metres.
    plane : ground-plane height / length_scale_m, or None.
    sources : every charged panel, scaled.
    matrix : (size, size) system matrix; layout : where each unknown sits.
    free_charge_rows : (n_conductor_panels, n_panels) total -> free strengths (sparse).
    interface_rows : (n_interface, n_panels) principal-value normal field at interfaces.
    eps_r_plus, eps_r_minus : (n_conductor_panels,) eps_r on each side of conductor panels.
    region_plus, region_minus : (n_conductor_panels,) region index on each side (-1 in metal).
    region_eps_r : eps_r of every region, background last.
    """

    model: Model
    mesh: PanelMesh
    interfaces: InterfaceMesh
    length_scale_m: float
    plane: float | None
    sources: SourcePanels
    matrix: np.ndarray
    layout: SystemLayout
    free_charge_rows: scipy.sparse.csr_matrix
    interface_rows: np.ndarray
    eps_r_plus: np.ndarray
    eps_r_minus: np.ndarray
    region_plus: np.ndarray
    region_minus: np.ndarray
    region_eps_r: tuple[float, ...]


def _with_contrast(interfaces: InterfaceMesh) -> InterfaceMesh:
    """The interface panels that separate media of different permittivity (others carry no charge)."""
    keep = interfaces.eps_r_plus != interfaces.eps_r_minus
    if keep.all():
        return interfaces
    values = {f.name: getattr(interfaces, f.name)[keep] for f in dataclasses.fields(interfaces)}
    return InterfaceMesh(**values)


def _length_scale(mesh: PanelMesh, interfaces: InterfaceMesh) -> float:
    pts = np.vstack([mesh.starts, mesh.ends, interfaces.starts, interfaces.ends])
    return float(np.hypot(*(pts.max(axis=0) - pts.min(axis=0)))) or 1.0


def check_charge_balance(model: Model) -> None:
    """Refuse floating conductors whose net charge nothing can balance.

    Without a ground plane, a reference or a fixed conductor, the opposite charge has nowhere
    to sit. In 2-D the potential of a net line charge q grows like -q ln(r) / (2 pi eps) and
    has no value at infinity, so the floating potentials would be undefined (the system
    either has no solution or returns round-off). A set of floating charges summing to zero
    is fine: potentials are then taken relative to infinity.

    Raises
    ------
    NetChargeError
    """
    if model.ground_plane is not None or any(c.role != "floating" for c in model.conductors):
        return
    charges = np.array([c.charge_C_per_m for c in model.conductors], dtype=float)
    net = float(charges.sum())
    if abs(net) <= 1e-9 * float(np.abs(charges).sum()):
        return
    names = ", ".join(f"'{c.name}'" for c in model.conductors)
    raise NetChargeError(
        f"Floating conductor(s) {names} carry a net charge of {net:.6g} C/m and nothing can carry "
        "the opposite charge: in 2-D the potential of a net line charge relative to infinity is "
        "undefined (it grows like the logarithm of distance). Add a reference conductor or a ground "
        "plane, make one conductor fixed, or set charge_C_per_m so that the charges sum to zero."
    )


def check_field_is_driven(model: Model) -> None:
    """Refuse a model in which nothing drives a field (see :class:`NoFieldError`): no
    reference conductor, no ground plane, every fixed conductor at one potential and no
    floating conductor with a charge. Its exact solution is no charge and no field, which
    the solver could only show as round-off.

    Raises
    ------
    NoFieldError
    """
    if model.ground_plane is not None or any(c.role == "reference" for c in model.conductors):
        return
    fixed = sorted({c.potential_V for c in model.conductors if c.role == "fixed"})
    if len(fixed) > 1 or any(c.role == "floating" and c.charge_C_per_m != 0 for c in model.conductors):
        return
    held = (f"every conductor is held at {fixed[0]:g} V" if fixed
            else "no conductor is held at a potential and none carries a charge")
    raise NoFieldError(
        f"Nothing drives a field: {held}, and with neither a reference conductor nor a ground plane "
        "the net charge must be zero, so there is no charge and no field anywhere (a field needs a "
        "potential difference and a return path). Set one conductor's role to 'reference', add a "
        "ground plane, or give the conductors different potentials."
    )


def build_system(model: Model, mesh: PanelMesh, panel_block=None) -> BoundarySystem:
    """Mesh the interfaces of ``model`` at ``mesh.settings`` and assemble the system
    (``panel_block``: see :func:`solver.bem.assembly.assemble_system`).

    Raises
    ------
    NetChargeError
        When floating conductors carry a net charge with no return path (see
        :func:`check_charge_balance`).
    MeshTooLargeError
        When the interface mesh would not fit the memory budget, or memory runs out.
    """
    if not model.conductors:
        raise InvalidModelError("The model has no conductors; draw at least one.")
    check_charge_balance(model)
    check_field_is_driven(model)
    settings = mesh.settings
    interfaces = InterfaceMesh.empty()
    dgeoms: list = []
    cgeoms: list = []
    if model.dielectrics:
        cgeoms = conductor_geometries(model, settings.arc_step_rad)
        interfaces, dgeoms = discretize_interfaces(model, cgeoms, mesh, settings)
        interfaces = _with_contrast(interfaces)
        mesh = split_at_junctions(mesh, dgeoms)
    eps_regions = region_permittivities(model)
    if dgeoms:
        reg_plus, reg_minus = conductor_side_regions(model, dgeoms, mesh, conductor_snap_distances_m(cgeoms))
    else:
        reg_plus = np.full(mesh.n_panels, len(model.dielectrics), dtype=int)
        reg_minus = np.where(mesh.is_strip, reg_plus, -1)
    eps_plus = eps_regions[reg_plus]
    eps_minus = np.where(reg_minus >= 0, eps_regions[np.maximum(reg_minus, 0)], 0.0)

    ell = _length_scale(mesh, interfaces)
    plane = None if model.ground_plane is None else model.ground_plane.y * model.metres_per_unit / ell
    sources = source_panels(mesh, interfaces, ell)
    f_op = free_charge_operator(mesh, eps_plus, eps_minus, interfaces.n_panels, sources, ell, plane)
    roles = [c.role for c in model.conductors]
    try:
        a, layout, d_int = assemble_system(mesh, interfaces, roles, f_op, sources, plane, ell, panel_block)
    except MemoryError:
        raise MeshTooLargeError(
            f"Not enough memory to assemble the system of {mesh.n_panels} conductor and "
            f"{interfaces.n_panels} interface panels; choose a coarser mesh or close other programs."
        ) from None
    if layout.has_phi_inf and all(r == "floating" for r in roles):
        # Only floating conductors, charges summing to zero (checked above): the neutrality
        # row repeats the charge rows and leaves the potential level to round-off. Potentials
        # are then taken relative to infinity: the row becomes phi_inf = 0.
        a[-1, :] = 0.0
        a[-1, -1] = 1.0
    return BoundarySystem(
        model, mesh, interfaces, ell, plane, sources, a, layout, f_op, d_int,
        eps_plus, eps_minus, reg_plus, reg_minus, tuple(float(e) for e in eps_regions),
    )
