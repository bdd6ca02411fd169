"""Interface meshing: the shapes' exact arcs carried to the panels, panels on the true circle,
sides and grading."""

import math

import numpy as np
import pytest
import shapely

from solver import Circle, Conductor, Dielectric, GroundPlane, Model, Rectangle, Ring, Strip
from solver.mesh.interface_pieces import split_into_pieces
from solver.mesh.interfaces import discretize_interfaces
from solver.mesh.panels import MeshSettings, discretize_boundary
from solver.model.geometry import conductor_geometries, shape_geometry


def _ring_points(shape):
    g = shape_geometry(shape, 1e-3, MeshSettings().arc_step_rad, "test")
    return np.asarray(shapely.geometry.polygon.orient(g).exterior.coords)[:-1]


def _pieces(shape):
    return split_into_pieces(_ring_points(shape), True, shape.arcs_m(1e-3))


def test_a_polygonised_circle_is_one_full_arc():
    pieces, grading, total = _pieces(Circle((3.0, -2.0), 1.5))
    assert len(pieces) == 1 and grading.size == 0
    arc = pieces[0]
    assert arc.radius == pytest.approx(1.5e-3, rel=1e-9)
    np.testing.assert_allclose(arc.centre, [3e-3, -2e-3], atol=1e-12)
    assert total == pytest.approx(2 * math.pi * 1.5e-3, rel=1e-9)


def test_a_rounded_rectangle_is_four_sides_and_four_arcs():
    pieces, grading, _ = _pieces(Rectangle((0.0, 0.0), 4.0, 2.0, 0.5))
    arcs = [p for p in pieces if p.centre is not None]
    sides = [p for p in pieces if p.centre is None and p.length > 0.5e-3]
    assert len(arcs) == 4 and len(sides) == 4 and grading.size == 0
    for arc in arcs:
        assert arc.radius == pytest.approx(0.5e-3, rel=1e-6)
        assert abs(arc.dtheta) == pytest.approx(math.pi / 2, rel=1e-9)


def test_without_the_shapes_arcs_nothing_is_guessed_to_be_an_arc():
    pieces, _, _ = split_into_pieces(_ring_points(Circle((3.0, -2.0), 1.5)), closed=True)
    assert all(p.centre is None for p in pieces)


def test_a_stadium_is_two_half_circles_and_two_sides():
    pieces, grading, _ = _pieces(Rectangle((0.0, 0.0), 4.0, 2.0, 1.0))
    arcs = [p for p in pieces if p.centre is not None]
    assert len(arcs) == 2 and grading.size == 0
    for arc in arcs:
        assert arc.radius == 1e-3
        assert abs(arc.dtheta) == pytest.approx(math.pi, rel=1e-12)


def test_a_square_has_four_straight_sides_and_four_corners():
    pieces, grading, _ = _pieces(Rectangle((0.0, 0.0), 2.0, 2.0))
    assert len(pieces) == 4 and all(p.centre is None for p in pieces) and grading.size == 4


def _mesh(model, level=1.0):
    settings = MeshSettings(level)
    mesh = discretize_boundary(model, settings)
    return discretize_interfaces(model, conductor_geometries(model, settings.arc_step_rad), mesh, settings)[0]


def test_arc_panels_lie_on_the_circle_with_sides_assigned():
    model = Model(
        unit="mm",
        conductors=(Conductor("core", (Circle((0.0, 0.0), 1.0),), potential_V=1.0),
                    Conductor("screen", (Ring((0.0, 0.0), 3.0, 3.2),), role="reference")),
        dielectrics=(Dielectric("inner", (Ring((0.0, 0.0), 1.0, 2.0),), 4.0),),
    )
    ifc = _mesh(model)
    np.testing.assert_allclose(np.hypot(*ifc.points.T), 2e-3, rtol=1e-9)
    np.testing.assert_allclose(np.hypot(*ifc.starts.T), 2e-3, rtol=1e-9)
    outward = np.einsum("ij,ij->i", ifc.normals, ifc.points) > 0
    # the ring's inner boundary touches the core: no panels there
    assert ifc.n_panels == np.count_nonzero(ifc.circle_id == 0)
    assert np.all(np.where(outward, ifc.eps_r_plus, ifc.eps_r_minus) == 1.0)
    assert np.all(np.where(outward, ifc.eps_r_minus, ifc.eps_r_plus) == 4.0)
    assert ifc.arc_lengths.sum() == pytest.approx(2 * math.pi * 2e-3, rel=1e-12)


def test_no_panels_on_the_ground_plane_or_under_a_strip_and_grading_at_junctions():
    model = Model(
        unit="mm",
        ground_plane=GroundPlane(0.0),
        conductors=(Conductor("trace", (Strip(((-0.5, 1.0), (0.5, 1.0))),), potential_V=1.0),),
        dielectrics=(Dielectric("substrate", (Rectangle((0.0, 0.5), 20.0, 1.0),), 4.4),),
    )
    ifc = _mesh(model)
    mids = 0.5 * (ifc.starts + ifc.ends)
    assert mids[:, 1].min() > 0.0
    on_top = np.isclose(mids[:, 1], 1e-3)
    assert not np.any(on_top & (np.abs(mids[:, 0]) < 0.5e-3))
    # panels next to the strip edges are far smaller than those far away
    gap = np.abs(np.abs(mids[:, 0]) - 0.5e-3)
    nearest = np.flatnonzero(on_top)[np.argsort(gap[on_top])[:2]]
    assert ifc.chord_lengths[nearest].max() < 1e-3 * ifc.chord_lengths.max()


def test_conductor_panels_crossing_a_region_boundary_are_split_and_graded():
    from solver import solve
    from solver.mesh.interfaces import dielectric_geometries
    from solver.mesh.junctions import split_at_junctions

    model = Model(
        unit="mm",
        ground_plane=GroundPlane(0.0),
        conductors=(Conductor("post", (Strip(((0.0, 0.5), (0.0, 1.7))),), potential_V=1.0),),
        dielectrics=(Dielectric("substrate", (Rectangle((0.0, 0.5), 10.0, 1.0),), 4.0),),
    )
    mesh = discretize_boundary(model, MeshSettings(1.0))
    split = split_at_junctions(mesh, dielectric_geometries(model, MeshSettings(1.0).arc_step_rad))
    assert split.n_panels > mesh.n_panels
    # no panel straddles y = 1 mm, and the panels next to it are small
    lo, hi = np.minimum(split.starts[:, 1], split.ends[:, 1]), np.maximum(split.starts[:, 1], split.ends[:, 1])
    assert not np.any((lo < 1e-3 - 1e-12) & (hi > 1e-3 + 1e-12))
    touching = np.isclose(lo, 1e-3, rtol=0, atol=1e-12) | np.isclose(hi, 1e-3, rtol=0, atol=1e-12)
    assert split.lengths[touching].max() < 1e-2 * mesh.lengths.max()
    c = [solve(model, estimate_error=False, settings=MeshSettings(level)).capacitance_maxwell_F_per_m[0, 0] for level in (0.5, 1.0)]
    assert abs(c[0] / c[1] - 1) < 1e-4
