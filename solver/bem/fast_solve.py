"""Large models: GMRES with the fast multipole operator, and a memory check before anything large.

:func:`solve_if_large` is called by :func:`solver.bem.solve.solve_mesh` before it assembles a
dense system. It estimates the memory either path needs and

* returns None (use the dense LU) when the dense system fits in memory and the model is
  below :data:`FAST_PATH_FROM_PANELS` panels or the measured cost model
  (:func:`dense_seconds`, :func:`fast_seconds`) says the LU is quicker (with many
  right-hand sides it usually is, up to the memory limit);
* solves with :func:`solve_fast` otherwise (conductors in a homogeneous medium, with or
  without a ground plane): GMRES (Saad & Schultz, "GMRES: a generalized minimal residual
  algorithm for solving nonsymmetric linear systems", SIAM J. Sci. Stat. Comput. 7, 1986) on
  the operator of :mod:`solver.bem.fast_operator`, preconditioned by the exact dense block of
  each conductor (block Jacobi; large outlines split into runs of :data:`BLOCK_PANELS`
  panels) plus a two-level coarse correction with one unknown per conductor, both
  factorised once and reused for every right-hand side;
* raises :class:`InsufficientMemoryError` naming the cause when the chosen path would not fit.

Right-hand sides: one per fixed conductor (1 V) and one per floating conductor (unit charge);
the operating point is their superposition (see :mod:`solver.bem.superposition`).
"""

from __future__ import annotations

import logging
from collections.abc import Callable

import numpy as np
import scipy.linalg
import scipy.sparse.linalg

from solver.bem.assembly import (
    SourcePanels,
    SystemLayout,
    normal_derivative_matrix,
    right_hand_sides,
    single_layer_potential_matrix,
    source_panels,
)
from solver.bem.blas_threads import blas_threads_for
from solver.bem.fast_operator import (
    QUADRATURE_POINTS,
    FastSingleLayer,
    fmm_available,
    near_pair_estimate,
)
from solver.bem.machine_memory import available_memory_bytes
from solver.bem.solution import BACKGROUND_NAME, Solution
from solver.bem.superposition import UnitSolutions, driver_columns, driver_weights
from solver.errors import SolveCancelled, SolverError
from solver.mesh.interfaces import InterfaceMesh
from solver.mesh.panels import PanelMesh
from solver.model.model import Model

logger = logging.getLogger(__name__)

#: Below this many conductor panels the dense LU is always used.
FAST_PATH_FROM_PANELS = 6000

#: Cost model of the two paths, measured on the 2-core development machine (one core, under
#: load): a dense LU runs at about 5.5e9 flop/s (2,500 unknowns in 0.94 s); one application
#: of the fast operator costs about 38 microseconds per panel (65,798 panels in 2.5 s); GMRES
#: needs about 40 iterations per right-hand side on the bus case (40 and 63 measured).
DENSE_FLOPS_PER_S = 5.5e9
FAST_SECONDS_PER_PANEL = 38e-6
FAST_ITERATIONS_PER_RHS = 40

#: Largest dense diagonal block of the preconditioner, panels.
BLOCK_PANELS = 2000

#: Relative residual at which GMRES stops: below the discretisation error by orders, above
#: the FMM accuracy (about 5e-10), where the residual stagnates.
GMRES_RTOL = 1e-8

#: Krylov vectors kept between restarts, and the most iterations allowed per right-hand side.
GMRES_RESTART = 60
GMRES_MAX_ITERATIONS = 600

#: Add the two-level coarse correction (one unknown per conductor) to block Jacobi.
COARSE_SPACE = True

#: Fraction of the available memory a solve may plan to use.
MEMORY_FRACTION = 0.8


class InsufficientMemoryError(SolverError):
    """A model is too large for the memory of this machine."""


def dense_memory_bytes(n_unknowns: int, n_rhs: int) -> int:
    """Peak bytes of the dense path: the matrix, its LU copy, assembly temporaries, solutions."""
    return int(8 * (2.2 * n_unknowns**2 + 4 * n_unknowns * (n_rhs + 1)))


def dense_seconds(n_unknowns: int) -> float:
    """Estimated time of the dense LU (the factorisation dominates), seconds."""
    return n_unknowns**3 / 3.0 / DENSE_FLOPS_PER_S


def fast_seconds(n_panels: int, n_rhs: int, n_conductors: int) -> float:
    """Estimated time of the fast path: GMRES iterations per right-hand side plus the coarse
    space (one operator application per conductor), seconds."""
    return n_panels * FAST_SECONDS_PER_PANEL * (n_rhs * FAST_ITERATIONS_PER_RHS + n_conductors)


def _blocks(mesh: PanelMesh) -> list[np.ndarray]:
    """Panel indices of each preconditioner block: each conductor, long ones in runs."""
    out = []
    for k in np.unique(mesh.conductor_index):
        idx = np.flatnonzero(mesh.conductor_index == k)
        out.extend(np.array_split(idx, -(-len(idx) // BLOCK_PANELS)))
    return out


def fast_memory_bytes(mesh: PanelMesh, has_plane: bool, n_rhs: int) -> int:
    """Peak bytes of the fast path: FMM points and tree, near corrections, preconditioner
    blocks (matrix and LU), Krylov vectors and the solutions kept."""
    n = mesh.n_panels
    n_src = n * QUADRATURE_POINTS * (2 if has_plane else 1)
    blocks = sum(len(b) ** 2 for b in _blocks(mesh))
    pairs = near_pair_estimate(n, has_plane)
    return int(
        n_src * 400                      # points, charges and the library's tree and expansions
        + pairs * (12 + 200 / max(1.0, pairs / 200_000))  # CSR storage + one chunk of pair temporaries
        + 8 * 2 * blocks                 # blocks and their LU factors
        + 8 * n * (GMRES_RESTART + 4)    # Krylov basis and work vectors
        + 8 * n * (3 * n_rhs + 4)        # total and free strengths per right-hand side
    )


def _gb(n_bytes: float) -> str:
    return f"{n_bytes / 1e9:.1f} GB"


def _refuse(model: Model, what: str, need: int, have: int) -> InsufficientMemoryError:
    name = f"'{model.title}'" if model.title else "The model"
    return InsufficientMemoryError(
        f"{name} is too large for this machine: {what} needs about {_gb(need)}, but only "
        f"{_gb(have)} of memory is available. Choose a coarser mesh density, remove conductors "
        f"that do not matter, or use a machine with more memory."
    )


def fast_path_applies(model: Model) -> bool:
    """True when :func:`solve_fast` can solve ``model`` (conductors in one medium, FMM installed)."""
    return fmm_available() and not model.dielectrics


def solve_if_large(
    model: Model, mesh: PanelMesh, cancel: Callable[[], bool] | None = None
) -> Solution | None:
    """Solve a large model by the fast path, or return None for the dense path.

    Raises
    ------
    InsufficientMemoryError
        When the path that applies would not fit in the available memory.
    """
    n = mesh.n_panels
    n_rhs = 1 + sum(c.role != "reference" for c in model.conductors)
    have = available_memory_bytes()
    budget = None if have is None else int(MEMORY_FRACTION * have)
    fast_ok = fast_path_applies(model)
    dense_need = dense_memory_bytes(n, n_rhs)
    dense_fits = budget is None or dense_need <= budget
    if dense_fits and (n < FAST_PATH_FROM_PANELS or dense_seconds(n) <= fast_seconds(n, n_rhs, len(model.conductors))):
        return None
    if not fast_ok:
        if dense_fits:
            return None
        assert have is not None
        cause = (f"the dense system of {n:,} conductor panels (the fast solver does not take "
                 f"dielectric regions yet)" if model.dielectrics else f"the dense system of {n:,} panels")
        raise _refuse(model, cause, dense_need, have)
    need = fast_memory_bytes(mesh, model.ground_plane is not None, n_rhs)
    if budget is not None and need > budget:
        assert have is not None
        raise _refuse(model, f"the fast solver on {n:,} panels with {n_rhs} right-hand sides", need, have)
    return solve_fast(model, mesh, cancel)


def _length_scale(mesh: PanelMesh) -> float:
    pts = np.vstack([mesh.starts, mesh.ends])
    return float(np.hypot(*(pts.max(axis=0) - pts.min(axis=0)))) or 1.0


class _Preconditioner:
    """Block-Jacobi: the exact dense block of each conductor (or run of panels), LU-factorised once."""

    def __init__(self, mesh: PanelMesh, starts: np.ndarray, ends: np.ndarray, mids: np.ndarray,
                 plane: float | None, size: int) -> None:
        self.blocks = _blocks(mesh)
        self.size = size
        self.factors = []
        for idx in self.blocks:
            a = single_layer_potential_matrix(mids[idx], starts[idx], ends[idx], plane)
            with blas_threads_for(len(idx)):
                self.factors.append(scipy.linalg.lu_factor(a, overwrite_a=True, check_finite=False))

    def solve(self, r: np.ndarray) -> np.ndarray:
        out = np.array(r, dtype=float, copy=True)
        for idx, lu in zip(self.blocks, self.factors):
            out[idx] = scipy.linalg.lu_solve(lu, r[idx], check_finite=False)
        return out


class _CoarseSpace:
    """Two-level correction: one coarse unknown per conductor (its isolated response to 1 V,
    D_k^-1 1_k) and per extra unknown (floating potentials, phi_inf), tested with each
    conductor's length-weighted residual sum (additive two-level Schwarz, common practice;
    Smith, Bjorstad & Gropp, "Domain Decomposition", Cambridge University Press, 1996).

    Building it costs one operator application per conductor; it carries the conductor-to-
    conductor coupling of the total charges that block Jacobi leaves to GMRES.
    """

    def __init__(self, mesh: PanelMesh, layout: SystemLayout, precond: _Preconditioner,
                 matvec: Callable[[np.ndarray], np.ndarray], lengths: np.ndarray) -> None:
        nc, size = layout.n_conductor_panels, layout.size
        conductors = np.unique(mesh.conductor_index)
        n_coarse = len(conductors) + size - nc
        z = np.zeros((size, n_coarse))
        w = np.zeros((size, n_coarse))
        for col, k in enumerate(conductors):
            on_k = np.flatnonzero(mesh.conductor_index == k)
            unit = np.zeros(size)
            unit[on_k] = 1.0
            z[:, col] = precond.solve(unit)
            z[nc:, col] = 0.0
            w[on_k, col] = lengths[on_k]
        for col, row in enumerate(range(nc, size), start=len(conductors)):
            z[row, col] = 1.0
            w[row, col] = 1.0
        az = np.column_stack([matvec(z[:, c]) for c in range(n_coarse)])
        self.z, self.w = z, w
        self.lu = scipy.linalg.lu_factor(w.T @ az, check_finite=False)

    def correction(self, r: np.ndarray) -> np.ndarray:
        return self.z @ scipy.linalg.lu_solve(self.lu, self.w.T @ r, check_finite=False)


def _strip_normal_pv(
    mesh: PanelMesh, sources: SourcePanels, plane: float | None, ell: float, total: np.ndarray
) -> np.ndarray:
    """Scaled principal-value normal field at strip midpoints, (n_strip, k), a block at a time."""
    idx = np.flatnonzero(mesh.is_strip)
    out = np.zeros((len(idx), total.shape[1]))
    step = max(1, 2_000_000 // max(1, len(sources.starts)))
    for a in range(0, len(idx), step):
        sel = idx[a : a + step]
        d = normal_derivative_matrix(mesh.midpoints[sel] / ell, mesh.normals[sel], sources, plane, sel)
        out[a : a + step] = d @ total
    return out


def solve_fast(model: Model, mesh: PanelMesh, cancel: Callable[[], bool] | None = None) -> Solution:
    """Solve conductors in a homogeneous medium by FMM-accelerated GMRES (no dense matrix).

    Results equal the dense path's to about 1e-8 relative (the FMM and quadrature accuracy of
    :mod:`solver.bem.fast_operator` and :data:`GMRES_RTOL`).
    """
    if model.dielectrics:
        raise SolverError("The fast solver takes conductors in one medium only; remove the "
                          "dielectric regions or use a coarser mesh density for the dense solver.")
    ell = _length_scale(mesh)
    plane = None if model.ground_plane is None else model.ground_plane.y * model.metres_per_unit / ell
    interfaces = InterfaceMesh.empty()
    sources = source_panels(mesh, interfaces, ell)
    nc = mesh.n_panels
    floating = tuple(k for k, c in enumerate(model.conductors) if c.role == "floating")
    layout = SystemLayout(nc, 0, floating, plane is None)
    mids = mesh.midpoints / ell
    eps_bg = model.background_eps_r
    operator = FastSingleLayer(mids, sources.starts, sources.ends, plane)
    precond = _Preconditioner(mesh, sources.starts, sources.ends, mids, plane, layout.size)
    lengths = sources.curve_lengths
    owners = [np.flatnonzero(mesh.conductor_index == k) for k in floating]

    def matvec(x: np.ndarray) -> np.ndarray:
        x = np.ravel(x)
        q = x[:nc]
        y = np.empty(layout.size)
        y[:nc] = operator.apply(q)
        for f, idx in enumerate(owners):
            y[idx] -= x[nc + f]
            y[nc + f] = eps_bg * lengths[idx] @ q[idx]
        if layout.has_phi_inf:
            y[:nc] += x[-1]
            y[-1] = lengths @ q
        return y

    a_op = scipy.sparse.linalg.LinearOperator((layout.size,) * 2, matvec=matvec, dtype=float)
    logger.info("fast path: operator and %d preconditioner blocks ready", len(precond.blocks))
    coarse = _CoarseSpace(mesh, layout, precond, matvec, lengths) if COARSE_SPACE else None
    logger.info("fast path: coarse space ready")

    def apply_preconditioner(r: np.ndarray) -> np.ndarray:
        out = precond.solve(np.ravel(r))
        return out if coarse is None else out + coarse.correction(np.ravel(r))

    m_op = scipy.sparse.linalg.LinearOperator((layout.size,) * 2, matvec=apply_preconditioner, dtype=float)
    fixed, floating_drv, unit_potentials, unit_charges = driver_columns(model)
    b = right_hand_sides(mesh, layout, unit_potentials, unit_charges)
    x = np.zeros_like(b)
    iterations = []
    for col in range(b.shape[1]):
        if cancel is not None and cancel():
            raise SolveCancelled("Solve cancelled.")
        count = [0]

        def tick(_: object, count: list[int] = count) -> None:
            count[0] += 1

        x[:, col], info = scipy.sparse.linalg.gmres(
            a_op, b[:, col], rtol=GMRES_RTOL, atol=0.0, restart=GMRES_RESTART,
            maxiter=GMRES_MAX_ITERATIONS // GMRES_RESTART + 1, M=m_op, callback=tick, callback_type="pr_norm",
        )
        if info != 0:
            raise SolverError(
                f"The iterative solver did not converge for right-hand side {col + 1} of {b.shape[1]} "
                f"on {nc:,} panels; use a coarser mesh density or report the model."
            )
        iterations.append(count[0])
        logger.debug("fast path: right-hand side %d of %d in %d iterations", col + 1, b.shape[1], count[0])
    logger.info("fast path: %d panels, %d right-hand sides, GMRES iterations %s", nc, b.shape[1], iterations)

    total = x[:nc]
    free = eps_bg * total
    strip = mesh.is_strip
    normal_pv = np.zeros_like(total)
    normal_pv[strip] = _strip_normal_pv(mesh, sources, plane, ell, total)
    phi_inf = x[-1] if layout.has_phi_inf else np.zeros(b.shape[1])
    units = UnitSolutions(fixed, floating_drv, total, free, phi_inf, x[nc : nc + len(floating)],
                          normal_pv, np.zeros((0, b.shape[1])))
    op = units.superposed(model)
    region = len(model.dielectrics)
    return Solution(
        model=model, mesh=mesh, interfaces=interfaces, length_scale_m=ell,
        capacitance_strengths=free[:, : len(fixed)].copy(),
        source_starts=sources.starts, source_ends=sources.ends, source_weights=sources.weights,
        conductor_eps_r_plus=np.full(nc, eps_bg), conductor_eps_r_minus=np.where(strip, eps_bg, 0.0),
        region_names=(BACKGROUND_NAME,), region_eps_r=(float(eps_bg),),
        interface_region_plus=interfaces.region_plus, interface_region_minus=interfaces.region_minus,
        conductor_region_plus=np.full(nc, region), conductor_region_minus=np.where(strip, region, -1),
        n_unknowns=layout.size, unit_solutions=units, **op,
    )


__all__ = [
    "FAST_PATH_FROM_PANELS",
    "InsufficientMemoryError",
    "available_memory_bytes",
    "dense_memory_bytes",
    "driver_weights",
    "fast_memory_bytes",
    "fast_path_applies",
    "solve_fast",
    "solve_if_large",
]
