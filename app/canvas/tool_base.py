"""Base of the mouse tools of the drawing area (see :mod:`app.canvas.tools`)."""

from __future__ import annotations

from app import edits
from solver import SolverError

XY = tuple[float, float]


class Tool:
    """Base tool: every handler returns True when it used the event."""

    name = "tool"
    label = ""
    hint = ""
    tracks_hover = False  # True: gets mouse moves with no button held (rubber band)

    def __init__(self, canvas) -> None:
        self.canvas = canvas

    @property
    def doc(self):
        return self.canvas.document

    def press(self, pos: XY, raw: XY) -> bool:
        return False

    def move(self, pos: XY, raw: XY) -> None:
        pass

    def release(self, pos: XY, raw: XY) -> None:
        pass

    def double_click(self, pos: XY, raw: XY) -> bool:
        return False

    def key(self, key: int) -> bool:
        return False

    def reset(self) -> None:
        self.canvas.show_preview(None)

    def _add(self, shape, description: str) -> None:
        try:
            model, ref = edits.add_conductor(self.doc.model, shape)
        except SolverError as exc:
            self.canvas.report_problem(str(exc))
            return
        if self.doc.apply(model, description):
            self.doc.select(ref)
