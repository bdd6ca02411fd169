"""Corners and strip edges with the high-order solver: fitted convergence orders under
geometric grading, strip capacities, and superposition of the unit solutions.

Sources: logarithmic capacities of the square, the equilateral triangle and the segment,
T. Ransford, "Potential Theory in the Complex Plane", 1995 (Table 5.1); the exponent of the
charge density at a corner of opening beta, r^(pi / beta - 1), is common practice (the local
solution of Laplace's equation in a wedge).
"""

from __future__ import annotations

import math

import numpy as np
import pytest
from reference_geometries import (
    equilateral_triangle,
    equilateral_triangle_capacity,
    segment_capacity,
    square,
    square_capacity,
    two_wire,
)

from solver import Conductor, GroundPlane, Model, Strip, solve
from solver.bem.high_order.adaptive import equivalent_radius_to_tolerance, logarithmic_capacity
from solver.mesh.curved_panels import curved_panels
from solver.mesh.curved_pieces import boundary_pieces


@pytest.mark.parametrize(
    "model, exact, opening",
    [(square(), square_capacity(1.0), 1.5 * math.pi),
     (equilateral_triangle(), equilateral_triangle_capacity(1.0), 5 * math.pi / 3)],
    ids=["square", "triangle"],
)
def test_graded_corners_converge_at_the_fitted_order_two_pi_over_beta(model, exact, opening):
    """With panels shrinking by 4 toward each corner, the capacity error falls like
    (smallest panel)^(2 pi / beta): 4/3 for the square, 6/5 for the triangle (twice the
    exponent pi / beta of the charge near the corner, as for a variational quantity)."""
    pieces = boundary_pieces(model)
    smallest, errors = [], []
    for levels in (3, 5, 7):
        panels = curved_panels(pieces, np.full(len(pieces), 1.0), math.pi / 2, levels)
        cap, _ = logarithmic_capacity(panels)
        smallest.append(panels.lengths.min())
        errors.append(abs(cap / exact - 1.0))
    order = np.polyfit(np.log(smallest), np.log(errors), 1)[0]
    assert abs(order - 2 * math.pi / opening) < 0.15, (order, errors)


def test_a_segment_reaches_its_capacity_quarter_length_to_1e_minus_10():
    """Segment of length L: capacity L / 4 (Ransford 1995); both free ends are graded."""
    model = Model(unit="m", conductors=(Conductor("s", (Strip(((0.0, 0.0), (1.0, 0.0))),), potential_V=1.0),))
    cap, estimate, unknowns = equivalent_radius_to_tolerance(model, ["s"], 1e-10)
    assert abs(cap / segment_capacity(1.0) - 1.0) < 1e-10 and estimate <= 1e-10 and unknowns < 2000


def test_a_strip_over_a_plane_agrees_with_the_low_order_solver_within_its_estimate():
    model = Model(unit="mm", ground_plane=GroundPlane(0.0),
                  conductors=(Conductor("t", (Strip(((-1.0, 1.0), (1.0, 1.0))),), potential_V=1.0),))
    high = solve(model, tolerance=1e-8)
    low = solve(model)
    c_high, c_low = high.capacitance_maxwell_F_per_m[0, 0], low.capacitance_maxwell_F_per_m[0, 0]
    assert abs(c_low / c_high - 1.0) <= 3.0 * low.estimated_relative_error
    assert high.estimated_relative_error <= 1e-8


def test_new_potentials_superpose_the_stored_unit_solutions():
    sol = solve(two_wire(1.0, 3.0), tolerance=1e-10)
    moved = sol.with_potentials({"go": 5.0})
    assert type(moved) is type(sol)
    assert np.allclose(moved.conductor_charges_C_per_m, 5.0 * sol.conductor_charges_C_per_m, rtol=1e-12)
    x = np.array([[1.5e-3, 0.7e-3]])
    assert np.allclose(moved.potential_V(x), 5.0 * sol.potential_V(x), rtol=1e-12)
