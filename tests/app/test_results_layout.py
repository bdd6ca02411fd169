"""The results area at every window size: every section one click away, no widget drawn over
another or cut off, the summary block whole, and every section marked when out of date."""

import re

import pytest
from app_helpers import wait_for_solve
from PySide6.QtWidgets import (
    QAbstractButton,
    QAbstractScrollArea,
    QApplication,
    QComboBox,
    QFrame,
    QGroupBox,
    QLabel,
    QLineEdit,
    QProgressBar,
    QTableWidget,
    QWidget,
)

import solver
from app import edits
from app.files import project_files as files

#: Room a drop-down list takes beside its text (frame and arrow), pixels.
COMBO_ARROW_PX = 28
#: Room a table cell takes beside its text (Qt's item margins), pixels.
CELL_PADDING_PX = 4

SIZES = ((1366, 768), (1500, 900), (1920, 1080), (1024, 640))

#: Widgets whose inside is their own business (scroll areas clip by design; plots draw themselves).
LEAVES = (QAbstractScrollArea, QAbstractButton, QComboBox, QLineEdit, QProgressBar, QLabel)


def settle(qtbot) -> None:
    for _ in range(3):
        QApplication.processEvents()
        qtbot.wait(15)


def problems_in(widget: QWidget, where: str) -> list[str]:
    """Pairs of visible sibling widgets that overlap, children outside their parent, and word-
    wrapped labels given less height than their text needs, anywhere under ``widget``."""
    found = []
    children = [c for c in widget.findChildren(QWidget, options=pyside_direct())
                if c.isVisible() and not c.isWindow()]
    rect = widget.rect()
    for i, a in enumerate(children):
        g = a.geometry()
        if not rect.contains(g) and not isinstance(widget, QAbstractScrollArea):
            found.append(f"{where}: {name(a)} {g.getRect()} is cut off by {name(widget)} {rect.getRect()}")
        for b in children[i + 1:]:
            overlap = g.intersected(b.geometry())
            if overlap.width() > 1 and overlap.height() > 1:
                found.append(f"{where}: {name(a)} overlaps {name(b)} by {overlap.width()}x{overlap.height()} px")
        if isinstance(a, QLabel) and a.wordWrap() and a.text():
            need = a.heightForWidth(a.width())
            if need > a.height() + 1:
                found.append(f"{where}: label '{a.text()[:40]}' needs {need} px, has {a.height()}")
        if isinstance(a, QLabel) and not a.wordWrap() and a.text() and a.sizeHint().width() > a.width() + 1:
            found.append(f"{where}: label '{a.text()[:40]}' needs {a.sizeHint().width()} px across, has {a.width()}")
        if isinstance(a, QAbstractButton) and a.text() and a.sizeHint().width() > a.width() + 1:
            found.append(f"{where}: button '{a.text()[:40]}' needs {a.sizeHint().width()} px across, has {a.width()}")
        if isinstance(a, QComboBox) and a.currentText() and (
                a.fontMetrics().horizontalAdvance(a.currentText()) > a.width() - COMBO_ARROW_PX):
            found.append(f"{where}: choice '{a.currentText()[:40]}' is cut off at {a.width()} px")
        if isinstance(a, QAbstractScrollArea) and a.horizontalScrollBar().maximum() > 0:
            # sideways scrolling hides columns or the ends of headings at this width
            found.append(f"{where}: {name(a)} scrolls sideways by {a.horizontalScrollBar().maximum()} px")
        if isinstance(a, QTableWidget):
            found += _cut_headers(a, where)
        if isinstance(a, QAbstractScrollArea) and hasattr(a, "widget") and a.widget() is not None:
            found += problems_in(a.widget(), where)
        elif not isinstance(a, LEAVES) and (type(a) in (QWidget, QFrame, QGroupBox) or a.layout() is not None):
            found += problems_in(a, where)
    return found


def _cut_headers(table: QTableWidget, where: str) -> list[str]:
    """Header texts (every line of them) wider than their header section, and cell texts wider or
    taller than their cell (drawn cut off or elided)."""
    found = []
    metrics = table.horizontalHeader().fontMetrics()
    for j in range(table.columnCount()):
        item = table.horizontalHeaderItem(j)
        need = max((metrics.horizontalAdvance(line) for line in (item.text() if item else "").split("\n")), default=0)
        if need > table.columnWidth(j):
            found.append(f"{where}: column heading '{item.text()[:30]}' needs {need} px, has {table.columnWidth(j)}")
    cell_metrics = table.fontMetrics()
    for i in range(table.rowCount()):
        for j in range(table.columnCount()):
            cell = table.item(i, j)
            lines = (cell.text() if cell else "").split("\n")
            wide = max((cell_metrics.horizontalAdvance(line) for line in lines), default=0)
            if cell is not None and cell.text() and (wide + CELL_PADDING_PX > table.columnWidth(j)
                                                     or len(lines) * cell_metrics.lineSpacing() > table.rowHeight(i)):
                found.append(f"{where}: cell '{cell.text()[:30]}' needs {wide + CELL_PADDING_PX} x "
                             f"{len(lines) * cell_metrics.lineSpacing()} px, has {table.columnWidth(j)} x {table.rowHeight(i)}")
    vertical = table.verticalHeader()
    for i in range(table.rowCount()):
        item = table.verticalHeaderItem(i)
        need = max((metrics.horizontalAdvance(line) for line in (item.text() if item else "").split("\n")), default=0)
        if vertical.isVisible() and need > vertical.width():
            found.append(f"{where}: row heading '{item.text()[:30]}' needs {need} px, has {vertical.width()}")
    return found


def pyside_direct():
    from PySide6.QtCore import Qt

    return Qt.FindDirectChildrenOnly


def name(w: QWidget) -> str:
    return f"{type(w).__name__}({w.objectName() or (w.text()[:20] if hasattr(w, 'text') else '')})"


@pytest.fixture
def hv_twin(window, qtbot):
    """The twin lead at 15 kV: a thin margin, so the caution line shows."""
    window.commands.open(files.SAMPLES_DIR / "twin_lead.json")
    model = edits.update_conductor(window.document.model, 0, potential_V=15000.0).with_mesh_density("coarse")
    window.document.apply(model, "Potential")
    window.solve()
    wait_for_solve(qtbot, window)
    return window


@pytest.mark.parametrize("size", SIZES)
def test_every_section_fits_at_every_size(hv_twin, qtbot, size):
    window, panel = hv_twin, hv_twin.results_panel
    window.resize(*size)
    settle(qtbot)
    assert panel.summary.caution.isVisible()
    # one click away: every section's button is whole and inside the panel, with its full text
    for button in panel.buttons.buttons:
        top_left = button.mapTo(panel, button.rect().topLeft())
        assert panel.rect().contains(button.rect().translated(top_left)), button.text()
        assert button.width() >= button.fontMetrics().horizontalAdvance(button.text()), button.text()
        assert button.isVisible() and button.height() > 10
    for title in panel.section_titles():
        index = panel.section_titles().index(title)
        panel.buttons.buttons[index].click()  # one click
        runner = getattr(panel.sections[title], "runner", None)
        if runner is not None:  # the section's figures come in the background: judge the settled page
            qtbot.waitUntil(lambda r=runner: not r.is_busy, timeout=60000)
        settle(qtbot)
        assert panel.current_section() == title
        found = problems_in(panel, f"{size} {title}")
        assert found == [], "\n".join(found)


@pytest.mark.parametrize(("sample", "size"), [("busbar_enclosure.json", (1366, 768)),
                                            ("three_traces_over_ground.json", (1366, 768)),
                                            ("shielded_three_core_cable.json", (1366, 768)),
                                            ("busbar_enclosure.json", (1920, 1080))])
def test_the_tables_of_three_conductor_samples_fit_without_scrolling_sideways(window, qtbot, sample, size):
    """Three conductors and an enclosure (or a ground plane): the High voltage table, the
    per-conductor figures and the modes still show every column and heading whole."""
    window.commands.open(files.SAMPLES_DIR / sample)
    window.document.apply(window.document.model.with_mesh_density("coarse"), "Mesh")
    window.solve()
    wait_for_solve(qtbot, window)
    window.resize(*size)
    _assert_sections_whole(qtbot, window.results_panel, window.results_panel.section_titles(), f"{sample} {size}")


@pytest.mark.parametrize("sample", ["shielded_three_core_cable.json", "two_layer_coax_cable.json"])
def test_the_high_voltage_table_fits_1366_with_short_headings_that_say_what_they_are(window, qtbot, sample):
    """Four columns (three cores and the screen, or a conductor and the air at the insulation's
    surface): no sideways scrolling at 1366 x 768, every heading at most two lines, each with a
    tooltip saying what it stands for."""
    from app.panels.hot_spots_view import ROW_HEADINGS

    window.resize(1366, 768)
    window.commands.open(files.SAMPLES_DIR / sample)
    window.document.apply(window.document.model.with_mesh_density("coarse"), "Mesh")
    window.solve()
    wait_for_solve(qtbot, window)
    panel = window.results_panel
    panel.show_section("High voltage")
    qtbot.waitUntil(lambda: panel.hot_spots.margins is not None, timeout=60000)
    settle(qtbot)
    table = panel.hot_spots.table
    assert table.rowCount() == len(ROW_HEADINGS) and table.columnCount() >= 2
    found = problems_in(panel, f"{sample} High voltage")
    assert found == [], "\n".join(found)
    assert table.horizontalScrollBar().maximum() == 0
    for i in range(table.rowCount()):
        heading = table.verticalHeaderItem(i)
        assert heading.text().count("\n") <= 1, heading.text()
        assert len(heading.toolTip()) > len(heading.text()), heading.text()
    for j in range(table.columnCount()):
        assert table.horizontalHeaderItem(j).toolTip()
        for i in range(table.rowCount()):  # no exponents (the coax's negligible peak in air read 6.039e-05)
            assert not re.search(r"\de[-+\u2212]?\d", table.item(i, j).text()), table.item(i, j).text()
    # the row headings take at most a third of the table: the figures get the room
    assert table.verticalHeader().width() <= table.width() / 3


@pytest.mark.parametrize("size", ((1366, 768), (1024, 640)))
def test_the_results_area_cannot_be_dragged_narrower_than_it_fits(hv_twin, qtbot, size):
    # dragged to 300 px the summary's lines were cut and the tables scrolled sideways
    from PySide6.QtCore import Qt

    from app.main_window import RESULTS_MIN_WIDTH

    window, panel = hv_twin, hv_twin.results_panel
    window.resize(*size)
    settle(qtbot)
    window.resizeDocks([window.results_dock], [300], Qt.Horizontal)
    settle(qtbot)
    assert window.results_dock.width() >= RESULTS_MIN_WIDTH
    _assert_sections_whole(qtbot, panel, ("Numbers", "High voltage"), f"{size} narrowest")


def test_caution_details_do_not_push_anything_out(hv_twin, qtbot):
    panel = hv_twin.results_panel
    hv_twin.resize(1366, 768)
    panel.summary.caution.details_button.click()
    settle(qtbot)
    assert panel.summary.caution.details_area.isVisible()
    assert problems_in(panel, "details open") == []
    assert panel.stack.height() > 150  # the sections keep a usable share


def test_every_section_is_marked_when_the_drawing_changes(hv_twin, qtbot):
    from PySide6.QtGui import QPalette

    from app import colours

    panel = hv_twin.results_panel

    def dimmed(page) -> bool:
        return page.palette().color(QPalette.WindowText).name() == colours.STALE_TEXT

    assert not any(dimmed(page) for page in panel._pages.values())
    assert panel.summary.state == "fresh" and not panel.stale_strip.isVisible()
    line = panel.summary.caution
    assert line.isVisible() and "out of date" not in line.headline.text()
    hv_twin.document.apply(edits.update_conductor(hv_twin.document.model, 0, potential_V=12000.0), "Potential")
    settle(qtbot)
    assert panel.summary.state == "stale" and panel.stale_strip.isVisible()
    assert dict(panel.summary.rows())["Results"] == "out of date"
    assert "out of date: APPROACHING" in line.headline.text()  # the verdict no longer speaks at full strength
    assert hv_twin.live_figures.text().endswith("(out of date)")  # the status bar's C' and peak too
    assert colours.STALE_TEXT in hv_twin.live_figures.styleSheet()
    for title, page in panel._pages.items():
        assert dimmed(page), title
    for plot in (panel.boundary.rows[0][0], panel.probe.potential_plot.plotItem):
        assert plot.opacity() < 0.5
    hv_twin.document.undo()
    settle(qtbot)
    assert panel.summary.state == "fresh" and not any(dimmed(page) for page in panel._pages.values())
    assert "out of date" not in line.headline.text() and panel.boundary.rows[0][0].opacity() == 1.0
    assert "out of date" not in hv_twin.live_figures.text() and hv_twin.live_figures.text().startswith("C'(")


def test_a_new_drawing_does_not_show_the_old_results_as_current(hv_twin, qtbot):
    panel = hv_twin.results_panel
    hv_twin.document.mark_saved(hv_twin.document.path)
    hv_twin.commands.new()
    settle(qtbot)
    assert panel.summary.state == "none" and not panel.summary.caution.isVisible()
    assert panel.stale_strip.isVisible()  # the sections still hold the twin lead's figures: marked
    assert panel.probe.profile is None


def test_the_walk_finds_overlaps_cut_offs_and_squeezed_labels(qtbot):
    parent = QWidget()
    qtbot.addWidget(parent)
    parent.resize(200, 100)
    a, b = QLineEdit(parent), QLineEdit(parent)
    a.setGeometry(0, 0, 120, 30)
    b.setGeometry(100, 10, 120, 30)  # 20 px over a, and 20 px past the parent's right edge
    squeezed = QLabel("a long caution text that needs several lines at this width " * 3, parent)
    squeezed.setWordWrap(True)
    squeezed.setGeometry(0, 50, 150, 20)
    parent.show()
    found = "\n".join(problems_in(parent, "probe"))
    assert "QLineEdit() overlaps QLineEdit() by 20x20 px" in found
    assert "is cut off by" in found and "needs" in found


def test_the_walk_finds_cut_table_cells_and_cut_button_texts(qtbot):
    from PySide6.QtWidgets import QCheckBox, QTableWidgetItem

    parent = QWidget()
    qtbot.addWidget(parent)
    parent.resize(400, 300)
    table = QTableWidget(2, 2, parent)
    table.setGeometry(0, 0, 400, 200)
    table.setItem(0, 0, QTableWidgetItem("a cell far wider than its column"))
    table.setItem(1, 1, QTableWidgetItem("three\nlines\ntall"))
    table.setItem(1, 0, QTableWidgetItem("12"))
    table.setColumnWidth(0, 60)
    box = QCheckBox("potentials are rms values", parent)
    box.setGeometry(0, 210, 80, 30)
    parent.show()
    found = "\n".join(problems_in(parent, "probe"))
    assert "cell 'a cell far wider than its col" in found and "cell 'three" in found and "cell '12'" not in found
    assert "button 'potentials are rms values' needs" in found


def test_old_section_names_still_lead_to_their_section(hv_twin):
    panel = hv_twin.results_panel
    panel.show_section("Hot spots")
    assert panel.current_section() == "High voltage" and panel.sections["High voltage"] is panel.hot_spots
    panel.show_section("Charge along boundary")
    assert panel.current_section() == "Charge"


@pytest.mark.parametrize("size", ((1366, 768), (1024, 640)))
def test_a_long_caution_headline_is_never_clipped(window, qtbot, size):
    model = solver.load_project(files.SAMPLES_DIR / "hv_electrode_over_earth.json").with_mesh_density("coarse")
    # a long conductor name makes the headline long enough to need wrapping at both sizes
    window.load(edits.update_conductor(model, 0, potential_V=700e3, name="upper electrode of the test cell"), None)
    window.solve()
    wait_for_solve(qtbot, window)
    window.resize(*size)
    settle(qtbot)
    line = window.results_panel.summary.caution
    assert line.isVisible() and "EXCEEDED" in line.headline.text() and len(line.headline.text()) > 150
    assert line.headline.height() >= line.headline.heightForWidth(line.headline.width())
    assert problems_in(window.results_panel.summary, f"{size} summary") == []



def fill_on_demand_views(window, qtbot, *, cross_check: bool) -> None:
    """The busbar with the views that fill on demand filled: a corner-radius sweep of L1 (five
    radii: plot, table and status) and, with ``cross_check``, a cross-check of every conductor."""
    window.commands.open(files.SAMPLES_DIR / "busbar_enclosure.json")
    window.document.apply(window.document.model.with_mesh_density("coarse"), "Mesh")
    window.solve()
    wait_for_solve(qtbot, window)
    panel = window.results_panel
    part = panel.hot_spots.sweep_part
    part.conductor_box.setCurrentText("L1")
    part.run_sweep()
    runners = [part.runner]
    if cross_check:
        panel.cross_check.compute()
        runners.append(panel.cross_check.runner)
    for runner in runners:
        qtbot.waitUntil(lambda r=runner: not r.is_busy, timeout=180000)
    settle(qtbot)
    assert part.sweep is not None and part.table.isVisibleTo(panel.hot_spots) and part.table.rowCount() == 5
    if cross_check:
        assert panel.cross_check.checks and panel.cross_check.table.columnCount() == 3


def filled_problems(window, qtbot, size, titles) -> list[str]:
    """The walk over the filled sections at ``size``, each scrolled to its filled table."""
    panel = window.results_panel
    shown = {"High voltage": panel.hot_spots.sweep_part.table, "Cross-check": panel.cross_check.table}
    window.resize(*size)
    settle(qtbot)
    found = []
    for title in titles:
        panel.show_section(title)
        settle(qtbot)
        panel._pages[title].ensureWidgetVisible(shown[title])
        settle(qtbot)
        found += problems_in(panel, f"filled {size} {title}")
    return found


@pytest.mark.parametrize("size", ((1366, 768), (1024, 640)))
def test_a_filled_corner_radius_sweep_fits(window, qtbot, size):
    """After a sweep (plot, five-row table, status): no overlap, no sideways scrolling (the table
    was 1 px too wide with the radius as a row heading), no clipped heading."""
    fill_on_demand_views(window, qtbot, cross_check=False)
    found = filled_problems(window, qtbot, size, ["High voltage"])
    assert found == [], "\n".join(found)


@pytest.mark.slow
def test_filled_sweep_and_cross_check_fit_at_every_size(window, qtbot):
    """After a corner-radius sweep and a cross-check run (about 15 s): both filled sections at
    every window size."""
    fill_on_demand_views(window, qtbot, cross_check=True)
    found = [p for size in SIZES for p in filled_problems(window, qtbot, size, ["High voltage", "Cross-check"])]
    assert found == [], "\n".join(found)


def test_a_table_wider_than_its_place_wraps_narrower_and_keeps_its_colours(qtbot):
    # the High voltage table of the shielded three-core cable (four columns of "not assessed")
    # scrolled sideways at 1366 x 768; the table now wraps its headings and worded cells narrower
    from PySide6.QtGui import QColor

    from app.panels.matrices_view import CopyableTable

    table = CopyableTable()
    qtbot.addWidget(table)
    table.resize(380, 200)  # room for the wrapped table, not for "not assessed" on one line
    table.show()
    rows = ["air-breakdown field (MV/m)", "corona-onset margin", "status"]
    table.fill(rows, ["L1", "L2", "L3", "screen"], [["3.9"] * 4, ["—"] * 4, ["not assessed"] * 4], wrap=14)
    table.item(2, 0).setBackground(QColor("#e8e8e8"))  # a colour a view sets after filling
    before = table.horizontalScrollBar()
    settle(qtbot)
    assert table._needed_width() <= table.width() - 2 * table.frameWidth()
    assert before.maximum() == 0 and table.item(2, 0).text() == "not\nassessed"
    assert table.item(2, 0).background().color().name() == "#e8e8e8"
    assert table.as_text().splitlines()[3].split("\t")[:2] == ["status", "not assessed"]  # copied whole


def _assert_sections_whole(qtbot, panel, titles, label: str) -> None:
    """Show each section (its figure job finished) and find no overlapping or clipped widget."""
    for title in titles:
        panel.show_section(title)
        runner = getattr(panel.sections[title], "runner", None)
        if runner is not None:
            qtbot.waitUntil(lambda r=runner: not r.is_busy, timeout=60000)
        settle(qtbot)
        found = problems_in(panel, f"{label} {title}")
        assert found == [], "\n".join(found)
