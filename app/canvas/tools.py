"""Mouse tools of the drawing area: the pick-and-move tool here, the drawing tools in
:mod:`app.canvas.draw_tools`, and :data:`TOOLS`, the list the canvas and the menus use.

A tool receives positions in model units (already snapped where that makes sense) from the
:class:`app.canvas.Canvas` and turns finished gestures into one edit of the document.
"""

from __future__ import annotations

from app import edits
from app.canvas.draw_tools import (
    CircleTool,
    DielectricTool,
    GroundPlaneTool,
    PolygonTool,
    ProbeTool,
    RectangleTool,
    StripTool,
    TubeTool,
)
from app.canvas.tool_base import XY, Tool
from app.document import PartRef


class PickTool(Tool):
    """Pick a part; drag it to move it, drag a handle to resize it or move a vertex."""

    name, label = "pick", "Pick and move"
    hint = ("Click a part to select it; drag it to move, drag a square handle to resize. Double-click a "
            "polygon edge to add a vertex, a vertex to remove it. Drag empty space to pan; arrows nudge.")

    def __init__(self, canvas) -> None:
        super().__init__(canvas)
        self._start: XY | None = None
        self._handle: int | None = None
        self._ref: PartRef | None = None
        self._last_dragged: XY | None = None

    def press(self, pos, raw) -> bool:
        ref = self.doc.selection
        handle = self.canvas.handle_at(raw) if ref is not None else None
        if handle is None:
            ref = self.canvas.part_at(raw)
            self.doc.select(ref)
            self.canvas.boundary_pick(raw)
        if ref is None:
            return False
        self._start, self._handle, self._ref = pos, handle, ref
        return True

    def _edited(self, pos):
        model = self.doc.model
        if self._handle is not None:
            shape = edits.shape_of(model, self._ref).with_handle_moved(self._handle, *pos)
            return edits.replace_shape(model, self._ref, shape), "Resize"
        dx, dy = pos[0] - self._start[0], pos[1] - self._start[1]
        return edits.move_part(model, self._ref, dx, dy), "Move"

    def move(self, pos, raw) -> None:
        if self._ref is None:
            return
        model, _ = self._edited(pos)
        if self._ref.kind == "plane":
            self.canvas.show_preview(None, plane_y=model.ground_plane.y)
        else:
            self.canvas.show_preview(edits.shape_of(model, self._ref))
        if pos != self._last_dragged:  # a snapped position repeats while the mouse moves
            self._last_dragged = pos
            self.canvas.part_dragged.emit(model)

    def release(self, pos, raw) -> None:
        if self._ref is None:
            return
        model, description = self._edited(pos)
        ref, self._ref = self._ref, None
        self.canvas.show_preview(None)
        if pos != self._start:
            self.doc.apply(model, description)
            self.doc.select(ref)
        self._last_dragged = None
        self.canvas.drag_finished.emit()

    def double_click(self, pos, raw) -> bool:
        """On a selected polygon or strip: a vertex is removed, a point on an edge becomes a vertex."""
        ref = self.doc.selection
        if ref is None or ref.kind == "plane":
            return False
        shape = edits.shape_of(self.doc.model, ref)
        if not shape.has_vertices:
            return False
        handle = self.canvas.handle_at(raw)
        if handle is not None:
            new, description = shape.with_vertex_removed(handle), "Remove vertex"
        elif shape.distance_to(*raw) <= 6 * self.canvas.pixel_size() or shape.is_solid:
            new, description = shape.with_vertex_inserted(*pos), "Add vertex"
        else:
            return False
        self.doc.apply(edits.replace_shape(self.doc.model, ref, new), description)
        self.doc.select(ref)
        return True

    def reset(self) -> None:
        self._ref = None
        super().reset()


TOOLS = (PickTool, RectangleTool, CircleTool, TubeTool, PolygonTool, StripTool, GroundPlaneTool, DielectricTool,
         ProbeTool)
