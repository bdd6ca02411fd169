"""Qt painter paths and items for model shapes, in model units.

Colours come from :mod:`app.colours` (one table, one meaning per colour).
"""

from __future__ import annotations

import pyqtgraph as pg
from PySide6.QtCore import QPointF, Qt
from PySide6.QtGui import QBrush, QColor, QPainterPath, QPen
from PySide6.QtWidgets import QGraphicsPathItem

from app import colours
from app.units import format_plain
from solver import Shape

#: Outline colour of a shape the solver rejects.
INVALID_COLOR = QColor(colours.INVALID)



def shape_path(shape: Shape) -> QPainterPath:
    """A QPainterPath of the shape's outline as the solver builds it (odd-even fill, so rings
    and holes stay open); an invalid shape is drawn as the user gave it, never repaired."""
    path = QPainterPath()
    path.setFillRule(Qt.OddEvenFill)
    for ring in shape.outline():
        if len(ring) == 0:
            continue
        path.moveTo(QPointF(*ring[0]))
        for p in ring[1:]:
            path.lineTo(QPointF(*p))
        if shape.is_solid:
            path.closeSubpath()
    return path


def cosmetic_pen(color, width: float = 1.5, style=Qt.SolidLine) -> QPen:
    """A pen whose width is in screen pixels at every zoom."""
    pen = QPen(QColor(color), width, style)
    pen.setCosmetic(True)
    return pen


def mark_if_invalid(item: QGraphicsPathItem, shape: Shape, where: str | None = None) -> str | None:
    """Outline ``item`` in red dashes with the solver's message as its tooltip when ``shape``
    is invalid; returns the message (None for a valid shape)."""
    problem = shape.problem(where)
    if problem is not None:
        item.setPen(cosmetic_pen(INVALID_COLOR, 2.5, Qt.DashLine))
        item.setToolTip(problem)
    return problem


def shape_item(shape: Shape, color: str, *, selected: bool = False, alpha: int = 235,
               dashed: bool = False, where: str | None = None) -> QGraphicsPathItem:
    """A filled, outlined item for a conductor shape (strips drawn as thick lines).

    An invalid shape gets a red dashed outline and the solver's message as its tooltip
    (``where`` names it there, e.g. "Conductor 'bar', shape 2 (polygon)").
    """
    item = QGraphicsPathItem(shape_path(shape))
    base = QColor(color)
    strip = not shape.is_solid
    width = 4.0 if strip else (2.5 if selected else 1.5)
    outline = QColor(colours.SELECTION) if selected else base.darker(170)
    if strip:
        outline = base if not selected else QColor(colours.SELECTION)
    item.setPen(cosmetic_pen(outline, width, Qt.DashLine if dashed else Qt.SolidLine))
    if not strip:
        fill = QColor(base)
        fill.setAlpha(alpha)
        item.setBrush(QBrush(fill))
    mark_if_invalid(item, shape, where)
    return item


def dielectric_item(shape: Shape, eps_r: float, where: str | None = None) -> QGraphicsPathItem:
    """A dielectric region as a dark outline and a light hatch over the map (no fill that would
    tint the shading); eps_r in its tooltip. Marked like :func:`shape_item` when invalid."""
    item = QGraphicsPathItem(shape_path(shape))
    brush = QBrush(QColor(*colours.DIELECTRIC_HATCH), Qt.BDiagPattern)
    item.setBrush(brush)
    item.setPen(cosmetic_pen(colours.DIELECTRIC_OUTLINE, 1.2, Qt.DashLine))
    item.setToolTip(f"{where or 'Dielectric'}: relative permittivity {format_plain(eps_r, 10)}")
    mark_if_invalid(item, shape, where)
    return item


def style_axes(plot_item) -> None:
    """Legible axes on a pyqtgraph PlotItem: text in the palette's text colours (contrast
    >= 4.5:1), lines in the muted one, and no automatic SI multiplier on the numbers."""
    for side in ("left", "bottom"):
        axis = plot_item.getAxis(side)
        axis.setTextPen(QPen(QColor(colours.TEXT)))
        axis.setPen(QPen(QColor(colours.TEXT_MUTED)))
        axis.enableAutoSIPrefix(False)


def plot_widget(parent=None, *, grid_alpha: float | None = 0.2) -> pg.PlotWidget:
    """A plot on the page colour with legible axes (:func:`style_axes`) and, unless
    ``grid_alpha`` is None, a light grid. Every plot the program shows is made here."""
    widget = pg.PlotWidget(parent, background=colours.PAGE)
    style_axes(widget.plotItem)
    if grid_alpha is not None:
        widget.showGrid(x=True, y=True, alpha=grid_alpha)
    return widget
