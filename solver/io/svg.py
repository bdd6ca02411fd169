"""Read cross-sections from SVG drawings (with svgelements).

Every closed sub-path (``M ... Z``), ``circle``, ``rect`` (with rounded corners), ``polygon``
and closed ``path`` becomes an outline; circular arcs are kept exact (as for DXF, see
:mod:`solver.io.outlines`), so rounded rectangles come back as rectangles with their corner
radius. The layer of an element is the ``id`` (or Inkscape layer label) of the nearest
enclosing group, else its own ``id``; layers map to parts exactly as in :mod:`solver.io.dxf`.

Coordinates are the drawing's user units (the ``viewBox`` units), read as ``unit`` (default
millimetres); SVG's y axis points down, so y is negated to give the usual upward y.
Elliptical arcs, curves and open sub-paths are refused with a message naming the element and
layer.
"""

from __future__ import annotations

import math
import os
from collections import defaultdict
from collections.abc import Mapping
from typing import TYPE_CHECKING

import numpy as np

from solver.errors import InvalidGeometryError, ProjectFileError
from solver.io.dxf import LayerTarget, _assemble, parse_layer_target
from solver.io.outlines import Outline, shapes_from_outlines
from solver.mesh.panels import MeshSettings
from solver.model.model import LENGTH_UNITS, Model

if TYPE_CHECKING:
    from svgelements import Matrix

INKSCAPE_LABEL = "{http://www.inkscape.org/namespaces/inkscape}label"


def _walk(node, layer: str | None, out: list) -> None:
    import svgelements as se

    for child in node:
        if isinstance(child, se.Group):
            name = child.values.get(INKSCAPE_LABEL) or child.id or layer
            _walk(child, name, out)
        elif isinstance(child, se.Shape):
            out.append((layer or child.id or "", child))


def _snapped(points: np.ndarray, extent: float) -> np.ndarray:
    """Round away the round-off of the viewBox transform: 9 significant digits of the drawing's size."""
    return np.round(points, 9 - math.ceil(math.log10(extent))) + 0.0


def _outlines_of(element, layer: str, to_user: Matrix, extent: float) -> list[Outline]:
    import svgelements as se

    where = f"SVG {element.values.get('tag', type(element).__name__.lower())} '{element.id or '(no id)'}' in layer '{layer}'"
    if isinstance(element, se.Circle):
        c = to_user.point_in_matrix_space(element.implicit_center)
        r = abs(element.implicit_r * math.sqrt(abs(to_user.determinant)))
        centre = _snapped(np.array([[c.x, -c.y]]), extent)
        return [Outline(centre, np.zeros(1), where, float(_snapped(np.array([r]), extent)[0]))]
    path = se.Path(element)
    path *= to_user
    path.reify()
    outlines = []
    for sub in path.as_subpaths():
        segments = [s for s in se.Path(sub) if not isinstance(s, se.Move)]
        if not segments:
            continue
        if not isinstance(segments[-1], se.Close):
            start, end = segments[0].start, segments[-1].end
            if start is None or end is None or abs(complex(start) - complex(end)) > 1e-9 * max(1.0, abs(complex(start))):
                raise InvalidGeometryError(f"{where}: a sub-path is open; close it (Z) in the drawing.")
        vertices, bulges = [], []
        for s in segments:
            if s.start is None or s.end is None or abs(complex(s.start) - complex(s.end)) == 0.0:
                continue
            vertices.append((s.start.x, -s.start.y))
            if isinstance(s, (se.Line, se.Close)):
                bulges.append(0.0)
            elif isinstance(s, se.Arc):
                if abs(s.rx - s.ry) > 1e-9 * max(s.rx, s.ry):
                    raise InvalidGeometryError(f"{where}: an elliptical arc (rx {s.rx:g}, ry {s.ry:g}) is not read; "
                                               "use circular arcs.")
                bulges.append(math.tan(-s.sweep / 4))  # y is flipped, so the turning sense reverses
            else:
                raise InvalidGeometryError(f"{where}: {type(s).__name__} curves are not read; use lines and circular arcs.")
        outlines.append(Outline(_snapped(np.array(vertices, float), extent), np.array(bulges, float), where))
    return outlines


def read_svg(path: str | os.PathLike, layers: Mapping[str, LayerTarget | str], *, template: Model | None = None,
             unit: str = "mm", mesh_density: str = "normal") -> Model:
    """Read an SVG drawing into a Model (see the module notes).

    Parameters
    ----------
    path : path of the .svg file
    layers : mapping of layer (group id) -> LayerTarget or its text form
        Every layer holding shapes must be mapped ("ignore" leaves one out).
    template : Model, optional
        As in :func:`solver.io.dxf.read_dxf`.
    unit : str
        Length unit of the drawing's user units.
    mesh_density : str
        Arc step for arcs that are not exact shapes.
    """
    import svgelements as se

    if unit not in LENGTH_UNITS:
        raise ProjectFileError(f"{path}: unit '{unit}' is not known; use one of {', '.join(LENGTH_UNITS)}.")
    try:
        svg = se.SVG.parse(str(path), reify=True)
    except (OSError, ValueError, SyntaxError) as e:
        raise ProjectFileError(f"{path}: cannot be read as SVG ({e}).") from None
    to_user = ~se.Matrix(svg.viewbox_transform) if getattr(svg, "viewbox_transform", None) else se.Matrix()
    targets = {k: parse_layer_target(v) if isinstance(v, str) else v for k, v in layers.items()}
    elements: list = []
    _walk(svg, None, elements)
    unmapped = sorted({layer for layer, _ in elements} - set(targets))
    if unmapped:
        raise ProjectFileError(f"{path}: layer(s) {', '.join(map(repr, unmapped))} hold shapes but are not mapped; "
                               "map them (e.g. NAME=conductor:gnd:reference) or ignore them (NAME=ignore).")
    box = svg.viewbox
    extent = max(box.width, box.height) if box is not None else max(float(svg.width), float(svg.height), 1.0)
    outlines = defaultdict(list)
    for layer, element in elements:
        if targets[layer].kind != "ignore":
            outlines[layer].extend(_outlines_of(element, layer, to_user, extent))
    step = MeshSettings.for_density(template.mesh_density if template else mesh_density).arc_step_rad
    parts: dict = defaultdict(list)
    first: dict = {}
    for layer, target in targets.items():
        if target.kind == "ignore":
            continue
        first.setdefault((target.kind, target.name), target)
        parts[(target.kind, target.name)].extend(
            shapes_from_outlines(outlines.get(layer, []), step, f"{target.kind} '{target.name}'"))
    return _assemble(parts, first, template, unit, mesh_density)
