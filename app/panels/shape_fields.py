"""The editable fields of a shape, from its project-file form, and back.

A number is one field; a point is two (``cx``/``cy`` for ``center``); a vertex list is one
text field "x, y; x, y; ..." (key ``points``). Every length may be typed with a unit
("12 mil", "0.5 mm"); a bare number is in the model's unit. Reading units is the solver's
:func:`solver.parse_quantity`.
"""

from __future__ import annotations

import re

from app.panels.quantity_edit import display_number
from solver import PROJECT_FORMAT_VERSION, ProjectFileError, Shape, model_from_dict, parse_quantity


def _label(name: str) -> str:
    return name.replace("_", " ").replace("center", "centre")


def _is_point(value) -> bool:
    return isinstance(value, list) and len(value) == 2 and all(isinstance(v, (int, float)) for v in value)


def _is_point_list(value) -> bool:
    return isinstance(value, list) and bool(value) and all(_is_point(p) for p in value)


def shape_fields(shape: Shape) -> tuple[tuple[str, str], ...]:
    """(label, key) of each editable field of ``shape``. Lists of vertex lists (holes) are kept as they are."""
    out: list[tuple[str, str]] = []
    for name, value in shape.to_dict().items():
        if name == "kind":
            continue
        if isinstance(value, (int, float)):
            out.append((_label(name), name))
        elif _is_point(value):
            out += [(f"{_label(name)} x", f"{name[0]}x"), (f"{_label(name)} y", f"{name[0]}y")]
        elif _is_point_list(value):
            out.append(("vertices x, y; ..." if shape.is_solid else "points x, y; ...", "points"))
    return tuple(out)


def shape_lengths(shape: Shape) -> dict[str, float]:
    """The single-number fields of ``shape`` by key, in model units (points excluded)."""
    out: dict[str, float] = {}
    for name, value in shape.to_dict().items():
        if isinstance(value, (int, float)) and name != "kind":
            out[name] = float(value)
        elif _is_point(value):
            out[f"{name[0]}x"], out[f"{name[0]}y"] = float(value[0]), float(value[1])
    return out


def points_text(shape: Shape, unit: str) -> str | None:
    """The vertex list of ``shape`` as "x, y; x, y; ..." in model units, or None."""
    for value in shape.to_dict().values():
        if _is_point_list(value):
            return "; ".join(f"{display_number(x, '')}, {display_number(y, '')}" for x, y in value)
    return None


def _length(text: str, field: str, unit: str, metres_per_unit: float) -> float:
    """A typed length in model units, to 12 significant figures so that "35" stays 35 and
    does not come back as 35.00000000000001 from the trip through metres."""
    return float(f"{parse_quantity(text, 'm', field, default_unit=unit) / metres_per_unit:.12g}")


def parse_points(text: str, unit: str, metres_per_unit: float, field: str = "vertices") -> tuple:
    """Points from "x, y; x, y; ..." where each coordinate may carry a length unit."""
    pts = []
    for k, chunk in enumerate(c for c in text.split(";") if c.strip()):
        xy = chunk.split(",")
        if len(xy) != 2:
            raise ValueError(f"'{chunk.strip()}' in '{field}': point {k + 1} needs two coordinates 'x, y'; "
                             "separate points with ';'.")
        pts.append(tuple(_length(t, f"{field}, point {k + 1}", unit, metres_per_unit) for t in xy))
    return tuple(pts)


def shape_from_values(values: dict[str, str], old: Shape, unit: str, metres_per_unit: float,
                      part: str = "part") -> Shape:
    """A shape of ``old``'s kind with the typed field texts; raises the solver's QuantityError
    on a bad value and ValueError with the solver's message when the shape is not valid."""
    data = old.to_dict()
    labels = dict((key, label) for label, key in shape_fields(old))
    for name, value in list(data.items()):
        if isinstance(value, (int, float)) and name in values:
            data[name] = _length(values[name], f"{labels[name]} of {part}", unit, metres_per_unit)
        elif _is_point(value) and f"{name[0]}x" in values:
            data[name] = [_length(values[f"{name[0]}{a}"], f"{labels[f'{name[0]}{a}']} of {part}", unit,
                                  metres_per_unit) for a in "xy"]
        elif _is_point_list(value) and "points" in values:
            data[name] = [list(p) for p in parse_points(values["points"], unit, metres_per_unit,
                                                        f"vertices of {part}")]
    _check_as_in_a_file(data, values, labels, unit, part)
    shape = Shape.from_dict(data)
    problem = shape.problem(f"The {shape.kind} of {part}")
    if problem is not None:
        raise ValueError(problem)
    return shape


def _check_as_in_a_file(data: dict, values: dict[str, str], labels: dict[str, str], unit: str, part: str) -> None:
    """Refuse the shape's fields as the solver's project reader would refuse them in a file (a
    size that is not positive, or outside what it meshes safely), with that reason, naming the
    part, the field, what was typed and the unit; raises ValueError."""
    probe = {"format": "edgewise-project", "version": PROJECT_FORMAT_VERSION, "unit": unit,
             "conductors": [{"name": "probe", "role": "reference", "shapes": [data]}]}
    try:
        model_from_dict(probe, "shape")
    except ProjectFileError as exc:
        # "<source>: <field path>: <reason>", e.g. "shape: conductors[0].shapes[0].radius: must be ..."
        _source, path, reason = (str(exc).split(": ", 2) + ["", ""])[:3]
        match = re.search(r"\.shapes\[0\]\.([a-z_]+)(?:\[(\d)\])?", path)
        name, axis = (match.group(1), match.group(2)) if match else ("", None)
        key = f"{name[0]}{'xy'[int(axis)]}" if axis is not None and name and f"{name[0]}x" in values else name
        label = labels.get(key, _label(name) or "shape")
        typed = values.get(key, "").strip()
        where = f"'{typed}' in '{label} of {part}'" if typed else f"'{label} of {part}'"
        raise ValueError(f"{where}, in {unit}: {reason or exc}") from None
