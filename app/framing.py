"""The part of a drawing the view opens on (Qt-free): the conductors that carry a signal and
what lies close around them, so a trace on a wide board is readable at once.
"""

from __future__ import annotations

from solver import Model

#: Parts whose box lies within this many signal-box sizes of the signal conductors take part
#: in framing the view, and so do parts at most ``SMALL_PART`` signal-box sizes across wherever
#: they are (a return wire, an earth wire); a ground plane within ``PLANE_REACH`` sizes does too.
FRAME_REACH = 2.0
SMALL_PART = 4.0
PLANE_REACH = 5.0

#: Margin around the framed box, as a fraction of its larger side.
FRAME_MARGIN = 0.3


def _union(boxes) -> tuple[float, float, float, float]:
    boxes = list(boxes)
    return (min(b[0] for b in boxes), min(b[1] for b in boxes), max(b[2] for b in boxes), max(b[3] for b in boxes))


def _facing_part(part, signal, reach):
    """The piece of a large part that faces the signals within reach: a wide plane or board
    counts with its height across the signals' width, a tall wall with its width across their
    height; None when the part is small, out of reach or neither wide nor tall."""
    wide = part[0] < reach[0] and part[2] > reach[2]
    tall = part[1] < reach[1] and part[3] > reach[3]
    if wide == tall:
        return None
    if wide:
        y0, y1 = max(part[1], reach[1]), min(part[3], reach[3])
        return (signal[0], y0, signal[2], y1) if y0 <= y1 else None
    x0, x1 = max(part[0], reach[0]), min(part[2], reach[2])
    return (x0, signal[1], x1, signal[3]) if x0 <= x1 else None


def framing_box(model: Model) -> tuple[float, float, float, float] | None:
    """(xmin, ymin, xmax, ymax) in model units that the view opens on, margin included.

    The signal (fixed-potential) conductors set the frame, so a trace on a board stays
    readable: other conductors and dielectrics join it when their whole box lies within
    :data:`FRAME_REACH` signal-box sizes of it (a cable's screen, a coax shield) or when they
    are small (:data:`SMALL_PART`: a return or earth wire); a wide plane or board within reach
    joins with its height only, a tall wall with its width only, and a ground plane within
    :data:`PLANE_REACH` sizes joins as its height.
    Far enclosures, wide boards and reference planes drawn as strips do not set the zoom.
    None for an empty drawing.
    """
    signals = [s.bounds() for c in model.conductors if c.role == "fixed" for s in c.shapes]
    if not signals:
        signals = [s.bounds() for c in model.conductors for s in c.shapes]
    if not signals:
        return model.bounds()
    box = _union(signals)
    size = max(box[2] - box[0], box[3] - box[1], 1e-12)
    reach = (box[0] - FRAME_REACH * size, box[1] - FRAME_REACH * size,
             box[2] + FRAME_REACH * size, box[3] + FRAME_REACH * size)
    others = [s.bounds() for c in model.conductors if c.role != "fixed" for s in c.shapes]
    others += [s.bounds() for d in model.dielectrics for s in d.shapes]
    near = [b for b in others if b[0] >= reach[0] and b[1] >= reach[1] and b[2] <= reach[2] and b[3] <= reach[3]
            or max(b[2] - b[0], b[3] - b[1]) <= SMALL_PART * size]
    near += [c for c in (_facing_part(b, box, reach) for b in others) if c is not None]
    box = _union([box] + near)
    plane = model.ground_plane
    if plane is not None and min(abs(plane.y - box[1]), abs(plane.y - box[3])) <= PLANE_REACH * size:
        box = (box[0], min(box[1], plane.y), box[2], max(box[3], plane.y))
    pad = FRAME_MARGIN * max(box[2] - box[0], box[3] - box[1], 1e-12)
    y0 = box[1] - pad
    if plane is not None and plane.y == box[1]:
        y0 = plane.y - 0.25 * pad  # a strip of earth below the plane, not a half-screen of it
    return box[0] - pad, y0, box[2] + pad, box[3] + pad
