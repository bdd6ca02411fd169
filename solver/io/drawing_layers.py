"""What a drawing holds, layer by layer, before any layer is mapped to a part.

:func:`drawing_layers` counts the entities (DXF) or elements (SVG) on each layer of a drawing
and says which layers hold outlines the importers read (:mod:`solver.io.dxf`,
:mod:`solver.io.svg`). The command line lists it when layers are left unmapped; the window's
import dialog shows it as the table the user maps. :func:`read_drawing` reads either kind of
drawing with a layer map, chosen by the file's suffix.
"""

from __future__ import annotations

import os
from collections import Counter, defaultdict
from collections.abc import Mapping
from dataclasses import dataclass
from pathlib import Path

from solver.errors import ProjectFileError
from solver.model.model import Model

#: File suffixes read as drawings, and what they are.
DRAWING_SUFFIXES = {".dxf": "DXF", ".svg": "SVG"}


@dataclass(frozen=True)
class DrawingLayer:
    """One layer of a drawing.

    Attributes
    ----------
    name : str
        Layer name (DXF layer, or SVG group id / Inkscape label).
    counts : tuple of (str, int)
        Entity or element kinds on the layer and how many of each, most common first.
    holds_outlines : bool
        True when the importer reads geometry from this layer, so it must be mapped to a part
        or ignored; False for layers of text, dimensions and the like.
    """

    name: str
    counts: tuple[tuple[str, int], ...]
    holds_outlines: bool

    @property
    def n_entities(self) -> int:
        return sum(n for _, n in self.counts)

    def describe(self) -> str:
        """``"BUS: 1 LWPOLYLINE, 2 ARC"`` (for messages and lists)."""
        return f"{self.name}: " + ", ".join(f"{n} {kind}" for kind, n in self.counts)


def drawing_kind(path: str | os.PathLike) -> str:
    """``"DXF"`` or ``"SVG"`` from the file's suffix; raises ProjectFileError for other files."""
    suffix = Path(path).suffix.lower()
    if suffix not in DRAWING_SUFFIXES:
        raise ProjectFileError(f"{path}: not a drawing this program reads; give a .dxf or .svg file.")
    return DRAWING_SUFFIXES[suffix]


def _layers(counts: Mapping[str, Counter], outline_layers: set[str]) -> tuple[DrawingLayer, ...]:
    return tuple(DrawingLayer(name, tuple(sorted(counts[name].items(), key=lambda kv: (-kv[1], kv[0]))),
                              name in outline_layers) for name in sorted(counts))


def _dxf_layers(path: str | os.PathLike) -> tuple[DrawingLayer, ...]:
    import ezdxf

    from solver.io.dxf import OUTLINE_TYPES

    try:
        doc = ezdxf.readfile(str(path))
    except (OSError, ezdxf.DXFError) as e:
        raise ProjectFileError(f"{path}: cannot be read as DXF ({e}).") from None
    counts: dict[str, Counter] = defaultdict(Counter)
    outline_layers = set()
    for entity in doc.modelspace():
        layer = entity.dxf.layer
        counts[layer][entity.dxftype()] += 1
        if entity.dxftype() in OUTLINE_TYPES:
            outline_layers.add(layer)
    return _layers(counts, outline_layers)


def _svg_walk(node, layer: str | None, counts: dict[str, Counter], outline_layers: set[str]) -> None:
    """Count the elements under ``node`` per layer as :func:`solver.io.svg._walk` assigns them
    (text and images too, which the importer does not read)."""
    import svgelements as se

    from solver.io.svg import INKSCAPE_LABEL

    for child in node:
        if isinstance(child, se.Group):
            _svg_walk(child, child.values.get(INKSCAPE_LABEL) or child.id or layer, counts, outline_layers)
        elif isinstance(child, (se.Shape, se.Text, se.Image)):
            name = layer or child.id or ""
            counts[name][str(child.values.get("tag", type(child).__name__.lower()))] += 1
            if isinstance(child, se.Shape):
                outline_layers.add(name)


def _svg_layers(path: str | os.PathLike) -> tuple[DrawingLayer, ...]:
    import svgelements as se

    try:
        svg = se.SVG.parse(str(path), reify=True)
    except (OSError, ValueError, SyntaxError) as e:
        raise ProjectFileError(f"{path}: cannot be read as SVG ({e}).") from None
    counts: dict[str, Counter] = defaultdict(Counter)
    outline_layers: set[str] = set()
    _svg_walk(svg, None, counts, outline_layers)
    return _layers(counts, outline_layers)


def drawing_layers(path: str | os.PathLike) -> tuple[DrawingLayer, ...]:
    """The layers of a DXF or SVG drawing with their entity counts, sorted by name.

    Parameters
    ----------
    path : path of a .dxf or .svg file

    Raises
    ------
    ProjectFileError
        Unknown suffix or a file that cannot be read.

    Examples
    --------
    >>> [layer.describe() for layer in drawing_layers("sample_geometries/busbar_fillets.dxf")]
    ['ENCLOSURE: 2 LWPOLYLINE', 'L1: 1 LWPOLYLINE', 'L2: 4 ARC, 4 LINE', 'NOTES: 1 TEXT']
    """
    return _dxf_layers(path) if drawing_kind(path) == "DXF" else _svg_layers(path)


def read_drawing(path: str | os.PathLike, layers: Mapping, *, unit: str | None = None,
                 mesh_density: str = "normal") -> Model:
    """Read a DXF or SVG drawing into a Model with ``layers`` (layer -> LayerTarget or its text).

    ``unit`` is the drawing's length unit: for DXF it overrides ``$INSUNITS``; for SVG it is the
    unit of the user units (default millimetres).
    """
    if drawing_kind(path) == "DXF":
        from solver.io.dxf import read_dxf

        return read_dxf(path, layers, unit=unit, mesh_density=mesh_density)
    from solver.io.svg import read_svg

    return read_svg(path, layers, unit=unit or "mm", mesh_density=mesh_density)
