"""What a study of one model can vary and collect, as lists to choose from.

:func:`sweepable_fields` lists the numbers of a model a sweep or search can vary (each part's
dimensions, centre, corner radius, potential, permittivity; the background permittivity and
the ground plane's height), as field paths (:mod:`solver.studies.paths`) with a plain label,
the current value and its unit. :func:`figure_choices` lists the figures
(:mod:`solver.studies.figures`) that apply to the model: capacitance entries and line
impedances only where there is a return path, peak field, margin and equivalent radius per
conductor. The window's sweep dialog offers exactly these lists.
"""

from __future__ import annotations

from dataclasses import dataclass

from solver.io.project_file import model_to_dict
from solver.model.model import Model
from solver.studies.figures import FIGURE_WORDS

#: Shape fields that are lengths, and how they read in a label.
_LENGTH_FIELDS = {"width": "width", "height": "height", "radius": "radius", "corner_radius": "corner radius",
                  "inner_radius": "inner radius", "outer_radius": "outer radius", "thickness": "thickness"}


@dataclass(frozen=True)
class FieldChoice:
    """One number of the model a study can vary.

    Attributes
    ----------
    path : str
        Field path, e.g. ``conductors.trace.shapes.0.width``.
    label : str
        Plain words, e.g. ``"trace, shape 1: width"``.
    value : float
        Its value in the model now (``unit``).
    unit : str
        The model's length unit, ``"V"`` for a potential or ``""`` for a permittivity.
    """

    path: str
    label: str
    value: float
    unit: str


@dataclass(frozen=True)
class FigureChoice:
    """One figure a study can collect: ``name`` (a figure name) and ``label`` (plain words)."""

    name: str
    label: str


def _shape_fields(prefix: str, owner: str, shapes: list[dict], unit: str) -> list[FieldChoice]:
    out = []
    for k, shape in enumerate(shapes):
        where = f"{owner}, shape {k + 1} ({shape.get('kind', 'shape')})" if len(shapes) > 1 else owner
        for key, words in _LENGTH_FIELDS.items():
            if isinstance(shape.get(key), (int, float)):
                out.append(FieldChoice(f"{prefix}.shapes.{k}.{key}", f"{where}: {words}", float(shape[key]), unit))
        centre = shape.get("center")
        if isinstance(centre, list) and len(centre) == 2:
            for axis, name in enumerate("xy"):
                out.append(FieldChoice(f"{prefix}.shapes.{k}.center.{axis}", f"{where}: centre {name}",
                                       float(centre[axis]), unit))
    return out


def _shared_fields(fields: list[FieldChoice]) -> list[FieldChoice]:
    """One parameter for a dimension that two or more conductors share with the same value (e.g.
    the corner radius of both bars), its paths joined by ``+`` so that they move together."""
    groups: dict[tuple[str, float], list[FieldChoice]] = {}
    for f in fields:
        parts = f.path.split(".")
        if parts[0] == "conductors" and parts[-1] in _LENGTH_FIELDS:
            groups.setdefault((parts[-1], f.value), []).append(f)
    out = []
    for (key, value), same in groups.items():
        owners = list(dict.fromkeys(f.path.split(".")[1] for f in same))
        if len(owners) > 1:
            out.append(FieldChoice("+".join(f.path for f in same), f"{' + '.join(owners)}: {_LENGTH_FIELDS[key]}",
                                   value, same[0].unit))
    return out


def sweepable_fields(model: Model) -> list[FieldChoice]:
    """The numbers of ``model`` a sweep or goal search can vary, part by part.

    Examples
    --------
    >>> from solver import load_project
    >>> [f.path for f in sweepable_fields(load_project("sample_geometries/twin_lead.json"))][:3]
    ['conductors.go.potential_V', 'conductors.go.shapes.0.radius', 'conductors.go.shapes.0.center.0']
    """
    data = model_to_dict(model)
    unit = model.unit
    out: list[FieldChoice] = []
    for c in data.get("conductors", []):
        prefix = f"conductors.{c['name']}"
        if c.get("role") == "fixed":
            out.append(FieldChoice(f"{prefix}.potential_V", f"{c['name']}: potential", float(c["potential_V"]), "V"))
        out.extend(_shape_fields(prefix, c["name"], c.get("shapes", []), unit))
    for d in data.get("dielectrics", []):
        prefix = f"dielectrics.{d['name']}"
        out.append(FieldChoice(f"{prefix}.eps_r", f"{d['name']}: relative permittivity", float(d["eps_r"]), ""))
        out.extend(_shape_fields(prefix, d["name"], d.get("shapes", []), unit))
    out.extend(_shared_fields(out))
    out.append(FieldChoice("background_eps_r", "background: relative permittivity", float(model.background_eps_r), ""))
    if model.ground_plane is not None:
        out.append(FieldChoice("ground_plane.y", "ground plane: height y", float(model.ground_plane.y), unit))
    return out


def figure_choices(model: Model) -> list[FigureChoice]:
    """The figures that apply to ``model``, in the order a user would look for them.

    Examples
    --------
    >>> from solver import load_project
    >>> [f.name for f in figure_choices(load_project("sample_geometries/microstrip_on_substrate.json"))][:3]
    ['Z0_ohm', 'eps_eff', 'delay_s_per_m']
    """
    signals = model.signal_names
    out: list[FigureChoice] = []
    if model.has_return_path and len(signals) == 1:
        out += [FigureChoice(w, FIGURE_WORDS[w]) for w in ("Z0_ohm", "eps_eff", "delay_s_per_m")]
    if model.has_return_path and len(signals) == 2:
        out += [FigureChoice(w, FIGURE_WORDS[w]) for w in ("Z_even_ohm", "Z_odd_ohm", "Z_diff_ohm", "Z_common_ohm")]
    if model.has_return_path:
        for i, a in enumerate(signals):
            for b in signals[i:]:
                out.append(FigureChoice(f"C_F_per_m.{a}.{b}", f"Maxwell capacitance entry {a}, {b}, F/m"))
    for name in model.conductor_names:
        out.append(FigureChoice(f"peak_field_V_per_m.{name}", f"largest surface field on {name}, V/m"))
    for name in model.conductor_names:
        out.append(FigureChoice(f"margin.{name}", f"smallest breakdown / corona margin of {name} "
                                                  "(needs rounded corners)"))
    for name in model.conductor_names:
        out.append(FigureChoice(f"equivalent_radius_m.{name}", f"equivalent radius of {name}, m"))
    return out
