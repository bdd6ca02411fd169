"""Tools that draw: rectangle, circle, tube, dielectric region, polygon, strip, ground plane,
and the probe line. Each turns one finished gesture into one edit of the document."""

from __future__ import annotations

import math

from PySide6.QtCore import Qt

from app import edits
from app.canvas.tool_base import XY, Tool
from app.document import PartRef
from solver import Circle, Polygon, Rectangle, Ring, Strip


class _DragTool(Tool):
    """Press, drag and release draws one shape."""

    def __init__(self, canvas) -> None:
        super().__init__(canvas)
        self._start: XY | None = None

    def make(self, a: XY, b: XY):
        raise NotImplementedError

    def press(self, pos, raw) -> bool:
        self._start = pos
        return True

    def move(self, pos, raw) -> None:
        if self._start is not None:
            self.canvas.show_preview(self.make(self._start, pos))

    def release(self, pos, raw) -> None:
        start, self._start = self._start, None
        self.canvas.show_preview(None)
        if start is None:
            return
        shape = self.make(start, pos)
        x0, y0, x1, y1 = shape.bounds()
        if not (x1 - x0 > 0 and y1 - y0 > 0):  # also catches the NaN bounds of an empty shape
            self.canvas.report_problem(f"Drag to give the {self.name} a size.")
            return
        self._add(shape, f"Draw {self.name}")

    def reset(self) -> None:
        self._start = None
        super().reset()


class RectangleTool(_DragTool):
    name, label = "rectangle", "Rectangle"
    hint = "Drag from one corner to the opposite corner. Type the corner radius in the properties."

    def make(self, a, b):
        return Rectangle.from_corners(a, b)


class CircleTool(_DragTool):
    name, label = "circle", "Circle"
    hint = "Drag from the centre outwards to set the radius."

    def make(self, a, b):
        return Circle.from_centre_and_edge(a, b)


class TubeTool(_DragTool):
    name, label = "tube", "Tube"
    hint = "Drag from the centre to the outer radius of a tube (a shield); type the inner radius in the properties."

    def make(self, a, b):
        outer = max(math.dist(a, b), 1e-12)
        return Ring(a, 0.85 * outer, outer)


class DielectricTool(_DragTool):
    name, label = "dielectric", "Dielectric region"
    hint = "Drag a rectangle of insulating material (FR-4 at first); choose the material or type εr in the properties."

    def make(self, a, b):
        return Rectangle.from_corners(a, b)

    def _add(self, shape, description: str) -> None:
        model, ref = edits.add_dielectric(self.doc.model, shape)
        if self.doc.apply(model, "Draw dielectric region"):
            self.doc.select(ref)


class _PointsTool(Tool):
    """Click points; double-click or Enter finishes; Esc or Backspace step back."""

    minimum = 2
    tracks_hover = True

    def __init__(self, canvas) -> None:
        super().__init__(canvas)
        self.points: list[XY] = []

    def make(self, points):
        raise NotImplementedError

    def press(self, pos, raw) -> bool:
        if not self.points or math.dist(self.points[-1], pos) > 0:
            self.points.append(pos)
        self._preview(pos)
        return True

    def move(self, pos, raw) -> None:
        if self.points:
            self._preview(pos)

    def _preview(self, pos) -> None:
        pts = self.points + [pos]
        self.canvas.show_preview(Strip(tuple(pts)) if len(pts) >= 2 else None)

    def double_click(self, pos, raw) -> bool:
        if not self.points or math.dist(self.points[-1], pos) > 0:
            self.points.append(pos)
        self.finish()
        return True

    def key(self, key) -> bool:
        if key in (Qt.Key_Return, Qt.Key_Enter):
            self.finish()
            return True
        if key == Qt.Key_Escape:
            self.reset()
            return True
        if key == Qt.Key_Backspace and self.points:
            self.points.pop()
            self.canvas.show_preview(Strip(tuple(self.points)) if len(self.points) >= 2 else None)
            return True
        return False

    def finish(self) -> None:
        pts = self.points
        self.points = []
        self.canvas.show_preview(None)
        if len(pts) < self.minimum:
            self.canvas.report_problem(f"A {self.name} needs at least {self.minimum} points; click them, then double-click.")
            return
        self._add(self.make(pts), f"Draw {self.name}")

    def reset(self) -> None:
        self.points = []
        super().reset()


class PolygonTool(_PointsTool):
    name, label, minimum = "polygon", "Polygon", 3
    hint = "Click each corner; double-click or press Enter to close. Backspace removes the last point."

    def make(self, points):
        return Polygon(tuple(points))


class StripTool(_PointsTool):
    name, label, minimum = "strip", "Thin strip", 2
    hint = "Click the points of a zero-thickness strip; double-click or Enter to finish."

    def make(self, points):
        return Strip(tuple(points))


class GroundPlaneTool(Tool):
    name, label = "ground plane", "Ground plane"
    hint = "Click at the height of an infinite grounded plane (0 V). Everything must lie above it."

    def press(self, pos, raw) -> bool:
        if self.doc.apply(edits.set_ground_plane(self.doc.model, pos[1]), "Place ground plane"):
            self.doc.select(PartRef("plane"))
        return True


class ProbeTool(Tool):
    name, label = "probe line", "Probe line"
    hint = "Drag a line to plot potential and field strength along it."

    def __init__(self, canvas) -> None:
        super().__init__(canvas)
        self._start: XY | None = None

    def press(self, pos, raw) -> bool:
        self._start = raw
        return True

    def move(self, pos, raw) -> None:
        if self._start is not None:
            self.canvas.show_probe(self._start, raw)

    def release(self, pos, raw) -> None:
        start, self._start = self._start, None
        if start is not None and math.dist(start, raw) > 0:
            self.canvas.show_probe(start, raw)
            self.canvas.probe_drawn.emit(start, raw)
