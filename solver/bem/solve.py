"""Solving a model: mesh, assemble, one factorisation, all right-hand sides, error estimate.

:func:`solve` meshes the model, assembles the boundary-element system (conductors, and
dielectric interfaces when regions of other permittivity exist), factorises it once and
solves for the operating point (the potentials and charges the user set) together with one
right-hand side per fixed-potential conductor for the capacitance matrix. It then repeats the
solve on a mesh at half the resolution to estimate the error. :func:`solve_mesh` does one
solve on a given conductor mesh.
"""

from __future__ import annotations

import dataclasses
import logging
import math
import time
from collections.abc import Callable

import numpy as np
import scipy.linalg

from solver.bem.assembly import normal_derivative_matrix, right_hand_sides
from solver.bem.blas_threads import blas_threads_for
from solver.bem.fast_solve import solve_if_large
from solver.bem.solution import BACKGROUND_NAME, Solution, relative_change
from solver.bem.superposition import UnitSolutions, solve_columns
from solver.bem.system import BoundarySystem, build_system
from solver.errors import InvalidModelError, MeshTooLargeError, NonFiniteResultError, SolveCancelled
from solver.mesh.budget import max_panels
from solver.mesh.panels import MeshSettings, PanelMesh, discretize_boundary, estimate_conductor_panels
from solver.model.model import Model

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


def solve_system(
    system: BoundarySystem,
    cancel: CancelCallback | None = None,
    linear_solve: Callable[[np.ndarray], np.ndarray] | None = None,
) -> Solution:
    """Factorise ``system`` once and solve the operating point and one unit solution per fixed
    conductor (the capacitance columns) and per floating conductor (kept for
    :meth:`Solution.with_potentials`). ``linear_solve(rhs)``, when given, solves
    ``system.matrix @ x = rhs`` instead of a fresh LU factorisation (see
    :mod:`solver.bem.geometry_update`)."""
    model, mesh, interfaces, layout = system.model, system.mesh, system.interfaces, system.layout
    if cancel is not None and cancel():
        raise SolveCancelled("Solve cancelled.")
    if not np.isfinite(system.matrix).all():
        raise NonFiniteResultError(
            f"The system matrix of {system.layout.size} unknowns holds non-finite entries (coincident "
            "panels or coordinates out of range); check the drawing for repeated or overlapping outlines."
        )
    try:
        if linear_solve is None:
            with blas_threads_for(layout.size):
                lu = scipy.linalg.lu_factor(system.matrix, check_finite=False)
    except MemoryError:
        raise MeshTooLargeError(
            f"Not enough memory to factorise the system of {system.layout.size} unknowns; "
            "choose a coarser mesh or close other programs."
        ) from None

    fixed, floating, potentials, charges = solve_columns(model)
    rhs = right_hand_sides(mesh, layout, potentials, charges)
    if linear_solve is not None:
        x = linear_solve(rhs)
    else:
        with blas_threads_for(layout.size):
            x = scipy.linalg.lu_solve(lu, rhs, check_finite=False)
    _check_finite(x, model, layout)

    n = layout.n_panels
    total = x[:n]
    free = system.free_charge_rows @ total
    conductor_potentials = potentials[:, 0].copy()
    for f, k in enumerate(layout.floating):
        conductor_potentials[k] = x[n + f, 0]
    sources, ell = system.sources, system.length_scale_m
    strip = mesh.is_strip
    normal_pv = np.zeros((mesh.n_panels, x.shape[1]))
    if strip.any():
        normal_pv[strip] = normal_derivative_matrix(
            mesh.midpoints[strip] / ell, mesh.normals[strip], sources, system.plane, np.flatnonzero(strip)
        ) @ total
    interface_pv = system.interface_rows @ total if interfaces.n_panels else np.zeros((0, x.shape[1]))
    phi_inf = x[-1] if layout.has_phi_inf else np.zeros(x.shape[1])
    units = UnitSolutions(
        fixed, floating, total[:, 1:].copy(), free[:, 1:].copy(), phi_inf[1:].copy(),
        x[n : n + len(floating), 1:].copy(), normal_pv[:, 1:].copy(), interface_pv[:, 1:].copy(),
    )
    return Solution(
        model=model,
        mesh=mesh,
        interfaces=interfaces,
        length_scale_m=ell,
        strengths=free[:, 0].copy(),
        capacitance_strengths=free[:, 1 : 1 + len(fixed)].copy(),
        total_strengths=total[:, 0].copy(),
        phi_inf_V=float(phi_inf[0]),
        conductor_potentials_V=conductor_potentials,
        source_starts=sources.starts,
        source_ends=sources.ends,
        source_weights=sources.weights,
        conductor_eps_r_plus=system.eps_r_plus,
        conductor_eps_r_minus=system.eps_r_minus,
        conductor_normal_pv=normal_pv[:, 0].copy(),
        interface_normal_pv=interface_pv[:, 0].copy(),
        region_names=tuple(d.name for d in model.dielectrics) + (BACKGROUND_NAME,),
        region_eps_r=system.region_eps_r,
        interface_region_plus=interfaces.region_plus,
        interface_region_minus=interfaces.region_minus,
        conductor_region_plus=system.region_plus,
        conductor_region_minus=system.region_minus,
        n_unknowns=layout.size,
        unit_solutions=units,
    )


def _check_finite(x: np.ndarray, model: Model, layout) -> None:
    """Raise NonFiniteResultError naming what became non-finite (never report such a figure)."""
    if np.isfinite(x).all():
        return
    n = layout.n_panels
    parts = []
    if not np.isfinite(x[: layout.n_conductor_panels]).all():
        parts.append("the surface charge on conductors")
    if not np.isfinite(x[layout.n_conductor_panels : n]).all():
        parts.append("the bound charge on dielectric interfaces")
    for f, k in enumerate(layout.floating):
        if not np.isfinite(x[n + f]).all():
            parts.append(f"the potential of floating conductor '{model.conductors[k].name}'")
    if layout.has_phi_inf and not np.isfinite(x[-1]).all():
        parts.append("the potential at infinity")
    raise NonFiniteResultError(
        f"The solve gave non-finite values for {', '.join(parts)} (the system is singular for this "
        "model); no figure is reported. Check for a conductor without a return path, parts that "
        "touch, or sizes far apart, and try another mesh density."
    )


def solve_mesh(model: Model, mesh: PanelMesh, cancel: CancelCallback | None = None) -> Solution:
    """Solve ``model`` once on the conductor ``mesh`` (no error estimate).

    Dielectric interfaces, if any, are meshed at the same settings as ``mesh``.
    """
    large = solve_if_large(model, mesh, cancel)  # fast path above the crossover; refuses what cannot fit
    return large if large is not None else solve_system(build_system(model, mesh), cancel)


def solve(
    model: Model,
    *,
    estimate_error: bool = True,
    settings: MeshSettings | None = None,
    progress: ProgressCallback | None = None,
    cancel: CancelCallback | None = None,
    tolerance: float | None = None,
) -> Solution:
    """Solve a model of conductors, in a homogeneous medium or in dielectric regions.

    Parameters
    ----------
    model : Model
        Conductors, roles, optional ground plane, background permittivity and regions.
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
    tolerance : float, optional
        Requested relative accuracy of the capacitance matrix. The high-order solver
        (:mod:`solver.bem.high_order`: exact curves, Gauss-Legendre panels, adaptive
        refinement) is used and the solution's ``estimated_relative_error`` is at most this.
        Models with dielectric regions of another permittivity are declined by that solver;
        the low-order solver is then refined (mesh level doubled) until its estimate meets
        the tolerance, and the solution is a plain :class:`Solution`. Raises
        MeshTooLargeError when the panel budget runs out first.

        Without a tolerance and ``settings``, a model of many conductors in one medium (see
        :mod:`solver.bem.high_order.large_models`) is solved on coarse high-order panels in
        one dense in-place solve, its memory checked before allocation.

    Returns
    -------
    Solution
        Charges and capacitance matrices are free-charge figures, in SI units.

    Examples
    --------
    >>> from solver import load_project, solve
    >>> sol = solve(load_project("sample_geometries/coaxial_feeder.json"))
    >>> sol.capacitance_maxwell_F_per_m * 1e12  # pF/m  # doctest: +SKIP
    """
    if not model.conductors:
        raise InvalidModelError("The model has no conductors; draw at least one.")
    if tolerance is not None:
        return _solve_to_tolerance(model, tolerance, progress, cancel)
    report = progress_reporter(progress, cancel)
    if settings is None and _is_large(model):
        report(0.0, f"Solving {len(model.conductors)} conductors on coarse high-order panels")
        return _solve_large(model, estimate_error)
    settings = settings or MeshSettings.for_density(model.mesh_density)

    report(0.0, "Meshing boundaries")
    stages: dict[str, float] = {}
    tick = time.perf_counter()
    mesh = discretize_boundary(model, settings)
    stages["meshing"] = time.perf_counter() - tick
    report(0.1, f"Solving {mesh.n_panels} panels")
    solution = _timed_solve_mesh(model, mesh, cancel, stages)
    if estimate_error:
        tick = time.perf_counter()
        solution = with_error_estimate(solution, settings, lambda f, m: report(0.7 + 0.3 * f, m), cancel)
        stages["checking"] = time.perf_counter() - tick
    else:
        report(1.0, "Done")
    return dataclasses.replace(solution, stage_seconds=tuple((k, round(v, 6)) for k, v in stages.items()))


def _timed_solve_mesh(model: Model, mesh: PanelMesh, cancel: CancelCallback | None, stages: dict[str, float]) -> Solution:
    """:func:`solve_mesh`, recording seconds spent assembling and solving in ``stages`` (the fast
    path, which assembles as it iterates, counts as solving)."""
    tick = time.perf_counter()
    large = solve_if_large(model, mesh, cancel)
    if large is not None:
        stages["solving"] = time.perf_counter() - tick
        return large
    system = build_system(model, mesh)
    stages["assembling"] = time.perf_counter() - tick
    tick = time.perf_counter()
    solution = solve_system(system, cancel)
    stages["solving"] = time.perf_counter() - tick
    return solution


def with_error_estimate(
    solution: Solution,
    settings: MeshSettings | None = None,
    progress: ProgressCallback | None = None,
    cancel: CancelCallback | None = None,
) -> Solution:
    """``solution`` with its error estimate: the model solved again on a mesh at half the
    resolution, and the relative change of the capacitance matrix recorded (see :func:`solve`).

    Lets a program show a solution at once and finish the estimate afterwards; the result
    equals ``solve(model, estimate_error=True)`` at the same settings.
    """
    model = solution.model
    settings = settings or solution.mesh.settings
    report = progress_reporter(progress, cancel)
    report(0.0, "Estimating the error on a coarser mesh")
    coarse = solve_mesh(model, discretize_boundary(model, MeshSettings(settings.level / 2.0)), cancel)
    error = relative_change(solution, coarse)
    logger.info(
        "solved %d conductor + %d interface panels; estimated relative error %.2e",
        solution.mesh.n_panels, solution.interfaces.n_panels, error,
    )
    report(1.0, "Done")
    return dataclasses.replace(
        solution, estimated_relative_error=error, coarse_mesh_panels=coarse.mesh.n_panels, coarse=coarse
    )


def _solve_to_tolerance(
    model: Model, tolerance: float, progress: ProgressCallback | None, cancel: CancelCallback | None
) -> Solution:
    """The high-order adaptive solve, or the low-order one refined for models it declines."""
    from solver.bem.high_order.adaptive import solve_to_tolerance
    from solver.bem.high_order.nystrom import HighOrderUnsupported

    try:
        return solve_to_tolerance(model, tolerance, progress, cancel)
    except HighOrderUnsupported as declined:
        logger.warning("%s", declined)
    level = MeshSettings.for_density(model.mesh_density).level
    previous: float | None = None
    while True:
        solution = solve(model, settings=MeshSettings(level), progress=progress, cancel=cancel)
        error = solution.estimated_relative_error
        if error is not None and error <= tolerance:
            return solution
        assert error is not None  # solve() estimates by default
        # The low-order error falls by a steady factor per doubling of the level: jump to the
        # level that factor predicts, and refuse at once when that mesh would not fit.
        doublings = 1
        if previous is not None and 0 < error < previous:
            doublings = max(1, math.ceil(math.log(error / tolerance) / math.log(previous / error)))
        elif previous is not None:
            raise MeshTooLargeError(
                f"The tolerance {tolerance:.2g} is not reached by the low-order solver (used because the model "
                f"has dielectric regions of another permittivity): its estimate did not fall when the mesh "
                f"was refined ({previous:.2g}, then {error:.2g}). Ask for a looser tolerance."
            )
        next_level = level * 2.0**doublings
        count, responsible = estimate_conductor_panels(model, MeshSettings(next_level))
        if count > max_panels():
            raise MeshTooLargeError(
                f"The tolerance {tolerance:.2g} is not reached by the low-order solver (used because the model "
                f"has dielectric regions of another permittivity) within the memory budget: the estimate is "
                f"{error:.2g} with {solution.n_unknowns} unknowns and would need about {count:.3g} panels "
                f"(the budget allows about {max_panels()}; most of them for {responsible}). Ask for a looser "
                "tolerance."
            )
        previous, level = error, next_level


def _is_large(model: Model) -> bool:
    from solver.bem.high_order.large_models import is_large

    return is_large(model)


def _solve_large(model: Model, estimate_error: bool) -> Solution:
    from solver.bem.high_order.large_models import solve_large

    return solve_large(model, estimate_error)


def has_permittivity_contrast(model: Model) -> bool:
    """True when some dielectric region's eps_r differs from the background's (the model's
    capacitance then differs from its capacitance in a uniform medium)."""
    return any(d.eps_r != model.background_eps_r for d in model.dielectrics)


__all__ = ["solve", "solve_mesh", "with_error_estimate", "solve_system", "progress_reporter", "has_permittivity_contrast"]
