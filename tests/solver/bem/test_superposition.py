"""Potential-only changes by superposition equal a full solve at the new potentials."""

from pathlib import Path

import numpy as np
import pytest

from solver import (
    Circle,
    Conductor,
    Dielectric,
    GroundPlane,
    Model,
    Rectangle,
    Ring,
    Strip,
    load_project,
    solve,
    solve_mesh,
)
from solver.errors import SuperpositionError
from solver.mesh.panels import MeshSettings, discretize_boundary

SAMPLES = Path(__file__).resolve().parents[3] / "sample_geometries"
#: Conductor charges, potentials and fields: both ways are exact for the discrete system, so
#: they differ by rounding only.
RTOL = 1e-12
#: Single panel strengths: two solutions of a first-kind system of condition number ~1e4
#: differ by about cond x 1e-16 relative to the largest strength (measured 3e-11 on the
#: busbar sample).
RTOL_PANEL = 1e-9

FIELDS = ("strengths", "total_strengths", "conductor_potentials_V", "conductor_normal_pv", "interface_normal_pv")


def _solve(model: Model, level: float = 0.5):
    return solve_mesh(model, discretize_boundary(model, MeshSettings(level)))


def _assert_same(a, b):
    for name in FIELDS:
        x, y = getattr(a, name), getattr(b, name)
        scale = max(np.abs(y).max(initial=0.0), 1e-300)
        tol = RTOL_PANEL if name.endswith("strengths") else RTOL
        assert np.abs(x - y).max(initial=0.0) <= tol * scale, name
    assert abs(a.phi_inf_V - b.phi_inf_V) <= RTOL * max(abs(b.phi_inf_V), np.abs(b.conductor_potentials_V).max())
    q = np.abs(b.conductor_charges_C_per_m).max()
    assert np.abs(a.conductor_charges_C_per_m - b.conductor_charges_C_per_m).max() <= RTOL * q
    pts = np.array([[0.0, 0.09], [0.1, -0.05], [-0.12, 0.0]]) * b.model.metres_per_unit / 1e-3 * 0.01
    assert np.allclose(a.potential_V(pts), b.potential_V(pts), rtol=0,
                       atol=RTOL * 10 * np.abs(b.conductor_potentials_V).max())


def test_busbar_sample_new_potentials_equal_a_full_solve():
    model = load_project(SAMPLES / "busbar_enclosure.json")
    sol = _solve(model)
    new = {"L1": -4900.0, "L2": 9800.0}
    quick = sol.with_potentials(new)
    _assert_same(quick, _solve(model.with_potentials(new)))
    assert quick.model.conductor("L1").potential_V == -4900.0
    assert np.array_equal(quick.capacitance_maxwell_F_per_m, sol.capacitance_maxwell_F_per_m)
    assert quick.unit_solutions is sol.unit_solutions


def test_floating_conductor_phi_inf_strip_and_dielectric():
    """No ground plane (phi_inf unknown), a floating conductor with charge, a strip and a
    dielectric region: every operating-point quantity superposes."""
    model = Model(
        unit="mm",
        conductors=(
            Conductor("a", (Circle((-3.0, 0.0), 1.0),), potential_V=2.0),
            Conductor("f", (Rectangle((2.0, 0.0), 1.5, 1.0),), role="floating", charge_C_per_m=1e-11),
            Conductor("s", (Strip(((-1.0, 2.5), (1.0, 2.5))),), potential_V=-1.0),
            Conductor("ref", (Ring((0.0, 0.0), 8.0, 9.0),), role="reference"),
        ),
        dielectrics=(Dielectric("slab", (Rectangle((0.0, -2.5), 6.0, 1.5),), 3.0),),
    )
    sol = _solve(model)
    quick = sol.with_potentials({"a": -5.0, "s": 3.0}, charges_C_per_m={"f": -2e-11})
    moved = model.with_potentials({"a": -5.0, "s": 3.0})
    full_model = moved.with_conductors(
        tuple(c if c.name != "f" else Conductor("f", c.shapes, role="floating", charge_C_per_m=-2e-11)
              for c in moved.conductors))
    _assert_same(quick, _solve(full_model))


def test_ground_plane_without_reference():
    model = Model(
        unit="mm",
        ground_plane=GroundPlane(0.0),
        conductors=(Conductor("w1", (Circle((-2.0, 3.0), 0.5),), potential_V=1.0),
                    Conductor("w2", (Circle((2.0, 3.0), 0.5),), potential_V=0.0)),
    )
    sol = _solve(model)
    _assert_same(sol.with_potentials({"w2": 7.0}), _solve(model.with_potentials({"w2": 7.0})))


def test_without_return_path_the_charge_estimate_is_made_again_at_the_new_potentials():
    model = Model(unit="mm", conductors=(
        Conductor("a", (Circle((-2.0, 0.0), 0.5),), potential_V=1.0),
        Conductor("b", (Rectangle((2.0, 0.0), 1.5, 0.4),), potential_V=-1.0),
        Conductor("c", (Circle((0.0, 2.5), 0.3),), potential_V=0.0)))
    sol = solve(model, settings=MeshSettings(0.5))
    quick = sol.with_potentials({"a": 3.0})
    assert quick.unit_solutions is sol.unit_solutions  # superposed, not solved again
    full = solve(model.with_potentials({"a": 3.0}), settings=MeshSettings(0.5))
    assert quick.estimated_relative_error != pytest.approx(sol.estimated_relative_error, rel=1e-3)
    assert quick.estimated_relative_error == pytest.approx(full.estimated_relative_error, rel=1e-6)
    _assert_same(quick, full)


def test_a_charge_estimate_without_its_coarser_solution_is_not_carried_silently():
    model = Model(unit="mm", conductors=(
        Conductor("a", (Circle((-2.0, 0.0), 0.5),), potential_V=1.0),
        Conductor("b", (Circle((2.0, 0.0), 0.5),), potential_V=-1.0)))
    sol = solve(model, tolerance=1e-8)  # the high-order estimate keeps no coarser solution
    assert sol.coarse is None and sol.estimated_relative_error is not None
    with pytest.raises(SuperpositionError, match="solve the model again"):
        sol.with_potentials({"a": 3.0})


def test_unknown_name_is_refused():
    model = load_project(SAMPLES / "busbar_enclosure.json")
    sol = _solve(model, 0.25)
    with pytest.raises(KeyError, match="No conductor named 'L9'"):
        sol.with_potentials({"L9": 1.0})


def test_hot_spots_refined_from_a_superposed_solution_see_the_new_potentials():
    from solver import analyse_hot_spots

    model = load_project(SAMPLES / "busbar_enclosure.json").with_mesh_density("coarse")
    new = {"L1": -4900.0, "L2": 9800.0}
    quick = solve(model).with_potentials(new)
    assert quick.coarse is not None and quick.coarse.model.conductor("L2").potential_V == 9800.0
    refined = analyse_hot_spots(quick)
    direct = analyse_hot_spots(solve(model.with_potentials(new)))
    for a, b in zip(refined.hot_spots, direct.hot_spots):
        assert a.field_V_per_m == pytest.approx(b.field_V_per_m, rel=1e-9)
