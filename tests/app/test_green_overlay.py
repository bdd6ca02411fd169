"""The Green's function overlay: the solver's g on the map, its contours, the round wire and the 1 % circle."""

from __future__ import annotations

import math

import numpy as np
import pytest

from solver import Circle, Conductor, GroundPlane, Model, Rectangle, equilibrium_charge
from solver.cross_check import round_wire_distance_m


def bar_and_wire() -> Model:
    """A flat 40 mm x 4 mm bar and a 2 mm wire (a scenario of our own)."""
    return Model(unit="mm", ground_plane=GroundPlane(-30.0), conductors=(
        Conductor("bar", (Rectangle((0.0, 0.0), 40.0, 4.0, 0.5),), "fixed", 1.0),
        Conductor("wire", (Circle((60.0, 0.0), 2.0),), "fixed", 0.0)))


def test_the_map_of_a_round_wire_is_the_logarithm_of_distance_over_radius():
    # For a disc of radius a, g(z) = ln(|z - c| / a) exactly (T. Ransford, Potential Theory in the
    # Complex Plane, 1995, the capacity of a disc is its radius).
    from app.canvas.green_overlay import green_map

    m = green_map(Model(unit="mm", conductors=(Conductor("w", (Circle((3.0, -2.0), 2.0),)),)), ["w"], n_grid=41)
    assert m.equivalent_radius == pytest.approx(2.0, rel=1e-3)
    np.testing.assert_allclose(m.centre, [3.0, -2.0], atol=1e-6)
    xx, yy = np.meshgrid(m.x, m.y)
    r = np.hypot(xx - 3.0, yy + 2.0)
    outside = r > 2.2
    np.testing.assert_allclose(m.g[outside], np.log(r[outside] / 2.0), atol=2e-3)
    assert np.isnan(m.g[r < 1.8]).all()
    assert m.robin_constant == pytest.approx(-math.log(2.0), abs=1e-3)


def test_the_one_percent_circle_is_the_solvers_and_the_map_holds_it():
    from app.canvas.green_overlay import MARGIN, green_map

    model = bar_and_wire()
    m = green_map(model, ["bar"], n_grid=61)
    expected = round_wire_distance_m(equilibrium_charge(model, ["bar"])) / model.metres_per_unit
    assert m.round_wire_distance == pytest.approx(expected, rel=1e-12)
    assert 20.0 < m.round_wire_distance < 1000.0  # farther out than the bar's half-length
    assert m.x[-1] - m.centre[0] == pytest.approx(MARGIN * m.round_wire_distance)


def test_the_overlay_draws_contours_where_g_has_their_value(window, qtbot):
    from app.canvas.green_overlay import GreenMap, contour_levels

    window.load(bar_and_wire(), None)
    with qtbot.waitSignal(window.studies.green_overlay.shown, timeout=60000) as shown:
        window.studies.show_green_function(["bar"])
    m: GreenMap = shown.args[0]
    levels = contour_levels(m.g)
    assert len(levels) >= 4
    curves = [i for i in window.studies.green_overlay.items if i.__class__.__name__ == "PlotCurveItem"]
    # every contour point of the outermost level, away from the conductor, is nearly a circle of
    # radius a exp(level) about the centre: the far field of the bar is that of its round wire
    from scipy.interpolate import RegularGridInterpolator

    interp = RegularGridInterpolator((m.y, m.x), np.where(np.isfinite(m.g), m.g, 0.0))
    top = levels[-1]
    checked = 0
    for item in curves:
        xs, ys = item.getData()
        if len(xs) < 10 or not np.isfinite(xs).all():
            continue
        if np.allclose(interp(np.column_stack([ys, xs])), top, atol=0.02 * top):
            radius = np.hypot(xs - m.centre[0], ys - m.centre[1])
            np.testing.assert_allclose(radius, m.equivalent_radius * math.exp(top), rtol=0.03)
            checked += 1
    assert checked >= 1
    texts = [i.toPlainText() for i in window.studies.green_overlay.items if hasattr(i, "toPlainText")]
    from app.units import format_plain

    assert f"round wire within 1 % beyond {format_plain(m.round_wire_distance, 4)} mm" in texts
    labels = [t for t in texts if t.startswith("g = ")]
    assert 2 <= len(labels) <= len(levels)
    assert "Robin constant" in window.statusBar().currentMessage()


def test_the_overlay_goes_when_the_drawing_changes(window, qtbot):
    window.load(bar_and_wire(), None)
    with qtbot.waitSignal(window.studies.green_overlay.shown, timeout=60000):
        window.studies.show_green_function(["bar", "wire"])
    assert window.studies.green_overlay.items
    window.document.apply(bar_and_wire().with_potentials({"bar": 2.0}), "change")
    assert window.studies.green_overlay.items == [] and window.studies.green_overlay.map is None


def test_the_view_menu_offers_each_conductor_and_both_tied(window):
    window.load(bar_and_wire(), None)
    window.studies.fill_green_menu()
    assert [a.text() for a in window.studies.green_menu.actions() if a.text()] == [
        "bar", "wire", "all conductors tied together", "Hide"]


def test_only_the_latest_request_is_drawn(window, qtbot):
    window.load(bar_and_wire(), None)
    window.studies.show_green_function(["bar"])
    window.studies.show_green_function(["wire"])  # asked while the bar's map is computing
    qtbot.waitUntil(lambda: window.studies.green_overlay.map is not None and not window.studies.green_overlay.runner.is_busy,
                    timeout=60000)
    assert window.studies.green_overlay.map.names == ("wire",)


def test_a_map_finished_after_the_drawing_changed_is_not_drawn(window, qtbot):
    window.load(bar_and_wire(), None)
    window.studies.show_green_function(["bar"])
    window.document.apply(bar_and_wire().with_potentials({"bar": 3.0}), "change")
    qtbot.waitUntil(lambda: not window.studies.green_overlay.runner.is_busy, timeout=60000)
    qtbot.wait(50)
    assert window.studies.green_overlay.map is None and window.studies.green_overlay.items == []


def test_the_result_layers_step_aside_while_the_map_shows_and_come_back_after(window, qtbot):
    window.load(bar_and_wire(), None)
    overlays = window.canvas.overlays
    before = (overlays.shading, dict(overlays.show))
    assert before[0] != "none" and before[1]["equipotentials"]
    with qtbot.waitSignal(window.studies.green_overlay.shown, timeout=60000):
        window.studies.show_green_function(["bar"])
    assert overlays.shading == "none" and not overlays.show["equipotentials"] and not overlays.show["hot spots"]
    assert window.shading_combo.currentText() == "none" and not window.layer_boxes["equipotentials"].isChecked()
    window.studies.green_overlay.clear()  # View > Green's function > Hide
    assert (overlays.shading, overlays.show) == before
    assert window.shading_combo.currentText() == before[0] and window.layer_boxes["equipotentials"].isChecked()
