"""Solver errors shown on the drawing: the parts concerned outlined in the colour of a rejected shape,
the message in a note in the colours of "cannot solve" (both from :mod:`app.colours`).

The note lives in the plot's view box, not in drawing coordinates: it stays inside the plot
whatever the zoom, wrapped to the plot's width, in the top corner away from the part it names."""

from __future__ import annotations

import pyqtgraph as pg
from PySide6.QtCore import Qt

from app import colours
from app.canvas.drawing import cosmetic_pen, shape_item

#: Gap between the note and the plot's edge (pixels).
NOTE_MARGIN_PX = 8


class ErrorMarks:
    """Outlines of rejected shapes and a note on a PlotItem, for the conductors an error names."""

    def __init__(self, plot_item: pg.PlotItem, document) -> None:
        self.plot = plot_item
        self.document = document
        self.items: list = []
        self.note: pg.TextItem | None = None
        self._part: tuple[float, float, float, float] | None = None
        plot_item.vb.sigResized.connect(lambda _vb: self.place_note())
        plot_item.vb.sigRangeChanged.connect(lambda *_: self.place_note())

    def show(self, names: list[str], message: str) -> None:
        self.clear()
        model = self.document.model
        for name in names:
            if name not in model.conductor_names:
                continue
            for s in model.conductor(name).shapes:
                item = shape_item(s, colours.INVALID, alpha=0, dashed=True)
                item.setPen(cosmetic_pen(colours.INVALID, 3, Qt.DashLine))
                self._add(item, 70)
        failed = colours.FRESHNESS["failed"]
        note = pg.TextItem(message, color=failed.text,
                           fill=pg.mkBrush(*colours.hex_to_rgb(failed.background), 235),
                           border=pg.mkPen(colours.INVALID))
        note.setZValue(80)
        note.setParentItem(self.plot.vb)  # view-box pixels: never outside the plot
        self.note = note
        self._part = model.conductor(names[0]).shapes[0].bounds() if names and names[0] in model.conductor_names else None
        self.place_note()

    def place_note(self) -> None:
        """Wrap the note to at most half the plot's width (all of it when narrow) and put it in
        the top corner away from the part it names, inside the plot."""
        if self.note is None:
            return
        vb = self.plot.vb
        box = vb.boundingRect()
        width = box.width() * (0.5 if box.width() > 600 else 1.0) - 2 * NOTE_MARGIN_PX
        self.note.setTextWidth(max(width, 40.0))
        left = True
        if self._part is not None:
            x0, _y0, x1, _y1 = self._part
            (vx0, vx1), _ = vb.viewRange()
            left = 0.5 * (x0 + x1) > 0.5 * (vx0 + vx1)  # the part on the right: the note on the left
        note_width = self.note.boundingRect().width()
        x = NOTE_MARGIN_PX if left else max(NOTE_MARGIN_PX, box.width() - note_width - NOTE_MARGIN_PX)
        self.note.setPos(x, NOTE_MARGIN_PX)

    def _add(self, item, z: float) -> None:
        item.setZValue(z)
        self.plot.addItem(item)
        self.items.append(item)

    def clear(self) -> None:
        for item in self.items:
            self.plot.removeItem(item)
        self.items = []
        if self.note is not None:
            self.note.setParentItem(None)
            if self.note.scene() is not None:
                self.note.scene().removeItem(self.note)
            self.note = None
