"""Diagnostics behind a peak surface field: convergence, corner singularity, nearest gap.

* :func:`richardson_estimate` — error of the last of a sequence of values from successive
  doublings of the mesh resolution (Richardson extrapolation, common practice).
* :func:`corner_field_grows` — whether a conductor's sharp corners carry charge (then its 2-D
  peak field is unbounded).
* :func:`nearest_other_potential` — the nearest conductor (or ground plane) at a different
  potential, for the plain gap field V / d.
"""

from __future__ import annotations

import math
from collections.abc import Sequence

import numpy as np
import shapely

from solver.bem.solution import Solution
from solver.mesh.panels import MeshSettings
from solver.model.geometry import conductor_geometries
from solver.model.model import Model

#: Name used for the ground plane as the "nearest conductor".
GROUND_PLANE_NAME = "ground plane"


def richardson_estimate(values: Sequence[float] | np.ndarray) -> tuple[float, float | None, float | None]:
    """Relative error of the last of >= 3 values from successive level doublings.

    Returns ``(relative_error, extrapolated_value, observed_order)``; the last two are None
    when the last three values do not converge monotonically (then the error is the larger of
    the last two relative changes). See the module docstring.
    """
    f1, f2, f3 = (float(v) for v in values[-3:])
    d1, d2 = f2 - f1, f3 - f2
    scale = abs(f3) or 1.0
    if d2 == 0.0:
        return abs(d1) / scale * 1e-3, f3, None
    ratio = d1 / d2
    if ratio > 1.0:
        correction = d2 / (ratio - 1.0)
        return abs(correction) / scale, f3 + correction, math.log2(ratio)
    return max(abs(d1), abs(d2)) / scale, None, None


def nearest_other_potential(model: Model, solution: Solution) -> list[tuple[str | None, float | None, float | None]]:
    """(name, gap_m, |dV|) of the nearest conductor at a different potential, per conductor.

    Exact distances are computed only for the conductors whose bounding boxes are no farther
    than the nearest gap found (a box distance never exceeds the true one), so a model of many
    conductors costs about one distance per neighbour instead of one per pair.
    """
    geoms = conductor_geometries(model, MeshSettings(1.0).arc_step_rad)
    potentials = np.asarray(solution.conductor_potentials_V, dtype=float)
    vscale = max(1e-300, float(np.abs(potentials).max()))
    plane_y = None if model.ground_plane is None else model.ground_plane.y * model.metres_per_unit
    bounds = np.array([g.bounds for g in geoms], dtype=float).reshape(-1, 4)
    out = []
    for k, g in enumerate(geoms):
        dv = np.abs(potentials[k] - potentials)
        dx = np.maximum(0.0, np.maximum(bounds[:, 0] - bounds[k, 2], bounds[k, 0] - bounds[:, 2]))
        dy = np.maximum(0.0, np.maximum(bounds[:, 1] - bounds[k, 3], bounds[k, 1] - bounds[:, 3]))
        lower = np.hypot(dx, dy)  # bounding-box distance: a lower bound of the true gap
        other = (np.arange(len(geoms)) != k) & (dv > 1e-9 * vscale)
        gaps = np.full(len(geoms), np.inf)
        candidates = [(GROUND_PLANE_NAME, float(g.bounds[1] - plane_y), abs(float(potentials[k])))] if plane_y is not None else []
        bound = min((gap for _, gap, v in candidates if v > 1e-9 * vscale and gap > 0), default=np.inf)
        order = np.flatnonzero(other)[np.argsort(lower[other], kind="stable")]
        for j in order:
            if lower[j] > bound * (1.0 + 1e-9):
                break
            gaps[j] = float(shapely.distance(g, geoms[j]))
            if gaps[j] > 0:
                bound = min(bound, gaps[j])
        candidates += [(model.conductors[j].name, float(gaps[j]), float(dv[j])) for j in order if np.isfinite(gaps[j])]
        best: tuple[str | None, float | None, float | None] = (None, None, None)
        usable = [(name, gap, v) for name, gap, v in candidates if v > 1e-9 * vscale and gap > 0]
        if usable:
            # Gaps equal to within round-off (1e-9 of the smallest) are a tie, decided by the
            # larger potential difference and then by name, never by round-off: the choice must
            # not change when the drawing is scaled or moved.
            smallest = min(gap for _, gap, _ in usable)
            tied = [c for c in usable if c[1] <= smallest * (1.0 + 1e-9)]
            name, _, v = min(tied, key=lambda c: (-c[2], str(c[0])))
            best = (name, smallest, v)
        out.append(best)
    return out


def _corner_field(solution: Solution, k: int) -> float:
    """Largest surface field on the panels next to the sharp corners of conductor k (0 if none)."""
    mesh = solution.mesh
    near = (mesh.conductor_index == k) & (mesh.distance_to_corner_m < 2.0 * mesh.lengths + 1e-15)
    return float(solution.surface_field_V_per_m[near].max()) if near.any() else 0.0


def corner_field_grows(coarse: Solution, fine: Solution, k: int) -> bool:
    """True when conductor k has a sharp corner that carries charge.

    The field next to a charged corner grows with every refinement (the first panel shrinks
    and the field goes like r^(pi/beta - 1)); next to a corner that carries no charge (the
    outside of a closed screen) it stays near round-off level, which can itself creep up on the
    very small corner panels of fine meshes. A charged corner is therefore one whose field
    grows and reaches at least 1e-3 of the conductor's largest surface field (with the deep
    corner grading of the mesher a charged corner is far above that).
    """
    if not np.any(fine.mesh.corner_conductor == k):
        return False
    e_fine, e_coarse = _corner_field(fine, k), _corner_field(coarse, k)
    floor = 1e-3 * float(fine.surface_field_V_per_m[fine.mesh.conductor_index == k].max())
    return e_fine > floor and e_fine > 1.2 * e_coarse


def most_singular_corner(solution: Solution, k: int) -> tuple[float | None, float | None]:
    mesh = solution.mesh
    betas = mesh.corner_opening_rad[mesh.corner_conductor == k]
    if betas.size == 0:
        return None, None
    beta = float(betas.max())
    return math.pi / beta - 1.0, beta

