"""Read cross-sections from DXF drawings and write models back to DXF (with ezdxf).

Read: closed LWPOLYLINE and POLYLINE (bulges are exact arcs), CIRCLE, chains of LINE and ARC
that close on themselves, and HATCH boundaries (polyline and line/arc edge paths). Each layer
maps to a part through a :class:`LayerTarget` — written on the command line as
``NAME=conductor:gnd:reference``, ``NAME=conductor:bar:1000`` (fixed, 1000 V),
``NAME=conductor:sense:floating``, ``NAME=conductor:trace:strip`` (open polylines are
zero-thickness strips), ``NAME=dielectric:board:4.4`` or ``NAME=ignore``. Several layers may
feed one part. The length unit comes from ``$INSUNITS`` (or the ``unit`` argument).
How outlines become shapes (exact circles, rings and rounded rectangles; other arcs sampled at
the solver's arc step) is told in :mod:`solver.io.outlines`.

Write: :func:`solver.io.dxf_export.write_dxf` puts each part on its own layer (circles as CIRCLE, rectangles and
polygons as LWPOLYLINE with bulged fillets, strips as open LWPOLYLINE) and tags every entity
with its shape kind (application data "EDGEWISE"), so that reading it back with the returned
layer map and the model as ``template`` gives the same model.
"""

from __future__ import annotations

import logging
import math
import os
from collections import defaultdict
from collections.abc import Iterable, Mapping
from dataclasses import dataclass, replace
from typing import TYPE_CHECKING, cast

import numpy as np

from solver.errors import InvalidGeometryError, ProjectFileError
from solver.io.outlines import Outline, shapes_from_outlines
from solver.mesh.panels import MeshSettings
from solver.model.model import (
    Conductor,
    Dielectric,
    Model,
    Strip,
)

if TYPE_CHECKING:
    from ezdxf.entities import LWPolyline

logger = logging.getLogger(__name__)

APP_ID = "EDGEWISE"
#: $INSUNITS code -> (model unit, factor from drawing units to that unit).
INSUNITS = {1: ("inch", 1.0), 2: ("inch", 12.0), 4: ("mm", 1.0), 5: ("mm", 10.0), 6: ("m", 1.0),
            9: ("mil", 1.0), 13: ("um", 1.0)}
UNIT_CODES = {"inch": 1, "mm": 4, "m": 6, "mil": 9, "um": 13}
#: Endpoints closer than this fraction of the drawing's size count as joined.
JOIN_TOLERANCE = 1e-7


@dataclass(frozen=True)
class LayerTarget:
    """What one drawing layer becomes: part ``kind`` ("conductor", "dielectric", "ignore"), its
    ``name``, conductor ``role``/``potential_V``, dielectric ``eps_r``, and whether open
    polylines are ``strips`` (zero-thickness conductors)."""

    kind: str
    name: str = ""
    role: str = "fixed"
    potential_V: float = 0.0
    eps_r: float = 1.0
    strips: bool = False


def parse_layer_target(text: str) -> LayerTarget:
    """``"conductor:gnd:reference"``, ``"conductor:bar:1000"``, ``"dielectric:board:4.4"``, ``"ignore"``."""
    kind, *rest = text.split(":")
    if kind == "ignore" and not rest:
        return LayerTarget("ignore")
    if kind not in ("conductor", "dielectric") or not rest or not rest[0]:
        raise ProjectFileError(f"Layer target '{text}': write conductor:NAME[:reference|floating|strip|VOLTS], "
                               "dielectric:NAME:EPS_R or ignore.")
    target = LayerTarget(kind, rest[0])
    for token in rest[1:]:
        if token in ("reference", "floating", "fixed"):
            target = replace(target, role=token)
        elif token == "strip":
            target = replace(target, strips=True)
        else:
            try:
                value = float(token)
            except ValueError:
                raise ProjectFileError(f"Layer target '{text}': '{token}' is not a role, 'strip' or a number.") from None
            target = replace(target, potential_V=value) if kind == "conductor" else replace(target, eps_r=value)
    return target


def _hint(entity) -> str:
    return _hints(entity)[0]


def _hints(entity) -> tuple[str, tuple[float, ...]]:
    """The shape kind and exact numbers Edgewise tagged an entity with (or "", ())."""
    try:
        if not entity.has_xdata(APP_ID):
            return "", ()
        tags = entity.get_xdata(APP_ID)
        return str(tags[0][1]), tuple(float(t[1]) for t in tags[1:] if t[0] == 1040)
    except Exception:  # noqa: BLE001 - malformed application data: read the geometry alone
        return "", ()


def _where(entity) -> str:
    return f"DXF {entity.dxftype()} {entity.dxf.handle} on layer '{entity.dxf.layer}'"


def _polyline_points(entity) -> tuple[np.ndarray, np.ndarray, bool]:
    if entity.dxftype() == "LWPOLYLINE":
        pts = np.array([(x, y, b) for x, y, *_, b in entity.get_points("xyseb")], dtype=float).reshape(-1, 3)
        return pts[:, :2], pts[:, 2], bool(entity.closed)
    verts = list(entity.vertices)
    pts = np.array([(v.dxf.location.x, v.dxf.location.y, v.dxf.get("bulge", 0.0)) for v in verts]).reshape(-1, 3)
    return pts[:, :2], pts[:, 2], bool(entity.is_closed)


def _closed_chain(pts: np.ndarray, bulges: np.ndarray, closed: bool, tol: float) -> tuple[np.ndarray, np.ndarray] | None:
    """Closed (vertices, bulges) without a repeated end point, or None when open."""
    if len(pts) >= 2 and np.hypot(*(pts[-1] - pts[0])) <= tol:
        pts, bulges, closed = pts[:-1], bulges[:-1], True
    return (pts, bulges) if closed and len(pts) >= 2 else None


def _chain_edges(edges: list, tol: float, where: str) -> list[tuple[np.ndarray, np.ndarray, str]]:
    """Join (start, end, bulge, where) edges into closed loops; raise on a loose end."""
    loops, remaining = [], list(edges)
    while remaining:
        start, end, bulge, first = remaining.pop(0)
        verts, bulges, names = [start], [bulge], [first]
        while np.hypot(*(end - verts[0])) > tol:
            for k, (s, e, b, w) in enumerate(remaining):
                if np.hypot(*(s - end)) <= tol:
                    nxt = (s, e, b, w)
                elif np.hypot(*(e - end)) <= tol:
                    nxt = (e, s, -b, w)
                else:
                    continue
                remaining.pop(k)
                verts.append(nxt[0])
                bulges.append(nxt[2])
                names.append(nxt[3])
                end = nxt[1]
                break
            else:
                raise InvalidGeometryError(
                    f"{first}: the chain of lines and arcs starting here is open near ({end[0]:.6g}, {end[1]:.6g}) "
                    f"({where}); close the outline in the drawing.")
        loops.append((np.array(verts), np.array(bulges), first))
    return loops


def _edge_of(entity) -> tuple[np.ndarray, np.ndarray, float, str]:
    if entity.dxftype() == "LINE":
        s, e = entity.dxf.start, entity.dxf.end
        return np.array([s.x, s.y]), np.array([e.x, e.y]), 0.0, _where(entity)
    c, r = entity.dxf.center, entity.dxf.radius
    a0, a1 = math.radians(entity.dxf.start_angle), math.radians(entity.dxf.end_angle)
    sweep = (a1 - a0) % (2 * math.pi) or 2 * math.pi
    s = np.array([c.x + r * math.cos(a0), c.y + r * math.sin(a0)])
    e = np.array([c.x + r * math.cos(a1), c.y + r * math.sin(a1)])
    return s, e, math.tan(sweep / 4), _where(entity)


def _hatch_outlines(entity, tol: float) -> list[Outline]:
    from ezdxf.entities.boundary_paths import EdgeType

    out = []
    for path in entity.paths:
        if hasattr(path, "vertices"):
            pts = np.array([(v[0], v[1], v[2] if len(v) > 2 else 0.0) for v in path.vertices], float)
            chain = _closed_chain(pts[:, :2], pts[:, 2], bool(path.is_closed), tol)
            if chain is None:
                raise InvalidGeometryError(f"{_where(entity)}: a boundary path is open; close it in the drawing.")
            out.append(Outline(chain[0], chain[1], _where(entity), kind_hint=_hint(entity)))
            continue
        edges = []
        for edge in path.edges:
            if edge.type == EdgeType.LINE:
                edges.append((np.array([edge.start[0], edge.start[1]]), np.array([edge.end[0], edge.end[1]]), 0.0,
                              _where(entity)))
            elif edge.type == EdgeType.ARC:
                a0, a1 = math.radians(edge.start_angle), math.radians(edge.end_angle)
                sweep = ((a1 - a0) % (2 * math.pi) or 2 * math.pi) * (1 if edge.ccw else -1)
                if not edge.ccw:
                    a0, a1 = -a0, -a1
                c, r = edge.center, edge.radius
                s = np.array([c[0] + r * math.cos(a0), c[1] + r * math.sin(a0)])
                e = np.array([c[0] + r * math.cos(a0 + sweep), c[1] + r * math.sin(a0 + sweep)])
                edges.append((s, e, math.tan(sweep / 4), _where(entity)))
            else:
                raise InvalidGeometryError(f"{_where(entity)}: boundary edge type {edge.type.name} is not read; "
                                           "redraw it with lines and arcs.")
        for verts, bulges, _ in _chain_edges(edges, tol, f"layer '{entity.dxf.layer}'"):
            out.append(Outline(verts, bulges, _where(entity), kind_hint=_hint(entity)))
    return out


#: Entity types that carry outlines.
OUTLINE_TYPES = ("CIRCLE", "LWPOLYLINE", "POLYLINE", "LINE", "ARC", "HATCH")


def _layer_outlines(msp, tol: float, strip_layers: set[str], read_layers: set[str]):
    """Outlines and open strips per layer; loose LINE/ARC entities chained per layer."""
    outlines, strips, loose = defaultdict(list), defaultdict(list), defaultdict(list)
    for e in msp:
        kind, layer = e.dxftype(), e.dxf.layer
        if layer not in read_layers:
            continue
        if kind == "CIRCLE":
            c = e.dxf.center
            outlines[layer].append(Outline(np.array([[c.x, c.y]]), np.zeros(1), _where(e), float(e.dxf.radius), _hint(e)))
        elif kind in ("LWPOLYLINE", "POLYLINE"):
            pts, bulges, closed = _polyline_points(e)
            chain = _closed_chain(pts, bulges, closed, tol)
            if chain is not None and _hint(e) != "strip":
                kind_hint, values = _hints(e)
                outlines[layer].append(Outline(chain[0], chain[1], _where(e), kind_hint=kind_hint, hint_values=values))
            elif layer in strip_layers or _hint(e) == "strip":
                if np.any(bulges[:-1] != 0):
                    raise InvalidGeometryError(f"{_where(e)}: a strip with arcs is not supported; use straight pieces.")
                strips[layer].append(Strip(tuple((float(x), float(y)) for x, y in pts)))
            else:
                gap = float(np.hypot(*(pts[-1] - pts[0]))) if len(pts) else 0.0
                raise InvalidGeometryError(
                    f"{_where(e)}: the outline is open (its ends are {gap:.6g} drawing units apart); close it in the "
                    "drawing, or map the layer as a strip conductor (conductor:NAME:strip).")
        elif kind in ("LINE", "ARC"):
            loose[layer].append(_edge_of(e))
        elif kind == "HATCH":
            outlines[layer].extend(_hatch_outlines(e, tol))
    for layer, edges in loose.items():
        for verts, bulges, where in _chain_edges(edges, tol, f"layer '{layer}'"):
            outlines[layer].append(Outline(verts, bulges, where))
    return outlines, strips


def read_dxf(path: str | os.PathLike, layers: Mapping[str, LayerTarget | str], *, template: Model | None = None,
             unit: str | None = None, mesh_density: str = "normal") -> Model:
    """Read a DXF drawing into a Model.

    Parameters
    ----------
    path : path of the .dxf file
    layers : mapping of layer name -> LayerTarget or its text form (see the module notes)
        Every layer that holds geometry must be mapped (use "ignore" to leave one out).
    template : Model, optional
        Parts named in it keep its roles, potentials, permittivities, colours, and the
        model keeps its ground plane, background permittivity, title and mesh density; the
        drawing supplies the shapes (parts the drawing lacks are dropped).
    unit : str, optional
        Length unit of the drawing when ``$INSUNITS`` is missing or 0 (overrides it if given).
    mesh_density : str
        Sets the arc step used to sample arcs that are not exact shapes (and the model's density).

    Raises
    ------
    ProjectFileError
        Unreadable file, unknown unit, or a layer left unmapped.
    InvalidGeometryError
        An open or self-crossing outline; the message names the entity handle and layer.
    """
    import ezdxf

    try:
        doc = ezdxf.readfile(str(path))
    except (OSError, ezdxf.DXFError) as e:
        raise ProjectFileError(f"{path}: cannot be read as DXF ({e}).") from None
    targets = {k: parse_layer_target(v) if isinstance(v, str) else v for k, v in layers.items()}
    code = int(doc.header.get("$INSUNITS", 0))
    if unit is not None:
        model_unit, factor = unit, 1.0
    elif code in INSUNITS:
        model_unit, factor = INSUNITS[code]
    else:
        raise ProjectFileError(f"{path}: the drawing's unit ($INSUNITS = {code}) is not known; "
                               "give the unit (unit='mm' or --unit mm).")
    msp = doc.modelspace()
    extent = max((float(np.ptp(np.array([[*v][:2] for v in e.vertices()]), axis=0).max())
                  for e in cast("Iterable[LWPolyline]", msp.query("LWPOLYLINE")) if len(e)), default=1.0)
    tol = JOIN_TOLERANCE * max(extent, 1.0)
    strip_layers = {k for k, t in targets.items() if t.strips}
    unmapped = sorted({e.dxf.layer for e in msp if e.dxftype() in OUTLINE_TYPES} - set(targets))
    if unmapped:
        raise ProjectFileError(f"{path}: layer(s) {', '.join(map(repr, unmapped))} hold outlines but are not "
                               "mapped; map them (e.g. --layer NAME=conductor:gnd:reference) or ignore them (NAME=ignore).")
    outlines, strips = _layer_outlines(msp, tol, strip_layers, {k for k, t in targets.items() if t.kind != "ignore"})
    step = MeshSettings.for_density(template.mesh_density if template else mesh_density).arc_step_rad
    parts: dict[tuple[str, str], list] = defaultdict(list)
    first_target: dict[tuple[str, str], LayerTarget] = {}
    for layer, target in targets.items():
        if target.kind == "ignore":
            continue
        key = (target.kind, target.name)
        first_target.setdefault(key, target)
        shapes = shapes_from_outlines(outlines.get(layer, []), step, f"{target.kind} '{target.name}'")
        parts[key].extend(_scaled(s, factor) for s in (*shapes, *strips.get(layer, [])))
    return _assemble(parts, first_target, template, model_unit, mesh_density)


def _scaled(shape, factor: float):
    return shape if factor == 1.0 else Model(conductors=(Conductor("s", (shape,)),)).scaled(factor).conductors[0].shapes[0]


def _assemble(parts, targets, template: Model | None, unit: str, density: str) -> Model:
    conductors: list[Conductor] = []
    dielectrics: list[Dielectric] = []
    keys = list(parts)
    if template is not None:
        order = [("conductor", c.name) for c in template.conductors] + [("dielectric", d.name) for d in template.dielectrics]
        keys = [k for k in order if k in parts] + [k for k in keys if k not in order]
    for kind, name in keys:
        shapes, t = tuple(parts[(kind, name)]), targets[(kind, name)]
        if not shapes:
            logger.warning("%s '%s' has no outlines in the drawing; left out", kind, name)
            continue
        if kind == "conductor":
            known = template.conductor(name) if template and name in template.conductor_names else None
            conductors.append(replace(known, shapes=shapes) if known else
                              Conductor(name, shapes, t.role, t.potential_V if t.role == "fixed" else 0.0))
        else:
            known_d = next((d for d in template.dielectrics if d.name == name), None) if template else None
            dielectrics.append(replace(known_d, shapes=shapes) if known_d else Dielectric(name, shapes, t.eps_r))
    if template is not None:
        return replace(template.with_unit(unit), conductors=tuple(conductors), dielectrics=tuple(dielectrics))
    return Model(unit=unit, conductors=tuple(conductors), dielectrics=tuple(dielectrics), mesh_density=density)
