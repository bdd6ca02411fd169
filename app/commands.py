"""Menus and commands: files, samples, recent files, edit, draw, view, solve and export.

Every command that writes a file takes an optional path; without one it asks with a file
dialog. Errors are shown in a message box naming the file and the reason, and change nothing.
"""

from __future__ import annotations

import logging
from pathlib import Path

from PySide6.QtCore import Qt
from PySide6.QtGui import QAction, QActionGroup, QKeySequence
from PySide6.QtWidgets import QFileDialog, QMessageBox, QToolBar

from app import edits
from app.canvas.tools import TOOLS
from app.document import PartRef
from app.files import exports
from app.files import project_files as files
from app.files.report import drawing_for_report, write_report_pdf
from app.messages import show_message
from app.solve_button import SolveButton
from solver import Model, SolverError

logger = logging.getLogger(__name__)

TOOL_KEYS = {"pick": "S", "rectangle": "R", "circle": "C", "tube": "U", "polygon": "P", "strip": "T",
             "ground plane": "G", "dielectric": "I", "probe line": "L"}


class Commands:
    def __init__(self, window) -> None:
        self.w = window
        self.doc = window.document
        bar = window.menuBar()
        self.file_menu = bar.addMenu("&File")
        self._act(self.file_menu, "&New", self.new, QKeySequence.New)
        self._act(self.file_menu, "&Open…", self.open, QKeySequence.Open)
        self.samples_menu = self.file_menu.addMenu("Open a sample")
        for path in files.sample_paths():
            self._act(self.samples_menu, path.stem.replace("_", " "), lambda p=path: self.open(p))
        self.recent_menu = self.file_menu.addMenu("Open recent")
        self._act(self.file_menu, "&Save", self.save, QKeySequence.Save)
        self._act(self.file_menu, "Save &as…", self.save_as, QKeySequence.SaveAs)
        self.file_menu.addSeparator()
        export = self.file_menu.addMenu("&Export")
        self._act(export, "Capacitance matrices (CSV)…", self.export_matrices_csv)
        self._act(export, "Capacitance matrices (JSON)…", self.export_matrices_json)
        self._act(export, "Drawing (PNG)…", lambda: self.export_picture(self.w.canvas, "png", section="drawing"))
        self._act(export, "Drawing (SVG)…", lambda: self.export_picture(self.w.canvas, "svg", section="drawing"))
        self._act(export, "Charge plot (PNG)…", lambda: self.export_picture(self.w.results_panel.boundary.plot, "png",
                                                                            section="charge plot"))
        self._act(export, "Charge plot (SVG)…", lambda: self.export_picture(self.w.results_panel.boundary.plot, "svg",
                                                                            section="charge plot"))
        self._act(export, "Probe plots (PNG)…", lambda: self.export_picture(self.w.results_panel.probe, "png",
                                                                            section="probe plots"))
        self._act(export, "Probe plots (SVG)…", lambda: self.export_picture(self.w.results_panel.probe, "svg",
                                                                            section="probe plots"))
        self._act(export, "Probe profile (CSV)…", self.export_profile_csv)
        self._act(export, "One-page report (PDF)…", self.export_report, "Ctrl+Shift+P")
        self.file_menu.addSeparator()
        self._act(self.file_menu, "&Quit", window.close, QKeySequence.Quit)

        edit = bar.addMenu("&Edit")
        self.undo_action = self._act(edit, "&Undo", self.doc.undo, QKeySequence.Undo)
        self.redo_action = self._act(edit, "&Redo", self.doc.redo, QKeySequence.Redo)
        edit.addSeparator()
        self._act(edit, "&Delete part", self.delete, QKeySequence.Delete)
        self._act(edit, "D&uplicate part", self.duplicate, "Ctrl+D")
        self._act(edit, "Select &none", lambda: self.doc.select(None))
        align = edit.addMenu("Align selected with the previous part")
        for how in ("centre x", "centre y", "left", "right", "top", "bottom"):
            self._act(align, how, lambda h=how: self.align(h))

        draw = bar.addMenu("&Draw")
        group = QActionGroup(window)
        self.tool_actions = {}
        for cls in TOOLS:
            a = self._act(draw, cls.label, lambda n=cls.name: window.canvas.set_tool(n), TOOL_KEYS[cls.name])
            a.setCheckable(True)
            a.setStatusTip(cls.hint)
            group.addAction(a)
            self.tool_actions[cls.name] = a
        self.tool_actions["pick"].setChecked(True)
        tools_bar = QToolBar("Drawing tools", window)
        tools_bar.setObjectName("drawing tools")
        tools_bar.setToolButtonStyle(Qt.ToolButtonTextOnly)
        window.addToolBar(Qt.TopToolBarArea, tools_bar)
        for action in self.tool_actions.values():
            tools_bar.addAction(action)

        view = bar.addMenu("&View")
        self._act(view, "&Fit to window", window.canvas.fit_view, "F")
        snap = self._act(view, "S&nap to grid", self._toggle_snap, "Ctrl+G")
        snap.setCheckable(True)
        snap.setChecked(True)

        run = bar.addMenu("&Solve")
        solve_action = self._act(run, "&Solve now", window.solve, "F5")
        tools_bar.addSeparator()
        self.solve_button = SolveButton(solve_action, tools_bar)
        tools_bar.addWidget(self.solve_button)
        self._act(run, "&Cancel solve", window.runner.cancel, "Ctrl+.")
        auto = self._act(run, "Re-solve small models after each edit", self._toggle_auto)
        auto.setCheckable(True)
        auto.setChecked(True)

        helps = bar.addMenu("&Help")
        self._act(helps, "Mouse and keys", self.show_keys, QKeySequence.HelpContents)

        self.doc.events.connect("model_changed", lambda _: self._update_undo())
        self._update_undo()
        self._refresh_recent()

    def _act(self, menu, text: str, slot, shortcut=None) -> QAction:
        action = QAction(text, self.w)
        if shortcut is not None:
            action.setShortcut(QKeySequence(shortcut))
        action.triggered.connect(lambda checked=False: slot())
        menu.addAction(action)
        return action

    def sync_tool(self, name: str) -> None:
        self.tool_actions[name].setChecked(True)

    def _toggle_snap(self) -> None:
        self.w.canvas.snap_enabled = not self.w.canvas.snap_enabled

    def _toggle_auto(self) -> None:
        self.w.auto_solve = not self.w.auto_solve

    def _update_undo(self) -> None:
        self.undo_action.setEnabled(self.doc.can_undo)
        self.undo_action.setText(f"&Undo {self.doc.undo_text}".strip())
        self.redo_action.setEnabled(self.doc.can_redo)
        self.redo_action.setText(f"&Redo {self.doc.redo_text}".strip())

    def show_keys(self) -> None:
        lines = [f"{TOOL_KEYS[cls.name]}  {cls.label}: {cls.hint}" for cls in TOOLS]
        lines += ["", "Esc  back to Pick and move; Delete  delete part; Ctrl+D  duplicate; arrows  nudge by the snap "
                  "step (Shift: a tenth)", "F  fit to window; wheel  zoom; middle or right drag  pan/zoom; "
                  "Ctrl+G  snap on/off", "F5  solve; Ctrl+.  cancel the solve; Ctrl+Z / Ctrl+Shift+Z  undo / redo",
                  "Ctrl+Shift+P  one-page PDF report"]
        QMessageBox.information(self.w, "Mouse and keys", "\n".join(lines))

    # ---- files -----------------------------------------------------------------------------
    def maybe_save(self) -> bool:
        """Ask about unsaved changes; False when the user cancels."""
        if not self.doc.is_modified:
            return True
        answer = QMessageBox.question(
            self.w, "Unsaved changes", "The drawing has unsaved changes. Save them first?",
            QMessageBox.Save | QMessageBox.Discard | QMessageBox.Cancel, QMessageBox.Save)
        if answer == QMessageBox.Save:
            return self.save()
        return answer == QMessageBox.Discard

    def new(self) -> None:
        if self.maybe_save():
            self.w.load(Model(title=""), None)

    def open(self, path: Path | None = None) -> bool:
        if not self.maybe_save():
            return False
        if path is None:
            name, _ = QFileDialog.getOpenFileName(self.w, "Open a cross-section", "", "Edgewise project (*.json)")
            if not name:
                return False
            path = Path(name)
        try:
            model = files.open_model(Path(path))
        except SolverError as exc:
            show_message(self.w, "critical", "Cannot open the file", str(exc))
            return False
        if not self.w.load_or_keep(model, Path(path)):
            return False
        self._remember(Path(path))
        self.w.solve()
        return True

    def save(self) -> bool:
        if self.doc.path is None or files.SAMPLES_DIR in self.doc.path.resolve().parents:
            return self.save_as()
        return self._write(self.doc.path)

    def save_as(self, path: Path | None = None) -> bool:
        if path is None:
            name, _ = QFileDialog.getSaveFileName(self.w, "Save the cross-section", "", "Edgewise project (*.json)")
            if not name:
                return False
            path = Path(name if name.endswith(".json") else name + ".json")
        return self._write(Path(path))

    def _write(self, path: Path) -> bool:
        try:
            files.save_model(self.doc.model, path)
        except (OSError, SolverError) as exc:
            show_message(self.w, "critical", "Cannot save", f"{path}: {exc}")
            return False
        self.doc.mark_saved(path)
        files.discard_recovery()
        self._remember(path)
        return True

    def _remember(self, path: Path) -> None:
        if self.w.settings is None:
            return
        recent = files.updated_recent(self._recent(), path)
        self.w.settings.setValue("recent_files", recent)
        self._refresh_recent()

    def _recent(self) -> list[str]:
        if self.w.settings is None:
            return []
        value = self.w.settings.value("recent_files", [])
        # QSettings hands back a plain string when the list has one entry
        return [value] if isinstance(value, str) else [str(v) for v in (value or [])]

    def _refresh_recent(self) -> None:
        self.recent_menu.clear()
        recent = self._recent()
        for p in recent:
            self._act(self.recent_menu, p, lambda p=p: self.open(Path(p)))
        self.recent_menu.setEnabled(bool(recent))

    # ---- editing ---------------------------------------------------------------------------
    def delete(self) -> None:
        ref = self.doc.selection
        if ref is not None:
            self.doc.apply(edits.delete_part(self.doc.model, ref), "Delete")

    def duplicate(self) -> None:
        ref = self.doc.selection
        if ref is None or ref.kind != "conductor":
            return
        x0, y0, x1, y1 = edits.shape_of(self.doc.model, ref).bounds()
        model, new_ref = edits.duplicate_part(self.doc.model, ref, 1.2 * (x1 - x0), 0.0)
        if self.doc.apply(model, "Duplicate"):
            self.doc.select(new_ref)

    def align(self, how: str) -> None:
        ref = self.doc.selection
        if ref is None or ref.kind != "conductor" or ref.index == 0:
            self.w.statusBar().showMessage("Select a conductor after the first; it is aligned with the one before.", 6000)
            return
        other = PartRef("conductor", ref.index - 1, 0)
        self.doc.apply(edits.align_to(self.doc.model, ref, other, how), f"Align {how}")

    # ---- exports ---------------------------------------------------------------------------
    def _target(self, path, title: str, pattern: str, suffix: str, section: str = "") -> Path | None:
        if path is not None:
            return Path(path)
        suggested = exports.suggested_path(self.doc.path, self.doc.model.title, section or title.lower(), suffix)
        name, _ = QFileDialog.getSaveFileName(self.w, title, str(suggested), pattern)
        if not name:
            return None
        return Path(name if name.lower().endswith(suffix) else name + suffix)

    def _need_results(self, capacitance: bool = False) -> bool:
        r = self.w.results
        if r is None:
            QMessageBox.information(self.w, "Nothing to export", "Solve first (F5).")
            return False
        if capacitance and not r.solution.has_capacitance:
            QMessageBox.information(self.w, "No capacitance matrix",
                                    "The model has no return path (reference conductor or ground plane).")
            return False
        return True

    def _run(self, writer, path: Path) -> bool:
        """Write with ``writer``; any failure is shown in a dialog and leaves no half-written file."""
        existed = Path(path).exists()
        try:
            writer(path)
        except Exception as exc:  # an export must never fail silently, whatever broke
            logger.exception("export to %s failed", path)
            if not existed:
                Path(path).unlink(missing_ok=True)
            reason = str(exc) if isinstance(exc, (OSError, SolverError)) else f"{type(exc).__name__}: {exc}"
            show_message(self.w, "critical", "Export failed", f"{path}: nothing was written. {reason}")
            return False
        self.w.statusBar().showMessage(f"Wrote {path}", 6000)
        return True

    def export_matrices_csv(self, path=None) -> bool:
        if not self._need_results(True) or (path := self._target(path, "Export matrices", "CSV (*.csv)", ".csv",
                                                                  "capacitance matrices")) is None:
            return False
        return self._run(lambda p: exports.write_matrices_csv(self.w.results, p), path)

    def export_matrices_json(self, path=None) -> bool:
        if not self._need_results(True) or (path := self._target(path, "Export matrices", "JSON (*.json)", ".json",
                                                                  "capacitance matrices")) is None:
            return False
        return self._run(lambda p: exports.write_matrices_json(self.w.results, p), path)

    def export_picture(self, widget, kind: str, path=None, section: str = "picture") -> bool:
        if (path := self._target(path, "Export picture", f"{kind.upper()} (*.{kind})", f".{kind}", section)) is None:
            return False
        writer = exports.write_widget_png if kind == "png" else exports.write_widget_svg
        return self._run(lambda p: writer(widget, p), path)

    def export_profile_csv(self, path=None) -> bool:
        profile = self.w.results_panel.probe.profile
        if profile is None:
            QMessageBox.information(self.w, "No probe line", "Draw a probe line first (Draw > Probe line).")
            return False
        if (path := self._target(path, "Export probe profile", "CSV (*.csv)", ".csv", "probe profile")) is None:
            return False
        return self._run(lambda p: exports.write_profile_csv(*profile[:3], profile[3], p), path)

    def export_report(self, path=None) -> bool:
        if not self._need_results() or (path := self._target(path, "Export report", "PDF (*.pdf)", ".pdf",
                                                              "report")) is None:
            return False
        name = self.doc.path.name if self.doc.path else "untitled"
        image = drawing_for_report(self.w.canvas)
        hot_spots = self.w.results_panel.hot_spots
        margins = hot_spots.margins if getattr(hot_spots, "results", None) is self.w.results else None
        return self._run(lambda p: write_report_pdf(self.w.results, image, p, name, self.doc.model, margins=margins,
                                                    project_path=self.doc.path, modified=self.doc.is_modified), path)
