"""Write a model's outlines to DXF (with ezdxf), so that :func:`solver.io.dxf.read_dxf` reads it back.

Each part gets its own layer (``conductor-NAME``, ``dielectric-NAME``); circles are CIRCLE,
rings two CIRCLEs, rectangles and polygons LWPOLYLINE (fillets as bulged quarter arcs),
strips open LWPOLYLINE. Every entity carries its shape kind (and a rectangle its exact
numbers) as application data "EDGEWISE", so the round trip gives the same model.
"""

from __future__ import annotations

import math
import os
import re

from solver.errors import ProjectFileError
from solver.io.dxf import APP_ID, UNIT_CODES, LayerTarget
from solver.model.model import Circle, Model, Polygon, Rectangle, Ring, Strip


def layer_name(kind: str, name: str) -> str:
    """A DXF-safe layer name for a part, e.g. ``conductor-L1``."""
    return re.sub(r"[<>/\\\":;?*|=`,\s]", "_", f"{kind}-{name}")


def layer_map_for(model: Model) -> dict[str, LayerTarget]:
    """The layer map that reads back a drawing written by :func:`write_dxf` from ``model``."""
    out = {layer_name("conductor", c.name): LayerTarget("conductor", c.name, c.role, c.potential_V,
                                                        strips=any(isinstance(s, Strip) for s in c.shapes))
           for c in model.conductors}
    out.update({layer_name("dielectric", d.name): LayerTarget("dielectric", d.name, eps_r=d.eps_r)
                for d in model.dielectrics})
    return out


def _rectangle_polyline(s: Rectangle) -> tuple[list, list]:
    (cx, cy), hw, hh, r = s.center, 0.5 * s.width, 0.5 * s.height, s.corner_radius
    x0, x1, y0, y1 = cx - hw, cx + hw, cy - hh, cy + hh
    if r <= 0:
        return [(x0, y0), (x1, y0), (x1, y1), (x0, y1)], [0.0] * 4
    b = math.tan(math.pi / 8)
    pts = [(x0 + r, y0), (x1 - r, y0), (x1, y0 + r), (x1, y1 - r), (x1 - r, y1), (x0 + r, y1), (x0, y1 - r), (x0, y0 + r)]
    bulges = [0.0, b, 0.0, b, 0.0, b, 0.0, b]
    keep_pts, keep_b = [], []
    for k, p in enumerate(pts):  # a full-side fillet makes a straight piece of zero length
        if bulges[k] == 0.0 and math.dist(p, pts[(k + 1) % 8]) == 0.0:
            continue
        keep_pts.append(p)
        keep_b.append(bulges[k])
    return keep_pts, keep_b


def write_dxf(model: Model, path: str | os.PathLike) -> dict[str, LayerTarget]:
    """Write the model's outlines to a DXF file and return the layer map that reads it back.

    Examples
    --------
    >>> from solver import load_project
    >>> m = load_project("sample_geometries/busbar_enclosure.json")
    >>> layers = write_dxf(m, "/tmp/busbars.dxf")  # doctest: +SKIP
    >>> from solver.io.dxf import read_dxf
    >>> read_dxf("/tmp/busbars.dxf", layers, template=m) == m  # doctest: +SKIP
    True
    """
    import ezdxf

    doc = ezdxf.new("R2010", units=UNIT_CODES[model.unit])
    doc.appids.add(APP_ID)
    msp = doc.modelspace()
    parts = [("conductor", c.name, c.shapes) for c in model.conductors] + [
        ("dielectric", d.name, d.shapes) for d in model.dielectrics]
    for kind, name, shapes in parts:
        layer = layer_name(kind, name)
        doc.layers.add(layer)
        attribs = {"layer": layer}
        for s in shapes:
            entities = []
            if isinstance(s, Circle):
                entities.append(msp.add_circle(s.center, s.radius, dxfattribs=attribs))
            elif isinstance(s, Ring):
                entities += [msp.add_circle(s.center, s.outer_radius, dxfattribs=attribs),
                             msp.add_circle(s.center, s.inner_radius, dxfattribs=attribs)]
            elif isinstance(s, Rectangle):
                pts, bulges = _rectangle_polyline(s)
                entities.append(msp.add_lwpolyline([(x, y, 0, 0, b) for (x, y), b in zip(pts, bulges)],
                                                   format="xyseb", close=True, dxfattribs=attribs))
            elif isinstance(s, Polygon):
                for ring in (s.exterior, *s.holes):
                    entities.append(msp.add_lwpolyline(ring, format="xy", close=True, dxfattribs=attribs))
            elif isinstance(s, Strip):
                entities.append(msp.add_lwpolyline(s.points, format="xy", close=False, dxfattribs=attribs))
            exact = [(1040, float(v)) for v in (*s.center, s.width, s.height, s.corner_radius)] if isinstance(
                s, Rectangle) else []
            for e in entities:
                e.set_xdata(APP_ID, [(1000, s.kind), *exact])
    try:
        doc.saveas(str(path))
    except OSError as e:
        raise ProjectFileError(f"{path}: cannot be written ({e.strerror or e}).") from None
    return layer_map_for(model)
