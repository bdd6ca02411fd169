"""The drawing cut to its plot area in geometry, for pictures written as SVG.

On screen the view clips everything to the plot area. An SVG written by Qt says the same with
clip paths, but not every program that reads SVG honours them (Qt's own renderer draws the
shading and the curves past the axes). While :func:`clipped_to_plot_area` is active, what lies
in the plot area is cut to it in geometry instead, so the file shows the screen in any reader:

* the shading (image items) becomes one raster of the plot area's pixels, as on screen;
* curves are cut segment by segment at the plot area's edges (Liang and Barsky's clipping of
  a segment to a rectangle, from memory), keeping their pens;
* markers outside the plot area and text boxes not wholly inside it are hidden;
* outlines and fills of parts are intersected with the plot area; a hatch becomes its lines
  (a pattern brush is written as a scaled bitmap that readers blur), and the earth's shaded
  half-space is cut to the view.

Everything is put back when the block ends.
"""

from __future__ import annotations

from contextlib import ExitStack, contextmanager

import numpy as np
import pyqtgraph as pg
import shapely
from PySide6.QtCore import Qt
from PySide6.QtGui import QBrush, QImage, QPainter, QPainterPath, QPen, QPixmap
from PySide6.QtWidgets import QGraphicsPathItem, QGraphicsPixmapItem


def clip_segments(x0, y0, x1, y1, rect: tuple[float, float, float, float]):
    """The parts of the segments (x0, y0)-(x1, y1) inside ``rect`` = (xmin, ymin, xmax, ymax),
    as arrays of the same form; segments wholly outside are dropped.

    >>> clip_segments(np.array([-1.0]), np.array([0.5]), np.array([2.0]), np.array([0.5]), (0, 0, 1, 1))
    (array([0.]), array([0.5]), array([1.]), array([0.5]))
    """
    x0, y0, x1, y1 = (np.asarray(a, dtype=float) for a in (x0, y0, x1, y1))
    dx, dy = x1 - x0, y1 - y0
    t0, t1 = np.zeros_like(x0), np.ones_like(x0)
    keep = np.isfinite(x0) & np.isfinite(y0) & np.isfinite(x1) & np.isfinite(y1)
    xmin, ymin, xmax, ymax = rect
    for p, q in ((-dx, x0 - xmin), (dx, xmax - x0), (-dy, y0 - ymin), (dy, ymax - y0)):
        parallel = p == 0
        keep &= ~(parallel & (q < 0))
        with np.errstate(divide="ignore", invalid="ignore"):
            r = np.where(parallel, 0.0, q / np.where(parallel, 1.0, p))
        t0 = np.where(~parallel & (p < 0), np.maximum(t0, r), t0)
        t1 = np.where(~parallel & (p > 0), np.minimum(t1, r), t1)
    keep &= t0 <= t1
    a, b = t0[keep], t1[keep]
    return (x0[keep] + a * dx[keep], y0[keep] + a * dy[keep], x0[keep] + b * dx[keep], y0[keep] + b * dy[keep])


def _segments(x, y, connect):
    """(x0, y0, x1, y1) of the segments a curve draws with pyqtgraph's ``connect`` rule."""
    if isinstance(connect, str) and connect == "pairs":
        n = len(x) // 2 * 2
        return x[0:n:2], y[0:n:2], x[1:n:2], y[1:n:2]
    joined = np.ones(max(len(x) - 1, 0), dtype=bool)
    if isinstance(connect, np.ndarray):
        joined = connect[: len(x) - 1].astype(bool)
    return x[:-1][joined], y[:-1][joined], x[1:][joined], y[1:][joined]


@contextmanager
def _curve_cut(curve: pg.PlotCurveItem, rect):
    x, y = curve.getData()
    if x is None or len(x) < 2:
        yield
        return
    connect = curve.opts.get("connect", "all")
    cut = clip_segments(*_segments(np.asarray(x, float), np.asarray(y, float), connect), rect)
    xs = np.column_stack([cut[0], cut[2]]).ravel()
    ys = np.column_stack([cut[1], cut[3]]).ravel()
    curve.setData(xs, ys, connect="pairs")
    try:
        yield
    finally:
        curve.setData(x, y, connect=connect)


@contextmanager
def _hidden(item):
    was = item.isVisible()
    item.setVisible(False)
    try:
        yield
    finally:
        item.setVisible(was)


@contextmanager
def _points_inside(scatter: pg.ScatterPlotItem, rect):
    x, y = scatter.getData()
    inside = (x >= rect[0]) & (x <= rect[2]) & (y >= rect[1]) & (y <= rect[3])
    scatter.setPointsVisible(inside)
    try:
        yield
    finally:
        scatter.setPointsVisible(np.ones(len(x), dtype=bool))


#: Spacing of the hatch lines drawn in place of a pattern brush, pixels (Qt's patterns use 8),
#: and where they lie in that period.
HATCH_PX = 8
HATCH_PHASE = 7.0


@contextmanager
def _path_cut(item: QGraphicsPathItem, vb: pg.ViewBox):
    """The item's path cut to the plot area; a hatched fill drawn as lines instead of a pattern."""
    path, brush = item.path(), item.brush()
    area = item.mapRectFromScene(vb.sceneBoundingRect())
    lines = None
    if brush.style() == Qt.BDiagPattern:  # an outline over hatching: the outline's segments in view, the hatch as lines
        lines = _hatch_lines(item, vb, brush.color())
        item.setBrush(QBrush(Qt.NoBrush))
        item.setPath(_outline_in(path, area))
    else:  # a filled part: the fill and its outline cut together
        box = QPainterPath()
        box.addRect(area)
        item.setPath(path.intersected(box))
    try:
        yield
    finally:
        item.setPath(path)
        item.setBrush(brush)
        if lines is not None:
            lines.setParentItem(None)
            if lines.scene() is not None:
                lines.scene().removeItem(lines)


def _outline_in(path: QPainterPath, area) -> QPainterPath:
    """The outline of ``path`` as open segments cut to the rectangle ``area`` (no edge added
    along the cut, as on screen)."""
    x0, y0, x1, y1 = [], [], [], []
    for poly in path.toSubpathPolygons():
        pts = np.array([(p.x(), p.y()) for p in poly])
        if len(pts) >= 2:
            x0.append(pts[:-1, 0])
            y0.append(pts[:-1, 1])
            x1.append(pts[1:, 0])
            y1.append(pts[1:, 1])
    out = QPainterPath()
    if not x0:
        return out
    rect = (min(area.left(), area.right()), min(area.top(), area.bottom()),
            max(area.left(), area.right()), max(area.top(), area.bottom()))
    for a, b, c, d in zip(*clip_segments(np.concatenate(x0), np.concatenate(y0), np.concatenate(x1),
                                         np.concatenate(y1), rect)):
        out.moveTo(a, b)
        out.lineTo(c, d)
    return out


def _hatch_lines(item: QGraphicsPathItem, vb: pg.ViewBox, colour) -> QGraphicsPathItem:
    """Lines rising to the right every :data:`HATCH_PX` pixels across ``item``'s area in view."""
    to_vb = item.itemTransform(vb)[0]
    rect = vb.boundingRect()
    polygons = [shapely.Polygon([(p.x(), p.y()) for p in to_vb.map(poly)]) for poly in item.path().toFillPolygons()]
    polygons = [p.buffer(0) for p in polygons if len(p.exterior.coords) >= 4]
    region = shapely.union_all(polygons).intersection(shapely.box(0, 0, rect.width(), rect.height())) \
        if polygons else shapely.Polygon()
    span = rect.width() + rect.height()
    # in step with Qt's pattern, which is fixed to the widget: its lines pass through the pixel
    # centres where x + y = 7 (mod 8) in widget pixels (as Qt 6 draws Qt.BDiagPattern)
    views = vb.scene().views() if vb.scene() is not None else []
    corner = views[0].mapFromScene(vb.mapToScene(0.0, 0.0)) if views else None
    phase = 0.0 if corner is None else (HATCH_PHASE - corner.x() - corner.y()) % HATCH_PX
    hatch = QPainterPath()
    for c in np.arange(phase, span + HATCH_PX, HATCH_PX):
        cut = shapely.LineString([(c, 0.0), (c - span, span)]).intersection(region)
        for piece in getattr(cut, "geoms", [cut]):
            if isinstance(piece, shapely.LineString) and not piece.is_empty:
                (x0, y0), (x1, y1) = piece.coords[0], piece.coords[-1]
                hatch.moveTo(x0, y0)
                hatch.lineTo(x1, y1)
    lines = QGraphicsPathItem(hatch, vb.childGroup)
    lines.setTransform(vb.itemTransform(vb.childGroup)[0])
    pen = QPen(colour)
    pen.setCosmetic(True)
    lines.setPen(pen)
    lines.setZValue(item.zValue())
    return lines


@contextmanager
def _region_cut(region: pg.LinearRegionItem, rect):
    """A shaded band (the earth below a ground plane) cut to the view."""
    lo, hi = region.getRegion()
    axis = (1, 3) if region.orientation == "horizontal" else (0, 2)
    new_lo, new_hi = max(lo, rect[axis[0]]), min(hi, rect[axis[1]])
    if new_lo >= new_hi:
        with _hidden(region):
            yield
        return
    region.setRegion((new_lo, new_hi))
    try:
        yield
    finally:
        region.setRegion((lo, hi))


@contextmanager
def _shading_as_raster(vb: pg.ViewBox, images: list):
    """The image items painted into one picture of the plot area's pixels, shown instead of them."""
    size = vb.boundingRect().size().toSize()
    picture = QImage(max(size.width(), 1), max(size.height(), 1), QImage.Format_ARGB32_Premultiplied)
    picture.fill(0)
    painter = QPainter(picture)
    to_vb = vb.sceneTransform().inverted()[0]
    for image in sorted(images, key=lambda i: i.zValue()):
        if image.isVisible() and image.image is not None:
            painter.setOpacity(image.opacity())
            painter.setTransform(image.sceneTransform() * to_vb)
            image.paint(painter)
    painter.end()
    # among the drawn items (under the curves and labels), its pixels mapped onto the view box's
    raster = QGraphicsPixmapItem(QPixmap.fromImage(picture), vb.childGroup)
    raster.setTransform(vb.itemTransform(vb.childGroup)[0])
    raster.setZValue(min(i.zValue() for i in images))
    with ExitStack() as stack:
        for image in images:
            stack.enter_context(_hidden(image))
        try:
            yield
        finally:
            raster.setParentItem(None)
            if raster.scene() is not None:
                raster.scene().removeItem(raster)


@contextmanager
def clipped_to_plot_area(plot_item: pg.PlotItem):
    """While active, what the view box of ``plot_item`` shows is cut to its plot area in geometry."""
    vb = plot_item.vb
    (x0, x1), (y0, y1) = vb.viewRange()
    rect = (min(x0, x1), min(y0, y1), max(x0, x1), max(y0, y1))
    scene_area = vb.sceneBoundingRect()
    items = []
    for item in vb.addedItems:
        items.append(item)
        if isinstance(item, pg.PlotDataItem):
            items += [item.curve, item.scatter]
    with ExitStack() as stack:
        images = [i for i in items if isinstance(i, pg.ImageItem) and i.isVisible()]
        if images:
            stack.enter_context(_shading_as_raster(vb, images))
        for item in items:
            if isinstance(item, pg.PlotCurveItem) and item.isVisible():
                stack.enter_context(_curve_cut(item, rect))
            elif isinstance(item, pg.ScatterPlotItem) and item.isVisible():
                stack.enter_context(_points_inside(item, rect))
            elif isinstance(item, pg.TextItem) and item.isVisible():
                if not scene_area.contains(item.sceneBoundingRect()):
                    stack.enter_context(_hidden(item))
            elif isinstance(item, QGraphicsPathItem) and item.isVisible():
                stack.enter_context(_path_cut(item, vb))
            elif isinstance(item, pg.LinearRegionItem) and item.isVisible():
                stack.enter_context(_region_cut(item, rect))
        yield
