"""Drawings (DXF, SVG) on the main command line: ``--layer`` maps layers to parts.

    python -m solver drawing.dxf --layer BUS=conductor:10kV --layer EARTH=conductor:0V \\
        --layer EPOXY=dielectric:4.4 --layer NOTES=ignore

Each ``--layer LAYER=TARGET`` says what one layer becomes:

- ``conductor[:NAME][:POTENTIAL|reference|floating][:strip]``: a conductor named NAME (default:
  the layer's name) at a fixed POTENTIAL (volts, with an optional prefix: ``10kV``, ``-400V``,
  ``250mV``, ``1000``), or the reference, or floating; ``strip`` reads open polylines as
  zero-thickness strips;
- ``dielectric[:NAME]:EPS_R``: a dielectric region of relative permittivity EPS_R;
- ``ignore``: the layer is left out.

Several layers may name the same part. Every layer holding outlines must be mapped; when one is
not, the error lists the layers found with their entity counts. The model read is solved
exactly like a project file, and ``--save-project FILE`` keeps it as one.
"""

from __future__ import annotations

import argparse
import dataclasses
import re
from collections.abc import Sequence
from pathlib import Path

from solver.errors import ProjectFileError
from solver.io.drawing_layers import DRAWING_SUFFIXES, DrawingLayer, drawing_layers, read_drawing
from solver.io.dxf import LayerTarget
from solver.io.project_file import load_project
from solver.model.model import LENGTH_UNITS, Model

_VOLTAGE = re.compile(r"^([-+]?(?:\d+\.?\d*|\.\d+)(?:[eE][-+]?\d+)?)\s*([mkM]?)[Vv]?$")
_PREFIXES = {"": 1.0, "m": 1e-3, "k": 1e3, "M": 1e6}
_ROLES = ("reference", "floating", "fixed")
_FORMS = "conductor[:NAME][:10kV|reference|floating][:strip], dielectric[:NAME]:EPS_R or ignore"


def add_arguments(parser: argparse.ArgumentParser) -> None:
    """Add ``--layer``, ``--drawing-unit`` and ``--save-project`` to ``parser``."""
    group = parser.add_argument_group("drawings (.dxf, .svg)")
    group.add_argument("--layer", action="append", default=[], metavar="LAYER=TARGET",
                       help=f"what a drawing layer becomes: {_FORMS} (repeat for each layer)")
    group.add_argument("--drawing-unit", choices=tuple(LENGTH_UNITS),
                       help="length unit of the drawing (DXF: instead of its $INSUNITS; SVG: default mm)")
    group.add_argument("--save-project", metavar="FILE.json", help="also save the model read from the drawing")


def parse_voltage(text: str) -> float | None:
    """Volts from ``"10kV"``, ``"-400 V"``, ``"250mV"``, ``"1000"``; None when ``text`` is no voltage.

    >>> parse_voltage("10kV"), parse_voltage("0V"), parse_voltage("-2.5e3"), parse_voltage("bus")
    (10000.0, 0.0, -2500.0, None)
    """
    m = _VOLTAGE.match(text.strip())
    if m is None:
        return None
    return float(m.group(1)) * _PREFIXES[m.group(2)]


def parse_layer_option(text: str) -> tuple[str, LayerTarget]:
    """``"BUS=conductor:10kV"`` as (layer, LayerTarget); raises ProjectFileError with the forms.

    >>> parse_layer_option("EPOXY=dielectric:4.4")
    ('EPOXY', LayerTarget(kind='dielectric', name='EPOXY', role='fixed', potential_V=0.0, eps_r=4.4, strips=False))
    """
    layer, sep, target = text.rpartition("=")
    if not sep or not layer:
        raise ProjectFileError(f"--layer '{text}': write LAYER=TARGET with TARGET one of {_FORMS}.")
    kind, *tokens = target.split(":")
    if kind == "ignore" and not tokens:
        return layer, LayerTarget("ignore")
    if kind not in ("conductor", "dielectric"):
        raise ProjectFileError(f"--layer '{text}': '{kind}' is not a part kind; write {_FORMS}.")
    name, role, potential, eps_r, strips = "", None, None, None, False
    for token in tokens:
        number = parse_voltage(token) if kind == "conductor" else _number(token)
        if kind == "conductor" and token in _ROLES:
            role = token
        elif kind == "conductor" and token == "strip":
            strips = True
        elif number is not None and kind == "conductor" and potential is None:
            potential = number
        elif number is not None and kind == "dielectric" and eps_r is None:
            eps_r = number
        elif token and not name and number is None:
            name = token
        else:
            raise ProjectFileError(f"--layer '{text}': '{token}' is not understood here; write {_FORMS}.")
    if kind == "dielectric":
        if eps_r is None:
            raise ProjectFileError(f"--layer '{text}': give the relative permittivity, e.g. {layer}=dielectric:4.4.")
        return layer, LayerTarget("dielectric", name or layer, eps_r=eps_r)
    if role is None and potential is None:
        raise ProjectFileError(f"--layer '{text}': give the conductor's potential (e.g. {layer}=conductor:10kV) "
                               "or its role (reference, floating).")
    if role in ("reference", "floating") and potential is not None:
        raise ProjectFileError(f"--layer '{text}': a {role} conductor has no set potential; give one or the other.")
    return layer, LayerTarget("conductor", name or layer, role=role or "fixed",
                              potential_V=potential or 0.0, strips=strips)


def _number(token: str) -> float | None:
    try:
        return float(token)
    except ValueError:
        return None


def layer_map(options: Sequence[str]) -> dict[str, LayerTarget]:
    """The layer map of all ``--layer`` options (a layer given twice is an error)."""
    mapping: dict[str, LayerTarget] = {}
    for text in options:
        layer, target = parse_layer_option(text)
        if layer in mapping:
            raise ProjectFileError(f"--layer: layer '{layer}' is mapped twice; keep one --layer {layer}=...")
        mapping[layer] = target
    return mapping


def _found(layers: Sequence[DrawingLayer]) -> str:
    return "; ".join(layer.describe() for layer in layers) or "(none)"


def check_layer_map(path: str | Path, layers: Sequence[DrawingLayer], mapping: dict[str, LayerTarget]) -> None:
    """Raise ProjectFileError when a layer holding outlines is unmapped or a mapped layer is not
    in the drawing; the message lists the layers found with their entity counts."""
    names = {layer.name for layer in layers}
    unknown = sorted(set(mapping) - names)
    if unknown:
        raise ProjectFileError(f"{path}: layer(s) {', '.join(map(repr, unknown))} are not in the drawing; "
                               f"the layers found are {_found(layers)}.")
    unmapped = [layer.name for layer in layers if layer.holds_outlines and layer.name not in mapping]
    if unmapped:
        raise ProjectFileError(
            f"{path}: layer(s) {', '.join(map(repr, unmapped))} hold outlines but are not mapped. The layers found "
            f"are {_found(layers)}. Map each with --layer LAYER=conductor:10kV, LAYER=dielectric:4.4 or LAYER=ignore.")
    if all(t.kind == "ignore" for t in mapping.values()):
        raise ProjectFileError(f"{path}: no layer is mapped to a part; the layers found are {_found(layers)}.")


def is_drawing(path: str | Path) -> bool:
    """True for a file name ending in .dxf or .svg."""
    return Path(path).suffix.lower() in DRAWING_SUFFIXES


def load_model(args: argparse.Namespace) -> Model:
    """The model of one command-line run: a project file, or a drawing read with ``--layer``."""
    path = args.model
    if not is_drawing(path):
        if args.layer:
            raise ProjectFileError(f"{path}: --layer applies to drawings (.dxf, .svg), not to project files.")
        return load_project(path)
    mapping = layer_map(args.layer)
    check_layer_map(path, drawing_layers(path), mapping)
    model = read_drawing(path, mapping, unit=args.drawing_unit)
    if not model.title:  # a drawing carries no title: the file names the model
        model = dataclasses.replace(model, title=Path(path).name)
    if args.save_project:
        from solver.io.project_file import save_project

        save_project(model, args.save_project)
    return model
