"""What a hot-spot analysis returns: the peak surface field of each conductor
(:class:`HotSpot`) and the report of the analysis (:class:`HotSpotReport`).

Made by :func:`solver.hot_spots.analysis.analyse_hot_spots` (mesh refinement) and, for large
models, :mod:`solver.hot_spots.large_model_peaks` (from the high-order solution).
"""

from __future__ import annotations

from dataclasses import dataclass, field

from solver.bem.solution import Solution
from solver.hot_spots.air_region import AirRegionPeak
from solver.model.materials import Medium
from solver.model.model import Model


@dataclass(frozen=True)
class HotSpot:
    """The peak surface field of one conductor.

    Attributes
    ----------
    conductor : conductor name.
    field_V_per_m : largest |E| on its surface on the finest mesh, V/m.
    location_m : (x, y) where it occurs, metres.
    singular : True when the conductor has a sharp corner or free edge: its 2-D peak field is
        unbounded and ``field_V_per_m`` only reflects the mesh (give a corner radius).
    corner_exponent : pi/beta - 1 of the most singular corner of a singular conductor, else None.
    corner_opening_rad : opening angle beta of the field region at that corner, else None.
    estimated_relative_error : Richardson estimate of the relative error of ``field_V_per_m``
        (None when singular).
    extrapolated_field_V_per_m : Richardson-extrapolated peak (None when not monotone or singular).
    observed_order : fitted convergence order p in error ~ 2^(-p) per level doubling (or None).
    converged : the estimate is at or below the target.
    potential_V : the conductor's potential, V.
    nearest_conductor : nearest conductor (or "ground plane") at a different potential, or None.
    gap_m : shortest distance to it, metres.
    gap_field_V_per_m : |V_k - V_j| / gap, V/m.
    enhancement_factor : field_V_per_m / gap_field_V_per_m (None without such a neighbour).
    peak_history_V_per_m : peak on each mesh of the refinement, coarsest first.
    local_radius_of_curvature_m : radius of curvature of the outline at the peak where it
        bulges into the field, metres (None on a straight run, on a hollow surface such as the
        inside of a tube, at a sharp corner or on a strip).
    medium_eps_r : relative permittivity of the medium next to the peak.
    medium : the medium next to the peak (region, material, and whether it is air).
    note : plain-words remark for the user.
    """

    conductor: str
    field_V_per_m: float
    location_m: tuple[float, float]
    singular: bool
    corner_exponent: float | None
    corner_opening_rad: float | None
    estimated_relative_error: float | None
    extrapolated_field_V_per_m: float | None
    observed_order: float | None
    converged: bool
    potential_V: float
    nearest_conductor: str | None
    gap_m: float | None
    gap_field_V_per_m: float | None
    enhancement_factor: float | None
    peak_history_V_per_m: tuple[float, ...]
    note: str
    local_radius_of_curvature_m: float | None = None
    medium_eps_r: float = 1.0
    medium: Medium | None = None


@dataclass(frozen=True)
class HotSpotReport:
    """Peak surface fields of a model, with the refinement that produced them.

    Attributes
    ----------
    hot_spots : one :class:`HotSpot` per analysed conductor, model order.
    target_relative_error : the requested error target.
    levels : mesh resolution levels solved, coarsest first.
    n_panels : panel count of each of those meshes.
    corner_radius_m : radius the sharp corners were rounded to (None = not rounded).
    solved_model : the model actually solved (rounded copy when a radius was given).
    solution : the solution on the finest mesh.
    air_region : with dielectric regions in air, the largest field in the air (e.g. on the
        outer surface of insulation), else None.
    method : how the peaks were found: "mesh refinement" (the loop above), or "high-order
        solution" for a large model (:mod:`solver.hot_spots.large_model_peaks`: no
        refinement; ``levels`` is then empty and ``n_panels`` holds the unknowns solved).
    """

    hot_spots: tuple[HotSpot, ...]
    target_relative_error: float
    levels: tuple[float, ...]
    n_panels: tuple[int, ...]
    corner_radius_m: float | None
    solved_model: Model = field(compare=False, repr=False)
    solution: Solution = field(compare=False, repr=False)
    air_region: AirRegionPeak | None = None
    method: str = "mesh refinement"

    def for_conductor(self, name: str) -> HotSpot:
        """The hot spot of conductor ``name`` (KeyError if it was not analysed)."""
        for spot in self.hot_spots:
            if spot.conductor == name:
                return spot
        raise KeyError(f"No hot spot for conductor '{name}'; analysed: {', '.join(s.conductor for s in self.hot_spots)}.")

    @property
    def all_converged(self) -> bool:
        """Every non-singular peak met the error target (and none is singular)."""
        return all(s.converged for s in self.hot_spots)

    def as_dict(self) -> dict:
        """JSON-ready summary with SI keys (one entry per conductor under ``conductors``)."""
        return {
            "target_relative_error": self.target_relative_error,
            "method": self.method,
            "corner_radius_m": self.corner_radius_m,
            "levels": list(self.levels),
            "n_panels": list(self.n_panels),
            "air_region": None if self.air_region is None else {
                "peak_field_V_per_m": self.air_region.field_V_per_m,
                "peak_field_location_m": list(self.air_region.location_m),
                "where": self.air_region.where,
                "at_sharp_corner": self.air_region.at_sharp_corner,
                "peak_field_estimated_relative_error": self.air_region.estimated_relative_error,
            },
            "conductors": [
                {
                    "conductor": s.conductor,
                    "peak_field_V_per_m": s.field_V_per_m,
                    "peak_field_location_m": list(s.location_m),
                    "peak_field_estimated_relative_error": s.estimated_relative_error,
                    "peak_field_extrapolated_V_per_m": s.extrapolated_field_V_per_m,
                    "observed_order": s.observed_order,
                    "singular": s.singular,
                    "corner_exponent": s.corner_exponent,
                    "corner_opening_rad": s.corner_opening_rad,
                    "nearest_conductor": s.nearest_conductor,
                    "gap_m": s.gap_m,
                    "gap_field_V_per_m": s.gap_field_V_per_m,
                    "enhancement_factor": s.enhancement_factor,
                    "local_radius_of_curvature_m": s.local_radius_of_curvature_m,
                    "medium_eps_r": s.medium_eps_r,
                    "converged": s.converged,
                    "note": s.note,
                }
                for s in self.hot_spots
            ],
        }
