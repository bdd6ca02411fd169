"""The "Cross-check" section: button, background job, table and Fekete-point plot."""

from test_line_figures_view import wait_until

import solver
from app.jobs.results import compute_results
from solver import Circle, Conductor, Model, Rectangle


def test_cross_check_table_and_points(qtbot, monkeypatch):
    from app.panels.cross_check_view import ROWS, CrossCheckView

    # fewer points than the default keep the test short; the routes are tested in tests/solver
    original = solver.check_each_equivalent_radius
    monkeypatch.setattr(solver, "check_each_equivalent_radius", lambda m: original(m, (8, 12, 16, 24)))
    model = Model(unit="mm", mesh_density="coarse", conductors=(
        Conductor("wire", (Circle((0.0, 0.0), 1.0),), role="fixed", potential_V=1.0),
        Conductor("bar", (Rectangle((8.0, 0.0), 3.0, 3.0),), role="reference")))
    view = CrossCheckView()
    qtbot.addWidget(view)
    view.show()
    assert not view.run_button.isEnabled()
    view.show_results(compute_results(model, grid_points=0, n_field_lines=0))
    assert view.run_button.isEnabled()
    view.run_button.click()
    wait_until(lambda: view.checks is not None or "No cross-check" in view.status.text())
    # one column per conductor, the unit in the row headings
    assert view.table.columnCount() == 2 and view.table.rowCount() == len(ROWS)
    assert view.table.horizontalHeaderItem(1).text() == "bar"
    assert view.table.item(ROWS.index("verdict"), 0).text() == "agree"
    assert view.table.verticalHeaderItem(0).text().replace("\n", " ") == "solver radius (mm)"
    assert abs(float(view.table.item(0, 0).text()) - view.checks[0].equivalent_radius_m * 1e3) < 1e-3
    assert view.table.item(2, 0).text()[0] in "+\u22120"  # a difference carries its sign
    assert len(view.points_item.data) == 24
    view.table.selectColumn(1)
    assert view.plot.plotItem.titleLabel.text.startswith("Fekete points, N = 24")
    view.mark_stale(True)
    assert not view.run_button.isEnabled() and "OUT OF DATE" in view.status.text()
