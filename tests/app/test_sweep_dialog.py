"""The sweep dialog end to end: the solver's sweep in the background, table, plot, CSV, goal search,
cancel, and the value found put into the drawing (undoable)."""

from __future__ import annotations

import html
import math
import re

import numpy as np
import pytest

from solver import EPSILON_0_F_PER_M, Circle, Conductor, GroundPlane, Model
from solver.studies import NOT_RUN, sweep

WIRE_Y = "conductors.wire.shapes.0.center.1"
WIRE_R = "conductors.wire.shapes.0.radius"


def wire_over_plane(height_mm: float = 5.0, potential_V: float = 1.0) -> Model:
    """A 1 mm radius wire over an earthed plane (a scenario of our own)."""
    return Model(unit="mm", ground_plane=GroundPlane(0.0),
                 conductors=(Conductor("wire", (Circle((0.0, height_mm), 1.0),), "fixed", potential_V),))


@pytest.fixture
def dialog(window, qtbot):
    from app.panels.sweep_dialog import SweepDialog

    window.load(wire_over_plane(), None)
    d = SweepDialog(window.document, window)
    qtbot.addWidget(d)
    d.show()
    yield d
    d.runner.cancel()
    d.runner.wait()


def _finish(qtbot, dialog, timeout_ms=60000):
    qtbot.waitUntil(lambda: not dialog.runner.is_busy, timeout=timeout_ms)


def test_the_dialog_offers_the_drawings_fields_and_figures(dialog):
    paths = [dialog.field_combo.itemData(i) for i in range(dialog.field_combo.count())]
    assert {"conductors.wire.potential_V", WIRE_R, WIRE_Y, "ground_plane.y"} <= set(paths)
    figures = [dialog.figure_list.item(i).text() for i in range(dialog.figure_list.count())]
    # plain names with units, not the study's names for machines
    assert figures[:3] == ["Z0 (Ω)", "εeff", "delay (ns/m)"]
    assert "C wire–wire (pF/m)" in figures and "peak |E| on wire (kV/m)" in figures
    assert "equivalent radius of wire (mm)" in figures  # a length in the model's unit
    assert not any("_" in f for f in figures)
    goal = [dialog.goal_figure.itemText(i) for i in range(dialog.goal_figure.count())]
    assert goal == figures


def test_a_sweep_shows_the_solvers_table_and_plot_and_exports_its_csv(dialog, qtbot, tmp_path):
    dialog.select_field(WIRE_R)
    dialog.start_edit.setText("500 um")  # a value may carry its unit; a bare number is in the model's mm
    dialog.stop_edit.setText("1.5")
    dialog.count_spin.setValue(3)
    dialog.set_figures(["C_F_per_m.wire.wire", "peak_field_V_per_m.wire"])
    with qtbot.waitSignal(dialog.runner.finished, timeout=60000):
        assert dialog.run_sweep()
    expected = sweep(wire_over_plane(), {WIRE_R: [0.5, 1.0, 1.5]}, ["C_F_per_m.wire.wire", "peak_field_V_per_m.wire"])
    assert dialog.table == expected
    assert dialog.table_view.rowCount() == 3
    header = dialog.table_view.horizontalHeaderItem(1).text()
    assert header == "C wire–wire (pF/m)"
    c_pF = expected.column("C_F_per_m.wire.wire")[1] * 1e12
    assert dialog.table_view.item(1, 1).text() == f"{c_pF:.5g}"
    dialog.plot.choose_figure("C_F_per_m.wire.wire")
    x, y = dialog.plot.curve_data()
    np.testing.assert_allclose(x, [0.5, 1.0, 1.5])
    np.testing.assert_allclose(y, np.array(expected.column("C_F_per_m.wire.wire")) * 1e12)
    assert "1 V" not in dialog.caution.text() and not dialog.caution.isVisible()  # a 1 V model: no caution
    out = tmp_path / "sweep.csv"
    assert dialog.export_csv(out)
    assert out.read_text(encoding="utf-8") == expected.to_csv()


def test_the_goal_search_finds_the_height_of_a_known_capacitance_and_puts_it_in_the_drawing(dialog, qtbot, window):
    # Closed form of a round wire over a conducting plane by images: C' = 2 pi eps0 / arcosh(h / a)
    # (S. Ramo, J. R. Whinnery, T. Van Duzer, Fields and Waves in Communication Electronics, 1994, sec. 1.x).
    target = 2 * math.pi * EPSILON_0_F_PER_M / math.acosh(7.0 / 1.0)
    dialog.select_field(WIRE_Y)
    dialog.start_edit.setText("3")
    dialog.stop_edit.setText("12")
    dialog.goal_box.choose_figure("C_F_per_m.wire.wire")
    dialog.goal_target.setText(f"{target * 1e12:.12g} pF/m")  # the target may carry its unit
    with qtbot.waitSignal(dialog.runner.finished, timeout=120000):
        assert dialog.run_search()
    found = dialog.found
    assert found.target == pytest.approx(target, rel=1e-11)
    assert found.value == pytest.approx(7.0, rel=2e-3)  # the solver's error on C is well under 1e-3
    text = html.unescape(re.sub("<[^>]+>", "", dialog.goal_result.text()))
    shown = re.search(r"wire: centre y = ([0-9.]+)\s+mm gives C wire–wire = ([0-9.]+)\s+pF/m \(target "
                      r"([0-9.]+)\s+pF/m", text)
    assert shown, text
    # The value is shown to the figures the root finder's tolerance supports: rounding it moved it
    # by less than the tolerance, and one figure fewer would move it by more than a tenth of it.
    value_shown = float(shown.group(1))
    assert abs(value_shown - found.value) <= found.parameter_tolerance
    assert len(shown.group(1).replace(".", "").lstrip("0")) <= 7
    assert float(shown.group(3)) == pytest.approx(target * 1e12, rel=1e-3)
    assert float(shown.group(2)) == pytest.approx(found.figure_value * 1e12, rel=1e-3)
    assert dialog.apply_found()
    assert window.document.model.conductor("wire").shapes[0].center[1] == pytest.approx(found.value, rel=1e-12)
    window.document.undo()
    assert window.document.model == wire_over_plane()


def test_a_bad_number_is_said_and_nothing_runs(dialog):
    dialog.select_field(WIRE_R)
    dialog.start_edit.setText("two")
    assert not dialog.run_sweep()
    assert "'two'" in dialog.status.text() and "From" in dialog.status.text() and not dialog.runner.is_busy
    dialog.start_edit.setText("2 kV")  # a potential is not a length
    assert not dialog.run_sweep()
    assert "'2 kV'" in dialog.status.text() and not dialog.runner.is_busy


def test_cancel_stops_the_sweep_and_keeps_the_cases_run(dialog, qtbot):
    dialog.select_field(WIRE_R)
    dialog.count_spin.setValue(200)
    dialog.set_figures(["C_F_per_m.wire.wire"])
    with qtbot.waitSignal(dialog.runner.cancelled, timeout=60000):
        dialog.run_sweep()
        dialog.runner.cancel()
    _finish(qtbot, dialog)
    assert dialog.table is not None and len(dialog.table) == 200
    assert any(r["error"] == NOT_RUN for r in dialog.table.rows)
    run = sum(1 for r in dialog.table.rows if r["error"] != NOT_RUN)
    assert dialog.status.text() == f"{run} of 200 cases run, cancelled."


def test_margins_of_a_high_voltage_model_carry_the_caution(window, qtbot):
    from app.panels.sweep_dialog import SweepDialog
    from solver import HIGH_VOLTAGE_CAUTION

    window.load(wire_over_plane(potential_V=20e3), None)
    d = SweepDialog(window.document, window)
    qtbot.addWidget(d)
    d.select_field(WIRE_R)
    d.count_spin.setValue(2)
    d.set_figures(["peak_field_V_per_m.wire"])
    with qtbot.waitSignal(d.runner.finished, timeout=60000):
        d.run_sweep()
    assert not d.caution.isHidden() and d.caution.toolTip() == HIGH_VOLTAGE_CAUTION
    assert "Caution - high voltage." in d.caution.text() and "details" in d.caution.text()
    d.caution.linkActivated.emit("toggle")
    assert html.unescape(re.sub("<[^>]+>", "", d.caution.text())) == f"\u26a0 {HIGH_VOLTAGE_CAUTION} less"


def test_a_target_out_of_reach_is_said_in_the_search_box(dialog, qtbot):
    dialog.select_field(WIRE_R)
    dialog.start_edit.setText("0.5")
    dialog.stop_edit.setText("1.5")
    dialog.goal_box.choose_figure("C_F_per_m.wire.wire")
    dialog.goal_target.setText("1e-9")  # 1000 pF/m: far above any wire of this size
    status_before = dialog.status.text()
    with qtbot.waitSignal(dialog.runner.failed, timeout=60000):
        assert dialog.run_search()
    assert "does not cross 1e-09" in dialog.goal_result.text()
    assert dialog.status.text() == status_before and not dialog.apply_button.isEnabled()


@pytest.mark.parametrize(("figure", "typed", "expected"), [
    ("Z0_ohm", "50 ohm", 50.0),
    ("Z0_ohm", "50 \u03a9", 50.0),
    ("Z0_ohm", "50", 50.0),                # a bare number is in the figure's unit, shown beside the field
    ("Z0_ohm", "0.05 kohm", 50.0),
    ("margin.wire", "2", 2.0),
    ("C_F_per_m.wire.wire", "110 pF/m", 110e-12),
    ("peak_field_V_per_m.wire", "3 kV/mm", 3e6),
    ("delay_s_per_m", "6 ns/m", 6e-9),
    ("equivalent_radius_m.wire", "2", 2e-3),   # a length: a bare number is in the model's mm
])
def test_the_goal_target_is_read_with_the_figures_unit(dialog, figure, typed, expected):
    dialog.goal_box.choose_figure(figure)
    dialog.goal_target.setText(typed)
    assert dialog.goal_box.target_si() == pytest.approx(expected, rel=1e-12)
    assert dialog.goal_box.target_unit.text() == {"Z0_ohm": "\u03a9", "margin.wire": "", "delay_s_per_m": "s/m",
                                                  "equivalent_radius_m.wire": "mm"}.get(figure, dialog.goal_box.target_unit.text())


def test_a_target_of_the_wrong_kind_is_said_and_nothing_runs(dialog):
    dialog.select_field(WIRE_R)
    dialog.goal_box.choose_figure("Z0_ohm")
    dialog.goal_target.setText("50 pF/m")
    assert not dialog.run_search()
    assert "'50 pF/m'" in dialog.goal_result.text() and "Target" in dialog.goal_result.text()
    assert "ohm" in dialog.goal_result.text() and not dialog.runner.is_busy
