"""Result plots: surface charge density along each boundary, and the probe-line profile.

Picking a point in the boundary plot emits ``panel_picked(panel_index)`` so the drawing can
mark the place; :meth:`BoundaryPlot.mark_panel` shows a place picked on the drawing.
"""

from __future__ import annotations

import numpy as np
import pyqtgraph as pg
from PySide6.QtCore import Qt, Signal
from PySide6.QtWidgets import QComboBox, QHBoxLayout, QLabel, QPushButton, QVBoxLayout, QWidget

from app.units import si_scale


def _plot(parent=None) -> pg.PlotWidget:
    w = pg.PlotWidget(parent, background="w")
    w.showGrid(x=True, y=True, alpha=0.2)
    w.addLegend(offset=(10, 10))
    return w


class BoundaryPlot(QWidget):
    """Surface charge density against distance along each conductor's boundary."""

    panel_picked = Signal(int)

    def __init__(self, parent=None) -> None:
        super().__init__(parent)
        layout = QVBoxLayout(self)
        note = QLabel("Surface charge density along each conductor's boundary; dashed lines mark sharp corners "
                      "and free edges. Click a point to show it on the drawing.")
        note.setWordWrap(True)
        layout.addWidget(note)
        row = QHBoxLayout()
        row.addWidget(QLabel("conductor:"))
        self.choice = QComboBox()
        self.choice.currentIndexChanged.connect(self._on_choice_changed)
        row.addWidget(self.choice, 1)
        layout.addLayout(row)
        self.plot = _plot()
        layout.addWidget(self.plot)
        self.results = None
        self._marker = pg.ScatterPlotItem(symbol="o", size=12, pen=pg.mkPen("#000", width=2), brush=pg.mkBrush(None))
        self.plot.scene().sigMouseClicked.connect(self._on_scene_clicked)
        self._x = self._y = self._panel = np.zeros(0)
        self._factor = 1.0

    def show_results(self, results) -> None:
        self.results = results
        names = ["all conductors"] + list(results.model.conductor_names)
        if [self.choice.itemText(i) for i in range(self.choice.count())] != names:
            self.choice.blockSignals(True)
            self.choice.clear()
            self.choice.addItems(names)
            self.choice.blockSignals(False)
        self._draw()

    def _on_choice_changed(self, index: int) -> None:
        if self.results is not None:
            self._draw()

    def _draw(self) -> None:
        results = self.results
        only = self.choice.currentIndex() - 1  # -1: all
        self.plot.clear()
        self.plot.addItem(self._marker)
        sol, model = results.solution, results.model
        mesh, sigma = sol.mesh, sol.surface_charge_density_C_per_m2
        scale = model.metres_per_unit
        self._factor, prefix = si_scale(np.max(np.abs(sigma)) or 1.0)
        self.plot.setLabel("bottom", f"distance along boundary ({model.unit})")
        self.plot.setLabel("left", f"surface charge density ({prefix}C/m²)")
        xs, ys, panels = [], [], []
        for k, c in enumerate(model.conductors):
            if only >= 0 and k != only:
                continue
            idx = np.flatnonzero(mesh.conductor_index == k)
            s = mesh.arc_length_m[idx] / scale
            order = np.argsort(s, kind="stable")
            idx, s = idx[order], s[order]
            # break the curve between rings so separate outlines are not joined
            rings = mesh.ring_index[idx]
            connect = np.r_[rings[1:] == rings[:-1], False]
            self.plot.plot(s, sigma[idx] / self._factor, pen=pg.mkPen(c.color or "#555", width=2),
                           name=c.name, connect=connect)
            xs.append(s), ys.append(sigma[idx] / self._factor), panels.append(idx)
            for s_corner in self._corner_positions(sol, k, idx):
                self.plot.addItem(pg.InfiniteLine(s_corner / scale, angle=90,
                                                  pen=pg.mkPen(c.color or "#555", width=1, style=Qt.DashLine)))
        self._x, self._y, self._panel = (np.concatenate(a) if a else np.zeros(0) for a in (xs, ys, panels))
        self._marker.setData([], [])
        self.plot.plotItem.vb.autoRange()

    @staticmethod
    def _corner_positions(sol, k: int, idx: np.ndarray) -> list[float]:
        mesh = sol.mesh
        corners = mesh.corner_points[mesh.corner_conductor == k]
        out = []
        for p in corners:
            starts = np.hypot(*(mesh.starts[idx] - p).T)
            ends = np.hypot(*(mesh.ends[idx] - p).T)
            i_s, i_e = int(np.argmin(starts)), int(np.argmin(ends))
            if starts[i_s] <= ends[i_e]:
                out.append(float(mesh.arc_length_m[idx[i_s]] - 0.5 * mesh.lengths[idx[i_s]]))
            else:
                out.append(float(mesh.arc_length_m[idx[i_e]] + 0.5 * mesh.lengths[idx[i_e]]))
        return out

    def mark_panel(self, panel: int) -> None:
        """Show the place of boundary panel ``panel`` (switching to its conductor if hidden)."""
        hit = np.flatnonzero(self._panel == panel)
        if not hit.size and self.results is not None:
            self.choice.setCurrentIndex(int(self.results.solution.mesh.conductor_index[panel]) + 1)
            hit = np.flatnonzero(self._panel == panel)
        if hit.size:
            i = int(hit[0])
            self._marker.setData([self._x[i]], [self._y[i]])

    def _on_scene_clicked(self, event) -> None:
        if self.results is None or self._x.size == 0:
            return
        p = self.plot.plotItem.vb.mapSceneToView(event.scenePos())
        self.pick_at(p.x(), p.y())

    def pick_at(self, x: float, y: float) -> int | None:
        """Pick the plotted point nearest (x, y) in plot coordinates; emits ``panel_picked``."""
        (x0, x1), (y0, y1) = self.plot.plotItem.vb.viewRange()
        d = np.hypot((self._x - x) / (x1 - x0 or 1), (self._y - y) / (y1 - y0 or 1))
        i = int(np.argmin(d))
        self._marker.setData([self._x[i]], [self._y[i]])
        self.panel_picked.emit(int(self._panel[i]))
        return int(self._panel[i])


class ProbePlot(QWidget):
    """Potential and field strength along the probe line."""

    export_requested = Signal()

    def __init__(self, parent=None) -> None:
        super().__init__(parent)
        layout = QVBoxLayout(self)
        self.note = QLabel("Choose the Probe line tool (L) and drag a line on the drawing.")
        self.note.setWordWrap(True)
        layout.addWidget(self.note)
        self.potential_plot = _plot()
        self.field_plot = _plot()
        layout.addWidget(self.potential_plot)
        layout.addWidget(self.field_plot)
        row = QHBoxLayout()
        self.export_button = QPushButton("Export profile (CSV)…")
        self.export_button.setEnabled(False)
        self.export_button.clicked.connect(self.export_requested)
        row.addStretch(1)
        row.addWidget(self.export_button)
        layout.addLayout(row)
        self.profile = None

    def show_profile(self, distance: np.ndarray, potential_V: np.ndarray, field_V_per_m: np.ndarray,
                     unit: str, ends: tuple) -> None:
        """Plot a profile: ``distance`` in model units along the line from ``ends[0]`` to ``ends[1]``."""
        self.profile = (distance, potential_V, field_V_per_m, unit)
        (ax, ay), (bx, by) = ends
        self.note.setText(f"Probe from ({ax:.4g}, {ay:.4g}) to ({bx:.4g}, {by:.4g}) {unit}; "
                          "gaps are inside conductors.")
        pf, pp = si_scale(np.nanmax(np.abs(potential_V)) if np.isfinite(potential_V).any() else 1.0)
        ef, ep = si_scale(np.nanmax(field_V_per_m) if np.isfinite(field_V_per_m).any() else 1.0)
        self.potential_plot.clear()
        self.field_plot.clear()
        self.potential_plot.plot(distance, potential_V / pf, pen=pg.mkPen("#26548f", width=2), connect="finite")
        self.field_plot.plot(distance, field_V_per_m / ef, pen=pg.mkPen("#a03020", width=2), connect="finite")
        self.potential_plot.setLabel("left", f"potential ({pp}V)")
        self.field_plot.setLabel("left", f"field strength |E| ({ep}V/m)")
        for p in (self.potential_plot, self.field_plot):
            p.setLabel("bottom", f"distance along probe ({unit})")
        self.export_button.setEnabled(True)
