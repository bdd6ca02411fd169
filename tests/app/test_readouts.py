"""Readouts after a solve: cursor potential and field, the boundary plot linked with the drawing,
the caveat and caution texts."""

import pytest
from app_helpers import to_pixel, wait_for_solve
from PySide6.QtTest import QTest

from app import cautions, edits
from app.files import project_files as files
from app.units import NBSP, format_percent


@pytest.fixture
def twin(window, qtbot):
    window.commands.open(files.SAMPLES_DIR / "twin_lead.json")
    wait_for_solve(qtbot, window)
    return window


def test_cursor_readout_shows_potential_and_field(twin):
    QTest.mouseMove(twin.canvas.viewport(), to_pixel(twin.canvas, 0.0, 0.0))
    text = twin.readout.text()
    assert "potential" in text and "V/m" in text
    QTest.mouseMove(twin.canvas.viewport(), to_pixel(twin.canvas, -4.0, 0.0))  # centre of the 'go' wire
    assert "inside a conductor" in twin.readout.text()


def test_boundary_plot_and_drawing_are_linked_both_ways(twin):
    plot = twin.results_panel.boundary
    panel = plot.pick_at(1.0, 0.0)
    mid = twin.results.solution.mesh.midpoints[panel] * 1e3  # mm
    x, y = twin.canvas.overlays._marker.getData()
    assert (x[0], y[0]) == pytest.approx(tuple(mid))
    # and from the drawing: a click on the 'return' wire outline marks the plot
    twin.canvas.boundary_pick((4.0 + 0.65, 0.0))
    mx, my = plot._marker.getData()
    assert len(mx) == 1


def test_part_length_caveat_follows_the_ten_times_rule(twin):
    caveats = twin.results_panel.caveats
    caveats.length_edit.setText("40")  # the twin lead is about 9.3 mm across
    caveats.length_edit.editingFinished.emit()
    assert twin.document.model.extras["part_length"] == 40.0
    assert "below the ratio of 10" in caveats.verdict.text()  # solver.check_part_length's words
    caveats.length_edit.setText("500")
    caveats.length_edit.editingFinished.emit()
    assert "above the ratio of 10" in caveats.verdict.text()
    c_pF = twin.results.solution.capacitance_maxwell_F_per_m[0, 0] * 0.5 * 1e12  # 500 mm = 0.5 m
    assert f"go: {c_pF:.4g} pF" in caveats.totals.text()
    assert not twin.stale_label.isVisible()  # a view setting does not outdate the results


def test_caution_line_grades_a_thin_margin(twin, qtbot):
    line = twin.results_panel.summary.caution
    assert not line.isVisible()  # 1 V: a low-voltage model gets no breakdown caution
    # 15 kV on a 0.65 mm wire 8 mm from its return: peak about 1/1.2 of its Peek onset
    model = edits.update_conductor(twin.document.model, 0, potential_V=15000.0)
    twin.document.apply(model, "Potential")
    twin.solve()
    wait_for_solve(qtbot, twin)
    assert line.isVisible() and not twin.banner.isVisible()  # the banner is for "cannot solve" only
    assert line.headline.text().startswith("▲  APPROACHING") and "CAUTION: thin margin on 'go'" in line.headline.text()
    assert "qualified persons" in line.details.text() and not line.details_area.isVisible()
    # one graded line, not the old banner (222 px measured); the headline now also names the voltage basis
    assert line.height() < 180


def test_the_program_and_safety_md_state_the_same_caution():
    from pathlib import Path

    safety = " ".join((Path(files.SAMPLES_DIR).parent / "SAFETY.md").read_text(encoding="utf-8").split())
    assert " ".join(cautions.STANDING_STATEMENT.split()) in safety


def test_no_air_caution_when_the_peaks_sit_in_insulation(window, qtbot):
    cable = files.open_model(files.SAMPLES_DIR / "shielded_three_core_cable.json").with_mesh_density("coarse")
    window.load(cable, None)
    window.solve()
    wait_for_solve(qtbot, window)
    assert not window.banner.isVisible()
    assert "not in air: inside" in window.results_panel.summary.verdict.headline


def test_numbers_show_the_raw_asymmetry_of_the_capacitance_matrix(twin):
    # accuracy check made before the matrix is symmetrised (reciprocity, common practice)
    asymmetry = twin.results.solution.capacitance_asymmetry
    text = twin.results_panel.numbers.asymmetry_label.text()
    # through the shared formatter, the number and its % sign joined by a no-break space
    assert f"asymmetric by {format_percent(asymmetry).replace(' ', NBSP)}" in text and "before it was symmetrised" in text
