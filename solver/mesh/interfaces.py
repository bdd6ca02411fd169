"""Boundary mesh of dielectric interfaces: where two permittivities meet, away from conductors.

Each dielectric region becomes one shapely geometry (its shapes merged). The interfaces are
the region boundaries, noded so that a boundary shared by two regions appears once, with the
parts on or inside conductors, on strips and on the ground plane removed (there the boundary
is a conductor surface and carries conductor panels only).

Circular arcs (circles, rings, rounded corners: polygons in shapely) are known exactly from
the shapes (:meth:`solver.model.shapes.Shape.arcs_m`) and meshed as arcs: panel end points and collocation points lie on the
true circle, and each panel remembers its circle so that the interface equation can use the
exact circle kernel between panels of one circle (see :mod:`solver.bem.assembly`).
This is what lifts curved interfaces from first- to second-order convergence.

Panels are graded toward interface corners and toward the points where an interface meets a
conductor, and kept smaller than a fraction of the distance to the nearest conductor.
"""

from __future__ import annotations

import math
from dataclasses import dataclass
from functools import cached_property

import numpy as np
import shapely
from shapely.geometry import LineString, MultiLineString, box
from shapely.ops import unary_union

from solver.errors import InvalidGeometryError
from solver.mesh.budget import check_panel_budget, max_panels
from solver.mesh.interface_pieces import Piece, piece_breaks, split_into_pieces
from solver.mesh.panels import MeshSettings, PanelMesh
from solver.model.geometry import shape_geometry
from solver.model.model import Model
from solver.model.outline_checks import check_extent

#: Interface panels are this many times shorter than conductor panels in the same place: the
#: second-kind interface equation with constant bound charge per panel needs the finer mesh
#: to match the conductors' accuracy (measured on straight and rounded dielectric boxes).
INTERFACE_REFINEMENT = 2.0

#: Meshing tolerance of a conductor as a fraction of its size 2 A / P (area A, perimeter P;
#: the radius of a circle, the thickness of a thin bar). A dielectric boundary closer to the
#: conductor than this counts as lying on it: a polygon drawn against a round conductor (a
#: 32-gon or finer leaves a sliver under 0.5 % of the radius) then meets the conductor instead
#: of bounding a hairline gap that no mesh of sensible size resolves.
SLIVER_FRACTION = 5e-3


def conductor_snap_distances_m(conductor_geoms: list) -> np.ndarray:
    """Meshing tolerance of each conductor, metres (see :data:`SLIVER_FRACTION`).

    At least 1e-9 of the model's size; strips (no area) get that floor only.
    """
    b = np.array([g.bounds for g in conductor_geoms]).reshape(-1, 4)
    floor = 1e-9 * float(np.hypot(b[:, 2].max() - b[:, 0].min(), b[:, 3].max() - b[:, 1].min())) if len(b) else 0.0
    sizes = np.array([2.0 * g.area / g.length if g.area > 0 else 0.0 for g in conductor_geoms])
    return np.maximum(floor, SLIVER_FRACTION * sizes)


def dielectric_geometries(model: Model, arc_step_rad: float) -> list:
    """One merged shapely polygon geometry (metres) per dielectric region, validated.

    Raises InvalidGeometryError when a shape is bad or a strip, when two regions overlap
    (they may touch), or when a region reaches below the ground plane.
    """
    scale = model.metres_per_unit
    geoms = []
    for d in model.dielectrics:
        owner = f"Dielectric '{d.name}'"
        parts = []
        for i, shape in enumerate(d.shapes):
            where = f"{owner}, shape {i + 1} ({shape.kind})"
            if not shape.is_solid:
                raise InvalidGeometryError(f"{where}: a dielectric region needs an area; a strip has none.")
            parts.append(shape_geometry(shape, scale, arc_step_rad, where))
            check_extent(shapely.get_coordinates(parts[-1]), where)
        geoms.append(unary_union(parts))
    if len(geoms) > 1:
        # snap neighbours onto each other so that boundaries meant to be shared (drawn
        # separately, equal up to rounding) coincide exactly and become one interface
        box = np.array([g.bounds for g in geoms])
        tol = 1e-9 * float(np.hypot(box[:, 2].max() - box[:, 0].min(), box[:, 3].max() - box[:, 1].min()))
        for j in range(1, len(geoms)):
            for i in range(j):
                if shapely.distance(geoms[i], geoms[j]) < tol:
                    geoms[j] = shapely.snap(geoms[j], geoms[i], tol)
    for i, gi in enumerate(geoms):
        for j in range(i + 1, len(geoms)):
            overlap = gi.intersection(geoms[j]).area
            if overlap > 1e-9 * min(gi.area, geoms[j].area):
                a, b = model.dielectrics[i].name, model.dielectrics[j].name
                where = gi.intersection(geoms[j]).representative_point()
                raise InvalidGeometryError(
                    f"Dielectric regions '{a}' and '{b}' overlap near "
                    f"({where.x / scale:.6g}, {where.y / scale:.6g}) {model.unit}; "
                    "two regions may touch but not overlap; trim one of them."
                )
    if model.ground_plane is not None:
        y_plane = model.ground_plane.y * scale
        for d, g in zip(model.dielectrics, geoms):
            if g.bounds[1] < y_plane - 1e-9 * max(1.0, abs(y_plane), g.length):
                raise InvalidGeometryError(
                    f"Dielectric '{d.name}' reaches down to y = {g.bounds[1] / scale:.6g} {model.unit}, "
                    f"below the ground plane (y = {model.ground_plane.y:.6g} {model.unit}); "
                    "the plane is a conductor: start the region at the plane."
                )
    return geoms


@dataclass(frozen=True)
class InterfaceMesh:
    """Straight (chord) panels on dielectric interfaces, metres.

    Attributes
    ----------
    starts, ends : (n, 2) panel end points (on the true curve).
    points : (n, 2) collocation points: the chord midpoint, or the arc midpoint on arcs.
    normals : (n, 2) unit normals at the collocation points, pointing to the "+" side.
    eps_r_plus, eps_r_minus : (n,) relative permittivity on the normal side and the other.
    arc_lengths : (n,) length of each panel along the true curve (the arc on arcs), metres.
    circle_id : (n,) int, index of the circle a panel lies on (-1 for straight panels).
    circle_radius : (n,) radius of that circle (nan for straight panels), metres.
    region_plus, region_minus : (n,) region index on each side (len(dielectrics) = background).
    circle_outward : (n,) +1 where the normal points away from the panel's circle centre, -1
        toward it, 0 on straight panels.
    """

    starts: np.ndarray
    ends: np.ndarray
    points: np.ndarray
    normals: np.ndarray
    eps_r_plus: np.ndarray
    eps_r_minus: np.ndarray
    arc_lengths: np.ndarray
    circle_id: np.ndarray
    circle_radius: np.ndarray
    region_plus: np.ndarray
    region_minus: np.ndarray
    circle_outward: np.ndarray

    @property
    def n_panels(self) -> int:
        return len(self.starts)

    @cached_property
    def chord_lengths(self) -> np.ndarray:
        """(n,) straight length of each panel, metres."""
        return np.hypot(*(self.ends - self.starts).T)

    @cached_property
    def contrast(self) -> np.ndarray:
        """(n,) (eps+ - eps-) / (eps+ + eps-), the factor of the interface equation."""
        return (self.eps_r_plus - self.eps_r_minus) / (self.eps_r_plus + self.eps_r_minus)

    @classmethod
    def empty(cls) -> InterfaceMesh:
        z2, z1 = np.zeros((0, 2)), np.zeros(0)
        zi = np.zeros(0, dtype=int)
        return cls(z2, z2, z2, z2, z1, z1, z1, zi, z1, zi, zi, z1)


def region_index_at(model: Model, geoms: list, points_m: np.ndarray) -> np.ndarray:
    """Index of the dielectric region at (m, 2) points in metres; len(dielectrics) = background."""
    pts = np.asarray(points_m, dtype=float).reshape(-1, 2)
    out = np.full(len(pts), len(model.dielectrics), dtype=int)
    for k, g in enumerate(geoms):
        out[shapely.contains_xy(g, pts[:, 0], pts[:, 1])] = k
    return out


def region_permittivities(model: Model) -> np.ndarray:
    """eps_r of every dielectric region, then the background's (index len(dielectrics))."""
    return np.array([d.eps_r for d in model.dielectrics] + [model.background_eps_r], dtype=float)


def permittivity_at(model: Model, geoms: list, points_m: np.ndarray) -> np.ndarray:
    """Relative permittivity at (m, 2) points in metres (background outside every region)."""
    return region_permittivities(model)[region_index_at(model, geoms, points_m)]


def conductor_side_regions(
    model: Model, geoms: list, mesh: PanelMesh, snap_m: np.ndarray | None = None
) -> tuple[np.ndarray, np.ndarray]:
    """Region index on the field side ("+", along the normal) and the back side of each panel.

    The back side is only meaningful for strips; for closed conductors it is -1 (metal).
    ``snap_m`` (per conductor, metres; :func:`conductor_snap_distances_m`) makes the probe
    look past a sliver thinner than the conductor's meshing tolerance.
    """
    delta = 1e-3 * mesh.lengths[:, None]
    if snap_m is not None and len(snap_m):
        delta = np.maximum(delta, np.asarray(snap_m)[mesh.conductor_index][:, None])
    plus = region_index_at(model, geoms, mesh.midpoints + delta * mesh.normals)
    minus = region_index_at(model, geoms, mesh.midpoints - delta * mesh.normals)
    return plus, np.where(mesh.is_strip, minus, -1)


def _interface_lines(model: Model, geoms: list, conductor_geoms: list, tol: float):
    """Noded interface linework with conductor surfaces, strips and the ground plane removed
    (with everything within a conductor's meshing tolerance of it)."""
    lines = unary_union([g.boundary for g in geoms])
    blockers = [g.buffer(tol, quad_segs=2) for g in conductor_geoms]
    if model.ground_plane is not None:
        y = model.ground_plane.y * model.metres_per_unit
        x0, y0, x1, y1 = lines.bounds
        blockers.append(box(x0 - 1.0, y - abs(y1 - y0) - 1.0, x1 + 1.0, y + tol))
    if blockers:
        lines = lines.difference(unary_union(blockers))
    snap = conductor_snap_distances_m(conductor_geoms)
    if conductor_geoms and not lines.is_empty and snap.max() > tol:
        # a boundary running along a conductor within its tolerance (a sliver) lies on it;
        # short crossings near the points where a boundary meets a conductor stay
        near = lines.intersection(unary_union([g.buffer(d, quad_segs=8) for g, d in zip(conductor_geoms, snap)]))
        near = shapely.line_merge(near) if isinstance(near, MultiLineString) else near
        along = [g for g in getattr(near, "geoms", [near]) if isinstance(g, LineString) and g.length > 4.0 * snap.max()]
        if along:
            lines = lines.difference(unary_union(along))
    merged = shapely.line_merge(lines) if not lines.is_empty else lines
    parts = [g for g in getattr(merged, "geoms", [merged]) if isinstance(g, LineString) and not g.is_empty]
    return [p for p in parts if p.length > 100 * tol]


def discretize_interfaces(
    model: Model, conductor_geoms: list, conductor_mesh: PanelMesh, settings: MeshSettings
) -> tuple[InterfaceMesh, list]:
    """Panels on every dielectric interface of ``model`` (metres), and the region geometries.

    Panels are at most the global size / ``divisions_per_size``, at most ``gap_fraction`` of
    the distance to the nearest conductor (or ground plane), and graded geometrically from
    interface corners and from the points where an interface meets a conductor.
    """
    geoms = dielectric_geometries(model, settings.arc_step_rad)
    bounds = np.array([g.bounds for g in geoms] + [[*conductor_mesh.starts.min(axis=0), *conductor_mesh.starts.max(axis=0)]])
    lo, hi = bounds[:, :2].min(axis=0), bounds[:, 2:].max(axis=0)
    size = float(np.hypot(*(hi - lo)))
    tol = 1e-9 * size
    lines = _interface_lines(model, geoms, conductor_geoms, tol)
    if not lines:
        return InterfaceMesh.empty(), geoms
    h_global = size / (INTERFACE_REFINEMENT * settings.divisions_per_size)
    blockers = unary_union(conductor_geoms)
    plane_y = None if model.ground_plane is None else model.ground_plane.y * model.metres_per_unit
    ratio = 1.0 + (settings.growth_ratio - 1.0) / 2.0
    arcs = tuple(a for d in model.dielectrics for s in d.shapes for a in s.arcs_m(model.metres_per_unit))

    starts, ends, points, normals, arcl, cid, crad, outw = [], [], [], [], [], [], [], []
    budget_panels = max_panels()
    n_made = conductor_mesh.n_panels
    circles: list[tuple[np.ndarray, float]] = []
    for line in lines:
        coords = np.asarray(line.coords)
        closed = bool(line.is_ring)
        if closed:
            coords = coords[:-1]
        pieces, grading, total = split_into_pieces(coords, closed, arcs)
        h_max = min(h_global, total / (INTERFACE_REFINEMENT * settings.divisions_per_perimeter) * (1.0 if closed else 0.5))
        h_max = max(h_max, 1e-6 * size)
        h_corner = h_max * settings.corner_fraction

        def size_fn(piece: Piece, u: np.ndarray) -> np.ndarray:
            s = piece.s0 + u
            if len(grading):
                d = np.abs(s[:, None] - grading[None, :])
                if closed:
                    d = np.minimum(d, total - d)
                h = h_corner + (ratio - 1.0) * d.min(axis=1)
            else:
                h = np.full(len(u), np.inf)
            xy = piece.at(u)
            d_c = shapely.distance(shapely.points(xy), blockers) if not blockers.is_empty else np.full(len(u), np.inf)
            if plane_y is not None:
                d_c = np.minimum(d_c, xy[:, 1] - plane_y)
            near = np.maximum(h_corner, settings.gap_fraction / INTERFACE_REFINEMENT * d_c)
            return np.minimum(np.minimum(h, near), h_max)

        def bounded_size(piece: Piece, u: np.ndarray, size_fn=size_fn, line=line) -> np.ndarray:
            # count the panels these sizes give (as piece_breaks will) and refuse before they are made
            h = size_fn(piece, u)
            with np.errstate(divide="ignore", invalid="ignore"):
                n_piece = float(np.sum(np.diff(u) / np.minimum(h[:-1], h[1:])))
            if not n_made + n_piece <= budget_panels:
                check_panel_budget(max(n_made + n_piece, budget_panels + 1.0),
                                   _interface_culprit(model, geoms, conductor_geoms, line),
                                   "conductor and interface panels")
            return h

        for piece in pieces:
            u = piece_breaks(piece, bounded_size, settings.arc_step_rad)
            n_made += len(u) - 1
            if n_made > budget_panels:
                check_panel_budget(n_made * 1.0, _interface_culprit(model, geoms, conductor_geoms, line),
                                   "conductor and interface panels")
            if piece.centre is None:
                seg = piece.at(u)
                st, en = seg[:-1], seg[1:]
                mid = 0.5 * (st + en)
                t = (en - st) / np.hypot(*(en - st).T)[:, None]
                nrm = np.column_stack([t[:, 1], -t[:, 0]])
                starts.append(st)
                ends.append(en)
                points.append(mid)
                normals.append(nrm)
                arcl.append(np.hypot(*(en - st).T))
                cid.append(np.full(len(st), -1))
                crad.append(np.full(len(st), np.nan))
                outw.append(np.zeros(len(st)))
                continue
            seg = piece.at(u)
            st, en = seg[:-1], seg[1:]
            mid = piece.at(0.5 * (u[:-1] + u[1:]))
            radial = (mid - piece.centre[None, :]) / piece.radius
            t = (en - st) / np.hypot(*(en - st).T)[:, None]
            chord_n = np.column_stack([t[:, 1], -t[:, 0]])
            outward = np.sign(np.einsum("ij,ij->i", radial, chord_n))
            nrm = radial * outward[:, None]
            outw.append(outward)
            k = _circle_index(circles, piece.centre, piece.radius)
            starts.append(st)
            ends.append(en)
            points.append(mid)
            normals.append(nrm)
            arcl.append(np.diff(u))
            cid.append(np.full(len(st), k))
            crad.append(np.full(len(st), piece.radius))

    st, en, pt, nr = (np.concatenate(a) for a in (starts, ends, points, normals))
    lengths = np.concatenate(arcl)
    # probe each side a little beyond the polygonised outline that shapely holds for arcs
    radius = np.concatenate(crad)
    sag = np.where(np.isfinite(radius), radius * (1.0 - math.cos(settings.arc_step_rad)), 0.0)
    # and beyond the drawn polygon where a polygon with few sides was recognised as an arc
    off_outline = shapely.distance(shapely.points(pt), unary_union([g.boundary for g in geoms]))
    delta = (1e-3 * lengths + 4.0 * sag + 2.0 * off_outline)[:, None]
    eps = region_permittivities(model)
    r_plus = region_index_at(model, geoms, pt + delta * nr)
    r_minus = region_index_at(model, geoms, pt - delta * nr)
    plus, minus = eps[r_plus], eps[r_minus]
    keep = plus != minus
    mesh = InterfaceMesh(
        starts=st[keep], ends=en[keep], points=pt[keep], normals=nr[keep],
        eps_r_plus=plus[keep], eps_r_minus=minus[keep], arc_lengths=lengths[keep],
        region_plus=r_plus[keep], region_minus=r_minus[keep],
        circle_id=np.concatenate(cid).astype(int)[keep], circle_radius=np.concatenate(crad)[keep],
        circle_outward=np.concatenate(outw)[keep],
    )
    return mesh, geoms


def _interface_culprit(model: Model, geoms: list, conductor_geoms: list, line) -> str:
    """Words naming the dielectric region whose boundary ``line`` is, and its nearest conductor."""
    scale, unit = model.metres_per_unit, model.unit
    middle = line.interpolate(0.5, normalized=True)
    owners = [d.name for d, g in zip(model.dielectrics, geoms) if g.boundary.distance(middle) <= 1e-6 * line.length]
    region = f"the boundary of dielectric '{owners[0]}'" if owners else "a dielectric boundary"
    if not conductor_geoms:
        return f"{region}; simplify it"
    gaps = [float(shapely.distance(line, g)) for g in conductor_geoms]
    k = int(np.argmin(gaps))
    return (f"{region}, which runs {gaps[k] / scale:.3g} {unit} from conductor '{model.conductors[k].name}' "
            f"over {line.length / scale:.3g} {unit}; draw the region so that it meets the conductor exactly "
            "(or leave a clear gap)")


def _circle_index(circles: list, centre: np.ndarray, radius: float) -> int:
    for k, (c, r) in enumerate(circles):
        if abs(r - radius) < 1e-6 * r and np.hypot(*(c - centre)) < 1e-6 * r:
            return k
    circles.append((np.asarray(centre, dtype=float), float(radius)))
    return len(circles) - 1
