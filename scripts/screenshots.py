"""Save PNG screenshots of the main window with each overlay and results tab.

Usage: ``QT_QPA_PLATFORM=offscreen .venv/bin/python scripts/screenshots.py [OUTDIR]``
(default OUTDIR: screenshots/, which git ignores). Offscreen rendering matches a real window.
"""

from __future__ import annotations

import os
import sys
import tempfile
import time
from pathlib import Path

os.environ.setdefault("QT_QPA_PLATFORM", "offscreen")
os.environ.setdefault("EDGEWISE_RECOVERY_DIR", tempfile.mkdtemp(prefix="edgewise-shots-"))

from PySide6.QtCore import QSettings  # noqa: E402
from PySide6.QtWidgets import QApplication  # noqa: E402

ROOT = Path(__file__).resolve().parent.parent
sys.path.insert(0, str(ROOT))

from app import edits, files, shapes  # noqa: E402
from app.document import PartRef  # noqa: E402
from app.main_window import MainWindow  # noqa: E402


def settle(app, window, seconds: float = 0.3) -> None:
    end = time.time() + seconds
    while time.time() < end or window.runner.is_busy:
        app.processEvents()
        time.sleep(0.02)
    app.processEvents()


def shoot(window, out: Path, name: str) -> None:
    path = out / f"{name}.png"
    window.grab().save(str(path))
    print(path)


def open_sample(window, name: str) -> None:
    window.document.mark_saved(Path(tempfile.mkdtemp()) / "x.json")  # no unsaved-changes prompt
    window.commands.open(files.SAMPLES_DIR / name)


def draw_busbars_by_mouse(app, w, out: Path) -> None:
    """A new drawing made the way a person makes it: mouse on the canvas, numbers typed."""
    from PySide6.QtCore import QPointF, Qt
    from PySide6.QtTest import QTest

    def px(x, y):
        return w.canvas.mapFromScene(w.canvas.plotItem.vb.mapViewToScene(QPointF(x, y)))

    def drag(a, b):
        vp = w.canvas.viewport()
        QTest.mousePress(vp, Qt.LeftButton, Qt.NoModifier, px(*a))
        QTest.mouseMove(vp, px(*b))
        QTest.mouseRelease(vp, Qt.LeftButton, Qt.NoModifier, px(*b))

    def type_into(key, text):
        w.properties.fields[key].setText(text)
        w.properties.fields[key].editingFinished.emit()

    w.document.mark_saved(Path(tempfile.mkdtemp()) / "x.json")
    w.commands.new()
    w.auto_solve = False
    settle(app, w, 0.2)
    w.canvas.set_tool("ground plane")
    QTest.mouseClick(w.canvas.viewport(), Qt.LeftButton, Qt.NoModifier, px(0, 0))
    w.canvas.set_tool("rectangle")
    drag((-30, 10), (-20, 40))
    type_into("potential", "10000")
    type_into("corner_radius", "2")
    type_into("name", "phase A")
    w.canvas.set_tool("rectangle")
    drag((20, 10), (30, 40))
    type_into("potential", "-10000")
    type_into("corner_radius", "2")
    type_into("name", "phase B")
    w.canvas.set_tool("pick")
    w.canvas.fit_view()
    settle(app, w, 0.2)
    shoot(w, out, "00a_busbars_drawn_by_mouse")
    w.solve()
    settle(app, w)
    w.layer_boxes["field lines"].setChecked(True)
    settle(app, w, 0.1)
    shoot(w, out, "00b_busbars_drawn_by_mouse_solved")
    w.layer_boxes["field lines"].setChecked(False)
    w.auto_solve = True


def main() -> None:
    out = Path(sys.argv[1]) if len(sys.argv) > 1 else ROOT / "screenshots"
    out.mkdir(parents=True, exist_ok=True)
    app = QApplication.instance() or QApplication([])
    settings = QSettings(str(Path(tempfile.mkdtemp()) / "s.ini"), QSettings.IniFormat)
    w = MainWindow(settings)
    w.resize(1600, 1000)
    w.show()
    draw_busbars_by_mouse(app, w, out)
    open_sample(w, "busbar_enclosure.json")
    settle(app, w)
    shoot(w, out, "01_busbars_potential")
    for i, shading in enumerate(("field strength", "field strength (log)"), start=2):
        w.shading_combo.setCurrentText(shading)
        settle(app, w, 0.1)
        shoot(w, out, f"0{i}_busbars_{shading.replace(' ', '_').replace('(', '').replace(')', '')}")
    w.shading_combo.setCurrentText("none")
    w.layer_boxes["equipotentials"].setChecked(False)
    w.layer_boxes["field lines"].setChecked(True)
    w.layer_boxes["surface charge"].setChecked(True)
    settle(app, w, 0.1)
    shoot(w, out, "04_busbars_field_lines_and_surface_charge")
    w.shading_combo.setCurrentText("potential")
    w.layer_boxes["equipotentials"].setChecked(True)
    w.layer_boxes["field lines"].setChecked(False)
    w.layer_boxes["surface charge"].setChecked(False)

    w.results_panel.show_section("Charge along boundary")
    w.results_panel.boundary.pick_at(60.0, 0.0)
    settle(app, w, 0.1)
    shoot(w, out, "05_charge_along_boundary")
    w.canvas.show_probe((-40.0, 40.0), (40.0, 40.0))
    w._on_probe_drawn((-40.0, 40.0), (40.0, 40.0))
    settle(app, w, 0.1)
    shoot(w, out, "06_probe_line")
    w.results_panel.show_section("High voltage")
    settle(app, w, 0.1)
    shoot(w, out, "07_high_voltage")
    w.results_panel.show_section("Limits of 2-D")
    w.document.apply(edits.set_extra(w.document.model, "part_length", 1200.0), "Part length")
    settle(app, w, 0.1)
    shoot(w, out, "08_limits_of_2d")

    from app.files.report import report_preview

    report_preview(w.results, w.canvas.grab().toImage(), "busbar_enclosure.json",
                   settings_model=w.document.model).save(str(out / "08b_report_page.png"))
    w.commands.export_report(out / "busbar_report.pdf")
    open_sample(w, "hv_electrode_over_earth.json")
    settle(app, w)
    w.results_panel.show_section("Numbers")
    shoot(w, out, "09_hv_electrode")
    # the same electrode at a higher potential: the caution strip appears above the drawing
    w.document.apply(edits.update_conductor(w.document.model, 0, potential_V=400e3), "Potential")
    hv = w.results_panel.high_voltage
    hv.altitude_edit.setText("1500")
    hv.altitude_edit.editingFinished.emit()
    w.solve()
    settle(app, w)
    w.results_panel.show_section("High voltage")
    shoot(w, out, "09b_hv_electrode_caution")

    open_sample(w, "three_traces_over_ground.json")
    settle(app, w)
    w.layer_boxes["field lines"].setChecked(True)
    settle(app, w, 0.1)
    shoot(w, out, "10_three_traces_numbers")
    w.layer_boxes["field lines"].setChecked(False)

    open_sample(w, "shielded_three_core_cable.json")
    settle(app, w)
    w.shading_combo.setCurrentText("field strength (log)")
    w.layer_boxes["equipotentials"].setChecked(False)
    settle(app, w, 0.1)
    shoot(w, out, "13_cable_with_dielectrics_log_field")
    w.shading_combo.setCurrentText("potential")
    w.layer_boxes["equipotentials"].setChecked(True)
    open_sample(w, "three_traces_over_ground.json")
    settle(app, w)

    model, ref = edits.add_conductor(w.document.model, shapes.translated(
        edits.shape_of(w.document.model, PartRef("conductor", 0, 0)), 0.05, 0.0))
    w.document.apply(model, "Overlap")
    w.document.select(ref)
    w.solve()
    settle(app, w)
    shoot(w, out, "11_solver_error_next_to_part")
    w.document.undo()
    w.document.select(PartRef("conductor", 0, 0))
    settle(app, w)
    shoot(w, out, "12_selected_part_with_handles")
    w.document.mark_saved(Path(tempfile.mkdtemp()) / "x.json")
    w.close()


if __name__ == "__main__":
    main()
