"""Shapes to shapely geometry in metres: merging, validation and boundary rings.

Each conductor becomes one shapely geometry: its solid shapes merged with ``unary_union``
(a Polygon or MultiPolygon) and its zero-thickness strips as lines. Curved outlines
(circles, rings, rounded corners) are polygons with one vertex every ``arc_step_rad``.

Bad input raises :class:`~solver.errors.InvalidGeometryError` naming the conductor, the
shape and the reason.
"""

from __future__ import annotations

import math
from dataclasses import dataclass

import numpy as np
import shapely
from shapely.geometry import LineString, MultiLineString
from shapely.geometry import Polygon as ShapelyPolygon
from shapely.ops import unary_union

from solver.errors import InvalidGeometryError
from solver.model.model import Circle, Model, Polygon, Rectangle, Ring, Shape, Strip
from solver.model.outline_checks import check_extent, cleaned_outline


@dataclass(frozen=True)
class BoundaryRing:
    """One boundary curve of a conductor, in metres.

    ``points`` is (k, 2). A closed ring does not repeat its first point and runs with the
    conductor material on its left, so the outward normal (into the field) of the edge
    p -> q is the right-hand normal ``(dy, -dx) / |q - p|``. A strip is open (``closed`` is
    False); its "+" side is the right-hand side.
    """

    conductor_index: int
    points: np.ndarray
    closed: bool


def _arc(center: tuple[float, float], radius: float, a0: float, a1: float, step: float) -> list:
    n = max(1, math.ceil(abs(a1 - a0) / step - 1e-9))
    angles = np.linspace(a0, a1, n + 1)
    return list(zip(center[0] + radius * np.cos(angles), center[1] + radius * np.sin(angles)))


def _circle_points(center: tuple[float, float], radius: float, step: float) -> list:
    n = max(8, math.ceil(2 * math.pi / step - 1e-9))
    angles = 2 * math.pi * np.arange(n) / n
    return list(zip(center[0] + radius * np.cos(angles), center[1] + radius * np.sin(angles)))


def _describe(owner: str, index: int, shape: Shape) -> str:
    return f"{owner}, shape {index + 1} ({shape.kind})"


def shape_geometry(shape: Shape, scale: float, arc_step_rad: float, where: str):
    """Shapely geometry of one shape in metres (``scale`` = metres per model unit).

    ``where`` names the shape in error messages, e.g. "Conductor 'bar', shape 2 (circle)".
    """
    if isinstance(shape, Circle):
        if not shape.radius > 0:
            raise InvalidGeometryError(f"{where}: radius is {shape.radius}; it must be greater than 0.")
        cx, cy = shape.center
        return ShapelyPolygon(_circle_points((cx * scale, cy * scale), shape.radius * scale, arc_step_rad))
    if isinstance(shape, Ring):
        if not (0 < shape.inner_radius < shape.outer_radius):
            raise InvalidGeometryError(
                f"{where}: inner radius {shape.inner_radius} and outer radius {shape.outer_radius}; "
                "need 0 < inner radius < outer radius."
            )
        c = (shape.center[0] * scale, shape.center[1] * scale)
        outer = _circle_points(c, shape.outer_radius * scale, arc_step_rad)
        inner = _circle_points(c, shape.inner_radius * scale, arc_step_rad)
        return ShapelyPolygon(outer, [inner[::-1]])
    if isinstance(shape, Rectangle):
        w, h, r = shape.width, shape.height, shape.corner_radius
        if not (w > 0 and h > 0):
            raise InvalidGeometryError(f"{where}: width {w} and height {h}; both must be greater than 0.")
        if r < 0 or r > 0.5 * min(w, h) + 1e-12 * max(w, h):
            raise InvalidGeometryError(
                f"{where}: corner radius {r} must lie between 0 and half the smaller side ({0.5 * min(w, h)})."
            )
        r = min(r, 0.5 * min(w, h))
        cx, cy = shape.center[0] * scale, shape.center[1] * scale
        hw, hh, rr = 0.5 * w * scale, 0.5 * h * scale, r * scale
        if rr <= 0:
            pts = [(cx - hw, cy - hh), (cx + hw, cy - hh), (cx + hw, cy + hh), (cx - hw, cy + hh)]
        else:
            pts = []
            corners = [
                ((cx + hw - rr, cy - hh + rr), -0.5 * math.pi),
                ((cx + hw - rr, cy + hh - rr), 0.0),
                ((cx - hw + rr, cy + hh - rr), 0.5 * math.pi),
                ((cx - hw + rr, cy - hh + rr), math.pi),
            ]
            for centre, a0 in corners:
                pts.extend(_arc(centre, rr, a0, a0 + 0.5 * math.pi, arc_step_rad))
            # drop repeated points where a full-side fillet makes arcs meet
            cleaned = [pts[0]]
            for p in pts[1:]:
                if math.dist(p, cleaned[-1]) > 1e-12 * max(hw, hh):
                    cleaned.append(p)
            pts = cleaned
        return ShapelyPolygon(pts)
    shape = cleaned_outline(shape, where)
    if isinstance(shape, Polygon):
        if len(shape.exterior) < 3:
            raise InvalidGeometryError(f"{where}: a polygon needs at least 3 vertices, got {len(shape.exterior)}.")
        poly = ShapelyPolygon(
            [(x * scale, y * scale) for x, y in shape.exterior],
            [[(x * scale, y * scale) for x, y in hole] for hole in shape.holes],
        )
        if not poly.is_valid:
            reason = shapely.is_valid_reason(poly)
            raise InvalidGeometryError(
                f"{where} is invalid: {_reason_in_model_units(reason, scale)}; "
                "redraw the outline so it does not cross or touch itself."
            )
        if poly.area <= 0:
            raise InvalidGeometryError(f"{where} has zero area; its vertices lie on one line.")
        return poly
    if isinstance(shape, Strip):
        if len(shape.points) < 2:
            raise InvalidGeometryError(f"{where}: a strip needs at least 2 points, got {len(shape.points)}.")
        line = LineString([(x * scale, y * scale) for x, y in shape.points])
        if not line.length > 0:
            raise InvalidGeometryError(f"{where} has zero length; move its end points apart.")
        if not line.is_simple:
            raise InvalidGeometryError(f"{where} crosses itself; redraw the strip so it does not.")
        return line
    raise InvalidGeometryError(f"{where}: unknown shape type {type(shape).__name__}.")


def _reason_in_model_units(reason: str, scale: float) -> str:
    """Rewrite shapely's "Self-intersection[x y]" (metres) into model units."""
    if "[" not in reason:
        return reason
    head, _, rest = reason.partition("[")
    try:
        x, y = (float(v) / scale for v in rest.rstrip("]").split())
    except ValueError:
        return reason
    return f"{head} at ({x:.6g}, {y:.6g})"


def conductor_geometries(model: Model, arc_step_rad: float) -> list:
    """One merged shapely geometry (metres) per conductor, in model order, validated.

    Raises InvalidGeometryError when a shape is bad, when two conductors touch or overlap,
    or when a conductor reaches the ground plane.
    """
    scale = model.metres_per_unit
    merged = []
    for conductor in model.conductors:
        owner = f"Conductor '{conductor.name}'"
        solids, lines = [], []
        for i, shape in enumerate(conductor.shapes):
            g = shape_geometry(shape, scale, arc_step_rad, _describe(owner, i, shape))
            check_extent(shapely.get_coordinates(g), _describe(owner, i, shape))
            (lines if isinstance(g, LineString) else solids).append(g)
        solid = unary_union(solids) if solids else None
        if lines:
            strip = unary_union(lines)
            if solid is not None:
                strip = strip.difference(solid)
            geom = strip if solid is None else unary_union([solid, strip])
        else:
            geom = solid
        merged.append(geom)

    for i, gi in enumerate(merged):
        for j in range(i + 1, len(merged)):
            if gi.intersects(merged[j]):
                a, b = model.conductors[i].name, model.conductors[j].name
                where = gi.intersection(merged[j]).representative_point()
                raise InvalidGeometryError(
                    f"Conductors '{a}' and '{b}' touch or overlap near "
                    f"({where.x / scale:.6g}, {where.y / scale:.6g}) {model.unit}; "
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
    return merged


def boundary_rings(conductor_index: int, geom) -> list[BoundaryRing]:
    """Boundary rings of one merged conductor geometry, oriented as :class:`BoundaryRing` says."""
    rings: list[BoundaryRing] = []
    polys = [g for g in getattr(geom, "geoms", [geom]) if isinstance(g, ShapelyPolygon)]
    lines = [g for g in getattr(geom, "geoms", [geom]) if isinstance(g, (LineString, MultiLineString))]
    for poly in polys:
        # Counter-clockwise exterior and clockwise holes keep the material on the left.
        poly = shapely.geometry.polygon.orient(poly, sign=1.0)
        for ring in [poly.exterior, *poly.interiors]:
            pts = np.asarray(ring.coords)[:-1]
            rings.append(BoundaryRing(conductor_index, _drop_collinear(pts), True))
    for line in lines:
        for part in getattr(line, "geoms", [line]):
            rings.append(BoundaryRing(conductor_index, np.asarray(part.coords), False))
    return rings


def _drop_collinear(pts: np.ndarray) -> np.ndarray:
    """Remove vertices where the outline runs straight on (they would split a graded edge)."""
    prev = np.roll(pts, 1, axis=0)
    nxt = np.roll(pts, -1, axis=0)
    a, b = pts - prev, nxt - pts
    cross = a[:, 0] * b[:, 1] - a[:, 1] * b[:, 0]
    dot = np.einsum("ij,ij->i", a, b)
    keep = ~((np.abs(cross) <= 1e-12 * np.hypot(*a.T) * np.hypot(*b.T)) & (dot > 0))
    return pts[keep] if keep.sum() >= 3 else pts
