"""Reading a project-file dictionary into a Model, checking every field on the way.

Each check knows the field's path (``conductors[1].shapes[0].radius``) and raises
:class:`FieldProblem` with the path and the reason; :mod:`solver.project_file` turns it into a
one-line :class:`~solver.errors.ProjectFileError` that also names the file.
"""

from __future__ import annotations

import copy
import json
import math
import re
from typing import Any

from solver.errors import InvalidModelError
from solver.model.model import (
    LENGTH_UNITS,
    MESH_DENSITIES,
    ROLES,
    Circle,
    Conductor,
    Dielectric,
    GroundPlane,
    Model,
    Polygon,
    Rectangle,
    Ring,
    Shape,
    Strip,
)
from solver.model.outline_checks import LARGEST_LENGTH_M, SMALLEST_LENGTH_M

#: Version of the project format written by this program (files up to it can be read).
PROJECT_FORMAT_VERSION = 1

#: Value of the ``format`` marker that identifies an Edgewise project file.
PROJECT_FORMAT_NAME = "edgewise-project"

_COLOR = re.compile(r"^#[0-9a-fA-F]{6}$")
_TOP_KEYS = {"$schema", "format", "version", "unit", "title", "description", "background_eps_r",
             "mesh_density", "ground_plane", "conductors", "dielectrics", "extras"}
_SHAPE_KEYS = {
    "circle": ({"center", "radius"}, set()),
    "ring": ({"center", "inner_radius", "outer_radius"}, set()),
    "rectangle": ({"center", "width", "height"}, {"corner_radius"}),
    "polygon": ({"exterior"}, {"holes"}),
    "strip": ({"points"}, set()),
}
_ROLE_KEYS = {"fixed": {"potential_V"}, "floating": {"charge_C_per_m"}, "reference": set()}


class FieldProblem(Exception):
    """A bad field in a project dictionary: ``str(e)`` is "<field path>: <reason>"."""

    def __init__(self, path: str, reason: str) -> None:
        super().__init__(f"{path}: {reason}" if path else reason)


def _show(value: Any) -> str:
    text = json.dumps(value) if isinstance(value, (str, int, float, bool, type(None))) else type(value).__name__
    text = {"list": "a list", "dict": "an object"}.get(text, text)
    return text if len(text) <= 40 else text[:37] + "..."


def _object(value: Any, path: str, required: set[str], optional: set[str]) -> dict:
    if not isinstance(value, dict):
        raise FieldProblem(path, f"expected an object, got {_show(value)}")
    missing = sorted(required - value.keys())
    if missing:
        raise FieldProblem(f"{path}.{missing[0]}" if path else missing[0], "missing (this field is required)")
    unknown = sorted(value.keys() - required - optional)
    if unknown:
        allowed = ", ".join(sorted(required | optional))
        raise FieldProblem(f"{path}.{unknown[0]}" if path else unknown[0], f"unknown field (allowed here: {allowed})")
    return value


def _number(value: Any, path: str, *, positive: bool = False, minimum: float | None = None) -> float:
    if isinstance(value, bool) or not isinstance(value, (int, float)):
        raise FieldProblem(path, f"expected a number, got {_show(value)}")
    try:
        x = float(value)
    except OverflowError:
        raise FieldProblem(path, f"number with {len(str(abs(value)))} digits is too large") from None
    if not math.isfinite(x):
        raise FieldProblem(path, f"expected a finite number, got {value}")
    if positive and not x > 0:
        raise FieldProblem(path, f"must be greater than 0, got {value}")
    if minimum is not None and x < minimum:
        raise FieldProblem(path, f"must be at least {minimum:g}, got {value}")
    return x


def _string(value: Any, path: str, *, choices: tuple[str, ...] | None = None, nonempty: bool = False) -> str:
    if not isinstance(value, str):
        raise FieldProblem(path, f"expected a string, got {_show(value)}")
    if choices is not None and value not in choices:
        raise FieldProblem(path, f"{_show(value)} is not one of {', '.join(choices)}")
    if nonempty and not value.strip():
        raise FieldProblem(path, "must not be empty")
    return value


def _list(value: Any, path: str, min_items: int = 0, what: str = "items") -> list:
    if not isinstance(value, list):
        raise FieldProblem(path, f"expected a list, got {_show(value)}")
    if len(value) < min_items:
        raise FieldProblem(path, f"needs at least {min_items} {what}, got {len(value)}")
    return value


def _coordinate(value: Any, path: str, scale: float) -> float:
    x = _number(value, path)
    if abs(x) * scale > LARGEST_LENGTH_M:
        raise FieldProblem(path, f"{value} is more than {LARGEST_LENGTH_M:g} m from the origin; check the number and the unit")
    return x


def _size(value: Any, path: str, scale: float) -> float:
    """A positive length (radius, width...) within the range the mesher handles."""
    x = _number(value, path, positive=True)
    if x * scale > LARGEST_LENGTH_M:
        raise FieldProblem(path, f"{value} is larger than {LARGEST_LENGTH_M:g} m; check the number and the unit")
    if x * scale < SMALLEST_LENGTH_M:
        raise FieldProblem(path, f"{value} is smaller than {SMALLEST_LENGTH_M:g} m; check the number and the unit")
    return x


def _point_from(value: Any, path: str, scale: float) -> tuple[float, float]:
    if not isinstance(value, list) or len(value) != 2:
        raise FieldProblem(path, f"expected a point [x, y], got {_show(value)}")
    return (_coordinate(value[0], f"{path}[0]", scale), _coordinate(value[1], f"{path}[1]", scale))


def _points_from(value: Any, path: str, min_items: int, scale: float) -> tuple[tuple[float, float], ...]:
    items = _list(value, path, min_items, "points")
    return tuple(_point_from(p, f"{path}[{i}]", scale) for i, p in enumerate(items))


def _shape_from(value: Any, path: str, allow_strip: bool, scale: float) -> Shape:
    if not isinstance(value, dict):
        raise FieldProblem(path, f"expected a shape object, got {_show(value)}")
    if "kind" not in value:
        raise FieldProblem(f"{path}.kind", f"missing (one of {', '.join(_SHAPE_KEYS)})")
    kinds = tuple(k for k in _SHAPE_KEYS if allow_strip or k != "strip")
    if not allow_strip and value["kind"] == "strip":
        raise FieldProblem(f"{path}.kind", "a dielectric region cannot be a zero-thickness strip; use a polygon")
    kind = _string(value["kind"], f"{path}.kind", choices=kinds)
    required, optional = _SHAPE_KEYS[kind]
    v = _object(value, path, required | {"kind"}, optional)
    if kind == "circle":
        return Circle(_point_from(v["center"], f"{path}.center", scale), _size(v["radius"], f"{path}.radius", scale))
    if kind == "ring":
        inner = _size(v["inner_radius"], f"{path}.inner_radius", scale)
        outer = _size(v["outer_radius"], f"{path}.outer_radius", scale)
        if not outer > inner:
            raise FieldProblem(f"{path}.outer_radius", f"must be greater than inner_radius ({inner:g}), got {outer:g}")
        return Ring(_point_from(v["center"], f"{path}.center", scale), inner, outer)
    if kind == "rectangle":
        width = _size(v["width"], f"{path}.width", scale)
        height = _size(v["height"], f"{path}.height", scale)
        radius = _number(v.get("corner_radius", 0.0), f"{path}.corner_radius", minimum=0.0)
        if radius > 0.5 * min(width, height) * (1 + 1e-12):
            raise FieldProblem(f"{path}.corner_radius", f"{radius:g} is more than half the smaller side ({0.5 * min(width, height):g})")
        return Rectangle(_point_from(v["center"], f"{path}.center", scale), width, height, radius)
    if kind == "polygon":
        exterior = _points_from(v["exterior"], f"{path}.exterior", 3, scale)
        holes = _list(v.get("holes", []), f"{path}.holes")
        return Polygon(exterior, tuple(_points_from(h, f"{path}.holes[{i}]", 3, scale) for i, h in enumerate(holes)))
    return Strip(_points_from(v["points"], f"{path}.points", 2, scale))


def _model_error(path: str, error: InvalidModelError) -> FieldProblem:
    return FieldProblem(path, str(error).rstrip("."))


def _conductor_from(value: Any, path: str, scale: float) -> Conductor:
    if not isinstance(value, dict):
        raise FieldProblem(path, f"expected a conductor object, got {_show(value)}")
    if "role" not in value:
        raise FieldProblem(f"{path}.role", f"missing (one of {', '.join(ROLES)})")
    role = _string(value["role"], f"{path}.role", choices=ROLES)
    if role != "fixed" and "potential_V" in value:
        raise FieldProblem(f"{path}.potential_V", f"only a 'fixed' conductor has a set potential (this one is '{role}')")
    if role != "floating" and "charge_C_per_m" in value:
        raise FieldProblem(f"{path}.charge_C_per_m", f"only a 'floating' conductor has a set charge (this one is '{role}')")
    v = _object(value, path, {"name", "role", "shapes"} | ({"potential_V"} if role == "fixed" else set()),
                _ROLE_KEYS[role] | {"color"})
    name = _string(v["name"], f"{path}.name", nonempty=True)
    color = v.get("color")
    if color is not None and not (isinstance(color, str) and _COLOR.match(color)):
        raise FieldProblem(f"{path}.color", f"expected a colour \"#rrggbb\", got {_show(color)}")
    shapes = _list(v["shapes"], f"{path}.shapes", 1, "shape")
    try:
        return Conductor(
            name,
            tuple(_shape_from(s, f"{path}.shapes[{i}]", True, scale) for i, s in enumerate(shapes)),
            role=role,
            potential_V=_number(v.get("potential_V", 0.0), f"{path}.potential_V"),
            charge_C_per_m=_number(v.get("charge_C_per_m", 0.0), f"{path}.charge_C_per_m"),
            color=color,
        )
    except InvalidModelError as e:
        raise _model_error(path, e) from None


def _dielectric_from(value: Any, path: str, scale: float) -> Dielectric:
    v = _object(value, path, {"name", "eps_r", "shapes"}, {"material"})
    name = _string(v["name"], f"{path}.name", nonempty=True)
    eps_r = _number(v["eps_r"], f"{path}.eps_r", minimum=1.0)
    material = None if v.get("material") is None else _string(v["material"], f"{path}.material")
    shapes = _list(v["shapes"], f"{path}.shapes", 1, "shape")
    try:
        return Dielectric(name, tuple(_shape_from(s, f"{path}.shapes[{i}]", False, scale) for i, s in enumerate(shapes)),
                          eps_r, material)
    except InvalidModelError as e:
        raise _model_error(path, e) from None


def _check_header(data: Any) -> None:
    if not isinstance(data, dict):
        raise FieldProblem("", f"expected a JSON object at the top level, got {_show(data)}")
    if data.get("format") != PROJECT_FORMAT_NAME:
        raise FieldProblem("format", f"not an Edgewise project (expected \"format\": \"{PROJECT_FORMAT_NAME}\", "
                             f"got {_show(data.get('format')) if 'format' in data else 'nothing'})")
    if "version" not in data:
        raise FieldProblem("version", "missing (this field is required)")
    version = data["version"]
    if isinstance(version, bool) or not isinstance(version, int):
        raise FieldProblem("version", f"expected a whole number, got {_show(version)}")
    if version > PROJECT_FORMAT_VERSION:
        raise FieldProblem("", f"version {_show(version)} is newer than this program understands ({PROJECT_FORMAT_VERSION}); "
                       "update Edgewise to open it")
    if version < 1:
        raise FieldProblem("version", f"{_show(version)} is not a valid format version (versions start at 1)")


def read_model(data: Any) -> Model:
    """The Model described by a project dictionary; raises FieldProblem on the first bad field."""
    _check_header(data)
    v = _object(data, "", {"format", "version", "unit", "conductors"}, _TOP_KEYS)
    unit = _string(v["unit"], "unit", choices=tuple(LENGTH_UNITS))
    scale = LENGTH_UNITS[unit]
    plane = v.get("ground_plane")
    if plane is not None:
        plane = GroundPlane(_coordinate(_object(plane, "ground_plane", {"y"}, set())["y"], "ground_plane.y", scale))
    extras = v.get("extras", {})
    if not isinstance(extras, dict):
        raise FieldProblem("extras", f"expected an object, got {_show(extras)}")
    conductors = tuple(_conductor_from(c, f"conductors[{i}]", scale) for i, c in enumerate(_list(v["conductors"], "conductors")))
    dielectrics = tuple(_dielectric_from(d, f"dielectrics[{i}]", scale) for i, d in enumerate(_list(v.get("dielectrics", []), "dielectrics")))
    try:
        return Model(
            unit=unit,
            conductors=conductors,
            dielectrics=dielectrics,
            ground_plane=plane,
            background_eps_r=_number(v.get("background_eps_r", 1.0), "background_eps_r", minimum=1.0),
            mesh_density=_string(v.get("mesh_density", "normal"), "mesh_density", choices=MESH_DENSITIES),
            title=_string(v.get("title", ""), "title"),
            description=_string(v.get("description", ""), "description"),
            extras=copy.deepcopy(extras),
        )
    except InvalidModelError as e:
        raise _model_error("conductors", e) from None
