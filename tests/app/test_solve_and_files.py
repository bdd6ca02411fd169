"""Solving from the window, opening files (good and corrupt), saving, closing with changes."""

import json
import math
from unittest import mock

import pytest
from app_helpers import wait_for_solve
from PySide6.QtWidgets import QMessageBox

from app import edits
from app.files import project_files as files
from solver import EPSILON_0_F_PER_M

COAX = files.SAMPLES_DIR / "coaxial_feeder.json"


def test_solving_the_coax_sample_puts_its_capacitance_in_the_table(window, qtbot):
    assert window.commands.open(COAX)
    wait_for_solve(qtbot, window)
    table = window.results_panel.numbers.maxwell
    assert table.verticalHeaderItem(0).text() == "inner"
    shown_pF = float(table.item(0, 0).text())
    expected_pF = 2 * math.pi * EPSILON_0_F_PER_M / math.log(3.5) * 1e12  # about 44.41 pF/m
    assert shown_pF == pytest.approx(expected_pF, rel=1e-3)
    assert "inner\t" in table.as_text()
    assert window.windowTitle().startswith("coaxial_feeder.json")


def test_a_corrupt_file_shows_an_error_and_changes_nothing(window, tmp_path, shown_messages):
    window.commands.open(COAX)
    before = window.document.model
    bad = tmp_path / "broken.json"
    bad.write_text('{"format": "edgewise-project", "version": 1, "conductors": [', encoding="utf-8")
    assert not window.commands.open(bad)
    assert len(shown_messages) == 1
    assert "broken.json" in shown_messages[0][2]
    assert window.document.model == before
    assert window.document.path == COAX


def test_a_file_with_a_bad_field_names_it(window, tmp_path, shown_messages):
    data = json.loads(COAX.read_text())
    data["conductors"][0]["role"] = "sideways"
    bad = tmp_path / "bad_role.json"
    bad.write_text(json.dumps(data))
    assert not window.commands.open(bad)
    assert "sideways" in shown_messages[0][2] or "role" in shown_messages[0][2]
    assert window.document.model.conductors == ()


def test_closing_with_unsaved_changes_asks_and_can_be_cancelled(window):
    window.commands.open(COAX)
    window.properties  # the document is edited through the properties
    window.document.select(window.document.selection)
    from app import edits

    window.document.apply(edits.update_conductor(window.document.model, 0, potential_V=2.0), "Potential")
    with mock.patch.object(QMessageBox, "question", return_value=QMessageBox.Cancel) as question:
        assert not window.close()
    question.assert_called_once()
    assert window.isVisible()


def test_save_then_reopen_gives_the_same_model(window, tmp_path):
    window.commands.open(COAX)
    from app import edits

    window.document.apply(edits.set_extra(window.document.model, "part_length", 2000.0), "Part length")
    target = tmp_path / "feeder.json"
    assert window.commands.save_as(target)
    assert not window.document.is_modified
    saved = window.document.model
    assert window.commands.open(target)
    assert window.document.model == saved
    assert window.document.model.extras.get("part_length") == 2000.0
    recent = window.commands._recent()
    assert recent[0] == str(target.resolve()) and str(COAX.resolve()) in recent
    assert [a.text() for a in window.commands.recent_menu.actions()] == recent


def test_unsaved_work_is_written_to_the_recovery_file(window, qtbot):
    from app import edits
    from solver import Circle

    model, _ = edits.add_conductor(window.document.model, Circle((0, 0), 1))
    window.document.apply(model, "Draw")
    qtbot.waitUntil(lambda: files.recovery_path().is_file(), timeout=5000)
    recovered, original = files.read_recovery_file(files.recovery_path())
    assert recovered == model and original is None
    assert files.read_recovery() is None  # a running instance's work is never offered


def test_a_solver_error_is_shown_next_to_the_parts(window, qtbot):
    from app import edits
    from solver import Circle

    model, _ = edits.add_conductor(window.document.model, Circle((0, 10), 5))
    model, _ = edits.add_conductor(model, Circle((6, 10), 5))
    window.document.apply(model, "Draw")
    window.solve()
    wait_for_solve(qtbot, window)
    assert window.banner.isVisible()
    assert "conductor 1" in window.banner.text() and "touch or overlap" in window.banner.text()
    assert window.canvas.error_marks.items  # outlines and a note on the drawing


def test_undoing_back_to_the_saved_state_removes_the_recovery_file(window, qtbot):
    from app import edits
    from solver import Circle

    model, _ = edits.add_conductor(window.document.model, Circle((0, 0), 1))
    window.document.apply(model, "Draw")
    qtbot.waitUntil(lambda: files.recovery_path().is_file(), timeout=5000)
    window.document.undo()
    qtbot.waitUntil(lambda: not files.recovery_path().is_file(), timeout=5000)


def test_closing_and_choosing_save_writes_the_file_first(window, tmp_path):
    from PySide6.QtWidgets import QFileDialog

    from app import edits
    from solver import Circle

    model, _ = edits.add_conductor(window.document.model, Circle((0, 5), 1))
    window.document.apply(model, "Draw")
    target = tmp_path / "kept.json"
    with mock.patch.object(QMessageBox, "question", return_value=QMessageBox.Save), \
            mock.patch.object(QFileDialog, "getSaveFileName", return_value=(str(target), "")):
        assert window.close()
    assert files.open_model(target) == model


def test_the_error_note_stays_inside_the_plot(window, qtbot):
    """A long message about a part at the right edge of the view is wrapped and kept inside the
    plot (it used to start at the part's corner and run off the plot's right edge)."""
    from solver import Circle

    model, _ = edits.add_conductor(window.document.model, Circle((0, 0), 1))
    model, _ = edits.add_conductor(model, Circle((2, 0), 1))
    window.document.apply(model, "Draw")
    window.resize(1366, 768)
    qtbot.wait(100)  # the layout settles
    name = model.conductors[-1].name
    window.canvas.plotItem.vb.setRange(xRange=(-3, 3.1), yRange=(-3, 3), padding=0)  # the part at the right edge
    message = (f"The mesh would need about 3.34e+19 conductor panels for its system; responsible: the gap "
               f"between conductors '{name}' and '{model.conductors[-2].name}'; move them apart (or merge them "
               "into one conductor). Or choose a coarser mesh.")
    window.canvas.show_errors([name], message)
    qtbot.wait(50)
    vb = window.canvas.plotItem.vb
    note = window.canvas.error_marks.note
    assert note is not None and note.isVisible()
    plot_box = vb.sceneBoundingRect()
    note_box = note.sceneBoundingRect()
    assert plot_box.contains(note_box), (plot_box, note_box)
    window.resize(1200, 700)  # narrower: still inside
    qtbot.wait(100)
    assert vb.sceneBoundingRect().contains(note.sceneBoundingRect())
    window.canvas.clear_errors()
    assert window.canvas.error_marks.note is None
