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

Every function works on the x and y components separately, a block of targets at a time
(:data:`CHUNK_PAIRS` target-panel pairs), so no (m, n, 2) temporaries are built;
:func:`log_potential_and_gradient_sums` returns the potential and the gradient of a charge
distribution from the same logarithms and angles in one pass.

These functions are the only place that knows the panel shape; a higher-order panel or a
fast multipole method would replace them behind the same signatures.
"""

from __future__ import annotations

from collections.abc import Iterator
from dataclasses import dataclass

import numpy as np

#: Largest number of (target, panel) pairs evaluated at once, to bound memory (about 2 MB per
#: temporary array; small blocks stay in cache).
CHUNK_PAIRS = 250_000

#: Floor of r^2 inside the logarithm of the gradient (a target exactly on a panel end).
_TINY = 1e-300


@dataclass(frozen=True)
class _Frame:
    """Per-panel constants: midpoint (cx, cy), unit tangent (tx, ty), half length, length.

    The right-hand normal is (ty, -tx).
    """

    cx: np.ndarray
    cy: np.ndarray
    tx: np.ndarray
    ty: np.ndarray
    half: np.ndarray
    length: np.ndarray


def _frame(starts: np.ndarray, ends: np.ndarray) -> _Frame:
    starts = np.asarray(starts, dtype=float).reshape(-1, 2)
    ends = np.asarray(ends, dtype=float).reshape(-1, 2)
    dx, dy = ends[:, 0] - starts[:, 0], ends[:, 1] - starts[:, 1]
    length = np.hypot(dx, dy)
    mid = 0.5 * (starts + ends)
    return _Frame(mid[:, 0].copy(), mid[:, 1].copy(), dx / length, dy / length, 0.5 * length, length)


@dataclass
class _Block:
    """Local coordinates of one block of targets against every panel, each (mb, n)."""

    s1: np.ndarray
    s2: np.ndarray
    v: np.ndarray


def _blocks(targets: np.ndarray, f: _Frame) -> Iterator[tuple[slice, _Block]]:
    """Yield (row slice, local coordinates) for blocks of targets."""
    n = len(f.cx)
    step = max(1, CHUNK_PAIRS // max(1, n))
    for i in range(0, len(targets), step):
        rows = slice(i, min(i + step, len(targets)))
        rx = targets[rows, 0][:, None] - f.cx[None, :]
        ry = targets[rows, 1][:, None] - f.cy[None, :]
        u = rx * f.tx
        u += ry * f.ty
        v = rx * f.ty
        v -= ry * f.tx
        s1 = -f.half - u
        u -= f.half  # u - L/2
        np.negative(u, out=u)  # s2 = L/2 - u
        yield rows, _Block(s1, u, v)


def _logs(b: _Block) -> tuple[np.ndarray, np.ndarray]:
    """ln(r1^2), ln(r2^2), with r^2 floored at :data:`_TINY`."""
    v2 = b.v * b.v
    l1 = b.s1 * b.s1
    l1 += v2
    l2 = b.s2 * b.s2
    l2 += v2
    np.maximum(l1, _TINY, out=l1)
    np.maximum(l2, _TINY, out=l2)
    np.log(l1, out=l1)
    np.log(l2, out=l2)
    return l1, l2


def _theta(b: _Block, length: np.ndarray) -> np.ndarray:
    """Angle the panel subtends at the target, signed with v; 0 on the panel's own line."""
    den = b.v * b.v
    den += b.s1 * b.s2
    theta = np.arctan2(b.v * length, den)
    theta[b.v == 0.0] = 0.0
    return theta


def _potential(b: _Block, l1: np.ndarray, l2: np.ndarray, theta: np.ndarray, length: np.ndarray) -> np.ndarray:
    """G from the logarithms and angle of one block (s ln r is 0 where r = 0, as s = 0 there)."""
    g = b.s2 * l2
    g -= b.s1 * l1
    g *= 0.5
    g -= length
    g += b.v * theta
    return g


def _targets(targets: np.ndarray) -> np.ndarray:
    return np.asarray(targets, dtype=float).reshape(-1, 2)


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
    targets, f = _targets(targets), _frame(starts, ends)
    out = np.empty((len(targets), len(f.cx)))
    for rows, b in _blocks(targets, f):
        l1, l2 = _logs(b)
        out[rows] = _potential(b, l1, l2, _theta(b, f.length), f.length)
    return out


def log_gradient_components(
    targets: np.ndarray, starts: np.ndarray, ends: np.ndarray
) -> tuple[np.ndarray, np.ndarray]:
    """(dG/dx, dG/dy)[i, j] at x_i of the integral of ln|x - t| over panel j; each (m, n).

    Principal value on a panel's own line (see module docstring). Dimensionless.
    """
    targets, f = _targets(targets), _frame(starts, ends)
    gx = np.empty((len(targets), len(f.cx)))
    gy = np.empty_like(gx)
    for rows, b in _blocks(targets, f):
        l1, l2 = _logs(b)
        du = l1
        du -= l2
        du *= 0.5
        dv = _theta(b, f.length)
        gx[rows] = du * f.tx + dv * f.ty
        gy[rows] = du * f.ty - dv * f.tx
    return gx, gy


def log_gradient_integrals(targets: np.ndarray, starts: np.ndarray, ends: np.ndarray) -> np.ndarray:
    """grad G[i, j, :] = gradient at x_i of the integral of ln|x - t| over panel j.

    Principal value on a panel's own line (see module docstring). Dimensionless. Prefer
    :func:`log_gradient_components` or :func:`log_potential_and_gradient_sums`, which do not
    build the (m, n, 2) array.

    Returns
    -------
    (m, n, 2) float array.
    """
    gx, gy = log_gradient_components(targets, starts, ends)
    return np.stack([gx, gy], axis=-1)


def log_normal_derivative_integrals(
    targets: np.ndarray, target_normals: np.ndarray, starts: np.ndarray, ends: np.ndarray
) -> np.ndarray:
    """D[i, j] = grad G_j(x_i) . n_i, the normal derivative at each target.

    Returns
    -------
    (m, n) float array (principal value on a panel's own line).
    """
    targets, f = _targets(targets), _frame(starts, ends)
    normals = np.asarray(target_normals, dtype=float).reshape(-1, 2)
    out = np.empty((len(targets), len(f.cx)))
    for rows, b in _blocks(targets, f):
        nx, ny = normals[rows, 0][:, None], normals[rows, 1][:, None]
        l1, l2 = _logs(b)
        du = l1
        du -= l2
        du *= 0.5
        dv = _theta(b, f.length)
        # t . n_i and (ty, -tx) . n_i
        out[rows] = du * (f.tx * nx + f.ty * ny) + dv * (f.ty * nx - f.tx * ny)
    return out


def log_potential_and_gradient_sums(
    targets: np.ndarray, starts: np.ndarray, ends: np.ndarray, strengths: np.ndarray
) -> tuple[np.ndarray, np.ndarray]:
    """Potential and gradient of a charge distribution on panels, in one pass.

    phi(x_i) = sum_j q_j G_j(x_i) and grad phi(x_i) = sum_j q_j grad G_j(x_i), from the same
    logarithms and angles (principal value on a panel's own line).

    Parameters
    ----------
    targets : (m, 2) points (same length unit as the panels).
    starts, ends : (n, 2) panel end points.
    strengths : (n,) or (n, k) strength per unit length of each panel (any unit).

    Returns
    -------
    phi : (m,) or (m, k), strength x length.
    grad : (m, 2) or (m, 2, k), strength (dimensionless ratio of the two units).
    """
    targets, f = _targets(targets), _frame(starts, ends)
    q = np.asarray(strengths, dtype=float)
    cols = q.shape[1:]
    phi = np.empty((len(targets),) + cols)
    grad = np.empty((len(targets), 2) + cols)
    qx_u, qx_v = q * f.tx.reshape((-1,) + (1,) * len(cols)), q * f.ty.reshape((-1,) + (1,) * len(cols))
    for rows, b in _blocks(targets, f):
        l1, l2 = _logs(b)
        theta = _theta(b, f.length)
        phi[rows] = _potential(b, l1, l2, theta, f.length) @ q
        du = l1
        du -= l2
        du *= 0.5
        # gx = du tx + theta ty, gy = du ty - theta tx, summed against q
        grad[rows, 0] = du @ qx_u + theta @ qx_v
        grad[rows, 1] = du @ qx_v - theta @ qx_u
    return phi, grad


def log_potential_pairs(targets: np.ndarray, starts: np.ndarray, ends: np.ndarray) -> np.ndarray:
    """G_k = integral of ln|x_k - t| over panel k, for p (target, panel) pairs (metres).

    Parameters
    ----------
    targets, starts, ends : (p, 2) one target and one panel per pair.

    Returns
    -------
    (p,) float array, equal to the matching entries of :func:`log_potential_integrals`.
    """
    targets, f = _targets(targets), _frame(starts, ends)
    rx, ry = targets[:, 0] - f.cx, targets[:, 1] - f.cy
    u = rx * f.tx + ry * f.ty
    b = _Block(-f.half - u, f.half - u, rx * f.ty - ry * f.tx)
    l1, l2 = _logs(b)
    return _potential(b, l1, l2, _theta(b, f.length), f.length)


def log_potential_and_gradient_pairs(
    targets: np.ndarray, starts: np.ndarray, ends: np.ndarray
) -> tuple[np.ndarray, np.ndarray, np.ndarray]:
    """G_k, dG_k/dx, dG_k/dy for p (target, panel) pairs; each (p,).

    Equal to the matching entries of :func:`log_potential_integrals` and
    :func:`log_gradient_components` (principal value on a panel's own line).
    """
    targets, f = _targets(targets), _frame(starts, ends)
    rx, ry = targets[:, 0] - f.cx, targets[:, 1] - f.cy
    u = rx * f.tx + ry * f.ty
    b = _Block(-f.half - u, f.half - u, rx * f.ty - ry * f.tx)
    l1, l2 = _logs(b)
    theta = _theta(b, f.length)
    g = _potential(b, l1, l2, theta, f.length)
    du = 0.5 * (l1 - l2)
    return g, du * f.tx + theta * f.ty, du * f.ty - theta * f.tx
