"""Hot spots: the peak surface field of each conductor, with an error estimate you can trust.

For each conductor the largest surface field |E| = |sigma| / eps is found on a sequence of
meshes, each at twice the resolution level of the one before (every panel halves, and the
grading toward corners deepens). From the last three peak values f1, f2, f3 the error of f3
is estimated the Richardson way (common practice in convergence studies):

    d1 = f2 - f1,  d2 = f3 - f2,  ratio = d1 / d2
    if ratio > 1 (monotone convergence):  order p = log2(ratio),
        extrapolated f = f3 + d2 / (ratio - 1),  error = |d2 / (ratio - 1)| / |f3|
    otherwise (noise-level wobble):        error = max(|d1|, |d2|) / |f3|

and refinement continues until every estimate is below the target (1 % by default) or the
panel budget is spent.

Sharp corners. Near a convex corner whose field region opens by beta > pi the charge density
goes like r^(pi/beta - 1) (edge condition, e.g. J. D. Jackson, Classical Electrodynamics,
3rd ed., 1999, sec. 2.11): the peak field has no finite value and grows with every refinement.
Such a conductor is reported as ``singular`` with the exponent, no error estimate, and the
advice to give a corner radius; with ``corner_radius_m`` set, the sharp corners are rounded
(:mod:`solver.corner_rounding`) and the rounded model is solved instead.

Enhancement factor. For conductor k the plain gap field is E_gap = |V_k - V_j| / d_kj, where
j is the nearest conductor (or the ground plane) at a different potential and d_kj the
shortest distance between their surfaces; the enhancement factor is E_peak / E_gap (>= 1 for
most arrangements; the inverse is Schwaiger's utilisation factor, common practice in
high-voltage engineering).
"""

from __future__ import annotations

import logging
import math
from collections.abc import Iterable

import numpy as np

from solver.bem.high_order.large_models import is_large, solve_large
from solver.bem.high_order.solution import HighOrderSolution
from solver.bem.solution import Solution
from solver.bem.solve import CancelCallback, ProgressCallback, progress_reporter, solve_mesh
from solver.errors import InvalidModelError
from solver.hot_spots.air_region import air_region_peak, medium_next_to
from solver.hot_spots.corner_rounding import conductors_with_sharp_corners, round_sharp_corners
from solver.hot_spots.curvature import signed_radius_of_curvature_m
from solver.hot_spots.hot_spot import HotSpot, HotSpotReport
from solver.hot_spots.large_model_peaks import large_model_hot_spots
from solver.hot_spots.peak_diagnostics import (
    GROUND_PLANE_NAME,  # noqa: F401  (re-exported for callers of this module)
    corner_field_grows,
    most_singular_corner,
    nearest_other_potential,
    richardson_estimate,
)
from solver.hot_spots.weak_corners import corner_exponent, weak_corner_at_peak, weak_corner_note
from solver.mesh.panels import DENSITY_LEVELS, MeshSettings, PanelMesh, discretize_boundary
from solver.model.model import Model

logger = logging.getLogger(__name__)

#: Largest mesh the refinement loop will build (panels); the dense system grows as n^2.
DEFAULT_MAX_PANELS = 5000



def is_large_solution(source: Solution | Model) -> bool:
    """A solution of the large-model path: its low-order meshes would not fit, so its peaks
    come from the high-order solution itself."""
    return isinstance(source, HighOrderSolution) and source.panels is not None and is_large(source.model)


def _solutions_at_levels(solution: Solution) -> dict[float, Solution]:
    """The solutions a solve already made, by mesh resolution level (the solution and its coarse companion)."""
    known = {solution.mesh.settings.level: solution}
    if solution.coarse is not None:
        known.setdefault(solution.coarse.mesh.settings.level, solution.coarse)
    return known


def analyse_hot_spots(
    source: Solution | Model,
    target_relative_error: float = 0.01,
    corner_radius_m: float | None = None,
    conductors: Iterable[str] | None = None,
    max_panels: int = DEFAULT_MAX_PANELS,
    replace_radius: bool = False,
    *,
    progress: ProgressCallback | None = None,
    cancel: CancelCallback | None = None,
) -> HotSpotReport:
    """Peak surface field of each conductor, refined until its error estimate meets a target.

    Parameters
    ----------
    source : Solution or Model
        A solution (from :func:`solver.solve`) to start from: its mesh and the coarser mesh of
        its error estimate are the first two levels of the refinement, so they are not solved
        again. A Model is solved from scratch at the levels its mesh density implies. A large
        model (:func:`solver.bem.high_order.large_models.is_large`) is not refined: its peaks
        come from its high-order solution (:mod:`solver.hot_spots.large_model_peaks`).
    target_relative_error : float
        Stop refining when every non-singular peak's Richardson estimate is at or below this.
    corner_radius_m : float, optional
        Round the sharp corners (and strip edges) of the analysed conductors to this radius,
        metres, and solve the rounded model (see :func:`solver.round_sharp_corners`); the
        given solution is then of another model and is not reused.
    conductors : iterable of str, optional
        Conductors to analyse (default: all).
    max_panels : int
        Panel budget of the finest mesh; the loop stops before exceeding it.
    replace_radius : bool
        With ``corner_radius_m``: a one-rectangle conductor gets exactly that radius even if
        it is drawn with a larger one (used by the corner-radius sweep).
    progress : callable(fraction, message), optional
        Called before each solve (the fraction is a rough guide: the number of levels is not
        known in advance).
    cancel : callable() -> bool, optional
        Polled between and inside solves; when it returns True, SolveCancelled is raised.

    Returns
    -------
    HotSpotReport

    Examples
    --------
    >>> from solver import Model, Conductor, Rectangle, GroundPlane, solve
    >>> bar = Model(unit="mm", ground_plane=GroundPlane(0.0), conductors=(
    ...     Conductor("bar", (Rectangle((0, 30), 40, 10, 2.0),), potential_V=10e3),))
    >>> spot = analyse_hot_spots(solve(bar)).for_conductor("bar")
    >>> spot.estimated_relative_error < 0.01
    True
    """
    if not (0 < target_relative_error < 1):
        raise InvalidModelError(f"Target relative error is {target_relative_error}; give a number between 0 and 1.")
    if isinstance(source, Model) and is_large(source):
        source = solve_large(source)
    if is_large_solution(source):
        assert isinstance(source, HighOrderSolution)
        return large_model_hot_spots(source, target_relative_error, corner_radius_m, conductors)
    if isinstance(source, Solution):
        model, base = source.model, source.mesh.settings.level
    else:
        model, base = source, DENSITY_LEVELS[source.mesh_density]
    names = list(model.conductor_names if conductors is None else conductors)
    for name in names:
        model.conductor(name)
    report = progress_reporter(progress, cancel)
    # The model's own mesh is the finest level to begin with (the figures then match the
    # solution shown beside them); finer meshes follow only when the target is missed.
    levels = [base / 4.0, base / 2.0, base]
    solved_models: list[Model] = []
    solutions: list[Solution] = []

    to_round: list[str] = []
    if corner_radius_m is not None:
        sharp = set(conductors_with_sharp_corners(model))
        to_round = names if replace_radius else [n for n in names if n in sharp]
    rounding = corner_radius_m is not None and bool(to_round)
    known = _solutions_at_levels(source) if isinstance(source, Solution) and not rounding else {}

    meshes: dict[float, PanelMesh] = {}  # meshed for the budget check, solved later
    rounded: dict[float, Model] = {}

    def model_at(level: float) -> Model:
        if not rounding:
            return model
        if level not in rounded:
            assert corner_radius_m is not None  # rounding is only on with a corner radius
            rounded[level] = round_sharp_corners(model, corner_radius_m, to_round, level=level,
                                                 replace_radius=replace_radius)
        return rounded[level]

    def mesh_at(level: float) -> PanelMesh:
        if level not in meshes:
            meshes[level] = discretize_boundary(model_at(level), MeshSettings(level))
        return meshes[level]

    def run(level: float) -> None:
        m = model_at(level)
        solved_models.append(m)
        if level in known:
            solutions.append(known[level])
            logger.info("hot spots: level %g, %d panels (already solved)", level, known[level].mesh.n_panels)
            return
        report(min(0.9, 0.2 * len(solutions)), f"Hot spots: solving at mesh level {level:g}")
        solutions.append(solve_mesh(m, mesh_at(level), cancel))
        logger.info("hot spots: level %g, %d panels", level, solutions[-1].mesh.n_panels)

    def n_panels_at(level: float) -> int:
        return known[level].mesh.n_panels if level in known else mesh_at(level).n_panels

    while levels[0] > 1.0 / 16.0 and n_panels_at(levels[-1]) > max_panels:
        levels = [level / 2.0 for level in levels]  # the first three meshes must fit the budget too
    for level in levels:
        run(level)
    index = [model.conductor_names.index(n) for n in names]
    while True:
        peaks = np.array([[s.surface_field_V_per_m[s.mesh.conductor_index == k].max() for k in index] for s in solutions])
        weak = [weak_corner_at_peak(solutions[-1], k) for k in index]
        singular = [corner_field_grows(solutions[-2], solutions[-1], k) or w is not None for k, w in zip(index, weak)]
        errors = [richardson_estimate(peaks[:, i])[0] for i in range(len(index))]
        pending = [e > target_relative_error for e, s in zip(errors, singular) if not s]
        air = air_region_peak(solutions)
        if air is not None and air.estimated_relative_error is not None:
            pending.append(air.estimated_relative_error > target_relative_error)
        if not any(pending):
            break
        next_level = 2.0 * levels[-1]
        growth = solutions[-1].mesh.n_panels / max(1, solutions[-2].mesh.n_panels)
        if solutions[-1].mesh.n_panels * max(growth, 1.5) > max_panels:
            logger.info("hot spots: panel budget %d reached before the error target", max_panels)
            break
        levels.append(next_level)
        run(next_level)
    report(1.0, "Hot spots: done")

    final = solutions[-1]
    neighbours = nearest_other_potential(solved_models[-1], final)
    spots = []
    for i, k in enumerate(index):
        spots.append(_hot_spot(final, k, peaks[:, i], singular[i], neighbours[k], target_relative_error, weak[i]))
    return HotSpotReport(
        hot_spots=tuple(spots),
        target_relative_error=float(target_relative_error),
        levels=tuple(levels),
        n_panels=tuple(s.mesh.n_panels for s in solutions),
        corner_radius_m=corner_radius_m,
        solved_model=solved_models[-1],
        solution=final,
        air_region=air,
    )


def _hot_spot(final: Solution, k: int, history: np.ndarray, singular: bool, neighbour, target: float,
              weak_turn_rad: float | None = None) -> HotSpot:
    mesh = final.mesh
    idx = np.flatnonzero(mesh.conductor_index == k)
    i = int(idx[np.argmax(final.surface_field_V_per_m[idx])])
    peak = float(final.surface_field_V_per_m[i])
    location = (float(mesh.midpoints[i, 0]), float(mesh.midpoints[i, 1]))
    name = final.model.conductors[k].name
    near_name, gap, dv = neighbour
    gap_field = None if gap is None else float(dv / gap)
    enhancement = None if not gap_field else float(peak / gap_field)
    if singular and weak_turn_rad is not None:  # the peak sits on a vertex turning by less than 25 degrees
        exponent, beta = corner_exponent(weak_turn_rad), math.pi + weak_turn_rad
        note = weak_corner_note(weak_turn_rad)
    elif singular:
        found, opening = most_singular_corner(final, k)
        # singular comes from corner_field_grows on this same solution, which needs a corner of k
        assert found is not None and opening is not None
        exponent, beta = found, opening
        note = (
            f"Sharp corner or free edge (field-region opening {math.degrees(beta):.0f} degrees): the charge "
            f"density goes like r^({exponent:.3f}) and the 2-D peak field has no finite value; this number "
            "grows with every refinement. Give a corner radius to get a peak you can use."
        )
    if singular:
        return HotSpot(name, peak, location, True, exponent, beta, None, None, None,
                       False, float(final.conductor_potentials_V[k]), near_name, gap, gap_field, enhancement,
                       tuple(map(float, history)), note, medium_eps_r=medium_next_to(final, i).eps_r,
                       medium=medium_next_to(final, i))
    error, extrapolated, order = richardson_estimate(history)
    converged = error <= target
    note = (
        f"Peak field converged to an estimated {100 * error:.2g} % (target {100 * target:.2g} %)."
        if converged
        else f"Estimated error {100 * error:.2g} % is above the target {100 * target:.2g} %: the panel budget "
        "ran out; treat the value with care or simplify the model."
    )
    curvature = signed_radius_of_curvature_m(mesh, i)
    return HotSpot(name, peak, location, False, None, None, error, extrapolated, order,
                   converged, float(final.conductor_potentials_V[k]), near_name, gap, gap_field, enhancement,
                   tuple(map(float, history)), note, curvature if 0 < curvature < math.inf else None,
                   medium_next_to(final, i).eps_r, medium_next_to(final, i))

