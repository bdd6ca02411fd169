"""The model: what the user drew — shapes, conductors, roles, potentials, materials, unit.

A :class:`Model` is a plain, immutable value. Lengths inside it are in the model's own
``unit`` (one of :data:`LENGTH_UNITS`); the solver converts to SI metres when it meshes.
Potentials are in volts, net charges per unit length in coulombs per metre.

Example
-------
>>> from solver.model import Model, Conductor, Circle, Ring
>>> coax = Model(unit="mm", conductors=(
...     Conductor("inner", (Circle((0.0, 0.0), 1.0),), role="fixed", potential_V=1.0),
...     Conductor("shield", (Ring((0.0, 0.0), 3.5, 4.0),), role="reference"),
... ))
"""

from __future__ import annotations

import math
from dataclasses import dataclass, field, replace
from typing import Literal

from solver.errors import InvalidModelError
from solver.model.shapes import Circle, Polygon, Rectangle, Ring, Shape, Strip

__all__ = ["LENGTH_UNITS", "MESH_DENSITIES", "ROLES", "Circle", "Conductor", "Dielectric", "GroundPlane",
           "Model", "Polygon", "Rectangle", "Ring", "Shape", "Strip"]

#: Length units a model may use, with their size in metres.
LENGTH_UNITS: dict[str, float] = {
    "m": 1.0,
    "mm": 1e-3,
    "um": 1e-6,
    "mil": 25.4e-6,
    "inch": 25.4e-3,
}

#: Conductor roles: a fixed potential, floating with a given net charge, or the 0 V reference.
ROLES = ("fixed", "floating", "reference")
Role = Literal["fixed", "floating", "reference"]

#: Mesh densities, coarsest first.
MESH_DENSITIES = ("coarse", "normal", "fine")

@dataclass(frozen=True)
class Conductor:
    """One conductor: a name, one or more shapes (merged where they overlap) and a role.

    Parameters
    ----------
    name : str
        Unique, non-empty name.
    shapes : tuple of Shape
        The conductor's cross-section, model units.
    role : {"fixed", "floating", "reference"}
        ``fixed`` holds ``potential_V``; ``floating`` carries net charge ``charge_C_per_m``
        and takes whatever potential results; ``reference`` is held at 0 V and is the return
        path (it is left out of capacitance matrices).
    potential_V : float
        Potential of a fixed conductor, volts.
    charge_C_per_m : float
        Net charge per unit length of a floating conductor, C/m.
    color : str or None
        Display colour as ``#rrggbb`` (used by the desktop program only).
    """

    name: str
    shapes: tuple[Shape, ...]
    role: Role = "fixed"
    potential_V: float = 0.0
    charge_C_per_m: float = 0.0
    color: str | None = None

    def __post_init__(self) -> None:
        if not isinstance(self.name, str) or not self.name.strip():
            raise InvalidModelError("A conductor has an empty name; give every conductor a name.")
        if self.role not in ROLES:
            raise InvalidModelError(
                f"Conductor '{self.name}' has role '{self.role}'; use one of {', '.join(ROLES)}."
            )
        if not self.shapes:
            raise InvalidModelError(f"Conductor '{self.name}' has no shapes; draw at least one.")
        for label, value in (("potential_V", self.potential_V), ("charge_C_per_m", self.charge_C_per_m)):
            if not math.isfinite(value):
                raise InvalidModelError(f"Conductor '{self.name}': {label} is {value}; give a finite number.")

    @property
    def is_strip_only(self) -> bool:
        """True when every shape is a zero-thickness strip."""
        return not any(s.is_solid for s in self.shapes)


@dataclass(frozen=True)
class Dielectric:
    """A region of relative permittivity ``eps_r`` made of one or more shapes (not strips)."""

    name: str
    shapes: tuple[Shape, ...]
    eps_r: float
    material: str | None = None

    def __post_init__(self) -> None:
        if not isinstance(self.name, str) or not self.name.strip():
            raise InvalidModelError("A dielectric region has an empty name; give it a name.")
        if not (math.isfinite(self.eps_r) and self.eps_r >= 1.0):
            raise InvalidModelError(
                f"Dielectric '{self.name}': eps_r is {self.eps_r}; relative permittivity must be >= 1."
            )
        if not self.shapes:
            raise InvalidModelError(f"Dielectric '{self.name}' has no shapes.")


@dataclass(frozen=True)
class GroundPlane:
    """An infinite, grounded (0 V) conducting plane along the horizontal line y = ``y``.

    The field region is the half-plane above it (y > ``y``); every conductor must lie above.
    """

    y: float = 0.0


@dataclass(frozen=True)
class Model:
    """A whole cross-section: conductors, optional ground plane, permittivities, unit.

    Attributes
    ----------
    unit : str
        Length unit of every coordinate in the model (see :data:`LENGTH_UNITS`).
    conductors : tuple of Conductor
        In the order used for capacitance matrices (references left out).
    dielectrics : tuple of Dielectric
        Dielectric regions (used by the dielectric solver).
    ground_plane : GroundPlane or None
        Optional infinite grounded plane.
    background_eps_r : float
        Relative permittivity of the surrounding medium.
    mesh_density : {"coarse", "normal", "fine"}
        How finely boundaries are divided into panels.
    title, description : str
        Free text for the user.
    """

    unit: str = "mm"
    conductors: tuple[Conductor, ...] = ()
    dielectrics: tuple[Dielectric, ...] = ()
    ground_plane: GroundPlane | None = None
    background_eps_r: float = 1.0
    mesh_density: str = "normal"
    title: str = ""
    description: str = ""
    extras: dict = field(default_factory=dict, compare=False, hash=False)

    def __post_init__(self) -> None:
        if self.unit not in LENGTH_UNITS:
            raise InvalidModelError(
                f"Length unit '{self.unit}' is not known; use one of {', '.join(LENGTH_UNITS)}."
            )
        if self.mesh_density not in MESH_DENSITIES:
            raise InvalidModelError(
                f"Mesh density '{self.mesh_density}' is not known; use one of {', '.join(MESH_DENSITIES)}."
            )
        if not (math.isfinite(self.background_eps_r) and self.background_eps_r >= 1.0):
            raise InvalidModelError(
                f"Background relative permittivity is {self.background_eps_r}; it must be >= 1."
            )
        names = [c.name for c in self.conductors]
        duplicated = sorted({n for n in names if names.count(n) > 1})
        if duplicated:
            raise InvalidModelError(
                f"Conductor name '{duplicated[0]}' is used more than once; names must be unique."
            )

    # ---- reading ---------------------------------------------------------------------------
    @property
    def metres_per_unit(self) -> float:
        """Size of the model's length unit in metres."""
        return LENGTH_UNITS[self.unit]

    @property
    def conductor_names(self) -> tuple[str, ...]:
        return tuple(c.name for c in self.conductors)

    def conductor(self, name: str) -> Conductor:
        """The conductor called ``name`` (KeyError with the known names if there is none)."""
        for c in self.conductors:
            if c.name == name:
                return c
        raise KeyError(f"No conductor named '{name}'; the model has {', '.join(self.conductor_names)}.")

    @property
    def signal_names(self) -> tuple[str, ...]:
        """Names of the fixed-potential conductors: the rows of the capacitance matrix."""
        return tuple(c.name for c in self.conductors if c.role == "fixed")

    @property
    def has_return_path(self) -> bool:
        """True when a reference conductor or a ground plane exists."""
        return self.ground_plane is not None or any(c.role == "reference" for c in self.conductors)

    # ---- copies ----------------------------------------------------------------------------
    def with_potentials(self, potentials_V: dict[str, float]) -> Model:
        """A copy with the named fixed conductors set to new potentials (volts)."""
        unknown = set(potentials_V) - set(self.conductor_names)
        if unknown:
            raise KeyError(f"No conductor named '{sorted(unknown)[0]}'.")
        return replace(
            self,
            conductors=tuple(
                replace(c, potential_V=float(potentials_V[c.name])) if c.name in potentials_V else c
                for c in self.conductors
            ),
        )

    def with_conductors(self, conductors: tuple[Conductor, ...]) -> Model:
        """A copy with a new tuple of conductors."""
        return replace(self, conductors=tuple(conductors))

    def with_mesh_density(self, density: str) -> Model:
        """A copy meshed at another density ("coarse", "normal" or "fine")."""
        return replace(self, mesh_density=density)

    def with_unit(self, unit: str) -> Model:
        """A copy whose numbers are reinterpreted in ``unit`` (no conversion of the numbers)."""
        return replace(self, unit=unit)

    def converted_to(self, unit: str) -> Model:
        """A copy of the same physical model expressed in another length unit."""
        if unit not in LENGTH_UNITS:
            raise InvalidModelError(f"Length unit '{unit}' is not known.")
        return self.scaled(LENGTH_UNITS[self.unit] / LENGTH_UNITS[unit]).with_unit(unit)

    def scaled(self, factor: float) -> Model:
        """A copy with every coordinate and length multiplied by ``factor``."""
        return self._mapped(lambda s: s.scaled(factor), lambda y: y * factor)

    def translated(self, dx: float, dy: float) -> Model:
        """A copy moved by (dx, dy) model units (the ground plane moves with it)."""
        return self._mapped(lambda s: s.translated(dx, dy), lambda y: y + dy)

    def _mapped(self, shape_map, plane_y_map) -> Model:
        plane = self.ground_plane
        if plane is not None:
            plane = GroundPlane(plane_y_map(plane.y))
        return replace(
            self,
            conductors=tuple(replace(c, shapes=tuple(map(shape_map, c.shapes))) for c in self.conductors),
            dielectrics=tuple(replace(d, shapes=tuple(map(shape_map, d.shapes))) for d in self.dielectrics),
            ground_plane=plane,
        )

    def bounds(self) -> tuple[float, float, float, float] | None:
        """(xmin, ymin, xmax, ymax) of every conductor and dielectric shape, model units; None if empty."""
        parts: tuple[Conductor | Dielectric, ...] = (*self.conductors, *self.dielectrics)
        boxes = [s.bounds() for part in parts for s in part.shapes]
        boxes = [b for b in boxes if all(math.isfinite(v) for v in b)]
        if not boxes:
            return None
        return (min(b[0] for b in boxes), min(b[1] for b in boxes), max(b[2] for b in boxes), max(b[3] for b in boxes))

    def largest_dimension(self) -> float:
        """Largest extent of the cross-section (its shapes, and down to a ground plane), model units."""
        box = self.bounds()
        if box is None:
            return 0.0
        x0, y0, x1, y1 = box
        if self.ground_plane is not None:
            y0 = min(y0, self.ground_plane.y)
        return max(x1 - x0, y1 - y0)
