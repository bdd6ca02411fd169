"""Field paths: name any number in a project by a plain dotted path.

A path walks the project dictionary (the JSON project format, :func:`solver.model_to_dict`)
one step per dot:

- a key of an object: ``background_eps_r``, ``ground_plane.y``;
- in the ``conductors`` and ``dielectrics`` lists, the part's **name**:
  ``conductors.trace``, ``dielectrics.board``;
- in any other list, a **0-based index**: ``shapes.0``, ``center.1`` (the y of a centre),
  ``exterior.2.0`` (x of the third vertex).

Examples: ``conductors.trace.shapes.0.width``, ``dielectrics.board.eps_r``,
``conductors.L1.potential_V``, ``conductors.wire.shapes.0.center.1``.

Several paths joined by ``+`` move together as one parameter (all get the same value), e.g.
``conductors.L1.shapes.0.corner_radius+conductors.L2.shapes.0.corner_radius``.
Lengths are in the project's own ``unit``; potentials in volts.
"""

from __future__ import annotations

import copy
from collections.abc import Mapping
from typing import Any

from solver.errors import SolverError
from solver.io.project_file import model_from_dict, model_to_dict
from solver.model.model import Model

#: Lists whose items are chosen by their ``name`` rather than by index.
NAMED_LISTS = ("conductors", "dielectrics")


class FieldPathError(SolverError):
    """A field path does not lead to a number in the project."""


def split_parameter(parameter: str) -> tuple[str, ...]:
    """The field paths of one parameter (``a.b+c.d`` -> ``("a.b", "c.d")``)."""
    paths = tuple(p.strip() for p in parameter.split("+"))
    if not all(paths):
        raise FieldPathError(f"Parameter '{parameter}' has an empty path; write e.g. 'conductors.trace.shapes.0.width'.")
    return paths


def _step(container: Any, key: str, parent: str, path: str) -> Any:
    if isinstance(container, dict):
        if key not in container:
            known = ", ".join(sorted(map(str, container))) or "nothing"
            raise FieldPathError(f"Path '{path}': '{parent}' has no field '{key}'; it has {known}.")
        return container[key]
    if isinstance(container, list):
        if parent.split(".")[-1] in NAMED_LISTS:
            for item in container:
                if isinstance(item, dict) and item.get("name") == key:
                    return item
            names = ", ".join(str(i.get("name")) for i in container if isinstance(i, dict)) or "none"
            raise FieldPathError(f"Path '{path}': no part named '{key}' in '{parent}'; the names are {names}.")
        try:
            index = int(key)
        except ValueError:
            raise FieldPathError(f"Path '{path}': '{parent}' is a list; give a 0-based index, not '{key}'.") from None
        if not 0 <= index < len(container):
            raise FieldPathError(f"Path '{path}': index {index} is out of range; '{parent}' has {len(container)} items.")
        return container[index]
    raise FieldPathError(f"Path '{path}': '{parent}' is a number or text, so it has no field '{key}'.")


def _parent_and_key(data: dict, path: str) -> tuple[Any, str | int]:
    keys = path.split(".")
    node: Any = data
    walked = "<project>"
    for key in keys[:-1]:
        node = _step(node, key, walked, path)
        walked = key if walked == "<project>" else f"{walked}.{key}"
    last = keys[-1]
    _step(node, last, walked, path)  # raises with a plain message when missing
    if isinstance(node, list):
        return node, int(last)
    return node, last


def get_value(project: Mapping, path: str) -> float:
    """The number at ``path`` in a project dictionary.

    Raises
    ------
    FieldPathError
        When the path does not exist or does not end at a number.

    Examples
    --------
    >>> from solver import load_project, model_to_dict
    >>> d = model_to_dict(load_project("sample_geometries/microstrip_on_substrate.json"))
    >>> get_value(d, "conductors.trace.shapes.0.width")
    3.0
    """
    node, key = _parent_and_key(dict(project), path)
    value = node[key]
    if isinstance(value, bool) or not isinstance(value, (int, float)):
        raise FieldPathError(f"Path '{path}' leads to {value!r}, not a number; choose a numeric field.")
    return float(value)


def with_values(project: Mapping, values: Mapping[str, float]) -> dict:
    """A deep copy of a project dictionary with each parameter (one or more ``+``-joined paths) set.

    Parameters
    ----------
    project : dict
        A project dictionary (lengths in its ``unit``).
    values : mapping of parameter -> float
        New values, in the project's units (lengths) or SI (potentials in V).
    """
    out = copy.deepcopy(dict(project))
    for parameter, value in values.items():
        for path in split_parameter(parameter):
            get_value(out, path)  # checks it is a number
            node, key = _parent_and_key(out, path)
            node[key] = float(value)
    return out


def model_with_values(model: Model, values: Mapping[str, float]) -> Model:
    """A copy of ``model`` with the parameters in ``values`` set (checked like a project file).

    Examples
    --------
    >>> from solver import load_project
    >>> m = load_project("sample_geometries/microstrip_on_substrate.json")
    >>> model_with_values(m, {"conductors.trace.shapes.0.width": 2.5}).conductor("trace").shapes[0].width
    2.5
    """
    return model_from_dict(with_values(model_to_dict(model), values), source="study case")
