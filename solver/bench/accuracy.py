"""Benchmark: accuracy per unknown of the high-order and the low-order solvers, side by side.

Cases and closed forms:

* coaxial line a = 1 mm, b = 2.5 mm: C' = 2 pi eps0 / ln(b / a);
* two round wires r = 1 mm, centres 3 mm apart: C' = pi eps0 / arccosh(d / 2r)
  (both D. K. Cheng, "Field and Wave Electromagnetics", 2nd ed., 1989);
* unit square and equilateral triangle of unit side, logarithmic capacity
  Gamma(1/4)^2 / (4 pi^1.5) and sqrt(3) Gamma(1/3)^3 / (8 pi^2)
  (T. Ransford, "Potential Theory in the Complex Plane", 1995).

For each case: the high-order solver at a ladder of tolerances (unknowns, estimated and true
relative error, seconds) and the low-order solver at a ladder of mesh levels (unknowns and
true error). Times on a shared machine are noisy; compare ratios.
"""

from __future__ import annotations

import math
import time
from collections.abc import Callable

from solver.bem.high_order.adaptive import equivalent_radius_to_tolerance
from solver.bem.solve import solve
from solver.constants import EPSILON_0_F_PER_M
from solver.figures.equilibrium import equilibrium_charge
from solver.mesh.panels import MeshSettings
from solver.model.model import Circle, Conductor, Model, Polygon, Rectangle, Ring

TOLERANCES = (1e-4, 1e-6, 1e-8, 1e-10)
LEVELS = (1.0, 2.0, 4.0)


def _coax() -> Model:
    return Model(unit="mm", conductors=(
        Conductor("inner", (Circle((0.0, 0.0), 1.0),), potential_V=1.0),
        Conductor("shield", (Ring((0.0, 0.0), 2.5, 3.0),), role="reference"),
    ))


def _two_wire() -> Model:
    return Model(unit="mm", conductors=(
        Conductor("go", (Circle((0.0, 0.0), 1.0),), potential_V=1.0),
        Conductor("return", (Circle((3.0, 0.0), 1.0),), role="reference"),
    ))


def _square() -> Model:
    return Model(unit="m", conductors=(Conductor("square", (Rectangle((0.0, 0.0), 1.0, 1.0),), potential_V=1.0),))


def _triangle() -> Model:
    h = math.sqrt(3) / 2
    pts = ((-0.5, -h / 3), (0.5, -h / 3), (0.0, 2 * h / 3))
    return Model(unit="m", conductors=(Conductor("triangle", (Polygon(pts),), potential_V=1.0),))


#: (title, model, exact value, what is compared: "capacitance" or "capacity")
CASES: tuple[tuple[str, Callable[[], Model], float, str], ...] = (
    ("coaxial line a = 1 mm, b = 2.5 mm", _coax, 2 * math.pi * EPSILON_0_F_PER_M / math.log(2.5), "capacitance"),
    ("two wires r = 1 mm, d = 3 mm", _two_wire, math.pi * EPSILON_0_F_PER_M / math.acosh(1.5), "capacitance"),
    ("unit square (capacity)", _square, math.gamma(0.25) ** 2 / (4 * math.pi**1.5), "capacity"),
    ("equilateral triangle, unit side (capacity)", _triangle,
     math.sqrt(3) * math.gamma(1 / 3) ** 3 / (8 * math.pi**2), "capacity"),
)


def high_order_row(model: Model, exact: float, what: str, tolerance: float) -> dict:
    """One high-order solve to ``tolerance``: unknowns, estimated and true relative error, seconds."""
    t0 = time.perf_counter()
    if what == "capacitance":
        sol = solve(model, tolerance=tolerance)
        value, estimate, unknowns = sol.capacitance_maxwell_F_per_m[0, 0], sol.estimated_relative_error, sol.n_unknowns
    else:
        value, estimate, unknowns = equivalent_radius_to_tolerance(model, list(model.conductor_names), tolerance)
    return {"tolerance": tolerance, "unknowns": unknowns, "estimated_error": estimate,
            "true_error": abs(value / exact - 1.0), "seconds": time.perf_counter() - t0}


def low_order_row(model: Model, exact: float, what: str, level: float) -> dict:
    """One low-order solve at mesh ``level``: unknowns and true relative error, seconds."""
    t0 = time.perf_counter()
    if what == "capacitance":
        sol = solve(model, settings=MeshSettings(level), estimate_error=False)
        value, unknowns = sol.capacitance_maxwell_F_per_m[0, 0], sol.n_unknowns
    else:
        eq = equilibrium_charge(model, settings=MeshSettings(level))
        value, unknowns = eq.equivalent_radius_m / model.metres_per_unit, eq.mesh.n_panels + 1
    return {"level": level, "unknowns": unknowns, "true_error": abs(value / exact - 1.0),
            "seconds": time.perf_counter() - t0}


def accuracy_rows(tolerances: tuple[float, ...] = TOLERANCES, levels: tuple[float, ...] = LEVELS) -> list[dict]:
    """Every case by both solvers, as rows (``case``, ``solver``, ``unknowns``, ``true_error``,
    ``seconds``; the high-order rows with ``tolerance`` and ``estimated_error``, the low-order
    rows with ``level``). Nothing is printed."""
    out = []
    for title, make, exact, what in CASES:
        model = make()
        out += [{"case": title, "solver": "high-order", **high_order_row(model, exact, what, tol)} for tol in tolerances]
        out += [{"case": title, "solver": "low-order", **low_order_row(model, exact, what, level)} for level in levels]
    return out


def table_lines(rows: list[dict]) -> list[str]:
    """The accuracy-per-unknown tables of :func:`accuracy_rows`, one per case."""
    lines = []
    for title, *_ in CASES:
        lines += ["", f"accuracy per unknown: {title}",
                  f"{'solver':>10} {'setting':>9} {'unknowns':>9} {'est. error':>11} {'true error':>11} {'seconds':>8}"]
        for r in (r for r in rows if r["case"] == title):
            if r["solver"] == "high-order":
                lines.append(f"{'high-order':>10} {r['tolerance']:9.0e} {r['unknowns']:9d} {r['estimated_error']:11.2e} "
                             f"{r['true_error']:11.2e} {r['seconds']:8.2f}")
            else:
                lines.append(f"{'low-order':>10} {'level ' + format(r['level'], 'g'):>9} {r['unknowns']:9d} {'':>11} "
                             f"{r['true_error']:11.2e} {r['seconds']:8.2f}")
    return lines


def run(tolerances: tuple[float, ...] = TOLERANCES, levels: tuple[float, ...] = LEVELS) -> list[dict]:
    """Print the accuracy-per-unknown tables and return their rows."""
    rows = accuracy_rows(tolerances, levels)
    print("\n".join(table_lines(rows)))
    return rows


if __name__ == "__main__":
    run()
