"""Physical properties the solution must have whatever the geometry."""

import math

import numpy as np
import pytest

from solver import (
    Circle,
    Conductor,
    GroundPlane,
    InvalidGeometryError,
    Model,
    NoReferenceError,
    Polygon,
    Rectangle,
    Ring,
    Strip,
    maxwell_matrix_problems,
    solve,
)


def _four_conductors(angle: float = 0.0, scale: float = 1.0, shift=(0.0, 0.0), unit: str = "mm") -> Model:
    """Three signal conductors and a reference ring, rotated/scaled/shifted as asked."""
    c, s = math.cos(angle), math.sin(angle)

    def f(p):
        x, y = p
        return (scale * (c * x - s * y) + shift[0], scale * (s * x + c * y) + shift[1])

    def box(cx, cy, w, h):
        return Polygon(tuple(f(p) for p in [(cx - w, cy - h), (cx + w, cy - h), (cx + w, cy + h), (cx - w, cy + h)]))

    return Model(
        unit=unit,
        conductors=(
            Conductor("a", (box(-2.0, 0.0, 0.6, 0.3),), potential_V=1.0),
            Conductor("b", (Circle(f((0.0, 0.5)), 0.4 * scale),), potential_V=2.0),
            Conductor("c", (box(2.0, -0.2, 0.4, 0.7),), potential_V=-1.0),
            Conductor("wall", (Ring(f((0.0, 0.0)), 5.0 * scale, 5.5 * scale),), role="reference"),
        ),
    )


def _capacitance(model: Model) -> np.ndarray:
    return solve(model, estimate_error=False).capacitance_maxwell_F_per_m


def test_maxwell_matrix_has_the_physical_pattern():
    c = _capacitance(_four_conductors())
    assert maxwell_matrix_problems(c) == []
    assert np.allclose(c, c.T, rtol=0, atol=1e-6 * np.abs(c).max())


def test_mutual_form_is_non_negative_and_consistent():
    sol = solve(_four_conductors(), estimate_error=False)
    mutual = sol.capacitance_mutual_F_per_m
    assert np.all(mutual >= -1e-18)
    assert np.allclose(np.diag(mutual), sol.capacitance_maxwell_F_per_m.sum(axis=1))


@pytest.mark.parametrize(
    "changed",
    [
        _four_conductors(shift=(123.0, -40.0)),
        _four_conductors(angle=0.7),
        _four_conductors(scale=1000.0),
        _four_conductors(scale=1e-3),
        _four_conductors(unit="inch"),
        _four_conductors().converted_to("um"),
    ],
    ids=["translated", "rotated", "scaled up", "scaled down", "other unit", "converted unit"],
)
def test_per_unit_length_capacitance_is_invariant(changed):
    # Rotation moves polygon vertices relative to the circle's vertices: allow the mesh's own error.
    assert np.allclose(_capacitance(changed), _capacitance(_four_conductors()), rtol=2e-4, atol=0)


def test_logarithmic_capacity_one_does_not_break_the_solve():
    """A disc of radius exactly 1 (capacity 1 in the unit used) must still solve."""
    for unit in ("m", "mm"):
        model = Model(
            unit=unit,
            conductors=(
                Conductor("disc", (Circle((0.0, 0.0), 1.0),), potential_V=1.0),
                Conductor("ring", (Ring((0.0, 0.0), 2.0, 2.2),), role="reference"),
            ),
        )
        c = _capacitance(model)[0, 0]
        assert c == pytest.approx(2 * math.pi * 8.8541878128e-12 / math.log(2.0), rel=1e-4)


def test_operating_point_is_superposition_of_capacitance_columns():
    model = _four_conductors()
    sol = solve(model, estimate_error=False)
    v = np.array([c.potential_V for c in model.conductors if c.role == "fixed"])
    assert np.allclose(sol.conductor_charges_C_per_m[:3], sol.capacitance_maxwell_F_per_m @ v, rtol=1e-9)
    # Charge neutrality without a ground plane: the reference takes the rest.
    assert abs(sol.conductor_charges_C_per_m.sum()) < 1e-9 * np.abs(sol.conductor_charges_C_per_m).max()


def test_potential_inside_and_on_conductors_matches_their_potential():
    sol = solve(_four_conductors(), estimate_error=False)
    pts_m = np.array([[-2.0, 0.0], [0.0, 0.5], [2.0, -0.2]]) * 1e-3
    assert np.allclose(sol.potential_V(pts_m), [1.0, 2.0, -1.0], atol=2e-4)


def test_field_is_minus_gradient_of_potential():
    sol = solve(_four_conductors(), estimate_error=False)
    p = np.array([[0.3e-3, -1.1e-3], [-1.0e-3, 2.0e-3]])
    h = 1e-8
    dx = (sol.potential_V(p + [h, 0]) - sol.potential_V(p - [h, 0])) / (2 * h)
    dy = (sol.potential_V(p + [0, h]) - sol.potential_V(p - [0, h])) / (2 * h)
    assert np.allclose(sol.field_V_per_m(p), -np.column_stack([dx, dy]), rtol=1e-5)


def test_floating_conductor_takes_an_intermediate_potential_and_keeps_its_charge():
    model = Model(
        unit="mm",
        ground_plane=GroundPlane(0.0),
        conductors=(
            Conductor("driven", (Circle((0.0, 3.0), 0.5),), potential_V=10.0),
            Conductor("float", (Circle((0.0, 1.5), 0.3),), role="floating", charge_C_per_m=0.0),
        ),
    )
    sol = solve(model, estimate_error=False)
    assert 0.0 < sol.conductor_potentials_V[1] < 10.0
    assert abs(sol.conductor_charges_C_per_m[1]) < 1e-9 * abs(sol.conductor_charges_C_per_m[0])
    assert sol.capacitance_maxwell_F_per_m.shape == (1, 1)


def test_no_return_path_means_no_capacitance():
    model = Model(
        unit="mm",
        conductors=(
            Conductor("a", (Circle((0.0, 0.0), 1.0),), potential_V=1.0),
            Conductor("b", (Circle((3.0, 0.0), 1.0),), potential_V=-1.0),
        ),
    )
    sol = solve(model, estimate_error=False)
    assert not sol.has_capacitance
    with pytest.raises(NoReferenceError, match="return path"):
        sol.capacitance_maxwell_F_per_m
    # The operating point still solves: opposite charges of equal size.
    q = sol.conductor_charges_C_per_m
    assert q[0] == pytest.approx(-q[1], rel=1e-9)


def test_strip_surface_field_on_both_sides():
    """A strip midway between two plates: equal field on both sides, equal to sigma / (2 eps)."""
    w, b = 1.0, 2.0
    wide = w + 12 * b
    model = Model(
        unit="mm",
        conductors=(
            Conductor("strip", (Strip(((-w / 2, 0.0), (w / 2, 0.0))),), potential_V=1.0),
            Conductor("up", (Strip(((-wide / 2, b / 2), (wide / 2, b / 2))),), role="reference"),
            Conductor("down", (Strip(((-wide / 2, -b / 2), (wide / 2, -b / 2))),), role="reference"),
        ),
    )
    sol = solve(model, estimate_error=False)
    centre = int(np.argmin(np.hypot(*sol.mesh.midpoints.T)))
    e_side = sol.surface_field_V_per_m[centre]
    assert e_side == pytest.approx(abs(sol.surface_charge_density_C_per_m2[centre]) / (2 * sol.permittivity_F_per_m), rel=1e-6)
    probe = sol.field_V_per_m(np.array([[0.0, 1e-7], [0.0, -1e-7]]))
    assert np.hypot(*probe.T) == pytest.approx([e_side, e_side], rel=1e-3)


def test_peak_at_a_sharp_corner_is_flagged_with_its_exponent():
    model = Model(
        unit="mm",
        ground_plane=GroundPlane(0.0),
        conductors=(Conductor("bar", (Rectangle((0.0, 5.0), 4.0, 1.0),), potential_V=1.0),),
    )
    peak = solve(model, estimate_error=False).peak_surface_fields[0]
    assert peak.at_sharp_corner
    assert peak.corner_exponent == pytest.approx(-1 / 3)
    assert peak.location_m[1] < 5.0e-3  # a lower corner, nearest the plane


@pytest.mark.parametrize(
    "conductors, plane, message",
    [
        (
            (Conductor("a", (Circle((0.0, 0.0), 1.0),)), Conductor("b", (Circle((1.5, 0.0), 1.0),), role="reference")),
            None,
            "Conductors 'a' and 'b' touch or overlap",
        ),
        ((Conductor("a", (Circle((0.0, 0.5), 1.0),)),), GroundPlane(0.0), "Conductor 'a' reaches down"),
        (
            (Conductor("bow", (Polygon(((0.0, 0.0), (2.0, 2.0), (2.0, 0.0), (0.0, 2.0))),)),),
            None,
            r"Conductor 'bow', shape 1 \(polygon\) is invalid: Self-intersection at \(1, 1\)",
        ),
        ((Conductor("dot", (Circle((0.0, 0.0), 0.0),)),), None, r"Conductor 'dot', shape 1 \(circle\): radius is 0"),
        ((Conductor("bar", (Rectangle((0.0, 0.0), 1.0, 0.0),)),), None, "height is 0; it must be greater than 0"),
        ((Conductor("s", (Strip(((1.0, 1.0), (1.0, 1.0))),)),), None, "zero length"),
        ((Conductor("r", (Rectangle((0.0, 0.0), 1.0, 1.0, 0.8),)),), None, "corner radius 0.8"),
    ],
)
def test_bad_geometry_is_rejected_with_a_message_naming_the_part(conductors, plane, message):
    with pytest.raises(InvalidGeometryError, match=message):
        solve(Model(unit="mm", conductors=conductors, ground_plane=plane), estimate_error=False)


def test_shapes_of_one_conductor_are_merged():
    one = Model(unit="mm", conductors=(
        Conductor("plus", (Rectangle((0.0, 0.0), 3.0, 1.0), Rectangle((0.0, 0.0), 1.0, 3.0))),
        Conductor("ring", (Ring((0.0, 0.0), 6.0, 6.5),), role="reference"),
    ))
    sol = solve(one, estimate_error=False)
    assert sol.mesh.ring_index[sol.mesh.conductor_index == 0].max() == 0  # one outline, not two
    assert sol.capacitance_maxwell_F_per_m[0, 0] > 0
