"""Solving a model with dielectric regions (total-charge formulation, see dielectric_assembly).

:func:`solve_dielectric_mesh` solves on given meshes; :func:`solve_dielectric` meshes, solves
and estimates the error on a mesh at half the resolution. :func:`solver.solve` dispatches here
whenever a model has a region whose eps_r differs from the background.
"""

from __future__ import annotations

import logging
import math
from dataclasses import replace

import numpy as np
import scipy.linalg

from .constants import EPSILON_0_F_PER_M
from .dielectric_assembly import assemble_dielectric, free_charge_operator, normal_derivative_matrix, source_panels
from .dielectric_mesh import conductor_side_regions, discretize_interfaces, region_permittivities
from .dielectric_solution import BACKGROUND_NAME, DielectricSolution
from .errors import InvalidModelError, SolveCancelled
from .solution import relative_change
from .solve import progress_reporter
from .geometry import conductor_geometries
from .junctions import split_at_junctions
from .model import Model
from .panels import MeshSettings, discretize_boundary

logger = logging.getLogger(__name__)


def needs_dielectric_solver(model: Model) -> bool:
    """True when some dielectric region's eps_r differs from the background's."""
    return any(d.eps_r != model.background_eps_r for d in model.dielectrics)


def solve_dielectric_mesh(model: Model, settings: MeshSettings, cancel=None) -> DielectricSolution:
    """Mesh conductors and interfaces at ``settings`` and solve once (no error estimate)."""
    if not model.conductors:
        raise InvalidModelError("The model has no conductors; draw at least one.")
    mesh = discretize_boundary(model, settings)
    cgeoms = conductor_geometries(model, settings.arc_step_rad)
    interfaces, dgeoms = discretize_interfaces(model, cgeoms, mesh, settings)
    mesh = split_at_junctions(mesh, dgeoms)
    eps_regions = region_permittivities(model)
    reg_plus, reg_minus = conductor_side_regions(model, dgeoms, mesh)
    eps_plus = eps_regions[reg_plus]
    eps_minus = np.where(reg_minus >= 0, eps_regions[np.maximum(reg_minus, 0)], 0.0)

    pts = np.vstack([mesh.starts, mesh.ends, interfaces.starts, interfaces.ends])
    ell = float(np.hypot(*(pts.max(axis=0) - pts.min(axis=0)))) or 1.0
    plane_y_m = None if model.ground_plane is None else model.ground_plane.y * model.metres_per_unit
    plane = None if plane_y_m is None else plane_y_m / ell
    sources = source_panels(mesh, interfaces, ell)
    f_op = free_charge_operator(mesh, eps_plus, eps_minus, interfaces.n_panels, sources, ell, plane)
    roles = [c.role for c in model.conductors]
    a, layout, sources, d_int = assemble_dielectric(mesh, interfaces, roles, f_op, ell, plane_y_m)
    if cancel is not None and cancel():
        raise SolveCancelled("Solve cancelled.")
    lu = scipy.linalg.lu_factor(a, check_finite=False)

    n_cond = len(model.conductors)
    signal = [k for k, r in enumerate(roles) if r == "fixed"]
    m = 1 + len(signal)
    b = np.zeros((layout.size, m))
    fixed_rows = np.array([roles[k] != "floating" for k in mesh.conductor_index], dtype=bool)
    potentials = np.zeros((n_cond, m))
    for k, c in enumerate(model.conductors):
        if c.role == "fixed":
            potentials[k, 0] = c.potential_V
    for col, k in enumerate(signal, start=1):
        potentials[k, col] = 1.0
    b[: mesh.n_panels][fixed_rows] = potentials[mesh.conductor_index[fixed_rows]]
    for f, k in enumerate(layout.floating):
        b[layout.n_panels + f, 0] = model.conductors[k].charge_C_per_m / (2 * math.pi * EPSILON_0_F_PER_M)
    x = scipy.linalg.lu_solve(lu, b, check_finite=False)

    n = layout.n_panels
    total = x[:n]
    free = f_op @ total
    conductor_potentials = potentials[:, 0].copy()
    for f, k in enumerate(layout.floating):
        conductor_potentials[k] = x[n + f, 0]
    strip = mesh.is_strip
    normal_pv = np.zeros(mesh.n_panels)
    if strip.any():
        normal_pv[strip] = normal_derivative_matrix(
            mesh.midpoints[strip] / ell, mesh.normals[strip], sources, plane, np.flatnonzero(strip)
        ) @ total[:, 0]
    region_names = tuple(d.name for d in model.dielectrics) + (BACKGROUND_NAME,)
    return DielectricSolution(
        model=model,
        mesh=mesh,
        permittivity_F_per_m=EPSILON_0_F_PER_M,
        length_scale_m=ell,
        strengths=free[:, 0].copy(),
        phi_inf_V=float(x[-1, 0]) if layout.has_phi_inf else 0.0,
        conductor_potentials_V=conductor_potentials,
        capacitance_strengths=free[:, 1:].copy(),
        interfaces=interfaces,
        total_strengths=total[:, 0].copy(),
        source_starts=sources.starts,
        source_ends=sources.ends,
        source_weights=sources.weights,
        conductor_eps_r_plus=eps_plus,
        conductor_eps_r_minus=eps_minus,
        conductor_normal_pv=normal_pv,
        interface_normal_pv=d_int @ total[:, 0] if interfaces.n_panels else np.zeros(0),
        region_names=region_names,
        region_eps_r=tuple(float(e) for e in eps_regions),
        interface_region_plus=interfaces.region_plus,
        interface_region_minus=interfaces.region_minus,
        conductor_region_plus=reg_plus,
        conductor_region_minus=reg_minus,
    )


def solve_dielectric(
    model: Model,
    *,
    estimate_error: bool = True,
    settings: MeshSettings | None = None,
    progress=None,
    cancel=None,
) -> DielectricSolution:
    """Solve a model of conductors in piecewise-homogeneous dielectrics.

    Parameters and result as :func:`solver.solve`; the result is a
    :class:`~solver.dielectric_solution.DielectricSolution`, whose charges and capacitance
    matrices are free-charge figures.
    """
    settings = settings or MeshSettings.for_density(model.mesh_density)

    report = progress_reporter(progress, cancel)

    report(0.0, "Meshing conductors and dielectric interfaces")
    solution = solve_dielectric_mesh(model, settings, cancel)
    if not estimate_error:
        report(1.0, "Done")
        return solution
    report(0.7, "Estimating the error on a coarser mesh")
    coarse = solve_dielectric_mesh(model, MeshSettings(settings.level / 2.0), cancel)
    error = relative_change(solution, coarse)
    logger.info(
        "solved %d conductor + %d interface panels; estimated relative error %.2e",
        solution.mesh.n_panels, solution.interfaces.n_panels, error,
    )
    report(1.0, "Done")
    return replace(solution, estimated_relative_error=error, coarse_mesh_panels=coarse.mesh.n_panels)
