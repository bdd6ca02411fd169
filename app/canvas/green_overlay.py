"""Map overlay of the Green's function with pole at infinity of a chosen conductor.

For the named conductors taken alone (tied together when there are several), the solver's
equilibrium charge gives g(z) (:func:`solver.cross_check.green_function_on_grid`): 0 on the
conductor, ln(|z - c| / a) + o(1) far away, with a the equivalent radius and c the centre of
the charge. The overlay draws

- contours of g, labelled with their value: near the conductor they follow its shape, farther
  out they round off into circles — the shape is forgotten with distance;
- the equivalent round wire (radius a, about c), dotted;
- the circle beyond which the conductor looks like that round wire to within 1 %
  (:func:`solver.cross_check.round_wire_distance_m`), dashed, with its radius.

:func:`green_map` gathers the numbers (Qt-free; every number is the solver's);
:class:`GreenOverlay` draws them on the canvas's plot. The computation runs in a worker thread
(:class:`app.jobs.study_runner.StudyRunner`); the overlay is cleared when the drawing changes.
"""

from __future__ import annotations

import math
from collections.abc import Sequence
from dataclasses import dataclass

import contourpy
import numpy as np
import pyqtgraph as pg
from PySide6.QtCore import QObject, QPointF, Qt, Signal

from app import colours
from app.jobs.study_runner import StudyRunner
from app.units import format_percent, format_plain
from solver import Model, equilibrium_charge
from solver.cross_check import green_function_on_grid, robin_constant, round_wire_distance_m
from solver.cross_check.robin import ROUND_WIRE_TOLERANCE, charge_centre_m

#: The map extends this far beyond the 1 % circle.
MARGIN = 1.25
#: Contour labels: along the ray at this angle from the charge centre (rad), at least this
#: fraction of the map's width apart.
LABEL_ANGLE, LABEL_GAP = math.pi / 4, 0.06


@dataclass(frozen=True)
class GreenMap:
    """The Green's function of some conductors on a grid, in model units.

    Attributes
    ----------
    names : the conductors (tied together)
    x, y : (nx,), (ny,) grid coordinates, model units
    g : (ny, nx) Green's function, dimensionless; NaN inside the conductors
    centre : (2,) centre of the equilibrium charge, model units
    equivalent_radius : equivalent radius a, model units
    round_wire_distance : distance from the centre beyond which the conductor looks like the
        round wire to within ``tolerance`` (model units; inf when not reached)
    robin_constant : -ln(a / unit), for the model's unit
    tolerance : relative tolerance of ``round_wire_distance``
    unit : the model's length unit
    """

    names: tuple[str, ...]
    x: np.ndarray
    y: np.ndarray
    g: np.ndarray
    centre: np.ndarray
    equivalent_radius: float
    round_wire_distance: float
    robin_constant: float
    tolerance: float
    unit: str


def green_map(model: Model, names: Sequence[str], n_grid: int = 121) -> GreenMap:
    """The :class:`GreenMap` of ``names`` of ``model`` on an ``n_grid`` square grid that holds
    the 1 % circle (or the conductor's surroundings when the circle is not reached)."""
    scale = model.metres_per_unit
    eq = equilibrium_charge(model, list(names))
    centre_m = charge_centre_m(eq)
    reach_m = round_wire_distance_m(eq, ROUND_WIRE_TOLERANCE)
    pts = np.vstack([eq.mesh.starts, eq.mesh.ends])
    size_m = float(np.max(np.hypot(*(pts - centre_m).T)))
    half_m = MARGIN * (reach_m if math.isfinite(reach_m) else 20 * size_m)
    half_m = max(half_m, 2.0 * size_m)
    x_m = centre_m[0] + np.linspace(-half_m, half_m, n_grid)
    y_m = centre_m[1] + np.linspace(-half_m, half_m, n_grid)
    g = green_function_on_grid(eq, x_m, y_m)
    return GreenMap(tuple(names), x_m / scale, y_m / scale, g, centre_m / scale, eq.equivalent_radius_m / scale,
                    reach_m / scale, robin_constant(eq.equivalent_radius_m, scale), ROUND_WIRE_TOLERANCE, model.unit)


def contour_levels(g: np.ndarray, count: int = 8) -> np.ndarray:
    """Round contour values between 0 and the smallest g on the map's edge (where every contour closes)."""
    edge = np.concatenate([g[0], g[-1], g[:, 0], g[:, -1]])
    top = float(np.nanmin(edge))
    if not (math.isfinite(top) and top > 0):
        return np.array([])
    step = top / count
    power = 10.0 ** math.floor(math.log10(step))
    step = next(m * power for m in (1, 2, 2.5, 5, 10) if m * power >= step)
    return np.arange(1, math.floor(top / step) + 1) * step


def _circle(centre, radius: float, n: int = 181) -> tuple[np.ndarray, np.ndarray]:
    t = np.linspace(0.0, 2 * math.pi, n)
    return centre[0] + radius * np.cos(t), centre[1] + radius * np.sin(t)


class GreenOverlay(QObject):
    """Draws a :class:`GreenMap` on ``plot_item``; :meth:`show_for` computes one in the background."""

    shown = Signal(object)  # the GreenMap drawn
    failed = Signal(str)
    cleared = Signal()

    def __init__(self, plot_item: pg.PlotItem, parent: QObject | None = None) -> None:
        super().__init__(parent)
        self.plot = plot_item
        self.map: GreenMap | None = None
        self.items: list = []
        self.runner = StudyRunner(self)
        self.runner.finished.connect(self._on_computed)
        self.runner.failed.connect(self._on_failed)
        self._wanted = 0  # the request whose map may be drawn; older results are dropped
        self._pending: tuple[int, Model, tuple[str, ...]] | None = None

    def show_for(self, model: Model, names: Sequence[str]) -> None:
        """Compute the map of ``names`` (tied together) and draw it when ready; a request made
        while another is computing replaces it."""
        self.clear()
        self._pending = (self._wanted, model, tuple(names))
        if not self.runner.is_busy:
            self._start_pending()

    def _start_pending(self) -> None:
        if self._pending is None:
            return
        token, model, names = self._pending
        self._pending = None
        self.runner.start(lambda progress, cancel: (token, green_map(model, names)))

    def _on_computed(self, result) -> None:
        token, m = result
        if token == self._wanted:
            self.draw(m)
        self._start_pending()

    def _on_failed(self, message: str) -> None:
        if self._pending is None:
            self.failed.emit(message)
        self._start_pending()

    def clear(self) -> None:
        """Remove the overlay; a map still being computed will not be drawn."""
        self._wanted += 1
        self._pending = None
        for item in self.items:
            self.plot.removeItem(item)
        self.items, self.map = [], None
        self.cleared.emit()

    def _add(self, item, z: float = 30) -> None:
        item.setZValue(z)
        self.plot.addItem(item)
        self.items.append(item)

    def draw(self, m: GreenMap) -> None:
        for item in self.items:
            self.plot.removeItem(item)
        self.items, self.map = [], m
        dx, dy = m.x[1] - m.x[0], m.y[1] - m.y[0]
        inside = ~np.isfinite(m.g)
        filled = np.where(inside, 0.0, m.g)  # g is 0 on and inside the conductor
        pen = pg.mkPen(colours.CONSTRUCTION, width=1.2)  # solid: contours
        min_gap = LABEL_GAP * (m.x[-1] - m.x[0])
        placed: list[np.ndarray] = []
        contours = contourpy.contour_generator(z=filled, line_type=contourpy.LineType.Separate)
        for level in contour_levels(m.g):
            longest = None
            for line in contours.lines(level):
                cols, rows = np.asarray(line, dtype=float).T  # in sample steps
                xs, ys = m.x[0] + cols * dx, m.y[0] + rows * dy
                self._add(pg.PlotCurveItem(xs, ys, pen=pen))
                longest = (xs, ys) if longest is None or len(xs) > len(longest[0]) else longest
            if longest is None:
                continue
            # labels sit along one ray from the centre (up and to the right), spaced apart
            angle = np.arctan2(longest[1] - m.centre[1], longest[0] - m.centre[0])
            k = int(np.argmin(np.abs(np.angle(np.exp(1j * (angle - LABEL_ANGLE))))))
            at = np.array([longest[0][k], longest[1][k]])
            if all(np.hypot(*(at - p)) >= min_gap for p in placed):
                placed.append(at)
                label = pg.TextItem(f"g = {format_plain(level, 4)}", color=colours.TEXT, anchor=(0, 1),
                                    fill=pg.mkBrush(*colours.LABEL_FILL))
                label.setPos(QPointF(*at))
                self._add(label, 31)
        wx, wy = _circle(m.centre, m.equivalent_radius)
        self._add(pg.PlotCurveItem(wx, wy, pen=pg.mkPen(colours.CONSTRUCTION, width=1.5, style=Qt.DotLine)), 32)
        self._add(pg.ScatterPlotItem([m.centre[0]], [m.centre[1]], symbol="+", size=12,
                                     pen=pg.mkPen(colours.CONSTRUCTION, width=1.5)), 32)
        if math.isfinite(m.round_wire_distance):
            rx, ry = _circle(m.centre, m.round_wire_distance)
            self._add(pg.PlotCurveItem(rx, ry, pen=pg.mkPen(colours.CONSTRUCTION, width=2, style=Qt.DashLine)), 33)
            text = f"round wire within {format_percent(m.tolerance, 2)} beyond {format_plain(m.round_wire_distance, 4)} {m.unit}"
            label = pg.TextItem(text, color=colours.TEXT, anchor=(0.5, 1.0), fill=pg.mkBrush(*colours.LABEL_FILL),
                                border=pg.mkPen(colours.TEXT_MUTED))
            label.setPos(QPointF(m.centre[0], m.centre[1] + m.round_wire_distance))
            self._add(label, 34)
        self.shown.emit(m)

    def view_range(self) -> tuple[tuple[float, float], tuple[float, float]] | None:
        """(x range, y range) that shows the whole map, or None."""
        if self.map is None:
            return None
        return (float(self.map.x[0]), float(self.map.x[-1])), (float(self.map.y[0]), float(self.map.y[-1]))
