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
from typing import Any, cast

from solver.errors import InvalidModelError
from solver.model.model import (
    LENGTH_UNITS,
    MESH_DENSITIES,
    ROLES,
    Conductor,
    Dielectric,
    GroundPlane,
    Model,
    Role,
    Shape,
)
from solver.model.outline_checks import LARGEST_LENGTH_M, SMALLEST_LENGTH_M
from solver.model.shapes import SHAPE_KINDS

#: Version of the project format written by this program (files up to it can be read).
PROJECT_FORMAT_VERSION = 1

#: Value of the ``format`` marker that identifies an Edgewise project file.
PROJECT_FORMAT_NAME = "edgewise-project"

_COLOR = re.compile(r"^#[0-9a-fA-F]{6}$")
_TOP_KEYS = {"$schema", "format", "version", "unit", "title", "description", "background_eps_r",
             "mesh_density", "ground_plane", "conductors", "dielectrics", "extras", "air_conditions",
             "voltage_basis"}
_SHAPE_KEYS = {kind: (set(cls.required_fields), set(cls.optional_fields)) for kind, cls in SHAPE_KINDS.items()}
#: Key under which the project's air conditions are kept in ``Model.extras``
#: (:func:`solver.air_conditions_of` reads them).
AIR_CONDITIONS_KEY = "air_conditions"
#: Key under which the project's voltage basis is kept in ``Model.extras``
#: (:func:`solver.voltage_basis_of` reads it).
VOLTAGE_BASIS_KEY = "voltage_basis"
_VOLTAGE_BASES = ("operating", "power_frequency_withstand", "lightning_impulse", "factor")
#: Altitudes the standard-atmosphere pressure formula holds for, m (as solver.hot_spots.margins).
ALTITUDE_RANGE_M = (-500.0, 11_000.0)
_PEEK_FORMS = ("parallel_wires", "coaxial")
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


#: Largest potential a project may set (volts): beyond the highest transmission voltages by
#: far, so a larger one is a typing or unit slip (common practice: UHV lines run at about 1 MV).
LARGEST_POTENTIAL_V = 1e8


def _potential(value: Any, path: str) -> float:
    v = _number(value, path)
    if abs(v) > LARGEST_POTENTIAL_V:
        raise FieldProblem(path, f"{v:.6g} V is more than {LARGEST_POTENTIAL_V / 1e6:g} MV in size; potentials are in "
                                 "volts: check the number and the unit")
    return v


def _show_length(x: float, scale: float) -> str:
    """A length as read (model units) and in metres, for messages: "1e-09 (1e-12 m)"."""
    return f"{x:.6g} ({x * scale:.3g} m)"


def _coordinate(value: Any, path: str, scale: float) -> float:
    x = _number(value, path)
    if abs(x) * scale > LARGEST_LENGTH_M:
        raise FieldProblem(path, f"{_show_length(x, scale)} is more than {LARGEST_LENGTH_M:g} m from the origin; "
                                 "check the number and the unit")
    return x


def _size(value: Any, path: str, scale: float) -> float:
    """A positive length (radius, width...) within the range the mesher handles."""
    x = _number(value, path, positive=True)
    if x * scale > LARGEST_LENGTH_M:
        raise FieldProblem(path, f"{_show_length(x, scale)} is larger than {LARGEST_LENGTH_M:g} m; "
                                 "check the number and the unit")
    if x * scale < SMALLEST_LENGTH_M:
        raise FieldProblem(path, f"{_show_length(x, scale)} is smaller than {SMALLEST_LENGTH_M:g} m; "
                                 "check the number and the unit")
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
    return SHAPE_KINDS[kind].from_dict(v, _ShapeFieldReader(v, path, scale))


class _ShapeFieldReader:
    """Reads one shape's fields for :meth:`Shape.from_dict`, raising FieldProblem with the path."""

    def __init__(self, data: dict, path: str, scale: float) -> None:
        self.data, self.path, self.scale = data, path, scale  # scale: metres per model unit

    def number(self, key: str, *, positive: bool = False, minimum: float | None = None) -> float:
        if positive:  # a length: also refused when absurdly large or small in metres
            return _size(self.data.get(key), f"{self.path}.{key}", self.scale)
        default = 0.0 if minimum is not None else None
        return _number(self.data.get(key, default), f"{self.path}.{key}", positive=positive, minimum=minimum)

    def point(self, key: str) -> tuple[float, float]:
        return _point_from(self.data[key], f"{self.path}.{key}", self.scale)

    def points(self, key: str, min_items: int) -> tuple[tuple[float, float], ...]:
        return _points_from(self.data[key], f"{self.path}.{key}", min_items, self.scale)

    def point_lists(self, key: str, min_items: int) -> tuple[tuple[tuple[float, float], ...], ...]:
        items = _list(self.data.get(key, []), f"{self.path}.{key}")
        return tuple(_points_from(h, f"{self.path}.{key}[{i}]", min_items, self.scale) for i, h in enumerate(items))

    def problem(self, key: str, reason: str) -> Exception:
        return FieldProblem(f"{self.path}.{key}", reason)


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
            role=cast(Role, role),  # _string checked it against ROLES
            potential_V=_potential(v.get("potential_V", 0.0), f"{path}.potential_V"),
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


def _air_conditions_from(value: Any, path: str) -> dict:
    """The project's air conditions, checked field by field (see docs/project_file.md)."""
    v = _object(value, path, set(), {"altitude_m", "pressure_kPa", "relative_air_density", "temperature_C",
                                     "surface_factor", "peek_form"})
    given = [k for k in ("altitude_m", "pressure_kPa", "relative_air_density") if k in v]
    if len(given) > 1:
        raise FieldProblem(f"{path}.{given[1]}", f"give one of altitude_m, pressure_kPa and relative_air_density, "
                                                 f"not both {given[0]} and {given[1]}")
    out: dict = {}
    if "altitude_m" in v:
        altitude = _number(v["altitude_m"], f"{path}.altitude_m")
        low, high = ALTITUDE_RANGE_M
        if not low <= altitude <= high:
            raise FieldProblem(f"{path}.altitude_m", f"{altitude:g} m is outside {low:g} to {high:g} m, where the "
                                                     "standard-atmosphere pressure formula holds; give pressure_kPa")
        out["altitude_m"] = altitude
    if "pressure_kPa" in v:
        out["pressure_kPa"] = _number(v["pressure_kPa"], f"{path}.pressure_kPa", positive=True)
    if "relative_air_density" in v:
        out["relative_air_density"] = _number(v["relative_air_density"], f"{path}.relative_air_density", positive=True)
    if "temperature_C" in v:
        t = _number(v["temperature_C"], f"{path}.temperature_C")
        if not t > -273.15:
            raise FieldProblem(f"{path}.temperature_C", f"{t:g} degC is below absolute zero")
        out["temperature_C"] = t
    if "surface_factor" in v:
        m = _number(v["surface_factor"], f"{path}.surface_factor", positive=True)
        if m > 1:
            raise FieldProblem(f"{path}.surface_factor", f"{m:g} is above 1 (1 = smooth, ~0.85 stranded)")
        out["surface_factor"] = m
    if "peek_form" in v:
        out["peek_form"] = _string(v["peek_form"], f"{path}.peek_form", choices=_PEEK_FORMS)
    return out


def _voltage_basis_from(value: Any, path: str) -> dict:
    """The project's voltage basis, checked field by field (see docs/project_file.md).

    Missing keys mean operating voltage, crest values (what files without the field meant).
    """
    v = _object(value, path, set(), {"basis", "potentials", "factor"})
    basis = _string(v.get("basis", "operating"), f"{path}.basis", choices=_VOLTAGE_BASES)
    potentials = _string(v.get("potentials", "crest"), f"{path}.potentials", choices=("crest", "rms"))
    out: dict = {"basis": basis, "potentials": potentials}
    if "factor" in v:
        factor = _number(v["factor"], f"{path}.factor", positive=True)
        if basis != "factor" and factor != 1.0:
            raise FieldProblem(f"{path}.factor", f"{factor:g} is given with basis '{basis}', which takes no factor; "
                                                 "use basis 'factor'")
        if factor > 100:
            raise FieldProblem(f"{path}.factor", f"{factor:g} is above 100; an overvoltage factor is a few units")
        if basis == "factor":
            out["factor"] = factor
    if basis == "lightning_impulse" and potentials == "rms":
        raise FieldProblem(f"{path}.potentials", "a lightning impulse has no rms value; give 'crest'")
    return out


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
    extras = copy.deepcopy(extras)
    if AIR_CONDITIONS_KEY in extras:  # kept there by a script: checked like the top-level field
        extras[AIR_CONDITIONS_KEY] = _air_conditions_from(extras[AIR_CONDITIONS_KEY], f"extras.{AIR_CONDITIONS_KEY}")
    if AIR_CONDITIONS_KEY in v:
        extras[AIR_CONDITIONS_KEY] = _air_conditions_from(v[AIR_CONDITIONS_KEY], AIR_CONDITIONS_KEY)
    if VOLTAGE_BASIS_KEY in extras:  # kept there by a script: checked like the top-level field
        extras[VOLTAGE_BASIS_KEY] = _voltage_basis_from(extras[VOLTAGE_BASIS_KEY], f"extras.{VOLTAGE_BASIS_KEY}")
    if VOLTAGE_BASIS_KEY in v:
        extras[VOLTAGE_BASIS_KEY] = _voltage_basis_from(v[VOLTAGE_BASIS_KEY], VOLTAGE_BASIS_KEY)
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
            extras=extras,
        )
    except InvalidModelError as e:
        raise _model_error("conductors", e) from None
