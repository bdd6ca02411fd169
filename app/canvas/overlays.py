"""Result layers on the drawing area: shading with a colour bar, equipotentials, field lines,
surface charge density on the outlines, hot spots and a picked point.

Every layer is switchable; all positions are in model units. :meth:`Overlays.set_stale` dims
the layers when the model has changed since the solve.
"""

from __future__ import annotations

import numpy as np
import pyqtgraph as pg
from PySide6.QtCore import QPointF, QRectF
from scipy import ndimage

from app.units import format_field, format_potential, si_scale

#: Our own colour scales.
POTENTIAL_MAP = pg.ColorMap([0.0, 0.5, 1.0], [(38, 84, 150), (240, 240, 232), (168, 50, 38)])
FIELD_MAP = pg.ColorMap([0.0, 0.3, 0.6, 0.85, 1.0],
                        [(250, 250, 245), (250, 222, 130), (236, 128, 44), (160, 30, 40), (50, 8, 40)])
CHARGE_MAP = pg.ColorMap([0.0, 0.5, 1.0], [(20, 90, 200), (170, 170, 170), (215, 30, 30)])

SHADINGS = ("none", "potential", "field strength", "field strength (log)")


class Overlays:
    """Owns the result items drawn on a PlotItem."""

    def __init__(self, plot_item: pg.PlotItem) -> None:
        self.plot = plot_item
        self.results = None
        self.shading = "potential"
        self.show = {"equipotentials": True, "field lines": False, "surface charge": False, "hot spots": True}
        self._items: list = []
        self._bars: list = []
        self._marker = pg.ScatterPlotItem(symbol="o", size=14, pen=pg.mkPen("#000", width=2), brush=pg.mkBrush(None))
        self._marker.setZValue(90)
        self.plot.addItem(self._marker)
        self.stale = False

    # ---- public ----------------------------------------------------------------------------
    def set_results(self, results) -> None:
        self.results = results
        self.stale = False
        self.redraw()

    def clear(self) -> None:
        self.results = None
        self.redraw()

    def set_shading(self, name: str) -> None:
        if name != self.shading:
            self.shading = name
            self.redraw()

    def set_visible(self, layer: str, on: bool) -> None:
        if self.show.get(layer) != on:
            self.show[layer] = on
            self.redraw()

    def set_stale(self, stale: bool) -> None:
        self.stale = stale
        for item in self._items:
            item.setOpacity(0.3 if stale else 1.0)

    def mark_point(self, xy) -> None:
        self._marker.setData([xy[0]], [xy[1]])

    def clear_marker(self) -> None:
        self._marker.setData([], [])

    # ---- drawing ---------------------------------------------------------------------------
    def _add(self, item, z: float) -> None:
        item.setZValue(z)
        self.plot.addItem(item)
        self._items.append(item)

    def redraw(self) -> None:
        for item in self._items:
            self.plot.removeItem(item)
        for bar in self._bars:
            self.plot.layout.removeItem(bar)
            if bar.scene() is not None:
                bar.scene().removeItem(bar)
        self._items, self._bars = [], []
        r = self.results
        if r is None:
            return
        scale = r.model.metres_per_unit
        if r.grid is not None and self.shading != "none":
            self._draw_shading(r.grid, scale)
        if r.grid is not None and self.show["equipotentials"]:
            self._draw_equipotentials(r.grid, scale)
        if self.show["field lines"]:
            self._draw_field_lines(r, scale)
        if self.show["surface charge"]:
            self._draw_surface_charge(r, scale)
        if self.show["hot spots"]:
            self._draw_hot_spots(r, scale)
        self.set_stale(self.stale)

    def _colour_bar(self, values, cmap, label: str, column: int, ticks=None) -> pg.ColorBarItem:
        lo, hi = values
        if not hi > lo:
            hi = lo + 1.0
        bar = pg.ColorBarItem(values=(lo, hi), colorMap=cmap, label=label, interactive=False, width=14)
        if ticks is not None:
            bar.axis.setTicks([ticks])
            bar.axis.setWidth(70)
        self.plot.layout.addItem(bar, 2, column)
        self._bars.append(bar)
        return bar

    def _draw_shading(self, grid, scale: float) -> None:
        x, y = grid.x_m / scale, grid.y_m / scale
        dx, dy = x[1] - x[0], y[1] - y[0]
        if self.shading == "potential":
            data, cmap = grid.potential_V, POTENTIAL_MAP
            factor, prefix = si_scale(np.nanmax(np.abs(data)) if np.isfinite(data).any() else 1.0)
            data = data / factor
            label, ticks = f"potential ({prefix}V)", None
        else:
            e = grid.field_V_per_m
            cmap = FIELD_MAP
            if self.shading == "field strength (log)":
                data = np.log10(np.where(e > 0, e, np.nan))
                hi = np.nanmax(data)
                lo = max(np.nanmin(data), hi - 3.0)  # three decades; weaker fields share the lightest colour
                data = np.clip(data, lo, None)
                ticks = [(float(np.log10(m * 10.0 ** k)), format_field(m * 10.0 ** k))
                         for k in range(int(np.floor(lo)), int(np.ceil(hi)) + 1) for m in (1, 2, 5)
                         if lo <= np.log10(m * 10.0 ** k) <= hi]
                label = "field strength |E| (log scale, three decades)"
            else:
                factor, prefix = si_scale(np.nanmax(e) if np.isfinite(e).any() else 1.0)
                data, ticks = e / factor, None
                label = f"field strength |E| ({prefix}V/m); darkest = 99.5th percentile and above"
        finite = data[np.isfinite(data)]
        if finite.size == 0:
            return
        lo, hi = float(finite.min()), float(finite.max())
        if self.shading == "field strength":
            lo = 0.0
            hi = float(np.percentile(finite, 99.5))  # corners would wash out the rest of the map
        img = pg.ImageItem(data)
        img.setRect(QRectF(x[0] - dx / 2, y[0] - dy / 2, dx * len(x), dy * len(y)))
        img.setColorMap(cmap)
        img.setLevels((lo, hi if hi > lo else lo + 1.0))
        self._add(img, 1)
        self._colour_bar((lo, hi), cmap, label, 5, ticks)

    def _draw_equipotentials(self, grid, scale: float, n_levels: int = 9) -> None:
        phi = grid.potential_V
        if not np.isfinite(phi).any():
            return
        invalid = ~np.isfinite(phi)
        near_part = ndimage.binary_dilation(invalid, iterations=2)  # no labels on or next to conductors
        if invalid.any():
            idx = ndimage.distance_transform_edt(invalid, return_distances=False, return_indices=True)
            phi = phi[tuple(idx)]
        potentials = [float(v) for v in self.results.solution.conductor_potentials_V]
        if self.results.model.ground_plane is not None:
            potentials.append(0.0)
        lo, hi = min(potentials + [float(np.min(phi))]), max(potentials + [float(np.max(phi))])
        if not hi > lo:
            return
        levels = lo + (hi - lo) * (np.arange(1, n_levels + 1) / (n_levels + 1))
        x, y = grid.x_m / scale, grid.y_m / scale
        dx, dy = x[1] - x[0], y[1] - y[0]
        pen = pg.mkPen((30, 30, 30, 200), width=1)
        min_gap = 0.06 * max(x[-1] - x[0], y[-1] - y[0])  # keep labels apart
        placed: list[tuple[float, float]] = []
        for k, level in enumerate(levels):
            longest = None
            for line in pg.functions.isocurve(phi, level, connected=True):
                pts = np.asarray(line) - 0.5
                xs, ys = x[0] + pts[:, 1] * dx, y[0] + pts[:, 0] * dy
                # The filled-in values only steady the contouring: no line where there is no field.
                rows = np.clip(np.rint(pts[:, 0]).astype(int), 0, len(y) - 1)
                cols = np.clip(np.rint(pts[:, 1]).astype(int), 0, len(x) - 1)
                outside = invalid[rows, cols]
                xs, ys = np.where(outside, np.nan, xs), np.where(outside, np.nan, ys)
                if not np.isfinite(xs).any():
                    continue
                self._add(pg.PlotCurveItem(xs, ys, pen=pen, connect="finite"), 10)
                if longest is None or len(xs) > len(longest[0]):
                    longest = (xs, ys)
            if longest is None or len(longest[0]) <= 4:
                continue
            n = len(longest[0])
            for t in ((0.5 + 0.382 * k + 0.05 * j) % 1.0 for j in range(20)):
                px, py = longest[0][int(t * (n - 1))], longest[1][int(t * (n - 1))]
                if not (np.isfinite(px) and np.isfinite(py)):
                    continue
                row = int(np.clip(round((py - y[0]) / dy), 0, len(y) - 1))
                col = int(np.clip(round((px - x[0]) / dx), 0, len(x) - 1))
                if near_part[row, col]:
                    continue
                if all(np.hypot(px - qx, py - qy) >= min_gap for qx, qy in placed):
                    placed.append((px, py))
                    label = pg.TextItem(format_potential(level), color="#202020", anchor=(0.5, 0.5),
                                        fill=pg.mkBrush(255, 255, 255, 170))
                    label.setPos(QPointF(px, py))
                    self._add(label, 11)
                    break

    def _draw_field_lines(self, r, scale: float) -> None:
        if not r.field_lines:
            return
        xs = np.concatenate([line.points_m[:, 0] for line in r.field_lines]) / scale
        ys = np.concatenate([line.points_m[:, 1] for line in r.field_lines]) / scale
        connect = np.concatenate([np.r_[np.ones(len(line.points_m) - 1), 0] for line in r.field_lines])
        self._add(pg.PlotCurveItem(xs, ys, connect=connect.astype(bool), pen=pg.mkPen((20, 60, 20), width=1.3)), 12)

    def _draw_surface_charge(self, r, scale: float, n_bins: int = 48) -> None:
        mesh, sigma = r.solution.mesh, r.solution.surface_charge_density_C_per_m2
        factor, prefix = si_scale(np.max(np.abs(sigma)) or 1.0)
        values = sigma / factor
        limit = float(np.percentile(np.abs(values), 98)) or 1.0
        t = np.clip(0.5 + 0.5 * values / limit, 0, 1)
        bins = np.minimum((t * n_bins).astype(int), n_bins - 1)
        for b in np.unique(bins):
            sel = bins == b
            x = np.column_stack([mesh.starts[sel, 0], mesh.ends[sel, 0]]).ravel() / scale
            y = np.column_stack([mesh.starts[sel, 1], mesh.ends[sel, 1]]).ravel() / scale
            color = CHARGE_MAP.map((b + 0.5) / n_bins, mode="qcolor")
            self._add(pg.PlotCurveItem(x, y, connect="pairs", pen=pg.mkPen(color, width=5)), 30)
        self._colour_bar((-limit, limit), CHARGE_MAP, f"surface charge density ({prefix}C/m²)", 6)

    def _draw_hot_spots(self, r, scale: float) -> None:
        peaks = r.solution.peak_surface_fields
        if not peaks:
            return
        top = max(p.field_V_per_m for p in peaks)
        xs = [p.location_m[0] / scale for p in peaks]
        ys = [p.location_m[1] / scale for p in peaks]
        self._add(pg.ScatterPlotItem(xs, ys, symbol="star", size=16, pen=pg.mkPen("#000"),
                                     brush=pg.mkBrush(255, 215, 0)), 35)
        centre = 0.5 * (min(xs) + max(xs))
        (v0, v1), _ = self.plot.vb.viewRange()
        room = 0.3 * (v1 - v0)  # about the width of a label
        for p, x, y in zip(peaks, xs, ys):
            text = f"{p.conductor}: {format_field(p.field_V_per_m)}"
            if p.at_sharp_corner:
                text += " (sharp corner)"
            bold = p.field_V_per_m == top
            outward_left = x < centre
            if outward_left and x - room < v0:
                outward_left = False
            elif not outward_left and x + room > v1:
                outward_left = True
            label = pg.TextItem(text, color="#000000", anchor=(1.0 if outward_left else 0.0, 1.1),
                                fill=pg.mkBrush(255, 250, 205, 230), border=pg.mkPen("#8a6d00" if bold else "#bbbbbb"))
            label.setPos(QPointF(x, y))
            self._add(label, 36)
