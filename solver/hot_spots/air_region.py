"""The largest field in the surrounding air of a model with dielectric regions.

With insulated or coated conductors the conductor surface sits in the insulation, and the
field that matters for air breakdown and corona is the largest field in the air around it —
usually on the outer surface of the insulation. The dielectric solution knows the peak field
of every region (:attr:`DielectricSolution.peak_region_fields`); this module follows the
background region's peak over the meshes of a refinement and gives it an error estimate the
same way as the conductor peaks (:func:`solver.peak_diagnostics.richardson_estimate`).
Only when the background is air (decided by material, :func:`solver.model.materials.background_is_air`).

:func:`medium_next_to` names the medium on the field side of a conductor panel -- the one
place that says whether a peak sits in air.
"""

from __future__ import annotations

from collections.abc import Sequence
from dataclasses import dataclass

from solver.bem.solution import Solution
from solver.hot_spots.peak_diagnostics import richardson_estimate
from solver.model.materials import BACKGROUND, Medium, background_is_air, medium_of_region

#: Name of the background region in dielectric solutions.
BACKGROUND_REGION = BACKGROUND


def medium_next_to(solution: Solution, panel: int) -> Medium:
    """The medium on the field side of conductor panel ``panel`` of ``solution.mesh``.

    The region comes from the solution (the side of the panel its normal points to); whether
    it is air is decided by its material (:func:`solver.model.materials.region_is_air`).
    """
    regions = solution.conductor_region_plus
    index = int(regions[panel]) if len(regions) == solution.mesh.n_panels else len(solution.model.dielectrics)
    return medium_of_region(solution.model, index)


@dataclass(frozen=True)
class AirRegionPeak:
    """Largest field in the background air.

    Attributes
    ----------
    field_V_per_m : largest |E| in the air on the finest mesh, V/m.
    location_m : (x, y) where it occurs, metres.
    where : "interface" (outer surface of insulation) or "conductor '<name>'" (a bare surface).
    at_sharp_corner : the peak sits at a sharp corner, so the value is mesh-dependent.
    estimated_relative_error : Richardson estimate (None at a sharp corner, or when negligible).
    peak_history_V_per_m : the peak on each mesh, coarsest first.
    negligible : the air field is below :data:`NEGLIGIBLE_FRACTION` of the largest field in the
        model — zero to solver accuracy (as outside an earthed screen), so no error is given.
    """

    field_V_per_m: float
    location_m: tuple[float, float]
    where: str
    at_sharp_corner: bool
    estimated_relative_error: float | None
    peak_history_V_per_m: tuple[float, ...]
    negligible: bool = False


#: Air fields below this fraction of the model's largest field are numerical zero.
NEGLIGIBLE_FRACTION = 1e-4


def air_region_names(model) -> set[str]:
    """Names of the regions that are air: the background when its eps_r is air's, and every
    dielectric region whose material is air."""
    names = {BACKGROUND_REGION} if background_is_air(model) else set()
    return names | {d.name for i, d in enumerate(model.dielectrics) if medium_of_region(model, i).is_air}


def largest_air_field(solution: Solution):
    """The largest of the region peaks that lie in air (None when no region is air)."""
    names = air_region_names(solution.model)
    peaks = [p for p in solution.peak_region_fields if p.region in names]
    return max(peaks, key=lambda p: float(p.field_V_per_m)) if peaks else None


def air_region_peak(solutions: Sequence[Solution]) -> AirRegionPeak | None:
    """Peak field in the background air over a refinement (coarsest first), or None.

    None when the model has no dielectric regions (the conductor peaks are then in air
    already), when no region is air (by material), or with fewer than three solutions.
    The peak is the largest over every air region (the background and regions drawn as air).
    """
    if len(solutions) < 3:
        return None
    final = solutions[-1]
    if not final.model.dielectrics or not air_region_names(final.model):
        return None
    peaks = [largest_air_field(s) for s in solutions]
    if any(p is None for p in peaks):
        return None
    history = tuple(float(p.field_V_per_m) for p in peaks)
    last = peaks[-1]
    largest = float(max((float(p.field_V_per_m) for p in final.peak_region_fields), default=0.0))
    negligible = history[-1] < NEGLIGIBLE_FRACTION * largest
    error = None if (last.at_sharp_corner or negligible) else richardson_estimate(history)[0]
    x, y = last.location_m
    return AirRegionPeak(history[-1], (float(x), float(y)), last.where, bool(last.at_sharp_corner),
                         error, history, bool(negligible))
