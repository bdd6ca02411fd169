"""Closed outlines read from drawings (DXF, SVG) and their conversion to model shapes.

An :class:`Outline` is a closed chain of straight and circular-arc segments, kept exactly:
vertex ``k`` starts a segment to vertex ``k + 1`` (the last closes to the first) with
``bulges[k]`` = tan(sweep / 4) (0 for a straight segment, positive counter-clockwise; the
drawing-exchange convention). :func:`shapes_from_outlines` nests the outlines of one part
(an outline inside another is a hole, one inside a hole is a new piece) and makes shapes:

- a circle stays a :class:`~solver.model.model.Circle`; a circle inside a concentric circle
  makes a :class:`~solver.model.model.Ring` — exact;
- an axis-aligned rectangle whose corners are all sharp, or all quarter-circle fillets of one
  radius, becomes a :class:`~solver.model.model.Rectangle` with that ``corner_radius`` — exact,
  so it meshes exactly as a hand-built rounded rectangle;
- anything else becomes a :class:`~solver.model.model.Polygon` whose arcs are sampled with
  one vertex every ``arc_step_rad`` (the solver's own arc step for the mesh density), the way
  the solver itself polygonises circles and fillets.
"""

from __future__ import annotations

import math
from dataclasses import dataclass

import numpy as np
from shapely.geometry import Polygon as ShapelyPolygon

from solver.errors import InvalidGeometryError
from solver.model.model import Circle, Polygon, Rectangle, Ring, Shape

#: Relative tolerance (of the outline's size) for "the same point", "axis-aligned", "concentric".
MATCH_TOLERANCE = 1e-9


@dataclass(frozen=True)
class Outline:
    """A closed outline: ``vertices`` (n, 2), ``bulges`` (n,), or a circle (``radius`` > 0).

    ``where`` names its source in messages (e.g. "DXF entity 2A on layer 'BARS'");
    ``kind_hint`` is the shape kind recorded when Edgewise wrote the drawing (or "") and
    ``hint_values`` the exact numbers it wrote for a rectangle (cx, cy, width, height, radius):
    used only while the outline still matches them, so a drawing edited in CAD reads as drawn.
    """

    vertices: np.ndarray
    bulges: np.ndarray
    where: str
    radius: float = 0.0
    kind_hint: str = ""
    hint_values: tuple[float, ...] = ()

    @property
    def is_circle(self) -> bool:
        return self.radius > 0

    def size(self) -> float:
        if self.is_circle:
            return 2 * self.radius
        return float(np.ptp(self.vertices, axis=0).max())

    def sampled(self, arc_step_rad: float) -> np.ndarray:
        """Vertices (m, 2) with every arc sampled at ``arc_step_rad`` (the first point not repeated)."""
        if self.is_circle:
            n = max(8, math.ceil(2 * math.pi / arc_step_rad - 1e-9))
            a = 2 * math.pi * np.arange(n) / n
            c = self.vertices[0]
            return np.column_stack([c[0] + self.radius * np.cos(a), c[1] + self.radius * np.sin(a)])
        points = []
        n = len(self.vertices)
        for k in range(n):
            p, q, b = self.vertices[k], self.vertices[(k + 1) % n], float(self.bulges[k])
            points.append(p)
            if b != 0.0:
                centre, radius, a0, sweep = arc_of_bulge(p, q, b)
                m = max(1, math.ceil(abs(sweep) / arc_step_rad - 1e-9))
                angles = np.linspace(a0, a0 + sweep, m + 1)[1:-1]
                points.extend(np.column_stack([centre[0] + radius * np.cos(angles),
                                               centre[1] + radius * np.sin(angles)]))
        return np.asarray(points, dtype=float)


def arc_of_bulge(p: np.ndarray, q: np.ndarray, bulge: float) -> tuple[np.ndarray, float, float, float]:
    """Centre, radius, start angle and signed sweep (rad) of the arc from p to q with ``bulge``."""
    p, q = np.asarray(p, float), np.asarray(q, float)
    chord = q - p
    centre = 0.5 * (p + q) + (1 - bulge * bulge) / (4 * bulge) * np.array([-chord[1], chord[0]])
    radius = float(np.hypot(*(p - centre)))
    a0 = math.atan2(p[1] - centre[1], p[0] - centre[0])
    return centre, radius, a0, 4 * math.atan(bulge)


def _rectangle(outline: Outline) -> Rectangle | None:
    """The Rectangle an outline is exactly, or None (see the module notes)."""
    if outline.is_circle or outline.kind_hint in ("polygon", "strip"):
        return None
    v, b = outline.vertices, outline.bulges
    tol = MATCH_TOLERANCE * outline.size()
    (x0, y0), (x1, y1) = v.min(axis=0), v.max(axis=0)
    arcs = np.flatnonzero(b != 0)
    if len(arcs) == 0:
        radius = 0.0
        if len(v) != 4:
            return None
    else:
        if len(arcs) != 4 or len(v) not in (4, 6, 8):
            return None
        geometry = [arc_of_bulge(v[k], v[(k + 1) % len(v)], b[k]) for k in arcs]
        # a quarter arc between axis-aligned sides spans its radius along x and along y
        radius = float(abs(v[(arcs[0] + 1) % len(v), 0] - v[arcs[0], 0]))
        if any(abs(abs(g[3]) - 0.5 * math.pi) > 1e-9 or abs(g[1] - radius) > tol for g in geometry):
            return None
        corners = {(round(float(np.sign(g[0][0] - 0.5 * (x0 + x1)))), round(float(np.sign(g[0][1] - 0.5 * (y0 + y1)))))
                   for g in geometry}
        inside = all(x0 < g[0][0] < x1 and y0 < g[0][1] < y1 for g in geometry)
        if len(corners) != 4 or not inside:  # fillets bulge outward, with their centres inside
            return None
    on_edge = (np.minimum(np.abs(v[:, 0] - x0), np.abs(v[:, 0] - x1)) <= tol) | (
        np.minimum(np.abs(v[:, 1] - y0), np.abs(v[:, 1] - y1)) <= tol)
    if not on_edge.all():
        return None
    n = len(v)
    for k in range(n):
        if b[k] == 0:
            d = v[(k + 1) % n] - v[k]
            if min(abs(d[0]), abs(d[1])) > tol:
                return None
    found = Rectangle((float(0.5 * (x0 + x1)), float(0.5 * (y0 + y1))), float(x1 - x0), float(y1 - y0), float(radius))
    if len(outline.hint_values) == 5:
        cx, cy, w, h, r = outline.hint_values
        drawn = (*found.center, found.width, found.height, found.corner_radius)
        if all(abs(a - b) <= tol for a, b in zip(drawn, outline.hint_values)):
            return Rectangle((cx, cy), w, h, r)
    return found


def _orient(points: np.ndarray) -> list[tuple[float, float]]:
    return [(float(x), float(y)) for x, y in points]


def shapes_from_outlines(outlines: list[Outline], arc_step_rad: float, owner: str) -> tuple[Shape, ...]:
    """Nest the closed outlines of one part and turn them into shapes (see the module notes).

    Raises InvalidGeometryError when outlines cross one another; the message names both.
    """
    if not outlines:
        return ()
    polys = [ShapelyPolygon(o.sampled(arc_step_rad)) for o in outlines]
    for o, poly in zip(outlines, polys):
        if not poly.is_valid or poly.area <= 0:
            raise InvalidGeometryError(f"{o.where} ({owner}): the outline crosses itself or has no area; redraw it.")
    order = sorted(range(len(outlines)), key=lambda i: -polys[i].area)
    parent: dict[int, int | None] = {}
    for pos, i in enumerate(order):
        parent[i] = None
        for j in reversed(order[:pos]):
            if polys[j].contains(polys[i]):
                parent[i] = j
                break
            if polys[j].intersects(polys[i]) and not polys[j].touches(polys[i]):
                raise InvalidGeometryError(
                    f"{outlines[i].where} and {outlines[j].where} ({owner}) cross each other; "
                    "separate them or merge them into one outline.")

    def depth(i: int) -> int:
        up = parent[i]
        return 0 if up is None else 1 + depth(up)

    shapes: list[Shape] = []
    for i in order:
        if depth(i) % 2:
            continue
        o = outlines[i]
        holes = [k for k in order if parent[k] == i]
        if o.is_circle and len(holes) == 1 and outlines[holes[0]].is_circle and np.allclose(
                outlines[holes[0]].vertices[0], o.vertices[0], rtol=0, atol=MATCH_TOLERANCE * o.size()):
            c = o.vertices[0]
            shapes.append(Ring((float(c[0]), float(c[1])), float(outlines[holes[0]].radius), float(o.radius)))
        elif o.is_circle and not holes:
            c = o.vertices[0]
            shapes.append(Circle((float(c[0]), float(c[1])), float(o.radius)))
        elif not holes and (rect := _rectangle(o)) is not None:
            shapes.append(rect)
        else:
            shapes.append(Polygon(tuple(_orient(o.sampled(arc_step_rad))),
                                  tuple(tuple(_orient(outlines[k].sampled(arc_step_rad))) for k in holes)))
    return tuple(shapes)
