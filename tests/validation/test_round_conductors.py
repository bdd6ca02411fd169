"""Round conductors against textbook closed forms, at the default ("normal") mesh.

Source for all three formulas: D. K. Cheng, Field and Wave Electromagnetics, 2nd ed.,
Addison-Wesley, 1989 (coaxial line; two-wire line; a wire above a conducting plane by the
method of images). The per-unit-length capacitances are

    coaxial cylinders        C' = 2 pi eps / ln(b / a)
    two parallel wires       C' = pi eps / arccosh(D / 2a)
    wire over ground plane   C' = 2 pi eps / arccosh(h / a)

Tolerance: 1e-4 relative (round geometries at the default mesh).
"""


import pytest
from reference_geometries import (
    coax,
    coax_capacitance_F_per_m,
    two_wire,
    two_wire_capacitance_F_per_m,
    wire_over_plane,
    wire_over_plane_capacitance_F_per_m,
)

from solver import EPSILON_0_F_PER_M, Circle, Conductor, GroundPlane, Model, solve

EPS0 = EPSILON_0_F_PER_M
TOL = 1e-4


@pytest.mark.parametrize("a_mm, b_mm, eps_r", [(1.0, 3.5, 1.0), (0.45, 1.5, 1.0), (2.0, 2.6, 2.25)])
def test_coaxial_cylinders(a_mm, b_mm, eps_r):
    c = solve(coax(a_mm, b_mm, eps_r=eps_r), estimate_error=False).capacitance_maxwell_F_per_m[0, 0]
    assert c == pytest.approx(coax_capacitance_F_per_m(a_mm, b_mm, eps_r), rel=TOL)


@pytest.mark.parametrize("a, d", [(1.0, 3.0), (0.5, 5.0), (1.0, 2.2)])
def test_two_parallel_wires(a, d):
    c = solve(two_wire(a, d), estimate_error=False).capacitance_maxwell_F_per_m[0, 0]
    assert c == pytest.approx(two_wire_capacitance_F_per_m(a, d), rel=TOL)


@pytest.mark.parametrize("a, h", [(1.0, 2.0), (0.2, 10.0), (1.0, 1.3)])
def test_wire_over_ground_plane(a, h):
    c = solve(wire_over_plane(a, h, x=0.3, unit="m"), estimate_error=False).capacitance_maxwell_F_per_m[0, 0]
    assert c == pytest.approx(wire_over_plane_capacitance_F_per_m(a, h), rel=TOL)


def test_ground_plane_equals_explicit_image_pair():
    """A wire over a plane holds half the capacitance of the wire and its image (method of images)."""
    over = Model(
        unit="mm",
        ground_plane=GroundPlane(0.0),
        conductors=(Conductor("w", (Circle((0.0, 2.0), 0.5),), potential_V=1.0),),
    )
    pair = Model(
        unit="mm",
        conductors=(
            Conductor("w", (Circle((0.0, 2.0), 0.5),), potential_V=1.0),
            Conductor("image", (Circle((0.0, -2.0), 0.5),), potential_V=-1.0),
        ),
    )
    q_over = solve(over, estimate_error=False).conductor_charges_C_per_m[0]
    q_pair = solve(pair, estimate_error=False).conductor_charges_C_per_m[0]
    assert q_over == pytest.approx(q_pair, rel=1e-9)
