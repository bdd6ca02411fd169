"""Peak surface field of one conductor against the radius its sharp corners are rounded to.

For each radius the conductor's sharp corners (and strip edges) are rounded
(:func:`solver.round_sharp_corners`) and the peak is refined to the error target
(:func:`solver.analyse_hot_spots`). The result feeds a plot and a table; it also shows how
quickly the peak grows as the corner sharpens (for a small radius rho at a corner of opening
beta the peak grows roughly like rho^(pi/beta - 1)).
"""

from __future__ import annotations

import math
from collections.abc import Sequence
from dataclasses import dataclass

import numpy as np

from solver.bem.solution import Solution
from solver.bem.solve import CancelCallback, ProgressCallback
from solver.errors import InvalidGeometryError
from solver.hot_spots.analysis import DEFAULT_MAX_PANELS, analyse_hot_spots
from solver.model.model import Model


@dataclass(frozen=True)
class CornerRadiusSweep:
    """Peak field of ``conductor`` for each corner radius (arrays in the order of the radii).

    Attributes
    ----------
    conductor : conductor name.
    corner_radius_m : (k,) radii, metres, ascending.
    peak_field_V_per_m : (k,) peak surface field, V/m.
    estimated_relative_error : (k,) Richardson estimate of each peak.
    enhancement_factor : (k,) peak over the plain gap field (NaN without a neighbour).
    location_m : (k, 2) where each peak sits, metres.
    fitted_exponent : slope of log(peak) against log(radius) over the sweep (negative when the
        peak falls as the radius grows), or None for fewer than two radii.
    """

    conductor: str
    corner_radius_m: np.ndarray
    peak_field_V_per_m: np.ndarray
    estimated_relative_error: np.ndarray
    enhancement_factor: np.ndarray
    location_m: np.ndarray
    fitted_exponent: float | None

    def as_table(self) -> str:
        """Plain-text table: radius (mm), peak field (MV/m), error (%), enhancement factor."""
        lines = [f"Peak field of '{self.conductor}' against corner radius",
                 f"{'radius mm':>10} {'peak MV/m':>11} {'error %':>9} {'enhancement':>12}"]
        for r, e, err, k in zip(self.corner_radius_m, self.peak_field_V_per_m, self.estimated_relative_error,
                                self.enhancement_factor):
            lines.append(f"{r * 1e3:10.4g} {e / 1e6:11.5g} {100 * err:9.2g} {k:12.4g}")
        return "\n".join(lines)

    def as_dict(self) -> dict:
        """JSON-ready columns with SI keys."""
        return {
            "conductor": self.conductor,
            "corner_radius_m": self.corner_radius_m.tolist(),
            "peak_field_V_per_m": self.peak_field_V_per_m.tolist(),
            "peak_field_estimated_relative_error": self.estimated_relative_error.tolist(),
            "enhancement_factor": [None if math.isnan(v) else v for v in self.enhancement_factor.tolist()],
            "fitted_exponent": self.fitted_exponent,
        }


def peak_field_vs_corner_radius(
    source: Solution | Model,
    conductor: str,
    radii_m: Sequence[float],
    target_relative_error: float = 0.01,
    max_panels: int = DEFAULT_MAX_PANELS,
    *,
    progress: ProgressCallback | None = None,
    cancel: CancelCallback | None = None,
) -> CornerRadiusSweep:
    """Peak surface field of ``conductor`` with its sharp corners rounded to each radius.

    Parameters
    ----------
    source : Solution or Model
        The solved model (or the model); each radius gives a rounded copy that is solved anew.
    conductor : str
        The conductor to round and analyse (other conductors are left as drawn).
    radii_m : sequence of float
        Corner radii, metres, each > 0.
    target_relative_error : float
        Error target of each peak (see :func:`solver.analyse_hot_spots`).
    max_panels : int
        Panel budget of each refinement.
    progress : callable(fraction, message), optional
        Called as each radius starts and as its refinement advances.
    cancel : callable() -> bool, optional
        Polled throughout; when it returns True, SolveCancelled is raised.

    Returns
    -------
    CornerRadiusSweep
    """
    model = source.model if isinstance(source, Solution) else source
    model.conductor(conductor)
    radii = np.sort(np.asarray(radii_m, dtype=float).ravel())
    if radii.size == 0 or not np.all(np.isfinite(radii)) or np.any(radii <= 0):
        raise InvalidGeometryError(f"Corner radii {list(radii_m)} m: give one or more positive radii.")
    peaks, errors, factors, places = [], [], [], []
    for i, r in enumerate(radii):
        def radius_progress(fraction: float, message: str, i: int = i, r: float = float(r)) -> None:
            if progress is not None:
                progress((i + fraction) / radii.size, f"Corner radius {r * 1e3:g} mm: {message}")

        spot = analyse_hot_spots(model, target_relative_error, float(r), [conductor], max_panels,
                                 replace_radius=True, progress=radius_progress, cancel=cancel).hot_spots[0]
        peaks.append(spot.field_V_per_m)
        errors.append(spot.estimated_relative_error if spot.estimated_relative_error is not None else math.nan)
        factors.append(spot.enhancement_factor if spot.enhancement_factor is not None else math.nan)
        places.append(spot.location_m)
    peaks_arr = np.asarray(peaks)
    exponent = None
    if radii.size >= 2 and np.ptp(np.log(radii)) > 0:
        exponent = float(np.polyfit(np.log(radii), np.log(peaks_arr), 1)[0])
    return CornerRadiusSweep(conductor, radii, peaks_arr, np.asarray(errors), np.asarray(factors),
                             np.asarray(places).reshape(-1, 2), exponent)
