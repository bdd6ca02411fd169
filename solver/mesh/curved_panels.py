"""High-order panels on exact outlines: Gauss-Legendre nodes on straight segments and arcs.

Each :class:`~solver.mesh.curved_pieces.Piece` is divided into panels, each an interval
[s0, s1] of the piece's parameter. A panel is mapped to t in [-1, 1]:

* straight: y(t) = m + t (b - a) / 2, m the panel's midpoint, a and b its ends;
* arc: y(t) = c + R exp(i (theta_m + alpha t)), alpha half the panel's signed sweep.

Panels carry ``order`` Gauss-Legendre nodes (common practice for Nystrom discretisations of
boundary integral equations on smooth curves). Toward a sharp corner or a strip end the
panels shrink geometrically (each panel ``grading_ratio`` times smaller than the one before,
down to ``smallest_fraction`` of the first), so that the singular density there is resolved
(geometric grading; see e.g. Helsing & Ojala, "Corner singularities for elliptic problems:
integral equations, graded meshes, quadrature, and compressed inverse preconditioning",
J. Comput. Phys. 227, 2008).
"""

from __future__ import annotations

import math
from collections.abc import Callable
from dataclasses import dataclass
from functools import cached_property

import numpy as np

from solver.mesh.budget import check_panel_budget
from solver.mesh.curved_pieces import Piece

#: Nodes per panel.
DEFAULT_ORDER = 16

#: Panels graded toward a tangent-continuous joint (an arc meeting a straight edge).
SMOOTH_JOINT_LEVELS = 1

#: A junction whose field region's opening differs from pi by more than this is graded toward (radians).
GRADED_OPENING_RAD = 1e-6


def gauss_legendre(order: int) -> tuple[np.ndarray, np.ndarray]:
    """Gauss-Legendre nodes and weights on [-1, 1] (numpy's ``leggauss``)."""
    return _GL.setdefault(order, np.polynomial.legendre.leggauss(order))


_GL: dict[int, tuple[np.ndarray, np.ndarray]] = {}


@dataclass(frozen=True)
class CurvedPanels:
    """Panels on exact conductor outlines, with Gauss-Legendre nodes, metres.

    Attributes
    ----------
    pieces : the outline pieces the panels lie on.
    piece_index : (P,) piece of each panel; s0, s1 : (P,) its parameter interval on the piece.
    order : nodes per panel.
    """

    pieces: tuple[Piece, ...]
    piece_index: np.ndarray
    s0: np.ndarray
    s1: np.ndarray
    order: int = DEFAULT_ORDER

    @property
    def n_panels(self) -> int:
        return len(self.piece_index)

    @property
    def n_nodes(self) -> int:
        return self.n_panels * self.order

    # ---- panel geometry (t in [-1, 1]) ------------------------------------------------------
    @cached_property
    def is_arc(self) -> np.ndarray:
        return np.array([self.pieces[k].kind == "arc" for k in self.piece_index], dtype=bool)

    @cached_property
    def conductor_index(self) -> np.ndarray:
        return np.array([self.pieces[k].conductor_index for k in self.piece_index], dtype=int)

    @cached_property
    def ring_index(self) -> np.ndarray:
        return np.array([self.pieces[k].ring_index for k in self.piece_index], dtype=int)

    @cached_property
    def is_strip(self) -> np.ndarray:
        return np.array([self.pieces[k].is_strip for k in self.piece_index], dtype=bool)

    def _piece_values(self, name: str, default: float) -> np.ndarray:
        return np.array([getattr(self.pieces[k], name) if self.pieces[k].kind == "arc" else default
                         for k in self.piece_index], dtype=float)

    @cached_property
    def centres(self) -> np.ndarray:
        """(P, 2) arc centres (NaN on straight panels)."""
        return np.array([self.pieces[k].centre for k in self.piece_index], dtype=float).reshape(-1, 2)

    @cached_property
    def radii(self) -> np.ndarray:
        """(P,) arc radii (NaN on straight panels)."""
        return self._piece_values("radius", math.nan)

    @cached_property
    def theta_mid(self) -> np.ndarray:
        """(P,) angle of the panel's middle on its arc (0 on straight panels)."""
        a0, sw = self._piece_values("start_rad", 0.0), self._piece_values("sweep_rad", 0.0)
        return a0 + sw * 0.5 * (self.s0 + self.s1)

    @cached_property
    def half_sweep(self) -> np.ndarray:
        """(P,) alpha: half the signed sweep of an arc panel (0 on straight panels)."""
        return self._piece_values("sweep_rad", 0.0) * 0.5 * (self.s1 - self.s0)

    @cached_property
    def ends(self) -> tuple[np.ndarray, np.ndarray]:
        """Start and end points (P, 2) of every panel."""
        a = np.zeros((self.n_panels, 2))
        b = np.zeros((self.n_panels, 2))
        for k in np.unique(self.piece_index):
            on = self.piece_index == k
            a[on] = self.pieces[k].points(self.s0[on])
            b[on] = self.pieces[k].points(self.s1[on])
        return a, b

    @cached_property
    def lengths(self) -> np.ndarray:
        """(P,) panel lengths along the outline, metres."""
        chord = np.hypot(*(self.ends[1] - self.ends[0]).T)
        return np.where(self.is_arc, np.abs(2 * self.half_sweep) * np.nan_to_num(self.radii), chord)

    def points_at(self, t: np.ndarray) -> np.ndarray:
        """(P, k, 2) points at panel parameters ``t`` (k,) in [-1, 1]."""
        a, b = self.ends
        mid, half = 0.5 * (a + b), 0.5 * (b - a)
        line = mid[:, None, :] + t[None, :, None] * half[:, None, :]
        angle = self.theta_mid[:, None] + self.half_sweep[:, None] * t[None, :]
        r = np.nan_to_num(self.radii)[:, None]
        c = np.nan_to_num(self.centres)
        arc = np.stack([c[:, None, 0] + r * np.cos(angle), c[:, None, 1] + r * np.sin(angle)], axis=-1)
        return np.where(self.is_arc[:, None, None], arc, line)

    # ---- nodes -----------------------------------------------------------------------------
    @cached_property
    def nodes(self) -> np.ndarray:
        """(P, order, 2) Gauss-Legendre nodes on the true outline."""
        return self.points_at(gauss_legendre(self.order)[0])

    @cached_property
    def speeds(self) -> np.ndarray:
        """(P, order) |dy/dt| at the nodes (half the panel length: both maps have constant speed)."""
        return np.repeat(0.5 * self.lengths[:, None], self.order, axis=1)

    @cached_property
    def weights(self) -> np.ndarray:
        """(P, order) arc-length quadrature weights of the nodes, metres."""
        return gauss_legendre(self.order)[1][None, :] * self.speeds

    @cached_property
    def normals(self) -> np.ndarray:
        """(P, order, 2) unit normals out of the conductor (right of the direction of travel)."""
        t = gauss_legendre(self.order)[0]
        a, b = self.ends
        d = (b - a) / np.maximum(np.hypot(*(b - a).T), 1e-300)[:, None]
        line = np.repeat(np.column_stack([d[:, 1], -d[:, 0]])[:, None, :], self.order, axis=1)
        angle = self.theta_mid[:, None] + self.half_sweep[:, None] * t[None, :]
        sign = np.sign(self.half_sweep)[:, None]
        arc = np.stack([sign * np.cos(angle), sign * np.sin(angle)], axis=-1)
        return np.where(self.is_arc[:, None, None], arc, line)

    @cached_property
    def arc_position_m(self) -> np.ndarray:
        """(P, order) distance along each conductor's outline to every node (rings in order)."""
        t = gauss_legendre(self.order)[0]
        piece_len = np.array([p.length_m for p in self.pieces])
        piece_offset = np.zeros(len(self.pieces))
        travelled: dict[int, float] = {}
        for k, p in enumerate(self.pieces):
            piece_offset[k] = travelled.get(p.conductor_index, 0.0)
            travelled[p.conductor_index] = piece_offset[k] + p.length_m
        s = self.s0[:, None] + (self.s1 - self.s0)[:, None] * 0.5 * (t[None, :] + 1.0)
        return piece_offset[self.piece_index][:, None] + s * piece_len[self.piece_index][:, None]

    def scaled(self, factor: float) -> CurvedPanels:
        """The same panels on outlines scaled by ``factor`` (lengths multiplied)."""
        return CurvedPanels(tuple(p.scaled(factor) for p in self.pieces), self.piece_index, self.s0, self.s1,
                            self.order)

    # ---- refinement ------------------------------------------------------------------------
    @cached_property
    def touches_corner(self) -> tuple[np.ndarray, np.ndarray]:
        """(P,) bool each: the panel starts / ends at a sharp corner or strip end."""
        graded_start = np.array([_graded(p.opening_start_rad) for p in self.pieces], dtype=bool)
        graded_end = np.array([_graded(p.opening_end_rad) for p in self.pieces], dtype=bool)
        return (graded_start[self.piece_index] & (self.s0 == 0.0),
                graded_end[self.piece_index] & (self.s1 == 1.0))

    def split(self, flags: np.ndarray) -> CurvedPanels:
        """A copy with every flagged panel split in two: halved, or at a quarter of its length
        from a sharp corner it touches (so that grading toward the corner goes on by 4)."""
        flags = np.asarray(flags, dtype=bool)
        at_start, at_end = self.touches_corner
        fraction = np.where(at_start & ~at_end, 0.25, np.where(at_end & ~at_start, 0.75, 0.5))
        cut = self.s0 + fraction * (self.s1 - self.s0)
        s0 = np.concatenate([self.s0[~flags], self.s0[flags], cut[flags]])
        s1 = np.concatenate([self.s1[~flags], cut[flags], self.s1[flags]])
        piece = np.concatenate([self.piece_index[~flags], self.piece_index[flags], self.piece_index[flags]])
        order = np.lexsort((s0, piece))
        return CurvedPanels(self.pieces, piece[order], s0[order], s1[order], self.order)


def _graded(beta: float | None) -> bool:
    """True at a corner (convex or re-entrant) or strip end: the density is not smooth there."""
    return beta is not None and abs(beta - math.pi) > GRADED_OPENING_RAD


def _graded_breaks(n_uniform: int, grade_start: int, grade_end: int, ratio: float) -> np.ndarray:
    """Break points in [0, 1]: ``n_uniform`` equal panels, the end panels replaced by
    ``grade_start`` / ``grade_end`` geometrically shrinking panels toward that end."""
    base = np.linspace(0.0, 1.0, n_uniform + 1)
    h = 1.0 / n_uniform
    lo = [h * ratio ** (-k) for k in range(1, grade_start + 1)]
    hi = [1.0 - h * ratio ** (-k) for k in range(1, grade_end + 1)]
    pts = np.concatenate([[0.0], lo, base[1:-1], hi, [1.0]])
    return np.unique(pts)


def curved_panels(
    pieces: list[Piece],
    panel_size_m: np.ndarray,
    max_sweep_rad: float,
    corner_levels: int | Callable[[float], int],
    grading_ratio: float = 4.0,
    order: int = DEFAULT_ORDER,
    smooth_joint_levels: int = SMOOTH_JOINT_LEVELS,
) -> CurvedPanels:
    """Divide every piece into panels of at most ``panel_size_m[piece]`` metres and
    ``max_sweep_rad`` of arc, graded toward sharp corners and strip ends by ``corner_levels``
    panels (a number, or a function of the corner's opening angle), each ``grading_ratio``
    times smaller than the one before, with ``order`` Gauss-Legendre nodes per panel.

    ``smooth_joint_levels`` panels are graded toward each tangent-continuous joint (an arc
    meeting a straight edge); 0 leaves those joints ungraded, as large models do to keep
    their unknowns few (see :mod:`solver.bem.high_order.large_models`).

    Raises
    ------
    MeshTooLargeError
        When the nodes would not fit the memory budget (:mod:`solver.mesh.budget`).
    """
    idx, s0s, s1s = [], [], []
    for k, p in enumerate(pieces):
        h = float(panel_size_m[k])
        n = max(1, math.ceil(p.length_m / h - 1e-9))
        if p.kind == "arc":
            n = max(n, math.ceil(abs(p.sweep_rad) / max_sweep_rad - 1e-9))
        levels = []
        for beta in (p.opening_start_rad, p.opening_end_rad):
            if beta is not None and _graded(beta):
                levels.append(corner_levels(beta) if callable(corner_levels) else corner_levels)
            elif beta is not None and abs(beta - math.pi) <= GRADED_OPENING_RAD:
                # Tangent-continuous joints (an arc meeting a straight edge) are graded a
                # little: the curvature jumps there and the density is less smooth.
                levels.append(smooth_joint_levels)
            else:
                levels.append(0)
        breaks = _graded_breaks(n, levels[0], levels[1], grading_ratio)
        idx.append(np.full(len(breaks) - 1, k))
        s0s.append(breaks[:-1])
        s1s.append(breaks[1:])
    piece_index = np.concatenate(idx)
    check_panel_budget(len(piece_index) * order, "the high-order panels of the outlines", "nodes")
    return CurvedPanels(tuple(pieces), piece_index, np.concatenate(s0s), np.concatenate(s1s), order)


__all__ = ["CurvedPanels", "curved_panels", "gauss_legendre", "DEFAULT_ORDER"]
