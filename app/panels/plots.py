"""Result plots: surface charge density along each boundary (one row per conductor), and the
probe-line profile. Colours from :mod:`app.colours`.

Picking a point in the boundary plot emits ``panel_picked(panel_index)`` so the drawing can
mark the place; :meth:`BoundaryPlot.mark_panel` shows a place picked on the drawing.
"""

from __future__ import annotations

import numpy as np
import pyqtgraph as pg
from PySide6.QtCore import Qt, Signal
from PySide6.QtWidgets import QComboBox, QHBoxLayout, QLabel, QPushButton, QVBoxLayout, QWidget

from app import colours
from app.canvas.drawing import plot_widget, style_axes
from app.units import format_point, si_scale

#: A corner spike is clipped above this many times the 95th percentile of |sigma| on its conductor.
SPIKE_CLIP = 1.6

#: Opacity of plotted results that are out of date.
STALE_OPACITY = 0.35

#: At most this many conductors get a row each; more are chosen one at a time.
MAX_ROWS = 6


def clip_spikes(values: np.ndarray) -> tuple[np.ndarray, np.ndarray, float]:
    """(clipped values, mask of clipped points, limit): corner spikes clipped at
    :data:`SPIKE_CLIP` x the 95th percentile of |values| so they do not flatten the rest."""
    if values.size == 0:
        return values, np.zeros(0, bool), 0.0
    limit = SPIKE_CLIP * float(np.percentile(np.abs(values), 95))
    if limit <= 0 or np.max(np.abs(values)) <= limit:
        return values, np.zeros(values.size, bool), float(np.max(np.abs(values)))
    return np.clip(values, -limit, limit), np.abs(values) > limit, limit


class BoundaryPlot(QWidget):
    """Surface charge density against distance along each conductor's boundary, one row per
    conductor (each with its own distance axis), corner spikes clipped and marked."""

    panel_picked = Signal(int)

    def __init__(self, parent=None) -> None:
        super().__init__(parent)
        layout = QVBoxLayout(self)
        note = QLabel("Surface charge density along each conductor's boundary, one row per conductor. Dashed lines "
                      "mark sharp corners and free edges; ▲/▼ mark corner spikes clipped to keep the rest "
                      "readable. Click a point to show it on the drawing.")
        note.setWordWrap(True)
        layout.addWidget(note)
        row = QHBoxLayout()
        row.addWidget(QLabel("conductor:"))
        self.choice = QComboBox()
        self.choice.currentIndexChanged.connect(self._on_choice_changed)
        row.addWidget(self.choice, 1)
        layout.addLayout(row)
        self.plot = pg.GraphicsLayoutWidget()
        self.plot.setBackground(colours.PAGE)
        layout.addWidget(self.plot, 1)
        self.results = None
        self._marker = pg.ScatterPlotItem(symbol="o", size=12, pen=pg.mkPen(colours.SELECTION, width=2),
                                          brush=pg.mkBrush(None))
        self._marker_row: pg.PlotItem | None = None
        self.plot.scene().sigMouseClicked.connect(self._on_scene_clicked)
        self.rows: list[tuple[pg.PlotItem, np.ndarray, np.ndarray, np.ndarray]] = []
        self._items: list[pg.PlotItem] = []
        self._factor = 1.0
        self._stale = False

    def show_results(self, results) -> None:
        self.results = results
        names = list(results.model.conductor_names)
        names = (["all conductors"] if len(names) <= MAX_ROWS else [f"first {MAX_ROWS} conductors"]) + names
        if [self.choice.itemText(i) for i in range(self.choice.count())] != names:
            self.choice.blockSignals(True)
            self.choice.clear()
            self.choice.addItems(names)
            self.choice.blockSignals(False)
        self._draw()

    def _on_choice_changed(self, index: int) -> None:
        if self.results is not None:
            self._draw()

    def _shown(self) -> list[int]:
        only = self.choice.currentIndex() - 1  # -1: all
        n = len(self.results.model.conductors)
        return [only] if only >= 0 else list(range(min(n, MAX_ROWS)))

    def _draw(self) -> None:
        sol, model = self.results.solution, self.results.model
        mesh, sigma = sol.mesh, sol.surface_charge_density_C_per_m2
        scale = model.metres_per_unit
        self._remove_marker()
        shown = self._shown()
        # the plot items are kept while the number of rows stays (a drag re-solves many times a
        # second, and making a plot item costs more than drawing its curve)
        if len(self._items) != len(shown):
            self.plot.clear()
            self._items = [self.plot.addPlot(row=r, col=0) for r in range(len(shown))]
            for item in self._items:
                style_axes(item)
                item.showGrid(x=True, y=True, alpha=0.2)
        self.rows = []
        per_conductor = {}
        for k in shown:
            idx = np.flatnonzero(mesh.conductor_index == k)
            s = mesh.arc_length_m[idx] / scale
            order = np.argsort(s, kind="stable")
            per_conductor[k] = (idx[order], s[order])
        limits = [clip_spikes(sigma[idx])[2] for idx, _ in per_conductor.values()]
        self._factor, prefix = si_scale(max(limits + [0.0]) or 1.0)
        for r, k in enumerate(shown):
            idx, s = per_conductor[k]
            c = model.conductors[k]
            colour = colours.display_colour(c, k)
            values, clipped, _limit = clip_spikes(sigma[idx])
            y = values / self._factor
            item = self._items[r]
            item.clear()
            item.setTitle(c.name, color=colours.TEXT, size="9pt")
            item.setLabel("left", f"σ ({prefix}C/m²)")
            item.setLabel("bottom", f"distance along boundary ({model.unit})" if r == len(shown) - 1 else None)
            rings = mesh.ring_index[idx]  # break the curve between rings so separate outlines are not joined
            connect = np.r_[rings[1:] == rings[:-1], False]
            item.plot(s, y, pen=pg.mkPen(colour, width=2), connect=connect)
            if clipped.any():
                up = clipped & (values > 0)
                down = clipped & (values < 0)
                for mask, symbol in ((up, "t1"), (down, "t")):
                    if mask.any():
                        item.addItem(pg.ScatterPlotItem(s[mask], y[mask], symbol=symbol, size=9,
                                                        pen=pg.mkPen(colours.TEXT), brush=pg.mkBrush(colour)))
            for s_corner in self._corner_positions(sol, k, idx):
                item.addItem(pg.InfiniteLine(s_corner / scale, angle=90,
                                             pen=pg.mkPen(colours.TEXT_MUTED, width=1, style=Qt.DashLine)))
            item.setOpacity(STALE_OPACITY if self._stale else 1.0)
            self.rows.append((item, s, y, idx))

    def mark_stale(self, stale: bool) -> None:
        """Dim the curves while the drawing has changed since the solve."""
        self._stale = stale
        for item, *_ in self.rows:
            item.setOpacity(STALE_OPACITY if stale else 1.0)

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

    def _remove_marker(self) -> None:
        if self._marker_row is not None:
            self._marker_row.removeItem(self._marker)
            self._marker_row = None

    def _mark(self, row: int, i: int) -> None:
        item, s, y, _ = self.rows[row]
        if self._marker_row is not item:
            self._remove_marker()
            item.addItem(self._marker)
            self._marker_row = item
        self._marker.setData([s[i]], [y[i]])

    def mark_panel(self, panel: int) -> None:
        """Show the place of boundary panel ``panel`` (switching to its conductor if hidden)."""
        if self.results is None:
            return
        k = int(self.results.solution.mesh.conductor_index[panel])
        if k not in self._shown():
            self.choice.setCurrentIndex(k + 1)
        for r, (_item, _s, _y, idx) in enumerate(self.rows):
            hit = np.flatnonzero(idx == panel)
            if hit.size:
                self._mark(r, int(hit[0]))
                return

    def _on_scene_clicked(self, event) -> None:
        for r, (item, _s, _y, _idx) in enumerate(self.rows):
            if item.sceneBoundingRect().contains(event.scenePos()):
                p = item.vb.mapSceneToView(event.scenePos())
                self.pick_at(p.x(), p.y(), r)
                return

    def pick_at(self, x: float, y: float, row: int = 0) -> int | None:
        """Pick the point of row ``row`` nearest (x, y) in its plot coordinates; emits ``panel_picked``."""
        if not self.rows:
            return None
        item, s, values, idx = self.rows[row]
        (x0, x1), (y0, y1) = item.vb.viewRange()
        d = np.hypot((s - x) / (x1 - x0 or 1), (values - y) / (y1 - y0 or 1))
        i = int(np.argmin(d))
        self._mark(row, i)
        self.panel_picked.emit(int(idx[i]))
        return int(idx[i])


class ProbePlot(QWidget):
    """Potential and field strength along the probe line."""

    export_requested = Signal()

    def __init__(self, parent=None) -> None:
        super().__init__(parent)
        layout = QVBoxLayout(self)
        self.note = QLabel("Choose the Probe line tool (L) and drag a line on the drawing.")
        self.note.setWordWrap(True)
        layout.addWidget(self.note)
        self.potential_plot = plot_widget()
        self.field_plot = plot_widget()
        layout.addWidget(self.potential_plot, 1)
        layout.addWidget(self.field_plot, 1)
        self._filler = QWidget()  # holds the place of the plots while there is no profile
        layout.addWidget(self._filler, 1)
        row = QHBoxLayout()
        self.export_button = QPushButton("Export profile (CSV)…")
        self.export_button.setEnabled(False)
        self.export_button.clicked.connect(self.export_requested)
        row.addStretch(1)
        row.addWidget(self.export_button)
        layout.addLayout(row)
        self.profile = None
        self._show_plots(False)

    def _show_plots(self, shown: bool) -> None:
        """Plots only for a profile: no empty axes without units before a probe line exists."""
        self.potential_plot.setVisible(shown)
        self.field_plot.setVisible(shown)
        self._filler.setVisible(not shown)

    def show_profile(self, distance: np.ndarray, potential_V: np.ndarray, field_V_per_m: np.ndarray,
                     unit: str, ends: tuple) -> None:
        """Plot a profile: ``distance`` in model units along the line from ``ends[0]`` to ``ends[1]``."""
        self.profile = (distance, potential_V, field_V_per_m, unit)
        (ax, ay), (bx, by) = ends
        size = max(abs(ax), abs(ay), abs(bx), abs(by))
        self.note.setText(f"Probe from {format_point(ax, ay, '', size).strip()} to "
                          f"{format_point(bx, by, unit, size)}; "
                          "gaps are inside conductors.")
        pf, pp = si_scale(np.nanmax(np.abs(potential_V)) if np.isfinite(potential_V).any() else 1.0)
        ef, ep = si_scale(np.nanmax(field_V_per_m) if np.isfinite(field_V_per_m).any() else 1.0)
        self.potential_plot.clear()
        self.field_plot.clear()
        self.potential_plot.plot(distance, potential_V / pf, pen=pg.mkPen(colours.POTENTIAL_CURVE, width=2), connect="finite")
        self.field_plot.plot(distance, field_V_per_m / ef, pen=pg.mkPen(colours.FIELD_CURVE, width=2), connect="finite")
        self.potential_plot.setLabel("left", f"potential ({pp}V)")
        self.field_plot.setLabel("left", f"|E| ({ep}V/m)")
        for p in (self.potential_plot, self.field_plot):
            p.setLabel("bottom", f"distance along probe ({unit})")
        self.export_button.setEnabled(True)
        self._show_plots(True)

    def mark_stale(self, stale: bool) -> None:
        """Dim the profile while the drawing has changed since the solve."""
        for p in (self.potential_plot, self.field_plot):
            p.plotItem.setOpacity(STALE_OPACITY if stale else 1.0)

    def clear(self) -> None:
        """No profile (a new drawing): nothing from the previous one stays on show."""
        self.profile = None
        self.potential_plot.clear()
        self.field_plot.clear()
        self.note.setText("Choose the Probe line tool (L) and drag a line on the drawing.")
        self.export_button.setEnabled(False)
        self._show_plots(False)
