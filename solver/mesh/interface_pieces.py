"""Interface lines as straight edges and circular arcs, and panel break points along them.

shapely holds circles, rings and rounded corners as polygons whose vertices lie on the true
curves. :func:`split_into_pieces` marks the edges that are chords of the shapes' exact arcs
(handed over by the shapes, not re-fitted) so that the interface mesher can place panels on
the true circle, and :func:`piece_breaks` places panel break points along a piece so that
panel sizes follow a size function.
"""

from __future__ import annotations

import math
from dataclasses import dataclass

import numpy as np

from solver.mesh.panels import CORNER_TURN_RAD
from solver.model.geometry import edge_arcs
from solver.model.shapes import Arc


@dataclass
class Piece:
    """A straight edge or a circular arc run along one interface line."""

    s0: float  # arc-length position of its start along the line
    length: float
    start: np.ndarray
    end: np.ndarray
    centre: np.ndarray | None = None
    radius: float = math.nan
    theta0: float = 0.0
    dtheta: float = 0.0  # signed sweep

    def at(self, u: np.ndarray) -> np.ndarray:
        if self.centre is None:
            return self.start[None, :] + (u / self.length)[:, None] * (self.end - self.start)[None, :]
        th = self.theta0 + self.dtheta * u / self.length
        return self.centre[None, :] + self.radius * np.column_stack([np.cos(th), np.sin(th)])


def split_into_pieces(
    pts: np.ndarray, closed: bool, arcs: tuple[Arc, ...] = ()
) -> tuple[list[Piece], np.ndarray, float]:
    """Split a polyline (k, 2) into straight edges and runs along the known ``arcs``.

    An edge is part of an arc when it is a chord of one of the shapes' exact arcs
    (:func:`solver.model.geometry.edge_arcs`); consecutive chords of one circle make one arc
    piece. Returns the pieces in order, the arc-length positions of grading points (corners
    turning by more than CORNER_TURN_RAD, and the ends of an open line) and the total length.
    """
    n_v = len(pts)
    n_e = n_v if closed else n_v - 1
    nxt = np.roll(pts, -1, axis=0)
    edge_len = np.hypot(*(nxt - pts).T)[:n_e]
    s_vertex = np.concatenate([[0.0], np.cumsum(edge_len)])
    total = float(s_vertex[-1])
    prev = np.roll(pts, 1, axis=0)
    a, b = pts - prev, nxt - pts
    turn = np.arctan2(a[:, 0] * b[:, 1] - a[:, 1] * b[:, 0], np.einsum("ij,ij->i", a, b))
    grading = s_vertex[:n_v][np.abs(turn) > CORNER_TURN_RAD] if closed else s_vertex[
        np.r_[True, np.abs(turn[1:-1]) > CORNER_TURN_RAD, True]
    ]
    centre, radius = edge_arcs(pts, closed, arcs)
    on_arc = np.isfinite(radius)

    def same(i: int, j: int) -> bool:
        r = radius[i]
        return bool(on_arc[i] and on_arc[j] and abs(radius[j] - r) <= 1e-9 * r
                    and np.hypot(*(centre[i] - centre[j])) <= 1e-9 * r)

    pieces: list[Piece] = []
    if closed and on_arc.all() and all(same(0, e) for e in range(n_e)):
        c, r = centre[0], float(radius[0])
        th0 = math.atan2(pts[0, 1] - c[1], pts[0, 0] - c[0])
        sweep = 2 * math.pi * (1.0 if turn[0] > 0 else -1.0)
        pieces.append(Piece(0.0, abs(sweep) * r, pts[0], pts[0], c, r, th0, sweep))
        return pieces, grading, abs(sweep) * r
    # start at an edge that does not continue the arc run before it
    order = list(range(n_e))
    if closed:
        starts = [e for e in range(n_e) if not same((e - 1) % n_e, e)]
        order = [(starts[0] + k) % n_e for k in range(n_e)]
    pending: list[int] | None = None
    for e in order:
        if on_arc[e] and pending is not None and same(pending[-1], e):
            pending.append(e)
            continue
        if pending is not None:
            pieces.append(arc_piece(pts, pending, n_v, centre[pending[0]], float(radius[pending[0]]), s_vertex))
            pending = None
        if on_arc[e]:
            pending = [e]
            continue
        p, q = pts[e], pts[(e + 1) % n_v]
        pieces.append(Piece(float(s_vertex[e]), float(edge_len[e]), p, q))
    if pending is not None:
        pieces.append(arc_piece(pts, pending, n_v, centre[pending[0]], float(radius[pending[0]]), s_vertex))
    return pieces, grading, total


def arc_piece(pts, run, n_v, c, r, s_vertex) -> Piece:
    """One arc piece over the consecutive chords ``run`` of the circle (centre ``c``, radius ``r``)."""
    e0, e1 = run[0], run[-1]
    p, q = pts[e0], pts[(e1 + 1) % n_v]
    th0 = math.atan2(p[1] - c[1], p[0] - c[0])
    sweep = 0.0
    for e in run:
        a, b = pts[e] - c, pts[(e + 1) % n_v] - c
        sweep += math.atan2(a[0] * b[1] - a[1] * b[0], a @ b)
    return Piece(float(s_vertex[e0]), abs(sweep) * r, p, q, c, r, th0, sweep)


def piece_breaks(piece: Piece, size_fn, arc_step_rad: float) -> np.ndarray:
    """Break positions (0..length) along a piece so that panels follow the size function."""
    length = piece.length
    g = np.geomspace(1e-13, 1.0, 120) * length
    u = np.unique(np.concatenate([np.linspace(0.0, length, 129), g, length - g]))
    h = size_fn(piece, u)
    # integral of 1/h with h taken linear between samples (exact for geometric grading)
    h1, h2 = h[:-1], h[1:]
    with np.errstate(divide="ignore", invalid="ignore"):
        mean_inv = np.where(np.abs(h2 - h1) > 1e-9 * h1, np.log(h2 / h1) / (h2 - h1), 1.0 / h1)
    phi = np.concatenate([[0.0], np.cumsum(mean_inv * np.diff(u))])
    n = max(1, int(math.ceil(phi[-1] - 1e-9)))
    if piece.centre is not None:
        n = max(n, int(math.ceil(abs(piece.dtheta) / arc_step_rad - 1e-9)))
    return np.interp(np.linspace(0.0, phi[-1], n + 1), phi, u)
