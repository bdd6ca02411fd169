"""Equivalent radius of a bundle of round conductors, against the usual bundle formula.

A bundle of n round subconductors of radius r, evenly spaced on a circle of radius A (the
bundle radius) and tied together, looks from far away like one round wire of radius

    r_eq = (n r A^(n - 1))^(1 / n)

(the geometric mean radius of the bundle; common practice in overhead-line design, exact in
the limit r / A -> 0 where each subconductor's charge stays uniform). The solver's
equivalent radius (logarithmic capacity, :func:`solver.equivalent_radius_m`) has no such
limit: it includes the crowding of charge toward the outside of the bundle.
"""

from __future__ import annotations

import math
from collections.abc import Iterable, Sequence
from dataclasses import dataclass

import numpy as np

from solver.bem.solution import Solution
from solver.bem.solve import CancelCallback, ProgressCallback, progress_reporter
from solver.errors import InvalidModelError
from solver.figures.equilibrium import equivalent_radius_m
from solver.mesh.panels import DENSITY_LEVELS, MeshSettings
from solver.model.model import Model


def bundle_equivalent_radius_formula_m(n_subconductors: int, subconductor_radius_m: float, bundle_radius_m: float) -> float:
    """(n r A^(n-1))^(1/n), metres; n = 1 gives r.

    >>> round(bundle_equivalent_radius_formula_m(2, 0.01, 0.2), 6)  # sqrt(2 * 0.01 * 0.2)
    0.063246
    """
    if n_subconductors < 1 or not (subconductor_radius_m > 0) or (n_subconductors > 1 and not bundle_radius_m > 0):
        raise InvalidModelError(
            f"Bundle of {n_subconductors} subconductors, radius {subconductor_radius_m} m, bundle radius "
            f"{bundle_radius_m} m: need n >= 1 and positive radii."
        )
    n = int(n_subconductors)
    return float(math.exp((math.log(n * subconductor_radius_m) + (n - 1) * math.log(bundle_radius_m or 1.0)) / n))


@dataclass(frozen=True)
class BundleComparison:
    """Solver equivalent radius of a group of conductors, with the bundle formula where it applies.

    Attributes
    ----------
    conductors : names of the conductors tied together.
    equivalent_radius_m : logarithmic capacity from the solver, metres.
    estimated_relative_error : change of that value against a mesh at half the resolution.
    is_regular_bundle : True when the group is n equal circles evenly spaced on a circle.
    n_subconductors, subconductor_radius_m, bundle_radius_m : the bundle's figures (or None).
    formula_equivalent_radius_m : (n r A^(n-1))^(1/n) (None when not a regular bundle).
    relative_difference : solver / formula - 1 (None when not a regular bundle).
    """

    conductors: tuple[str, ...]
    equivalent_radius_m: float
    estimated_relative_error: float
    is_regular_bundle: bool
    n_subconductors: int | None
    subconductor_radius_m: float | None
    bundle_radius_m: float | None
    formula_equivalent_radius_m: float | None
    relative_difference: float | None


def _regular_bundle(model: Model, names: list[str]) -> tuple[int, float, float] | None:
    """(n, r, A) in metres when the named conductors form a regular bundle of equal circles."""
    circles = []
    for name in names:
        shapes = model.conductor(name).shapes
        disc = shapes[0].disc() if len(shapes) == 1 else None
        if disc is None:
            return None
        circles.append(disc)
    scale = model.metres_per_unit
    radii = np.array([r for _, r in circles]) * scale
    centres = np.array([c for c, _ in circles], dtype=float) * scale
    n = len(circles)
    if n == 1:
        return 1, float(radii[0]), 0.0
    if np.ptp(radii) > 1e-9 * radii.max():
        return None
    rel = centres - centres.mean(axis=0)
    dist = np.hypot(*rel.T)
    a = float(dist.mean())
    if a <= 0 or np.ptp(dist) > 1e-6 * a:
        return None
    angles = np.sort(np.mod(np.arctan2(rel[:, 1], rel[:, 0]), 2 * math.pi))
    steps = np.diff(np.concatenate([angles, [angles[0] + 2 * math.pi]]))
    if np.ptp(steps) > 1e-6:
        return None
    return n, float(radii[0]), a


def compare_bundle(
    source: Solution | Model,
    conductors: Iterable[str] | None = None,
    *,
    progress: ProgressCallback | None = None,
    cancel: CancelCallback | None = None,
) -> BundleComparison:
    """Equivalent radius of the named conductors (default all) tied together, and the formula.

    ``source`` is a solution (the radius is computed at its mesh resolution and at half of it)
    or a model (at its mesh density and half of it). ``progress(fraction, message)`` is called
    before each of the two solves and ``cancel()`` polled (SolveCancelled when it returns True).

    Examples
    --------
    >>> from solver import Model, Conductor, Circle
    >>> pair = Model(unit="mm", conductors=(
    ...     Conductor("a", (Circle((-200, 0), 10),)), Conductor("b", (Circle((200, 0), 10),))))
    >>> abs(compare_bundle(pair).relative_difference) < 1e-3
    True
    """
    model = source.model if isinstance(source, Solution) else source
    names = list(model.conductor_names if conductors is None else conductors)
    if not names:
        raise InvalidModelError("No conductors named for the equivalent radius; name at least one.")
    level = source.mesh.settings.level if isinstance(source, Solution) else DENSITY_LEVELS[model.mesh_density]
    report = progress_reporter(progress, cancel)
    report(0.0, "Equivalent radius")
    fine = equivalent_radius_m(model, names, MeshSettings(level))
    report(0.7, "Equivalent radius on a mesh at half the resolution")
    coarse = equivalent_radius_m(model, names, MeshSettings(level / 2.0))
    report(1.0, "Done")
    return bundle_comparison_of(model, names, fine, abs(fine - coarse) / fine)


def bundle_comparison_of(model: Model, names: Sequence[str], equivalent_radius_m: float,
                         estimated_relative_error: float) -> BundleComparison:
    """:class:`BundleComparison` of conductors ``names`` tied together, whose equivalent radius
    (metres) and its estimated relative error were computed elsewhere: adds the bundle formula
    when the conductors form a regular bundle."""
    bundle = _regular_bundle(model, list(names))
    formula = None if bundle is None else bundle_equivalent_radius_formula_m(*bundle)
    return BundleComparison(
        conductors=tuple(names),
        equivalent_radius_m=equivalent_radius_m,
        estimated_relative_error=estimated_relative_error,
        is_regular_bundle=bundle is not None,
        n_subconductors=None if bundle is None else bundle[0],
        subconductor_radius_m=None if bundle is None else bundle[1],
        bundle_radius_m=None if bundle is None else bundle[2],
        formula_equivalent_radius_m=formula,
        relative_difference=None if formula is None else equivalent_radius_m / formula - 1.0,
    )
