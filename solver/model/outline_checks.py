"""Degenerate outlines cleaned or refused before they become geometry.

A polygon drawn with a repeated vertex has an edge of zero length, a vertex lying on the
line between its neighbours splits a straight side in two, and a hole equal to its outline
leaves nothing. Left in, such outlines make the mesher grade panels toward a point that has
no length or divide by zero. Here repeated and collinear vertices are dropped (with a log
note) and outlines that are nothing once cleaned are refused with a message naming the part,
the shape and the vertex.

Lengths also must stay within what double precision meshes safely: :data:`SMALLEST_LENGTH_M`
to :data:`LARGEST_LENGTH_M`.
"""

from __future__ import annotations

import logging
from collections.abc import Sequence

import numpy as np

from solver.errors import InvalidGeometryError

logger = logging.getLogger(__name__)

#: Vertices closer than this fraction of the outline's size count as one vertex, and a vertex
#: that departs from the line through its neighbours by less than it counts as on the line.
SAME_POINT_FRACTION = 1e-9

#: Smallest size (radius, side, outline extent) accepted, metres (0.1 nm, below any real part).
SMALLEST_LENGTH_M = 1e-10

#: Largest coordinate or size accepted, metres (100 km, beyond any cross-section).
LARGEST_LENGTH_M = 1e5


def _as_points(points: Sequence[Sequence[float]] | np.ndarray) -> np.ndarray:
    return np.asarray(points, dtype=float).reshape(-1, 2)


def _tolerance(pts: np.ndarray) -> float:
    return SAME_POINT_FRACTION * float(np.hypot(*(pts.max(axis=0) - pts.min(axis=0))))


def check_extent(points_m: np.ndarray, where: str) -> None:
    """Refuse coordinates beyond :data:`LARGEST_LENGTH_M` or an outline smaller than
    :data:`SMALLEST_LENGTH_M` (both in metres)."""
    pts = _as_points(points_m)
    if not np.isfinite(pts).all() or np.abs(pts).max() > LARGEST_LENGTH_M:
        raise InvalidGeometryError(
            f"{where} reaches beyond {LARGEST_LENGTH_M:g} m from the origin; "
            "check the unit and the numbers (a cross-section is far smaller)."
        )
    extent = float(np.hypot(*(pts.max(axis=0) - pts.min(axis=0))))
    if extent < SMALLEST_LENGTH_M:
        raise InvalidGeometryError(
            f"{where} is {extent:.3g} m across, smaller than {SMALLEST_LENGTH_M:g} m; "
            "check the unit and the numbers."
        )


def cleaned_ring(points: Sequence[Sequence[float]], where: str, unit: str = "") -> np.ndarray:
    """The closed outline ``points`` without repeated or collinear vertices.

    Parameters
    ----------
    points : (k, 2) array-like
        Vertices of a closed outline (the first need not be repeated at the end), any unit.
    where : str
        Names the outline in messages, e.g. "Conductor 'bar', shape 2 (polygon), outline".
    unit : str
        Unit of ``points``, used in messages.

    Returns
    -------
    (m, 2) float array, m >= 3, same unit as ``points``.

    Raises
    ------
    InvalidGeometryError
        When fewer than three vertices off one line remain.
    """
    pts = _as_points(points)
    if len(pts) and not _tolerance(pts) > 0:
        raise InvalidGeometryError(f"{where}: all vertices are at one point {_at(pts[0], unit)}; redraw the outline.")
    if len(pts) >= 2 and np.array_equal(pts[0], pts[-1]):
        pts = pts[:-1]
    if len(pts) < 3:
        raise InvalidGeometryError(f"{where}: needs at least 3 vertices, got {len(pts)}.")
    tol = _tolerance(pts)
    n_given = len(pts)
    pts, dropped = _drop_repeated(pts, tol, closed=True)
    for k in dropped:
        logger.info("%s: vertex %d repeats its neighbour; dropped", where, k + 1)
    changed = True
    while changed and len(pts) >= 3:
        prev, nxt = np.roll(pts, 1, axis=0), np.roll(pts, -1, axis=0)
        off_line = _distance_from_line(pts, prev, nxt)
        on_line = off_line <= tol
        changed = bool(on_line.any())
        if changed:
            k = int(np.argmin(off_line))  # drop one at a time: neighbours change
            logger.info("%s: vertex at %s lies on the line between its neighbours; dropped", where, _at(pts[k], unit))
            pts = np.delete(pts, k, axis=0)
    if len(pts) < 3:
        raise InvalidGeometryError(
            f"{where}: its {n_given} vertices lie on one line (or repeat), so it has no area; "
            "redraw it with at least three vertices off one line."
        )
    return pts


def cleaned_polyline(points: Sequence[Sequence[float]], where: str, unit: str = "") -> np.ndarray:
    """The open polyline ``points`` (a strip) without repeated vertices or straight-on middle vertices.

    Raises
    ------
    InvalidGeometryError
        When fewer than two distinct points remain, or the line turns back on itself.
    """
    pts = _as_points(points)
    if len(pts) < 2:
        raise InvalidGeometryError(f"{where}: a strip needs at least 2 points, got {len(pts)}.")
    tol = _tolerance(pts)
    if not tol > 0:
        raise InvalidGeometryError(f"{where} has zero length: all its points are at {_at(pts[0], unit)}; move its ends apart.")
    pts, dropped = _drop_repeated(pts, tol, closed=False)
    for k in dropped:
        logger.info("%s: point %d repeats its neighbour; dropped", where, k + 1)
    if len(pts) > 2:
        a, b = pts[1:-1] - pts[:-2], pts[2:] - pts[1:-1]
        off_line = _distance_from_line(pts[1:-1], pts[:-2], pts[2:])
        dot = np.einsum("ij,ij->i", a, b)
        back = (off_line <= tol) & (dot < 0)
        if back.any():
            k = int(np.flatnonzero(back)[0]) + 1
            raise InvalidGeometryError(
                f"{where}: the strip turns back on itself at {_at(pts[k], unit)}; "
                "a strip may not run over itself: remove that point."
            )
        keep = np.concatenate([[True], off_line > tol, [True]])
        pts = pts[keep]
    return pts


def check_holes(shell: np.ndarray, holes: Sequence[np.ndarray], where: str) -> None:
    """Refuse a hole that covers its outline (the polygon would be empty)."""
    import shapely

    outline = shapely.Polygon(shell)
    for i, hole in enumerate(holes):
        left = outline.difference(shapely.Polygon(hole)).area
        if left <= SAME_POINT_FRACTION * outline.area:
            raise InvalidGeometryError(
                f"{where}: hole {i + 1} covers the whole outline, leaving nothing; remove the hole."
            )


def _drop_repeated(pts: np.ndarray, tol: float, closed: bool) -> tuple[np.ndarray, list[int]]:
    keep = [0]
    for k in range(1, len(pts)):
        if np.hypot(*(pts[k] - pts[keep[-1]])) > tol:
            keep.append(k)
    if closed and len(keep) > 1 and np.hypot(*(pts[keep[-1]] - pts[0])) <= tol:
        keep.pop()
    dropped = sorted(set(range(len(pts))) - set(keep))
    return pts[keep], dropped


def _distance_from_line(p: np.ndarray, a: np.ndarray, b: np.ndarray) -> np.ndarray:
    """Distance of each point p from the segment a-b's line (from a when a == b)."""
    ab, ap = b - a, p - a
    length = np.hypot(*ab.T)
    cross = np.abs(ab[:, 0] * ap[:, 1] - ab[:, 1] * ap[:, 0])
    return np.where(length > 0, cross / np.where(length > 0, length, 1.0), np.hypot(*ap.T))


def _at(point: np.ndarray, unit: str) -> str:
    return f"({point[0]:.6g}, {point[1]:.6g}){' ' + unit if unit else ''}"
