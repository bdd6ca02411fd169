"""The drawing area: the cross-section in model units, with grid, rulers, tools and overlays.

The canvas redraws the parts from the document on ``model_changed`` and shows the selection
on ``selection_changed``. Mouse gestures go to the current tool (see :mod:`app.canvas.tools`); the
middle or right button, the wheel and dragging empty space with the pick tool pan and zoom.
"""

from __future__ import annotations

import math

import numpy as np
import pyqtgraph as pg
from PySide6.QtCore import Qt, Signal
from shapely.geometry import Point

from app import colours
from app.canvas.drawing import cosmetic_pen, dielectric_item, shape_item, style_axes
from app.canvas.error_marks import ErrorMarks
from app.canvas.overlays import Overlays
from app.canvas.tools import TOOLS, PickTool
from app.document import PartRef
from app.framing import framing_box
from solver import DRAWING_ARC_STEP_RAD

pg.setConfigOptions(imageAxisOrder="row-major", antialias=True)


def nice_step(span: float, divisions: int = 40) -> float:
    """A 1-2-5 step near ``span / divisions``."""
    raw = max(span / divisions, 1e-12)
    base = 10 ** math.floor(math.log10(raw))
    for m in (1, 2, 5, 10):
        if m * base >= raw:
            return m * base
    return 10 * base


class Canvas(pg.PlotWidget):
    """The cross-section view; ``document`` is an :class:`app.document.Document`."""

    cursor_moved = Signal(float, float)
    probe_drawn = Signal(object, object)
    boundary_point_picked = Signal(int)
    problem_reported = Signal(str)
    tool_changed = Signal(str)
    #: While the mouse drags a part or a handle: the drawing as it would be on release
    #: (not yet an edit of the document), for live solving.
    part_dragged = Signal(object)
    #: The mouse released a drag (the edit, if any, has been applied).
    drag_finished = Signal()

    def __init__(self, document, parent=None) -> None:
        super().__init__(parent, background=colours.PAGE)
        self.document = document
        self.snap_enabled = True
        self.results = None
        self.setFocusPolicy(Qt.StrongFocus)
        self.setMouseTracking(True)
        self.plotItem.setAspectLocked(True)
        self.plotItem.showGrid(x=True, y=True, alpha=0.18)
        self.plotItem.hideButtons()
        style_axes(self.plotItem)
        self.plotItem.setMenuEnabled(False)
        self._part_items: list = []
        self._preview_item = None
        self._plane_preview = None
        self._handles = pg.ScatterPlotItem(symbol="s", size=9, pen=pg.mkPen(colours.SELECTION),
                                            brush=pg.mkBrush(colours.PAGE))
        self._handles.setZValue(50)
        self.addItem(self._handles)
        self._probe = pg.PlotDataItem(pen=pg.mkPen(colours.PROBE, width=1.2), symbol=["o", "s"], symbolSize=8,
                                      symbolPen=pg.mkPen(colours.PAGE), symbolBrush=pg.mkBrush(colours.PROBE))
        self._probe.setZValue(40)
        self.addItem(self._probe)
        self.overlays = Overlays(self.plotItem)
        self.tools = {cls.name: cls(self) for cls in TOOLS}
        self.tool = self.tools[PickTool.name]
        self._mouse_down = False
        self._outlines: dict = {}  # PartRef -> shapely outline of the drawn model, for hit tests
        self._outlines_model = None  # the Model those outlines belong to
        self._fitted_once = False
        self.error_marks = ErrorMarks(self.plotItem, document)
        document.events.connect("model_changed", self._on_model_changed)
        document.events.connect("selection_changed", self._on_selection_changed)
        self._on_model_changed(document.model)
        self.fit_view()

    # ---- view ------------------------------------------------------------------------------
    def set_unit_labels(self, unit: str) -> None:
        self.plotItem.setLabel("bottom", f"x ({unit})")
        self.plotItem.setLabel("left", f"y ({unit})")

    def fit_view(self) -> None:
        """Frame the conductors and the dielectrics around them (:func:`framing_box`)."""
        from app.jobs.results import view_box

        box = framing_box(self.document.model) or view_box(self.document.model, 0.2)
        x0, y0, x1, y1 = box
        self.plotItem.vb.setRange(xRange=(x0, x1), yRange=(y0, y1), padding=0.0)

    def bring_into_view(self, x: float, y: float, box=None) -> None:
        """Pan so that the point is in view, or that ``box`` (xmin, ymin, xmax, ymax) is when none of
        it is (zooming out only when the box is larger than the view)."""
        (vx0, vx1), (vy0, vy1) = self.plotItem.vb.viewRange()
        bx0, by0, bx1, by1 = box if box is not None else (x, y, x, y)
        overlaps = bx0 <= vx1 and bx1 >= vx0 and by0 <= vy1 and by1 >= vy0
        inside = vx0 < bx0 and bx1 < vx1 and vy0 < by0 and by1 < vy1
        if inside if box is None else overlaps:
            return  # a box partly in view, or a point in view, stays where it is
        cx, cy = 0.5 * (bx0 + bx1), 0.5 * (by0 + by1)
        w, h = max(vx1 - vx0, 1.2 * (bx1 - bx0)), max(vy1 - vy0, 1.2 * (by1 - by0))
        self.plotItem.vb.setRange(xRange=(cx - w / 2, cx + w / 2), yRange=(cy - h / 2, cy + h / 2), padding=0.0)

    def follow_selection(self) -> None:
        """Bring the selected part into view when an edit (typed coordinates) moved it out."""
        ref = self.document.selection
        if ref is None or ref.kind == "plane" or self._mouse_down:
            return
        from app.edits import shape_of

        try:
            box = shape_of(self.document.model, ref).bounds()
        except (IndexError, AttributeError):
            return
        self.bring_into_view(0.0, 0.0, box)

    def showEvent(self, event) -> None:
        super().showEvent(event)
        if not self._fitted_once:  # the first time only: the size is known now
            self._fitted_once = True
            self.fit_view()

    def snap_step(self) -> float:
        (x0, x1), _ = self.plotItem.vb.viewRange()
        return nice_step(x1 - x0)

    def snap(self, x: float, y: float) -> tuple[float, float]:
        if not self.snap_enabled:
            return (x, y)
        s = self.snap_step()
        return (round(round(x / s) * s, 12), round(round(y / s) * s, 12))

    def pixel_size(self) -> float:
        (x0, x1), _ = self.plotItem.vb.viewRange()
        return (x1 - x0) / max(self.plotItem.vb.width(), 1.0)

    def set_tool(self, name: str) -> None:
        self.tool.reset()
        self.tool = self.tools[name]
        self.setCursor(Qt.ArrowCursor if name == PickTool.name else Qt.CrossCursor)
        self.tool_changed.emit(name)

    # ---- parts -----------------------------------------------------------------------------
    def _on_model_changed(self, model) -> None:
        for item in self._part_items:
            self.plotItem.removeItem(item)
        self._part_items = []
        self.set_unit_labels(model.unit)
        selected = self.document.selection
        for i, d in enumerate(model.dielectrics):
            for j, s in enumerate(d.shapes):
                item = dielectric_item(s, d.eps_r, f"Dielectric '{d.name}', shape {j + 1} ({s.kind})")
                if selected == PartRef("dielectric", i, j):
                    item.setPen(cosmetic_pen(colours.SELECTION, 2.5))
                self._add_part(item, 5)
        for i, c in enumerate(model.conductors):
            for j, s in enumerate(c.shapes):
                sel = selected == PartRef("conductor", i, j)
                self._add_part(shape_item(s, colours.display_colour(c, i), selected=sel,
                                          where=f"Conductor '{c.name}', shape {j + 1} ({s.kind})"), 20)
        if model.ground_plane is not None:
            sel = selected == PartRef("plane")
            line = pg.InfiniteLine(pos=model.ground_plane.y, angle=0,
                                   pen=cosmetic_pen(colours.SELECTION if sel else colours.EARTH, 4 if sel else 3))
            below = pg.LinearRegionItem(values=(model.ground_plane.y - 1e6, model.ground_plane.y),
                                        orientation="horizontal", movable=False,
                                        brush=pg.mkBrush(*colours.EARTH_FILL), pen=pg.mkPen(None))
            pg.InfLineLabel(line, text="ground plane, 0 V", position=0.08, color=colours.TEXT,
                            anchors=[(0, 1), (0, 1)])  # child of line
            self._add_part(below, 4)
            self._add_part(line, 21)
        self._update_handles()
        self.follow_selection()

    def _add_part(self, item, z: float) -> None:
        item.setZValue(z)
        self.plotItem.addItem(item)
        self._part_items.append(item)

    def _on_selection_changed(self, ref) -> None:
        self._on_model_changed(self.document.model)

    def _update_handles(self) -> None:
        ref = self.document.selection
        if ref is None or ref.kind == "plane":
            self._handles.setData([], [])
            return
        from app.edits import shape_of

        pts = np.asarray(shape_of(self.document.model, ref).handles())
        self._handles.setData(pts[:, 0], pts[:, 1])

    def _part_outlines(self, model) -> dict:
        """Outline of every conductor and dielectric shape, built once per Model (the pointer
        asks on every move; Models are immutable, so an unchanged model keeps its outlines)."""
        if self._outlines_model is not model:
            self._outlines = {
                **{PartRef("conductor", i, j): _outline_or_none(s)
                   for i, c in enumerate(model.conductors) for j, s in enumerate(c.shapes)},
                **{PartRef("dielectric", i, j): _outline_or_none(s)
                   for i, d in enumerate(model.dielectrics) for j, s in enumerate(d.shapes)},
            }
            self._outlines_model = model
        return self._outlines

    def part_at(self, raw) -> PartRef | None:
        """The part under the point (conductors first, then the ground plane), or None."""
        model = self.document.model
        outlines = self._part_outlines(model)
        point = Point(*raw)
        tol = 6 * self.pixel_size()
        best, best_d = None, tol
        for i, c in enumerate(model.conductors):
            for j, s in enumerate(c.shapes):
                d = _distance(outlines[PartRef("conductor", i, j)], s, point)
                if d <= best_d:
                    best, best_d = PartRef("conductor", i, j), d
                    if d == 0:
                        return best
        if best is None and model.ground_plane is not None and abs(raw[1] - model.ground_plane.y) <= tol:
            return PartRef("plane")
        if best is None:
            for i, d in enumerate(model.dielectrics):
                for j, s in enumerate(d.shapes):
                    if _distance(outlines[PartRef("dielectric", i, j)], s, point) <= tol:
                        return PartRef("dielectric", i, j)
        return best

    def handle_at(self, raw) -> int | None:
        """Index of the selected shape's handle under the point, or None."""
        ref = self.document.selection
        if ref is None or ref.kind == "plane":
            return None
        from app.edits import shape_of

        pts = np.asarray(shape_of(self.document.model, ref).handles())
        d = np.hypot(pts[:, 0] - raw[0], pts[:, 1] - raw[1])
        i = int(np.argmin(d))
        return i if d[i] <= 7 * self.pixel_size() else None

    # ---- previews and markers --------------------------------------------------------------
    def show_preview(self, shape, plane_y=None) -> None:
        for item in (self._preview_item, self._plane_preview):
            if item is not None:
                self.plotItem.removeItem(item)
        self._preview_item = self._plane_preview = None
        if shape is not None:
            self._preview_item = shape_item(shape, colours.PREVIEW, alpha=60, dashed=True)
            self._preview_item.setZValue(60)
            self.plotItem.addItem(self._preview_item)
        if plane_y is not None:
            self._plane_preview = pg.InfiniteLine(pos=plane_y, angle=0, pen=cosmetic_pen(colours.PREVIEW, 2, Qt.DashLine))
            self.plotItem.addItem(self._plane_preview)

    def show_probe(self, a, b) -> None:
        self._probe.setData([a[0], b[0]], [a[1], b[1]])

    def clear_probe(self) -> None:
        self._probe.setData([], [])

    def report_problem(self, message: str) -> None:
        self.problem_reported.emit(message)

    def show_errors(self, names: list[str], message: str) -> None:
        """Mark the named conductors and put the message next to the first of them."""
        self.error_marks.show(names, message)

    def clear_errors(self) -> None:
        self.error_marks.clear()

    def boundary_pick(self, raw) -> None:
        """With results, find the boundary panel nearest the point and report it."""
        if self.results is None:
            return
        mesh = self.results.solution.mesh
        scale = self.results.model.metres_per_unit
        mids = mesh.midpoints / scale
        d = np.hypot(mids[:, 0] - raw[0], mids[:, 1] - raw[1])
        i = int(np.argmin(d))
        if d[i] <= 8 * self.pixel_size():
            self.overlays.mark_point(mids[i])
            self.boundary_point_picked.emit(i)

    # ---- mouse and keys --------------------------------------------------------------------
    def _model_pos(self, event) -> tuple[float, float]:
        p = self.plotItem.vb.mapSceneToView(self.mapToScene(event.position().toPoint()))
        return (float(p.x()), float(p.y()))

    def mousePressEvent(self, event) -> None:
        if event.button() == Qt.LeftButton:
            raw = self._model_pos(event)
            if self.tool.press(self.snap(*raw), raw):
                self._mouse_down = True
                event.accept()
                return
        super().mousePressEvent(event)

    def mouseMoveEvent(self, event) -> None:
        raw = self._model_pos(event)
        self.cursor_moved.emit(*raw)
        if not self._mouse_down and self.tool is self.tools[PickTool.name]:
            # show what a press would grab: a handle, a part, or empty space (pan)
            shape = (Qt.SizeFDiagCursor if self.handle_at(raw) is not None
                     else Qt.SizeAllCursor if self.part_at(raw) is not None else Qt.ArrowCursor)
            if self.cursor().shape() != shape:
                self.setCursor(shape)
        if self._mouse_down or self.tool.tracks_hover:
            self.tool.move(self.snap(*raw), raw)
            if self._mouse_down:
                event.accept()
                return
        super().mouseMoveEvent(event)

    def mouseReleaseEvent(self, event) -> None:
        if self._mouse_down and event.button() == Qt.LeftButton:
            self._mouse_down = False
            raw = self._model_pos(event)
            self.tool.release(self.snap(*raw), raw)
            event.accept()
            return
        super().mouseReleaseEvent(event)

    def mouseDoubleClickEvent(self, event) -> None:
        raw = self._model_pos(event)
        if event.button() == Qt.LeftButton and self.tool.double_click(self.snap(*raw), raw):
            event.accept()
            return
        super().mouseDoubleClickEvent(event)

    def keyPressEvent(self, event) -> None:
        if self.tool.key(event.key()):
            event.accept()
            return
        if event.key() == Qt.Key_Escape:
            self.set_tool(PickTool.name)
            self.document.select(None)
            return
        steps = {Qt.Key_Left: (-1, 0), Qt.Key_Right: (1, 0), Qt.Key_Up: (0, 1), Qt.Key_Down: (0, -1)}
        ref = self.document.selection
        if event.key() in steps and ref is not None:
            from app.edits import move_part

            s = self.snap_step() * (0.1 if event.modifiers() & Qt.ShiftModifier else 1.0)
            dx, dy = steps[event.key()]
            self.document.apply(move_part(self.document.model, ref, dx * s, dy * s), "Nudge")
            self.document.select(ref)
            event.accept()
            return
        super().keyPressEvent(event)


def _outline_or_none(shape):
    """The shape's geometry in model units for hit tests, or None when it is invalid."""
    return None if shape.problem() is not None else shape.geometry_m(1.0, DRAWING_ARC_STEP_RAD)


def _distance(outline, shape, point: Point) -> float:
    """Distance from ``point`` to a part: from its cached outline, or from the shape itself
    when the shape is invalid (drawn as given)."""
    return float(outline.distance(point)) if outline is not None else shape.distance_to(point.x, point.y)
