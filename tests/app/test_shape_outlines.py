"""The canvas draws with the solver's geometry: a stadium is a stadium, an invalid shape is
shown as invalid with the solver's message and never repaired into something else."""

import numpy as np
import pytest

from app import colours
from solver import Conductor, Model, Polygon, Rectangle


def _path_points(item) -> np.ndarray:
    path = item.path()
    return np.array([(path.elementAt(i).x, path.elementAt(i).y) for i in range(path.elementCount())])


def _shape_items(window):
    return [item for item in window.canvas._part_items if hasattr(item, "path")]


def test_a_stadium_is_drawn_whole(window):
    stadium = Rectangle((0.0, 0.0), 40.0, 10.0, 5.0)
    window.document.apply(Model(unit="mm", conductors=(Conductor("bar", (stadium,)),)), "stadium")
    (item,) = _shape_items(window)
    pts = _path_points(item)
    assert len(pts) > 100
    assert pts[:, 0].min() == pytest.approx(-20.0) and pts[:, 0].max() == pytest.approx(20.0)
    assert pts[:, 1].min() == pytest.approx(-5.0) and pts[:, 1].max() == pytest.approx(5.0)
    np.testing.assert_allclose(pts[:-1], stadium.outline()[0])  # the solver's outline, closed once
    assert item.toolTip() == ""
    window.document.select(window.canvas.part_at((0.0, 0.0)))
    assert window.properties.problem_label.text() == ""


def test_an_invalid_polygon_is_shown_with_the_solvers_message(window):
    bow_tie = Polygon(((0.0, 0.0), (20.0, 20.0), (20.0, 0.0), (0.0, 20.0)))
    window.document.apply(Model(unit="mm", conductors=(Conductor("tie", (bow_tie,)),)), "bow tie")
    (item,) = _shape_items(window)
    np.testing.assert_allclose(_path_points(item)[:4], np.asarray(bow_tie.exterior))  # as drawn, not repaired
    assert item.toolTip() == ("Conductor 'tie', shape 1 (polygon) is invalid: Self-intersection at (10, 10); "
                              "redraw the outline so it does not cross or touch itself.")
    assert item.pen().color().name() == colours.INVALID
    window.document.select(window.canvas.part_at((20.0, 10.0)))
    assert "Self-intersection at (10, 10)" in window.properties.problem_label.text()


def test_typing_a_corner_radius_of_half_the_short_side_makes_a_stadium(window):
    window.document.apply(Model(unit="mm", conductors=(Conductor("bar", (Rectangle((0.0, 0.0), 40.0, 10.0),)),)),
                          "bar")
    window.document.select(window.canvas.part_at((0.0, 0.0)))
    field = window.properties.fields["corner_radius"]
    field.setText("5")
    field.editingFinished.emit()
    assert window.document.model.conductors[0].shapes == (Rectangle((0.0, 0.0), 40.0, 10.0, 5.0),)
    field.setText("6")
    field.editingFinished.emit()
    assert window.document.model.conductors[0].shapes == (Rectangle((0.0, 0.0), 40.0, 10.0, 5.0),)
    shown = window.properties.problem_label.text()  # the field, the part and the unit named
    assert "'6' in 'corner radius of bar', in mm: 6 is more than half the smaller side (5)" in shown
