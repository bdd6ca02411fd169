"""Cross-check of an equivalent radius: the solver's value against two independent routes.

For a conductor (or conductors tied together) taken alone:

- the solver: equivalent radius (logarithmic capacity) from its boundary-element equilibrium
  charge (:func:`solver.equilibrium_charge`), with its change against a mesh at half the
  resolution as error estimate; shown also as the Robin constant and the distance beyond which
  the conductor looks like its round wire;
- Fekete points: the N-th diameter delta_N for several N, and its limit;
- Chebyshev constant: ||F_N||^(1/N) of the Fekete polynomial, and its limit.

The two routes share with the solver only the outline and the starting positions of the points
(which change how fast the optimiser gets there, not where it ends). Each finite-N value is an
upper bound of the capacity (T. Ransford, Potential Theory in the Complex Plane, 1995,
Theorems 5.5.2 and 5.5.4), and the limits must match the solver within their expected
convergence: the route agrees when the relative difference is within
max(ROUTE_FLOOR, 3 x the fit's uncertainty) + 2 x the solver's estimated error.
"""

from __future__ import annotations

import math
from collections.abc import Iterable, Sequence
from dataclasses import dataclass, replace

import numpy as np

from solver.cross_check.chebyshev import fekete_polynomial_norm_root_m
from solver.cross_check.extrapolate import (
    Extrapolation,
    extrapolate_chebyshev,
    extrapolate_nth_diameter,
)
from solver.cross_check.fekete import FeketePoints, fekete_points
from solver.cross_check.outline import outline_of
from solver.cross_check.robin import (
    charge_centre_m,
    robin_constant,
    round_wire_distance_m,
)
from solver.errors import InvalidModelError
from solver.figures.equilibrium import equilibrium_charge
from solver.mesh.panels import MeshSettings
from solver.model.model import Model

#: N used by default: enough range for the fits; a few seconds to half a minute per conductor.
DEFAULT_N_POINTS = (12, 16, 24, 32, 48, 64, 96)

#: Least tolerance of each route (relative): the bias of its fit seen on the closed forms of the
#: disc, segment, ellipse, square and triangle (tests/validation/test_cross_check_capacities.py).
ROUTE_FLOOR = {"fekete": 0.002, "chebyshev": 0.005}


@dataclass(frozen=True)
class RouteEstimate:
    """One independent route to the equivalent radius.

    Attributes
    ----------
    route : "fekete" or "chebyshev".
    title : what it is, in words.
    n_points : the N used.
    values_m : the estimate at each N, metres (each an upper bound of the capacity).
    extrapolation : the fitted limit and its uncertainty.
    relative_difference : limit / solver radius - 1.
    tolerance : the relative difference accepted (see module docstring).
    """

    route: str
    title: str
    n_points: tuple[int, ...]
    values_m: tuple[float, ...]
    extrapolation: Extrapolation
    relative_difference: float
    tolerance: float

    @property
    def limit_m(self) -> float:
        return self.extrapolation.limit_m

    @property
    def agrees(self) -> bool:
        return abs(self.relative_difference) <= self.tolerance


@dataclass(frozen=True)
class CrossCheck:
    """The solver's equivalent radius of some conductors alone, and the independent routes to it.

    Attributes
    ----------
    conductors : names of the conductors (tied together when more than one).
    unit : the model's unit of length; ``metres_per_unit`` its size.
    equivalent_radius_m : the solver's value, metres.
    solver_relative_error : its change against a mesh at half the resolution.
    robin_constant : -ln(equivalent radius / unit), in ``unit``.
    charge_centre_m : (2,) centre of the equilibrium charge, metres.
    round_wire_distance_m : distance from the charge centre beyond which the potential differs
        from the round wire's by less than 1 %, metres.
    fekete, chebyshev : the two routes.
    fekete_points : the Fekete points at the largest N.
    outline_m : the outline pieces, each (k, 2) metres, for drawing.
    """

    conductors: tuple[str, ...]
    unit: str
    metres_per_unit: float
    equivalent_radius_m: float
    solver_relative_error: float
    robin_constant: float
    charge_centre_m: np.ndarray
    round_wire_distance_m: float
    fekete: RouteEstimate
    chebyshev: RouteEstimate
    fekete_points: FeketePoints
    outline_m: tuple[np.ndarray, ...]

    @property
    def routes(self) -> tuple[RouteEstimate, RouteEstimate]:
        return (self.fekete, self.chebyshev)

    @property
    def agrees(self) -> bool:
        """Both routes agree with the solver within their expected convergence."""
        return all(r.agrees for r in self.routes)

    @property
    def verdict(self) -> str:
        """One plain sentence."""
        if self.agrees:
            return ("AGREE: both independent routes match the solver's equivalent radius within their "
                    "expected convergence.")
        off = ", ".join(f"{r.title} ({100 * r.relative_difference:+.2g} %, expected within "
                        f"{100 * r.tolerance:.2g} %)" for r in self.routes if not r.agrees)
        return (f"DISAGREE: {off}. Check the outline for very thin or nearly touching parts, solve at a "
                "finer mesh density, or use more points.")


def _route(route: str, title: str, n_points, values, extrapolation: Extrapolation, radius_m: float,
           solver_error: float) -> RouteEstimate:
    tolerance = max(ROUTE_FLOOR[route], 3.0 * extrapolation.relative_uncertainty) + 2.0 * solver_error
    return RouteEstimate(route, title, tuple(int(n) for n in n_points), tuple(float(v) for v in values),
                         extrapolation, extrapolation.limit_m / radius_m - 1.0, tolerance)


def check_equivalent_radius(
    model: Model,
    names: Iterable[str] | None = None,
    n_points: Sequence[int] = DEFAULT_N_POINTS,
    settings: MeshSettings | None = None,
) -> CrossCheck:
    """Cross-check the equivalent radius of the named conductors (all, tied together, by default).

    Parameters
    ----------
    model : Model
        The cross-section; only the named conductors are used, alone (no ground plane, no
        dielectrics, no other conductor).
    names : iterable of str, optional
        Conductors to tie together.
    n_points : sequence of int
        The N for the Fekete and Chebyshev routes (at least 3 values, each >= 3).
    settings : MeshSettings, optional
        Mesh for the solver's value (default: the model's mesh density).

    Returns
    -------
    CrossCheck

    Examples
    --------
    >>> from solver import Model, Conductor, Circle
    >>> disc = Model(unit="mm", conductors=(Conductor("wire", (Circle((0, 0), 2.0),)),))
    >>> check = check_equivalent_radius(disc, n_points=(8, 16, 32))
    >>> check.agrees, round(check.fekete.limit_m * 1e3, 4)
    (True, 2.0)
    """
    wanted = tuple(model.conductor_names if names is None else names)
    n_list = sorted({int(n) for n in n_points})
    if len(n_list) < 3 or n_list[0] < 3:
        raise InvalidModelError(
            f"Cross-check of {', '.join(wanted)}: numbers of points {list(n_points)}; give at least three "
            "different values, each 3 or more (for example 8, 16, 32).")
    settings = settings or MeshSettings.for_density(model.mesh_density)
    equilibrium = equilibrium_charge(model, wanted, settings)
    radius = equilibrium.equivalent_radius_m
    coarse = equilibrium_charge(model, wanted, replace(settings, level=settings.level / 2.0)).equivalent_radius_m
    solver_error = abs(radius - coarse) / radius

    outline = outline_of(equilibrium)
    found = [fekete_points(outline, n) for n in n_list]
    diameters = [f.nth_diameter_m for f in found]
    norms = [fekete_polynomial_norm_root_m(outline, f) for f in found]
    fekete = _route("fekete", "Fekete points (N-th diameter)", n_list, diameters,
                    extrapolate_nth_diameter(n_list, diameters), radius, solver_error)
    chebyshev = _route("chebyshev", "Chebyshev constant (Fekete polynomial)", n_list, norms,
                       extrapolate_chebyshev(n_list, norms), radius, solver_error)
    return CrossCheck(
        conductors=wanted,
        unit=model.unit,
        metres_per_unit=model.metres_per_unit,
        equivalent_radius_m=radius,
        solver_relative_error=solver_error,
        robin_constant=robin_constant(radius, model.metres_per_unit),
        charge_centre_m=charge_centre_m(equilibrium),
        round_wire_distance_m=round_wire_distance_m(equilibrium),
        fekete=fekete,
        chebyshev=chebyshev,
        fekete_points=found[-1],
        outline_m=tuple(p.path for p in outline.pieces),
    )


def check_each_equivalent_radius(model: Model, n_points: Sequence[int] = DEFAULT_N_POINTS) -> list[CrossCheck]:
    """:func:`check_equivalent_radius` of every conductor alone, in model order."""
    return [check_equivalent_radius(model, [name], n_points) for name in model.conductor_names]


def upper_bounds_hold(check: CrossCheck) -> bool:
    """Every finite-N value lies above the solver's radius (less twice its error), as theory requires."""
    floor = check.equivalent_radius_m * (1.0 - 2.0 * check.solver_relative_error - 1e-9)
    return all(v >= floor for r in check.routes for v in r.values_m) and math.isfinite(check.robin_constant)
