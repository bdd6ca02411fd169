"""Write a model's outlines to DXF (with ezdxf), so that :func:`solver.io.dxf.read_dxf` reads it back.

Each part gets its own layer (``conductor-NAME``, ``dielectric-NAME``); circles are CIRCLE,
rings two CIRCLEs, rectangles and polygons LWPOLYLINE (fillets as bulged quarter arcs),
strips open LWPOLYLINE. Every entity carries its shape kind (and a rectangle its exact
numbers) as application data "EDGEWISE", so the round trip gives the same model.
"""

from __future__ import annotations

import os
import re

from solver.errors import ProjectFileError
from solver.io.dxf import APP_ID, UNIT_CODES, LayerTarget
from solver.model.model import Model


def layer_name(kind: str, name: str) -> str:
    """A DXF-safe layer name for a part, e.g. ``conductor-L1``."""
    return re.sub(r"[<>/\\\":;?*|=`,\s]", "_", f"{kind}-{name}")


def layer_map_for(model: Model) -> dict[str, LayerTarget]:
    """The layer map that reads back a drawing written by :func:`write_dxf` from ``model``."""
    out = {layer_name("conductor", c.name): LayerTarget("conductor", c.name, c.role, c.potential_V,
                                                        strips=any(not s.is_solid for s in c.shapes))
           for c in model.conductors}
    out.update({layer_name("dielectric", d.name): LayerTarget("dielectric", d.name, eps_r=d.eps_r)
                for d in model.dielectrics})
    return out


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
            entities, exact = s.cad_entities(msp, attribs)
            for e in entities:
                e.set_xdata(APP_ID, [(1000, s.kind), *exact])
    try:
        doc.saveas(str(path))
    except OSError as e:
        raise ProjectFileError(f"{path}: cannot be written ({e.strerror or e}).") from None
    return layer_map_for(model)
