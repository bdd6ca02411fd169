"""The Edgewise project file: one versioned JSON format for the desktop program, CLI and scripts.

A project file is a JSON object::

    {"format": "edgewise-project", "version": 1, "unit": "mm",
     "title": "...", "description": "...", "background_eps_r": 1.0, "mesh_density": "normal",
     "ground_plane": {"y": 0.0},
     "conductors": [{"name": "inner", "role": "fixed", "potential_V": 1.0,
                     "shapes": [{"kind": "circle", "center": [0, 0], "radius": 1.0}]}],
     "dielectrics": [], "extras": {},
     "air_conditions": {"altitude_m": 1500, "temperature_C": 20, "surface_factor": 0.9}}

Lengths are in the file's ``unit``; potentials in volts, charges in coulombs per metre.
``docs/project_file.md`` describes every field and ``solver/project_schema.json`` is the JSON
Schema of the format. Reading (:mod:`solver.project_reading`) checks every field and raises
:class:`ProjectFileError` with one line naming the file, the field path and the reason, e.g.
``coax.json: conductors[1].shapes[0].radius: expected a number, got "abc"``.
"""

from __future__ import annotations

import copy
import json
import os
import tempfile
from pathlib import Path
from typing import Any

from solver.errors import ProjectFileError
from solver.io.project_reading import (
    AIR_CONDITIONS_KEY,
    PROJECT_FORMAT_NAME,
    PROJECT_FORMAT_VERSION,
    VOLTAGE_BASIS_KEY,
    FieldProblem,
    read_model,
)
from solver.model.model import Conductor, Model, Shape


# ---- writing ---------------------------------------------------------------------------------
def _shape_to_dict(shape: Shape) -> dict:
    return shape.to_dict()


def _conductor_to_dict(c: Conductor) -> dict:
    out: dict[str, Any] = {"name": c.name, "role": c.role}
    if c.role == "fixed":
        out["potential_V"] = float(c.potential_V)
    elif c.role == "floating":
        out["charge_C_per_m"] = float(c.charge_C_per_m)
    if c.color is not None:
        out["color"] = c.color
    out["shapes"] = [_shape_to_dict(s) for s in c.shapes]
    return out


def model_to_dict(model: Model) -> dict:
    """The project-file dictionary of a model (JSON-ready; lengths in ``model.unit``).

    Parameters
    ----------
    model : Model

    Returns
    -------
    dict
        With ``format``, ``version`` and every model field; ``extras`` is deep-copied.

    Examples
    --------
    >>> from solver import Model, Conductor, Circle
    >>> d = model_to_dict(Model(conductors=(Conductor("w", (Circle((0, 0), 1.0),)),)))
    >>> d["format"], d["version"], d["conductors"][0]["shapes"][0]["kind"]
    ('edgewise-project', 1, 'circle')
    """
    out: dict[str, Any] = {
        "format": PROJECT_FORMAT_NAME,
        "version": PROJECT_FORMAT_VERSION,
        "title": model.title,
        "description": model.description,
        "unit": model.unit,
        "background_eps_r": float(model.background_eps_r),
        "mesh_density": model.mesh_density,
    }
    if model.ground_plane is not None:
        out["ground_plane"] = {"y": float(model.ground_plane.y)}
    out["conductors"] = [_conductor_to_dict(c) for c in model.conductors]
    out["dielectrics"] = []
    for d in model.dielectrics:
        entry: dict[str, Any] = {"name": d.name, "eps_r": float(d.eps_r)}
        if d.material is not None:
            entry["material"] = d.material
        entry["shapes"] = [_shape_to_dict(s) for s in d.shapes]
        out["dielectrics"].append(entry)
    extras = copy.deepcopy(dict(model.extras))
    air = extras.pop(AIR_CONDITIONS_KEY, None)
    if air is not None:  # the project's one set of air conditions (solver.air_conditions_of)
        out[AIR_CONDITIONS_KEY] = air
    basis = extras.pop(VOLTAGE_BASIS_KEY, None)
    if basis is not None:  # what the potentials stand for (solver.voltage_basis_of)
        out[VOLTAGE_BASIS_KEY] = basis
    out["extras"] = extras
    return out


def model_from_dict(data: Any, source: str = "<data>") -> Model:
    """Build a :class:`Model` from a project-file dictionary, checking every field.

    Parameters
    ----------
    data : dict
        As produced by :func:`model_to_dict` or read from a project file.
    source : str
        Name used at the start of error messages (usually the file name).

    Raises
    ------
    ProjectFileError
        One line: ``"<source>: <field path>: <reason>"``.
    """
    try:
        return read_model(data)
    except FieldProblem as e:
        raise ProjectFileError(f"{source}: {e}") from None
    except RecursionError:
        raise ProjectFileError(f"{source}: extras: nested too deeply to read; flatten it") from None


def load_project(path: str | os.PathLike) -> Model:
    """Read a project file and return its :class:`Model` (lengths in the file's unit).

    Raises
    ------
    ProjectFileError
        When the file is missing or unreadable, not JSON, of a newer version, or has a
        missing, unknown or ill-typed field; the one-line message names the file and field.

    Examples
    --------
    >>> model = load_project("sample_geometries/coaxial_feeder.json")  # doctest: +SKIP
    """
    source = str(path)
    try:
        text = Path(path).read_text(encoding="utf-8-sig")  # a byte-order mark is accepted
    except FileNotFoundError:
        raise ProjectFileError(f"{source}: file not found") from None
    except IsADirectoryError:
        raise ProjectFileError(f"{source}: is a directory, not a project file") from None
    except UnicodeDecodeError:
        raise ProjectFileError(f"{source}: not a text file (not UTF-8)") from None
    except OSError as e:
        raise ProjectFileError(f"{source}: cannot be read ({e.strerror or e})") from None
    try:
        data = json.loads(text, parse_constant=_reject_constant)
    except json.JSONDecodeError as e:
        raise ProjectFileError(f"{source}: not JSON (line {e.lineno}, column {e.colno}: {e.msg})") from None
    except RecursionError:
        raise ProjectFileError(f"{source}: not a project file: lists or objects nested too deeply to read") from None
    except ValueError as e:
        raise ProjectFileError(f"{source}: {e}") from None
    return model_from_dict(data, source)


def _reject_constant(name: str) -> float:
    raise ValueError(f"not valid JSON: {name} is not allowed; write a finite number")


def save_project(model: Model, path: str | os.PathLike) -> None:
    """Write ``model`` to a project file atomically (temporary file, then ``os.replace``).

    A crash or a full disk leaves any existing file at ``path`` untouched. When ``path`` is
    a symbolic link, the file it points to is replaced and the link is kept.

    Raises
    ------
    ProjectFileError
        When the model cannot be written (e.g. ``extras`` holds something not JSON, or the
        folder is not writable).
    """
    target = Path(os.path.realpath(path))  # through a symbolic link: write the file it points to
    try:
        text = json.dumps(model_to_dict(model), indent=2, ensure_ascii=False, allow_nan=False) + "\n"
    except (TypeError, ValueError) as e:
        raise ProjectFileError(f"{target}: cannot write the model as JSON ({e})") from None
    tmp_name = None
    try:
        fd, tmp_name = tempfile.mkstemp(prefix=f".{target.name}.", suffix=".tmp", dir=target.parent or ".")
        os.chmod(tmp_name, target.stat().st_mode & 0o7777 if target.exists() else 0o644)
        with os.fdopen(fd, "w", encoding="utf-8") as f:
            f.write(text)
            f.flush()
            os.fsync(f.fileno())
        os.replace(tmp_name, target)
        tmp_name = None
    except OSError as e:
        raise ProjectFileError(f"{target}: cannot be written ({e.strerror or e})") from None
    finally:
        if tmp_name is not None and os.path.exists(tmp_name):
            os.unlink(tmp_name)
