"""Menu entries for drawings, studies and the Green's function, hooked into the main window.

:class:`StudyMenus` adds File > Import drawing (DXF, SVG)..., Solve > Sweep and goal search...
and View > Green's function (pole at infinity), and owns the dialogs' start-up and the
Green's function overlay (:mod:`app.canvas.green_overlay`). The window makes one at start-up
and calls :meth:`StudyMenus.close` when it closes.
"""

from __future__ import annotations

from pathlib import Path

from PySide6.QtCore import QObject, Qt
from PySide6.QtGui import QAction

from app.canvas.green_overlay import GreenOverlay
from app.messages import show_message
from app.units import format_plain


class StudyMenus(QObject):
    """The study and drawing entries of ``window``'s menus (see the module notes)."""

    def __init__(self, window) -> None:
        super().__init__(window)
        self.w = window
        menus = {a.text(): a.menu() for a in window.menuBar().actions() if a.menu() is not None}
        self.import_action = QAction("Import drawing (DXF, SVG)…", window)
        self.import_action.triggered.connect(lambda: self.import_drawing())
        export = next((a for a in menus["&File"].actions() if a.text() == "&Export"), None)
        menus["&File"].insertAction(export, self.import_action)
        self.sweep_action = QAction("Sweep and goal search…", window)
        self.sweep_action.setShortcut("Ctrl+Shift+W")
        self.sweep_action.triggered.connect(lambda: self.open_sweep_dialog())
        menus["&Solve"].addAction(self.sweep_action)
        self.green_menu = menus["&View"].addMenu("Green's function (pole at infinity)")
        self.green_menu.aboutToShow.connect(self.fill_green_menu)
        self.green_overlay = GreenOverlay(window.canvas.plotItem, self)
        self.green_overlay.shown.connect(self._on_green_shown)
        self.green_overlay.failed.connect(lambda m: self._say(f"Green's function: {m}", 8000))
        self.green_overlay.cleared.connect(self._restore_result_layers)
        window.document.events.connect("model_changed", lambda _: self.green_overlay.clear())
        self._saved_layers: tuple[str, dict[str, bool]] | None = None

    def _say(self, text: str, ms: int) -> None:
        self.w.statusBar().showMessage(text, ms)

    # ---- Green's function ------------------------------------------------------------------
    def fill_green_menu(self) -> None:
        self.green_menu.clear()
        names = self.w.document.model.conductor_names
        for name in names:
            self.green_menu.addAction(name, lambda n=name: self.show_green_function([n]))
        if len(names) > 1:
            self.green_menu.addAction("all conductors tied together", lambda: self.show_green_function(list(names)))
        self.green_menu.addSeparator()
        self.green_menu.addAction("Hide", self.green_overlay.clear)

    def show_green_function(self, names: list[str]) -> None:
        """Overlay the Green's function with pole at infinity of ``names`` (tied together)."""
        self._say(f"Computing the Green's function of {', '.join(names)}...", 4000)
        self.green_overlay.show_for(self.w.document.model, names)
        self._hide_result_layers()

    #: Result layers hidden while the Green's function is on the map (they would hide its contours).
    HIDDEN_LAYERS = ("equipotentials", "hot spots")

    def _set_layers(self, shading: str, show: dict[str, bool]) -> None:
        """Through the window's Show bar when it has one (so it stays in step), else the overlays."""
        combo, boxes = getattr(self.w, "shading_combo", None), getattr(self.w, "layer_boxes", {})
        overlays = self.w.canvas.overlays
        if combo is not None:
            combo.setCurrentText(shading)
        overlays.set_shading(shading)
        for layer, on in show.items():
            if layer in boxes:
                boxes[layer].setChecked(on)
            overlays.set_visible(layer, on)

    def _hide_result_layers(self) -> None:
        overlays = self.w.canvas.overlays
        if self._saved_layers is None:
            self._saved_layers = (overlays.shading, {k: overlays.show[k] for k in self.HIDDEN_LAYERS})
        self._set_layers("none", dict.fromkeys(self.HIDDEN_LAYERS, False))

    def _restore_result_layers(self) -> None:
        if self._saved_layers is not None:
            saved, self._saved_layers = self._saved_layers, None
            self._set_layers(*saved)

    def _on_green_shown(self, m) -> None:
        (x0, x1), (y0, y1) = self.green_overlay.view_range()
        self.w.canvas.plotItem.vb.setRange(xRange=(x0, x1), yRange=(y0, y1), padding=0.02)
        unit = m.unit
        self._say(f"Green's function of {' + '.join(m.names)}: equivalent radius {format_plain(m.equivalent_radius, 5)} "
                  f"{unit}, Robin constant {format_plain(m.robin_constant, 5)} (lengths in {unit}); round wire within "
                  f"1 % beyond {format_plain(m.round_wire_distance, 4)} {unit} from the charge centre.", 20000)

    # ---- dialogs ---------------------------------------------------------------------------
    def open_sweep_dialog(self):
        """Show the sweep dialog for the drawing as it is now (returns it, or None)."""
        from app.panels.sweep_dialog import SweepDialog

        if not self.w.document.model.conductors:
            self._say("Nothing to sweep: draw a conductor first.", 6000)
            return None
        dialog = SweepDialog(self.w.document, self.w)
        dialog.setAttribute(Qt.WA_DeleteOnClose)
        dialog.show()
        return dialog

    def import_drawing(self, path: Path | None = None):
        """Show the layer-mapping dialog for a drawing (asks for the file without ``path``)."""
        from app.files.import_dialog import ImportDrawingDialog, ask_drawing_path

        path = path or ask_drawing_path(self.w)
        if path is None:
            return None
        dialog = ImportDrawingDialog(self.w.document, Path(path), self.w)
        if dialog.census_error:
            show_message(self.w, "critical", "Cannot read the drawing", dialog.census_error)
            dialog.deleteLater()
            return None
        dialog.setAttribute(Qt.WA_DeleteOnClose)
        dialog.accepted.connect(self.w.canvas.fit_view)
        dialog.show()
        return dialog

    def close(self) -> None:
        """Stop what still runs (the overlay's computation, open sweeps) before the window closes."""
        from app.panels.sweep_dialog import SweepDialog

        self.green_overlay.clear()
        self.green_overlay.runner.wait()
        for dialog in self.w.findChildren(SweepDialog):
            dialog.close()
