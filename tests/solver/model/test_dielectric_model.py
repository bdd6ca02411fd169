"""The dielectric solver's behaviour: validation messages, dispatch, physical sanity checks."""

import math

import numpy as np
import pytest

from solver import (
    EPSILON_0_F_PER_M,
    Circle,
    Conductor,
    Dielectric,
    GroundPlane,
    InvalidGeometryError,
    Model,
    Polygon,
    Rectangle,
    Ring,
    Strip,
    maxwell_matrix_problems,
    solve,
)
from solver.mesh.panels import MeshSettings

EPS0 = EPSILON_0_F_PER_M


def _coax(dielectrics, background=1.0):
    return Model(
        unit="mm",
        background_eps_r=background,
        conductors=(
            Conductor("core", (Circle((0.0, 0.0), 1.0),), potential_V=1.0),
            Conductor("screen", (Ring((0.0, 0.0), 3.0, 3.3),), role="reference"),
        ),
        dielectrics=tuple(dielectrics),
    )


def test_overlapping_dielectrics_are_refused_naming_both():
    model = _coax([
        Dielectric("left", (Rectangle((-0.5, 0.0), 2.0, 2.0),), 2.0),
        Dielectric("right", (Rectangle((0.4, 0.0), 2.0, 2.0),), 3.0),
    ])
    with pytest.raises(InvalidGeometryError, match="'left' and 'right' overlap"):
        solve(model)


def test_touching_dielectrics_are_accepted():
    # two half discs sharing their diameter, ending inside the screen's metal
    t = np.linspace(0.5 * math.pi, 1.5 * math.pi, 200)
    left = tuple(zip(3.15 * np.cos(t), 3.15 * np.sin(t)))
    right = tuple((-x, y) for x, y in left)
    model = _coax([Dielectric("left", (Polygon(left),), 2.0), Dielectric("right", (Polygon(right),), 3.0)])
    c = solve(model, estimate_error=False).capacitance_maxwell_F_per_m[0, 0]
    assert c == pytest.approx(math.pi * EPS0 * 5.0 / math.log(3.0), rel=1e-5)


def test_dielectric_below_the_ground_plane_is_refused():
    model = Model(
        unit="mm",
        ground_plane=GroundPlane(0.0),
        conductors=(Conductor("wire", (Circle((0.0, 2.0), 0.5),), potential_V=1.0),),
        dielectrics=(Dielectric("slab", (Rectangle((0.0, 0.5), 10.0, 2.0),), 4.0),),
    )
    with pytest.raises(InvalidGeometryError, match="Dielectric 'slab' reaches down to y = -0.5 mm, below the ground plane"):
        solve(model)


def test_a_strip_cannot_be_a_dielectric():
    model = _coax([Dielectric("film", (Strip(((0.0, 1.5), (1.0, 1.5))),), 3.0)])
    with pytest.raises(InvalidGeometryError, match="Dielectric 'film', shape 1 \\(strip\\)"):
        solve(model)


def test_a_region_filling_the_whole_gap_scales_the_capacitance():
    # the region touches both conductors: no interface panels inside the screen
    filled = solve(_coax([Dielectric("fill", (Ring((0.0, 0.0), 1.0, 3.0),), 3.7)]), estimate_error=False)
    assert filled.has_dielectrics
    plain = solve(_coax([]), estimate_error=False)
    ratio = filled.capacitance_maxwell_F_per_m[0, 0] / plain.capacitance_maxwell_F_per_m[0, 0]
    assert ratio == pytest.approx(3.7, rel=1e-6)


def test_region_with_the_background_permittivity_adds_no_interface_unknowns():
    sol = solve(_coax([Dielectric("same", (Ring((0.0, 0.0), 1.0, 2.0),), 2.0)], background=2.0), estimate_error=False)
    assert sol.interfaces.n_panels == 0 and not sol.has_dielectrics
    assert sol.n_unknowns == sol.mesh.n_panels + 1  # the panels and phi_inf
    assert sol.capacitance_maxwell_F_per_m[0, 0] == pytest.approx(2 * math.pi * EPS0 * 2.0 / math.log(3.0), rel=1e-4)


def _asymmetric_model():
    return Model(
        unit="mm",
        ground_plane=GroundPlane(0.0),
        conductors=(
            Conductor("a", (Circle((-1.0, 1.7), 0.3),), potential_V=1.0),
            Conductor("b", (Rectangle((1.2, 2.0), 1.0, 0.4),), potential_V=0.0),
            Conductor("c", (Strip(((0.0, 1.0), (0.6, 1.0))),), potential_V=0.0),
        ),
        dielectrics=(
            Dielectric("slab", (Rectangle((0.0, 0.5), 12.0, 1.0),), 4.4),
            Dielectric("blob", (Circle((-1.0, 1.7), 0.6),), 2.5),
        ),
    )


def test_capacitance_matrix_is_reciprocal_and_physical():
    sol = solve(_asymmetric_model(), estimate_error=False)
    charges = sol._conductor_sums(sol._to_sigma(sol.capacitance_strengths))
    raw = charges[[0, 1, 2]]
    assert np.abs(raw - raw.T).max() < 1e-3 * np.abs(raw).max()
    assert maxwell_matrix_problems(sol.capacitance_maxwell_F_per_m, rtol=1e-4) == []


def test_potential_inside_conductors_and_far_away():
    sol = solve(_asymmetric_model(), estimate_error=False)
    inside = np.array([[-1.0e-3, 1.7e-3], [1.2e-3, 2.0e-3]])
    np.testing.assert_allclose(sol.potential_V(inside), [1.0, 0.0], atol=1e-6)
    assert abs(sol.potential_V(np.array([[0.0, 1e-9]]))[0]) < 1e-6  # on the ground plane


def test_bound_charge_of_a_free_standing_region_sums_to_zero():
    model = Model(
        unit="mm",
        conductors=(
            Conductor("hot", (Circle((0.0, 0.0), 0.5),), potential_V=1.0),
            Conductor("return", (Circle((4.0, 0.0), 0.5),), role="reference"),
        ),
        dielectrics=(Dielectric("rod", (Circle((2.0, 0.8), 0.7),), 6.0),),
    )
    sol = solve(model, estimate_error=False)
    bound = (sol.interface_charge_density_C_per_m2 * sol.interfaces.arc_lengths).sum()
    free = abs(sol.conductor_charges_C_per_m[0])
    assert abs(bound) < 1e-6 * free
    np.testing.assert_allclose(sol.conductor_charges_C_per_m.sum(), 0.0, atol=1e-9 * free)


def test_floating_conductor_carries_its_free_charge():
    model = Model(
        unit="mm",
        conductors=(
            Conductor("hot", (Circle((0.0, 0.0), 0.5),), potential_V=1.0),
            Conductor("island", (Circle((1.6, 0.0), 0.3),), role="floating", charge_C_per_m=2e-12),
            Conductor("screen", (Ring((0.0, 0.0), 4.0, 4.2),), role="reference"),
        ),
        dielectrics=(Dielectric("sleeve", (Ring((1.6, 0.0), 0.3, 0.8),), 3.0),),
    )
    sol = solve(model, estimate_error=False)
    assert sol.conductor_charges_C_per_m[1] == pytest.approx(2e-12, rel=1e-6)
    inside = sol.potential_V(np.array([[1.6e-3, 0.0]]))[0]
    assert inside == pytest.approx(sol.conductor_potentials_V[1], abs=1e-6)


def test_free_charge_on_a_strip_lying_on_an_interface():
    # A zero-thickness trace on a substrate: its free charge must match the capacitance, and
    # a finer mesh must agree (the strip's two sides see different permittivities).
    model = Model(
        unit="mm",
        ground_plane=GroundPlane(0.0),
        conductors=(Conductor("trace", (Strip(((-0.5, 1.0), (0.5, 1.0))),), potential_V=2.0),),
        dielectrics=(Dielectric("substrate", (Rectangle((0.0, 0.5), 20.0, 1.0),), 4.4),),
    )
    sol = solve(model, estimate_error=True)
    assert sol.conductor_charges_C_per_m[0] == pytest.approx(2.0 * sol.capacitance_maxwell_F_per_m[0, 0], rel=1e-9)
    assert sol.estimated_relative_error < 2e-3
    plus, minus = sol.conductor_eps_r_plus, sol.conductor_eps_r_minus
    assert set(np.unique(np.c_[plus, minus])) == {1.0, 4.4}


def test_error_estimate_and_progress_reported():
    seen = []
    sol = solve(_asymmetric_model(), progress=lambda f, msg: seen.append(f))
    assert seen[0] == 0.0 and seen[-1] == 1.0
    assert 0 < sol.estimated_relative_error < 1e-2
    assert sol.coarse_mesh_panels < sol.mesh.n_panels


def test_mesh_is_finer_at_finer_settings():
    model = _asymmetric_model()
    from solver import solve

    coarse = solve(model, estimate_error=False, settings=MeshSettings(0.5))
    fine = solve(model, estimate_error=False, settings=MeshSettings(1.0))
    assert fine.interfaces.n_panels > coarse.interfaces.n_panels


def test_a_solve_on_a_given_mesh_meshes_the_interfaces_too():
    from solver import discretize_boundary, solve_mesh

    model = _coax([Dielectric("sleeve", (Ring((0.0, 0.0), 1.0, 2.0),), 3.0)])
    on_mesh = solve_mesh(model, discretize_boundary(model))
    driver = solve(model, estimate_error=False)
    assert on_mesh.interfaces.n_panels == driver.interfaces.n_panels > 0
    assert np.allclose(on_mesh.capacitance_maxwell_F_per_m, driver.capacitance_maxwell_F_per_m, rtol=1e-14, atol=0)
