"""Solving a model: one factorisation, one right-hand side per signal conductor.

:func:`solve` meshes the model, assembles the single-layer system, factorises it once and
solves for the operating point (the potentials and charges the user set) together with one
right-hand side per fixed-potential conductor for the capacitance matrix. It then repeats the
solve on a mesh at half the resolution to estimate the error.

The equivalent radius of isolated conductors lives in :mod:`solver.equilibrium`.
"""

from __future__ import annotations

import logging
import math
from typing import Callable

import numpy as np
import scipy.linalg

from .assembly import assemble_single_layer, right_hand_sides
from .constants import EPSILON_0_F_PER_M
from .errors import InvalidModelError, SolveCancelled
from .model import Model
from .panels import MeshSettings, PanelMesh, discretize_boundary
from .solution import Solution, relative_change

logger = logging.getLogger(__name__)

ProgressCallback = Callable[[float, str], None]
CancelCallback = Callable[[], bool]


def progress_reporter(progress: ProgressCallback | None, cancel: CancelCallback | None) -> ProgressCallback:
    """A callback that passes progress on and raises SolveCancelled once ``cancel()`` is True."""

    def report(fraction: float, message: str) -> None:
        if progress is not None:
            progress(fraction, message)
        if cancel is not None and cancel():
            raise SolveCancelled("Solve cancelled.")

    return report


def _length_scale(mesh: PanelMesh) -> float:
    pts = np.vstack([mesh.starts, mesh.ends])
    return float(np.hypot(*(pts.max(axis=0) - pts.min(axis=0)))) or 1.0


def _check_solvable(model: Model) -> None:
    if not model.conductors:
        raise InvalidModelError("The model has no conductors; draw at least one.")
    if model.dielectrics:
        unequal = [d.name for d in model.dielectrics if d.eps_r != model.background_eps_r]
        if unequal:
            raise InvalidModelError(
                f"Dielectric region '{unequal[0]}' needs the dielectric solver (solver.solve dispatches to it); "
                "the homogeneous solver handles only the background permittivity."
            )


def solve_mesh(model: Model, mesh: PanelMesh, cancel: CancelCallback | None = None) -> Solution:
    """Solve ``model`` on a given ``mesh`` (no error estimate; homogeneous medium only)."""
    _check_solvable(model)
    eps = EPSILON_0_F_PER_M * model.background_eps_r
    ell = _length_scale(mesh)
    plane_y_m = None if model.ground_plane is None else model.ground_plane.y * model.metres_per_unit
    roles = [c.role for c in model.conductors]
    a, layout = assemble_single_layer(mesh, roles, ell, plane_y_m)
    if cancel is not None and cancel():
        raise SolveCancelled("Solve cancelled.")
    lu = scipy.linalg.lu_factor(a, check_finite=False)

    n_cond = len(model.conductors)
    signal = [k for k, r in enumerate(roles) if r == "fixed"]
    potentials = np.zeros((n_cond, 1 + len(signal)))
    charges = np.zeros((n_cond, 1 + len(signal)))
    for k, c in enumerate(model.conductors):
        if c.role == "fixed":
            potentials[k, 0] = c.potential_V
        elif c.role == "floating":
            charges[k, 0] = c.charge_C_per_m / (2 * math.pi * eps)
    for col, k in enumerate(signal, start=1):
        potentials[k, col] = 1.0
    x = scipy.linalg.lu_solve(lu, right_hand_sides(mesh, layout, potentials, charges), check_finite=False)

    n = mesh.n_panels
    conductor_potentials = potentials[:, 0].copy()
    for f, k in enumerate(layout.floating):
        conductor_potentials[k] = x[n + f, 0]
    return Solution(
        model=model,
        mesh=mesh,
        permittivity_F_per_m=eps,
        length_scale_m=ell,
        strengths=x[:n, 0].copy(),
        phi_inf_V=float(x[-1, 0]) if layout.has_phi_inf else 0.0,
        conductor_potentials_V=conductor_potentials,
        capacitance_strengths=x[:n, 1:].copy(),
    )


def solve(
    model: Model,
    *,
    estimate_error: bool = True,
    settings: MeshSettings | None = None,
    progress: ProgressCallback | None = None,
    cancel: CancelCallback | None = None,
) -> Solution:
    """Solve a model of conductors in a homogeneous medium.

    Parameters
    ----------
    model : Model
        Conductors, roles, optional ground plane and background permittivity.
    estimate_error : bool
        Also solve on a mesh at half the resolution and record the relative change of the
        capacitance matrix as ``estimated_relative_error`` (an honest, usually pessimistic,
        estimate for the finer mesh).
    settings : MeshSettings, optional
        Mesh resolution; by default from ``model.mesh_density``.
    progress : callable(fraction, message), optional
        Called as the work advances (fraction from 0 to 1).
    cancel : callable() -> bool, optional
        Polled between stages; when it returns True the solve raises SolveCancelled.

    Returns
    -------
    Solution

    Examples
    --------
    >>> from solver import load_project, solve
    >>> sol = solve(load_project("sample_geometries/coaxial_feeder.json"))
    >>> sol.capacitance_maxwell_F_per_m * 1e12  # pF/m  # doctest: +SKIP
    """
    from .dielectric_solve import needs_dielectric_solver, solve_dielectric

    if model.conductors and needs_dielectric_solver(model):
        return solve_dielectric(model, estimate_error=estimate_error, settings=settings, progress=progress, cancel=cancel)
    _check_solvable(model)
    settings = settings or MeshSettings.for_density(model.mesh_density)

    report = progress_reporter(progress, cancel)

    report(0.0, "Meshing boundaries")
    mesh = discretize_boundary(model, settings)
    report(0.1, f"Solving {mesh.n_panels} panels")
    solution = solve_mesh(model, mesh, cancel)
    if not estimate_error:
        report(1.0, "Done")
        return solution
    report(0.7, "Estimating the error on a coarser mesh")
    coarse_mesh = discretize_boundary(model, MeshSettings(settings.level / 2.0))
    coarse = solve_mesh(model, coarse_mesh, cancel)
    error = relative_change(solution, coarse)
    logger.info("solved %d panels; estimated relative error %.2e", mesh.n_panels, error)
    report(1.0, "Done")
    return _with_error(solution, error, coarse_mesh.n_panels)


def _with_error(solution: Solution, error: float, coarse_panels: int) -> Solution:
    from dataclasses import replace

    return replace(solution, estimated_relative_error=error, coarse_mesh_panels=coarse_panels)
