"""2-D against 3-D, in numbers: what a finite part length means for the 2-D figures.

A 2-D result is per metre of an infinitely long, uniform cross-section. For a real part of
length L whose cross-section (with the gap to the return conductor or ground plane) spans D:

* Capacitance. Total C = C' L + end fringing; the end correction is of the order of C' D, so
  its relative size is of the order of D / L. Common practice: end effects are small once L is
  well above about ten times D (ratio >= 10).
* Peak field at the ends. A 2-D model cannot see the ends. A rounded end of the same radius r
  is closer to a sphere than to a cylinder: an isolated sphere has surface field V / r, while a
  cylinder of radius r with its axis at height h above a grounded plane has
  V d / (r (h - r) arccosh(h / r)), d = sqrt(h^2 - r^2) (method of images). Their ratio,
  (h - r) arccosh(h / r) / d, about ln(2h / r) when h >> r, is the order of the rise to expect
  at a round end (often 3 to 6); sharp or flat ends are worse. It is an indication, not a
  computed 3-D field.
"""

from __future__ import annotations

import math
from dataclasses import dataclass

from solver.errors import InvalidModelError
from solver.mesh.panels import MeshSettings
from solver.model.geometry import conductor_geometries
from solver.model.model import Model

#: Length-to-size ratio above which end effects count as small (common practice).
LONG_ENOUGH_RATIO = 10.0


@dataclass(frozen=True)
class LengthCheck:
    """How far a part of a given length is from the 2-D assumption.

    Attributes
    ----------
    part_length_m : the part's length, metres.
    cross_section_size_m : largest extent of the conductors' cross-section, including the
        height above a ground plane, metres.
    length_to_size_ratio : part_length_m / cross_section_size_m.
    long_enough : ratio >= :data:`LONG_ENOUGH_RATIO` (10, common practice).
    capacitance_end_effect_order : size / length, the order of the relative end correction of the
        total capacitance (not a computed value).
    note : plain-words summary for the caveat panel and the report.
    """

    part_length_m: float
    cross_section_size_m: float
    length_to_size_ratio: float
    long_enough: bool
    capacitance_end_effect_order: float
    note: str


def cross_section_size_m(model: Model) -> float:
    """Largest extent (width or height) of the conductors, down to the ground plane if any, m."""
    geoms = conductor_geometries(model, MeshSettings(0.5).arc_step_rad)
    if not geoms:
        raise InvalidModelError("The model has no conductors; draw at least one.")
    x0 = min(g.bounds[0] for g in geoms)
    y0 = min(g.bounds[1] for g in geoms)
    x1 = max(g.bounds[2] for g in geoms)
    y1 = max(g.bounds[3] for g in geoms)
    if model.ground_plane is not None:
        y0 = min(y0, model.ground_plane.y * model.metres_per_unit)
    return float(max(x1 - x0, y1 - y0))


def check_part_length(model: Model, part_length_m: float) -> LengthCheck:
    """Length-to-size ratio of a part and what it means for the 2-D figures.

    >>> from solver import Model, Conductor, Circle, GroundPlane
    >>> wire = Model(unit="m", ground_plane=GroundPlane(0.0), conductors=(
    ...     Conductor("w", (Circle((0.0, 1.0), 0.01),), potential_V=1.0),))
    >>> round(check_part_length(wire, 20.0).length_to_size_ratio, 2)
    19.8
    """
    if not (math.isfinite(part_length_m) and part_length_m > 0):
        raise InvalidModelError(f"Part length is {part_length_m} m; give a positive length.")
    size = cross_section_size_m(model)
    ratio = part_length_m / size
    order = size / part_length_m
    long_enough = ratio >= LONG_ENOUGH_RATIO
    verdict = ("well above" if ratio >= 3 * LONG_ENOUGH_RATIO else "above") if long_enough else "below"
    note = (
        f"The part is {ratio:.3g} times as long as its cross-section is large ({size:.3g} m), {verdict} the "
        f"ratio of {LONG_ENOUGH_RATIO:g} from which end effects count as small (common practice). The total "
        f"capacitance exceeds the per-metre value times the length by an end correction of the order of "
        f"{100 * order:.2g} %. The field at the part's ends is not in this 2-D model: round ends typically "
        "see a few times the 2-D peak (see end_field_rise_estimate), sharp or flat ends more."
    )
    return LengthCheck(float(part_length_m), size, ratio, long_enough, order, note)


def end_field_rise_estimate(radius_m: float, gap_m: float) -> float:
    """Indicative ratio of the field at a round end to the 2-D peak, dimensionless.

    Sphere of radius r alone (E = V / r) against a cylinder of radius r whose surface is
    ``gap_m`` from a grounded plane (axis height h = gap + r): (h - r) arccosh(h / r) / d,
    d = sqrt(h^2 - r^2) (method of images). About ln(2h / r) for h >> r.

    >>> round(end_field_rise_estimate(0.01, 0.99), 3)  # h = 1 m, r = 1 cm
    5.246
    """
    if not (radius_m > 0 and gap_m > 0):
        raise InvalidModelError(f"Radius {radius_m} m and gap {gap_m} m must both be positive.")
    h = gap_m + radius_m
    return float((h - radius_m) * math.acosh(h / radius_m) / math.sqrt(h * h - radius_m * radius_m))
