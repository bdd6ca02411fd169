"""The "Cross-check" section: each conductor's equivalent radius by independent routes.

Press the button after a solve: :func:`solver.check_each_equivalent_radius` runs in the
background and the table shows, one column per conductor, the solver's equivalent radius beside the
Fekete and Chebyshev limits, their differences, the Robin constant, the round-wire distance and
the verdict; the plot shows the outline of the selected conductor with its Fekete points (they
crowd where the charge does). No physics here.
"""

from __future__ import annotations

import pyqtgraph as pg
from PySide6.QtCore import Qt
from PySide6.QtWidgets import QHBoxLayout, QLabel, QPushButton, QVBoxLayout, QWidget

import solver
from app import colours
from app.canvas.drawing import plot_widget
from app.jobs.figure_jobs import FigureJobRunner
from app.panels.matrices_view import CopyableTable
from app.units import format_plain, keep_units

STALE_TEXT = "OUT OF DATE: the drawing changed after this solve. Solve again (F5)."
#: The table's rows (one column per conductor, so that a narrow panel shows every figure);
#: "{unit}" is the model's length unit.
ROWS = ["solver radius ({unit})", "Fekete limit ({unit})", "Fekete diff (%)", "Chebyshev limit ({unit})",
        "Chebyshev diff (%)", "Robin constant (lengths in {unit})", "round wire beyond ({unit})", "verdict"]


def _signed(value: float, digits: int = 3) -> str:
    """A difference with its sign, e.g. "+0.012", "−0.4"."""
    text = format_plain(value, digits)
    return text if text.startswith("\u2212") or text == "0" else "+" + text


class CrossCheckView(QWidget):
    """Table of cross-checks and a plot of the Fekete points of the selected conductor."""

    def __init__(self, parent=None) -> None:
        super().__init__(parent)
        self.results = None
        self.checks: list | None = None
        self.runner = FigureJobRunner(self)
        self.runner.result_ready.connect(self._on_checks_ready)
        self.runner.job_failed.connect(lambda m: self._set_status(f"No cross-check: {m}", error=True))
        self.runner.busy_changed.connect(self._on_busy_changed)

        layout = QVBoxLayout(self)
        head = QLabel("<b>Cross-check of the equivalent radius</b> of each conductor alone, by two routes that "
                      "share no numerics with the solver: Fekete points (N-th diameter) and the Chebyshev "
                      "constant (Fekete polynomial). Their values at each N are upper bounds; the limits should "
                      "match the solver within the expected convergence. See docs/cross_check.md.")
        head.setWordWrap(True)
        layout.addWidget(head)
        row = QHBoxLayout()
        self.run_button = QPushButton("Cross-check the equivalent radii")
        self.run_button.setEnabled(False)
        self.run_button.clicked.connect(self.compute)
        row.addWidget(self.run_button)
        row.addStretch(1)
        layout.addLayout(row)
        self.status = QLabel("Solve first.")
        self.status.setWordWrap(True)
        self.status.setTextInteractionFlags(Qt.TextSelectableByMouse)
        layout.addWidget(self.status)
        self.table = CopyableTable()
        self.table.itemSelectionChanged.connect(self._on_selection_changed)
        layout.addWidget(self.table, 1)
        self.plot = plot_widget(grid_alpha=None)
        self.plot.setAspectLocked(True)
        self.plot.setMinimumHeight(220)
        self.outline_curves: list = []
        self.points_item = pg.ScatterPlotItem(size=7, pen=pg.mkPen(colours.PAGE), brush=pg.mkBrush(colours.PLOT_DATA))
        self.plot.addItem(self.points_item)
        layout.addWidget(self.plot, 1)

    # ---- results panel protocol ---------------------------------------------------------
    def show_results(self, results) -> None:
        self.results = results
        self.checks = None
        self.runner.cancel()
        self.table.fill(self._rows(), [], [], wrap=16)
        self._draw(None)
        self.run_button.setEnabled(True)
        self._set_status("Press the button to cross-check (a few seconds to half a minute per conductor).")

    def mark_stale(self, stale: bool) -> None:
        if stale:
            self.runner.cancel()
            self._set_status(STALE_TEXT, stale=True)
        self.run_button.setEnabled(not stale and self.results is not None)

    # ---- work -----------------------------------------------------------------------------
    def compute(self) -> None:
        if self.results is None:
            return
        self._set_status("Cross-checking…")
        self.runner.start(solver.check_each_equivalent_radius, self.results.model)

    def _on_busy_changed(self, busy: bool) -> None:
        self.run_button.setEnabled(not busy and self.results is not None)

    def _on_checks_ready(self, checks) -> None:
        self.checks = list(checks)
        model = self.results.model
        scale = model.metres_per_unit

        def length(x_m: float) -> str:
            return format_plain(x_m / scale, 5)

        columns = [[length(c.equivalent_radius_m), length(c.fekete.limit_m), _signed(100 * c.fekete.relative_difference),
                    length(c.chebyshev.limit_m), _signed(100 * c.chebyshev.relative_difference),
                    format_plain(c.robin_constant, 5), length(c.round_wire_distance_m),
                    "agree" if c.agrees else "DISAGREE"] for c in self.checks]
        self.table.fill(self._rows(), [" + ".join(c.conductors) for c in self.checks],
                        [list(row) for row in zip(*columns)] if columns else [], wrap=16)
        all_agree = all(c.agrees for c in self.checks)
        self._set_status("All conductors: both routes agree with the solver within their expected convergence."
                         if all_agree else "; ".join(c.verdict for c in self.checks if not c.agrees), error=not all_agree)
        if self.checks:
            self.table.selectColumn(0)
            self._draw(self.checks[0])

    def _rows(self) -> list[str]:
        unit = "" if self.results is None else self.results.model.unit
        return [r.format(unit=unit) for r in ROWS]

    def _on_selection_changed(self) -> None:
        columns = {i.column() for i in self.table.selectedIndexes()}
        if self.checks and len(columns) == 1:
            self._draw(self.checks[columns.pop()])

    def _draw(self, check) -> None:
        for curve in self.outline_curves:
            self.plot.removeItem(curve)
        self.outline_curves = []
        if check is None:
            self.points_item.setData([], [])
            return
        scale = check.metres_per_unit
        for piece in check.outline_m:
            self.outline_curves.append(self.plot.plot(piece[:, 0] / scale, piece[:, 1] / scale,
                                                      pen=pg.mkPen(colours.PLOT_GUIDE, width=1.5)))
        pts = check.fekete_points.points_m / scale
        self.points_item.setData(pts[:, 0], pts[:, 1])
        self.plot.setTitle(f"Fekete points, N = {check.fekete_points.n_points} ({check.unit})", color=colours.TEXT)

    def _set_status(self, text: str, *, error: bool = False, stale: bool = False) -> None:
        self.status.setText(keep_units(text))
        self.status.setStyleSheet(colours.status_style(error=error, stale=stale))
