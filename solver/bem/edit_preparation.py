"""The first edit of one conductor made ready ahead, in idle time after a fresh solve.

For :meth:`solver.bem.geometry_update.GeometryEditSolver.prepare`: what the first edit of a
conductor would compute before its own panels are assembled — the disc around its panels
(:mod:`solver.bem.far_blocks`, widened by :data:`solver.bem.edit_blocks.DRAG_MARGIN`), the
expansion terms at the other conductors' panels and their SVD compression, the local
coefficients, and the solves with the others' block from the fresh solve's LU factors
(:class:`solver.bem.block_solves.BorderedSolves`) — as a :class:`PreparedEdit` that the edit
takes as its "earlier" low-rank blocks. Only the fresh solve's matrix and factors are read.
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

from solver.bem.blas_threads import one_blas_thread
from solver.bem.block_solves import BorderedSolves, FullFactor
from solver.bem.edit_blocks import DRAG_MARGIN, FarParts, block
from solver.bem.far_blocks import (
    compressed_far_evaluation,
    local_coefficients,
    near_evaluation,
    panel_moments,
    separation,
)
from solver.bem.solve import CancelCallback

#: Most memory (bytes) the preparations of one solver may hold together.
PREPARED_BYTES = 64 * 2**20


@dataclass(frozen=True)
class PreparedEdit:
    """The low-rank blocks on a disc around one conductor's panels (as an edit that has not
    moved it yet) and the solves with the others' block."""

    far: FarParts
    solves: BorderedSolves

    @property
    def nbytes(self) -> int:
        arrays = (*self.far.kept_from_edited, *self.far.edited_from_kept, self.far.self_block, self.solves.t)
        return int(sum(a.nbytes for a in arrays))


def prepared_edit(name: str, full: FullFactor, matrix: np.ndarray, targets: np.ndarray, rhs: np.ndarray,
                  cancel: CancelCallback | None = None) -> PreparedEdit | None:
    """The preparation of conductor ``name``'s first edit, or None when its disc would reach
    the others' panels (or the bordered solves are ill-conditioned, or ``cancel`` says stop).

    ``full``: the fresh solve's factors; ``matrix``: its system matrix; ``targets``: its
    collocation points (scaled); ``rhs``: its right-hand sides (all rows).
    """
    others = [n for n in full.names if n != name]
    p_full, q_old = full.panels_of(others), full.panels_of([name])
    if not len(p_full) or not len(q_old):
        return None
    plane = full.plane
    p_starts, p_ends = full.starts[p_full], full.ends[p_full]
    e_starts, e_ends = full.starts[q_old], full.ends[q_old]
    disc = separation(e_starts, e_ends, p_starts, p_ends, plane, DRAG_MARGIN)
    if not disc.usable:
        return None
    with one_blas_thread():
        u_pe, moment_map = compressed_far_evaluation(disc, targets[p_full], plane)
        if cancel is not None and cancel():
            return None
        far = FarParts(
            q_old, (u_pe, moment_map @ panel_moments(disc, e_starts, e_ends, plane)),
            (near_evaluation(disc, targets[q_old], plane), local_coefficients(disc, p_starts, p_ends, plane)),
            e_starts, e_ends, plane, np.array(block(matrix, q_old, q_old)), disc, p_starts, p_ends,
            anchored=True, kept=p_full, deferred=False, moment_map=moment_map,
        )
        solves = BorderedSolves(full, p_full, q_old, disc, u_pe, full.extra_columns[p_full], moment_map,
                                also=rhs[p_full])
    return PreparedEdit(far, solves) if solves.usable else None
