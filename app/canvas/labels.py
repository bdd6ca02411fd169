"""Keeping labels on the drawing apart: from each other, from the conductors and inside the view;
a label that cannot stand beside its point is led back to it by a thin line.

Boxes are (x0, y0, x1, y1) in model units; a label's size comes from its text and the current
model-units-per-pixel of the view.
"""

from __future__ import annotations

import math

import numpy as np
from scipy import ndimage

#: Approximate size of label text in screen pixels: per character, per line, and padding.
CHAR_PX, LINE_PX, PAD_PX = 7.0, 18.0, 10.0


def label_size(text: str, px: float, py: float) -> tuple[float, float]:
    """Width and height in model units of a one-line label (``px``, ``py``: units per pixel)."""
    return (CHAR_PX * len(text) + PAD_PX) * px, LINE_PX * py


def overlap(a, b) -> bool:
    return a[0] < b[2] and b[0] < a[2] and a[1] < b[3] and b[1] < a[3]


class PartMask:
    """Where the conductors are on the results grid (NaN potential), grown by one cell."""

    def __init__(self, x: np.ndarray, y: np.ndarray, inside: np.ndarray) -> None:
        self.x, self.y = x, y
        self.mask = ndimage.binary_dilation(inside, iterations=1) if inside.any() else inside

    def covers(self, box) -> bool:
        """True when ``box`` overlaps a conductor."""
        if not self.mask.any():
            return False
        c0, c1 = np.searchsorted(self.x, [box[0], box[2]])
        r0, r1 = np.searchsorted(self.y, [box[1], box[3]])
        return bool(self.mask[max(r0 - 1, 0):r1 + 1, max(c0 - 1, 0):c1 + 1].any())

    def covered_fraction(self, box) -> float:
        """The share of ``box`` (0 ... 1) that lies over a conductor."""
        if not self.mask.any():
            return 0.0
        c0, c1 = np.searchsorted(self.x, [box[0], box[2]])
        r0, r1 = np.searchsorted(self.y, [box[1], box[3]])
        cells = self.mask[max(r0 - 1, 0):r1 + 1, max(c0 - 1, 0):c1 + 1]
        return float(cells.mean()) if cells.size else 0.0


def grown(box, dx: float, dy: float):
    """``box`` grown by ``dx`` across and ``dy`` up on every side."""
    return box[0] - dx, box[1] - dy, box[2] + dx, box[3] + dy


def centred_box(x: float, y: float, w: float, h: float):
    return (x - w / 2, y - h / 2, x + w / 2, y + h / 2)


def anchor_point(box, anchor) -> tuple[float, float]:
    """The point of ``box`` where a pyqtgraph TextItem with ``anchor`` sits (y up in the view)."""
    x0, y0, x1, y1 = box
    return (x0 if anchor[0] == 0.0 else x1, y1 if anchor[1] == 0.0 else y0)


#: Besides the four places beside the point, a label may stand this many label heights
#: farther up or down (labels of close points stack instead of covering each other); each
#: step away counts this fraction of a clash, so a label stays near its point when it can.
STACK_STEPS = 2
STEP_COST = 0.4
#: A place moved into the view counts this fraction of a clash; covering conductors counts the
#: share of the label that lies over them.
MOVED_COST = 0.25
#: A leader line under a label counts this fraction of a clash (text over text counts one);
#: so does a label nearer to another labelled point than to its own.
LEADER_COST = 0.5
OTHER_POINT_COST = 0.5


def _moved_into_view(box, view):
    """``box`` moved the least distance that puts it in ``view`` (its left and bottom edges win
    when it is larger than the view)."""
    v0, v1, w0, w1 = view
    x0, y0, x1, y1 = box
    dx = max(v0 - x0, 0.0) or -max(x1 - v1, 0.0)
    dy = max(w0 - y0, 0.0) or -max(y1 - w1, 0.0)
    return x0 + dx, y0 + dy, x1 + dx, y1 + dy


def free_place(x, y, w, h, gap_x, gap_y, placed, view, mask: PartMask | None = None, *,
               leaders=(), others=()):
    """Anchor and box of a ``w`` x ``h`` label beside the point (x, y): of the four diagonal
    places, and the same places moved up to :data:`STACK_STEPS` label heights farther up or
    down, the one with the fewest clashes with ``placed`` boxes and conductors (the share of the
    label over them). A place that leaves the view is moved into it (never cut off) and counts
    :data:`MOVED_COST` of a clash, each step away :data:`STEP_COST` of one; ties go to the nearest
    place, then the outward side, then upwards.

    A place away from the point has a leader (:func:`leader_line`): a leader that crosses a
    ``placed`` box, or a box that crosses one of the ``leaders`` already drawn (segments), counts
    :data:`LEADER_COST` of a clash; a box nearer to one of the ``others`` points (labelled points
    of other labels) than to its own point, which would read as that point's label,
    :data:`OTHER_POINT_COST`."""
    v0, v1, w0, w1 = view
    outward_right = x >= 0.5 * (v0 + v1)
    candidates = []
    for step in range(STACK_STEPS + 1):
        for order, (right, up) in enumerate(((outward_right, True), (outward_right, False),
                                             (not outward_right, True), (not outward_right, False))):
            x0 = x + gap_x if right else x - gap_x - w
            y0 = y + gap_y + step * h if up else y - gap_y - h - step * h
            box = (x0, y0, x0 + w, y0 + h)
            moved = _moved_into_view(box, view)
            clashes = sum(overlap(moved, other) for other in placed)
            leader = leader_line(x, y, moved, gap_x, gap_y)
            if leader is not None:  # its own point's box (the star) holds the leader's start
                clashes += LEADER_COST * sum(segment_crosses(leader, other) for other in placed
                                             if not (other[0] <= x <= other[2] and other[1] <= y <= other[3]))
            clashes += LEADER_COST * sum(segment_crosses(segment, moved) for segment in leaders)
            own = _gap_distance(x, y, moved, gap_x, gap_y)
            clashes += OTHER_POINT_COST * any(_gap_distance(ox, oy, moved, gap_x, gap_y) < own for ox, oy in others)
            on_part = mask.covered_fraction(moved) if mask is not None else 0.0
            candidates.append((clashes + on_part + (MOVED_COST if moved != box else 0.0) + STEP_COST * step, step, order,
                               (0.0 if right else 1.0, 1.0 if up else 0.0), moved))
    best = min(candidates, key=lambda c: c[:3])
    return best[3], best[4]


def _gap_distance(x: float, y: float, box, gap_x: float, gap_y: float) -> float:
    """Distance from (x, y) to the nearest point of ``box``, in gaps (across and up alike)."""
    x_end, y_end = min(max(x, box[0]), box[2]), min(max(y, box[1]), box[3])
    return math.hypot((x_end - x) / gap_x, (y_end - y) / gap_y)


def segment_crosses(segment, box) -> bool:
    """True when the ``segment`` ((x0, y0), (x1, y1)) passes through the inside of ``box``
    (touching its edge does not count): Liang & Barsky's clipping (1984)."""
    (xa, ya), (xb, yb) = segment
    dx, dy = xb - xa, yb - ya
    t0, t1 = 0.0, 1.0
    for p, q in ((-dx, xa - box[0]), (dx, box[2] - xa), (-dy, ya - box[1]), (dy, box[3] - ya)):
        if p == 0.0:
            if q <= 0.0:
                return False
            continue
        t = q / p
        if p < 0.0:
            t0 = max(t0, t)
        else:
            t1 = min(t1, t)
    return t1 - t0 > 1e-9


#: A label farther from its point than this many times its gap beside the point (a place stacked
#: away or moved into the view) gets a leader line to the point.
LEADER_AFTER = 1.5


def leader_line(x: float, y: float, box, gap_x: float, gap_y: float):
    """The leader of a label placed at ``box`` for the point (x, y): the segment from the point
    to the nearest point of the box, when the box stands away from the point (more than
    :data:`LEADER_AFTER` times the gap of a label beside it, ``gap_x`` across and ``gap_y`` up,
    model units); None for a label beside its point.

    Returns ((x, y), (x_end, y_end)) in model units, or None.
    """
    beside = math.hypot(1.0, 1.0)  # the corner of a label beside its point, in gaps
    if _gap_distance(x, y, box, gap_x, gap_y) <= LEADER_AFTER * beside:
        return None
    return (x, y), (min(max(x, box[0]), box[2]), min(max(y, box[1]), box[3]))
