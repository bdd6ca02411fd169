"""Hot-spot analysis: Richardson estimate, corner rounding, curvature, neighbours, errors."""

import json
import math
from pathlib import Path

import numpy as np
import pytest

from solver import Circle, Conductor, GroundPlane, MeshSettings, Model, Polygon, Rectangle, Ring, Strip
from solver.errors import InvalidGeometryError, InvalidModelError
from solver.hot_spots.analysis import GROUND_PLANE_NAME, analyse_hot_spots, richardson_estimate
from solver.hot_spots.corner_rounding import conductors_with_sharp_corners, round_sharp_corners
from solver.hot_spots.corner_sweep import peak_field_vs_corner_radius
from solver.hot_spots.curvature import local_radius_of_curvature_m
from solver.mesh.panels import discretize_boundary
from solver.model.geometry import shape_geometry

ROOT = Path(__file__).resolve().parents[3]


def test_richardson_recovers_limit_and_order_of_a_clean_sequence():
    h = np.array([1.0, 0.5, 0.25])
    values = 7.0 + 3.0 * h ** 2
    error, limit, order = richardson_estimate(values)
    assert limit == pytest.approx(7.0, rel=1e-12)
    assert order == pytest.approx(2.0, rel=1e-12)
    assert error == pytest.approx((values[-1] - 7.0) / values[-1], rel=1e-12)


def test_richardson_is_conservative_when_values_wobble():
    error, limit, order = richardson_estimate([10.0, 10.001, 10.0005])
    assert limit is None and order is None
    assert error == pytest.approx(0.001 / 10.0005)


def test_rectangle_gets_corner_radius_and_keeps_a_larger_one():
    m = Model(unit="mm", conductors=(Conductor("bar", (Rectangle((0, 0), 10, 4, 1.0),)),
                                     Conductor("pin", (Circle((20, 0), 1),))))
    kept = round_sharp_corners(m, 0.5e-3, ["bar"])
    assert kept.conductors[0].shapes[0].corner_radius == 1.0
    assert round_sharp_corners(m, 0.5e-3, ["bar"], replace_radius=True).conductors[0].shapes[0].corner_radius == 0.5
    assert round_sharp_corners(m, 1.5e-3, ["bar", "pin"]).conductors[1] == m.conductors[1]


def test_polygon_opening_rounds_convex_corners_only():
    ell = Polygon(((0, 0), (20, 0), (20, 5), (5, 5), (5, 30), (0, 30)))  # five convex corners, one concave
    m = Model(unit="mm", conductors=(Conductor("L", (ell,)),))
    r = 1.0
    rounded = round_sharp_corners(m, r * 1e-3)
    assert conductors_with_sharp_corners(m) == ("L",) and conductors_with_sharp_corners(rounded) == ()
    area_before = shape_geometry(ell, 1.0, 0.01, "L").area
    area_after = sum(shape_geometry(s, 1.0, 0.01, "L").area for s in rounded.conductors[0].shapes)
    # Each convex right-angle corner loses (1 - pi/4) r^2; the concave corner is untouched.
    assert area_before - area_after == pytest.approx(5 * (1 - math.pi / 4) * r * r, rel=1e-3)


def test_strip_becomes_a_bar_with_round_edges():
    m = Model(unit="mm", conductors=(Conductor("s", (Strip(((0, 0), (10, 0))),)),))
    rounded = round_sharp_corners(m, 0.2e-3)
    area = shape_geometry(rounded.conductors[0].shapes[0], 1.0, 0.01, "s").area
    assert area == pytest.approx(2 * 0.2 * 10 + math.pi * 0.2 ** 2, rel=1e-3)


def test_rounding_errors_name_the_conductor():
    m = Model(unit="mm", conductors=(Conductor("thin bar", (Rectangle((0, 0), 10, 1),)),
                                     Conductor("tee", (Polygon(((0, 5), (10, 5), (10, 6), (0, 6))),))))
    with pytest.raises(InvalidGeometryError, match="thin bar.*half the smaller side"):
        round_sharp_corners(m, 0.6e-3, ["thin bar"])
    with pytest.raises(InvalidGeometryError, match="tee.*removes or splits"):
        round_sharp_corners(m, 0.6e-3, ["tee"])
    with pytest.raises(InvalidGeometryError, match="positive radius"):
        round_sharp_corners(m, -1.0)
    with pytest.raises(KeyError, match="nowhere"):
        round_sharp_corners(m, 1e-4, ["nowhere"])


def test_local_radius_of_curvature_on_arc_circle_and_straight_side():
    m = Model(unit="mm", conductors=(Conductor("bar", (Rectangle((0, 0), 20, 10, 2.0),)),
                                     Conductor("rod", (Ring((30, 0), 2.0, 3.0),))))
    mesh = discretize_boundary(m, MeshSettings(1.0))

    def nearest(x, y):
        return int(np.argmin(np.hypot(mesh.midpoints[:, 0] - x * 1e-3, mesh.midpoints[:, 1] - y * 1e-3)))

    corner = (8.0 + 2.0 * math.cos(math.pi / 4), 3.0 + 2.0 * math.sin(math.pi / 4))
    assert local_radius_of_curvature_m(mesh, nearest(*corner)) == pytest.approx(2e-3, rel=1e-4)
    assert local_radius_of_curvature_m(mesh, nearest(0.0, 5.0)) == math.inf
    assert local_radius_of_curvature_m(mesh, nearest(33.0, 0.0)) == pytest.approx(3e-3, rel=1e-4)
    assert local_radius_of_curvature_m(mesh, nearest(30.0, 2.0)) == pytest.approx(2e-3, rel=1e-4)


@pytest.mark.slow  # refines the peak field on fine meshes
def test_coaxial_enhancement_factor_is_exact():
    # Inner surface field V / (a ln(b/a)); gap field V / (b - a).
    a, b = 2.0, 5.0
    m = Model(unit="mm", conductors=(Conductor("core", (Circle((0, 0), a),), potential_V=1000.0),
                                     Conductor("tube", (Ring((0, 0), b, b + 1),), role="reference")))
    spot = analyse_hot_spots(m, conductors=["core"]).for_conductor("core")
    assert spot.nearest_conductor == "tube" and spot.gap_m == pytest.approx(3e-3, rel=1e-4)
    assert spot.enhancement_factor == pytest.approx((b - a) / (a * math.log(b / a)), rel=1e-4)
    assert spot.local_radius_of_curvature_m == pytest.approx(2e-3, rel=1e-4)
    with pytest.raises(KeyError, match="tube"):
        analyse_hot_spots(m, conductors=["core"]).for_conductor("tube")


def test_nearest_neighbour_skips_conductors_at_the_same_potential():
    m = Model(unit="mm", ground_plane=GroundPlane(0.0), conductors=(
        Conductor("a", (Circle((0, 20), 2),), potential_V=500.0),
        Conductor("b", (Circle((6, 20), 2),), potential_V=500.0)))
    spot = analyse_hot_spots(m).for_conductor("a")
    assert spot.nearest_conductor == GROUND_PLANE_NAME and spot.gap_m == pytest.approx(0.018)
    assert spot.gap_field_V_per_m == pytest.approx(500.0 / 0.018)


def test_panel_budget_stops_refinement_and_says_so():
    m = Model(unit="mm", ground_plane=GroundPlane(0.0), conductors=(
        Conductor("bar", (Rectangle((0, 30), 40, 10, 0.5),), potential_V=1e4),))
    report = analyse_hot_spots(m, target_relative_error=1e-9, max_panels=2000)
    spot = report.hot_spots[0]
    assert not spot.converged and "above the target" in spot.note
    assert max(report.n_panels) <= 2000 and not report.all_converged


def test_corner_radius_option_solves_the_rounded_model():
    m = Model(unit="mm", ground_plane=GroundPlane(0.0), conductors=(
        Conductor("bar", (Rectangle((0, 30), 40, 10),), potential_V=1e4),))
    report = analyse_hot_spots(m, corner_radius_m=1e-3)
    assert report.solved_model.conductors[0].shapes[0].corner_radius == pytest.approx(1.0)
    assert not report.hot_spots[0].singular and report.all_converged
    assert report.hot_spots[0].local_radius_of_curvature_m == pytest.approx(1e-3, rel=1e-3)
    data = json.loads(json.dumps(report.as_dict(), allow_nan=False))
    assert data["corner_radius_m"] == 1e-3 and data["conductors"][0]["singular"] is False


def test_bad_inputs_raise_clear_errors():
    m = Model(unit="mm", conductors=(Conductor("c", (Circle((0, 0), 1),), potential_V=1.0),
                                     Conductor("g", (Ring((0, 0), 3, 4),), role="reference")))
    with pytest.raises(InvalidModelError, match="Target relative error"):
        analyse_hot_spots(m, target_relative_error=0.0)
    with pytest.raises(InvalidGeometryError, match="positive radii"):
        peak_field_vs_corner_radius(m, "c", [0.0, 1e-3])


def test_sweep_table_and_dict():
    m = Model(unit="mm", ground_plane=GroundPlane(0.0), conductors=(
        Conductor("bar", (Rectangle((0, 30), 40, 10),), potential_V=1e4),))
    sweep = peak_field_vs_corner_radius(m, "bar", [2e-3, 1e-3])
    assert sweep.corner_radius_m.tolist() == [1e-3, 2e-3]
    table = sweep.as_table().splitlines()
    assert len(table) == 4 and "radius mm" in table[1]
    d = sweep.as_dict()
    assert d["peak_field_V_per_m"][0] > d["peak_field_V_per_m"][1] and d["fitted_exponent"] < 0


def test_uncharged_outer_corners_of_a_closed_screen_are_not_singular():
    # The outside of a neutral closed screen carries no charge: its sharp outer corners do not
    # make the screen's peak singular; the peak is on the inside.
    box = Polygon(((0, 0), (10, 0), (10, 10), (0, 10)), (((2, 2), (8, 2), (8, 8), (2, 8)),))
    m = Model(unit="mm", conductors=(Conductor("box", (box,), role="reference"),
                                     Conductor("core", (Circle((5, 5), 1),), potential_V=100.0)))
    spot = analyse_hot_spots(m).for_conductor("box")
    assert not spot.singular and spot.converged
    x, y = (v * 1e3 for v in spot.location_m)
    assert 2 - 1e-9 <= x <= 8 + 1e-9 and 2 - 1e-9 <= y <= 8 + 1e-9


def test_curvature_sign_tells_a_wire_from_the_inside_of_a_tube():
    from solver.hot_spots.curvature import signed_radius_of_curvature_m

    m = Model(unit="mm", conductors=(Conductor("wire", (Circle((0, 0), 1),)), Conductor("tube", (Ring((0, 0), 3, 4),))))
    mesh = discretize_boundary(m, MeshSettings(1.0))
    i_wire, i_hollow, i_outer = (int(np.argmin(np.hypot(*(mesh.midpoints * 1e3 - p).T))) for p in ((1, 0), (3, 0), (4, 0)))
    assert signed_radius_of_curvature_m(mesh, i_wire) == pytest.approx(1e-3, rel=1e-4)
    assert signed_radius_of_curvature_m(mesh, i_hollow) == pytest.approx(-3e-3, rel=1e-4)
    assert signed_radius_of_curvature_m(mesh, i_outer) == pytest.approx(4e-3, rel=1e-4)


def test_nearest_conductor_ties_do_not_depend_on_the_unit():
    """Equal gaps are a tie decided by the larger potential difference, not by round-off: the
    busbar sample names the same neighbour and gap drawn in millimetres and scaled to nanometres."""
    from solver import load_project, solve
    from solver.hot_spots.peak_diagnostics import nearest_other_potential

    model = load_project(ROOT / "sample_geometries" / "busbar_enclosure.json").with_mesh_density("coarse")
    in_mm = nearest_other_potential(model, solve(model, estimate_error=False))
    # the same drawing 1e6 times smaller (written in um), and 1e3 times larger and moved: with a
    # strict "<" between equal gaps both picked the enclosure instead of L2 / L1
    for factor, unit, shift in ((1e-6, "um", 0.0), (1e3, "mm", 1.234e3)):
        scaled = model.scaled(factor).translated(shift, -shift).converted_to(unit)
        found = nearest_other_potential(scaled, solve(scaled, estimate_error=False))
        assert [n for n, _, _ in found] == [n for n, _, _ in in_mm] == ["L2", "L1", "L1"]
        for (_, gap, dv), (_, gap_mm, dv_mm) in zip(found, in_mm):
            assert gap == pytest.approx(gap_mm * factor, rel=1e-6) and dv == pytest.approx(dv_mm, rel=1e-6)
