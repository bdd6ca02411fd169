"""Degenerate outlines, nearly touching parts, unbalanced floating charges and extreme
numbers end in one clear SolverError, never a hang, a traceback or a silent wrong figure.

Physics checks: the two-wire line, V1 - V2 = q / (pi eps0) acosh(d / 2a) (common practice,
e.g. Ramo, Whinnery & Van Duzer, Fields and Waves in Communication Electronics, 1994), and
the layered coaxial capacitance C = 2 pi eps0 / sum(ln(r_out / r_in) / eps_r) (common practice).
"""

from __future__ import annotations

import math

import numpy as np
import pytest

from solver import solve
from solver.constants import EPSILON_0_F_PER_M
from solver.errors import (
    InvalidGeometryError,
    MeshTooLargeError,
    NetChargeError,
    NoFieldError,
    SolverError,
)
from solver.mesh.grading import graded_panel_count, graded_panels
from solver.mesh.panels import (
    MeshSettings,
    discretize_boundary,
    estimate_conductor_panels,
)
from solver.model.model import (
    Circle,
    Conductor,
    Dielectric,
    GroundPlane,
    Model,
    Polygon,
    Rectangle,
    Ring,
    Strip,
)
from solver.model.outline_checks import cleaned_polyline, cleaned_ring

SQUARE = ((-1.0, -1.0), (1.0, -1.0), (1.0, 1.0), (-1.0, 1.0))
GROUND = Conductor("g", (Circle((5.0, 0.0), 1.0),), role="reference")


def _capacitance(model: Model) -> float:
    return float(solve(model, estimate_error=False, settings=MeshSettings(0.5)).capacitance_maxwell_F_per_m[0, 0])


# ---- 1. degenerate outlines ------------------------------------------------------------------
@pytest.mark.parametrize(
    "outline",
    [
        ((-1, -1), (1, -1), (1, -1), (1, 1), (-1, 1)),  # repeated vertex
        ((-1, -1), (-1, -1), (1, -1), (1, 1), (-1, 1), (-1, 1)),  # two repeats
        ((-1, -1), (0, -1), (1, -1), (1, 0), (1, 1), (-1, 1)),  # collinear points
        ((-1, -1), (1, -1), (1, 1), (-1, 1), (-1, -1)),  # first vertex repeated at the end
        ((-1, -1), (1, -1), (1, -1 + 1e-13), (1, 1), (-1, 1)),  # near-repeat below round-off
    ],
    ids=["repeat", "two repeats", "collinear", "closed", "near repeat"],
)
def test_degenerate_vertices_are_cleaned_and_give_the_square(outline):
    clean = _capacitance(Model(conductors=(Conductor("a", (Polygon(SQUARE),)), GROUND)))
    dirty = _capacitance(Model(conductors=(Conductor("a", (Polygon(outline),)), GROUND)))
    assert dirty == pytest.approx(clean, rel=1e-9)


def test_cleaning_drops_exactly_the_degenerate_vertices():
    pts = cleaned_ring(((0, 0), (0, 0), (1, 0), (2, 0), (2, 2), (0, 2)), "test")
    assert pts.tolist() == [[0, 0], [2, 0], [2, 2], [0, 2]]
    line = cleaned_polyline(((0, 0), (1, 0), (1, 0), (2, 0), (2, 1)), "test")
    assert line.tolist() == [[0, 0], [2, 0], [2, 1]]


@pytest.mark.parametrize(
    "shape, message",
    [
        (Polygon(((0, 0), (1, 0), (2, 0))), r"Conductor 'a', shape 1 \(polygon\), outline: its 3 vertices lie on one line"),
        (Polygon(((0, 0), (1, 1), (1, 1), (0, 0))), r"outline: .*lie on one line"),
        (Polygon(((1, 1), (1, 1), (1, 1))), r"all vertices are at one point \(1, 1\)"),
        (Polygon(SQUARE, (SQUARE,)), r"Conductor 'a', shape 1 \(polygon\): hole 1 covers the whole outline"),
        (Polygon(SQUARE, (SQUARE[::-1],)), r"hole 1 covers the whole outline"),
        (Polygon(SQUARE, (((0, 0), (0.5, 0), (1, 0)),)), r"hole 1: its 3 vertices lie on one line"),
        (Strip(((0, 0), (1, 0), (0.5, 0))), r"turns back on itself at \(1, 0\)"),
        (Strip(((2, 2), (2, 2), (2, 2))), r"zero length"),
    ],
)
def test_degenerate_outlines_are_refused_naming_part_shape_and_vertex(shape, message):
    with pytest.raises(InvalidGeometryError, match=message):
        solve(Model(conductors=(Conductor("a", (shape,)), GROUND)), estimate_error=False)


def test_degenerate_dielectric_outline_names_the_region():
    model = Model(
        conductors=(Conductor("a", (Circle((0, 0), 1.0),)), GROUND),
        dielectrics=(Dielectric("sleeve", (Polygon(((-2, -2), (2, -2), (2, -2), (2, 2), (-2, 2)), (SQUARE,)),), 3.0),),
    )
    sol = solve(model, estimate_error=False, settings=MeshSettings(0.5))  # cleaned, solved
    assert np.isfinite(sol.capacitance_maxwell_F_per_m).all()
    bad = Model(
        conductors=(Conductor("a", (Circle((0, 0), 1.0),)), GROUND),
        dielectrics=(Dielectric("sleeve", (Polygon(((-2, -2), (2, -2), (3, -2))),), 3.0),),
    )
    with pytest.raises(InvalidGeometryError, match=r"Dielectric 'sleeve', shape 1 \(polygon\), outline"):
        solve(bad, estimate_error=False)


@pytest.mark.parametrize(
    "args",
    [(0.0, 0.1, 0.1, 0.1, 1.3), (1.0, 0.0, 0.1, 0.1, 1.3), (1.0, 0.1, 0.1, 0.0, 1.3), (1.0, 0.1, 0.1, 0.1, 1.0),
     (1.0, math.nan, 0.1, 0.1, 1.3), (1.0, 0.1, 0.1, math.inf, 1.3), (1.0, 1e-300, 1e-300, 1e-300, 1.3)],
    ids=["zero length", "zero start", "zero max", "ratio 1", "nan", "inf", "too many"],
)
def test_graded_panels_refuses_instead_of_looping(args):
    with pytest.raises(MeshTooLargeError):
        graded_panels(*args)


@pytest.mark.parametrize("args", [(1.0, 1e-3, 1e-5, 0.1, 1.3), (0.05, 1e-3, 1e-3, 0.1, 1.5), (3.0, 0.2, 0.2, 0.2, 1.3)])
def test_graded_panel_count_matches_the_panels_made(args):
    made = len(graded_panels(*args)) - 1
    assert abs(float(graded_panel_count(*args)) - made) <= 2


# ---- 2. unbounded meshes ----------------------------------------------------------------------
@pytest.mark.parametrize(
    "model, culprit",
    [
        (Model(conductors=(Conductor("a", (Rectangle((0, 0), 1.0, 1.0),)),
                           Conductor("b", (Rectangle((1.0 + 1e-6, 0), 1.0, 1.0),), role="reference"))),
         r"the gap of 1e-06 mm between conductors"),
        (Model(ground_plane=GroundPlane(0.0), conductors=(Conductor("w", (Circle((0, 1.0 + 1e-6), 1.0),)),)),
         r"the height of 1e-06 mm of conductor 'w' above the ground plane"),
    ],
    ids=["squares 1e-6 apart", "wire on the plane"],
)
def test_nearly_touching_parts_are_refused_before_meshing(model, culprit):
    n, _ = estimate_conductor_panels(model)
    assert n > 1e6
    with pytest.raises(MeshTooLargeError, match=culprit):
        discretize_boundary(model)
    with pytest.raises(MeshTooLargeError, match=r"memory.*Responsible: " + culprit):
        solve(model)


@pytest.mark.parametrize(
    "model, says",
    [
        (Model(conductors=(Conductor("a", (Circle((0, 0), 1.0),)),
                           Conductor("b", (Circle((2.0 + 1e-15, 0), 1.0),), role="reference"))),
         r"Conductors 'a' and 'b' touch \(their gap, .* mm, is below 1e-07 of the drawing's size.* near \(1, 0\) mm"),
        (Model(ground_plane=GroundPlane(0.0), conductors=(Conductor("w", (Circle((0, 1.0 + 1e-9), 1.0),)),)),
         r"Conductor 'w' touches the ground plane: its gap to it, 1e-09 mm"),
    ],
    ids=["tangent circles", "a wire 1e-9 mm over the plane"],
)
def test_gaps_no_mesh_can_resolve_are_reported_as_contact(model, says):
    """Not as a mesh of 1e19 panels and 1e28 TB: below 1e-7 of the drawing's size the parts touch."""
    with pytest.raises(InvalidGeometryError, match=says):
        estimate_conductor_panels(model)
    with pytest.raises(InvalidGeometryError, match=says):
        solve(model)


def test_panel_estimate_is_close_to_the_mesh_and_never_far_below():
    model = Model(conductors=(Conductor("a", (Rectangle((0, 0), 2.0, 1.0, 0.2),)),
                              Conductor("b", (Polygon(((2, 0), (3.5, 0), (3, 2))),)), GROUND))
    for level in (0.5, 1.0, 2.0):
        made = discretize_boundary(model, MeshSettings(level)).n_panels
        estimate = estimate_conductor_panels(model, MeshSettings(level))[0]
        assert made * 0.98 <= estimate <= made * 2.0


def test_budget_can_be_lowered_through_the_environment(monkeypatch):
    model = Model(conductors=(Conductor("a", (Circle((0, 0), 1.0),)), GROUND))
    monkeypatch.setenv("EDGEWISE_MAX_SYSTEM_MB", "1")
    with pytest.raises(MeshTooLargeError, match="budget is 1.05 MB"):
        solve(model)


def _sleeve_model(hole_radius: float) -> Model:
    return Model(
        conductors=(Conductor("w", (Circle((0, 0), 1.0),)), Conductor("s", (Ring((0, 0), 3.0, 3.5),), role="reference")),
        dielectrics=(Dielectric("ins", (Ring((0, 0), hole_radius, 2.0),), 3.0),),
    )


def _layered_coax(boundaries, eps):
    return 2 * math.pi * EPSILON_0_F_PER_M / sum(math.log(b / a) / e for (a, b), e in zip(boundaries, eps))


@pytest.mark.parametrize("hole_radius", [1.0 + 1e-9, 1.0 + 1e-4, 1.003])
def test_hairline_sliver_counts_as_touching(hole_radius):
    exact = _layered_coax([(1.0, 2.0), (2.0, 3.0)], [3.0, 1.0])
    sol = solve(_sleeve_model(hole_radius), estimate_error=False)
    assert sol.interfaces.n_panels < 2000
    assert sol.capacitance_maxwell_F_per_m[0, 0] == pytest.approx(exact, rel=2e-3)


def test_a_real_air_gap_beyond_the_tolerance_is_kept():
    exact = _layered_coax([(1.0, 1.05), (1.05, 2.0), (2.0, 3.0)], [1.0, 3.0, 1.0])
    sol = solve(_sleeve_model(1.05), estimate_error=False)
    assert sol.capacitance_maxwell_F_per_m[0, 0] == pytest.approx(exact, rel=2e-3)


@pytest.mark.parametrize("n_sides", [64, 128])
def test_polygon_sleeve_drawn_on_a_round_wire_gives_the_layered_coax(n_sides):
    angles = 2 * math.pi * np.arange(n_sides) / n_sides
    outer = tuple(zip(2 * np.cos(angles), 2 * np.sin(angles)))
    inner = tuple(zip(np.cos(angles[::-1]), np.sin(angles[::-1])))
    model = Model(
        conductors=(Conductor("w", (Circle((0, 0), 1.0),)), Conductor("s", (Ring((0, 0), 3.0, 3.5),), role="reference")),
        dielectrics=(Dielectric("ins", (Polygon(outer, (inner,)),), 3.0),),
    )
    exact = _layered_coax([(1.0, 2.0), (2.0, 3.0)], [3.0, 1.0])
    c = solve(model, estimate_error=False).capacitance_maxwell_F_per_m[0, 0]
    assert c == pytest.approx(exact, rel=3e-3)


# ---- 3. floating conductors with a net charge --------------------------------------------------
@pytest.mark.parametrize(
    "conductors",
    [
        (Conductor("a", (Circle((0, 0), 1.0),), role="floating", charge_C_per_m=1e-9),
         Conductor("b", (Circle((5, 0), 1.0),), role="floating", charge_C_per_m=1e-9)),
        (Conductor("strip", (Strip(((0, 0), (1, 0))),), role="floating", charge_C_per_m=-2e-9),),
        (Conductor("a", (Circle((0, 0), 1.0),), role="floating", charge_C_per_m=1e-9),
         Conductor("b", (Circle((5, 0), 1.0),), role="floating", charge_C_per_m=-0.5e-9)),
    ],
    ids=["two wires +1 nC/m", "one strip alone", "unbalanced pair"],
)
def test_net_floating_charge_without_return_path_is_refused(conductors):
    with pytest.raises(NetChargeError, match=r"potential of a net line charge relative to infinity is undefined"):
        solve(Model(conductors=conductors), estimate_error=False)


@pytest.mark.parametrize(
    "conductors, says",
    [
        ((Conductor("go", (Circle((0, 0), 1.0),), potential_V=1.0),), "every conductor is held at 1 V"),
        ((Conductor("a", (Circle((0, 0), 1.0),), potential_V=5.0),
          Conductor("b", (Circle((5, 0), 1.0),), potential_V=5.0),
          Conductor("f", (Circle((10, 0), 1.0),), role="floating")), "every conductor is held at 5 V"),
        ((Conductor("f", (Circle((0, 0), 1.0),), role="floating"),), "none carries a charge"),
    ],
    ids=["one wire at 1 V", "two at 5 V and an uncharged floating one", "one uncharged floating wire"],
)
def test_a_model_that_drives_no_field_is_refused_not_solved_to_round_off(conductors, says):
    """With no reference and no plane the net charge is zero; one potential everywhere then
    means no charge and no field (uniqueness of the Dirichlet problem, e.g. Jackson, Classical
    Electrodynamics, 3rd ed., 1999, sec. 1.9). Solved, it gave 451 pV/m of round-off."""
    for tolerance in (None, 1e-6):  # the low-order and the high-order solver
        with pytest.raises(NoFieldError, match=says):
            solve(Model(conductors=conductors), estimate_error=False, tolerance=tolerance)


def test_one_reference_or_a_plane_or_a_difference_makes_a_field():
    wire = Conductor("go", (Circle((0, 5), 1.0),), potential_V=1.0)
    for model in (Model(conductors=(wire,), ground_plane=GroundPlane(0.0)),
                  Model(conductors=(wire, Conductor("r", (Circle((5, 5), 1.0),), role="reference"))),
                  Model(conductors=(wire, Conductor("b", (Circle((5, 5), 1.0),), potential_V=-1.0)))):
        assert np.max(np.abs(solve(model, estimate_error=False).conductor_charges_C_per_m)) > 1e-12


def test_balanced_floating_pair_is_taken_relative_to_infinity():
    q, a, d = 1e-9, 1e-3, 5e-3
    model = Model(unit="m", conductors=(
        Conductor("p", (Circle((0, 0), a),), role="floating", charge_C_per_m=q),
        Conductor("n", (Circle((d, 0), a),), role="floating", charge_C_per_m=-q),
    ))
    sol = solve(model, estimate_error=False)
    v = sol.conductor_potentials_V
    expected = q / (math.pi * EPSILON_0_F_PER_M) * math.acosh(d / (2 * a))
    assert v[0] - v[1] == pytest.approx(expected, rel=1e-3)
    assert v[0] == pytest.approx(-v[1], rel=1e-6)  # symmetric about the potential at infinity
    assert sol.phi_inf_V == 0.0


def test_net_floating_charge_with_a_return_path_is_solved():
    model = Model(ground_plane=GroundPlane(0.0), conductors=(
        Conductor("a", (Circle((0, 2), 1.0),), role="floating", charge_C_per_m=1e-9),))
    sol = solve(model, estimate_error=False)
    assert np.isfinite(sol.conductor_potentials_V).all() and sol.conductor_potentials_V[0] > 0


# ---- 4. extreme numbers reach the solver only as a clear error ---------------------------------
@pytest.mark.parametrize("radius", [1e-300, 1e300])
def test_extreme_sizes_given_through_the_api_are_refused(radius):
    with pytest.raises(SolverError, match="Conductor 'a', shape 1 \\(circle\\)"):
        solve(Model(conductors=(Conductor("a", (Circle((0, 0), radius),)), GROUND)), estimate_error=False)


def test_interface_mesh_over_budget_names_the_region_and_the_conductor(monkeypatch):
    monkeypatch.setenv("EDGEWISE_MAX_SYSTEM_MB", "100")  # about 2,600 panels
    with pytest.raises(MeshTooLargeError, match=r"boundary of dielectric 'ins', which runs 0\.006 mm from conductor 'w'"):
        solve(_sleeve_model(1.006), estimate_error=False)
