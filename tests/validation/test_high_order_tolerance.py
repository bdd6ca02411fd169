"""Solving to a requested accuracy with the high-order solver, against published closed forms.

Sources: coaxial line and two-wire line, D. K. Cheng, "Field and Wave Electromagnetics",
2nd ed., 1989; logarithmic capacities of the square and the equilateral triangle,
T. Ransford, "Potential Theory in the Complex Plane", 1995 (Table 5.1).
"""

from __future__ import annotations

import json
import math

import numpy as np
import pytest
from reference_geometries import (
    coax,
    coax_capacitance_F_per_m,
    equilateral_triangle,
    equilateral_triangle_capacity,
    microstrip,
    square,
    square_capacity,
    two_wire,
    two_wire_capacitance_F_per_m,
    wire_over_plane,
    wire_over_plane_surface_field_V_per_m,
)

from solver import solve
from solver.bem.high_order.adaptive import equivalent_radius_to_tolerance
from solver.bem.high_order.solution import HighOrderSolution
from solver.cli.command import main
from solver.errors import MeshTooLargeError


@pytest.mark.parametrize(
    "model, exact",
    [
        (coax(1.0, 2.5), coax_capacitance_F_per_m(1e-3, 2.5e-3)),  # Cheng 1989: 2 pi eps0 / ln(b / a)
        (two_wire(1.0, 3.0), two_wire_capacitance_F_per_m(1e-3, 3e-3)),  # Cheng 1989: pi eps0 / arccosh(d / 2a)
    ],
    ids=["coax", "two-wire"],
)
def test_round_lines_reach_1e_minus_10_with_fewer_than_500_unknowns(model, exact):
    sol = solve(model, tolerance=1e-10)
    assert isinstance(sol, HighOrderSolution)
    c = sol.capacitance_maxwell_F_per_m[0, 0]
    assert sol.n_unknowns < 500
    assert abs(c / exact - 1.0) < 1e-10
    assert sol.estimated_relative_error is not None and 0 < sol.estimated_relative_error <= 1e-10


@pytest.mark.parametrize(
    "model, exact, tolerance",
    [
        (square(), square_capacity(1.0), 1e-10),  # Ransford 1995: Gamma(1/4)^2 / (4 pi^1.5)
        (equilateral_triangle(), equilateral_triangle_capacity(1.0), 1e-8),  # Ransford 1995
    ],
    ids=["square", "triangle"],
)
def test_polygon_capacities_reach_the_tolerance_with_fewer_than_2000_unknowns(model, exact, tolerance):
    cap, estimate, unknowns = equivalent_radius_to_tolerance(model, list(model.conductor_names), tolerance)
    true_error = abs(cap / exact - 1.0)
    assert unknowns < 2000
    assert true_error < tolerance
    assert estimate <= tolerance


@pytest.mark.parametrize("tolerance", [1e-5, 1e-7, 1e-9])
def test_the_error_estimate_is_within_a_small_factor_of_the_true_error_at_corners(tolerance):
    """Square (Ransford 1995): the estimate is neither far below nor far above the true error."""
    cap, estimate, _ = equivalent_radius_to_tolerance(square(), ["square"], tolerance)
    true_error = abs(cap / square_capacity(1.0) - 1.0)
    assert true_error / 3.0 <= estimate <= 3.0 * true_error


def test_a_smooth_but_uneven_density_is_estimated_honestly_and_refined_where_needed():
    """Close wires (gap 0.1 r; Cheng 1989): the estimate bounds the true error within a factor 3,
    and the charge-free outer wall of a screen stays coarser than its charged inner wall."""
    exact = two_wire_capacitance_F_per_m(1e-3, 2.1e-3)
    sol = solve(two_wire(1.0, 2.1), tolerance=1e-7)
    true_error = abs(sol.capacitance_maxwell_F_per_m[0, 0] / exact - 1.0)
    assert sol.estimated_relative_error <= 1e-7
    assert true_error <= 3.0 * max(sol.estimated_relative_error, 1e-14)  # both may be round-off

    off_centre = coax(1.0, 2.5).with_conductors(tuple(
        c if c.name != "inner" else type(c)(c.name, (type(c.shapes[0])((1.1, 0.0), 1.0),), role=c.role,
                                            potential_V=c.potential_V)
        for c in coax(1.0, 2.5).conductors))
    sol = solve(off_centre, tolerance=1e-10)
    panels = sol.panels
    outer = panels.radii > 2.9e-3
    inner_wall = (panels.radii > 2.4e-3) & (panels.radii < 2.6e-3)
    assert panels.lengths[outer].mean() > 1.5 * panels.lengths[inner_wall].mean()


def test_surface_field_of_a_wire_over_a_plane_matches_images():
    """Surface field all round a wire over a plane (Cheng 1989, images: line charges +-q at
    heights +-s, s = sqrt(h^2 - a^2), q / (2 pi eps0) = V / arccosh(h / a)): the nodal
    sigma / eps0 is spectrally accurate, and the peak is the closed-form one."""
    a, h = 1e-3, 1.5e-3
    sol = solve(wire_over_plane(1.0, 1.5), tolerance=1e-10)
    s = math.sqrt(h * h - a * a)
    pts = sol.mesh.midpoints
    d_plus, d_minus = pts - np.array([0.0, s]), pts - np.array([0.0, -s])
    e = (d_plus / (d_plus**2).sum(axis=1)[:, None] - d_minus / (d_minus**2).sum(axis=1)[:, None]) / math.acosh(h / a)
    exact = np.hypot(*e.T)
    assert np.allclose(sol.surface_field_V_per_m, exact, rtol=1e-9, atol=0)
    assert abs(exact.max() / wire_over_plane_surface_field_V_per_m(a, h, 1.0) - 1.0) < 1e-3


def test_potential_and_field_near_the_surface_are_accurate():
    """Coax (Cheng 1989): phi(r) = V ln(b / r) / ln(b / a) and E = V / (r ln(b / a)), checked a
    hair's breadth off the inner conductor where plain quadrature fails."""
    sol = solve(coax(1.0, 2.5), tolerance=1e-10)
    angles = np.linspace(0.0, 2 * math.pi, 7, endpoint=False)
    for r in (1.0e-3 * (1 + 1e-6), 1.0e-3 * 1.01, 1.7e-3):
        pts = r * np.column_stack([np.cos(angles), np.sin(angles)])
        phi, e = sol.potential_and_field(pts)
        assert np.allclose(phi, math.log(2.5e-3 / r) / math.log(2.5), rtol=0, atol=1e-10)
        radial = np.einsum("ij,ij->i", e, pts / r)
        assert np.allclose(radial, 1.0 / (r * math.log(2.5)), rtol=1e-9)


def test_dielectric_models_fall_back_to_the_low_order_solver_and_say_so(capsys, tmp_path):
    model = microstrip(2.0, 4.0)
    sol = solve(model, tolerance=3e-3)
    assert not isinstance(sol, HighOrderSolution)
    assert sol.estimated_relative_error is not None and sol.estimated_relative_error <= 3e-3


def test_the_budget_runs_out_with_a_clear_error(monkeypatch):
    monkeypatch.setenv("EDGEWISE_MAX_SYSTEM_MB", "1")
    with pytest.raises(MeshTooLargeError, match="tolerance"):
        solve(square(), tolerance=1e-12)


def test_command_line_tolerance_reports_unknowns_and_stage_times(capsys, tmp_path):
    from solver.io.project_file import save_project

    path = tmp_path / "twin.json"
    save_project(two_wire(1.0, 3.0), path)
    assert main([str(path), "--tolerance", "1e-10", "--json"]) == 0
    out = json.loads(capsys.readouterr().out)
    assert out["solver"] == "high-order" and out["unknowns"] < 500
    assert set(out["stage_seconds"]) == {"meshing", "solving", "checking"}
    assert out["estimated_relative_error"] <= 1e-10
    assert main([str(path), "--tolerance", "2"]) == 2


def test_command_line_text_names_the_solver_that_was_used(capsys, tmp_path):
    from solver.io.project_file import save_project

    path = tmp_path / "twin.json"
    save_project(two_wire(1.0, 3.0), path)
    assert main([str(path), "--tolerance", "1e-10"]) == 0
    header = capsys.readouterr().out.splitlines()[2]
    # the header must not quote the named mesh's panel count for a solve that never used it
    assert "high-order solver to tolerance 1e-10" in header and "panels" not in header
