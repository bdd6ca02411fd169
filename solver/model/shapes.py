"""Shape kinds, each owning its behaviour: geometry, arcs, corners, file form, outline, edits.

A shape is a frozen value in the model's length unit. Every kind is one class here and
answers for itself (no other module asks "which kind is this?"):

* :meth:`Shape.geometry_m` - shapely geometry in metres (curves polygonised with a given
  angular step; bad input raises :class:`~solver.errors.InvalidGeometryError`), and
  :meth:`Shape.problem` - the same check as a message, for views that show invalid shapes;
* :meth:`Shape.meshing_hints` - the exact circular arcs of the outline (centre, radius,
  angles) and the sharp corners and free edges with the field's opening angle there;
* :meth:`Shape.round_radius_at` - the radius of a round conductor seen at a point (Peek's
  corona onset needs it);
* :meth:`Shape.to_dict` / :meth:`Shape.from_dict` - the project-file form;
* :meth:`Shape.outline` - polylines for drawing; :meth:`Shape.handles` and the ``with_...``
  copies for editing; :meth:`Shape.translated` / :meth:`Shape.scaled`; :meth:`Shape.describe`.

A new kind is one new subclass with a unique ``kind``; it registers itself in
:data:`SHAPE_KINDS`, the table the project file reads shapes through.
"""

from __future__ import annotations

import math
from collections.abc import Callable
from dataclasses import dataclass, field, replace
from typing import Any, ClassVar, Protocol

import numpy as np
import shapely
from shapely.geometry import LineString
from shapely.geometry import Polygon as ShapelyPolygon

from solver.errors import InvalidGeometryError, InvalidModelError
from solver.model.outline_checks import check_holes, cleaned_polyline, cleaned_ring

Point = tuple[float, float]

#: Angle between outline vertices of curves drawn for the screen (radians).
DRAWING_ARC_STEP_RAD = 2 * math.pi / 128

#: Every shape kind by its ``kind`` name (filled in as the classes are defined).
SHAPE_KINDS: dict[str, type[Shape]] = {}


@dataclass(frozen=True)
class Arc:
    """An exact circular arc of an outline, metres: ``centre``, ``radius``, from angle
    ``start_rad`` sweeping ``sweep_rad`` (signed, counter-clockwise positive; 2 pi = full circle)."""

    centre: Point
    radius: float
    start_rad: float
    sweep_rad: float

    def holds_edges(self, p: np.ndarray, q: np.ndarray, max_step_rad: float = 0.25) -> np.ndarray:
        """(k,) True where the chord p -> q ((k, 2) each) has both ends on this arc and spans
        at most ``max_step_rad`` of it (a polygonised piece of this arc)."""
        c = np.asarray(self.centre, dtype=float)
        tol = 1e-7 * self.radius
        on_circle = (np.abs(np.hypot(*(p - c).T) - self.radius) <= tol) & (
            np.abs(np.hypot(*(q - c).T) - self.radius) <= tol)
        a, b = p - c, q - c
        step = np.abs(np.arctan2(a[:, 0] * b[:, 1] - a[:, 1] * b[:, 0], np.einsum("ij,ij->i", a, b)))
        short = step <= max_step_rad
        if abs(self.sweep_rad) >= 2 * math.pi - 1e-12:
            return on_circle & short
        m = 0.5 * (a + b)
        lo = self.start_rad if self.sweep_rad > 0 else self.start_rad + self.sweep_rad
        offset = np.mod(np.arctan2(m[:, 1], m[:, 0]) - lo, 2 * math.pi)
        return on_circle & short & (offset <= abs(self.sweep_rad) + 1e-9)


@dataclass(frozen=True)
class MeshingHints:
    """What the mesher should know of one shape, metres.

    ``arcs`` are the exact arcs of the outline; ``corner_points`` (k, 2) the sharp corners and
    free edges where the surface charge density is singular, and ``corner_opening_rad`` (k,)
    the opening angle of the field region there (3 pi / 2 at a right-angle corner, 2 pi at
    the free edge of a strip).
    """

    arcs: tuple[Arc, ...] = ()
    corner_points: np.ndarray = field(default_factory=lambda: np.zeros((0, 2)))
    corner_opening_rad: np.ndarray = field(default_factory=lambda: np.zeros(0))


class FieldReader(Protocol):
    """Reads checked fields of one shape's dictionary (see :class:`PlainFieldReader`)."""

    def number(self, key: str, *, positive: bool = False, minimum: float | None = None) -> float: ...
    def point(self, key: str) -> Point: ...
    def points(self, key: str, min_items: int) -> tuple[Point, ...]: ...
    def point_lists(self, key: str, min_items: int) -> tuple[tuple[Point, ...], ...]: ...
    def problem(self, key: str, reason: str) -> Exception: ...


class PlainFieldReader:
    """A :class:`FieldReader` over a plain dictionary; bad values raise InvalidModelError."""

    def __init__(self, data: dict, where: str = "Shape") -> None:
        self.data, self.where = data, where

    def _get(self, key: str, default: Any = None) -> Any:
        if key not in self.data and default is None:
            raise self.problem(key, "is missing")
        return self.data.get(key, default)

    def number(self, key: str, *, positive: bool = False, minimum: float | None = None) -> float:
        value = self._get(key, 0.0 if minimum is not None else None)
        try:
            x = float(value)
        except (TypeError, ValueError):
            raise self.problem(key, f"is {value!r}; give a number") from None
        if not math.isfinite(x) or (positive and not x > 0) or (minimum is not None and x < minimum):
            bound = "greater than 0" if positive else f"at least {minimum:g}" if minimum is not None else "finite"
            raise self.problem(key, f"is {x:g}; it must be {bound}")
        return x

    def point(self, key: str) -> Point:
        value = self._get(key)
        return (float(value[0]), float(value[1]))

    def points(self, key: str, min_items: int) -> tuple[Point, ...]:
        pts = tuple((float(x), float(y)) for x, y in self._get(key, []))
        if len(pts) < min_items:
            raise self.problem(key, f"has {len(pts)} points; it needs at least {min_items}")
        return pts

    def point_lists(self, key: str, min_items: int) -> tuple[tuple[Point, ...], ...]:
        return tuple(tuple((float(x), float(y)) for x, y in ring) for ring in self._get(key, []))

    def problem(self, key: str, reason: str) -> Exception:
        return InvalidModelError(f"{self.where}: {key.replace('_', ' ')} {reason}.")


def _pt(p) -> list[float]:
    return [float(p[0]), float(p[1])]


def _circle_points(center: Point, radius: float, step: float) -> np.ndarray:
    n = max(8, math.ceil(2 * math.pi / step - 1e-9))
    angles = 2 * math.pi * np.arange(n) / n
    return np.column_stack([center[0] + radius * np.cos(angles), center[1] + radius * np.sin(angles)])


def _arc_points(center: Point, radius: float, a0: float, a1: float, step: float) -> list:
    n = max(1, math.ceil(abs(a1 - a0) / step - 1e-9))
    angles = np.linspace(a0, a1, n + 1)
    return list(zip(center[0] + radius * np.cos(angles), center[1] + radius * np.sin(angles)))


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


def _vertex_corners(pts: np.ndarray, closed: bool, hole: bool = False) -> tuple[np.ndarray, np.ndarray]:
    """Sharp corners of a vertex chain (metres) and the field's opening angle at each.

    A closed chain is the outline of a solid, run with the material on its left (exterior
    counter-clockwise, a ``hole`` clockwise): the field opens by pi plus the turn, and the
    corners opening wider than pi are kept. An open chain is a strip (field on both sides):
    its ends open by 2 pi, its bends by pi plus the turn.
    """
    if closed:
        if shapely.is_ccw(shapely.linearrings(pts)) == hole:
            pts = pts[::-1]
        a = pts - np.roll(pts, 1, axis=0)
        b = np.roll(pts, -1, axis=0) - pts
        turn = np.arctan2(a[:, 0] * b[:, 1] - a[:, 1] * b[:, 0], np.einsum("ij,ij->i", a, b))
        beta = math.pi + turn
        sharp = beta > math.pi + 1e-9
        return pts[sharp], beta[sharp]
    a, b = pts[1:-1] - pts[:-2], pts[2:] - pts[1:-1]
    turn = np.abs(np.arctan2(a[:, 0] * b[:, 1] - a[:, 1] * b[:, 0], np.einsum("ij,ij->i", a, b)))
    bends = turn > 1e-9
    points = np.vstack([pts[[0]], pts[1:-1][bends], pts[[-1]]])
    return points, np.concatenate([[2 * math.pi], math.pi + turn[bends], [2 * math.pi]])


class Shape:
    """Base of every shape kind: the behaviour each kind provides (see the module docstring).

    Subclasses are frozen dataclasses in model units with a class attribute ``kind`` (the
    project-file name) and ``required_fields`` / ``optional_fields`` (the dictionary keys).
    """

    kind: ClassVar[str] = ""
    required_fields: ClassVar[frozenset[str]] = frozenset()
    optional_fields: ClassVar[frozenset[str]] = frozenset()
    #: True for shapes with an area; False for a zero-thickness strip.
    is_solid: ClassVar[bool] = True
    #: True when the outline has no corner at all (nothing to round).
    is_smooth: ClassVar[bool] = False
    #: True when vertices can be added and removed one by one.
    has_vertices: ClassVar[bool] = False

    def __init_subclass__(cls, **kwargs: Any) -> None:
        super().__init_subclass__(**kwargs)
        if cls.kind:
            SHAPE_KINDS[cls.kind] = cls

    # ---- geometry ------------------------------------------------------------------------
    def check(self, where: str) -> None:
        """Raise InvalidGeometryError naming ``where`` when the numbers make no shape."""

    def _build(self, scale: float, arc_step_rad: float):
        raise NotImplementedError

    def geometry_m(self, scale: float, arc_step_rad: float, where: str | None = None):
        """Shapely geometry in metres (``scale`` = metres per model unit).

        Curves are polygons with one vertex every ``arc_step_rad`` (vertices on the true
        curve); a strip is a LineString. ``where`` names the shape in error messages, e.g.
        "Conductor 'bar', shape 2 (circle)".

        Raises
        ------
        InvalidGeometryError
            When the shape is not valid (the message names ``where``, the field and a way out).
        """
        where = where or f"The {self.kind}"
        shape = self.cleaned(where)
        shape.check(where)
        geom = shape._build(scale, arc_step_rad)
        shape._check_built(geom, scale, where)
        return geom

    def cleaned(self, where: str) -> Shape:
        """This shape with repeated and collinear vertices dropped (see
        :mod:`solver.model.outline_checks`); curves and rectangles come back as they are.

        Raises InvalidGeometryError naming ``where`` and the vertex when too few are left.
        """
        return self

    def _check_built(self, geom, scale: float, where: str) -> None:
        """Checks that need the built geometry (self-intersection, zero area or length)."""

    def problem(self, where: str | None = None) -> str | None:
        """Why this shape is invalid, in the solver's words, or None when it is valid."""
        try:
            self.geometry_m(1.0, DRAWING_ARC_STEP_RAD, where)
        except InvalidGeometryError as e:
            return str(e)
        return None

    def meshing_hints(self, scale: float) -> MeshingHints:
        """Exact arcs and sharp corners of the outline, metres (``scale`` metres per unit)."""
        return MeshingHints(self.arcs_m(scale))

    def arcs_m(self, scale: float) -> tuple[Arc, ...]:
        """The exact circular arcs of the outline, metres."""
        return ()

    def round_radius_at(self, point: Point | None = None) -> float | None:
        """Radius (model units) of the round conductor this shape is, seen at ``point``
        (model units; None = its outer surface), or None when it is not round there."""
        return None

    def disc(self) -> tuple[Point, float] | None:
        """(centre, radius) when the shape is a full round disc, else None."""
        return None

    def rectangle_size(self) -> tuple[float, float, float] | None:
        """(width, height, corner radius) when the shape is an axis-aligned rectangle, else None."""
        return None

    def widened(self, factor: float) -> Shape:
        """A copy ``factor`` times wider about its centre (only for :meth:`rectangle_size` shapes)."""
        raise InvalidModelError(f"A {self.kind} cannot be widened as a layer.")

    def exactly_rounded(self, radius: float, replace_radius: bool = False) -> Shape | None:
        """A copy with every convex corner rounded to ``radius`` (model units) where the kind
        can do it exactly, itself when it has no corner, or None (round it as geometry)."""
        return self if self.is_smooth else None

    # ---- drawing and editing -------------------------------------------------------------
    def _raw_outline(self) -> tuple[np.ndarray, ...]:
        """The drawn vertex chains of an invalid shape (nothing for a shape with no extent)."""
        return ()

    def outline(self, arc_step_rad: float = DRAWING_ARC_STEP_RAD) -> tuple[np.ndarray, ...]:
        """Polylines (k, 2) in model units for drawing, from the solver's geometry.

        Closed outlines (exterior first, then holes) do not repeat their first point; a strip
        gives its open polyline. An invalid shape gives the vertices as drawn, never repaired.
        """
        try:
            geom = self.geometry_m(1.0, arc_step_rad)
        except InvalidGeometryError:
            return self._raw_outline()
        if not self.is_solid:
            return (np.asarray(geom.coords),)
        return tuple(np.asarray(r.coords)[:-1] for r in (geom.exterior, *geom.interiors))

    def bounds(self) -> tuple[float, float, float, float]:
        """(xmin, ymin, xmax, ymax) of the outline, model units; NaN when it has no extent."""
        rings = self.outline()
        if not rings:
            return (math.nan,) * 4
        pts = np.vstack(rings)
        return (float(pts[:, 0].min()), float(pts[:, 1].min()), float(pts[:, 0].max()), float(pts[:, 1].max()))

    def distance_to(self, x: float, y: float) -> float:
        """Distance (model units) from (x, y) to the shape (0 inside a valid solid shape)."""
        try:
            return float(self.geometry_m(1.0, DRAWING_ARC_STEP_RAD).distance(shapely.Point(x, y)))
        except InvalidGeometryError:
            rings = [r for r in self._raw_outline() if len(r) >= 2]
            if not rings:
                return math.inf
            closed = self.is_solid
            return min(float(LineString(np.vstack([r, r[:1]]) if closed else r).distance(shapely.Point(x, y)))
                       for r in rings)

    def handles(self) -> list[Point]:
        """Draggable points of the shape, model units."""
        raise NotImplementedError

    def with_handle_moved(self, index: int, x: float, y: float) -> Shape:
        """A copy with handle ``index`` dragged to (x, y)."""
        raise NotImplementedError

    def with_vertex_inserted(self, x: float, y: float) -> Shape:
        """A copy with a vertex at (x, y) on the nearest edge (itself if it has no vertices)."""
        return self

    def with_vertex_removed(self, index: int) -> Shape:
        """A copy without vertex ``index`` (itself when too few would be left)."""
        return self

    def _mapped(self, f) -> Shape:
        raise NotImplementedError

    def translated(self, dx: float, dy: float) -> Shape:
        """A copy moved by (dx, dy) model units."""
        return self._mapped(lambda p: (float(p[0] + dx), float(p[1] + dy)))

    def scaled(self, factor: float) -> Shape:
        """A copy with every coordinate and length multiplied by ``factor`` (about the origin)."""
        return self._mapped(lambda p: (float(p[0] * factor), float(p[1] * factor)))

    def exact_capacity(self) -> float | None:
        """Logarithmic capacity (equivalent radius) of this shape alone, model units, where a
        closed form is known; None otherwise (the solver then computes it)."""
        return None

    def cad_entities(self, msp, attribs: dict) -> tuple[list, list]:
        """Add this shape to a DXF model space ``msp`` (an ezdxf ``Modelspace``) on the layer in
        ``attribs``; returns the entities made and extra exact numbers to keep with them (as DXF
        extended-data pairs), so that a drawing written by Edgewise reads back exactly."""
        raise NotImplementedError(f"{self.kind} has no CAD form")

    def describe(self, unit: str, number: Callable[[float], str] = "{:g}".format) -> str:
        """A one-line description, e.g. "rectangle 10 x 5 mm"; ``number`` writes each dimension
        (in ``unit``): a view passes its own number formatter."""
        raise NotImplementedError

    # ---- project file ----------------------------------------------------------------------
    def to_dict(self) -> dict:
        """The project-file form (JSON-ready, model units), with ``kind`` first."""
        raise NotImplementedError

    @classmethod
    def from_dict(cls, data: dict, read: FieldReader | None = None) -> Shape:
        """The shape described by ``data`` (``kind`` selects the class), checked by ``read``."""
        kind = data.get("kind", cls.kind)
        target = SHAPE_KINDS.get(kind) if cls is Shape else cls
        if target is None:
            raise InvalidModelError(f"Shape kind '{kind}' is not known; use one of {', '.join(SHAPE_KINDS)}.")
        return target._read(read or PlainFieldReader(data, f"The {kind}"))

    @classmethod
    def _read(cls, read: FieldReader) -> Shape:
        raise NotImplementedError

@dataclass(frozen=True)
class Circle(Shape):
    """A filled circle: ``center`` (x, y) and ``radius``, in model units."""

    center: Point
    radius: float

    kind = "circle"
    required_fields = frozenset({"center", "radius"})
    is_smooth = True

    @classmethod
    def from_centre_and_edge(cls, center: Point, edge: Point) -> Circle:
        """The circle centred on ``center`` through ``edge``."""
        return cls(center, math.dist(center, edge))

    def check(self, where: str) -> None:
        if not self.radius > 0:
            raise InvalidGeometryError(f"{where}: radius is {self.radius:g}; it must be greater than 0.")

    def _build(self, scale: float, arc_step_rad: float):
        cx, cy = self.center
        return ShapelyPolygon(_circle_points((cx * scale, cy * scale), self.radius * scale, arc_step_rad))

    def arcs_m(self, scale: float) -> tuple[Arc, ...]:
        c = (self.center[0] * scale, self.center[1] * scale)
        return (Arc(c, self.radius * scale, 0.0, 2 * math.pi),)

    def round_radius_at(self, point: Point | None = None) -> float | None:
        return self.radius

    def disc(self) -> tuple[Point, float] | None:
        return self.center, self.radius

    def handles(self) -> list[Point]:
        return [(self.center[0] + self.radius, self.center[1])]

    def with_handle_moved(self, index: int, x: float, y: float) -> Circle:
        return Circle(self.center, max(math.dist(self.center, (x, y)), 1e-9))

    def _mapped(self, f) -> Circle:
        moved = f(self.center)
        origin = f((0.0, 0.0))
        return Circle(moved, self.radius * math.dist(origin, f((1.0, 0.0))))

    def exact_capacity(self) -> float | None:
        return self.radius  # a disc of radius r has capacity r (Ransford 1995)

    def cad_entities(self, msp, attribs: dict) -> tuple[list, list]:
        return [msp.add_circle(self.center, self.radius, dxfattribs=attribs)], []

    def describe(self, unit: str, number: Callable[[float], str] = "{:g}".format) -> str:
        return f"circle r = {number(self.radius)} {unit}"

    def to_dict(self) -> dict:
        return {"kind": self.kind, "center": _pt(self.center), "radius": float(self.radius)}

    @classmethod
    def _read(cls, read: FieldReader) -> Circle:
        return cls(read.point("center"), read.number("radius", positive=True))


@dataclass(frozen=True)
class Ring(Shape):
    """An annulus (a tube wall): ``center``, ``inner_radius`` < ``outer_radius``, model units."""

    center: Point
    inner_radius: float
    outer_radius: float

    kind = "ring"
    required_fields = frozenset({"center", "inner_radius", "outer_radius"})
    is_smooth = True

    def check(self, where: str) -> None:
        if not self.inner_radius > 0:
            raise InvalidGeometryError(f"{where}: inner radius is {self.inner_radius:g}; it must be greater than 0.")
        if not self.outer_radius > self.inner_radius:
            raise InvalidGeometryError(
                f"{where}: outer radius is {self.outer_radius:g}; it must be greater than the inner radius "
                f"({self.inner_radius:g})."
            )

    def _build(self, scale: float, arc_step_rad: float):
        c = (self.center[0] * scale, self.center[1] * scale)
        outer = _circle_points(c, self.outer_radius * scale, arc_step_rad)
        inner = _circle_points(c, self.inner_radius * scale, arc_step_rad)
        return ShapelyPolygon(outer, [inner[::-1]])

    def arcs_m(self, scale: float) -> tuple[Arc, ...]:
        c = (self.center[0] * scale, self.center[1] * scale)
        return (Arc(c, self.outer_radius * scale, 0.0, 2 * math.pi),
                Arc(c, self.inner_radius * scale, 0.0, -2 * math.pi))

    def round_radius_at(self, point: Point | None = None) -> float | None:
        """The outer radius, or None at the inner surface (hollow toward the field: no onset radius)."""
        if point is not None and math.dist(point, self.center) < 0.5 * (self.inner_radius + self.outer_radius):
            return None
        return self.outer_radius

    def handles(self) -> list[Point]:
        cx, cy = self.center
        return [(cx + self.outer_radius, cy), (cx - self.inner_radius, cy)]

    def with_handle_moved(self, index: int, x: float, y: float) -> Ring:
        r = max(math.dist(self.center, (x, y)), 1e-9)
        return Ring(self.center, self.inner_radius, r) if index == 0 else Ring(self.center, r, self.outer_radius)

    def _mapped(self, f) -> Ring:
        k = math.dist(f((0.0, 0.0)), f((1.0, 0.0)))
        return Ring(f(self.center), self.inner_radius * k, self.outer_radius * k)

    def exact_capacity(self) -> float | None:
        # Capacity depends on the outer boundary only (Ransford 1995): the outer disc's radius.
        return self.outer_radius

    def cad_entities(self, msp, attribs: dict) -> tuple[list, list]:
        return [msp.add_circle(self.center, self.outer_radius, dxfattribs=attribs),
                msp.add_circle(self.center, self.inner_radius, dxfattribs=attribs)], []

    def describe(self, unit: str, number: Callable[[float], str] = "{:g}".format) -> str:
        return f"tube {number(self.inner_radius)}/{number(self.outer_radius)} {unit}"

    def to_dict(self) -> dict:
        return {"kind": self.kind, "center": _pt(self.center),
                "inner_radius": float(self.inner_radius), "outer_radius": float(self.outer_radius)}

    @classmethod
    def _read(cls, read: FieldReader) -> Ring:
        inner = read.number("inner_radius", positive=True)
        outer = read.number("outer_radius", positive=True)
        if not outer > inner:
            raise read.problem("outer_radius", f"must be greater than inner_radius ({inner:g}), got {outer:g}")
        return cls(read.point("center"), inner, outer)


@dataclass(frozen=True)
class Rectangle(Shape):
    """An axis-aligned rectangle given by its ``center``, ``width`` and ``height``.

    ``corner_radius`` rounds all four corners (0 = sharp; half the smaller side makes a
    stadium, or a circle for a square); model units.
    """

    center: Point
    width: float
    height: float
    corner_radius: float = 0.0

    kind = "rectangle"
    required_fields = frozenset({"center", "width", "height"})
    optional_fields = frozenset({"corner_radius"})

    @classmethod
    def from_corners(cls, a: Point, b: Point) -> Rectangle:
        """The rectangle spanned by two opposite corners."""
        return cls(((a[0] + b[0]) / 2, (a[1] + b[1]) / 2), abs(b[0] - a[0]), abs(b[1] - a[1]))

    @property
    def _limit(self) -> float:
        return 0.5 * min(self.width, self.height)

    def check(self, where: str) -> None:
        for name, value in (("width", self.width), ("height", self.height)):
            if not value > 0:
                raise InvalidGeometryError(f"{where}: {name} is {value:g}; it must be greater than 0.")
        r = self.corner_radius
        if r < 0 or r > self._limit + 1e-12 * max(self.width, self.height):
            raise InvalidGeometryError(
                f"{where}: corner radius {r:g} must lie between 0 and half the smaller side ({self._limit:g})."
            )

    def _fillets(self, scale: float) -> list[tuple[Point, float]]:
        """Centre (metres) and start angle of the four corner arcs, counter-clockwise."""
        cx, cy = self.center[0] * scale, self.center[1] * scale
        hw, hh, rr = 0.5 * self.width * scale, 0.5 * self.height * scale, min(self.corner_radius, self._limit) * scale
        return [((cx + hw - rr, cy - hh + rr), -0.5 * math.pi), ((cx + hw - rr, cy + hh - rr), 0.0),
                ((cx - hw + rr, cy + hh - rr), 0.5 * math.pi), ((cx - hw + rr, cy - hh + rr), math.pi)]

    def _build(self, scale: float, arc_step_rad: float):
        cx, cy = self.center[0] * scale, self.center[1] * scale
        hw, hh = 0.5 * self.width * scale, 0.5 * self.height * scale
        rr = min(self.corner_radius, self._limit) * scale
        if rr <= 0:
            return ShapelyPolygon([(cx - hw, cy - hh), (cx + hw, cy - hh), (cx + hw, cy + hh), (cx - hw, cy + hh)])
        pts: list = []
        for centre, a0 in self._fillets(scale):
            pts.extend(_arc_points(centre, rr, a0, a0 + 0.5 * math.pi, arc_step_rad))
        # drop repeated points where a full-side fillet makes arcs meet (a stadium or a circle)
        cleaned = [pts[0]]
        for p in pts[1:]:
            if math.dist(p, cleaned[-1]) > 1e-12 * max(hw, hh):
                cleaned.append(p)
        if math.dist(cleaned[0], cleaned[-1]) <= 1e-12 * max(hw, hh):
            cleaned.pop()
        return ShapelyPolygon(cleaned)

    def arcs_m(self, scale: float) -> tuple[Arc, ...]:
        rr = min(self.corner_radius, self._limit) * scale
        if rr <= 0:
            return ()
        return tuple(Arc(c, rr, a0, 0.5 * math.pi) for c, a0 in self._fillets(scale))

    def meshing_hints(self, scale: float) -> MeshingHints:
        if self.corner_radius > 0:
            return MeshingHints(self.arcs_m(scale))
        corners = np.asarray(self._build(scale, 1.0).exterior.coords)[:-1]
        return MeshingHints((), corners, np.full(4, 1.5 * math.pi))

    def rectangle_size(self) -> tuple[float, float, float] | None:
        return self.width, self.height, self.corner_radius

    def widened(self, factor: float) -> Rectangle:
        return replace(self, width=self.width * factor)

    def exactly_rounded(self, radius: float, replace_radius: bool = False) -> Rectangle:
        """Corners rounded to ``radius`` (model units; at most half the smaller side); a larger
        radius already there is kept unless ``replace_radius``."""
        if radius > self._limit * (1 + 1e-12):
            raise InvalidGeometryError(
                f"Corner radius {radius:.6g} is more than half the smaller side ({self._limit:.6g}); "
                "use a smaller radius."
            )
        r = min(radius, self._limit)
        return replace(self, corner_radius=r if replace_radius else max(self.corner_radius, r))

    def handles(self) -> list[Point]:
        cx, cy = self.center
        hw, hh = self.width / 2, self.height / 2
        return [(cx - hw, cy - hh), (cx + hw, cy - hh), (cx + hw, cy + hh), (cx - hw, cy + hh)]

    def with_handle_moved(self, index: int, x: float, y: float) -> Rectangle:
        ox, oy = self.handles()[(index + 2) % 4]  # the opposite corner stays put
        w, h = abs(x - ox), abs(y - oy)
        return Rectangle(((x + ox) / 2, (y + oy) / 2), w, h, min(self.corner_radius, 0.5 * min(w, h)))

    def _mapped(self, f) -> Rectangle:
        k = math.dist(f((0.0, 0.0)), f((1.0, 0.0)))
        return Rectangle(f(self.center), self.width * k, self.height * k, self.corner_radius * k)

    def cad_entities(self, msp, attribs: dict) -> tuple[list, list]:
        (cx, cy), hw, hh, r = self.center, 0.5 * self.width, 0.5 * self.height, self.corner_radius
        x0, x1, y0, y1 = cx - hw, cx + hw, cy - hh, cy + hh
        if r <= 0:
            pts, bulges = [(x0, y0), (x1, y0), (x1, y1), (x0, y1)], [0.0] * 4
        else:  # quarter-circle fillets as bulges (tan of a quarter of the included angle)
            b = math.tan(math.pi / 8)
            corners = [(x0 + r, y0), (x1 - r, y0), (x1, y0 + r), (x1, y1 - r), (x1 - r, y1), (x0 + r, y1),
                       (x0, y1 - r), (x0, y0 + r)]
            pts, bulges = [], []
            for k, p in enumerate(corners):  # a full-side fillet leaves a straight piece of zero length
                bulge = b if k % 2 else 0.0
                if bulge == 0.0 and math.dist(p, corners[(k + 1) % 8]) == 0.0:
                    continue
                pts.append(p)
                bulges.append(bulge)
        entity = msp.add_lwpolyline([(x, y, 0, 0, bl) for (x, y), bl in zip(pts, bulges)], format="xyseb",
                                    close=True, dxfattribs=attribs)
        exact = [(1040, float(v)) for v in (*self.center, self.width, self.height, self.corner_radius)]
        return [entity], exact

    def describe(self, unit: str, number: Callable[[float], str] = "{:g}".format) -> str:
        rounded = f", corners r = {number(self.corner_radius)}" if self.corner_radius > 0 else ""
        return f"rectangle {number(self.width)} x {number(self.height)} {unit}{rounded}"

    def to_dict(self) -> dict:
        return {"kind": self.kind, "center": _pt(self.center), "width": float(self.width),
                "height": float(self.height), "corner_radius": float(self.corner_radius)}

    @classmethod
    def _read(cls, read: FieldReader) -> Rectangle:
        width = read.number("width", positive=True)
        height = read.number("height", positive=True)
        radius = read.number("corner_radius", minimum=0.0)
        if radius > 0.5 * min(width, height) * (1 + 1e-12):
            raise read.problem("corner_radius", f"{radius:g} is more than half the smaller side "
                                                f"({0.5 * min(width, height):g})")
        return cls(read.point("center"), width, height, radius)


def _nearest_edge_insert(pts: list, x: float, y: float, closed: bool) -> list:
    a = np.asarray(pts, float)
    b = np.roll(a, -1, axis=0) if closed else a[1:]
    a = a[: len(b)]
    ab = b - a
    t = np.clip(np.einsum("ij,ij->i", np.array([x, y]) - a, ab) / np.einsum("ij,ij->i", ab, ab), 0.0, 1.0)
    i = int(np.argmin(np.hypot(*(a + t[:, None] * ab - np.array([x, y])).T))) + 1
    new = [tuple(map(float, p)) for p in pts]
    new.insert(i, (float(x), float(y)))
    return new


@dataclass(frozen=True)
class Polygon(Shape):
    """A polygon: ``exterior`` vertices and optional ``holes`` (each a vertex list), model units.

    The ring need not repeat its first vertex; orientation does not matter.
    """

    exterior: tuple[Point, ...]
    holes: tuple[tuple[Point, ...], ...] = ()

    kind = "polygon"
    required_fields = frozenset({"exterior"})
    optional_fields = frozenset({"holes"})
    has_vertices = True

    def cleaned(self, where: str) -> Polygon:
        exterior = cleaned_ring(self.exterior, f"{where}, outline")
        holes = [cleaned_ring(h, f"{where}, hole {i + 1}") for i, h in enumerate(self.holes)]
        check_holes(exterior, holes, where)
        return replace(self, exterior=tuple(map(tuple, exterior.tolist())),
                       holes=tuple(tuple(map(tuple, h.tolist())) for h in holes))

    def check(self, where: str) -> None:
        if len(self.exterior) < 3:
            raise InvalidGeometryError(f"{where}: a polygon needs at least 3 vertices, got {len(self.exterior)}.")

    def _build(self, scale: float, arc_step_rad: float):
        return ShapelyPolygon([(x * scale, y * scale) for x, y in self.exterior],
                              [[(x * scale, y * scale) for x, y in hole] for hole in self.holes])

    def _check_built(self, geom, scale: float, where: str) -> None:
        if not geom.is_valid:
            reason = _reason_in_model_units(shapely.is_valid_reason(geom), scale)
            raise InvalidGeometryError(
                f"{where} is invalid: {reason}; redraw the outline so it does not cross or touch itself.")
        if geom.area <= 0:
            raise InvalidGeometryError(f"{where} has zero area; its vertices lie on one line.")

    def meshing_hints(self, scale: float) -> MeshingHints:
        found = [_vertex_corners(np.asarray(self.exterior, float) * scale, True)]
        found += [_vertex_corners(np.asarray(h, float) * scale, True, hole=True) for h in self.holes]
        return MeshingHints((), np.vstack([p for p, _ in found]), np.concatenate([b for _, b in found]))

    def _raw_outline(self) -> tuple[np.ndarray, ...]:
        return tuple(np.asarray(r, float).reshape(-1, 2) for r in (self.exterior, *self.holes) if len(r))

    def handles(self) -> list[Point]:
        return [(float(p[0]), float(p[1])) for p in self.exterior]

    def with_handle_moved(self, index: int, x: float, y: float) -> Polygon:
        pts = list(self.exterior)
        pts[index] = (x, y)
        return Polygon(tuple(pts), self.holes)

    def with_vertex_inserted(self, x: float, y: float) -> Polygon:
        return Polygon(tuple(_nearest_edge_insert(list(self.exterior), x, y, True)), self.holes)

    def with_vertex_removed(self, index: int) -> Polygon:
        if len(self.exterior) <= 3:
            return self
        return Polygon(self.exterior[:index] + self.exterior[index + 1:], self.holes)

    def _mapped(self, f) -> Polygon:
        return Polygon(tuple(map(f, self.exterior)), tuple(tuple(map(f, h)) for h in self.holes))

    def cad_entities(self, msp, attribs: dict) -> tuple[list, list]:
        return [msp.add_lwpolyline(ring, format="xy", close=True, dxfattribs=attribs)
                for ring in (self.exterior, *self.holes)], []

    def describe(self, unit: str, number: Callable[[float], str] = "{:g}".format) -> str:
        holes = f", {len(self.holes)} hole{'s' * (len(self.holes) != 1)}" if self.holes else ""
        return f"polygon, {len(self.exterior)} vertices{holes}"

    def to_dict(self) -> dict:
        out: dict[str, Any] = {"kind": self.kind, "exterior": [_pt(p) for p in self.exterior]}
        if self.holes:
            out["holes"] = [[_pt(p) for p in hole] for hole in self.holes]
        return out

    @classmethod
    def _read(cls, read: FieldReader) -> Polygon:
        return cls(read.points("exterior", 3), read.point_lists("holes", 3))


@dataclass(frozen=True)
class Strip(Shape):
    """A zero-thickness conductor along the polyline ``points`` (at least two), model units."""

    points: tuple[Point, ...]

    kind = "strip"
    required_fields = frozenset({"points"})
    is_solid = False
    has_vertices = True

    def cleaned(self, where: str) -> Strip:
        return replace(self, points=tuple(map(tuple, cleaned_polyline(self.points, where).tolist())))

    def check(self, where: str) -> None:
        if len(self.points) < 2:
            raise InvalidGeometryError(f"{where}: a strip needs at least 2 points, got {len(self.points)}.")

    def _build(self, scale: float, arc_step_rad: float):
        return LineString([(x * scale, y * scale) for x, y in self.points])

    def _check_built(self, geom, scale: float, where: str) -> None:
        if not geom.length > 0:
            raise InvalidGeometryError(f"{where} has zero length; move its end points apart.")
        if not geom.is_simple:
            raise InvalidGeometryError(f"{where} crosses itself; redraw the strip so it does not.")

    def meshing_hints(self, scale: float) -> MeshingHints:
        pts, beta = _vertex_corners(np.asarray(self.points, float) * scale, False)
        return MeshingHints((), pts, beta)

    def _raw_outline(self) -> tuple[np.ndarray, ...]:
        return (np.asarray(self.points, float).reshape(-1, 2),) if self.points else ()

    def handles(self) -> list[Point]:
        return [(float(p[0]), float(p[1])) for p in self.points]

    def with_handle_moved(self, index: int, x: float, y: float) -> Strip:
        pts = list(self.points)
        pts[index] = (x, y)
        return Strip(tuple(pts))

    def with_vertex_inserted(self, x: float, y: float) -> Strip:
        return Strip(tuple(_nearest_edge_insert(list(self.points), x, y, False)))

    def with_vertex_removed(self, index: int) -> Strip:
        if len(self.points) <= 2:
            return self
        return Strip(self.points[:index] + self.points[index + 1:])

    def _mapped(self, f) -> Strip:
        return Strip(tuple(map(f, self.points)))

    def cad_entities(self, msp, attribs: dict) -> tuple[list, list]:
        return [msp.add_lwpolyline(self.points, format="xy", close=False, dxfattribs=attribs)], []

    def describe(self, unit: str, number: Callable[[float], str] = "{:g}".format) -> str:
        return f"strip, {len(self.points)} points"

    def to_dict(self) -> dict:
        return {"kind": self.kind, "points": [_pt(p) for p in self.points]}

    @classmethod
    def _read(cls, read: FieldReader) -> Strip:
        return cls(read.points("points", 2))
