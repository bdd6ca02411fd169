"""Peak field against corner radius: a part of the "Hot spots" section.

Pick a conductor and a list of radii (model unit); :func:`solver.peak_field_vs_corner_radius`
runs in the background and the section shows a plot (with error bars from each peak's
estimated error), a table and a CSV export. No physics here.
"""

from __future__ import annotations

import csv
import io
import math

import numpy as np
import pyqtgraph as pg
from PySide6.QtWidgets import QComboBox, QFileDialog, QHBoxLayout, QLabel, QLineEdit, QPushButton, QVBoxLayout, QWidget

import solver
from app import colours
from app.canvas.drawing import plot_widget
from app.jobs.figure_jobs import FigureJobRunner, JobProgress
from app.panels.matrices_view import CopyableTable, drawing_size, format_coordinate
from app.units import digits_for, format_percent, format_plain, keep_units, true_minus
from solver.hot_spots.corner_limits import largest_corner_radius_m

#: Default radii as fractions of the conductor's smaller bounding-box side.
DEFAULT_RADIUS_FRACTIONS = (0.02, 0.05, 0.1, 0.2, 0.35)


def field_unit(values_V_per_m) -> tuple[float, str]:
    """(factor, label): MV/m from 1 MV/m up, else kV/m."""
    peak = float(np.nanmax(np.abs(values_V_per_m))) if np.size(values_V_per_m) else 0.0
    return (1e6, "MV/m") if peak >= 1e6 else (1e3, "kV/m")


def default_radii(model, conductor: str) -> list[float]:
    """Sensible corner radii (model unit) for ``conductor``: fractions of its thickness, twice the
    largest radius the solver's rounding accepts (the smaller side of a bar; the wall of an
    enclosure, not its box)."""
    side = 2.0 * largest_corner_radius_m(model, conductor) / model.metres_per_unit
    return [float(f"{side * f:.2g}") for f in DEFAULT_RADIUS_FRACTIONS]


class CornerRadiusPart(QWidget):
    """Sweep of one conductor's peak surface field over corner radii."""

    def __init__(self, parent=None) -> None:
        super().__init__(parent)
        self.results = None
        self.sweep: solver.CornerRadiusSweep | None = None
        self.runner = FigureJobRunner(self)
        self.runner.result_ready.connect(self._on_sweep_ready)
        self.runner.job_failed.connect(lambda m: self._set_status(f"Sweep failed: {m}", error=True))
        self.runner.busy_changed.connect(self._on_busy_changed)

        layout = QVBoxLayout(self)
        layout.setContentsMargins(0, 0, 0, 0)
        head = QLabel("<b>Peak field against corner radius</b>: the chosen conductor's sharp corners are rounded to "
                      "each radius in turn and its peak surface field refined to 1 %.")
        head.setWordWrap(True)
        layout.addWidget(head)
        row = QHBoxLayout()
        self.conductor_box = QComboBox()
        self.conductor_box.setSizeAdjustPolicy(QComboBox.AdjustToMinimumContentsLengthWithIcon)
        self.conductor_box.setMinimumContentsLength(8)
        self.radii_label = QLabel("radii")
        self.radii_edit = QLineEdit()
        self.radii_edit.setToolTip("Corner radii separated by commas, in the model's length unit or with a unit (0.5 mm, 20 mil).")
        self.run_button = QPushButton("Run sweep")
        self.export_button = QPushButton("Export CSV…")
        self.export_button.setEnabled(False)
        row.addWidget(QLabel("conductor"))
        row.addWidget(self.conductor_box, 1)
        row.addWidget(self.radii_label)
        row.addWidget(self.radii_edit, 2)
        layout.addLayout(row)
        buttons = QHBoxLayout()  # a row of their own: the inputs keep their width in a narrow panel
        buttons.addWidget(self.run_button)
        buttons.addWidget(self.export_button)
        buttons.addStretch(1)
        layout.addLayout(buttons)
        self.status = QLabel("Solve first; then pick a conductor and run the sweep.")
        self.status.setWordWrap(True)
        layout.addWidget(self.status)
        self.progress = JobProgress(self.runner)
        layout.addWidget(self.progress)
        self.runner.job_cancelled.connect(lambda: self._set_status("Sweep cancelled: press Run sweep to start again."))
        self.plot = plot_widget(grid_alpha=0.3)  # no SI multiplier on the axes: the unit is in the label
        self.plot.setMinimumHeight(230)
        self.curve = self.plot.plot([], [], pen=pg.mkPen(colours.PLOT_DATA, width=2), symbol="o", symbolSize=7,
                                    symbolBrush=colours.PLOT_DATA)
        self.error_bars = pg.ErrorBarItem(x=np.zeros(0), y=np.zeros(0), height=np.zeros(0), beam=0.0,
                                          pen=pg.mkPen(colours.PLOT_GUIDE, width=1.5))
        self.plot.addItem(self.error_bars)
        layout.addWidget(self.plot)
        self.table = CopyableTable()
        self.table.fill([], [], [])
        layout.addWidget(self.table)
        self.run_button.clicked.connect(self.run_sweep)
        self.export_button.clicked.connect(self._on_export_clicked)
        self.conductor_box.currentTextChanged.connect(self._on_conductor_changed)
        self._set_axes("m", "kV/m")
        self._clear()

    # ---- feeding -----------------------------------------------------------------------------
    def set_results(self, results) -> None:
        self.results = results
        self.runner.cancel()
        self._clear()
        model = results.model
        before = (self.conductor_box.currentText(), self.radii_label.text())
        self.radii_label.setText(f"radii ({model.unit})")
        self.conductor_box.blockSignals(True)
        self.conductor_box.clear()
        self.conductor_box.addItems(list(model.conductor_names))
        sharp = solver.conductors_with_sharp_corners(model)
        if sharp:
            self.conductor_box.setCurrentText(sharp[0])
        self.conductor_box.blockSignals(False)
        # radii the user typed (or were offered) for the same conductor in the same unit are kept
        # through a re-solve, such as every step of a drag
        if (self.conductor_box.currentText(), self.radii_label.text()) != before or not self.radii_edit.text().strip():
            self._on_conductor_changed(self.conductor_box.currentText())
        self._set_axes(model.unit, "kV/m")
        self._set_status("Pick a conductor and radii, then run the sweep." if sharp else
                         "No conductor has sharp corners as drawn. The sweep gives each corner of a one-rectangle "
                         "conductor the radius in turn; a round conductor has no corner to change.")

    def mark_stale(self, stale: bool) -> None:
        if stale:
            self.runner.cancel()
            self._set_status("OUT OF DATE: the drawing changed after this solve. Solve again (F5).", stale=True)
        self.run_button.setEnabled(not stale and self.results is not None)
        self.plot.setEnabled(not stale)
        self.table.setEnabled(not stale)

    def _on_conductor_changed(self, name: str) -> None:
        if self.results is None or not name:
            return
        self.radii_edit.setText(", ".join(f"{r:g}" for r in default_radii(self.results.model, name)))

    def run_sweep(self) -> None:
        """Start the sweep for the chosen conductor and radii."""
        if self.results is None:
            return
        model = self.results.model
        try:  # lengths with units ("0.5 mm, 20 mil") or bare numbers in the model's unit
            radii = [solver.parse_quantity(t, "m", "radii", default_unit=model.unit) / model.metres_per_unit
                     for t in self.radii_edit.text().replace(";", ",").split(",") if t.strip()]
        except solver.SolverError:
            radii = []
        if not radii or any(not (r > 0 and math.isfinite(r)) for r in radii):
            self._set_status(f"Radii '{self.radii_edit.text()}': give positive numbers in {model.unit}, "
                             "separated by commas.", error=True)
            return
        name = self.conductor_box.currentText()
        self._set_status(f"Sweeping the peak field of '{name}' over {len(radii)} corner radii…")
        self.runner.start_with_progress(solver.peak_field_vs_corner_radius, self.results.solution, name,
                                        [r * model.metres_per_unit for r in radii])

    # ---- display -----------------------------------------------------------------------------
    def _set_status(self, text: str, *, error: bool = False, stale: bool = False) -> None:
        self.status.setText(keep_units(text))
        self.status.setStyleSheet(colours.status_style(error=error, stale=stale))

    def _on_busy_changed(self, busy: bool) -> None:
        self.run_button.setText("Running…" if busy else "Run sweep")
        self.run_button.setEnabled(not busy and self.results is not None)

    def _set_axes(self, unit: str, field_label: str) -> None:
        self.plot.setLabel("bottom", f"corner radius ({unit})")
        self.plot.setLabel("left", f"peak surface field |E| ({field_label})")

    def _clear(self) -> None:
        self.sweep = None
        self.curve.setData([], [])
        self.error_bars.setData(x=np.zeros(0), y=np.zeros(0), height=np.zeros(0))
        self.table.fill([], [], [])
        self.export_button.setEnabled(False)
        self.plot.setVisible(False)  # no empty axes before a sweep exists
        self.table.setVisible(False)

    def _on_sweep_ready(self, sweep) -> None:
        self.sweep = sweep
        model = self.results.model
        scale = model.metres_per_unit
        factor, label = field_unit(sweep.peak_field_V_per_m)
        x = sweep.corner_radius_m / scale
        y = sweep.peak_field_V_per_m / factor
        errors = np.nan_to_num(sweep.estimated_relative_error, nan=0.0) * y
        self._set_axes(model.unit, label)
        self.plot.setVisible(True)
        self.table.setVisible(True)
        self.curve.setData(x, y)
        self.error_bars.setData(x=x, y=y, height=2.0 * errors)
        self.plot.enableAutoRange()
        size = drawing_size(self.results.solution) / scale
        cells = []  # the radius in a column of its own: narrower than a row heading "r = 0.2 mm"
        # one number of figures for the whole peak column: those the largest estimated error supports
        finite = sweep.estimated_relative_error[np.isfinite(sweep.estimated_relative_error)]
        peak_digits = digits_for(float(finite.max()) if finite.size else None)
        for k, r in enumerate(x):
            err = sweep.estimated_relative_error[k]
            enh = sweep.enhancement_factor[k]
            cells.append([format_plain(r, 6), format_plain(y[k], peak_digits),
                          "n/a" if math.isnan(err) else format_plain(100 * err, 2),
                          "n/a" if math.isnan(enh) else format_plain(enh, 3),
                          format_coordinate(sweep.location_m[k, 0] / scale, size),
                          format_coordinate(sweep.location_m[k, 1] / scale, size)])
        self.table.fill([], [f"corner radius ({model.unit})", f"peak |E| ({label})", "est. error (%)", "enhancement factor",
                               f"peak at x ({model.unit})", f"peak at y ({model.unit})"], cells, wrap=10)
        self.export_button.setEnabled(True)
        trend = ("" if sweep.fitted_exponent is None else
                 f" Over this range the peak goes like radius^{true_minus(f'{sweep.fitted_exponent:.3f}')}.")
        largest = format_percent(float(np.nanmax(sweep.estimated_relative_error)))
        self._set_status(f"Peak surface field of '{sweep.conductor}' for {len(x)} corner radii; the error bars span "
                         f"± the estimated error of each peak (largest {largest}, so they may hide behind "
                         f"the markers).{trend}")

    # ---- export ------------------------------------------------------------------------------
    def csv_text(self) -> str:
        """The sweep as CSV: radius and location in the model unit, field in V/m, error in %."""
        if self.sweep is None:
            return ""
        s, model = self.sweep, self.results.model
        scale, unit = model.metres_per_unit, model.unit
        out = io.StringIO()
        writer = csv.writer(out, lineterminator="\n")
        writer.writerow([f"corner_radius_{unit}", "peak_field_V_per_m", "estimated_error_percent",
                         "enhancement_factor", f"peak_x_{unit}", f"peak_y_{unit}"])
        for k in range(len(s.corner_radius_m)):
            writer.writerow([f"{s.corner_radius_m[k] / scale:.9g}", f"{s.peak_field_V_per_m[k]:.9g}",
                             f"{100 * s.estimated_relative_error[k]:.4g}", f"{s.enhancement_factor[k]:.6g}",
                             f"{s.location_m[k, 0] / scale:.9g}", f"{s.location_m[k, 1] / scale:.9g}"])
        return out.getvalue()

    def write_csv(self, path: str) -> None:
        with open(path, "w", encoding="utf-8", newline="") as fh:
            fh.write(self.csv_text())

    def _on_export_clicked(self) -> None:
        path, _ = QFileDialog.getSaveFileName(self, "Export the corner-radius sweep", "corner_radius_sweep.csv",
                                              "CSV files (*.csv)")
        if not path:
            return
        try:
            self.write_csv(path)
        except OSError as exc:
            self._set_status(f"Could not write {path}: {exc.strerror or exc}", error=True)
            return
        self._set_status(f"Sweep written to {path}.")
