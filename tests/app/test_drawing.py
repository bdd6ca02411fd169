"""Drawing each kind of shape with simulated mouse events creates the right model."""

import numpy as np
import pytest
from app_helpers import click, double_click, drag

from solver import Circle, GroundPlane, Polygon, Rectangle, Strip


def test_rectangle_by_dragging(window):
    window.canvas.set_tool("rectangle")
    drag(window.canvas, (-20, 10), (0, 20))
    (c,) = window.document.model.conductors
    (shape,) = c.shapes
    assert isinstance(shape, Rectangle)
    assert shape.center == pytest.approx((-10, 15))
    assert (shape.width, shape.height) == pytest.approx((20, 10))
    assert c.role == "fixed"


def test_circle_by_dragging_from_the_centre(window):
    window.canvas.set_tool("circle")
    drag(window.canvas, (10, 20), (20, 20))
    (shape,) = window.document.model.conductors[0].shapes
    assert isinstance(shape, Circle)
    assert shape.center == pytest.approx((10, 20))
    assert shape.radius == pytest.approx(10)


def test_polygon_by_clicking_corners_and_double_click(window):
    window.canvas.set_tool("polygon")
    for p in [(0, 10), (20, 10), (20, 30)]:
        click(window.canvas, p)
    double_click(window.canvas, (0, 30))
    (shape,) = window.document.model.conductors[0].shapes
    assert isinstance(shape, Polygon)
    assert np.allclose(shape.exterior, [(0, 10), (20, 10), (20, 30), (0, 30)])


def test_strip_by_clicks_and_enter(window, qtbot):
    from PySide6.QtCore import Qt

    window.canvas.set_tool("strip")
    click(window.canvas, (-30, 10))
    click(window.canvas, (-10, 10))
    qtbot.keyClick(window.canvas, Qt.Key_Return)
    (shape,) = window.document.model.conductors[0].shapes
    assert isinstance(shape, Strip)
    assert np.allclose(shape.points, [(-30, 10), (-10, 10)])


def test_ground_plane_by_one_click(window):
    window.canvas.set_tool("ground plane")
    click(window.canvas, (0, -10))
    assert window.document.model.ground_plane == GroundPlane(-10.0)


def test_move_by_dragging_a_part(window):
    window.canvas.set_tool("rectangle")
    drag(window.canvas, (-20, 10), (0, 20))
    window.canvas.set_tool("pick")
    drag(window.canvas, (-10, 15), (10, 25))
    (shape,) = window.document.model.conductors[0].shapes
    assert shape.center == pytest.approx((10, 25))


def test_resize_by_dragging_a_corner_handle(window):
    window.canvas.set_tool("rectangle")
    drag(window.canvas, (-20, 10), (0, 20))
    window.canvas.set_tool("pick")
    drag(window.canvas, (0, 20), (10, 30))  # top-right handle; bottom-left corner stays
    (shape,) = window.document.model.conductors[0].shapes
    assert (shape.width, shape.height) == pytest.approx((30, 20))
    assert shape.center == pytest.approx((-5, 20))


def test_double_click_adds_and_removes_polygon_vertices(window):
    window.canvas.set_tool("polygon")
    for p in [(0, 10), (20, 10), (20, 30)]:
        click(window.canvas, p)
    double_click(window.canvas, (0, 30))
    window.canvas.set_tool("pick")
    click(window.canvas, (10, 20))  # select it
    double_click(window.canvas, (10, 10))  # on the bottom edge
    (shape,) = window.document.model.conductors[0].shapes
    assert np.allclose(shape.exterior, [(0, 10), (10, 10), (20, 10), (20, 30), (0, 30)])
    double_click(window.canvas, (20, 30))  # on a vertex
    (shape,) = window.document.model.conductors[0].shapes
    assert np.allclose(shape.exterior, [(0, 10), (10, 10), (20, 10), (0, 30)])


def test_dielectric_region_by_dragging_and_its_permittivity(window):
    window.canvas.set_tool("dielectric")
    drag(window.canvas, (-30, 0), (30, 10))
    (region,) = window.document.model.dielectrics
    assert region.shapes[0] == Rectangle((0, 5), 60, 10)
    assert region.material == "FR-4" and region.eps_r == pytest.approx(4.4)
    field = window.properties.fields["eps_r"]
    field.setText("3.5")
    field.editingFinished.emit()
    assert window.document.model.dielectrics[0].eps_r == 3.5
    assert window.document.model.dielectrics[0].material is None


def test_a_click_without_a_drag_draws_nothing(window):
    for tool in ("rectangle", "circle"):
        window.canvas.set_tool(tool)
        drag(window.canvas, (10, 10), (10, 10))
    assert window.document.model.conductors == ()
    assert not window.document.is_modified


def test_tube_by_dragging_from_the_centre(window):
    from solver import Ring

    window.canvas.set_tool("tube")
    drag(window.canvas, (0, 20), (20, 20))
    (shape,) = window.document.model.conductors[0].shapes
    assert isinstance(shape, Ring)
    assert shape.center == pytest.approx((0, 20))
    assert (shape.inner_radius, shape.outer_radius) == pytest.approx((17, 20))
