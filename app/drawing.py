"""Qt painter paths and items for model shapes, in model units."""

from __future__ import annotations

import math

from PySide6.QtCore import QPointF, QRectF, Qt
from PySide6.QtGui import QBrush, QColor, QPainterPath, QPen
from PySide6.QtWidgets import QGraphicsPathItem

from solver import Circle, Polygon, Rectangle, Ring, Shape, Strip

#: Fill colours of dielectric regions, from eps_r = 1 (lightest) upwards.
DIELECTRIC_TINT = QColor(214, 196, 120)


def shape_path(shape: Shape) -> QPainterPath:
    """A QPainterPath of the shape (odd-even fill, so rings and holes stay open)."""
    path = QPainterPath()
    path.setFillRule(Qt.OddEvenFill)
    if isinstance(shape, Circle):
        r = shape.radius
        path.addEllipse(QPointF(*shape.center), r, r)
    elif isinstance(shape, Ring):
        for r in (shape.outer_radius, shape.inner_radius):
            path.addEllipse(QPointF(*shape.center), r, r)
    elif isinstance(shape, Rectangle):
        cx, cy = shape.center
        rect = QRectF(cx - shape.width / 2, cy - shape.height / 2, shape.width, shape.height)
        r = min(shape.corner_radius, 0.5 * min(shape.width, shape.height))
        if r > 0:
            path.addRoundedRect(rect, r, r)
        else:
            path.addRect(rect)
    elif isinstance(shape, Polygon):
        for ring in (shape.exterior, *shape.holes):
            path.moveTo(QPointF(*ring[0]))
            for p in ring[1:]:
                path.lineTo(QPointF(*p))
            path.closeSubpath()
    elif isinstance(shape, Strip):
        path.moveTo(QPointF(*shape.points[0]))
        for p in shape.points[1:]:
            path.lineTo(QPointF(*p))
    return path


def cosmetic_pen(color, width: float = 1.5, style=Qt.SolidLine) -> QPen:
    """A pen whose width is in screen pixels at every zoom."""
    pen = QPen(QColor(color), width, style)
    pen.setCosmetic(True)
    return pen


def shape_item(shape: Shape, color: str, *, selected: bool = False, alpha: int = 150,
               dashed: bool = False) -> QGraphicsPathItem:
    """A filled, outlined item for a conductor shape (strips drawn as thick lines)."""
    item = QGraphicsPathItem(shape_path(shape))
    base = QColor(color)
    strip = isinstance(shape, Strip)
    width = 4.0 if strip else (2.5 if selected else 1.5)
    outline = QColor("#111111") if selected else base.darker(150)
    if strip:
        outline = base if not selected else QColor("#111111")
    item.setPen(cosmetic_pen(outline, width, Qt.DashLine if dashed else Qt.SolidLine))
    if not strip:
        fill = QColor(base)
        fill.setAlpha(alpha)
        item.setBrush(QBrush(fill))
    return item


def dielectric_item(shape: Shape, eps_r: float) -> QGraphicsPathItem:
    """A plain fill for a dielectric region, darker for higher relative permittivity."""
    item = QGraphicsPathItem(shape_path(shape))
    fill = QColor(DIELECTRIC_TINT)
    fill.setAlpha(int(min(60 + 25 * math.log2(max(eps_r, 1.0)), 200)))
    item.setBrush(QBrush(fill))
    item.setPen(cosmetic_pen(DIELECTRIC_TINT.darker(160), 1.0, Qt.DashLine))
    return item
