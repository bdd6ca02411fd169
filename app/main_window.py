"""The main window: drawing area in the middle, parts and properties on the left, results on
the right, a caution strip above the drawing, readout and progress in the status bar.

Menus and file commands live in :mod:`app.commands`; this module wires the views to the
document and to the solve runner.
"""

from __future__ import annotations

import html
import logging
import re
from pathlib import Path

import numpy as np
from PySide6.QtCore import Qt, QTimer
from PySide6.QtWidgets import (
    QCheckBox,
    QComboBox,
    QDockWidget,
    QLabel,
    QMainWindow,
    QProgressBar,
    QPushButton,
    QToolBar,
    QVBoxLayout,
    QWidget,
)

import solver
from app import colours
from app.canvas.canvas import Canvas
from app.canvas.overlays import SHADINGS
from app.commands import Commands
from app.document import Document
from app.files import project_files as files
from app.help_menu import install_help
from app.jobs.worker import SolveRunner
from app.messages import show_message
from app.panels.parts_list import PartsList
from app.panels.properties import PropertiesPanel
from app.panels.results_panel import ResultsPanel
from app.panels.safety_views import caution_for
from app.panels.wheel_steps import WheelSteps
from app.study_menus import StudyMenus
from app.units import format_field, format_measured, format_plain, format_potential, keep_units
from solver import Model, SolverError

logger = logging.getLogger(__name__)

#: Models with at most this many conductors re-solve by themselves after an edit.
AUTO_SOLVE_MAX_CONDUCTORS = 8

#: Starting width of the results area: this share of the window, within these bounds, px
#: (the drawing keeps the larger share); it cannot be narrowed below the smaller bound.
RESULTS_SHARE, RESULTS_MIN_WIDTH, RESULTS_MAX_WIDTH = 0.3, 470, 640


class MainWindow(QMainWindow):
    def __init__(self, settings=None, *, grid_points: int = 120, n_field_lines: int = 48) -> None:
        super().__init__()
        self.settings = settings
        self.document = Document()
        self.results = None
        self._probe_ends = None
        self._dragged_model: Model | None = None
        self.auto_solve = True
        self.runner = SolveRunner(self, grid_points=grid_points, n_field_lines=n_field_lines)

        self.canvas = Canvas(self.document)
        self.banner = QLabel()  # why the drawing cannot be solved (the verdict lives in the summary block)
        self.banner.setWordWrap(True)
        self.banner.setVisible(False)
        self._banner_is_error = False
        self._shown_model = None  # the model whose results the sections show (kept after New/Open)
        centre = QWidget()
        column = QVBoxLayout(centre)
        column.setContentsMargins(0, 0, 0, 0)
        column.addWidget(self.banner)
        column.addWidget(self.canvas, 1)
        self.setCentralWidget(centre)

        self.parts = PartsList(self.document)
        self.properties = PropertiesPanel(self.document)
        self.results_panel = ResultsPanel(self.document)
        self.stale_label = self.results_panel.stale_strip  # shown while the results are out of date
        self.results_panel.summary.show_where.connect(self.show_worst_peak)
        self.results_panel.hot_spots.peak_digits_ready.connect(self.canvas.overlays.set_peak_digits)
        self._dock("Parts", self.parts, Qt.LeftDockWidgetArea)
        self._dock("Properties", self.properties, Qt.LeftDockWidgetArea)
        results_dock = self._dock("Results", self.results_panel, Qt.RightDockWidgetArea)
        # the narrowest results area whose tables and texts all fit (the layout walk's width): a
        # splitter dragged farther left cut the summary's lines and scrolled tables sideways
        results_dock.setMinimumWidth(RESULTS_MIN_WIDTH)
        self._build_status_bar()
        self.commands = Commands(self)
        self.results_panel.summary.state_changed.connect(self.commands.solve_button.set_state)
        self.commands.solve_button.set_state(self.results_panel.summary.state)
        self.studies = StudyMenus(self)  # drawings, sweeps, Green's function
        install_help(self)  # Help > Safety, Help > About; the hint on an empty drawing
        self.addToolBarBreak(Qt.TopToolBarArea)
        self._build_view_bar()

        self.document.events.connect("model_changed", self._on_model_changed)
        self.document.events.connect("modified_changed", lambda _: self._update_title())
        self.document.events.connect("path_changed", lambda _: self._update_title())
        self.runner.progress_changed.connect(self._on_progress_changed)
        self.runner.solution_ready.connect(self._on_solution_ready)
        self.runner.first_results_ready.connect(self._on_solution_ready)
        self.runner.solve_failed.connect(self._on_solve_failed)
        self.runner.solve_cancelled.connect(self._on_solve_cancelled)
        self.runner.busy_changed.connect(self._on_busy_changed)
        self.canvas.cursor_moved.connect(self._on_cursor_moved)
        self.canvas.probe_drawn.connect(self._on_probe_drawn)
        self.canvas.problem_reported.connect(lambda m: self.statusBar().showMessage(m, 6000))
        self.canvas.tool_changed.connect(self._on_tool_changed)
        self.canvas.part_dragged.connect(self._on_part_dragged)
        self.wheel_steps = WheelSteps(self.properties)
        self.wheel_steps.stepped.connect(lambda _: self._on_drag_finished())
        self.canvas.drag_finished.connect(self._on_drag_finished)
        self.canvas.boundary_point_picked.connect(self.results_panel.boundary.mark_panel)
        self.results_panel.boundary.panel_picked.connect(self._on_boundary_panel_picked)
        self.results_panel.probe.export_requested.connect(self.commands.export_profile_csv)

        self._solve_timer = QTimer(self, singleShot=True, interval=700, timeout=self.solve)
        self._recovery_timer = QTimer(self, singleShot=True, interval=int(files.RECOVERY_QUIET_S * 1000),
                                      timeout=self._write_recovery)
        self._recovery_schedule = files.RecoverySchedule()
        self._recovery_failure_told = False
        self.results_dock = results_dock
        self.resize(1500, 900)
        self._dock_widths_restored = False
        self.fit_results_width()
        if settings is not None and settings.value("window_geometry") is not None:
            self.restoreGeometry(settings.value("window_geometry"))
            self._dock_widths_restored = bool(self.restoreState(settings.value("window_state")))
        self._update_title()

    # ---- layout ----------------------------------------------------------------------------
    def fit_results_width(self) -> None:
        """Give the results area its share of the window's width (unless a saved layout applies)."""
        width = int(min(max(RESULTS_SHARE * self.width(), RESULTS_MIN_WIDTH), RESULTS_MAX_WIDTH))
        self.resizeDocks([self.results_dock], [width], Qt.Horizontal)

    def showEvent(self, event) -> None:
        super().showEvent(event)
        if not self._dock_widths_restored:  # once, when the window first knows its size
            self._dock_widths_restored = True
            self.fit_results_width()

    def _dock(self, title: str, widget, area) -> QDockWidget:
        dock = QDockWidget(title, self)
        dock.setObjectName(title)
        dock.setWidget(widget)
        dock.setFeatures(QDockWidget.DockWidgetMovable | QDockWidget.DockWidgetFloatable)
        self.addDockWidget(area, dock)
        return dock

    def _build_view_bar(self) -> None:
        bar = QToolBar("Show", self)
        bar.setObjectName("show")
        self.addToolBar(Qt.TopToolBarArea, bar)
        bar.addWidget(QLabel(" Shading: "))
        self.shading_combo = QComboBox()
        self.shading_combo.addItems(list(SHADINGS))
        self.shading_combo.setCurrentText(self.canvas.overlays.shading)
        self.shading_combo.currentTextChanged.connect(self.canvas.overlays.set_shading)
        bar.addWidget(self.shading_combo)
        self.layer_boxes = {}
        for layer in ("equipotentials", "field lines", "surface charge", "hot spots"):
            box = QCheckBox(layer)
            box.setChecked(self.canvas.overlays.show[layer])
            box.toggled.connect(lambda on, name=layer: self.canvas.overlays.set_visible(name, on))
            bar.addWidget(box)
            self.layer_boxes[layer] = box

    def _build_status_bar(self) -> None:
        status = self.statusBar()
        self.readout = QLabel("")
        self.progress = QProgressBar()
        self.progress.setMaximumWidth(220)
        self.progress.setRange(0, 100)
        self.progress.setVisible(False)
        self.cancel_button = QPushButton("Cancel solve")
        self.cancel_button.setVisible(False)
        self.cancel_button.clicked.connect(self.runner.cancel)
        self.live_figures = QLabel("")
        self.live_figures.setObjectName("live_figures")
        status.addPermanentWidget(self.readout, 1)
        status.addPermanentWidget(self.live_figures)
        status.addPermanentWidget(self.progress)
        status.addPermanentWidget(self.cancel_button)

    def _update_title(self) -> None:
        name = self.document.path.name if self.document.path else "untitled"
        self.setWindowTitle(f"{name}{' *' if self.document.is_modified else ''} — Edgewise")

    # ---- document --------------------------------------------------------------------------
    def load(self, model: Model, path: Path | None, *, modified: bool = False) -> None:
        """Show ``model`` as a fresh document (after New, Open or recovery)."""
        self.runner.cancel()
        self.results = None
        self.canvas.results = None
        self.canvas.overlays.clear()
        self.canvas.clear_errors()
        self.canvas.clear_probe()
        self.results_panel.probe.clear()
        self._probe_ends = None
        self.results_panel.summary.clear()
        self.document.replace(model, path, modified=modified)
        self.canvas.fit_view()

    def load_or_keep(self, model: Model, path: Path | None, *, modified: bool = False) -> bool:
        """:meth:`load` ``model``; when the views cannot show it, put the previous document
        back (with its undo history), say why in a dialog and return False."""
        before = self.document.snapshot()
        try:
            self.load(model, path, modified=modified)
            return True
        except Exception as exc:  # any view failing on odd content must not end the program
            logger.exception("cannot show %s", path)
            self.document.restore(before)
            show_message(self, "critical", "Cannot open the file",
                         f"{path or 'The recovered drawing'}: cannot be shown ({type(exc).__name__}: {exc}). "
                         "The previous drawing is kept.")
            return False

    def _on_model_changed(self, model) -> None:
        self.canvas.clear_errors()
        self.readout.setText("")  # refreshed at the next mouse move, in the model's unit
        if self._banner_is_error:
            self.banner.setVisible(False)
            self._banner_is_error = False
        stale = self._shown_model is not None and model != self._shown_model  # extras (view settings) ignored
        self._set_stale(stale)
        if self.results is not None and not stale:
            self._update_verdict()
        if self._recovery_schedule.edited():
            self._write_recovery()  # edits keep coming: do not wait for a quiet moment any longer
        else:
            self._recovery_timer.start()
        if self.auto_solve and model.conductors and len(model.conductors) <= AUTO_SOLVE_MAX_CONDUCTORS:
            if self.results is None or model != self.results.model:
                self._solve_timer.start()

    def _set_stale(self, stale: bool) -> None:
        self.canvas.overlays.set_stale(stale)
        self.results_panel.mark_stale(stale)
        self._show_live_figures()

    def _show_live_figures(self) -> None:
        """The status bar's C' and peak |E|, marked and dimmed while the drawing has changed."""
        text = live_figures_text(self.results.solution) if self.results is not None else ""
        stale = bool(text) and self.results_panel.stale
        self.live_figures.setText(text + (" (out of date)" if stale else ""))
        self.live_figures.setStyleSheet(f"color: {colours.STALE_TEXT};" if stale else "")

    def _write_recovery(self) -> None:
        """Keep the recovery file in step: the unsaved model, or nothing once all is saved."""
        self._recovery_timer.stop()
        self._recovery_schedule.written()
        try:
            if self.document.is_modified:
                files.write_recovery(self.document.model, self.document.path)
            else:
                files.discard_recovery()
        except (OSError, SolverError) as exc:
            logger.warning("recovery file not written: %s", exc)
            if not self._recovery_failure_told:  # tell once, not at every edit
                self._recovery_failure_told = True
                show_message(self, "warning", "Unsaved work is not being kept",
                             f"Edgewise could not write its recovery file ({exc}). Unsaved changes will be "
                             "lost if the program stops unexpectedly; save your work regularly.")

    # ---- solving ---------------------------------------------------------------------------
    def solve(self) -> None:
        self._solve_timer.stop()
        model = self.document.model
        if not model.conductors:
            self._show_error("Nothing to solve: draw a conductor first (Draw menu).", [])
            return
        self.runner.start(model)

    def _can_auto_solve(self, model: Model) -> bool:
        return self.auto_solve and bool(model.conductors) and len(model.conductors) <= AUTO_SOLVE_MAX_CONDUCTORS

    def _on_part_dragged(self, model: Model) -> None:
        """Live editing: solve the dragged drawing (first stage only) while the mouse moves. The
        runner keeps one solve running and the latest drag position pending, so the rate
        follows what the machine can do."""
        if self._can_auto_solve(model):
            self._dragged_model = model
            self.runner.start(model, live=True)

    def _on_drag_finished(self) -> None:
        """The drawing the mouse left (or a wheel step on a field) is solved in full, at once."""
        self._dragged_model = None
        if self._can_auto_solve(self.document.model) and (
            self.results is None or self.results.model != self.document.model or not self.results.complete
        ):
            self.solve()

    def _on_busy_changed(self, busy: bool) -> None:
        self.progress.setVisible(busy)
        self.cancel_button.setVisible(busy)
        summary = self.results_panel.summary
        if busy:
            self.progress.setValue(0)
            summary.set_state("solving")
        elif summary.state == "solving":  # cancelled: back to what is shown
            stale = self._shown_model is not None and self.document.model != self._shown_model
            summary.set_state("none" if summary.solution is None else "stale" if stale else "fresh")

    def _on_progress_changed(self, fraction: float, message: str) -> None:
        self.progress.setValue(int(100 * fraction))
        self.progress.setFormat(f"{message} %p%")

    def _on_solution_ready(self, results) -> None:
        self.results = results
        self.canvas.results = results
        self.canvas.clear_errors()
        self.canvas.overlays.set_results(results)
        self._shown_model = results.model
        self.results_panel.show_results(results)
        live = self._dragged_model is not None and not results.complete  # a recent drag position
        self._set_stale(not (live or results.model == self.document.model))
        self._update_verdict()
        if self._probe_ends is not None:
            self._show_probe_profile(*self._probe_ends)  # the profile follows the new solution
        self._show_live_figures()
        if live:
            self.statusBar().showMessage("Live solve while dragging; release to finish the figures.", 2000)
        elif results.complete:
            self.statusBar().showMessage("Solved.", 4000)
        else:
            self.statusBar().showMessage("Solved; finishing the error estimate, field lines and radii.", 4000)

    def _on_solve_failed(self, message: str) -> None:
        names = re.findall(r"'([^']+)'", message)
        self._show_error(message, [n for n in names if n in self.document.model.conductor_names])

    def _on_solve_cancelled(self) -> None:
        self.statusBar().showMessage("Solve cancelled; the results shown (if any) are from before.", 6000)

    def _show_error(self, message: str, names: list[str]) -> None:
        self.canvas.show_errors(names, message)
        self._banner_is_error = True
        self.banner.setText(f"<b>{colours.FRESHNESS['failed'].symbol} Cannot solve:</b> {keep_units(html.escape(message))}")
        self.banner.setStyleSheet(colours.style_sheet(colours.FRESHNESS["failed"]) + " padding: 6px;")
        self.banner.setVisible(True)
        self.results_panel.summary.set_state("failed")
        self.results_panel.show_failure(message)

    def _update_verdict(self) -> None:
        """The solver's verdict on the solve's peaks (one caution rule) in the summary block's
        caution line, unless the High voltage section has judged the refined peaks."""
        self._banner_is_error = False
        self.banner.setVisible(False)
        if self.results_panel.hot_spots.margins is not None:
            return  # the refined verdict stands; the section re-judges it when the air changes
        try:
            verdict = caution_for(self.results, self.document.model)
        except solver.SolverError as exc:
            verdict = None
            self.statusBar().showMessage(f"No high-voltage verdict: {exc}", 8000)
        self.results_panel.summary.show_verdict(verdict, "solve mesh")

    def show_worst_peak(self) -> None:
        """Mark the peak the verdict refers to on the drawing, and bring it into view."""
        summary = self.results_panel.summary
        verdict, results = summary.verdict, self.results
        if verdict is None or results is None:
            return
        worst = next((v for v in verdict.verdicts if v.headline == verdict.headline), verdict.verdicts[0])
        report = self.results_panel.hot_spots.report
        spots = report.hot_spots if (report is not None and summary.verdict_basis == "refined peaks") \
            else results.solution.peak_surface_fields
        places = {f"'{p.conductor}'": p.location_m for p in spots}
        if report is not None and report.air_region is not None:
            places.setdefault(worst.where, report.air_region.location_m)
        if worst.where not in places:
            self.statusBar().showMessage(f"No place to show for {worst.where}.", 6000)
            return
        xy = np.asarray(places[worst.where]) / results.model.metres_per_unit
        self.canvas.overlays.mark_point(xy)
        self.canvas.bring_into_view(float(xy[0]), float(xy[1]))

    # ---- readouts --------------------------------------------------------------------------
    def _on_cursor_moved(self, x: float, y: float) -> None:
        model = self.document.model
        text = (f"x = {format_plain(x, 4)} {model.unit}, y = {format_plain(y, 4)} {model.unit}"
                f"   (snap {format_plain(self.canvas.snap_step(), 4)} {model.unit})")
        if self.results is not None:
            scale = self.results.model.metres_per_unit
            phi, e = solver.evaluate_at_points(self.results.solution, np.array([[x * scale, y * scale]]))
            if np.isfinite(phi[0]):
                text += f"   potential {format_potential(phi[0])}, field strength {format_field(e[0])}"
            else:
                text += "   inside a conductor"
            if self.results_panel.stale:
                text += " (out of date)"
        self.readout.setText(text)

    def _on_probe_drawn(self, a, b) -> None:
        self._probe_ends = (a, b)
        if self.results is None:
            self.statusBar().showMessage("Solve first, then draw the probe line.", 6000)
            return
        self._show_probe_profile(a, b)
        self.results_panel.show_section("Probe line")

    def _show_probe_profile(self, a, b) -> None:
        scale = self.results.model.metres_per_unit
        t = np.linspace(0.0, 1.0, 301)
        pts = np.column_stack([a[0] + t * (b[0] - a[0]), a[1] + t * (b[1] - a[1])])
        phi, e = solver.evaluate_at_points(self.results.solution, pts * scale)
        distance = t * float(np.hypot(b[0] - a[0], b[1] - a[1]))
        self.results_panel.probe.show_profile(distance, phi, e, self.results.model.unit, (a, b))

    def _on_boundary_panel_picked(self, panel: int) -> None:
        if self.results is not None:
            mid = self.results.solution.mesh.midpoints[panel] / self.results.model.metres_per_unit
            self.canvas.overlays.mark_point(mid)

    def _on_tool_changed(self, name: str) -> None:
        self.statusBar().showMessage(self.canvas.tool.hint, 10000)
        self.commands.sync_tool(name)

    # ---- closing ---------------------------------------------------------------------------
    def closeEvent(self, event) -> None:
        if not self.commands.maybe_save():
            event.ignore()
            return
        self.runner.cancel()
        self.runner.wait()
        self.canvas.overlays.detail_runner.cancel()
        self.studies.close()
        files.discard_recovery()
        if self.settings is not None:
            self.settings.setValue("window_geometry", self.saveGeometry())
            self.settings.setValue("window_state", self.saveState())
        event.accept()


def live_figures_text(solution) -> str:
    """The two figures a drag watches: the first signal conductor's capacitance per unit length
    (Maxwell diagonal) and the peak surface field with its conductor (marked when it sits at a
    sharp corner, where the value depends on the mesh)."""
    parts = []
    if solution.has_capacitance:
        name = solution.signal_names[0]
        # the digits the error estimate supports, as in the summary and the Numbers section
        c = float(solution.capacitance_maxwell_F_per_m[0, 0])
        parts.append(f"C'({name}) {format_measured(c, 'F/m', solution.estimated_relative_error)}")
    peaks = [p for p in solution.peak_surface_fields if np.isfinite(p.field_V_per_m)]
    if peaks:
        top = max(peaks, key=lambda p: p.field_V_per_m)
        corner = " at a sharp corner" if top.at_sharp_corner else ""
        parts.append(f"peak |E| {format_field(top.field_V_per_m)} on {top.conductor}{corner}")
    return "   ".join(parts)
