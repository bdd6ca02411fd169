"""Conductor outlines as paths parametrised by arc length, with the equilibrium charge along them.

The independent cross-checks move points along the outline of a conductor (or of conductors
tied together). Each boundary curve is one :class:`OutlinePiece`: a polygon (closed) or a
polyline (a zero-thickness strip, open), whose vertices are the end points of the solver's
panels, so the outline is exactly the boundary the solver charged. A point on a piece is named
by its arc length ``s`` (metres) from the piece's first vertex; on a closed piece ``s`` wraps
around. A boundary curve with corners (a turn of more than :data:`CORNER_TURN_RAD` at a vertex)
is cut at each corner into open pieces: the energy of points that cross a corner has a kink there,
which stalls a gradient optimiser, while a point held between two corners moves smoothly. A
convex corner (where the equilibrium charge density is unbounded) and the free end of a strip
are *pinned*: the Fekete points sit there once N is large enough (the end points of a segment
are always among them), so they are held there and the optimiser moves the others. The equilibrium charge of each piece (from :func:`solver.equilibrium_charge`) sets
how many points it receives and where they start.
"""

from __future__ import annotations

import itertools
from dataclasses import dataclass
from functools import cached_property

import numpy as np

from solver.figures.equilibrium import EquilibriumCharge

#: Turning angle at a vertex above which the outline is cut into separate pieces there.
CORNER_TURN_RAD = np.radians(5.0)


@dataclass(frozen=True)
class OutlinePiece:
    """One boundary curve, metres.

    Attributes
    ----------
    vertices : (k, 2) vertices; a closed piece does not repeat its first vertex.
    closed : True for the outline of a solid, False for a strip.
    charge_fraction : share of the equilibrium charge on this piece (0 to 1).
    cumulative_charge : (k_edges + 1,) equilibrium charge (fraction of the whole) from the
        first vertex to each vertex along the piece, so charge steps map to arc lengths.
    pinned : (start, end): whether the first / last vertex of an open piece is a pinned
        corner or strip end owned by this piece (a corner is owned by the piece after it).
    ring : index of the boundary ring the piece belongs to (pieces of a ring are consecutive).
    """

    vertices: np.ndarray
    closed: bool
    charge_fraction: float
    cumulative_charge: np.ndarray
    pinned: tuple[bool, bool] = (False, False)
    ring: int = 0

    @cached_property
    def path(self) -> np.ndarray:
        """(k_edges + 1, 2) vertices in order, the first repeated at the end when closed."""
        return np.vstack([self.vertices, self.vertices[:1]]) if self.closed else self.vertices

    @cached_property
    def cumulative_length_m(self) -> np.ndarray:
        """(k_edges + 1,) arc length from the first vertex to each vertex of :attr:`path`."""
        return np.concatenate([[0.0], np.cumsum(np.hypot(*np.diff(self.path, axis=0).T))])

    @property
    def length_m(self) -> float:
        return float(self.cumulative_length_m[-1])

    def wrapped(self, s: np.ndarray) -> np.ndarray:
        """Arc lengths brought into [0, length]: wrapped on a closed piece, clipped on a strip."""
        s = np.asarray(s, dtype=float)
        return np.mod(s, self.length_m) if self.closed else np.clip(s, 0.0, self.length_m)

    def points_at(self, s: np.ndarray) -> tuple[np.ndarray, np.ndarray]:
        """Points (m, 2) and unit tangents (m, 2) at arc lengths ``s`` (m,), metres."""
        s = self.wrapped(s)
        cum = self.cumulative_length_m
        edge = np.clip(np.searchsorted(cum, s, side="right") - 1, 0, len(cum) - 2)
        start, step = self.path[edge], self.path[edge + 1] - self.path[edge]
        edge_len = cum[edge + 1] - cum[edge]
        t = (s - cum[edge]) / edge_len
        return start + t[:, None] * step, step / edge_len[:, None]

    def arc_at_charge(self, fractions: np.ndarray) -> np.ndarray:
        """Arc lengths where the charge from the first vertex reaches ``fractions`` of this piece's charge."""
        cum = self.cumulative_charge
        target = cum[0] + np.asarray(fractions, dtype=float) * (cum[-1] - cum[0])
        return np.interp(target, cum, self.cumulative_length_m)


@dataclass(frozen=True)
class Outline:
    """All boundary curves of the conductors taken together, with their equilibrium charge."""

    pieces: tuple[OutlinePiece, ...]

    @cached_property
    def diameter_m(self) -> float:
        """Diagonal of the bounding box, metres (the length scale of the numerics)."""
        pts = np.vstack([p.vertices for p in self.pieces])
        return float(np.hypot(*(pts.max(axis=0) - pts.min(axis=0))))

    @property
    def n_pinned(self) -> int:
        """Number of pinned corners and strip ends."""
        return sum(int(p.pinned[0]) + int(p.pinned[1]) for p in self.pieces)

    def allocate(self, n_points: int, pins: np.ndarray) -> np.ndarray:
        """How many of ``n_points`` each piece gets besides its ``pins`` (per piece), by charge.

        Each piece's share of ``n_points`` is in proportion to its equilibrium charge; its pins
        count towards it, and the rest is rounded by largest remainders.
        """
        n_free = n_points - int(np.sum(pins))
        share = np.clip(np.array([p.charge_fraction for p in self.pieces]) * n_points - pins, 0.0, None)
        share *= n_free / share.sum() if share.sum() > 0 else 0.0
        counts = np.floor(share).astype(int)
        order = np.argsort(-(share - counts), kind="stable")
        counts[order[: n_free - counts.sum()]] += 1
        return counts

    def neighbours(self) -> list[tuple[int, int]]:
        """Ordered pairs (a, b) of pieces that meet at a corner (consecutive pieces of one ring)."""
        pairs = []
        for ring in sorted({p.ring for p in self.pieces}):
            idx = [k for k, p in enumerate(self.pieces) if p.ring == ring]
            closed_ring = not self.pieces[idx[-1]].pinned[1] and len(idx) > 2
            links = list(itertools.pairwise(idx)) + ([(idx[-1], idx[0])] if closed_ring else [])
            pairs += links + [(b, a) for a, b in links]
        return pairs


def _turns(path: np.ndarray) -> np.ndarray:
    """Turning angle (rad, left positive) at the interior vertices of a polyline ``path`` (k, 2)."""
    a, b = path[1:-1] - path[:-2], path[2:] - path[1:-1]
    return np.arctan2(a[:, 0] * b[:, 1] - a[:, 1] * b[:, 0], np.einsum("ij,ij->i", a, b))


def _split_at_corners(path: np.ndarray, cumulative: np.ndarray, closed: bool, ring: int) -> list[OutlinePiece]:
    """Pieces of one ring (``path`` repeats its first vertex when closed), cut at its corners."""
    if closed:
        # Material on the left: a convex corner turns left. Vertex 0 is judged with the one before it.
        turn = _turns(np.vstack([path[-2:-1], path]))[: len(path) - 1]
        corners = np.flatnonzero(np.abs(turn) > CORNER_TURN_RAD)
        if len(corners) == 0:
            return [OutlinePiece(path[:-1], True, float(cumulative[-1] - cumulative[0]), cumulative, ring=ring)]
        # rotate so the ring starts at its first corner; charge keeps adding along the way round
        c0 = corners[0]
        total = cumulative[-1]
        path = np.vstack([path[c0:-1], path[: c0 + 1]])
        cumulative = np.concatenate([cumulative[c0:-1], cumulative[: c0 + 1] + total])
        cuts = np.concatenate([corners - c0, [len(path) - 1]])
        pin_start = turn[corners] > CORNER_TURN_RAD
        pin_end = np.zeros(len(corners), dtype=bool)
    else:
        bends = 1 + np.flatnonzero(np.abs(_turns(path)) > CORNER_TURN_RAD)  # charge on both sides: convex
        cuts = np.concatenate([[0], bends, [len(path) - 1]])
        pin_start = np.ones(len(cuts) - 1, dtype=bool)
        pin_end = np.arange(len(cuts) - 1) == len(cuts) - 2
    pieces = []
    for a, b, ps, pe in zip(cuts[:-1], cuts[1:], pin_start, pin_end):
        cum = cumulative[a : b + 1]
        pieces.append(OutlinePiece(path[a : b + 1], False, float(cum[-1] - cum[0]), cum, (bool(ps), bool(pe)), ring))
    return pieces


def outline_of(equilibrium: EquilibriumCharge) -> Outline:
    """The outline the solver charged, from its equilibrium solution, cut at corners.

    Panels of one ring follow each other from the ring's first vertex (see
    :func:`solver.discretize_boundary`), so their end points trace the ring in order.
    """
    mesh = equilibrium.mesh
    charge = np.clip(equilibrium.density_per_coulomb, 0.0, None) * mesh.lengths
    charge = charge / charge.sum()
    pieces: list[OutlinePiece] = []
    for ring in np.unique(mesh.ring_index):
        mine = np.flatnonzero(mesh.ring_index == ring)
        closed = not bool(mesh.is_strip[mine[0]])
        path = np.vstack([mesh.starts[mine], mesh.ends[mine[-1:]]])
        cumulative = np.concatenate([[0.0], np.cumsum(charge[mine])])
        pieces.extend(_split_at_corners(path, cumulative, closed, int(ring)))
    return Outline(tuple(pieces))
