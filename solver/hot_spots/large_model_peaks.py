"""Hot spots of a large model: one :class:`~solver.hot_spots.hot_spot.HotSpotReport` from its
high-order solution (:mod:`solver.bem.high_order.nodal_peaks`), with no low-order refinement.

:func:`solver.analyse_hot_spots` comes here for a solution of the large-model path
(:func:`solver.bem.high_order.large_models.is_large`): its low-order meshes would not fit in
memory, so the peaks are read from the high-order surface field and their error stated from
the solution's error estimate and the resolution of the density at each peak. With a corner
radius, the rounded model is solved once more on the same kind of panels.
"""

from __future__ import annotations

import logging
import math
from collections.abc import Iterable

from solver.bem.high_order.large_models import solve_large
from solver.bem.high_order.nodal_peaks import conductor_peak, interpolated_surface_field
from solver.bem.high_order.solution import HighOrderSolution
from solver.hot_spots.air_region import medium_next_to
from solver.hot_spots.corner_rounding import conductors_with_sharp_corners, round_sharp_corners
from solver.hot_spots.hot_spot import HotSpot, HotSpotReport
from solver.hot_spots.peak_diagnostics import nearest_other_potential

logger = logging.getLogger(__name__)

#: How :attr:`HotSpotReport.method` names this way of finding the peaks.
METHOD = "high-order solution"


def _note(error: float, target: float, opening: float | None) -> str:
    if opening is not None:
        exponent = math.pi / opening - 1.0
        return (f"Sharp corner or free edge (field-region opening {math.degrees(opening):.0f} degrees): the charge "
                f"density goes like r^({exponent:.3f}) and the 2-D peak field has no finite value; this number "
                "only reflects the panels. Give a corner radius to get a peak you can use.")
    if error <= target:
        return (f"Peak field from the high-order solution, estimated error {100 * error:.2g} % "
                f"(target {100 * target:.2g} %).")
    return (f"Peak field from the high-order solution, estimated error {100 * error:.2g} %, above the target "
            f"{100 * target:.2g} %: this model is too large for refinement; treat the value with care.")


def large_model_hot_spots(
    solution: HighOrderSolution,
    target_relative_error: float = 0.01,
    corner_radius_m: float | None = None,
    conductors: Iterable[str] | None = None,
) -> HotSpotReport:
    """Peak surface field of each conductor of a large model, from its high-order solution.

    Parameters
    ----------
    solution : HighOrderSolution
        From the large-model path of :func:`solver.solve` (with its error estimate).
    target_relative_error : float
        The peaks are not refined; ``converged`` says whether the estimate meets this.
    corner_radius_m : float, optional
        Round the sharp corners of the analysed conductors to this radius, metres, and solve the
        rounded model once (coarse high-order panels).
    conductors : iterable of str, optional
        Conductors to analyse (default: all).
    """
    model = solution.model
    names = list(model.conductor_names if conductors is None else conductors)
    for name in names:
        model.conductor(name)
    to_round = [n for n in names if n in set(conductors_with_sharp_corners(model))] if corner_radius_m else []
    final = solution
    if to_round:
        assert corner_radius_m is not None
        logger.info("hot spots: solving the large model again with %d conductors rounded", len(to_round))
        final = solve_large(round_sharp_corners(model, corner_radius_m, to_round))
    sampled = interpolated_surface_field(final)
    neighbours = nearest_other_potential(final.model, final)
    spots = []
    for name in names:
        k = final.model.conductor_names.index(name)
        peak, where, error, opening, radius = conductor_peak(final, k, sampled)
        near_name, gap, dv = neighbours[k]
        gap_field = None if gap is None or dv is None else float(dv / gap)
        enhancement = None if not gap_field else peak / gap_field
        singular = opening is not None
        node = final.mesh.conductor_index == k
        i = int(node.nonzero()[0][final.surface_field_V_per_m[node].argmax()])
        medium = medium_next_to(final, i)
        spots.append(HotSpot(
            name, peak, where, singular, None if opening is None else math.pi / opening - 1.0, opening,
            None if singular else error, None, None, (not singular) and error <= target_relative_error,
            float(final.conductor_potentials_V[k]), near_name, gap, gap_field, enhancement, (peak,),
            _note(error, target_relative_error, opening), None if singular else radius, medium.eps_r, medium,
        ))
    return HotSpotReport(
        hot_spots=tuple(spots),
        target_relative_error=float(target_relative_error),
        levels=(),
        n_panels=(int(final.n_unknowns),),
        corner_radius_m=corner_radius_m,
        solved_model=final.model,
        solution=final,
        air_region=None,
        method=METHOD,
    )


__all__ = ["large_model_hot_spots", "METHOD"]
