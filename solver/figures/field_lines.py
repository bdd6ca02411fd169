"""Figures for drawing a solution: potential and field maps on a grid, and field lines.

:func:`evaluate_on_grid` samples the potential and the field strength on a rectangular grid
(NaN inside conductors and below a ground plane, so a plot shows them as holes).

:func:`trace_field_lines` draws field lines that start at equal steps of charge along the
conductor boundaries, so the density of lines shows the field strength: each line carries the
same flux. Lines leave positively charged surfaces along E; lines that leave negatively charged
surfaces (traced against E) are kept only when they end on the ground plane or far away,
so a line between two conductors is drawn once.

All points are in metres; grids are row-major ``(ny, nx)``.
"""

from __future__ import annotations

import functools
from collections.abc import Callable
from dataclasses import dataclass

import numpy as np
import shapely
from shapely.geometry import LineString, MultiLineString
from shapely.geometry.base import BaseGeometry
from shapely.ops import unary_union

from solver.bem.solution import Solution
from solver.errors import SolveCancelled
from solver.mesh.panels import MeshSettings
from solver.model.geometry import conductor_geometries
from solver.model.model import Model

#: Points evaluated per call of the field routines (bounds memory to about 50 MB).
_CHUNK = 3000


@dataclass(frozen=True)
class GridField:
    """Potential and field strength sampled on a grid.

    Attributes
    ----------
    x_m : (nx,) grid abscissae, metres.
    y_m : (ny,) grid ordinates, metres.
    potential_V : (ny, nx) potential, volts; NaN inside conductors and below a ground plane.
    field_V_per_m : (ny, nx) field strength |E|, V/m; NaN where ``potential_V`` is NaN.
    """

    x_m: np.ndarray
    y_m: np.ndarray
    potential_V: np.ndarray
    field_V_per_m: np.ndarray


@dataclass(frozen=True)
class FieldLine:
    """One field line: ``points_m`` (k, 2) in metres, running along E (from + to - charge)."""

    points_m: np.ndarray
    start_conductor: int


def _solid_and_strip_geometry(solution: Solution):
    """The conductors of the solution's model as one prepared solid and one strip geometry."""
    return conductor_outline(solution.model)


@functools.lru_cache(maxsize=8)
def conductor_outline(model: Model):
    """(solid, strip): the model's solid conductors (prepared for fast point tests) and its
    strips, in metres; either None when absent.

    Built once per model (Models are immutable values) and kept for the few most recent
    models, so that evaluating a readout at the cursor does not rebuild the geometry.
    """
    settings = MeshSettings.for_density(model.mesh_density)
    geoms = conductor_geometries(model, settings.arc_step_rad)
    solids: list[BaseGeometry] = []
    strips: list[BaseGeometry] = []
    for g in geoms:
        for part in getattr(g, "geoms", [g]):
            (strips if isinstance(part, (LineString, MultiLineString)) else solids).append(part)
    solid = unary_union(solids) if solids else None
    strip = unary_union(strips) if strips else None
    if solid is not None:
        shapely.prepare(solid)
    return solid, strip


def _blocked(solution: Solution, solid, points_m: np.ndarray) -> np.ndarray:
    """(m,) True where a point lies inside a conductor or below the ground plane."""
    out = np.zeros(len(points_m), dtype=bool)
    if solid is not None and len(points_m):
        out |= shapely.contains_xy(solid, points_m[:, 0], points_m[:, 1])
    plane = solution.model.ground_plane
    if plane is not None:
        out |= points_m[:, 1] <= plane.y * solution.model.metres_per_unit
    return out


def field_at(solution: Solution, points_m: np.ndarray) -> np.ndarray:
    """Electric field at (m, 2) points in metres, V/m, shape (m, 2), evaluated in chunks."""
    pts = np.asarray(points_m, dtype=float).reshape(-1, 2)
    out = np.empty_like(pts)
    for i in range(0, len(pts), _CHUNK):
        out[i:i + _CHUNK] = solution.field_V_per_m(pts[i:i + _CHUNK])
    return out


def potential_at(solution: Solution, points_m: np.ndarray) -> np.ndarray:
    """Potential at (m, 2) points in metres, volts, shape (m,), evaluated in chunks."""
    pts = np.asarray(points_m, dtype=float).reshape(-1, 2)
    out = np.empty(len(pts))
    for i in range(0, len(pts), _CHUNK):
        out[i:i + _CHUNK] = solution.potential_V(pts[i:i + _CHUNK])
    return out


def evaluate_on_grid(solution: Solution, x_m: np.ndarray, y_m: np.ndarray) -> GridField:
    """Potential and field strength on the grid ``x_m`` x ``y_m``.

    Parameters
    ----------
    solution : Solution
    x_m : (nx,) float, metres.
    y_m : (ny,) float, metres.

    Returns
    -------
    GridField
        Arrays of shape (ny, nx); NaN inside conductors and at or below a ground plane.
    """
    x_m, y_m = np.asarray(x_m, float), np.asarray(y_m, float)
    xx, yy = np.meshgrid(x_m, y_m)
    solid, _ = _solid_and_strip_geometry(solution)
    blocked = _blocked(solution, solid, np.column_stack([xx.ravel(), yy.ravel()])).reshape(xx.shape)
    phi, field = solution.potential_and_field_on_grid(x_m, y_m, skip=blocked)
    e = np.hypot(field[..., 0], field[..., 1])
    phi[blocked] = np.nan
    e[blocked] = np.nan
    return GridField(x_m, y_m, phi, e)


def evaluate_at_points(solution: Solution, points_m: np.ndarray) -> tuple[np.ndarray, np.ndarray]:
    """Potential (V) and field strength |E| (V/m) at (m, 2) points in metres, each shape (m,).

    NaN inside conductors and at or below a ground plane (as :func:`evaluate_on_grid`).
    """
    pts = np.asarray(points_m, dtype=float).reshape(-1, 2)
    solid, _ = _solid_and_strip_geometry(solution)
    free = ~_blocked(solution, solid, pts)
    phi = np.full(len(pts), np.nan)
    e = np.full(len(pts), np.nan)
    phi[free], field = solution.potential_and_field(pts[free])
    e[free] = np.hypot(*field.T)
    return phi, e


def _size_m(solution: Solution) -> tuple[np.ndarray, float]:
    pts = np.vstack([solution.mesh.starts, solution.mesh.ends])
    lo, hi = pts.min(axis=0), pts.max(axis=0)
    return 0.5 * (lo + hi), float(np.hypot(*(hi - lo))) or 1.0


def _tracing_extent_m(solution: Solution) -> tuple[np.ndarray, float]:
    """Centre and size (bounding-box diagonal) of what field lines run between, metres.

    The conductors and, when there is one, the ground plane below them: a line from a conductor
    high above the plane must be able to reach it, so the step and the cut-off are sized from
    the whole gap, not from the conductors alone.
    """
    pts = np.vstack([solution.mesh.starts, solution.mesh.ends])
    lo, hi = pts.min(axis=0), pts.max(axis=0)
    plane = solution.model.ground_plane
    if plane is not None:
        lo[1] = min(lo[1], plane.y * solution.model.metres_per_unit)
    return 0.5 * (lo + hi), float(np.hypot(*(hi - lo))) or 1.0


def field_line_seeds(solution: Solution, n_lines: int) -> tuple[np.ndarray, np.ndarray, np.ndarray]:
    """Start points at equal steps of charge along the boundaries.

    Returns
    -------
    points_m : (k, 2) start points, just outside the surface, metres.
    sign : (k,) +1 where the surface charge is positive, -1 where negative.
    conductor : (k,) index of the conductor each seed starts on.
    """
    mesh = solution.mesh
    q = solution.surface_charge_density_C_per_m2 * mesh.lengths  # C/m per panel
    total = np.abs(q).sum()
    if total <= 0 or n_lines <= 0:
        return np.zeros((0, 2)), np.zeros(0), np.zeros(0, dtype=int)
    step = total / n_lines
    cumulative = np.cumsum(np.abs(q))
    targets = (np.arange(n_lines) + 0.5) * step
    panel = np.searchsorted(cumulative, targets).clip(0, mesh.n_panels - 1)
    before = cumulative[panel] - np.abs(q[panel])
    frac = np.where(np.abs(q[panel]) > 0, (targets - before) / np.abs(q[panel]), 0.5).clip(0, 1)
    base = mesh.starts[panel] + frac[:, None] * (mesh.ends[panel] - mesh.starts[panel])
    side = np.where(mesh.is_strip[panel] & (np.arange(n_lines) % 2 == 1), -1.0, 1.0)
    offset = 0.25 * mesh.lengths[panel] + 1e-6 * _size_m(solution)[1]
    points = base + (side * offset)[:, None] * mesh.normals[panel]
    return points, np.sign(q[panel]), mesh.conductor_index[panel].astype(int)


def trace_field_lines(
    solution: Solution,
    n_lines: int = 48,
    *,
    max_steps: int = 500,
    far_factor: float = 3.0,
    cancel: Callable[[], bool] | None = None,
) -> tuple[FieldLine, ...]:
    """Field lines from equal charge steps along the conductors.

    Parameters
    ----------
    solution : Solution
    n_lines : int
        Number of seeds over the absolute charge of all conductors; each line carries
        ``sum |q| / n_lines`` of flux (C/m).
    max_steps : int
        Steps per line at most; the step is 1/150 of the size of the conductors together with
        the ground plane (when there is one), so a line can run the whole gap to the plane.
    far_factor : float
        A line stops when it is farther than ``far_factor`` such sizes from their centre.
    cancel : callable() -> bool, optional
        Polled at every step; when it returns True, SolveCancelled is raised.

    Returns
    -------
    tuple of FieldLine
        Points in metres, each running in the direction of E.
    """
    seeds, sign, start = field_line_seeds(solution, n_lines)
    if len(seeds) == 0:
        return ()
    centre, size = _tracing_extent_m(solution)
    h = size / 150.0
    solid, strip = _solid_and_strip_geometry(solution)
    pos = seeds.copy()
    paths = [[p.copy()] for p in pos]
    active = np.ones(len(pos), dtype=bool)
    ended = np.full(len(pos), "far", dtype=object)

    def direction(p: np.ndarray, s: np.ndarray) -> tuple[np.ndarray, np.ndarray]:
        e = field_at(solution, p) * s[:, None]
        norm = np.hypot(*e.T)
        return e / np.where(norm > 0, norm, 1.0)[:, None], norm

    for _ in range(max_steps):
        if cancel is not None and cancel():
            raise SolveCancelled("Tracing field lines cancelled.")
        idx = np.flatnonzero(active)
        if len(idx) == 0:
            break
        p, s = pos[idx], sign[idx]
        d1, n1 = direction(p, s)
        d2, _ = direction(p + 0.5 * h * d1, s)
        new = p + h * d2
        hit_plane = np.zeros(len(idx), dtype=bool)
        if solution.model.ground_plane is not None:
            plane_y = solution.model.ground_plane.y * solution.model.metres_per_unit
            hit_plane = new[:, 1] <= plane_y
            # end a line that crosses the plane on the plane itself
            t = (p[hit_plane, 1] - plane_y) / np.maximum(p[hit_plane, 1] - new[hit_plane, 1], 1e-300)
            new[hit_plane] = p[hit_plane] + t.clip(0.0, 1.0)[:, None] * (new[hit_plane] - p[hit_plane])
        inside = _blocked(solution, solid, new)
        if strip is not None:
            inside |= shapely.dwithin(strip, shapely.points(new), 0.5 * h)
        far = np.hypot(*(new - centre).T) > far_factor * size
        stalled = n1 <= 0
        for j, i in enumerate(idx):
            paths[i].append(new[j])
        pos[idx] = new
        stop = inside | far | stalled
        ended[idx[inside & ~hit_plane]] = "conductor"
        active[idx[stop]] = False

    lines = []
    for n, path in enumerate(paths):
        if sign[n] < 0 and ended[n] == "conductor":
            continue  # drawn from the positive end already
        pts = np.asarray(path)
        lines.append(FieldLine(pts[::-1].copy() if sign[n] < 0 else pts, int(start[n])))
    return tuple(lines)
