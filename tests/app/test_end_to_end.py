"""The "done when" path: draw a busbar pair over a ground plane with the mouse, set potentials,
solve, read the matrices and the hot spots, export a report, save, and reopen."""

import numpy as np
from app_helpers import click, drag, wait_for_solve


def _type(window, key, text):
    field = window.properties.fields[key]
    field.setText(text)
    field.editingFinished.emit()


def test_busbar_pair_over_ground_end_to_end(window, qtbot, tmp_path):
    canvas = window.canvas
    canvas.set_tool("ground plane")
    click(canvas, (0, 0))
    canvas.set_tool("rectangle")
    drag(canvas, (-30, 10), (-10, 20))
    _type(window, "potential", "1000")
    _type(window, "name", "bar A")
    canvas.set_tool("rectangle")
    drag(canvas, (10, 10), (30, 20))
    _type(window, "potential", "-1000")
    _type(window, "corner_radius", "2")
    model = window.document.model
    assert model.conductor_names == ("bar A", "conductor 1")
    assert model.ground_plane.y == 0.0
    assert model.conductors[1].shapes[0].corner_radius == 2.0

    window.solve()
    wait_for_solve(qtbot, window)
    assert window.results is not None and not window.stale_label.isVisible()
    table = window.results_panel.numbers.maxwell
    c = np.array([[float(table.item(i, j).text().replace("\u2212", "-")) for j in range(2)] for i in range(2)])
    assert table.item(0, 1).text().startswith("\u2212")  # a true minus sign on screen
    assert "-" in table.as_text() and "\u2212" not in table.as_text()  # an ASCII one for spreadsheets
    assert c[0, 0] > 0 and c[1, 1] > 0 and c[0, 1] < 0
    assert abs(c[0, 1] - c[1, 0]) <= 1e-9 * abs(c[0, 0])
    per = window.results_panel.numbers.conductors  # one column per conductor
    rows = [per.verticalHeaderItem(i).text().replace("\n", " ") for i in range(per.rowCount())]
    field_row = next(r for r in rows if r.startswith("peak |E| at surface ("))  # the unit in the heading
    assert field_row.endswith("V/m)") and float(per.item(rows.index(field_row), 0).text()) > 0
    assert per.item(rows.index("peak at a sharp corner"), 0).text() == "yes"  # the square bar peaks at a corner

    report = tmp_path / "busbars.pdf"
    assert window.commands.export_report(report)
    assert report.read_bytes().startswith(b"%PDF")
    saved = tmp_path / "busbars.json"
    assert window.commands.save_as(saved)
    window.commands.new()
    assert window.document.model.conductors == ()
    assert window.commands.open(saved)
    assert window.document.model == model
    wait_for_solve(qtbot, window)


def test_editing_after_a_solve_marks_results_out_of_date(window, qtbot):
    canvas = window.canvas
    canvas.set_tool("ground plane")
    click(canvas, (0, 0))
    canvas.set_tool("rectangle")
    drag(canvas, (-10, 10), (10, 20))
    window.solve()
    wait_for_solve(qtbot, window)
    canvas.set_tool("pick")
    drag(canvas, (0, 15), (0, 25))
    assert window.stale_label.isVisible()
    assert "OUT OF DATE" in window.results_panel.numbers.status.text()
    assert window.canvas.overlays.stale


def test_small_models_re_solve_by_themselves_after_an_edit(window, qtbot):
    window.auto_solve = True
    canvas = window.canvas
    canvas.set_tool("ground plane")
    click(canvas, (0, 0))
    canvas.set_tool("rectangle")
    drag(canvas, (-10, 10), (10, 20))
    qtbot.waitUntil(lambda: window.results is not None and window.results.model == window.document.model,
                    timeout=30000)
    assert not window.stale_label.isVisible()


def test_trace_on_a_drawn_board_solves_with_the_dielectric(window, qtbot):
    canvas = window.canvas
    canvas.set_tool("ground plane")
    click(canvas, (0, 0))
    canvas.set_tool("rectangle")
    drag(canvas, (-5, 10), (5, 15))
    window.solve()
    wait_for_solve(qtbot, window)
    c_air = window.results.solution.capacitance_maxwell_F_per_m[0, 0]
    canvas.set_tool("dielectric")
    drag(canvas, (-40, 0), (40, 10))  # a board from the plane up to the bar
    window.solve()
    wait_for_solve(qtbot, window)
    c_board = window.results.solution.capacitance_maxwell_F_per_m[0, 0]
    assert window.document.model.dielectrics and not window.banner.isVisible()
    assert 1.2 * c_air < c_board < 4.4 * c_air  # partly filled: between air and a full fill
