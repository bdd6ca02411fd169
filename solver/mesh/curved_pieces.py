"""Conductor outlines as exact pieces: straight segments and circular arcs, with their corners.

The boundary rings of :mod:`solver.model.geometry` are polygons whose edges carry the exact
arc they are chords of (from the shapes themselves). :func:`boundary_pieces` merges runs of
edges on one arc into one exact arc and runs of collinear edges into one segment, so a
circle is a single closed arc and a rectangle four segments. Each piece is parametrised by
s in [0, 1] from its start to its end, with the conductor material on the left.

The junctions between pieces are the points where the surface charge density may be
singular (sharp corners, strip ends) or merely less smooth (an arc meeting a straight edge
with the same tangent); :class:`Piece` records, at each end, the opening angle of the field
region there so that the mesher can grade panels toward it.
"""

from __future__ import annotations

import math
from dataclasses import dataclass

import numpy as np

from solver.model.geometry import BoundaryRing, boundary_rings, conductor_arcs, conductor_geometries
from solver.model.model import Model

#: Angle between polygon vertices used to find the exact pieces (the drawing step is enough:
#: every edge of a curve is matched to its exact arc, whatever the step).
PIECE_ARC_STEP_RAD = math.radians(5.0)

#: Turns smaller than this (radians) at a junction count as tangent-continuous.
SMOOTH_TURN_RAD = 1e-9


@dataclass(frozen=True)
class Piece:
    """One exact piece of a conductor outline, metres.

    ``kind`` is "line" (from ``start`` to ``end``) or "arc" (``centre``, ``radius``, from angle
    ``start_rad`` sweeping ``sweep_rad``, counter-clockwise positive). ``opening_start_rad``
    and ``opening_end_rad`` are the opening angles of the field region at the two ends
    (pi where the outline runs on smoothly; 2 pi at the free end of a strip; None for a
    closed piece without ends, a full circle).
    """

    kind: str
    conductor_index: int
    ring_index: int
    is_strip: bool
    start: tuple[float, float]
    end: tuple[float, float]
    centre: tuple[float, float] = (math.nan, math.nan)
    radius: float = math.nan
    start_rad: float = 0.0
    sweep_rad: float = 0.0
    opening_start_rad: float | None = math.pi
    opening_end_rad: float | None = math.pi

    @property
    def length_m(self) -> float:
        if self.kind == "arc":
            return abs(self.sweep_rad) * self.radius
        return math.dist(self.start, self.end)

    def scaled(self, factor: float) -> Piece:
        """The same piece with every length multiplied by ``factor``."""
        from dataclasses import replace

        return replace(self, start=(self.start[0] * factor, self.start[1] * factor),
                       end=(self.end[0] * factor, self.end[1] * factor),
                       centre=(self.centre[0] * factor, self.centre[1] * factor), radius=self.radius * factor)

    def points(self, s: np.ndarray) -> np.ndarray:
        """(k, 2) points at parameters ``s`` in [0, 1], metres."""
        s = np.asarray(s, dtype=float)
        if self.kind == "arc":
            angle = self.start_rad + self.sweep_rad * s
            return np.column_stack([self.centre[0] + self.radius * np.cos(angle),
                                    self.centre[1] + self.radius * np.sin(angle)])
        a, b = np.asarray(self.start), np.asarray(self.end)
        return a[None, :] + s[:, None] * (b - a)[None, :]

    def tangent_at(self, s: float) -> np.ndarray:
        """Unit tangent (direction of travel) at parameter ``s``."""
        if self.kind == "arc":
            angle = self.start_rad + self.sweep_rad * s
            sign = 1.0 if self.sweep_rad > 0 else -1.0
            return sign * np.array([-math.sin(angle), math.cos(angle)])
        d = np.asarray(self.end) - np.asarray(self.start)
        return d / math.hypot(*d)


def _turn(a: np.ndarray, b: np.ndarray) -> float:
    """Signed turn (left positive) from direction ``a`` to direction ``b``, radians."""
    return math.atan2(a[0] * b[1] - a[1] * b[0], a[0] * b[0] + a[1] * b[1])


def _runs(ring: BoundaryRing) -> list[tuple[int, int]]:
    """Edge index runs [i, j) that form one piece (same arc, or collinear straight edges)."""
    pts = ring.points
    n_edges = len(pts) if ring.closed else len(pts) - 1
    q = np.roll(pts, -1, axis=0)[:n_edges] if ring.closed else pts[1:]
    p = pts[:n_edges]
    d = q - p
    radii, centres = ring.edge_arc_radii, ring.edge_arc_centres

    def same(e: int, f: int) -> bool:
        if np.isnan(radii[e]) != np.isnan(radii[f]):
            return False
        if not np.isnan(radii[e]):
            return bool(abs(radii[e] - radii[f]) <= 1e-9 * radii[e]
                        and math.dist(centres[e], centres[f]) <= 1e-9 * radii[e])
        return abs(_turn(d[e], d[f])) <= SMOOTH_TURN_RAD

    breaks = [e for e in range(1 if not ring.closed else 0, n_edges) if not same(e - 1, e)]
    if not ring.closed:
        breaks = [0] + breaks
    if not breaks:  # a closed ring of one piece (a full circle)
        return [(0, n_edges)]
    runs = []
    for k, b in enumerate(breaks):
        nxt = breaks[k + 1] if k + 1 < len(breaks) else (breaks[0] + n_edges if ring.closed else n_edges)
        runs.append((b, nxt))
    return runs


def _piece(ring: BoundaryRing, ring_index: int, run: tuple[int, int]) -> Piece:
    pts = ring.points
    n = len(pts)
    e0, e1 = run
    idx = [(e0 + k) % n for k in range(e1 - e0 + 1)]
    chain = pts[idx]
    radius = ring.edge_arc_radii[e0 % len(ring.edge_arc_radii)]
    start = (float(chain[0, 0]), float(chain[0, 1]))
    end = (float(chain[-1, 0]), float(chain[-1, 1]))
    strip = not ring.closed
    if np.isnan(radius):
        return Piece("line", ring.conductor_index, ring_index, strip, start, end)
    c = ring.edge_arc_centres[e0 % len(ring.edge_arc_centres)]
    rel = chain - c[None, :]
    angles = np.arctan2(rel[:, 1], rel[:, 0])
    steps = np.angle(np.exp(1j * np.diff(angles)))
    return Piece("arc", ring.conductor_index, ring_index, strip, start, end, centre=(float(c[0]), float(c[1])),
                 radius=float(radius), start_rad=float(angles[0]), sweep_rad=float(steps.sum()))


def _with_openings(pieces: list[Piece], closed: bool) -> list[Piece]:
    """Set the field region's opening angle at each junction (pi + turn on a closed outline)."""
    from dataclasses import replace

    if closed and len(pieces) == 1 and pieces[0].kind == "arc" and abs(abs(pieces[0].sweep_rad) - 2 * math.pi) < 1e-9:
        return [replace(pieces[0], opening_start_rad=None, opening_end_rad=None)]
    out = list(pieces)
    m = len(pieces)
    for k in range(m):
        nxt = (k + 1) % m
        if not closed and nxt == 0:
            continue
        turn = _turn(pieces[k].tangent_at(1.0), pieces[nxt].tangent_at(0.0))
        beta = math.pi + (turn if closed else abs(turn))
        out[k] = replace(out[k], opening_end_rad=beta)
        out[nxt] = replace(out[nxt], opening_start_rad=beta)
    if not closed:
        out[0] = replace(out[0], opening_start_rad=2 * math.pi)
        out[-1] = replace(out[-1], opening_end_rad=2 * math.pi)
    return out


def boundary_pieces(model: Model) -> list[Piece]:
    """Every conductor outline of ``model`` as exact pieces, in conductor and ring order.

    Raises InvalidGeometryError (from the geometry stage) for bad shapes or touching conductors.
    """
    geoms = conductor_geometries(model, PIECE_ARC_STEP_RAD)
    arcs = conductor_arcs(model)
    pieces: list[Piece] = []
    ring_index = 0
    for k, g in enumerate(geoms):
        for ring in boundary_rings(k, g, arcs[k]):
            ring_pieces = [_piece(ring, ring_index, run) for run in _runs(ring)]
            pieces.extend(_with_openings(ring_pieces, ring.closed))
            ring_index += 1
    return pieces


__all__ = ["Piece", "boundary_pieces"]
