"""Command-line section ``--cross-check``: each conductor's equivalent radius by independent routes.

    python -m solver MODEL.json --cross-check [--cross-check-points 12,16,24,32,48,64,96]

For every conductor alone, prints the solver's equivalent radius (with its Robin constant and
the distance beyond which the conductor looks like its round wire), the Fekete and Chebyshev
estimates at each N with their extrapolated limits, the differences and a plain verdict; with
``--json`` the same goes under the key ``cross_check``. The report object carries the checks (:mod:`solver.cli.report`); :func:`cross_check_lines`
and :func:`cross_check_json` render them.
"""

from __future__ import annotations

import argparse
from collections.abc import Sequence

from solver.cross_check.report import (
    DEFAULT_N_POINTS,
    CrossCheck,
)


def _point_counts(text: str) -> tuple[int, ...]:
    try:
        counts = tuple(sorted({int(v) for v in text.split(",") if v.strip()}))
    except ValueError:
        raise argparse.ArgumentTypeError(f"numbers of points must be whole numbers separated by commas, got {text!r}") from None
    if len(counts) < 3 or counts[0] < 3:
        raise argparse.ArgumentTypeError(f"give at least three different numbers of points, each 3 or more, got {text!r}")
    return counts


def add_arguments(parser: argparse.ArgumentParser) -> None:
    """Register ``--cross-check`` and ``--cross-check-points``."""
    parser.add_argument("--cross-check", action="store_true",
                        help="check each conductor's equivalent radius by Fekete points and the Chebyshev constant")
    parser.add_argument("--cross-check-points", type=_point_counts, default=DEFAULT_N_POINTS, metavar="N1,N2,...",
                        help="numbers of Fekete points for --cross-check (default: %(default)s)")


def _lines_for(check: CrossCheck) -> list[str]:
    unit, scale = check.unit, check.metres_per_unit

    def length(x_m: float) -> str:
        return f"{x_m / scale:.6g} {unit}"

    r = check.equivalent_radius_m
    lines = [
        f"Conductor '{' + '.join(check.conductors)}' alone",
        (f"  Solver (equilibrium charge): equivalent radius {length(r)} "
        f"(estimated error {100 * check.solver_relative_error:.2g} %)"),
        f"  Robin constant V = -ln(radius / 1 {unit}) = {check.robin_constant:.6g} (unit of length: {unit})",
        (f"  Looks like a round wire of that radius (potential within 1 %) beyond {length(check.round_wire_distance_m)} "
        f"from the charge centre ({check.charge_centre_m[0] / scale:.4g}, {check.charge_centre_m[1] / scale:.4g}) {unit}"),
    ]
    for route in check.routes:
        steps = "  ".join(f"N={n}: {v / scale:.5g}" for n, v in zip(route.n_points, route.values_m))
        lines += [
            f"  {route.title}, {unit}: {steps}",
            (f"    limit {length(route.limit_m)} ± {100 * route.extrapolation.relative_uncertainty:.2g} % "
            f"({route.extrapolation.description}); differs from the solver by {100 * route.relative_difference:+.3g} % "
            f"(expected within {100 * route.tolerance:.2g} %)"),
        ]
    lines.append(f"  {check.verdict}")
    return lines


def cross_check_lines(checks: Sequence[CrossCheck] | None) -> list[str]:
    """The printed section (an empty list when no cross-check was asked for)."""
    if checks is None:
        return []
    lines = [("Cross-check of the equivalent radius (each conductor alone: no other conductor, no ground plane, "
             "no dielectric). Fekete and Chebyshev values are upper bounds that fall toward the radius as N grows.")]
    for check in checks:
        lines += ["", *_lines_for(check)]
    return lines


def _route_json(route) -> dict:
    return {
        "n_points": list(route.n_points),
        "values_m": list(route.values_m),
        "limit_m": route.limit_m,
        "relative_uncertainty": route.extrapolation.relative_uncertainty,
        "fit": route.extrapolation.description,
        "relative_difference": route.relative_difference,
        "tolerance": route.tolerance,
        "agrees": route.agrees,
    }


def cross_check_json(checks: Sequence[CrossCheck] | None) -> dict:
    """``{"cross_check": [...]}`` with one entry per conductor (an empty dict when not asked for)."""
    if checks is None:
        return {}
    return {"cross_check": [
        {
            "conductors": list(c.conductors),
            "unit": c.unit,
            "equivalent_radius_m": c.equivalent_radius_m,
            "solver_relative_error": c.solver_relative_error,
            "robin_constant": c.robin_constant,
            "charge_centre_m": [float(v) for v in c.charge_centre_m],
            "round_wire_distance_m": c.round_wire_distance_m,
            "fekete": _route_json(c.fekete),
            "chebyshev": _route_json(c.chebyshev),
            "fekete_points_m": c.fekete_points.points_m.tolist(),
            "agrees": c.agrees,
            "verdict": c.verdict,
        }
        for c in checks
    ]}
