"""Chebyshev constant: the sup norm of the Fekete polynomial over the outline, to the power 1/N.

For the Fekete points z_1..z_N of a compact set E, the Fekete polynomial
F_N(z) = prod (z - z_i) is monic, so its sup norm over E is at least the least norm of a monic
polynomial of degree N (attained by the Chebyshev polynomial of E), which in turn is at least
cap(E)^N (Szego's inequality); and ||F_N||_E^(1/N) tends to cap(E) (Fekete-Szego; T. Ransford,
Potential Theory in the Complex Plane, 1995, Theorems 5.5.4 and 5.5.7). Every value here is
therefore an upper bound of the capacity, less only the sampling of the sup norm.

By the maximum principle the sup over E is the sup over its outline. The outline is sampled
finely between neighbouring Fekete points (where |F_N| peaks) and at every vertex; the sampling
misses the peak by a relative amount far below 1/N, which the N-th root shrinks further.
"""

from __future__ import annotations

import math

import numpy as np

from solver.cross_check.fekete import FeketePoints
from solver.cross_check.outline import Outline

#: Samples of the outline between two neighbouring Fekete points.
SAMPLES_PER_GAP = 32

#: Largest number of (sample, root) pairs evaluated at once.
CHUNK_PAIRS = 2_000_000


def log_abs_monic(points_m: np.ndarray, roots_m: np.ndarray) -> np.ndarray:
    """ln|prod (z - root)| at ``points_m`` (m, 2) for ``roots_m`` (N, 2), lengths in metres.

    Evaluated as a sum of logarithms (no overflow at large N). -inf at a root.
    """
    pts = np.asarray(points_m, dtype=float).reshape(-1, 2)
    roots = np.asarray(roots_m, dtype=float).reshape(-1, 2)
    out = np.empty(len(pts))
    step = max(1, CHUNK_PAIRS // max(1, len(roots)))
    with np.errstate(divide="ignore"):
        for i in range(0, len(pts), step):
            d = pts[i : i + step, None, :] - roots[None, :, :]
            out[i : i + step] = 0.5 * np.sum(np.log(np.einsum("ijk,ijk->ij", d, d)), axis=1)
    return out


def outline_samples_m(outline: Outline, fekete: FeketePoints, per_gap: int = SAMPLES_PER_GAP) -> np.ndarray:
    """(m, 2) points of the outline: every vertex, and ``per_gap`` steps between neighbouring Fekete points.

    A piece without Fekete points (say a hole, which carries no charge) is sampled at its
    vertices and at 8 * ``per_gap`` equal steps.
    """
    out = []
    for k, piece in enumerate(outline.pieces):
        out.append(piece.vertices)
        arcs = np.sort(fekete.arc_length_m[fekete.piece_index == k])
        length = piece.length_m
        ends = [] if piece.closed else [0.0, length]
        knots = np.unique(np.concatenate([arcs, ends]))
        if len(knots) == 0 or (piece.closed and len(knots) == 1):
            s = np.linspace(0.0, length, 8 * per_gap, endpoint=not piece.closed)
        else:
            if piece.closed:
                knots = np.append(knots, knots[0] + length)
            t = np.arange(per_gap) / per_gap
            s = (knots[:-1, None] + t[None, :] * np.diff(knots)[:, None]).ravel()
        out.append(piece.points_at(s)[0])
    return np.vstack(out)


def fekete_polynomial_norm_root_m(outline: Outline, fekete: FeketePoints, per_gap: int = SAMPLES_PER_GAP) -> float:
    """||F_N||^(1/N) over the outline, metres: the Chebyshev-constant estimate at degree N.

    Parameters
    ----------
    outline : Outline
        The conductor outline (:func:`solver.cross_check.outline.outline_of`).
    fekete : FeketePoints
        Its Fekete points: the roots of F_N.
    per_gap : int
        Samples between neighbouring roots.

    Returns
    -------
    float
        An upper bound of the logarithmic capacity (less the sampling), metres.
    """
    samples = outline_samples_m(outline, fekete, per_gap)
    scale = outline.diameter_m
    log_norm = float(np.max(log_abs_monic(samples / scale, fekete.points_m / scale)))
    return scale * math.exp(log_norm / fekete.n_points)
