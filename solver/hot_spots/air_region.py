"""The largest field in the surrounding air of a model with dielectric regions.

With insulated or coated conductors the conductor surface sits in the insulation, and the
field that matters for air breakdown and corona is the largest field in the air around it —
usually on the outer surface of the insulation. The dielectric solution knows the peak field
of every region (:attr:`DielectricSolution.peak_region_fields`); this module follows the
background region's peak over the meshes of a refinement and gives it an error estimate the
same way as the conductor peaks (:func:`solver.peak_diagnostics.richardson_estimate`).
Only when the background is air (relative permittivity 1).
"""

from __future__ import annotations

from dataclasses import dataclass
from typing import Sequence

from solver.hot_spots.peak_diagnostics import richardson_estimate
from solver.bem.solution import Solution

#: Name of the background region in dielectric solutions.
BACKGROUND_REGION = "background"


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


def _background_peak(solution: Solution):
    for peak in getattr(solution, "peak_region_fields", ()):
        if peak.region == BACKGROUND_REGION:
            return peak
    return None


def air_region_peak(solutions: Sequence[Solution]) -> AirRegionPeak | None:
    """Peak field in the background air over a refinement (coarsest first), or None.

    None when the model has no dielectric regions (the conductor peaks are then in air
    already), when the background is not air, or with fewer than three solutions.
    """
    if len(solutions) < 3:
        return None
    final = solutions[-1]
    if not final.model.dielectrics or final.model.background_eps_r != 1.0:
        return None
    peaks = [_background_peak(s) for s in solutions]
    if any(p is None for p in peaks):
        return None
    history = tuple(float(p.field_V_per_m) for p in peaks)
    last = peaks[-1]
    largest = float(max((float(p.field_V_per_m) for p in getattr(final, "peak_region_fields", ())), default=0.0))
    negligible = history[-1] < NEGLIGIBLE_FRACTION * largest
    error = None if (last.at_sharp_corner or negligible) else richardson_estimate(history)[0]
    return AirRegionPeak(history[-1], tuple(map(float, last.location_m)), last.where, bool(last.at_sharp_corner),
                         error, history, bool(negligible))
