"""Solver errors shown on the drawing: the parts concerned outlined in the colour of a rejected shape,
the message beside them in the colours of "cannot solve" (both from :mod:`app.colours`)."""

from __future__ import annotations

import textwrap

import pyqtgraph as pg
from PySide6.QtCore import QPointF, Qt

from app import colours
from app.canvas.drawing import cosmetic_pen, shape_item


class ErrorMarks:
    """Outlines of rejected shapes and a note on a PlotItem, for the conductors an error names."""

    def __init__(self, plot_item: pg.PlotItem, document) -> None:
        self.plot = plot_item
        self.document = document
        self.items: list = []

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
        anchor = None
        if names and names[0] in model.conductor_names:
            x0, y0, x1, y1 = model.conductor(names[0]).shapes[0].bounds()
            anchor = (x1, y1)
        elif model.bounds() is not None:
            x0, y0, x1, y1 = model.bounds()
            anchor = (x0, y1)
        if anchor is not None:
            failed = colours.FRESHNESS["failed"]
            text = pg.TextItem("\n".join(textwrap.wrap(message, 60)), color=failed.text,
                               fill=pg.mkBrush(*colours.hex_to_rgb(failed.background), 235),
                               border=pg.mkPen(colours.INVALID), anchor=(0, 1))
            text.setPos(QPointF(*anchor))
            self._add(text, 80)

    def _add(self, item, z: float) -> None:
        item.setZValue(z)
        self.plot.addItem(item)
        self.items.append(item)

    def clear(self) -> None:
        for item in self.items:
            self.plot.removeItem(item)
        self.items = []
