"""Propagation modes of a multiconductor line from C and C0, including modes that share a velocity.

The quasi-TEM modes solve C t = eps_eff C0 t (C with the dielectrics, C0 with every eps_r = 1;
both symmetric, C0 positive definite), the generalised symmetric eigenproblem that
``scipy.linalg.eigh(C, C0)`` solves stably (C. R. Paul, Analysis of Multiconductor
Transmission Lines, Wiley, 1994, ch. 5, for the modal decomposition).

When every conductor sees one permittivity, C = eps_r C0 and every mode has the same
velocity: any voltage vector is then a mode, and the eigenvectors an eigen-solver returns are
decided by round-off (they change from mesh to mesh). The same holds inside any group of modes
whose effective permittivities agree to :data:`DEGENERACY_TOLERANCE`. Within such a group this
module takes the one basis the matrices do fix: the vectors that are orthogonal both in the
plain sense and with respect to C0 (the eigenvectors of the group's Gram matrix). With the
whole space degenerate those are exactly the eigenvectors of C -- the modes of C: for a
symmetric pair, the even and odd modes. When the Gram matrix has repeated eigenvalues as well
(a symmetric three-line arrangement, say), the modes are not defined and the result says so.
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np
import scipy.linalg

#: Effective permittivities that agree to this relative tolerance are one velocity (degenerate).
DEGENERACY_TOLERANCE = 1e-6


@dataclass(frozen=True)
class Modes:
    """Modes of a line, slowest first.

    Attributes
    ----------
    effective_permittivities : (N,) eps_eff of each mode (c / v)^2.
    voltages : (N, N) modal voltage vectors as columns, largest entry +1.
    defined : False when some modes share a velocity and the matrices leave their voltage
        vectors free (the vectors shown are then one choice among many).
    note : how the modes were chosen, in words (empty for distinct velocities).
    """

    effective_permittivities: np.ndarray
    voltages: np.ndarray
    defined: bool
    note: str


def _clusters(values: np.ndarray, tolerance: float) -> list[list[int]]:
    """Runs of sorted ``values`` that agree to ``tolerance`` (relative to the largest)."""
    scale = float(np.max(np.abs(values))) or 1.0
    groups: list[list[int]] = [[0]]
    for k in range(1, len(values)):
        if abs(values[k] - values[groups[-1][0]]) <= tolerance * scale:
            groups[-1].append(k)
        else:
            groups.append([k])
    return groups


def _normalise(vectors: np.ndarray) -> np.ndarray:
    """Each column scaled so that its entry of largest magnitude is +1 (ties: the first)."""
    n = vectors.shape[1]
    size = np.abs(vectors)
    # ties within round-off go to the first entry (rounding to fixed digits would split ties that
    # straddle a rounding boundary, and the sign of a symmetric mode would follow the BLAS)
    rows = np.argmax(size >= size.max(axis=0, keepdims=True) * (1 - 1e-9), axis=0)
    return vectors / vectors[rows, np.arange(n)][None, :]


def modes_of(capacitance_F_per_m: np.ndarray, capacitance_vacuum_F_per_m: np.ndarray,
             tolerance: float = DEGENERACY_TOLERANCE) -> Modes:
    """Modes of C t = eps_eff C0 t, slowest first, with a stable choice where velocities coincide.

    Parameters
    ----------
    capacitance_F_per_m, capacitance_vacuum_F_per_m : (N, N) array
        Maxwell capacitance matrices with the dielectrics and with every eps_r = 1, F/m
        (symmetrised here).
    tolerance : float
        Relative tolerance on eps_eff below which modes share a velocity.

    Returns
    -------
    Modes

    Examples
    --------
    >>> import numpy as np
    >>> c0 = np.array([[50.0, -10.0], [-10.0, 50.0]]) * 1e-12
    >>> m = modes_of(2.0 * c0, c0)  # one medium: every mode at one velocity
    >>> m.defined, m.voltages.round(3).tolist()
    (True, [[1.0, 1.0], [1.0, -1.0]])
    """
    c = np.asarray(capacitance_F_per_m, dtype=float)
    c0 = np.asarray(capacitance_vacuum_F_per_m, dtype=float)
    c, c0 = 0.5 * (c + c.T), 0.5 * (c0 + c0.T)
    lam, vecs = scipy.linalg.eigh(c, c0)
    order = np.argsort(-lam, kind="stable")  # slowest (largest eps_eff) first
    lam, vecs = lam[order], vecs[:, order]
    defined, shared = True, []
    for group in _clusters(lam, tolerance):
        if len(group) < 2:
            continue
        shared.append(group)
        basis = vecs[:, group]  # C0-orthonormal basis of the group's subspace
        gram = basis.T @ basis
        mu, rot = np.linalg.eigh(gram)
        if np.min(np.diff(mu)) <= 1e-9 * max(float(np.max(np.abs(mu))), 1e-300):
            defined = False
        vecs[:, group] = basis @ rot[:, ::-1]
        lam[group] = float(np.mean(lam[group]))
    vecs = _normalise(vecs)
    if not shared:
        note = ""
    elif len(shared) == 1 and len(shared[0]) == len(lam):
        note = ("every mode has the same velocity (all conductors in one permittivity); the modes shown are "
                "the eigenvectors of C" + ("" if defined else ", which are not unique here either: modal "
                                           "voltages and impedances are not defined"))
    else:
        listed = "; ".join(", ".join(str(k + 1) for k in g) for g in shared)
        note = (f"modes {listed} share a velocity; within each such group the vectors orthogonal both plainly "
                "and with respect to C0 are shown" + ("" if defined else ", which are not unique here: those "
                                                      "modal voltages and impedances are not defined"))
    return Modes(lam, vecs, defined, note)
