"""Weak corners: vertices turning by less than 25 degrees are corners, not mesh-made radii.

Physics: at a convex vertex whose field region opens by beta > pi the charge density goes
like r^(pi/beta - 1) (J. D. Jackson, Classical Electrodynamics, 3rd ed., 1999, sect. 2.11), so
even a 15-degree turn (beta = 195 degrees, exponent -1/13) has no finite 2-D peak.
"""

import math

import numpy as np
import pytest

import solver
from solver import Circle, Conductor, GroundPlane, Model, Polygon
from solver.hot_spots.weak_corners import weak_corner_at, weak_corner_turns
from solver.mesh.panels import MeshSettings, discretize_boundary


def _polygon_wire(sides: int = 24) -> Model:
    pts = tuple((10 * math.cos(2 * math.pi * k / sides - math.pi / 2),
                 100 + 10 * math.sin(2 * math.pi * k / sides - math.pi / 2)) for k in range(sides))
    return Model(unit="mm", ground_plane=GroundPlane(0.0), conductors=(
        Conductor("wire", (Polygon(pts),), potential_V=60e3),))


def test_the_peak_on_a_weak_corner_grows_with_refinement():
    # the reason it must not be graded: r^(-1/13) makes the vertex field creep up as panels shrink
    model = _polygon_wire()
    peaks = [solver.solve(model, settings=MeshSettings(level)).surface_field_V_per_m.max() for level in (1.0, 4.0)]
    assert peaks[1] > 1.03 * peaks[0]


def test_a_peak_on_a_weak_corner_is_treated_as_a_corner_everywhere():
    model = _polygon_wire()
    solution = solver.solve(model)
    verdict = solver.judge_solution(solution)
    assert verdict.status == "not assessed" and verdict.reason.startswith("at a sharp corner")
    report = solver.analyse_hot_spots(solution)
    spot = report.hot_spots[0]
    assert spot.singular and spot.note.startswith("Weak corner (the outline turns by 15 degrees")
    assert spot.corner_exponent == pytest.approx(math.pi / math.radians(195.0) - 1.0)
    margins = solver.assess_margins(report.solved_model, report.hot_spots)
    assert margins.margins[0].status == "not assessed" and margins.margins[0].corona_radius_m is None
    assert "wire" in solver.conductors_with_sharp_corners(model)  # so a corner radius can be asked for
    rounded = solver.analyse_hot_spots(solution, corner_radius_m=2e-3).hot_spots[0]
    assert not rounded.singular and rounded.estimated_relative_error < 0.01


def test_arcs_and_dents_are_not_weak_corners():
    arcs = Model(unit="mm", ground_plane=GroundPlane(0.0), conductors=(
        Conductor("wire", (Circle((0.0, 50.0), 5.0),), potential_V=1e4),
        Conductor("bar", (solver.Rectangle((40.0, 50.0), 20.0, 10.0, 2.0),), potential_V=0.0)))
    assert weak_corner_turns(discretize_boundary(arcs, MeshSettings(1.0)))[1].size == 0
    # the vertex at (0, 12) dents into the conductor: the field region opens less than pi there
    dent = Model(unit="mm", ground_plane=GroundPlane(0.0), conductors=(Conductor("p", (Polygon(
        ((-10, 10), (0, 12), (10, 10), (10, 20), (-10, 20))),), potential_V=1e4),))
    mesh = discretize_boundary(dent, MeshSettings(1.0))
    near = int(np.argmin(np.hypot(mesh.midpoints[:, 0], mesh.midpoints[:, 1] - 0.012)))
    assert weak_corner_at(mesh, near) is None


def test_sharp_corners_are_found_per_conductor_whatever_the_others():
    """The answer is kept by each conductor's shapes: the same conductor next to different
    neighbours (closer, so the mesh around it is finer) gets the same answer."""
    bar = solver.Conductor("bar", (solver.Rectangle((0.0, 0.0), 10.0, 2.0),), potential_V=1.0)
    rounded = solver.Conductor("rounded", (solver.Rectangle((0.0, 8.0), 10.0, 2.0, 0.9),), role="reference")
    wire = solver.Conductor("wire", (solver.Circle((0.0, -5.0), 1.0),), role="reference")
    for gap in (5.0, 0.2):
        moved = solver.Conductor("wire", (solver.Circle((0.0, -1.0 - gap - 1.0), 1.0),), role="reference")
        model = solver.Model(unit="mm", conductors=(bar, rounded, moved))
        assert solver.conductors_with_sharp_corners(model) == ("bar",)
    assert solver.conductors_with_sharp_corners(solver.Model(unit="mm", conductors=(wire, bar))) == ("bar",)
