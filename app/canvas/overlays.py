"""Result layers on the drawing area: shading with its colour key, equipotentials, field lines,
surface charge density on the outlines, hot spots and a picked point.

Every layer is switchable; all positions are in model units; every colour is from
:mod:`app.colours`. The potential map is centred on 0 V (diverging), or sequential from 0 V
when all potentials share a sign. There is one colour key, in one place (:mod:`app.canvas.colour_key`):
the shading's, or the surface charge's when no shading shows; over a shading, surface charge is
drawn as sticks whose length gives σ (:mod:`app.canvas.charge_overlay`).
:meth:`Overlays.set_stale` dims the layers and the key when the model has changed since the solve.
"""

from __future__ import annotations

import math

import contourpy
import numpy as np
import pyqtgraph as pg
from PySide6.QtCore import QPointF, QTimer
from scipy import ndimage

import solver
from app import colours
from app.canvas import charge_overlay, labels
from app.canvas.colour_key import ColourKey
from app.canvas.detail_map import detail_axes
from app.canvas.shading import SHADINGS, shading_of
from app.jobs.figure_jobs import FigureJobRunner
from app.units import FIELD_FIGURES, format_field, format_plain, format_potential, si_scale

__all__ = ["SHADINGS", "Overlays"]

#: After the view stops changing (zoom, pan, resize) for this long, labels are placed again
#: for the new scale, ms.
RELABEL_DELAY_MS = 200

#: Room kept free around a hot-spot label, screen pixels.
LABEL_MARGIN_PX = 4



class Overlays:
    """Owns the result items drawn on a PlotItem."""

    def __init__(self, plot_item: pg.PlotItem) -> None:
        self.plot = plot_item
        self.results = None
        self.peak_digits: dict[str, int] = {}
        self.shading = "potential"
        self.show = {"equipotentials": True, "field lines": False, "surface charge": False, "hot spots": True}
        self._items: list = []
        self.key = ColourKey(plot_item, 5)  # the one key: shading, or surface charge when there is no shading
        self._notes: list = []  # text fixed on the screen (the scale of the surface-charge sticks)
        self._marker = pg.ScatterPlotItem(symbol="o", size=18, pen=pg.mkPen(colours.SELECTION, width=2.5),
                                          brush=pg.mkBrush(None))
        self._marker.setZValue(90)
        self.plot.addItem(self._marker)
        self.stale = False
        self._label_boxes: list = []
        self.leaders: list = []
        self._leader_segments: list = []
        self._mask: labels.PartMask | None = None
        self._detail = None  # a finer map of the framed view (app.canvas.detail_map), for self.results
        self.detail_runner = FigureJobRunner(plot_item)
        self.detail_runner.result_ready.connect(self._on_detail_ready)
        self._detail_for = None  # the results the running detail job belongs to
        self._drawn_view: tuple | None = None  # the view the labels were placed for
        self._relabel_timer = QTimer(plot_item.vb)  # goes with the view: never fires on a deleted one
        self._relabel_timer.setSingleShot(True)
        self._relabel_timer.setInterval(RELABEL_DELAY_MS)
        self._relabel_timer.timeout.connect(self._on_view_settled)
        plot_item.vb.sigRangeChanged.connect(lambda *_: self._relabel_timer.start())
        plot_item.vb.sigResized.connect(lambda *_: self._relabel_timer.start())

    def _view_key(self) -> tuple:
        (v0, v1), (w0, w1) = self.plot.vb.viewRange()
        return v0, v1, w0, w1, self.plot.vb.width(), self.plot.vb.height()

    def _on_view_settled(self) -> None:
        """Labels are sized in pixels and placed in model units: after a zoom, pan or resize
        they are placed again (labels kept apart and in view at the new scale)."""
        if self.results is None or self._drawn_view is None:
            return
        old, new = np.array(self._drawn_view), np.array(self._view_key())
        span = max(abs(old[1] - old[0]), abs(old[3] - old[2]), 1e-300)
        if np.any(np.abs(new[:4] - old[:4]) > 1e-3 * span) or np.any(np.abs(new[4:] - old[4:]) > 0.5):
            self.redraw()

    # ---- public ----------------------------------------------------------------------------
    def set_peak_digits(self, digits: dict[str, int]) -> None:
        """Figures each conductor's refined peak supports (the High voltage table's); a peak
        label shows at most 3 (as the summary and the status bar), fewer when the estimate
        supports fewer, so a peak known to 2 figures reads "71 kV/m" on the drawing and in the
        table alike."""
        if digits != self.peak_digits:
            self.peak_digits = dict(digits)
            self.redraw()

    def set_results(self, results) -> None:
        self.results = results
        self.peak_digits = {}  # until the refined peaks of this solve say otherwise
        self.stale = False
        self._detail = None
        self._start_detail(results)
        self.redraw()

    def clear(self) -> None:
        self.results = None
        self._detail = None
        self.detail_runner.cancel()
        self.redraw()

    def _start_detail(self, results) -> None:
        """A finer map over the framed view when the parts there are small against the map's
        cells, computed in the background once the solve is complete (not while dragging)."""
        self.detail_runner.cancel()
        self._detail_for = None
        if results.grid is None or not results.complete:
            return
        axes = detail_axes(results.model, results.grid.x_m, results.grid.y_m)
        if axes is not None:
            self._detail_for = results
            self.detail_runner.start(solver.evaluate_on_grid, results.solution, *axes)

    def _on_detail_ready(self, grid) -> None:
        if self._detail_for is self.results and self.results is not None:
            self._detail = grid
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
        for note in self._notes:
            note.setOpacity(0.3 if stale else 1.0)
        self.key.set_stale(stale)

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
        self._items = []
        self.key.blank()
        for note in self._notes:
            note.setParentItem(None)
            if note.scene() is not None:
                note.scene().removeItem(note)
        self._notes = []
        self._label_boxes: list = []  # labels placed so far, kept apart (app.canvas.labels)
        self.leaders: list = []  # (hot-spot label, its leader line) for labels away from their star
        self._leader_segments: list = []  # the same lines as segments, kept clear by later labels
        r = self.results
        if r is None:
            return
        scale = r.model.metres_per_unit
        self._mask = None if r.grid is None else labels.PartMask(
            r.grid.x_m / scale, r.grid.y_m / scale, ~np.isfinite(r.grid.potential_V))
        if r.grid is not None and self.shading != "none":
            self._draw_shading(r.grid, scale)
        if self.show["hot spots"]:  # first: their labels matter most, the others keep clear of them
            self._draw_hot_spots(r, scale)
        if r.grid is not None and self.show["equipotentials"]:
            self._draw_equipotentials(r.grid, scale)
        if self.show["field lines"]:
            self._draw_field_lines(r, scale)
        if self.show["surface charge"]:
            self._draw_surface_charge(r, scale)
        self.set_stale(self.stale)
        self._drawn_view = self._view_key()

    def _units_per_pixel(self) -> tuple[float, float]:
        """Model units per screen pixel, across and up, in the current view."""
        (v0, v1), (w0, w1) = self.plot.vb.viewRange()
        return (v1 - v0) / max(self.plot.vb.width(), 1.0), (w1 - w0) / max(self.plot.vb.height(), 1.0)

    def _draw_shading(self, grid, scale: float) -> None:
        shading = shading_of(self.shading, grid, self.results.solution.conductor_potentials_V)
        if shading is None:
            return
        self._add(shading.image(grid, scale), 1)
        if self._detail is not None:  # the finer map over the framed view, on the same levels
            self._add(shading.image(self._detail, scale), 1.5)
        self.key.show(shading.lo, shading.hi, shading.cmap, shading.label, shading.ticks)

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
        pen = pg.mkPen(colours.EQUIPOTENTIAL, width=1)
        px, py = self._units_per_pixel()
        # contourpy (compiled marching squares): some 30 times faster than pyqtgraph's isocurve,
        # which was half the drawing time of a drag step
        contours = contourpy.contour_generator(z=phi, line_type=contourpy.LineType.Separate)
        for k, level in enumerate(levels):
            longest = None
            for line in contours.lines(level):
                cols_f, rows_f = np.asarray(line, dtype=float).T
                xs, ys = x[0] + cols_f * dx, y[0] + rows_f * dy
                # The filled-in values only steady the contouring: no line where there is no field.
                rows = np.clip(np.rint(rows_f).astype(int), 0, len(y) - 1)
                cols = np.clip(np.rint(cols_f).astype(int), 0, len(x) - 1)
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
            text = format_potential(level).replace("-", "−")
            size = labels.label_size(text, px, py)
            for t in ((0.5 + 0.382 * k + 0.05 * j) % 1.0 for j in range(20)):
                lx, ly = float(longest[0][int(t * (n - 1))]), float(longest[1][int(t * (n - 1))])
                if not (math.isfinite(lx) and math.isfinite(ly)):
                    continue
                # plain min/max: this loop runs for every candidate place, where np.clip's
                # per-call cost once took a sixth of the drawing time
                row = min(max(round((ly - y[0]) / dy), 0), len(y) - 1)
                col = min(max(round((lx - x[0]) / dx), 0), len(x) - 1)
                if near_part[row, col]:
                    continue
                box = labels.centred_box(lx, ly, *size)
                if (not any(labels.overlap(box, other) for other in self._label_boxes) and not self._mask.covers(box)
                        and not any(labels.segment_crosses(seg, box) for seg in self._leader_segments)):
                    self._label_boxes.append(box)
                    label = pg.TextItem(text, color=colours.TEXT, anchor=(0.5, 0.5),
                                        fill=pg.mkBrush(*colours.LABEL_FILL))
                    label.setPos(QPointF(lx, ly))
                    self._add(label, 11)
                    break

    def _draw_field_lines(self, r, scale: float) -> None:
        if not r.field_lines:
            return
        xs = np.concatenate([line.points_m[:, 0] for line in r.field_lines]) / scale
        ys = np.concatenate([line.points_m[:, 1] for line in r.field_lines]) / scale
        connect = np.concatenate([np.r_[np.ones(len(line.points_m) - 1), 0] for line in r.field_lines])
        self._add(pg.PlotCurveItem(xs, ys, connect=connect.astype(bool), pen=pg.mkPen(colours.FIELD_LINE, width=1.2)), 12)

    def _draw_surface_charge(self, r, scale: float) -> None:
        """Colour strips read off the one key when no shading shows; over a shading (which holds
        the key) sticks whose length gives σ, with their scale in a note (app.canvas.charge_overlay)."""
        mesh, sigma = r.solution.mesh, r.solution.surface_charge_density_C_per_m2
        if self.key.shown:
            items, note = charge_overlay.charge_sticks(mesh, sigma, scale, max(self._units_per_pixel()))
            for item in items:
                self._add(item, 30)
            self._show_note(note)
            return
        items, limit, prefix = charge_overlay.charge_strips(mesh, sigma, scale)
        for item in items:
            self._add(item, 30)
        self.key.show(-limit, limit, charge_overlay.CHARGE_MAP, f"surface charge density ({prefix}C/m²)")

    def _show_note(self, text: str) -> None:
        """A line of text at the top left of the drawing area, fixed on the screen."""
        note = pg.TextItem(text, color=colours.TEXT, fill=pg.mkBrush(*colours.LABEL_FILL), anchor=(0, 0))
        note.setParentItem(self.plot.vb)  # the view box itself, not its data group: pixels, not model units
        note.setPos(6, 4)
        note.setZValue(95)
        self._notes.append(note)

    def _draw_hot_spots(self, r, scale: float) -> None:
        peaks = r.solution.peak_surface_fields
        if not peaks:
            return
        top = max(p.field_V_per_m for p in peaks)
        xs = [p.location_m[0] / scale for p in peaks]
        ys = [p.location_m[1] / scale for p in peaks]
        self._add(pg.ScatterPlotItem(xs, ys, symbol="star", size=17, pen=pg.mkPen(colours.HOT_SPOT_RIM, width=1.5),
                                     brush=pg.mkBrush(colours.HOT_SPOT_FILL)), 35)
        (v0, v1), (w0, w1) = self.plot.vb.viewRange()
        px, py = self._units_per_pixel()
        order = sorted(range(len(peaks)), key=lambda k: -peaks[k].field_V_per_m)
        star = 18  # px: no label, of any layer, covers a star
        self._label_boxes += [labels.centred_box(x, y, star * px, star * py) for x, y in zip(xs, ys)]
        leader_segments = self._leader_segments
        for k in order:
            p, x, y = peaks[k], xs[k], ys[k]
            digits = self.peak_digits.get(p.conductor)
            # the summary's and status bar's 3 figures, fewer where the refined peak's estimate
            # supports fewer (then the High voltage table shows that many too)
            field = (format_field(p.field_V_per_m) if digits is None
                     else _field_to(p.field_V_per_m, min(FIELD_FIGURES, digits)))
            text = f"{p.conductor}: {field}" + (" (sharp corner)" if p.at_sharp_corner else "")
            bold = p.field_V_per_m == top
            label = pg.TextItem(text, color=colours.TEXT, fill=pg.mkBrush(*colours.LABEL_FILL),
                                border=pg.mkPen(colours.TEXT if bold else colours.TEXT_MUTED, width=1.5 if bold else 1))
            rect = label.textItem.boundingRect()  # the text as drawn, not a guess from its length
            w, h = (rect.width() + 4) * px, (rect.height() + 2) * py
            others = [(xs[j], ys[j]) for j in range(len(peaks)) if j != k]
            anchor, box = labels.free_place(x, y, w, h, 10 * px, 10 * py, self._label_boxes, (v0, v1, w0, w1),
                                            self._mask, leaders=leader_segments, others=others)
            # kept clear with a margin: its frame is drawn just outside the box, and labels placed
            # later (equipotentials) size themselves from an estimate of their text
            self._label_boxes.append(labels.grown(box, LABEL_MARGIN_PX * px, LABEL_MARGIN_PX * py))
            label.setAnchor(anchor)
            label.setPos(QPointF(*labels.anchor_point(box, anchor)))
            self._add(label, 36)
            leader = labels.leader_line(x, y, box, 10 * px, 10 * py)
            if leader is not None:  # stacked away or moved into view: a thin line says whose it is
                leader_segments.append(leader)
                (xa, ya), (xb, yb) = leader
                line = pg.PlotCurveItem([xa, xb], [ya, yb], pen=pg.mkPen(colours.LABEL_LEADER, width=1.5))
                self._add(line, 34)  # under the star, which it leaves from, and under the label
                self.leaders.append((label, line))



def _field_to(value_V_per_m: float, digits: int) -> str:
    """A field with an SI prefix to ``digits`` figures without exponent ("150 kV/m" at 2 figures,
    where the engineering form would read "1.5e+02 kV/m"), as the High voltage table writes it."""
    factor, prefix = si_scale(value_V_per_m)
    return f"{format_plain(value_V_per_m / factor, digits)} {prefix}V/m"
