"""Each shape kind answers for itself: geometry against closed forms, exact arcs, corners,
round radius, project-file form, drawing outline, copies and description.

Areas and perimeters of circles, annuli and rounded rectangles are elementary plane geometry
(common practice); the polygonised outlines are checked against them to the order of the
sagitta error of a chord, 1 - cos(step / 2), which the tolerances below are set from.
"""

import math

import numpy as np
import pytest

from solver import SHAPE_KINDS, Circle, InvalidGeometryError, Polygon, Rectangle, Ring, Shape, Strip
from solver.model.geometry import boundary_rings, edge_arcs

STEP = math.radians(0.5)
#: relative error of a polygonised arc in area (sagitta) for STEP, with a margin
ARC_TOL = 2 * (1 - math.cos(STEP / 2))

ALL = (
    Circle((1.0, -2.0), 1.5),
    Ring((0.5, 0.5), 2.0, 3.0),
    Rectangle((0.0, 1.0), 4.0, 2.0),
    Rectangle((0.0, 1.0), 4.0, 2.0, 0.5),
    Polygon(((0.0, 0.0), (4.0, 0.0), (4.0, 3.0), (0.0, 3.0)), (((1.0, 1.0), (2.0, 1.0), (2.0, 2.0), (1.0, 2.0)),)),
    Strip(((0.0, 0.0), (3.0, 0.0), (3.0, 4.0))),
)


@pytest.mark.parametrize(
    "shape, area, length",
    [
        (Circle((1.0, -2.0), 1.5), math.pi * 1.5**2, 2 * math.pi * 1.5),
        (Ring((0.5, 0.5), 2.0, 3.0), math.pi * (9 - 4), 2 * math.pi * 5),
        (Rectangle((0.0, 1.0), 4.0, 2.0), 8.0, 12.0),
        (Rectangle((0.0, 1.0), 4.0, 2.0, 0.5), 8.0 - (4 - math.pi) * 0.25, 12.0 - (8 - 2 * math.pi) * 0.5),
        (Rectangle((0.0, 0.0), 4.0, 2.0, 1.0), 2 * 2 + math.pi, 2 * 2 + 2 * math.pi),  # stadium
        (Rectangle((0.0, 0.0), 2.0, 2.0, 1.0), math.pi, 2 * math.pi),  # a square rounded to a circle
        (ALL[4], 12.0 - 1.0, 14.0 + 4.0),
        (ALL[5], 0.0, 7.0),
    ],
)
def test_geometry_area_and_perimeter_match_the_closed_forms(shape, area, length):
    g = shape.geometry_m(1e-3, STEP)
    assert g.is_valid
    assert g.area == pytest.approx(area * 1e-6, rel=ARC_TOL, abs=1e-18)
    assert g.length == pytest.approx(length * 1e-3, rel=ARC_TOL)


def test_curves_are_polygonised_with_every_vertex_on_the_true_circle():
    ring = Ring((0.5, 0.5), 2.0, 3.0)
    g = ring.geometry_m(1.0, STEP)
    outer = np.asarray(g.exterior.coords) - (0.5, 0.5)
    inner = np.asarray(g.interiors[0].coords) - (0.5, 0.5)
    np.testing.assert_allclose(np.hypot(*outer.T), 3.0, rtol=1e-14)
    np.testing.assert_allclose(np.hypot(*inner.T), 2.0, rtol=1e-14)


def test_arcs_of_each_kind():
    assert Circle((1.0, 2.0), 3.0).arcs_m(1e-3)[0].radius == pytest.approx(3e-3)
    assert [a.radius for a in Ring((0, 0), 1.0, 2.0).arcs_m(1.0)] == [2.0, 1.0]
    fillets = Rectangle((0.0, 0.0), 4.0, 2.0, 0.5).arcs_m(1.0)
    assert len(fillets) == 4 and all(a.radius == 0.5 and a.sweep_rad == pytest.approx(math.pi / 2) for a in fillets)
    assert sorted(a.centre for a in fillets) == [(-1.5, -0.5), (-1.5, 0.5), (1.5, -0.5), (1.5, 0.5)]
    assert Rectangle((0.0, 0.0), 4.0, 2.0).arcs_m(1.0) == ()
    assert ALL[4].arcs_m(1.0) == () and ALL[5].arcs_m(1.0) == ()


def test_every_arc_chord_is_marked_with_its_exact_circle():
    rect = Rectangle((0.0, 0.0), 4.0, 2.0, 0.5)
    (ring,) = boundary_rings(0, rect.geometry_m(1.0, STEP), rect.arcs_m(1.0))
    on_arc = np.isfinite(ring.edge_arc_radii)
    n_chords = 4 * math.ceil(0.5 * math.pi / STEP - 1e-9)
    assert on_arc.sum() == n_chords and (~on_arc).sum() == 4  # the four straight sides
    assert set(ring.edge_arc_radii[on_arc]) == {0.5}
    # a chord belongs to the fillet whose centre is in its own quadrant
    mids = 0.5 * (ring.points + np.roll(ring.points, -1, axis=0))[on_arc]
    centres = ring.edge_arc_centres[on_arc]
    assert np.all(np.sign(mids) == np.sign(centres))


def test_a_straight_edge_is_not_taken_for_an_arc_even_with_both_ends_on_a_circle():
    # the side of a stadium joins two tangent points, one on each half circle
    stadium = Rectangle((0.0, 0.0), 4.0, 2.0, 1.0)
    p = np.array([[1.0, -1.0]])
    q = np.array([[-1.0, -1.0]])
    _, radii = edge_arcs(np.vstack([p, q]), False, stadium.arcs_m(1.0))
    assert np.isnan(radii).all()


def test_sharp_corners_and_free_edges_with_their_opening_angles():
    hints = Rectangle((0.0, 0.0), 2.0, 2.0).meshing_hints(1.0)
    assert len(hints.corner_points) == 4
    np.testing.assert_allclose(hints.corner_opening_rad, 1.5 * math.pi)
    assert len(Rectangle((0.0, 0.0), 2.0, 2.0, 0.1).meshing_hints(1.0).corner_points) == 0
    assert len(Circle((0, 0), 1.0).meshing_hints(1.0).corner_points) == 0
    strip = ALL[5].meshing_hints(1.0)
    np.testing.assert_allclose(strip.corner_opening_rad, [2 * math.pi, 1.5 * math.pi, 2 * math.pi])
    # an L: five convex corners and one re-entrant corner (not singular, so not listed)
    ell = Polygon(((0, 0), (2, 0), (2, 1), (1, 1), (1, 2), (0, 2)))
    assert len(ell.meshing_hints(1.0).corner_points) == 5
    # the corners of a square hole open into the hole by pi / 2: none is singular
    assert len(ALL[4].meshing_hints(1.0).corner_points) == 4


def test_round_radius_for_peek_margins():
    assert Circle((0, 0), 2.0).round_radius_at() == 2.0
    tube = Ring((0, 0), 3.0, 4.0)
    assert tube.round_radius_at((4.0, 0.0)) == 4.0
    assert tube.round_radius_at((0.0, -3.0)) is None  # the inside is hollow toward the field
    assert Rectangle((0, 0), 2.0, 1.0, 0.5).round_radius_at() is None


@pytest.mark.parametrize("shape", ALL)
def test_project_file_form_round_trips(shape):
    d = shape.to_dict()
    assert d["kind"] == shape.kind and SHAPE_KINDS[shape.kind] is type(shape)
    assert Shape.from_dict(d) == shape
    assert set(d) - {"kind"} <= set(type(shape).required_fields | type(shape).optional_fields)


def test_reading_a_dict_checks_its_numbers():
    with pytest.raises(Exception, match="radius is -1"):
        Shape.from_dict({"kind": "circle", "center": [0, 0], "radius": -1})
    with pytest.raises(Exception, match="not known"):
        Shape.from_dict({"kind": "ellipse"})


@pytest.mark.parametrize("shape", ALL)
def test_drawing_outline_is_the_solver_geometry(shape):
    rings = shape.outline(STEP)
    g = shape.geometry_m(1.0, STEP)
    if shape.is_solid:
        expected = [np.asarray(r.coords)[:-1] for r in (g.exterior, *g.interiors)]
    else:
        expected = [np.asarray(g.coords)]
    assert len(rings) == len(expected)
    for got, want in zip(rings, expected):
        np.testing.assert_array_equal(got, want)


def test_a_stadium_is_valid_on_the_solver_side_and_draws_its_full_outline():
    stadium = Rectangle((0.0, 0.0), 4.0, 2.0, 1.0)
    assert stadium.problem() is None
    (outline,) = stadium.outline()
    assert outline[:, 0].min() == pytest.approx(-2.0) and outline[:, 1].max() == pytest.approx(1.0)
    assert stadium.bounds() == pytest.approx((-2.0, -1.0, 2.0, 1.0))


def test_an_invalid_polygon_is_drawn_as_given_and_never_repaired():
    bow_tie = Polygon(((0.0, 0.0), (2.0, 2.0), (2.0, 0.0), (0.0, 2.0)))
    assert "Self-intersection at (1, 1)" in bow_tie.problem("Conductor 'x', shape 1 (polygon)")
    (outline,) = bow_tie.outline()
    np.testing.assert_array_equal(outline, np.asarray(bow_tie.exterior))
    with pytest.raises(InvalidGeometryError, match="Conductor 'x', shape 1 \\(polygon\\) is invalid"):
        bow_tie.geometry_m(1.0, STEP, "Conductor 'x', shape 1 (polygon)")
    assert Circle((0, 0), 0.0).outline() == ()
    assert all(math.isnan(v) for v in Circle((0, 0), 0.0).bounds())


@pytest.mark.parametrize("shape", ALL)
def test_translated_and_scaled_copies(shape):
    moved = shape.translated(1.0, -2.0)
    assert type(moved) is type(shape)
    x0, y0, x1, y1 = shape.bounds()
    assert moved.bounds() == pytest.approx((x0 + 1.0, y0 - 2.0, x1 + 1.0, y1 - 2.0))
    big = shape.scaled(3.0)
    g, g3 = shape.geometry_m(1.0, STEP), big.geometry_m(1.0, STEP)
    assert g3.area == pytest.approx(9 * g.area, rel=1e-9, abs=1e-12)
    assert g3.length == pytest.approx(3 * g.length, rel=1e-9)


def test_one_line_descriptions():
    assert Circle((0, 0), 2.0).describe("mm") == "circle r = 2 mm"
    assert Ring((0, 0), 1.0, 2.0).describe("mm") == "tube 1/2 mm"
    assert Rectangle((0, 0), 10.0, 5.0).describe("mm") == "rectangle 10 x 5 mm"
    assert Rectangle((0, 0), 10.0, 5.0, 1.0).describe("mm") == "rectangle 10 x 5 mm, corners r = 1"
    assert ALL[4].describe("mm") == "polygon, 4 vertices, 1 hole"
    assert ALL[5].describe("mm") == "strip, 3 points"


def test_handles_and_vertex_edits():
    rect = Rectangle((0.0, 0.0), 4.0, 2.0, 0.5)
    assert rect.with_handle_moved(2, 4.0, 3.0) == Rectangle((1.0, 1.0), 6.0, 4.0, 0.5)
    assert Circle((0, 0), 1.0).with_handle_moved(0, 0.0, 3.0) == Circle((0, 0), 3.0)
    assert Ring((0, 0), 1.0, 2.0).with_handle_moved(1, 0.0, 1.5) == Ring((0, 0), 1.5, 2.0)
    square = Polygon(((0.0, 0.0), (2.0, 0.0), (2.0, 2.0), (0.0, 2.0)))
    more = square.with_vertex_inserted(1.0, -0.1)
    assert more.exterior[1] == (1.0, -0.1) and len(more.exterior) == 5
    assert more.with_vertex_removed(1) == square
    assert Polygon(square.exterior[:3]).with_vertex_removed(0) == Polygon(square.exterior[:3])
    assert not rect.has_vertices and rect.with_vertex_inserted(0.0, 0.0) is rect


def test_rounding_corners_exactly_where_the_kind_can():
    assert Rectangle((0, 0), 4.0, 2.0).exactly_rounded(0.5).corner_radius == 0.5
    assert Rectangle((0, 0), 4.0, 2.0, 0.8).exactly_rounded(0.5).corner_radius == 0.8
    assert Rectangle((0, 0), 4.0, 2.0, 0.8).exactly_rounded(0.5, replace_radius=True).corner_radius == 0.5
    with pytest.raises(InvalidGeometryError, match="more than half the smaller side"):
        Rectangle((0, 0), 4.0, 2.0).exactly_rounded(1.5)
    circle = Circle((0, 0), 1.0)
    assert circle.exactly_rounded(0.1) is circle
    assert Polygon(((0, 0), (1, 0), (0, 1))).exactly_rounded(0.1) is None


def test_a_new_kind_registers_itself_for_the_project_file():
    from dataclasses import dataclass

    @dataclass(frozen=True)
    class Dot(Circle):
        kind = "test-dot"

    try:
        assert SHAPE_KINDS["test-dot"] is Dot
        assert Shape.from_dict({"kind": "test-dot", "center": [0, 0], "radius": 1.0}) == Dot((0.0, 0.0), 1.0)
    finally:
        del SHAPE_KINDS["test-dot"]
