"""Fekete points: N points on an outline placed to maximise the product of their mutual distances.

For a compact set E the N-th diameter

    delta_N(E) = max over z_1..z_N in E of ( prod_{i<j} |z_i - z_j| )^(2 / (N (N - 1)))

does not increase with N and tends to the logarithmic capacity cap(E) (Fekete 1923; Szego 1924;
T. Ransford, Potential Theory in the Complex Plane, 1995, Theorem 5.5.2). The maximising points,
the Fekete points, spread like the equilibrium charge: they crowd at edges and corners.

Here the points move along the outline by arc length (:mod:`solver.cross_check.outline`) so
they stay on it, and a quasi-Newton optimiser (scipy L-BFGS-B with the exact gradient) climbs
from a good start: points at equal steps of the solver's equilibrium charge. Distances are
scaled by the outline's diameter, which changes delta_N only by that factor.
"""

from __future__ import annotations

import logging
import math
from dataclasses import dataclass

import numpy as np
import scipy.optimize

from solver.cross_check.outline import Outline

logger = logging.getLogger(__name__)


@dataclass(frozen=True)
class FeketePoints:
    """Fekete points of an outline and their N-th diameter.

    Attributes
    ----------
    points_m : (N, 2) the points, metres.
    piece_index : (N,) which outline piece each point lies on.
    arc_length_m : (N,) arc length of each point along its piece, metres.
    nth_diameter_m : geometric mean of the mutual distances, metres.
    start_diameter_m : the same for the starting points (equal steps of equilibrium charge).
    converged : whether the optimiser reported convergence.
    """

    points_m: np.ndarray
    piece_index: np.ndarray
    arc_length_m: np.ndarray
    nth_diameter_m: float
    start_diameter_m: float
    converged: bool

    @property
    def n_points(self) -> int:
        return len(self.points_m)


def nth_diameter_m(points_m: np.ndarray) -> float:
    """Geometric mean of the N (N - 1) / 2 mutual distances of ``points_m`` (N, 2), metres.

    >>> round(nth_diameter_m(np.array([[1.0, 0.0], [-1.0, 0.0]])), 12)
    2.0
    """
    pts = np.asarray(points_m, dtype=float)
    n = len(pts)
    if n < 2:
        raise ValueError(f"The N-th diameter needs at least 2 points, got {n}.")
    i, j = np.triu_indices(n, 1)
    d = np.hypot(*(pts[i] - pts[j]).T)
    with np.errstate(divide="ignore"):
        return float(np.exp(np.mean(np.log(d))))


def starting_arcs(
    outline: Outline, n_points: int, counts: np.ndarray | None = None
) -> tuple[np.ndarray, np.ndarray, np.ndarray]:
    """Start for the optimiser: piece index, arc length (metres) and a pinned flag of ``n_points``.

    Pinned corners and strip ends are used once N leaves at least as many points to spread
    as there are pins. Every piece's points sit at equal steps of its equilibrium charge,
    its pinned ends included. ``counts`` (free points per piece) overrides the allocation by charge.
    """
    use_pins = n_points - outline.n_pinned >= outline.n_pinned
    pins = np.array([int(p.pinned[0]) + int(p.pinned[1]) if use_pins else 0 for p in outline.pieces])
    if counts is None:
        counts = outline.allocate(n_points, pins)
    piece, arcs, pinned = [], [], []
    for k, (p, m) in enumerate(zip(outline.pieces, counts)):
        first, last = (p.pinned if use_pins else (False, False))
        slots = m + int(first) + int(last)
        if slots == 0:
            continue
        if first and last:
            fractions = np.linspace(0.0, 1.0, slots)
        elif first:
            fractions = np.arange(slots) / slots
        elif last:
            fractions = (np.arange(slots) + 1.0) / slots
        else:
            fractions = (np.arange(slots) + 0.5) / slots
        fixed = np.zeros(slots, dtype=bool)
        fixed[0] |= first
        fixed[-1] |= last
        piece.append(np.full(slots, k))
        arcs.append(p.arc_at_charge(fractions))
        pinned.append(fixed)
    return np.concatenate(piece), np.concatenate(arcs), np.concatenate(pinned)


class _Energy:
    """Logarithmic energy -sum_{i<j} ln|z_i - z_j| as a function of the free points' arc lengths.

    Lengths are scaled by the outline's diameter; the pinned points stay where they are.
    """

    def __init__(self, outline: Outline, piece_index: np.ndarray, arcs_m: np.ndarray, pinned: np.ndarray) -> None:
        self.scale = outline.diameter_m
        self.pieces = outline.pieces
        self.free = np.flatnonzero(~pinned)
        self.groups = [(k, np.flatnonzero(piece_index[self.free] == k)) for k in np.unique(piece_index[self.free])]
        self.z = np.empty((len(piece_index), 2))
        for k in np.unique(piece_index):
            idx = np.flatnonzero(piece_index == k)
            self.z[idx] = self.pieces[k].points_at(arcs_m[idx])[0] / self.scale

    def points(self, free_arcs_scaled: np.ndarray) -> tuple[np.ndarray, np.ndarray]:
        """All points (scaled) and the unit tangents at the free ones."""
        z = self.z.copy()
        tangent = np.empty((len(self.free), 2))
        for k, idx in self.groups:
            pts, tangent[idx] = self.pieces[k].points_at(free_arcs_scaled[idx] * self.scale)
            z[self.free[idx]] = pts / self.scale
        return z, tangent

    def __call__(self, free_arcs_scaled: np.ndarray) -> tuple[float, np.ndarray]:
        z, tangent = self.points(free_arcs_scaled)
        diff = z[:, None, :] - z[None, :, :]
        r2 = np.einsum("ijk,ijk->ij", diff, diff)
        np.fill_diagonal(r2, 1.0)
        r2 = np.maximum(r2, 1e-300)
        energy = -0.25 * float(np.sum(np.log(r2)))  # each pair twice, ln r = ln(r^2) / 2
        pull = diff[self.free] / r2[self.free][:, :, None]
        grad = -np.einsum("ijk,ik->i", pull, tangent)
        return energy, grad


def _optimise(outline: Outline, piece_index: np.ndarray, arcs: np.ndarray, pinned: np.ndarray,
              tolerance: float, max_iterations: int) -> tuple[float, float, np.ndarray, np.ndarray, bool]:
    """(energy at start, best energy, all points (scaled), arc lengths (m), converged)."""
    energy = _Energy(outline, piece_index, arcs, pinned)
    scale = outline.diameter_m
    x0 = arcs[~pinned] / scale
    bounds = [(None, None) if outline.pieces[k].closed else (0.0, outline.pieces[k].length_m / scale)
              for k in piece_index[~pinned]]
    start = energy(x0)[0]
    x, best, converged = x0, start, True
    if len(x0):
        result = scipy.optimize.minimize(
            energy, x0, jac=True, method="L-BFGS-B", bounds=bounds,
            options={"ftol": tolerance, "gtol": 1e-10, "maxiter": max_iterations, "maxcor": 30},
        )
        converged = bool(result.success)
        if result.fun < start:
            x, best = result.x, float(result.fun)
    z, _ = energy.points(x)
    arcs = arcs.copy()
    for k, idx in energy.groups:
        arcs[energy.free[idx]] = outline.pieces[k].wrapped(x[idx] * scale)
    return start, best, z, arcs, converged


def fekete_points(
    outline: Outline, n_points: int, *, tolerance: float = 1e-13, max_iterations: int = 3000, max_moves: int | None = None
) -> FeketePoints:
    """Fekete points of ``outline`` found by L-BFGS-B from equal steps of the equilibrium charge.

    Parameters
    ----------
    outline : Outline
        The conductor outline with its equilibrium charge (:func:`outline_of`).
    n_points : int
        N, at least 2.
    tolerance : float
        Relative change of the energy at which the optimiser stops.
    max_iterations : int
        Optimiser iterations at most, per run.
    max_moves : int, optional
        Rounds of moving one point across a corner to the neighbouring piece (kept when the
        product of distances grows). By default a few rounds for N <= 16, where a point more or
        less on a side matters and the trials are cheap, and none above: the allocation by
        charge is within about 1e-4 of the best found on squares and triangles for N >= 16.

    Returns
    -------
    FeketePoints

    Notes
    -----
    Each point moves along its own outline piece (between corners), where the energy is smooth.
    The number of points on each piece starts from its equilibrium charge; then single points are
    moved across corners while that helps. Convex corners and strip ends hold a point each once N is
    at least twice their number. Like any optimiser this finds a local maximum: the N-th diameter
    returned is a lower bound of the true one.
    """
    if n_points < 2:
        raise ValueError(f"Fekete points need N >= 2, got {n_points}.")
    if max_moves is None:
        max_moves = 2 * len(outline.pieces) if n_points <= 16 else 0
    piece_index, arcs, pinned = starting_arcs(outline, n_points)
    start, best, z, arcs, converged = _optimise(outline, piece_index, arcs, pinned, tolerance, max_iterations)
    counts = np.bincount(piece_index[~pinned], minlength=len(outline.pieces))
    for _ in range(max_moves):
        trials = []
        for a, b in outline.neighbours():
            if counts[a] == 0:
                continue
            moved = counts.copy()
            moved[a] -= 1
            moved[b] += 1
            layout = starting_arcs(outline, n_points, moved)
            trials.append((_optimise(outline, *layout, tolerance, max_iterations), layout[0], layout[2], moved))
        better = [t for t in trials if t[0][1] < best - 1e-12 * abs(best)]
        if not better:
            break
        (_, best, z, arcs, converged), piece_index, pinned, counts = min(better, key=lambda t: t[0][1])
    if not converged:
        logger.info("Fekete optimiser did not report convergence at N = %d", n_points)
    scale = outline.diameter_m
    pairs = n_points * (n_points - 1) / 2
    return FeketePoints(z * scale, piece_index, arcs, scale * math.exp(-best / pairs),
                        scale * math.exp(-start / pairs), converged)
