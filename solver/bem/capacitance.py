"""Capacitance-matrix forms and checks (per unit length, F/m)."""

from __future__ import annotations

import numpy as np


def mutual_from_maxwell(maxwell_F_per_m: np.ndarray) -> np.ndarray:
    """The mutual ("circuit") form of a Maxwell capacitance matrix.

    The diagonal holds each conductor's capacitance to the reference, C_ii,self = sum_j C_ij;
    off the diagonal, the capacitance between conductors i and j, C_ij,mutual = -C_ij.
    All entries of a physical matrix are then >= 0.
    """
    c = np.asarray(maxwell_F_per_m, dtype=float)
    mutual = -c.copy()
    np.fill_diagonal(mutual, c.sum(axis=1))
    return mutual


def maxwell_from_mutual(mutual_F_per_m: np.ndarray) -> np.ndarray:
    """Inverse of :func:`mutual_from_maxwell`."""
    m = np.asarray(mutual_F_per_m, dtype=float)
    maxwell = -m.copy()
    off = m.sum(axis=1) - np.diag(m)
    np.fill_diagonal(maxwell, np.diag(m) + off)
    return maxwell


def maxwell_matrix_problems(maxwell_F_per_m: np.ndarray, rtol: float = 1e-6) -> list[str]:
    """Plain-words list of ways the matrix breaks the physical pattern (empty when it is sound).

    A Maxwell matrix is symmetric, has a positive diagonal, non-positive off-diagonal
    entries and non-negative row sums.
    """
    c = np.asarray(maxwell_F_per_m, dtype=float)
    scale = np.abs(c).max() if c.size else 1.0
    problems = []
    if not np.allclose(c, c.T, rtol=0, atol=rtol * scale * 10):
        problems.append("not symmetric")
    if np.any(np.diag(c) <= 0):
        problems.append("a diagonal entry is not positive")
    off = c - np.diag(np.diag(c))
    if np.any(off > rtol * scale):
        problems.append("an off-diagonal entry is positive")
    if np.any(c.sum(axis=1) < -rtol * scale):
        problems.append("a row sum is negative")
    return problems
