"""Screenshots of a real window: every sample, every results section and every dialog, to check
each change by eye.

Set-up (once, Debian/Ubuntu)::

    apt-get install -y --no-install-recommends xvfb xauth imagemagick libxcb-cursor0 \
        libxkbcommon-x11-0 libxcb-icccm4 libxcb-image0 libxcb-keysyms1 libxcb-render-util0 \
        libxcb-shape0 libxcb-xkb1

Run (from the project root; pick a free display number)::

    Xvfb :93 -screen 0 1920x1080x24 -nolisten tcp &
    DISPLAY=:93 QT_QPA_PLATFORM=xcb .venv/bin/python scripts/screenshots.py shots --size 1366x768
    DISPLAY=:93 QT_QPA_PLATFORM=xcb .venv/bin/python scripts/screenshots.py shots --size 1920x1080

Each run writes ``OUTDIR/<width>x<height>/NN_<what>.png`` (default OUTDIR: screenshots/, which
git ignores) and prints the paths. The window is shown at exactly the given size; dialogs are
grabbed while open and then closed. Without a display, ``QT_QPA_PLATFORM=offscreen`` renders the
same widgets, but look at the xcb pictures before calling a screen done.
"""

from __future__ import annotations

import argparse
import os
import sys
import tempfile
import time
from pathlib import Path

os.environ.setdefault("EDGEWISE_RECOVERY_DIR", tempfile.mkdtemp(prefix="edgewise-shots-"))

from PySide6.QtCore import QSettings, QTimer  # noqa: E402
from PySide6.QtWidgets import QApplication  # noqa: E402

ROOT = Path(__file__).resolve().parent.parent
sys.path.insert(0, str(ROOT))

from app import edits  # noqa: E402
from app.files import project_files as files  # noqa: E402
from app.gui_thread_gc import collect_on_gui_thread  # noqa: E402
from app.jobs.figure_jobs import FigureJobRunner  # noqa: E402
from app.main_window import MainWindow  # noqa: E402

#: Samples in the order shown, and the results sections shown for the first of them.
SAMPLES = ("busbar_enclosure.json", "microstrip_on_substrate.json", "buried_stripline.json",
           "edge_coupled_pair.json", "three_traces_over_ground.json", "hv_electrode_over_earth.json",
           "shielded_three_core_cable.json", "two_layer_coax_cable.json", "coaxial_feeder.json",
           "twin_lead.json", "three_phase_line.json")


class Shooter:
    def __init__(self, app: QApplication, window: MainWindow, out: Path) -> None:
        self.app, self.w, self.out, self.n = app, window, out, 0

    def settle(self, seconds: float = 0.4) -> None:
        """Let the solve and the background figure jobs finish, then paint."""
        end = time.time() + seconds
        while time.time() < end or self.w.runner.is_busy or self._jobs_busy():
            self.app.processEvents()
            time.sleep(0.02)
        self.app.processEvents()

    def _jobs_busy(self) -> bool:
        panel = self.w.results_panel
        runners = [panel.summary.runner, self.w.canvas.overlays.detail_runner]
        runners += [getattr(s, "runner", None) for s in panel.sections.values()]
        runners += self.w.findChildren(FigureJobRunner)  # parts inside sections (the corner-radius sweep)
        return any(r is not None and r.is_busy for r in runners)

    def shoot(self, name: str, widget=None) -> None:
        self.n += 1
        path = self.out / f"{self.n:02d}_{name}.png"
        (widget or self.w).grab().save(str(path))
        print(path)

    def open_sample(self, name: str) -> None:
        self.w.document.mark_saved(Path(tempfile.mkdtemp()) / "x.json")  # no unsaved-changes prompt
        self.w.commands.open(files.SAMPLES_DIR / name)
        self.settle()

    def dialog(self, name: str, trigger) -> None:
        """Run ``trigger`` (which opens a modal dialog), grab the dialog, close it."""
        def grab_and_close():
            box = QApplication.activeModalWidget()
            if box is None:
                print(f"no dialog for {name}")
                return
            self.shoot(f"dialog_{name}", box)
            box.close()

        QTimer.singleShot(500, grab_and_close)
        trigger()
        self.settle(0.2)


def run(out: Path, width: int, height: int) -> None:
    out.mkdir(parents=True, exist_ok=True)
    app = QApplication.instance() or QApplication([])
    collect_on_gui_thread(app)
    settings = QSettings(str(Path(tempfile.mkdtemp()) / "s.ini"), QSettings.IniFormat)
    w = MainWindow(settings)
    w.show()
    w.setGeometry(0, 0, width, height)
    s0 = time.time()
    while time.time() - s0 < 0.3:
        app.processEvents()
    w.fit_results_width()
    s = Shooter(app, w, out)
    s.settle(0.5)
    s.shoot("empty_drawing")

    for name in SAMPLES:
        s.open_sample(name)
        s.shoot(f"sample_{Path(name).stem}")

    s.open_sample("busbar_enclosure.json")
    for title in w.results_panel.section_titles():
        w.results_panel.show_section(title)
        s.settle(0.5)
        s.shoot(f"section_{title.replace(' ', '_').replace('-', '').lower()}")
    # the sections that fill on demand: a corner-radius sweep and a cross-check run
    panel = w.results_panel
    part = panel.hot_spots.sweep_part
    part.conductor_box.setCurrentText("L1")
    part.run_sweep()
    panel.show_section("High voltage")
    s.settle(0.5)
    panel._pages["High voltage"].ensureWidgetVisible(part.table)
    s.settle(0.3)
    s.shoot("section_high_voltage_corner_radius_sweep")
    panel.show_section("Cross-check")
    panel.cross_check.compute()
    s.settle(0.5)
    s.shoot("section_crosscheck_run")
    for shading in ("field strength", "field strength (log)", "none"):
        w.shading_combo.setCurrentText(shading)
        s.settle(0.2)
        s.shoot(f"busbar_shading_{shading.replace(' ', '_').replace('(', '').replace(')', '')}")
    w.shading_combo.setCurrentText("potential")
    w.layer_boxes["field lines"].setChecked(True)
    w.layer_boxes["surface charge"].setChecked(True)
    s.settle(0.2)
    s.shoot("busbar_field_lines_and_surface_charge")
    w.layer_boxes["field lines"].setChecked(False)
    w.layer_boxes["surface charge"].setChecked(False)
    w.canvas.show_probe((-100.0, 50.0), (100.0, 50.0))
    w._on_probe_drawn((-100.0, 50.0), (100.0, 50.0))
    s.settle(0.2)
    s.shoot("busbar_probe_line")

    # a high-voltage verdict that must catch the eye, its details, and the drawing out of date
    s.open_sample("hv_electrode_over_earth.json")
    w.document.apply(edits.update_conductor(w.document.model, 0, potential_V=700e3), "Potential")
    w.solve()
    s.settle()
    s.shoot("hv_electrode_700kV_caution")
    w.results_panel.summary.caution.details_button.setChecked(True)
    w.results_panel.summary.show_where.emit()
    s.settle(0.2)
    s.shoot("hv_electrode_caution_details_and_place")
    w.results_panel.summary.caution.details_button.setChecked(False)
    w.results_panel.show_section("High voltage")
    s.settle(1.0)
    s.shoot("hv_electrode_high_voltage_section")
    w.auto_solve = False
    w.document.apply(edits.update_conductor(w.document.model, 0, potential_V=300e3), "Potential")
    s.settle(0.2)
    s.shoot("hv_electrode_out_of_date")
    w.auto_solve = True

    # the sweep and goal-search dialog (not modal): on the microstrip, a 50-ohm target typed with its unit
    s.open_sample("microstrip_on_substrate.json")
    sweep = w.studies.open_sweep_dialog()
    if sweep is not None:
        sweep.goal_figure.setCurrentText("Z0_ohm")
        sweep.goal_target.setText("50 ohm")
        s.settle(0.3)
        s.shoot("dialog_sweep_and_goal_search", sweep)
        sweep.close()
        s.settle(0.1)

    # dialogs: the ones the program opens itself, then every action of the Help menu
    s.dialog("mouse_and_keys", w.commands.show_keys)
    w.document.apply(edits.update_conductor(w.document.model, 0, potential_V=200e3), "Potential")
    s.dialog("unsaved_changes", w.commands.maybe_save)
    broken = Path(tempfile.mkdtemp()) / "broken.json"
    broken.write_text("{not json", encoding="utf-8")
    w.document.mark_saved(Path(tempfile.mkdtemp()) / "x.json")  # so that Open goes straight to the file
    s.dialog("cannot_open", lambda: w.commands.open(broken))
    for menu_action in w.menuBar().actions():
        if menu_action.text().replace("&", "") == "Help" and menu_action.menu() is not None:
            for action in menu_action.menu().actions():
                if action.text() and not action.isSeparator():
                    label = action.text().replace("&", "").replace("…", "").replace(" ", "_").lower()
                    s.dialog(f"help_{label}", action.trigger)
    w.document.mark_saved(Path(tempfile.mkdtemp()) / "x.json")
    w.close()


def main() -> None:
    parser = argparse.ArgumentParser(description=__doc__.split("\n")[0])
    parser.add_argument("out", nargs="?", default=str(ROOT / "screenshots"))
    parser.add_argument("--size", default="1366x768", help="window size, WIDTHxHEIGHT (default 1366x768)")
    args = parser.parse_args()
    width, height = (int(v) for v in args.size.lower().split("x"))
    run(Path(args.out) / f"{width}x{height}", width, height)


if __name__ == "__main__":
    main()
