"""Shapes to shapely geometry in metres: merging, validation and boundary rings.

Each conductor becomes one shapely geometry: its solid shapes merged with ``unary_union``
(a Polygon or MultiPolygon) and its zero-thickness strips as lines. Curved outlines
(circles, rings, rounded corners) are polygons with one vertex every ``arc_step_rad``, all
vertices on the true curve; the shapes' exact arcs travel beside them
(:func:`conductor_arcs`) and :func:`boundary_rings` marks each boundary edge that is a
piece of one of them, so later stages know the true circle without re-fitting it.

Bad input raises :class:`~solver.errors.InvalidGeometryError` naming the conductor, the
shape and the reason.
"""

from __future__ import annotations

import functools
from dataclasses import dataclass, field

import numpy as np
import shapely
from shapely.geometry import LineString, MultiLineString
from shapely.geometry import Polygon as ShapelyPolygon
from shapely.geometry.base import BaseGeometry
from shapely.ops import unary_union

from solver.errors import InvalidGeometryError
from solver.model.model import Model
from solver.model.outline_checks import check_extent
from solver.model.shapes import Arc, Shape


@dataclass(frozen=True)
class BoundaryRing:
    """One boundary curve of a conductor, in metres.

    ``points`` is (k, 2). A closed ring does not repeat its first point and runs with the
    conductor material on its left, so the outward normal (into the field) of the edge
    p -> q is the right-hand normal ``(dy, -dx) / |q - p|``. A strip is open (``closed`` is
    False); its "+" side is the right-hand side.

    ``edge_arc_centres`` (e, 2) and ``edge_arc_radii`` (e,) give, for each edge (from
    ``points[i]`` to the next point), the exact circle it is a chord of, or NaN for a
    straight edge.
    """

    conductor_index: int
    points: np.ndarray
    closed: bool
    edge_arc_centres: np.ndarray = field(default_factory=lambda: np.zeros((0, 2)))
    edge_arc_radii: np.ndarray = field(default_factory=lambda: np.zeros(0))


#: Conductors closer than this fraction of the drawing's size (to each other or to the ground
#: plane) touch: the graded mesh would need panels of about that size along the whole part
#: (over 10^7 of them), so the gap cannot be solved and is reported as contact.
TOUCHING_GAP_FRACTION = 1e-7


def _describe(owner: str, index: int, shape: Shape) -> str:
    return f"{owner}, shape {index + 1} ({shape.kind})"


def shape_geometry(shape: Shape, scale: float, arc_step_rad: float, where: str):
    """Shapely geometry of one shape in metres (``scale`` = metres per model unit).

    ``where`` names the shape in error messages, e.g. "Conductor 'bar', shape 2 (circle)".
    The shape builds it itself (:meth:`solver.model.shapes.Shape.geometry_m`); the result is
    kept by shape (shapes and shapely geometries are immutable), so the parts a drag leaves
    alone are not built again at every step.
    """
    try:
        return _kept_geometry(shape, scale, arc_step_rad, where)
    except TypeError:  # a shape that cannot be hashed: built, not kept
        return shape.geometry_m(scale, arc_step_rad, where)


@functools.lru_cache(maxsize=256)
def _kept_geometry(shape: Shape, scale: float, arc_step_rad: float, where: str):
    return shape.geometry_m(scale, arc_step_rad, where)


def conductor_arcs(model: Model) -> list[tuple[Arc, ...]]:
    """The exact arcs (metres) of every conductor's shapes, in model order."""
    scale = model.metres_per_unit
    return [tuple(a for s in c.shapes for a in s.arcs_m(scale)) for c in model.conductors]


def conductor_geometries(model: Model, arc_step_rad: float) -> list:
    """One merged shapely geometry (metres) per conductor, in model order, validated.

    Raises InvalidGeometryError when a shape is bad, when two conductors touch or overlap,
    or when a conductor reaches the ground plane.
    """
    scale = model.metres_per_unit
    merged = []
    for conductor in model.conductors:
        owner = f"Conductor '{conductor.name}'"
        solids: list[BaseGeometry] = []
        lines: list[BaseGeometry] = []
        for i, shape in enumerate(conductor.shapes):
            g = shape_geometry(shape, scale, arc_step_rad, _describe(owner, i, shape))
            check_extent(shapely.get_coordinates(g), _describe(owner, i, shape))
            (solids if shape.is_solid else lines).append(g)
        solid = unary_union(solids) if solids else None
        if lines:
            strip = unary_union(lines)
            if solid is not None:
                strip = strip.difference(solid)
            geom = strip if solid is None else unary_union([solid, strip])
        else:
            geom = solid
        merged.append(geom)

    boxes = np.array([g.bounds for g in merged])
    size = float(np.hypot(*(boxes[:, 2:].max(axis=0) - boxes[:, :2].min(axis=0))))
    touching = TOUCHING_GAP_FRACTION * size

    def point(p) -> str:
        def one(v: float) -> str:
            return "0" if abs(v) <= 1e-9 * size else f"{v / scale:.6g}"
        return f"({one(p.x)}, {one(p.y)}) {model.unit}"

    for i, gi in enumerate(merged):
        for j in range(i + 1, len(merged)):
            gj = merged[j]
            apart = max(boxes[j, 0] - boxes[i, 2], boxes[i, 0] - boxes[j, 2],
                        boxes[j, 1] - boxes[i, 3], boxes[i, 1] - boxes[j, 3])
            if apart > touching:
                continue
            overlap = gi.intersects(gj)
            if overlap or gi.distance(gj) <= touching:
                a, b = model.conductors[i].name, model.conductors[j].name
                where = (gi.intersection(gj).representative_point() if overlap
                         else shapely.shortest_line(gi, gj).interpolate(0.5, normalized=True))
                how = "touch or overlap" if overlap else (
                    f"touch (their gap, {gi.distance(gj) / scale:.3g} {model.unit}, is below "
                    f"{TOUCHING_GAP_FRACTION:g} of the drawing's size: no mesh can resolve it)")
                raise InvalidGeometryError(
                    f"Conductors '{a}' and '{b}' {how} near {point(where)}; "
                    "separate them, or make them one conductor with two shapes."
                )
    if model.ground_plane is not None:
        y_plane = model.ground_plane.y * scale
        for conductor, g in zip(model.conductors, merged):
            if g.bounds[1] <= y_plane:
                raise InvalidGeometryError(
                    f"Conductor '{conductor.name}' reaches down to y = {g.bounds[1] / scale:.6g} {model.unit}, "
                    f"at or below the ground plane (y = {model.ground_plane.y:.6g} {model.unit}); "
                    "move it above the plane."
                )
            if g.bounds[1] - y_plane <= touching:
                raise InvalidGeometryError(
                    f"Conductor '{conductor.name}' touches the ground plane: its gap to it, "
                    f"{(g.bounds[1] - y_plane) / scale:.3g} {model.unit}, is below {TOUCHING_GAP_FRACTION:g} of "
                    "the drawing's size (no mesh can resolve it); raise it above the plane."
                )
    return merged


def boundary_rings(conductor_index: int, geom, arcs: tuple[Arc, ...] = ()) -> list[BoundaryRing]:
    """Boundary rings of one merged conductor geometry, oriented as :class:`BoundaryRing` says.

    ``arcs`` are the conductor's exact arcs (:func:`conductor_arcs`); each edge that is a
    chord of one of them carries its centre and radius.
    """
    rings: list[BoundaryRing] = []
    polys = [g for g in getattr(geom, "geoms", [geom]) if isinstance(g, ShapelyPolygon)]
    lines = [g for g in getattr(geom, "geoms", [geom]) if isinstance(g, (LineString, MultiLineString))]
    for poly in polys:
        # Counter-clockwise exterior and clockwise holes keep the material on the left.
        poly = shapely.geometry.polygon.orient(poly, sign=1.0)
        for ring in [poly.exterior, *poly.interiors]:
            pts = _drop_collinear(np.asarray(ring.coords)[:-1])
            rings.append(BoundaryRing(conductor_index, pts, True, *edge_arcs(pts, True, arcs)))
    for line in lines:
        for part in getattr(line, "geoms", [line]):
            pts = np.asarray(part.coords)
            rings.append(BoundaryRing(conductor_index, pts, False, *edge_arcs(pts, False, arcs)))
    return rings


def edge_arcs(points: np.ndarray, closed: bool, arcs: tuple[Arc, ...]) -> tuple[np.ndarray, np.ndarray]:
    """Centre (e, 2) and radius (e,) of the known arc each edge of a vertex chain lies on (NaN if none)."""
    p = np.asarray(points, dtype=float)
    q = np.roll(p, -1, axis=0) if closed else p[1:]
    p = p[: len(q)]
    centres = np.full((len(p), 2), np.nan)
    radii = np.full(len(p), np.nan)
    for arc in arcs:
        hit = arc.holds_edges(p, q) & np.isnan(radii)
        centres[hit] = arc.centre
        radii[hit] = arc.radius
    return centres, radii


def _drop_collinear(pts: np.ndarray) -> np.ndarray:
    """Remove vertices where the outline runs straight on (they would split a graded edge)."""
    prev = np.roll(pts, 1, axis=0)
    nxt = np.roll(pts, -1, axis=0)
    a, b = pts - prev, nxt - pts
    cross = a[:, 0] * b[:, 1] - a[:, 1] * b[:, 0]
    dot = np.einsum("ij,ij->i", a, b)
    keep = ~((np.abs(cross) <= 1e-12 * np.hypot(*a.T) * np.hypot(*b.T)) & (dot > 0))
    return pts[keep] if keep.sum() >= 3 else pts
