"""Plain geometry of model shapes in model units, for drawing and picking (Qt-free).

Handles are the draggable points of a shape: rectangle corners, the radius point of a circle,
the two radius points of a ring, the vertices of a polygon or strip.
"""

from __future__ import annotations

import math

import numpy as np
import shapely
from shapely.geometry import LineString, Point
from shapely.geometry import Polygon as ShapelyPolygon

from solver import Circle, Polygon, Rectangle, Ring, Shape, Strip

XY = tuple[float, float]


def translated(shape: Shape, dx: float, dy: float) -> Shape:
    """A copy of ``shape`` moved by (dx, dy)."""
    def f(p: XY) -> XY:
        return (float(p[0] + dx), float(p[1] + dy))

    if isinstance(shape, Circle):
        return Circle(f(shape.center), shape.radius)
    if isinstance(shape, Ring):
        return Ring(f(shape.center), shape.inner_radius, shape.outer_radius)
    if isinstance(shape, Rectangle):
        return Rectangle(f(shape.center), shape.width, shape.height, shape.corner_radius)
    if isinstance(shape, Polygon):
        return Polygon(tuple(map(f, shape.exterior)), tuple(tuple(map(f, h)) for h in shape.holes))
    return Strip(tuple(map(f, shape.points)))


def outline(shape: Shape, n_arc: int = 64) -> np.ndarray:
    """(k, 2) outline points of the shape (closed shapes not repeated; strips open)."""
    if isinstance(shape, (Circle, Ring)):
        r = shape.radius if isinstance(shape, Circle) else shape.outer_radius
        t = np.linspace(0, 2 * math.pi, n_arc, endpoint=False)
        return np.column_stack([shape.center[0] + r * np.cos(t), shape.center[1] + r * np.sin(t)])
    if isinstance(shape, Rectangle):
        return np.asarray(_rect_geometry(shape).exterior.coords)[:-1]
    if isinstance(shape, Polygon):
        return np.asarray(shape.exterior, float)
    return np.asarray(shape.points, float)


def _rect_geometry(shape: Rectangle):
    cx, cy = shape.center
    box = shapely.box(cx - shape.width / 2, cy - shape.height / 2, cx + shape.width / 2, cy + shape.height / 2)
    r = min(shape.corner_radius, 0.5 * min(shape.width, shape.height))
    if r > 0:
        box = box.buffer(-r).buffer(r, quad_segs=8)
    return box


def geometry(shape: Shape):
    """A shapely geometry of the shape in model units (lines for strips)."""
    if isinstance(shape, Circle):
        return Point(shape.center).buffer(shape.radius, quad_segs=16)
    if isinstance(shape, Ring):
        c = Point(shape.center)
        return c.buffer(shape.outer_radius, quad_segs=16).difference(c.buffer(shape.inner_radius, quad_segs=16))
    if isinstance(shape, Rectangle):
        return _rect_geometry(shape)
    if isinstance(shape, Polygon):
        return ShapelyPolygon(shape.exterior, shape.holes).buffer(0)
    return LineString(shape.points)


def bounds(shape: Shape) -> tuple[float, float, float, float]:
    """(xmin, ymin, xmax, ymax) of the shape."""
    return tuple(float(v) for v in geometry(shape).bounds)


def distance(shape: Shape, x: float, y: float) -> float:
    """Distance from (x, y) to the shape (0 inside a solid shape)."""
    return float(geometry(shape).distance(Point(x, y)))


def handles(shape: Shape) -> list[XY]:
    """Draggable points of the shape, in model units."""
    if isinstance(shape, Circle):
        return [(shape.center[0] + shape.radius, shape.center[1])]
    if isinstance(shape, Ring):
        cx, cy = shape.center
        return [(cx + shape.outer_radius, cy), (cx - shape.inner_radius, cy)]
    if isinstance(shape, Rectangle):
        cx, cy = shape.center
        hw, hh = shape.width / 2, shape.height / 2
        return [(cx - hw, cy - hh), (cx + hw, cy - hh), (cx + hw, cy + hh), (cx - hw, cy + hh)]
    if isinstance(shape, Polygon):
        return [tuple(map(float, p)) for p in shape.exterior]
    return [tuple(map(float, p)) for p in shape.points]


def with_handle_moved(shape: Shape, index: int, x: float, y: float) -> Shape:
    """A copy of ``shape`` with handle ``index`` dragged to (x, y)."""
    if isinstance(shape, Circle):
        return Circle(shape.center, max(math.dist(shape.center, (x, y)), 1e-9))
    if isinstance(shape, Ring):
        r = max(math.dist(shape.center, (x, y)), 1e-9)
        if index == 0:
            return Ring(shape.center, shape.inner_radius, r)
        return Ring(shape.center, r, shape.outer_radius)
    if isinstance(shape, Rectangle):
        corners = handles(shape)
        ox, oy = corners[(index + 2) % 4]  # the opposite corner stays put
        w, h = abs(x - ox), abs(y - oy)
        r = min(shape.corner_radius, 0.5 * min(w, h))
        return Rectangle(((x + ox) / 2, (y + oy) / 2), w, h, r)
    if isinstance(shape, Polygon):
        pts = list(shape.exterior)
        pts[index] = (x, y)
        return Polygon(tuple(pts), shape.holes)
    pts = list(shape.points)
    pts[index] = (x, y)
    return Strip(tuple(pts))


def with_vertex_inserted(shape: Shape, x: float, y: float) -> Shape:
    """A polygon or strip with a new vertex at (x, y) on its nearest edge."""
    closed = isinstance(shape, Polygon)
    pts = np.asarray(shape.exterior if closed else shape.points, float)
    a = pts
    b = np.roll(pts, -1, axis=0) if closed else pts[1:]
    a = a[: len(b)]
    ab = b - a
    t = np.clip(np.einsum("ij,ij->i", np.array([x, y]) - a, ab) / np.einsum("ij,ij->i", ab, ab), 0.0, 1.0)
    d = np.hypot(*(a + t[:, None] * ab - np.array([x, y])).T)
    i = int(np.argmin(d)) + 1
    new = [tuple(map(float, p)) for p in pts]
    new.insert(i, (float(x), float(y)))
    return Polygon(tuple(new), shape.holes) if closed else Strip(tuple(new))


def with_vertex_removed(shape: Shape, index: int) -> Shape:
    """A polygon (kept at 3 vertices or more) or strip (2 or more) without vertex ``index``."""
    closed = isinstance(shape, Polygon)
    pts = list(shape.exterior if closed else shape.points)
    if len(pts) <= (3 if closed else 2):
        return shape
    del pts[index]
    return Polygon(tuple(pts), shape.holes) if closed else Strip(tuple(pts))


def rectangle_from_corners(a: XY, b: XY) -> Rectangle:
    """The axis-aligned rectangle spanned by two opposite corners."""
    return Rectangle(((a[0] + b[0]) / 2, (a[1] + b[1]) / 2), abs(b[0] - a[0]), abs(b[1] - a[1]))


def circle_from_drag(center: XY, edge: XY) -> Circle:
    """The circle centred on ``center`` through ``edge``."""
    return Circle(center, math.dist(center, edge))


def describe(shape: Shape, unit: str) -> str:
    """A short label, e.g. "rectangle 10 x 5 mm"."""
    if isinstance(shape, Circle):
        return f"circle r = {shape.radius:g} {unit}"
    if isinstance(shape, Ring):
        return f"tube {shape.inner_radius:g}/{shape.outer_radius:g} {unit}"
    if isinstance(shape, Rectangle):
        return f"rectangle {shape.width:g} x {shape.height:g} {unit}"
    if isinstance(shape, Polygon):
        return f"polygon, {len(shape.exterior)} vertices"
    return f"strip, {len(shape.points)} points"


def model_bounds(model) -> tuple[float, float, float, float] | None:
    """(xmin, ymin, xmax, ymax) of every conductor and dielectric shape; None if empty."""
    boxes = [bounds(s) for part in (*model.conductors, *model.dielectrics) for s in part.shapes]
    if not boxes:
        return None
    b = np.asarray(boxes)
    return float(b[:, 0].min()), float(b[:, 1].min()), float(b[:, 2].max()), float(b[:, 3].max())


def largest_dimension(model) -> float:
    """Largest extent of the cross-section (conductors, and down to a ground plane), model units."""
    box = model_bounds(model)
    if box is None:
        return 0.0
    x0, y0, x1, y1 = box
    if model.ground_plane is not None:
        y0 = min(y0, model.ground_plane.y)
    return max(x1 - x0, y1 - y0)
