"""Edits of a Model as pure functions: each takes a Model and returns a new one (Qt-free).

Shapes are addressed by :class:`app.document.PartRef`. Invalid values raise the solver's
``InvalidModelError`` with a message naming the part and the field.
"""

from __future__ import annotations

from dataclasses import replace

from app.colours import CONDUCTOR_PALETTE
from app.document import PartRef
from solver import Conductor, GroundPlane, InvalidModelError, Model, Shape, dielectric_of

#: Colours given to new conductors in turn (the one identity palette, app.colours).
PALETTE = CONDUCTOR_PALETTE


def unique_name(model: Model, stem: str = "conductor") -> str:
    """The first of "stem 1", "stem 2", ... not used by a conductor of ``model``."""
    taken = set(model.conductor_names)
    n = 1
    while f"{stem} {n}" in taken:
        n += 1
    return f"{stem} {n}"


def add_conductor(model: Model, shape: Shape, potential_V: float = 0.0) -> tuple[Model, PartRef]:
    """Add a new fixed-potential conductor made of ``shape``; returns the model and its ref."""
    name = unique_name(model)
    color = PALETTE[len(model.conductors) % len(PALETTE)]
    conductor = Conductor(name, (shape,), role="fixed", potential_V=potential_V, color=color)
    new = model.with_conductors(model.conductors + (conductor,))
    return new, PartRef("conductor", len(new.conductors) - 1, 0)


def add_dielectric(model: Model, shape: Shape, material_name: str = "FR-4") -> tuple[Model, PartRef]:
    """Add a dielectric region of a library material made of ``shape``; returns the model and its ref."""
    taken = {d.name for d in model.dielectrics}
    n = 1
    while f"region {n}" in taken:
        n += 1
    region = dielectric_of(f"region {n}", (shape,), material_name)
    new = replace(model, dielectrics=model.dielectrics + (region,))
    return new, PartRef("dielectric", len(new.dielectrics) - 1, 0)


def update_dielectric(model: Model, index: int, **changes) -> Model:
    """A copy with dielectric region ``index`` changed (name, eps_r, material)."""
    regions = list(model.dielectrics)
    regions[index] = replace(regions[index], **changes)
    return replace(model, dielectrics=tuple(regions))


def _parts(model: Model, kind: str):
    return model.conductors if kind == "conductor" else model.dielectrics


def _with_parts(model: Model, kind: str, parts) -> Model:
    key = "conductors" if kind == "conductor" else "dielectrics"
    return replace(model, **{key: tuple(parts)})


def shape_of(model: Model, ref: PartRef) -> Shape | None:
    """The shape ``ref`` points at (None for the ground plane)."""
    if ref.kind == "plane":
        return None
    return _parts(model, ref.kind)[ref.index].shapes[ref.shape]


def replace_shape(model: Model, ref: PartRef, shape: Shape) -> Model:
    """A copy with the shape at ``ref`` replaced."""
    parts = list(_parts(model, ref.kind))
    part = parts[ref.index]
    new_shapes = list(part.shapes)
    new_shapes[ref.shape] = shape
    parts[ref.index] = replace(part, shapes=tuple(new_shapes))
    return _with_parts(model, ref.kind, parts)


def move_part(model: Model, ref: PartRef, dx: float, dy: float) -> Model:
    """A copy with the part at ``ref`` moved by (dx, dy) model units (the plane moves in y)."""
    if ref.kind == "plane":
        return set_ground_plane(model, model.ground_plane.y + dy)
    return replace_shape(model, ref, shape_of(model, ref).translated(dx, dy))


def delete_part(model: Model, ref: PartRef) -> Model:
    """A copy without the part at ``ref``; a conductor left with no shapes goes too."""
    if ref.kind == "plane":
        return replace(model, ground_plane=None)
    parts = list(_parts(model, ref.kind))
    part = parts[ref.index]
    rest = part.shapes[:ref.shape] + part.shapes[ref.shape + 1:]
    if rest:
        parts[ref.index] = replace(part, shapes=rest)
    else:
        del parts[ref.index]
    return _with_parts(model, ref.kind, parts)


def duplicate_part(model: Model, ref: PartRef, dx: float, dy: float) -> tuple[Model, PartRef]:
    """A copy with the shape at ``ref`` repeated, moved by (dx, dy), as a new conductor."""
    shape = shape_of(model, ref).translated(dx, dy)
    source = model.conductors[ref.index] if ref.kind == "conductor" else None
    new, new_ref = add_conductor(model, shape, source.potential_V if source else 0.0)
    if source is not None:
        conductors = list(new.conductors)
        conductors[-1] = replace(conductors[-1], role=source.role, charge_C_per_m=source.charge_C_per_m)
        new = new.with_conductors(tuple(conductors))
    return new, new_ref


def update_conductor(model: Model, index: int, **changes) -> Model:
    """A copy with conductor ``index`` changed (name, role, potential_V, charge_C_per_m, color).

    Raises InvalidModelError for an empty or duplicate name or a bad value.
    """
    conductors = list(model.conductors)
    old = conductors[index]
    if "name" in changes:
        changes["name"] = str(changes["name"]).strip()
        if changes["name"] != old.name and changes["name"] in model.conductor_names:
            raise InvalidModelError(f"Name '{changes['name']}' is already used by another conductor; pick another.")
    conductors[index] = replace(old, **changes)
    return model.with_conductors(tuple(conductors))


def move_shape_to(model: Model, ref: PartRef, target: str | None) -> tuple[Model, PartRef]:
    """Move the shape at ``ref`` into conductor ``target`` (None: a new conductor of its own)."""
    shape = shape_of(model, ref)
    source_name = model.conductors[ref.index].name
    if target == source_name:
        return model, ref
    rest = delete_part(model, ref)
    if target is None:
        new, new_ref = add_conductor(rest, shape, model.conductors[ref.index].potential_V)
        return new, new_ref
    conductors = list(rest.conductors)
    i = rest.conductor_names.index(target)
    conductors[i] = replace(conductors[i], shapes=conductors[i].shapes + (shape,))
    return rest.with_conductors(tuple(conductors)), PartRef("conductor", i, len(conductors[i].shapes) - 1)


def set_ground_plane(model: Model, y: float | None) -> Model:
    """A copy with a ground plane at height ``y`` (None removes it)."""
    return replace(model, ground_plane=None if y is None else GroundPlane(float(y)))


def update_model(model: Model, **changes) -> Model:
    """A copy with model-level fields changed (unit, mesh_density, background_eps_r, title...)."""
    return replace(model, **changes)


def convert_unit(model: Model, unit: str) -> Model:
    """The same physical cross-section expressed in another length unit (numbers converted).

    The part length kept in ``extras`` is converted too.
    """
    new = model.converted_to(unit)
    length = model.extras.get("part_length")
    if length:
        new = set_extra(new, "part_length", length * model.metres_per_unit / new.metres_per_unit)
    return new


def set_extra(model: Model, key: str, value) -> Model:
    """A copy whose ``extras`` (view settings kept in the file) has ``key`` set to ``value``."""
    extras = dict(model.extras)
    extras[key] = value
    return replace(model, extras=extras)


def align_to(model: Model, ref: PartRef, other: PartRef, how: str) -> Model:
    """Move the shape at ``ref`` so that it lines up with ``other``.

    ``how`` is "centre x", "centre y", "left", "right", "top" or "bottom".
    """
    a = shape_of(model, ref).bounds()
    b = shape_of(model, other).bounds()
    dx = dy = 0.0
    if how == "centre x":
        dx = (b[0] + b[2]) / 2 - (a[0] + a[2]) / 2
    elif how == "centre y":
        dy = (b[1] + b[3]) / 2 - (a[1] + a[3]) / 2
    elif how == "left":
        dx = b[0] - a[0]
    elif how == "right":
        dx = b[2] - a[2]
    elif how == "bottom":
        dy = b[1] - a[1]
    elif how == "top":
        dy = b[3] - a[3]
    else:
        raise ValueError(f"Unknown alignment '{how}'.")
    return move_part(model, ref, dx, dy)
