"""The conductor-row block of an edited model, built from the previous system's matrix.

Used by :mod:`solver.bem.geometry_update`: the block between unchanged conductors is copied
(or left in place), the rows and columns of the edited panels are assembled, in low-rank
form from the expansions of :mod:`solver.bem.far_blocks` when the edited panels keep clear
of the others (:class:`FarParts`), else in closed form.
"""

from __future__ import annotations

from dataclasses import dataclass, field

import numpy as np

from solver.bem.assembly import single_layer_potential_matrix
from solver.bem.far_blocks import (
    Separation,
    compressed_far_evaluation,
    local_coefficients,
    near_evaluation,
    panel_moments,
    separation,
    split_separation,
)

#: The disc of the expansions is widened by this factor around an edited group, so that a
#: drag keeps the group inside it for a while and the terms at the unchanged panels (and
#: their solves with A_PP) are reused from step to step.
DRAG_MARGIN = 1.25

#: Most unchanged panels, as a fraction of them, taken in closed form beside the expansions
#: when the edited group comes close to some of them (:class:`FarParts` ``near``); with more,
#: the blocks are assembled in closed form.
MOST_NEAR_FRACTION = 0.5

#: Largest difference (fraction of the edited group's radius) between the panels of an edited
#: conductor and the previous ones moved rigidly for which their own block is reused.
TRANSLATION_TOLERANCE = 1e-13

def index_or_slice(idx: np.ndarray):
    """A slice when ``idx`` is a run of consecutive indices (copies without a gather), else ``idx``."""
    if len(idx) and idx[-1] - idx[0] == len(idx) - 1 and np.all(np.diff(idx) == 1):
        return slice(int(idx[0]), int(idx[-1]) + 1)
    return idx


def block(a: np.ndarray, rows: np.ndarray, cols: np.ndarray) -> np.ndarray:
    """``a[rows][:, cols]``; a view when both are runs of consecutive indices (copy it before
    writing), else a copy."""
    r, c = index_or_slice(rows), index_or_slice(cols)
    if isinstance(r, slice) and isinstance(c, slice):
        return a[r, c]
    if isinstance(r, slice):
        return a[r][:, cols]
    if isinstance(c, slice):
        return a[rows, c]
    return a[np.ix_(rows, cols)]


@dataclass(frozen=True)
class FarParts:
    """Low-rank blocks between the edited panels E and the kept panels P (scaled), as (U, V).

    When the edited group comes close to some unchanged panels (``near``: their positions in
    P), those stay exact: A_PE = [S_far Q | S_near] [[C M_E], [A_near,E]] and
    A_EP = [N_E | A_E,near] [[L_far S_far^T], [S_near^T]] (Q, C the compressed far terms,
    M_E the moments of the edited panels, N_E and L the local terms, S the row selections),
    so the U of A_PE and the V of A_EP still depend on the disc and P alone and are reused
    while a drag stays in the disc; only the closed-form parts are assembled at each step.
    """

    edited: np.ndarray
    kept_from_edited: tuple[np.ndarray, np.ndarray]  # A_PE = U @ V
    edited_from_kept: tuple[np.ndarray, np.ndarray]  # A_EP = U @ V
    starts: np.ndarray  # of the edited panels
    ends: np.ndarray
    plane: float | None
    self_block: np.ndarray  # A_EE
    disc: Separation
    kept_starts: np.ndarray  # of the unchanged panels
    kept_ends: np.ndarray
    anchored: bool  # the disc also holds the anchor panels (see ReusedBlock)
    kept: np.ndarray  # indices of the unchanged panels
    deferred: bool  # A_PE and A_EP are not yet written into the matrix (see ReusedBlock)
    moment_map: np.ndarray  # C of far_blocks.compressed_far_evaluation: V_E = C @ panel moments
    near: np.ndarray = field(default_factory=lambda: np.zeros(0, dtype=int))  # positions in P, closed form

    def write_into(self, matrix: np.ndarray) -> None:
        """Write A_PE and A_EP (the products of the low-rank factors) into ``matrix``."""
        put(matrix, self.kept, self.edited, self.kept_from_edited[0] @ self.kept_from_edited[1])
        put(matrix, self.edited, self.kept, self.edited_from_kept[0] @ self.edited_from_kept[1])

    def same_disc_for(self, kept_starts: np.ndarray, kept_ends: np.ndarray, starts: np.ndarray,
                      ends: np.ndarray, plane: float | None) -> bool:
        """True when the unchanged panels are these ones and the edited ones still lie in the
        disc: the terms at the unchanged panels (U of A_PE, V of A_EP) are then the same."""
        return (plane == self.plane and kept_starts.shape == self.kept_starts.shape
                and np.array_equal(kept_starts, self.kept_starts) and np.array_equal(kept_ends, self.kept_ends)
                and self.disc.holds(starts, ends))

    def self_block_if_moved(self, starts: np.ndarray, ends: np.ndarray, plane: float | None,
                            radius: float) -> np.ndarray | None:
        """A_EE again when the edited panels are these ones moved rigidly (see
        :func:`moved_rigidly`), else None."""
        if plane == self.plane and moved_rigidly(starts, ends, self.starts, self.ends, plane, radius):
            return self.self_block
        return None


def moved_rigidly(starts: np.ndarray, ends: np.ndarray, old_starts: np.ndarray, old_ends: np.ndarray,
                  plane: float | None, radius: float) -> bool:
    """True when panels (starts, ends) are the old ones shifted by one vector, along the ground
    plane when there is one (the log kernel depends only on differences, and the images then
    move with the panels): their mutual block is the old one. Positions may differ by
    round-off of the shift (:data:`TRANSLATION_TOLERANCE` of the group's radius)."""
    if starts.shape != old_starts.shape or len(starts) == 0:
        return False
    shift = starts[0] - old_starts[0]
    tol = TRANSLATION_TOLERANCE * radius
    if plane is not None and abs(shift[1]) > tol:
        return False
    return bool(np.max(np.abs(starts - old_starts - shift)) <= tol and np.max(np.abs(ends - old_ends - shift)) <= tol)


class ReusedBlock:
    """The conductor-row panel block of a system, with the unchanged conductors' mutual block
    copied from the previous matrix and only the other rows and columns assembled: in
    low-rank form (``far``) when the edited panels keep clear of the others, else in closed form.

    ``anchor`` (starts, ends): panels the expansion disc should hold as well when it can (the
    edited conductors' panels at the last fresh solve, for :class:`solver.bem.block_solves.BorderedSolves`).
    ``previous_panels`` (starts, ends): the previous system's panels (scaled), so that a
    conductor moved rigidly since then keeps its own block even at its first edit.

    When the unchanged panels sit where they sat, the system is assembled in the previous
    matrix itself (:meth:`writable_matrix`), and low-rank blocks A_PE and A_EP are not
    multiplied out into it (``far.deferred``: the solver uses the factors, and the next drag
    step of the same conductor writes over the same places); an edit that reads them (another
    conductor edited, panels no longer in place) writes them first (:meth:`FarParts.write_into`).
    """

    def __init__(self, previous: np.ndarray, kept_new: np.ndarray, kept_old: np.ndarray,
                 earlier: FarParts | None = None, low_rank: bool = True,
                 anchor: tuple[np.ndarray, np.ndarray] | None = None,
                 previous_panels: tuple[np.ndarray, np.ndarray] | None = None) -> None:
        self.previous, self.kept_new, self.kept_old, self.earlier = previous, kept_new, kept_old, earlier
        self.low_rank, self.anchor, self.previous_panels = low_rank, anchor, previous_panels
        self._old_self: tuple[np.ndarray, np.ndarray, np.ndarray] | None = None
        self.far: FarParts | None = None
        self.moved_rigidly = False

    def __call__(self, targets: np.ndarray, starts: np.ndarray, ends: np.ndarray,
                 plane: float | None) -> np.ndarray:
        n_rows, n_cols = len(targets), len(starts)
        keep = self.kept_new
        other = np.setdiff1d(np.arange(n_rows), keep)
        in_place = self._in_place(n_rows, n_cols)
        earlier = self.earlier
        if earlier is not None and earlier.deferred and not (in_place and np.array_equal(other, earlier.edited)):
            earlier.write_into(self.previous)  # its blocks are read, not all written over, below
        if self.previous_panels is not None:
            old_starts, old_ends = self.previous_panels
            other_old = np.setdiff1d(np.arange(len(old_starts)), self.kept_old)
            if len(other_old) == len(other):  # taken before the previous matrix is written over
                self._old_self = (old_starts[other_old], old_ends[other_old],
                                  np.array(block(self.previous, other_old, other_old)))
        if in_place:
            # the unchanged panels sit where they sat: the other rows and columns are written
            # over the previous matrix (kept by the solver alone, and replaced after this solve)
            out = self.previous[:n_rows, :n_cols]
        else:
            out = np.empty((n_rows, n_cols))
            kept = block(self.previous, self.kept_old, self.kept_old)
            k = index_or_slice(keep)
            if isinstance(k, slice):
                out[k, k] = kept
            else:
                out[np.ix_(keep, keep)] = kept
        if not len(other):
            return out
        if self.low_rank and n_rows == n_cols:
            far = self._far_parts(targets, starts, ends, plane, keep, other, deferred=in_place)
            if far is not None:
                self.far = far
                if not far.deferred:
                    far.write_into(out)
                put(out, other, other, far.self_block)
                return out
        out[other] = single_layer_potential_matrix(targets[other], starts, ends, plane)
        out[np.ix_(keep, other)] = single_layer_potential_matrix(
            targets[keep], starts[other], ends[other], plane
        )
        return out

    def _in_place(self, n_rows: int, n_cols: int) -> bool:
        return n_rows == n_cols and len(self.previous) >= n_rows and np.array_equal(self.kept_new, self.kept_old)

    def writable_matrix(self, size: int) -> np.ndarray | None:
        """The previous matrix, for the new system to be assembled in (see
        :func:`solver.bem.assembly.assemble_system`), when it has the new system's size and
        the unchanged panels sit where they sat; else None (the system gets a new array)."""
        if self.previous.shape == (size, size) and np.array_equal(self.kept_new, self.kept_old):
            return self.previous
        return None

    def _far_parts(self, targets: np.ndarray, starts: np.ndarray, ends: np.ndarray, plane: float | None,
                   keep: np.ndarray, other: np.ndarray, deferred: bool) -> FarParts | None:
        """The low-rank blocks, or None when the edited panels come close to too many others."""
        e_starts, e_ends, p_starts, p_ends = starts[other], ends[other], starts[keep], ends[keep]
        earlier, anchor = self.earlier, self.anchor
        near = np.zeros(0, dtype=int)
        if earlier is not None and earlier.same_disc_for(p_starts, p_ends, e_starts, e_ends, plane):
            sep, near = earlier.disc, earlier.near
            anchored = earlier.anchored and anchor is not None and sep.holds(*anchor)
            u_pe, v_ep, moment_map = earlier.kept_from_edited[0], earlier.edited_from_kept[1], earlier.moment_map
        else:
            anchored = anchor is not None
            if anchor is not None:
                sep = separation(np.vstack([e_starts, anchor[0]]), np.vstack([e_ends, anchor[1]]),
                                 p_starts, p_ends, plane, DRAG_MARGIN)
                anchored = sep.usable
            if not anchored:
                sep = separation(e_starts, e_ends, p_starts, p_ends, plane, DRAG_MARGIN)
            if sep.usable:
                u_pe, moment_map = compressed_far_evaluation(sep, targets[keep], plane)
                v_ep = local_coefficients(sep, p_starts, p_ends, plane)
            else:
                mixed = _near_and_far_terms(targets[keep], e_starts, e_ends, p_starts, p_ends, plane)
                if mixed is None:
                    return None
                sep, near, u_pe, v_ep, moment_map = mixed
        a_ee = None
        if earlier is not None:
            a_ee = earlier.self_block_if_moved(e_starts, e_ends, plane, sep.radius)
        if a_ee is None and self._old_self is not None and moved_rigidly(e_starts, e_ends, *self._old_self[:2],
                                                                         plane, sep.radius):
            a_ee = self._old_self[2]
        self.moved_rigidly = a_ee is not None
        if a_ee is None:
            a_ee = single_layer_potential_matrix(targets[other], e_starts, e_ends, plane)
        v_e = moment_map @ panel_moments(sep, e_starts, e_ends, plane)
        u_ep = near_evaluation(sep, targets[other], plane)
        if len(near):
            near_p = keep[near]
            v_e = np.vstack([v_e, single_layer_potential_matrix(targets[near_p], e_starts, e_ends, plane)])
            u_ep = np.hstack([u_ep, single_layer_potential_matrix(targets[other], starts[near_p], ends[near_p],
                                                                  plane)])
        return FarParts(other, (u_pe, v_e), (u_ep, v_ep), e_starts, e_ends, plane, a_ee, sep, p_starts, p_ends,
                        anchored, keep, deferred, moment_map, near)


def _near_and_far_terms(p_targets: np.ndarray, e_starts: np.ndarray, e_ends: np.ndarray, p_starts: np.ndarray,
                        p_ends: np.ndarray, plane: float | None):
    """(disc, near, U of A_PE, V of A_EP, C) for an edited group close to some unchanged
    panels (see :class:`FarParts`), or None when none is far or too many are near."""
    sep, far_mask = split_separation(e_starts, e_ends, p_starts, p_ends, plane, DRAG_MARGIN)
    near, far = np.flatnonzero(~far_mask), np.flatnonzero(far_mask)
    if not len(far) or len(near) > MOST_NEAR_FRACTION * len(p_starts):
        return None
    q, moment_map = compressed_far_evaluation(sep, p_targets[far], plane)
    rank, n_p, n_near = q.shape[1], len(p_starts), len(near)
    u_pe = np.zeros((n_p, rank + n_near))
    u_pe[far, :rank] = q
    u_pe[near, rank + np.arange(n_near)] = 1.0
    local = local_coefficients(sep, p_starts[far], p_ends[far], plane)
    v_ep = np.zeros((len(local) + n_near, n_p))
    v_ep[:len(local), far] = local
    v_ep[len(local) + np.arange(n_near), near] = 1.0
    return sep, near, u_pe, v_ep, moment_map


def put(out: np.ndarray, rows: np.ndarray, cols: np.ndarray, values: np.ndarray) -> None:
    """``out[rows][:, cols] = values`` (in place)."""
    r, c = index_or_slice(rows), index_or_slice(cols)
    if isinstance(r, slice) and isinstance(c, slice):
        out[r, c] = values
    else:
        out[np.ix_(rows, cols)] = values

