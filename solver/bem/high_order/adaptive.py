"""Solving to a requested accuracy: adaptive refinement of the high-order panels.

Start: panels no longer than a quarter of each conductor's outline or twice its gap to the
nearest other conductor (or to the ground plane), at most a quarter turn of arc, graded
toward sharp corners and strip ends by a number of levels that the tolerance sets (the
error of geometric grading falls like (smallest panel)^(2 pi / beta) near a corner of
opening beta, as the fitted orders in the tests show; the constant 1e-3 in front is a
conservative fit to the square and the triangle, and the refinement loop corrects it).

Each round: solve; solve again on a check mesh (every panel split in two, and the panels
at corners split toward the corner); the relative change of the capacitance matrix (or
of the conductor charges without a return path) is the error estimate of the first mesh.
The check mesh is always finer than the mesh it checks, so the estimate is never zero
because two meshes coincide; it is floored at 1e-15 (round-off). When the estimate meets
the tolerance the solution on the first mesh is returned with it. Otherwise the panels
whose density is not resolved are split: those whose last two Legendre coefficients of the
charge per unit parameter exceed the tolerance relative to the total charge (uncharged
faces therefore stay coarse), and the panels at corners. The panel budget of
:mod:`solver.mesh.budget` bounds the loop.
"""

from __future__ import annotations

import logging
import math
import time
from collections.abc import Callable
from dataclasses import replace

import numpy as np
import scipy.linalg
import shapely

from solver.bem.high_order.nystrom import NodalSolve, length_scale_m
from solver.bem.high_order.operator import log_matrix
from solver.bem.high_order.solution import HighOrderSolution, high_order_solution
from solver.errors import MeshTooLargeError, SolveCancelled
from solver.mesh.budget import max_panels
from solver.mesh.curved_panels import CurvedPanels, curved_panels, gauss_legendre
from solver.mesh.curved_pieces import PIECE_ARC_STEP_RAD, Piece, boundary_pieces
from solver.mesh.panels import MeshSettings
from solver.model.geometry import conductor_geometries
from solver.model.model import Model

logger = logging.getLogger(__name__)

#: Relative estimates below this are round-off, not discretisation error.
ROUND_OFF_FLOOR = 1e-15

#: Most refinement rounds before giving up.
MAX_ROUNDS = 12

#: Largest arc of one initial panel, radians.
MAX_SWEEP_RAD = 0.5 * math.pi

#: Size ratio of neighbouring panels graded toward a corner.
GRADING_RATIO = 4.0

ProgressCallback = Callable[[float, str], None]


def corner_levels(tolerance: float) -> Callable[[float], int]:
    """Grading levels toward a corner of opening angle beta for a relative ``tolerance``."""

    def levels(beta: float) -> int:
        rate = 2 * math.pi / beta  # the error falls like (smallest panel)^rate
        need = math.log10(min(tolerance, 1e-3) / 1e-3) / (rate * math.log10(1.0 / GRADING_RATIO))
        return int(min(20, max(2, math.ceil(need))))

    return levels


def initial_panels(model: Model, tolerance: float) -> CurvedPanels:
    """The first high-order panels of ``model`` for a relative ``tolerance`` (see module doc)."""
    pieces = boundary_pieces(model)
    sizes = piece_sizes_m(model, pieces)
    try:
        return curved_panels(pieces, sizes, MAX_SWEEP_RAD, corner_levels(tolerance), GRADING_RATIO)
    except MeshTooLargeError as e:
        raise MeshTooLargeError(
            f"The first mesh for the tolerance {tolerance:.2g} does not fit the memory budget: {e}"
        ) from None


def piece_sizes_m(model: Model, pieces: list[Piece]) -> np.ndarray:
    """(len(pieces),) largest panel on each piece, metres: a quarter of its conductor's outline
    or twice its gap to the nearest other conductor (four times its height over the ground plane)."""
    geoms = conductor_geometries(model, PIECE_ARC_STEP_RAD)
    scale = model.metres_per_unit
    sizes = np.empty(len(pieces))
    others = np.array(geoms, dtype=object)
    for i, piece in enumerate(pieces):
        # Each piece on its own: a face far from every other conductor (the outer wall of a
        # screen) carries little charge and starts coarse.
        line = shapely.LineString(piece.points(np.linspace(0.0, 1.0, 33)))
        h = geoms[piece.conductor_index].length / 4.0
        gaps = shapely.distance(line, others)
        gaps[piece.conductor_index] = np.inf
        if len(gaps):
            h = min(h, 2.0 * float(gaps.min()))
        if model.ground_plane is not None:
            h = min(h, 4.0 * (float(line.bounds[1]) - model.ground_plane.y * scale))
        sizes[i] = h
    return sizes


def check_mesh(panels: CurvedPanels) -> CurvedPanels:
    """Every panel split in two, then the panels at corners split once more toward them."""
    finer = panels.split(np.ones(panels.n_panels, dtype=bool))
    at_start, at_end = finer.touches_corner
    return finer.split(at_start | at_end)


def _figures(solve: NodalSolve) -> np.ndarray:
    """The matrix the estimate compares: capacitance, or conductor charges without a return path."""
    if solve.model.has_return_path and solve.fixed:
        return solve.capacitance_maxwell_F_per_m()
    return solve.conductor_charges_scaled(0)


def relative_difference(a: np.ndarray, b: np.ndarray) -> float:
    """max|a - b| / max|a|, floored at :data:`ROUND_OFF_FLOOR` (so never 0)."""
    scale = float(np.abs(a).max()) if a.size else 0.0
    change = float(np.abs(a - b).max() / scale) if scale > 0 else 0.0
    return max(change, ROUND_OFF_FLOOR)


def unresolved(solve: NodalSolve, tolerance: float) -> np.ndarray:
    """(P,) True where the last two Legendre coefficients of the charge per unit panel
    parameter exceed ``tolerance`` times the total absolute charge (of any solution column)."""
    panels = solve.scaled
    p = panels.order
    t, w = gauss_legendre(p)
    legendre = np.polynomial.legendre.legvander(t, p - 1)
    f = solve.total.reshape(panels.n_panels, p, -1) * panels.speeds[:, :, None]
    coeffs = np.einsum("i,ik,pij->pkj", w, legendre, f) * ((2 * np.arange(p) + 1) / 2.0)[None, :, None]
    tail = 2.0 * (np.abs(coeffs[:, -1]) + np.abs(coeffs[:, -2]))
    total = np.abs(f * w[None, :, None]).sum(axis=(0, 1))
    total = np.where(total > 0, total, 1.0)
    return (tail / total[None, :] > tolerance).any(axis=1)


def _check_budget(panels: CurvedPanels, tolerance: float, estimate: float | None, model: Model) -> None:
    limit = max_panels()
    if panels.n_nodes + len(model.conductors) + 1 > limit:
        reached = "" if estimate is None else f"; the last estimate was {estimate:.2g}"
        raise MeshTooLargeError(
            f"The tolerance {tolerance:.2g} is not reached within the memory budget of about {limit} unknowns "
            f"(the next mesh needs {panels.n_nodes}){reached}. Ask for a looser tolerance, move nearly "
            "touching parts apart, or raise EDGEWISE_MAX_SYSTEM_MB."
        )


def solve_to_tolerance(
    model: Model,
    tolerance: float,
    progress: ProgressCallback | None = None,
    cancel: Callable[[], bool] | None = None,
) -> HighOrderSolution:
    """Solve ``model`` with the high-order solver until the estimated relative error of the
    capacitance matrix is at most ``tolerance``.

    Raises
    ------
    HighOrderUnsupported
        For models with dielectric regions of another permittivity (use the low-order solver).
    MeshTooLargeError
        When the panel budget runs out first (the message gives the last estimate).
    """
    if not (math.isfinite(tolerance) and tolerance > 0):
        raise ValueError(f"The tolerance must be a positive number, got {tolerance!r}.")
    timings: dict[str, float] = {"meshing": 0.0, "solving": 0.0, "checking": 0.0}
    started = time.perf_counter()
    panels = initial_panels(model, tolerance)
    timings["meshing"] += time.perf_counter() - started
    estimate: float | None = None
    for round_ in range(MAX_ROUNDS):
        if cancel is not None and cancel():
            raise SolveCancelled("Solve cancelled.")
        finer = check_mesh(panels)
        _check_budget(finer, tolerance, estimate, model)
        if progress is not None:
            progress(min(0.9, 0.1 + 0.08 * round_), f"Solving {panels.n_nodes} nodes (round {round_ + 1})")
        tick = time.perf_counter()
        solve = NodalSolve(model, panels)
        timings["solving"] += time.perf_counter() - tick
        tick = time.perf_counter()
        check = NodalSolve(model, finer)
        estimate = relative_difference(_figures(solve), _figures(check))
        timings["checking"] += time.perf_counter() - tick
        logger.info("high-order round %d: %d unknowns, estimated relative error %.2e",
                    round_ + 1, solve.n_unknowns, estimate)
        if estimate <= tolerance:
            stages = tuple((k, round(v, 6)) for k, v in timings.items())
            solution = high_order_solution(solve, MeshSettings.for_density(model.mesh_density), estimate,
                                           tolerance, stages)
            return replace(solution, coarse_mesh_panels=None)
        at_start, at_end = panels.touches_corner
        flags = unresolved(solve, tolerance) | at_start | at_end
        if not flags.any():
            flags[:] = True
        panels = panels.split(flags)
    raise MeshTooLargeError(
        f"The tolerance {tolerance:.2g} was not reached in {MAX_ROUNDS} rounds of refinement (the last estimate "
        f"was {estimate:.2g} with {panels.n_nodes} nodes). Ask for a looser tolerance or move nearly "
        "touching parts apart."
    )


def equivalent_radius_to_tolerance(model: Model, names: list[str], tolerance: float) -> tuple[float, float, int]:
    """Logarithmic capacity (metres) of the named conductors tied together and taken alone,
    with its estimated relative error and the unknowns used.

    Solves int log|x - y| nu(y) ds(y) = log(cap) on the outline with total charge 1 (the
    equilibrium measure; Ransford, "Potential Theory in the Complex Plane", 1995, sec. 5.2),
    refining as :func:`solve_to_tolerance` does until the change of cap between a mesh and
    its check mesh is at most ``tolerance``.
    """
    sub = replace(model, conductors=tuple(c for c in model.conductors if c.name in names),
                  ground_plane=None, dielectrics=())
    panels = initial_panels(sub, tolerance)
    estimate = math.inf
    for _ in range(MAX_ROUNDS):
        finer = check_mesh(panels)
        _check_budget(finer, tolerance, None if math.isinf(estimate) else estimate, sub)
        cap, f = logarithmic_capacity(panels)
        cap_fine, _ = logarithmic_capacity(finer)
        estimate = max(abs(cap - cap_fine) / cap_fine, ROUND_OFF_FLOOR)
        if estimate <= tolerance:
            return cap, estimate, panels.n_nodes + 1
        at_start, at_end = panels.touches_corner
        flags = _tails(panels, f, tolerance) | at_start | at_end
        panels = panels.split(flags if flags.any() else np.ones(panels.n_panels, dtype=bool))
    raise MeshTooLargeError(
        f"The equivalent radius did not reach the tolerance {tolerance:.2g} in {MAX_ROUNDS} rounds "
        f"(last estimate {estimate:.2g}); ask for a looser tolerance."
    )


def logarithmic_capacity(panels: CurvedPanels) -> tuple[float, np.ndarray]:
    """Logarithmic capacity (metres) of the outlines of ``panels`` taken together, and the
    equilibrium strengths at the nodes (scaled: they sum to 1 with the scaled weights)."""
    ell = length_scale_m(panels)
    scaled = panels.scaled(1.0 / ell)
    n = scaled.n_nodes
    a = np.zeros((n + 1, n + 1))
    a[:n, :n] = log_matrix(scaled.nodes.reshape(-1, 2), scaled)
    a[:n, n] = -1.0
    a[n, :n] = scaled.weights.reshape(-1)
    b = np.zeros(n + 1)
    b[n] = 1.0
    x = scipy.linalg.solve(a, b, check_finite=False)
    return ell * math.exp(x[n]), x[:n]


def _tails(panels: CurvedPanels, density: np.ndarray, tolerance: float) -> np.ndarray:
    p = panels.order
    t, w = gauss_legendre(p)
    legendre = np.polynomial.legendre.legvander(t, p - 1)
    f = density.reshape(panels.n_panels, p) * panels.speeds / length_scale_m(panels)
    coeffs = (f * w[None, :]) @ legendre * ((2 * np.arange(p) + 1) / 2.0)[None, :]
    tail = 2.0 * (np.abs(coeffs[:, -1]) + np.abs(coeffs[:, -2]))
    return tail / np.abs(f * w[None, :]).sum() > tolerance


__all__ = ["solve_to_tolerance", "equivalent_radius_to_tolerance", "initial_panels", "check_mesh", "logarithmic_capacity"]
