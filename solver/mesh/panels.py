"""Boundary mesh: straight panels on every conductor boundary, graded toward corners.

Near a conducting wedge whose field region opens by an angle beta the surface charge density
goes like r^(pi/beta - 1) (singular when beta > pi). Panels therefore shrink geometrically
toward sharp corners and toward the free edges of strips, and follow short neighbours (arcs)
smoothly elsewhere.

The mesh is a frozen value; :meth:`PanelMesh.refined` returns a finer copy built from the same
geometry.
"""

from __future__ import annotations

import math
from dataclasses import dataclass, field
from functools import cached_property

import numpy as np

from solver.mesh.budget import check_panel_budget
from solver.mesh.grading import graded_panel_count, graded_panels
from solver.model.geometry import BoundaryRing, boundary_rings, conductor_arcs, conductor_geometries
from solver.model.model import Model

#: Turning angle above which a vertex counts as a corner (smaller ones are polygonised arcs).
CORNER_TURN_RAD = math.radians(25.0)

#: Numeric resolution level of each named mesh density.
DENSITY_LEVELS = {"coarse": 0.5, "normal": 1.0, "fine": 2.0}


@dataclass(frozen=True)
class MeshSettings:
    """How finely to divide boundaries; derived from one resolution ``level`` (normal = 1).

    Attributes
    ----------
    arc_step_rad : angle between vertices on circles and fillets.
    divisions_per_size : panels along the model's overall size (bounding-box diagonal).
    divisions_per_perimeter : least number of panels on each conductor's outline.
    gap_fraction : longest panel as a fraction of the gap to the nearest other conductor.
    corner_fraction : first panel at a sharp corner or free edge, as a fraction of the
        longest panel of that conductor.
    growth_ratio : size ratio of neighbouring panels in a graded run.
    """

    level: float = 1.0

    @property
    def arc_step_rad(self) -> float:
        return math.radians(0.703125) / self.level

    @property
    def divisions_per_size(self) -> float:
        return 100.0 * self.level

    @property
    def divisions_per_perimeter(self) -> float:
        return 60.0 * self.level

    @property
    def gap_fraction(self) -> float:
        return 0.5 / self.level

    @property
    def corner_fraction(self) -> float:
        # Floored so that the smallest panels stay far above round-off at very fine levels.
        return max(1e-3 * 10.0 ** (-2.0 * self.level), 1e-9)

    @property
    def growth_ratio(self) -> float:
        return 1.0 + 0.3 / self.level

    @classmethod
    def for_density(cls, density: str) -> MeshSettings:
        return cls(DENSITY_LEVELS[density])


def _vertex_angles(points: np.ndarray, closed: bool) -> tuple[np.ndarray, np.ndarray]:
    """Turning angle at each vertex (rad, left turn positive) and the field-side opening angle.

    For a closed ring with material on the left, the field region at a vertex opens by
    beta = pi + turn (a convex corner of the conductor turns left, so beta > pi).
    For a strip, vertices have field on both sides; beta is the larger of the two openings,
    and the free ends have beta = 2 pi.
    """
    n = len(points)
    turn = np.zeros(n)
    if closed:
        a = points - np.roll(points, 1, axis=0)
        b = np.roll(points, -1, axis=0) - points
        turn = np.arctan2(a[:, 0] * b[:, 1] - a[:, 1] * b[:, 0], np.einsum("ij,ij->i", a, b))
        beta = math.pi + turn
    else:
        a = points[1:-1] - points[:-2]
        b = points[2:] - points[1:-1]
        turn[1:-1] = np.arctan2(a[:, 0] * b[:, 1] - a[:, 1] * b[:, 0], np.einsum("ij,ij->i", a, b))
        beta = math.pi + np.abs(turn)
        beta[0] = beta[-1] = 2 * math.pi
    return turn, beta


@dataclass(frozen=True)
class PanelMesh:
    """Straight panels with constant surface charge density on each, in metres.

    Attributes
    ----------
    starts, ends : (n, 2) float arrays, panel end points.
    conductor_index : (n,) int, index into the model's conductors.
    ring_index : (n,) int, which boundary ring the panel lies on.
    is_strip : (n,) bool, True for panels on zero-thickness strips (charge on both sides).
    arc_length_m : (n,) float, distance along the conductor's boundary to the midpoint (rings
        of one conductor follow each other in order).
    corner_points : (k, 2) float, sharp corners and free edges (field singular there).
    corner_conductor : (k,) int, the conductor of each corner point.
    corner_opening_rad : (k,) float, opening angle beta of the field region at each corner.
    arc_radius_m : (n,) float, signed radius of the exact arc a panel is a chord of: > 0 where
        the conductor bulges into the field (the arc's centre on the material side), < 0 where
        it is hollow toward the field; ``inf`` on straight edges and strips.
    arc_centre_m : (n, 2) float, centre of that arc (NaN on straight panels).
    settings : MeshSettings used to build the mesh.

    Panels on arcs are chords whose end points lie on the true circle; the arcs come from the
    shapes themselves (:meth:`solver.model.shapes.Shape.meshing_hints`), never re-fitted.
    """

    starts: np.ndarray
    ends: np.ndarray
    conductor_index: np.ndarray
    ring_index: np.ndarray
    is_strip: np.ndarray
    arc_length_m: np.ndarray
    corner_points: np.ndarray
    corner_conductor: np.ndarray
    corner_opening_rad: np.ndarray
    arc_radius_m: np.ndarray = field(default_factory=lambda: np.zeros(0))
    arc_centre_m: np.ndarray = field(default_factory=lambda: np.zeros((0, 2)))
    settings: MeshSettings = field(default_factory=MeshSettings)
    model: Model | None = field(default=None, compare=False, repr=False)

    @property
    def n_panels(self) -> int:
        return len(self.starts)

    @cached_property
    def midpoints(self) -> np.ndarray:
        """(n, 2) panel midpoints, the collocation points, metres."""
        return 0.5 * (self.starts + self.ends)

    @cached_property
    def lengths(self) -> np.ndarray:
        """(n,) panel lengths, metres."""
        return np.hypot(*(self.ends - self.starts).T)

    @cached_property
    def tangents(self) -> np.ndarray:
        """(n, 2) unit tangents in the direction start -> end."""
        return (self.ends - self.starts) / self.lengths[:, None]

    @cached_property
    def normals(self) -> np.ndarray:
        """(n, 2) unit normals pointing out of the conductor into the field (right-hand)."""
        t = self.tangents
        return np.column_stack([t[:, 1], -t[:, 0]])

    @cached_property
    def distance_to_corner_m(self) -> np.ndarray:
        """(n,) distance from each midpoint to the nearest sharp corner of its conductor (inf if none)."""
        out = np.full(self.n_panels, np.inf)
        for k in np.unique(self.corner_conductor):
            mine = self.conductor_index == k
            pts = self.corner_points[self.corner_conductor == k]
            d = np.hypot(*(self.midpoints[mine][:, None, :] - pts[None, :, :]).transpose(2, 0, 1))
            out[mine] = d.min(axis=1)
        return out

    def refined(self, factor: float = 2.0) -> PanelMesh:
        """A mesh of the same model at ``factor`` times the resolution level."""
        if self.model is None:
            raise ValueError("This mesh was not built from a model and cannot be refined.")
        return discretize_boundary(self.model, MeshSettings(self.settings.level * factor))


def _conductor_h_max(model: Model, geoms: list, settings: MeshSettings) -> tuple[list[float], list[str]]:
    """Longest panel allowed on each conductor (metres), and what limits it, in words."""
    import shapely

    bounds = np.array([g.bounds for g in geoms])
    lo, hi = bounds[:, :2].min(axis=0), bounds[:, 2:].max(axis=0)
    if model.ground_plane is not None:
        lo[1] = min(lo[1], model.ground_plane.y * model.metres_per_unit)
    size = float(np.hypot(*(hi - lo)))
    h_global = size / settings.divisions_per_size
    scale, unit = model.metres_per_unit, model.unit
    names = [c.name for c in model.conductors]
    out, why = [], []
    for i, g in enumerate(geoms):
        h = min(h_global, g.length / settings.divisions_per_perimeter)
        reason = f"conductor '{names[i]}' (its outline is long for the mesh density)"
        for j, other in enumerate(geoms):
            if j != i:
                gap = float(shapely.distance(g, other))
                if settings.gap_fraction * gap < h:
                    h = settings.gap_fraction * gap
                    reason = (f"the gap of {gap / scale:.3g} {unit} between conductors '{names[i]}' and "
                              f"'{names[j]}'; move them apart (or merge them into one conductor)")
        if model.ground_plane is not None:
            height = g.bounds[1] - model.ground_plane.y * scale
            if settings.gap_fraction * 2.0 * height < h:
                h = settings.gap_fraction * 2.0 * height
                reason = (f"the height of {height / scale:.3g} {unit} of conductor '{names[i]}' above the "
                          "ground plane; raise it")
        out.append(h)
        why.append(reason)
    return out, why


@dataclass(frozen=True)
class _RingPlan:
    """Edges of one boundary ring and the panel sizes at their ends (before grading)."""

    ring: BoundaryRing
    turn: np.ndarray
    beta: np.ndarray
    is_corner: np.ndarray
    edge_len: np.ndarray
    h_start: np.ndarray
    h_end: np.ndarray
    h_max: float


def _ring_plan(ring: BoundaryRing, h_max: float, settings: MeshSettings) -> _RingPlan:
    h_corner = h_max * settings.corner_fraction
    pts = ring.points
    turn, beta = _vertex_angles(pts, ring.closed)
    is_corner = np.abs(turn) > CORNER_TURN_RAD
    if not ring.closed:
        is_corner[0] = is_corner[-1] = True
    n_edges = len(pts) if ring.closed else len(pts) - 1
    edge_vec = np.roll(pts, -1, axis=0)[:n_edges] - pts[:n_edges] if ring.closed else np.diff(pts, axis=0)
    edge_len = np.hypot(*edge_vec.T)
    if ring.closed:
        prev_len, next_len = np.roll(edge_len, 1), np.roll(edge_len, -1)
    else:
        prev_len = np.r_[h_corner, edge_len[:-1]]
        next_len = np.r_[edge_len[1:], h_corner]
    v_start = np.arange(n_edges)
    v_end = (v_start + 1) % len(pts)
    h_s = np.where(is_corner[v_start], h_corner, np.minimum(h_max, prev_len))
    h_e = np.where(is_corner[v_end], h_corner, np.minimum(h_max, next_len))
    return _RingPlan(ring, turn, beta, is_corner, edge_len, h_s, h_e, h_max)


def estimate_conductor_panels(model: Model, settings: MeshSettings | None = None) -> tuple[float, str]:
    """Upper bound on the conductor panels of ``model`` at ``settings``, without building them.

    Returns the count and, in words, the gap or part that contributes most panels.
    """
    settings = settings or MeshSettings.for_density(model.mesh_density)
    plans, why = _plans(model, settings)
    return _count(plans, settings, why)


def _plans(model: Model, settings: MeshSettings) -> tuple[list[_RingPlan], list[str]]:
    geoms = conductor_geometries(model, settings.arc_step_rad)
    h_max_by_conductor, why = _conductor_h_max(model, geoms, settings)
    arcs = conductor_arcs(model)
    plans = []
    for k, g in enumerate(geoms):
        for ring in boundary_rings(k, g, arcs[k]):
            plans.append(_ring_plan(ring, h_max_by_conductor[k], settings))
    return plans, why


def _count(plans: list[_RingPlan], settings: MeshSettings, why: list[str]) -> tuple[float, str]:
    by_conductor = np.zeros(len(why))
    for p in plans:
        n = graded_panel_count(p.edge_len, p.h_start, p.h_end, p.h_max, settings.growth_ratio)
        by_conductor[p.ring.conductor_index] += float(np.sum(n))
    worst = int(np.argmax(by_conductor)) if len(by_conductor) else 0
    return float(by_conductor.sum()), why[worst] if why else ""


def _signed_arc_radii(points: np.ndarray, closed: bool, centres: np.ndarray, radii: np.ndarray) -> np.ndarray:
    """Radius of the arc each edge p -> q of a ring is a chord of, > 0 when its centre lies on
    the material (left) side; ``inf`` for a straight edge (NaN radius)."""
    n_edges = len(points) if closed else len(points) - 1
    p, q = points[:n_edges], np.roll(points, -1, axis=0)[:n_edges]
    radii = np.asarray(radii, dtype=float).reshape(-1)[:n_edges]
    t, c = q - p, np.asarray(centres, dtype=float).reshape(-1, 2)[:n_edges] - 0.5 * (p + q)
    with np.errstate(invalid="ignore"):
        left = t[:, 0] * c[:, 1] - t[:, 1] * c[:, 0] > 0
    return np.where(np.isfinite(radii), np.where(left, radii, -radii), math.inf)


def _ring_breaks(plan: _RingPlan, settings: MeshSettings) -> tuple[np.ndarray, np.ndarray, np.ndarray]:
    """Start and end (distance from the edge's first point, metres) of every panel of a ring,
    and the edge each panel lies on, in order along the ring.

    An edge that :func:`graded_panels` would give one panel (shorter than the smaller end size,
    or overshot by more than half of the second size taken) gets it here, with the same
    arithmetic (the size scaled to the length: ``h * (length / h)``), so those edges (the many
    short chords of polygonised arcs) are done at once and only the others are graded one by one.
    """
    length, ratio, h_max = plan.edge_len, settings.growth_ratio, plan.h_max
    h_s, h_e = np.minimum(plan.h_start, h_max), np.minimum(plan.h_end, h_max)
    h = np.minimum(h_s, h_e)
    # the second size the two runs would take when they meet; one panel is kept when the
    # two overshoot the edge by more than half the second (graded_panels drops it then)
    start_first = h_s <= h_e
    a, b = np.where(start_first, h_s * ratio, h_s), np.where(start_first, h_e, h_e * ratio)
    second = np.where(a <= b, a, b)
    ends_ok = np.isfinite(plan.h_start) & (plan.h_start > 0) & np.isfinite(plan.h_end) & (plan.h_end > 0)
    with np.errstate(invalid="ignore"):
        fits = (length <= h) | (((h + second) >= length) & ((h + second) - length > 0.5 * second))
        single = (ends_ok & np.isfinite(length) & (length > 0) & fits
                  & (math.isfinite(h_max) and h_max > 0 and math.isfinite(ratio) and ratio > 1.0))
    counts = np.ones(len(length), dtype=np.int64)
    graded = {}
    for e in np.flatnonzero(~single):
        graded[e] = graded_panels(length[e], plan.h_start[e], plan.h_end[e], h_max, ratio)
        counts[e] = len(graded[e]) - 1
    owner = np.repeat(np.arange(len(length)), counts)
    with np.errstate(invalid="ignore", divide="ignore"):
        lo, hi = np.zeros(len(owner)), np.repeat(h * (length / h), counts)
    first = np.cumsum(counts) - counts
    for e, breaks in graded.items():
        lo[first[e]:first[e] + counts[e]] = breaks[:-1]
        hi[first[e]:first[e] + counts[e]] = breaks[1:]
    return lo, hi, owner


def discretize_boundary(model: Model, settings: MeshSettings | None = None) -> PanelMesh:
    """Divide every conductor boundary of ``model`` into straight, graded panels.

    Parameters
    ----------
    model : Model
        The cross-section; lengths are converted to metres.
    settings : MeshSettings, optional
        Resolution; by default from ``model.mesh_density``.

    Returns
    -------
    PanelMesh

    Raises
    ------
    MeshTooLargeError
        When the panels (counted before any is made) would not fit the memory budget of
        :mod:`solver.mesh.budget`; the message names the gap or part responsible.
    """
    settings = settings or MeshSettings.for_density(model.mesh_density)
    plans, why = _plans(model, settings)
    n_expected, responsible = _count(plans, settings, why)
    check_panel_budget(n_expected, responsible, "conductor panels")

    starts, ends, cond, ring_idx, strip, arc, arc_r, arc_c = [], [], [], [], [], [], [], []
    corners: list[np.ndarray] = []
    corner_cond: list[int] = []
    corner_beta: list[float] = []
    travelled_by_conductor: dict[int, float] = {}
    for r, plan in enumerate(plans):
        ring, is_corner = plan.ring, plan.is_corner
        pts, beta, edge_len = ring.points, plan.beta, plan.edge_len
        singular = is_corner & (beta > math.pi + CORNER_TURN_RAD)
        corners.extend(pts[singular])
        corner_cond.extend([ring.conductor_index] * int(singular.sum()))
        corner_beta.extend(beta[singular])
        travelled = travelled_by_conductor.get(ring.conductor_index, 0.0)
        lo, hi, owner = _ring_breaks(plan, settings)
        n_edges = len(edge_len)
        p = pts[:n_edges]
        d = (np.roll(pts, -1, axis=0)[:n_edges] - p)[owner]
        p = p[owner]
        length = edge_len[owner]
        starts.append(p + (lo / length)[:, None] * d)
        ends.append(p + (hi / length)[:, None] * d)
        m = len(owner)
        cond.append(np.full(m, ring.conductor_index))
        ring_idx.append(np.full(m, r))
        strip.append(np.full(m, not ring.closed))
        before = np.add.accumulate(np.r_[travelled, edge_len])  # in edge order, as a running sum
        arc.append(before[:-1][owner] + 0.5 * (lo + hi))
        arc_r.append(_signed_arc_radii(pts, ring.closed, ring.edge_arc_centres, ring.edge_arc_radii)[owner])
        arc_c.append(np.asarray(ring.edge_arc_centres, dtype=float).reshape(-1, 2)[owner])
        travelled_by_conductor[ring.conductor_index] = float(before[-1])

    return PanelMesh(
        starts=np.concatenate(starts),
        ends=np.concatenate(ends),
        conductor_index=np.concatenate(cond).astype(int),
        ring_index=np.concatenate(ring_idx).astype(int),
        is_strip=np.concatenate(strip).astype(bool),
        arc_length_m=np.concatenate(arc),
        corner_points=np.asarray(corners, dtype=float).reshape(-1, 2),
        corner_conductor=np.asarray(corner_cond, dtype=int),
        corner_opening_rad=np.asarray(corner_beta, dtype=float),
        arc_radius_m=np.concatenate(arc_r),
        arc_centre_m=np.concatenate(arc_c),
        settings=settings,
        model=model,
    )
