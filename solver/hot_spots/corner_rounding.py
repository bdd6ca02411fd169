"""Rounding the sharp corners and free edges of conductors to a stated radius.

A sharp convex corner of a conductor (field-region opening beta > pi) has no finite surface
field in 2-D: the charge density goes like r^(pi/beta - 1). Real parts are never perfectly
sharp, so the meaningful question is "what is the peak field if this corner has radius rho?".
:func:`round_sharp_corners` answers it by returning a copy of the model in which

* a shape that can round itself exactly (a rectangle: ``corner_radius = max(its own, rho)``,
  exact arcs refined with the mesh; see :meth:`solver.model.shapes.Shape.exactly_rounded`)
  does so when it is the conductor's only shape;
* any other solid outline is "opened" with shapely (eroded by rho, then grown by rho), which
  rounds every convex corner to radius rho and leaves concave corners (no singularity) sharp;
* a zero-thickness strip becomes a bar of thickness 2 rho with round edges (a strip has no
  edge radius without a thickness); this changes the part, and the docstring says so.

Shapes without corners (circles, rings: ``Shape.is_smooth``) are left alone. Polygonised arcs are drawn with the
same angular step the mesher uses at the given resolution ``level`` so they refine with it.
"""

from __future__ import annotations

import functools
import math
from collections.abc import Iterable
from dataclasses import replace

import shapely
from shapely.geometry import MultiPolygon
from shapely.geometry import Polygon as ShapelyPolygon
from shapely.geometry.base import BaseGeometry
from shapely.ops import unary_union

from solver.errors import InvalidGeometryError
from solver.mesh.panels import MeshSettings, discretize_boundary
from solver.model.model import Conductor, Model, Polygon


def conductors_with_sharp_corners(model: Model) -> tuple[str, ...]:
    """Names of the conductors that have a sharp convex corner or a free strip edge.

    Uses the corner detection of the mesher (a vertex turning by more than 25 degrees with the
    field region opening wider than pi) and the weak corners of
    :mod:`solver.hot_spots.weak_corners` (convex vertices turning by less, arcs excepted).
    Both are properties of a conductor's own outline, so each conductor is looked at alone
    and the answer kept by its shapes (a drag changes one conductor: the others are not
    meshed again).
    """
    return tuple(c.name for c in model.conductors if _has_sharp_corner(c.shapes, model.unit))


def _has_sharp_corner(shapes: tuple, unit: str) -> bool:
    try:
        return _kept_sharp_corner(shapes, unit)
    except TypeError:  # a shape that cannot be hashed: looked at, not kept
        return _sharp_corner(shapes, unit)


@functools.lru_cache(maxsize=256)
def _kept_sharp_corner(shapes: tuple, unit: str) -> bool:
    return _sharp_corner(shapes, unit)


def _sharp_corner(shapes: tuple, unit: str) -> bool:
    from solver.hot_spots.weak_corners import weak_corner_turns

    alone = Model(unit=unit, conductors=(Conductor("alone", shapes),))
    mesh = discretize_boundary(alone, MeshSettings(0.5))
    _, _, pairs = weak_corner_turns(mesh)
    return bool(len(mesh.corner_conductor) or pairs.size)


def _quad_segs(level: float) -> int:
    return max(4, math.ceil(0.5 * math.pi / MeshSettings(level).arc_step_rad - 1e-9))


def _to_polygons(geom, where: str) -> tuple[Polygon, ...]:
    parts = [g for g in getattr(geom, "geoms", [geom]) if isinstance(g, ShapelyPolygon) and not g.is_empty]
    if not parts:
        raise InvalidGeometryError(f"{where}: nothing is left after rounding; use a smaller corner radius.")
    return tuple(
        Polygon(
            tuple(map(tuple, shapely.get_coordinates(p.exterior)[:-1])),
            tuple(tuple(map(tuple, shapely.get_coordinates(h)[:-1])) for h in p.interiors),
        )
        for p in parts
    )


def _rounded_conductor(conductor: Conductor, radius: float, level: float, replace_radius: bool) -> Conductor:
    """``conductor`` with every convex corner rounded to ``radius`` (model units)."""
    where = f"Conductor '{conductor.name}'"
    if all(s.is_smooth for s in conductor.shapes):
        return conductor
    if len(conductor.shapes) == 1:
        try:
            exact = conductor.shapes[0].exactly_rounded(radius, replace_radius)
        except InvalidGeometryError as e:
            raise InvalidGeometryError(f"{where}: {str(e)[0].lower()}{str(e)[1:]}") from None
        if exact is not None:
            return replace(conductor, shapes=(exact,))
    q = _quad_segs(level)
    step = MeshSettings(level).arc_step_rad
    solids: list[BaseGeometry] = []
    lines: list[BaseGeometry] = []
    for i, shape in enumerate(conductor.shapes):
        g = shape.geometry_m(1.0, step, f"{where}, shape {i + 1} ({shape.kind})")
        (solids if shape.is_solid else lines).append(g)
    pieces = []
    if solids:
        merged = unary_union(solids)
        opened = merged.buffer(-radius, quad_segs=q).buffer(radius, quad_segs=q)
        n_before = len(getattr(merged, "geoms", [merged]))
        n_after = len(getattr(opened, "geoms", [opened])) if not opened.is_empty else 0
        if n_after != n_before or opened.area < 0.5 * merged.area:
            raise InvalidGeometryError(
                f"{where}: a corner radius of {radius:.6g} removes or splits part of the conductor "
                "(some feature is thinner than twice the radius); use a smaller radius."
            )
        pieces.append(opened)
    for line in lines:
        pieces.append(line.buffer(radius, quad_segs=q))
    geom = unary_union(pieces)
    if isinstance(geom, ShapelyPolygon):
        geom = MultiPolygon([geom])
    return replace(conductor, shapes=_to_polygons(geom, where))


def round_sharp_corners(
    model: Model,
    corner_radius_m: float,
    conductors: Iterable[str] | None = None,
    level: float | None = None,
    replace_radius: bool = False,
) -> Model:
    """A copy of ``model`` with the sharp corners of some conductors rounded.

    Parameters
    ----------
    model : Model
    corner_radius_m : float
        Corner (and strip-edge) radius, metres; must be > 0.
    conductors : iterable of str, optional
        Which conductors to round; by default every conductor with a sharp corner.
    level : float, optional
        Mesh resolution level the arcs are drawn for (default: the model's mesh density).
    replace_radius : bool
        A conductor made of one rectangle gets exactly this corner radius (for a sweep); by
        default a rectangle keeps a larger radius it already has.

    Returns
    -------
    Model
        The rounded copy. Strips become bars of thickness 2 * radius.

    Examples
    --------
    >>> from solver import Model, Conductor, Rectangle
    >>> m = Model(unit="mm", conductors=(Conductor("bar", (Rectangle((0, 0), 10, 2),)),))
    >>> round_sharp_corners(m, 0.5e-3).conductors[0].shapes[0].corner_radius
    0.5
    """
    if not (math.isfinite(corner_radius_m) and corner_radius_m > 0):
        raise InvalidGeometryError(f"Corner radius is {corner_radius_m} m; give a positive radius.")
    from solver.mesh.panels import DENSITY_LEVELS

    level = DENSITY_LEVELS[model.mesh_density] if level is None else float(level)
    names = set(conductors_with_sharp_corners(model) if conductors is None else conductors)
    for name in names:
        model.conductor(name)  # KeyError naming the known conductors
    radius = corner_radius_m / model.metres_per_unit
    return model.with_conductors(
        tuple(_rounded_conductor(c, radius, level, replace_radius) if c.name in names else c for c in model.conductors)
    )
