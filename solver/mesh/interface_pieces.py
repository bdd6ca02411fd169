"""Interface lines as straight edges and circular arcs, and panel break points along them.

shapely holds circles, rings and rounded corners as polygons. :func:`split_into_pieces`
recognises the arcs again (consecutive vertex triples on one circumcircle) so that the
interface mesher can place panels on the true circle, and :func:`piece_breaks` places panel
break points along a piece so that panel sizes follow a size function.
"""

from __future__ import annotations

import math
from dataclasses import dataclass

import numpy as np

from solver.mesh.panels import CORNER_TURN_RAD

#: Largest turn at a vertex inside a polygonised arc (larger turns make a polygon corner).
ARC_TURN_RAD = math.radians(10.0)


def circumcircles(a: np.ndarray, b: np.ndarray, c: np.ndarray) -> tuple[np.ndarray, np.ndarray]:
    """Centres (k, 2) and radii (k,) of the circles through point triples (inf radius if collinear)."""
    # relative to the middle point, to keep precision far from the origin
    ax, ay, cx, cy = a[:, 0] - b[:, 0], a[:, 1] - b[:, 1], c[:, 0] - b[:, 0], c[:, 1] - b[:, 1]
    d = 2.0 * (ax * cy - ay * cx)
    with np.errstate(divide="ignore", invalid="ignore"):
        sa, sc = ax * ax + ay * ay, cx * cx + cy * cy
        ux = (cy * sa - ay * sc) / d
        uy = (ax * sc - cx * sa) / d
    centre = np.column_stack([ux, uy]) + b
    radius = np.hypot(ux, uy)
    radius[~np.isfinite(radius)] = np.inf
    return centre, radius


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


def split_into_pieces(pts: np.ndarray, closed: bool) -> tuple[list[Piece], np.ndarray, float]:
    """Split a polyline (k, 2) into straight edges and arc runs.

    Returns the pieces in order, the arc-length positions of grading points (corners turning
    by more than CORNER_TURN_RAD, and the ends of an open line) and the total length.
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
    centre, radius = circumcircles(prev, pts, nxt)
    has_triple = np.ones(n_v, dtype=bool) if closed else np.r_[False, np.ones(n_v - 2, dtype=bool), False]
    if not closed:
        turn[0] = turn[-1] = math.pi  # open ends grade like corners
    smooth = has_triple & (np.abs(turn) < ARC_TURN_RAD) & (np.abs(turn) > 1e-7) & np.isfinite(radius)
    grading = s_vertex[:n_v][np.abs(turn) > CORNER_TURN_RAD] if closed else s_vertex[
        np.r_[True, np.abs(turn[1:-1]) > CORNER_TURN_RAD, True]
    ]

    def same(i: int, j: int) -> bool:
        r = radius[i]
        return bool(
            smooth[i] and smooth[j] and abs(radius[j] - r) < 1e-6 * r
            and np.hypot(*(centre[i] - centre[j])) < 1e-6 * r
        )

    # an arc edge joins two vertices on one circle and is as long as a neighbour (arcs are
    # polygonised in equal steps; a straight side between two arcs is not, even where its
    # end triples are mirror images on one circle)
    prev_len, next_len = np.roll(edge_len, 1), np.roll(edge_len, -1)
    if not closed:
        prev_len[0] = next_len[-1] = np.nan
    like_neighbour = (np.abs(prev_len - edge_len) < 1e-6 * edge_len) | (np.abs(next_len - edge_len) < 1e-6 * edge_len)
    on_arc = np.array([same(e, (e + 1) % n_v) for e in range(n_e)], dtype=bool) & like_neighbour
    # the first and last edge of an arc (from the tangent point) join the arc when both their
    # ends lie on its circle and they are as long as its edges
    for e in np.flatnonzero(~on_arc):
        for j in ((e - 1) % n_e, (e + 1) % n_e):
            if not on_arc[j] or (not closed and (j == n_e - 1 and e == 0 or j == 0 and e == n_e - 1)):
                continue
            k = (j + 1) % n_v if smooth[(j + 1) % n_v] else j
            c, r = centre[k], radius[k]
            ends = np.hypot(*(pts[[e, (e + 1) % n_v]] - c).T)
            if np.all(np.abs(ends - r) < 1e-9 * r) and abs(edge_len[j] - edge_len[e]) < 1e-6 * edge_len[e]:
                on_arc[e] = True
                break
    pieces: list[Piece] = []
    if closed and on_arc.all() and all(same(0, e) for e in range(n_e)):
        c, r = centre[0], float(radius[0])
        th0 = math.atan2(pts[0, 1] - c[1], pts[0, 0] - c[0])
        sweep = 2 * math.pi * (1.0 if turn[0] > 0 else -1.0)
        pieces.append(Piece(0.0, abs(sweep) * r, pts[0], pts[0], c, r, th0, sweep))
        return pieces, grading, abs(sweep) * r
    # start at a vertex that does not sit inside an arc run
    order = list(range(n_e))
    if closed and on_arc.any() and not on_arc.all():
        first = int(np.flatnonzero(~on_arc)[0])
        order = [(first + k) % n_e for k in range(n_e)]
    pending = None
    for e in order:
        if on_arc[e]:
            pending = [e] if pending is None else pending + [e]
            continue
        if pending is not None:
            pieces.append(arc_piece(pts, pending, n_v, centre, radius, s_vertex))
            pending = None
        p, q = pts[e], pts[(e + 1) % n_v]
        pieces.append(Piece(float(s_vertex[e]), float(edge_len[e]), p, q))
    if pending is not None:
        pieces.append(arc_piece(pts, pending, n_v, centre, radius, s_vertex))
    return pieces, grading, total


def arc_piece(pts, run, n_v, centre, radius, s_vertex) -> Piece:
    e0, e1 = run[0], run[-1]
    c, r = centre[(e0 + 1) % n_v], float(radius[(e0 + 1) % n_v])
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
