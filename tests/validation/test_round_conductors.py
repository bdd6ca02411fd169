"""Round conductors against textbook closed forms, at the default ("normal") mesh.

Source for all three formulas: D. K. Cheng, Field and Wave Electromagnetics, 2nd ed.,
Addison-Wesley, 1989 (coaxial line; two-wire line; a wire above a conducting plane by the
method of images). The per-unit-length capacitances are

    coaxial cylinders        C' = 2 pi eps / ln(b / a)
    two parallel wires       C' = pi eps / arccosh(D / 2a)
    wire over ground plane   C' = 2 pi eps / arccosh(h / a)

Tolerance: 1e-4 relative (round geometries at the default mesh).
"""

import math

import pytest

from solver import EPSILON_0_F_PER_M, Circle, Conductor, GroundPlane, Model, Ring, solve

EPS0 = EPSILON_0_F_PER_M
TOL = 1e-4


@pytest.mark.parametrize("a_mm, b_mm, eps_r", [(1.0, 3.5, 1.0), (0.45, 1.5, 1.0), (2.0, 2.6, 2.25)])
def test_coaxial_cylinders(a_mm, b_mm, eps_r):
    model = Model(
        unit="mm",
        background_eps_r=eps_r,
        conductors=(
            Conductor("inner", (Circle((0.0, 0.0), a_mm),), role="fixed", potential_V=1.0),
            Conductor("shield", (Ring((0.0, 0.0), b_mm, b_mm + 0.5),), role="reference"),
        ),
    )
    c = solve(model, estimate_error=False).capacitance_maxwell_F_per_m[0, 0]
    exact = 2 * math.pi * EPS0 * eps_r / math.log(b_mm / a_mm)
    assert c == pytest.approx(exact, rel=TOL)


@pytest.mark.parametrize("a, d", [(1.0, 3.0), (0.5, 5.0), (1.0, 2.2)])
def test_two_parallel_wires(a, d):
    model = Model(
        unit="mm",
        conductors=(
            Conductor("go", (Circle((0.0, 0.0), a),), role="fixed", potential_V=1.0),
            Conductor("return", (Circle((d, 0.0), a),), role="reference"),
        ),
    )
    c = solve(model, estimate_error=False).capacitance_maxwell_F_per_m[0, 0]
    assert c == pytest.approx(math.pi * EPS0 / math.acosh(d / (2 * a)), rel=TOL)


@pytest.mark.parametrize("a, h", [(1.0, 2.0), (0.2, 10.0), (1.0, 1.3)])
def test_wire_over_ground_plane(a, h):
    model = Model(
        unit="m",
        ground_plane=GroundPlane(0.0),
        conductors=(Conductor("wire", (Circle((0.3, h), a),), role="fixed", potential_V=1.0),),
    )
    c = solve(model, estimate_error=False).capacitance_maxwell_F_per_m[0, 0]
    assert c == pytest.approx(2 * math.pi * EPS0 / math.acosh(h / a), rel=TOL)


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
