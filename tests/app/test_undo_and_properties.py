"""Undo/redo through the window, and the properties area in step with the drawing."""

import pytest
from app_helpers import drag

from solver import Rectangle


def _draw_bar(window):
    window.canvas.set_tool("rectangle")
    drag(window.canvas, (-20, 10), (0, 20))
    window.canvas.set_tool("pick")


def test_undo_and_redo_shortcuts_round_trip(window, qtbot):

    _draw_bar(window)
    drawn = window.document.model
    window.commands.undo_action.trigger()
    assert window.document.model.conductors == ()
    window.commands.redo_action.trigger()
    assert window.document.model == drawn


def test_typing_a_width_changes_the_shape(window, qtbot):
    _draw_bar(window)
    field = window.properties.fields["width"]
    field.setText("35")
    field.editingFinished.emit()
    (shape,) = window.document.model.conductors[0].shapes
    assert shape == Rectangle((-10, 15), 35, 10)


def test_moving_on_the_canvas_updates_the_fields(window):
    _draw_bar(window)
    drag(window.canvas, (-10, 15), (10, 15))
    assert window.properties.fields["cx"].text() == "10"


def test_potential_and_role_from_the_properties(window):
    _draw_bar(window)
    window.properties.fields["potential"].setText("11000")
    window.properties.fields["potential"].editingFinished.emit()
    assert window.document.model.conductors[0].potential_V == 11000.0
    window.properties.role_combo.activated.emit(2)
    assert window.document.model.conductors[0].role == "reference"


def test_a_bad_value_is_refused_with_the_reason(window):
    _draw_bar(window)
    before = window.document.model
    window.properties.fields["height"].setText("-3")
    window.properties.fields["height"].editingFinished.emit()
    assert window.document.model == before
    shown = window.properties.problem_label.text()
    assert "'-3' in 'height of conductor 1', in mm" in shown and "must be greater than 0" in shown


def test_selecting_in_the_parts_list_selects_on_the_canvas(window):
    _draw_bar(window)
    window.document.select(None)
    window.parts.topLevelItem(0).setSelected(True)
    assert window.document.selection is not None
    assert window.properties.fields["name"].text() == "conductor 1"


def test_arrow_keys_nudge_the_selected_part_by_the_snap_step(window, qtbot):
    from PySide6.QtCore import Qt

    _draw_bar(window)
    step = window.canvas.snap_step()
    qtbot.keyClick(window.canvas, Qt.Key_Right)
    qtbot.keyClick(window.canvas, Qt.Key_Up)
    (shape,) = window.document.model.conductors[0].shapes
    assert shape.center == pytest.approx((-10 + step, 15 + step))
    window.document.undo()
    assert window.document.model.conductors[0].shapes[0].center == pytest.approx((-10 + step, 15))


def test_two_shapes_joined_into_one_conductor_from_the_properties(window):
    _draw_bar(window)
    window.canvas.set_tool("rectangle")
    drag(window.canvas, (10, 10), (30, 20))
    assert len(window.document.model.conductors) == 2
    combo = window.properties.member_combo
    combo.activated.emit(combo.findText("conductor 1"))
    (c,) = window.document.model.conductors
    assert len(c.shapes) == 2 and window.parts.topLevelItem(0).childCount() == 2


def test_duplicate_align_and_delete_commands(window):
    _draw_bar(window)
    window.commands.duplicate()
    first, copy = window.document.model.conductors
    assert copy.shapes[0].center == pytest.approx((14, 15)) and copy.potential_V == first.potential_V
    window.document.apply(window.document.model, "nothing")  # no change, no edit
    window.commands.align("bottom")  # the copy is selected; align with the one before
    window.commands.align("centre x")
    assert window.document.model.conductors[1].shapes[0].center == pytest.approx((-10, 15))
    window.commands.delete()
    assert len(window.document.model.conductors) == 1


def test_choosing_another_unit_converts_the_drawing(window):
    _draw_bar(window)
    combo = window.properties.unit_combo
    combo.setCurrentText("m")
    combo.activated.emit(combo.currentIndex())
    model = window.document.model
    assert model.unit == "m"
    shape = model.conductors[0].shapes[0]
    assert shape.center == pytest.approx((-0.01, 0.015)) and (shape.width, shape.height) == pytest.approx((0.02, 0.01))
    assert window.properties.fields["width"].text() == "0.02"


def test_picking_on_the_canvas_selects_the_row_in_the_parts_list(window):
    from app_helpers import click

    _draw_bar(window)
    window.document.select(None)
    assert not window.parts.selectedItems()
    click(window.canvas, (-10, 15))
    (row,) = window.parts.selectedItems()
    assert row.text(0) == "conductor 1"


def test_a_long_title_shows_its_start(window):
    # the busbar's title read "arthed steel enclosure": the field showed the end of it
    from app.files import project_files as files

    window.commands.open(files.SAMPLES_DIR / "busbar_enclosure.json")
    edit = window.properties.title_edit
    assert len(edit.text()) > 30 and edit.cursorPosition() == 0
