"""Closed-form integrals of the 2-D logarithmic kernel over straight panels.

For a straight panel P from ``a`` to ``b`` and a target point x,

    G(x)      = integral over P of ln|x - t| ds(t)          (metres)
    grad G(x) = gradient of G with respect to x             (dimensionless)

both in closed form (exact self-terms; no quadrature near the boundary). In panel-local
coordinates (u along the panel from its midpoint, v along the right-hand normal) with
s1 = -L/2 - u, s2 = L/2 - u and r_k^2 = s_k^2 + v^2:

    G      = [s ln r - s]_{s1}^{s2} + v * theta,   theta = atan(s2/v) - atan(s1/v)
    dG/du  = ln(r1 / r2),   dG/dv = theta

On the panel's own line (v = 0) theta is taken as 0, the principal value; the jump of the
normal field across a charged panel is added by the caller.

These functions are the only place that knows the panel shape; a higher-order panel or a
fast multipole method would replace them behind the same signatures.
"""

from __future__ import annotations

import numpy as np

#: Largest number of (target, panel) pairs evaluated at once, to bound memory.
CHUNK_PAIRS = 250_000


def _local(targets: np.ndarray, starts: np.ndarray, ends: np.ndarray):
    d = ends - starts
    length = np.hypot(d[:, 0], d[:, 1])
    t = d / length[:, None]
    n = np.column_stack([t[:, 1], -t[:, 0]])
    rel = targets[:, None, :] - 0.5 * (starts + ends)[None, :, :]
    u = rel[..., 0] * t[None, :, 0] + rel[..., 1] * t[None, :, 1]
    v = rel[..., 0] * n[None, :, 0] + rel[..., 1] * n[None, :, 1]
    half = 0.5 * length[None, :]
    s1, s2 = -half - u, half - u
    return t, n, s1, s2, v


def _theta(s1: np.ndarray, s2: np.ndarray, v: np.ndarray) -> np.ndarray:
    theta = np.arctan2(v * (s2 - s1), v * v + s1 * s2)
    return np.where(v == 0.0, 0.0, theta)


def _xlogr2(s: np.ndarray, r2: np.ndarray) -> np.ndarray:
    with np.errstate(divide="ignore", invalid="ignore"):
        return np.where(r2 > 0.0, s * np.log(r2), 0.0)


def log_potential_integrals(targets: np.ndarray, starts: np.ndarray, ends: np.ndarray) -> np.ndarray:
    """G[i, j] = integral of ln|x_i - t| over panel j (metres).

    Parameters
    ----------
    targets : (m, 2) points, metres.
    starts, ends : (n, 2) panel end points, metres.

    Returns
    -------
    (m, n) float array.
    """
    targets = np.asarray(targets, dtype=float).reshape(-1, 2)
    out = np.empty((len(targets), len(starts)))
    step = max(1, CHUNK_PAIRS // max(1, len(starts)))
    for i in range(0, len(targets), step):
        _, _, s1, s2, v = _local(targets[i : i + step], starts, ends)
        r1, r2 = s1 * s1 + v * v, s2 * s2 + v * v
        out[i : i + step] = 0.5 * (_xlogr2(s2, r2) - _xlogr2(s1, r1)) - (s2 - s1) + v * _theta(s1, s2, v)
    return out


def log_gradient_integrals(targets: np.ndarray, starts: np.ndarray, ends: np.ndarray) -> np.ndarray:
    """grad G[i, j, :] = gradient at x_i of the integral of ln|x - t| over panel j.

    Principal value on a panel's own line (see module docstring). Dimensionless.

    Returns
    -------
    (m, n, 2) float array.
    """
    targets = np.asarray(targets, dtype=float).reshape(-1, 2)
    out = np.empty((len(targets), len(starts), 2))
    step = max(1, CHUNK_PAIRS // max(1, len(starts)))
    tiny = 1e-300
    for i in range(0, len(targets), step):
        t, n, s1, s2, v = _local(targets[i : i + step], starts, ends)
        r1, r2 = s1 * s1 + v * v, s2 * s2 + v * v
        du = 0.5 * (np.log(np.maximum(r1, tiny)) - np.log(np.maximum(r2, tiny)))
        dv = _theta(s1, s2, v)
        out[i : i + step, :, 0] = du * t[None, :, 0] + dv * n[None, :, 0]
        out[i : i + step, :, 1] = du * t[None, :, 1] + dv * n[None, :, 1]
    return out


def log_normal_derivative_integrals(
    targets: np.ndarray, target_normals: np.ndarray, starts: np.ndarray, ends: np.ndarray
) -> np.ndarray:
    """D[i, j] = grad G_j(x_i) . n_i, the normal derivative at each target, without the (m, n, 2) array.

    Returns
    -------
    (m, n) float array (principal value on a panel's own line).
    """
    targets = np.asarray(targets, dtype=float).reshape(-1, 2)
    out = np.empty((len(targets), len(starts)))
    step = max(1, CHUNK_PAIRS // max(1, len(starts)))
    tiny = 1e-300
    for i in range(0, len(targets), step):
        t, n, s1, s2, v = _local(targets[i : i + step], starts, ends)
        nx = target_normals[i : i + step, 0][:, None]
        ny = target_normals[i : i + step, 1][:, None]
        r1, r2 = s1 * s1 + v * v, s2 * s2 + v * v
        du = 0.5 * (np.log(np.maximum(r1, tiny)) - np.log(np.maximum(r2, tiny)))
        dv = _theta(s1, s2, v)
        out[i : i + step] = du * (t[None, :, 0] * nx + t[None, :, 1] * ny) + dv * (
            n[None, :, 0] * nx + n[None, :, 1] * ny
        )
    return out
