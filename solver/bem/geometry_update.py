"""Re-solving after a geometry edit, reusing what did not change (for dragging parts).

When the user moves or reshapes one conductor, the panels of the other conductors, and so
the system's block of their mutual interactions, are unchanged (the mesh of a conductor
depends on its own outline, the mesh settings and the model's size; the test checks the
result, not this assumption). :class:`GeometryEditSolver` keeps the previous system and, for
the set P of unknowns on unchanged conductors, a way to solve with the block A_PP. A new
model is then solved by block elimination (a Schur complement):

    Y = A_PP^-1 A_PQ,   S = A_QQ - A_QP Y,
    x_Q = S^-1 (b_Q - A_QP A_PP^-1 b_P),   x_P = A_PP^-1 b_P - Y x_Q,

where Q holds the unknowns of the edited conductors, the floating potentials and phi_inf.
Only the rows and columns of the edited panels are assembled again, into the previous
matrix itself when the unchanged panels keep their places (:mod:`solver.bem.edit_blocks`). The solves with A_PP come from the LU factors of the last
fresh solve's whole matrix when the low-rank blocks below allow it
(:class:`solver.bem.block_solves.BorderedSolves`: the first edit of a conductor factorises
nothing), else from A_PP's own factors, made at the first edit and reused by every further
edit of the same conductor, as a drag does.

When the edited conductors keep clear of the others (a disc around them, R / D <= 0.6 of
the distance to the nearest other panel), A_PQ and A_QP are taken in low-rank form from
multipole and local expansions (:mod:`solver.bem.far_blocks`, 80 to 110 terms on the busbar
sample instead of |Q| columns, the far terms compressed to about 65 by an SVD), so Y costs
r + |X| solves with A_PP instead of |Q|. The disc
of the expansions is widened (:data:`solver.bem.edit_blocks.DRAG_MARGIN`) and kept while the
edited panels stay inside it, so during a drag those solves are reused too and a step costs
the new rows and columns in low-rank form,
a Schur complement of |Q| unknowns and the right-hand sides. When the edited conductors come
close to some unchanged panels (another bar a few millimetres away), those panels' rows and
columns are assembled in closed form beside the low-rank terms of the rest
(:class:`solver.bem.edit_blocks.FarParts` ``near``), so the solves with A_PP are still made
once per disc and a drag step past a neighbour costs its closed-form strips (about a third of
the fully closed-form step on the busbar sample); when the edited panels are the
previous ones moved rigidly (along the ground plane, when there is one), their own block
A_QQ is reused as well.

The capacitance matrix and conductor potentials equal a fresh :func:`solver.bem.solve.solve_mesh`
to 1e-12 relative (tested). Single panel strengths agree to about 1e-8 of the largest with the
expansions: the closed-form integrals of the shortest corner panels (1e-7 of the model's size)
lose digits to cancellation far from them (about 2e-9 per entry against a 4-point
Gauss-Legendre sum, measured on the busbar sample), an error the expansions do not share.
Models with dielectric regions, and models large enough for the fast path, are solved afresh.
"""

from __future__ import annotations

import contextlib
import logging
from collections.abc import Sequence
from dataclasses import dataclass

import numpy as np
import scipy.linalg

from solver.bem.assembly import SystemLayout, right_hand_sides
from solver.bem.blas_threads import blas_threads_for, one_blas_thread
from solver.bem.block_solves import BorderedSolves, FullFactor, LUSolves
from solver.bem.edit_blocks import FarParts, ReusedBlock, block
from solver.bem.edit_preparation import PREPARED_BYTES, PreparedEdit, prepared_edit
from solver.bem.far_blocks import compressed_far_evaluation, separation
from solver.bem.fast_solve import solve_if_large
from solver.bem.solution import Solution
from solver.bem.solve import CancelCallback, solve_mesh, solve_system
from solver.bem.superposition import solve_columns
from solver.bem.system import BoundarySystem, build_system
from solver.errors import MeshTooLargeError
from solver.mesh.panels import MeshSettings, PanelMesh, discretize_boundary
from solver.model.model import Model

logger = logging.getLogger(__name__)


@dataclass(frozen=True)
class _Previous:
    """The last system solved: its conductor names, mesh, scale, plane and matrix."""

    names: tuple[str, ...]
    mesh: PanelMesh
    ell: float
    plane: float | None
    matrix: np.ndarray
    layout: SystemLayout


class GeometryEditSolver:
    """Solves a sequence of models that differ by the geometry of a few conductors.

    Attributes
    ----------
    low_rank : take the blocks between edited and unchanged conductors in low-rank form when
        they keep clear of each other (True; False assembles them in closed form, for comparison).
    reused_panels : conductor panels whose interactions were copied (not assembled) in the
        last solve; 0 when it was solved afresh.
    reused_factor : True when the last solve did not factorise the block A_PP of the unchanged
        conductors (its LU factors were reused, or ``bordered``).
    bordered : True when the solves with A_PP came from the LU factors of the last fresh
        solve (:class:`solver.bem.block_solves.BorderedSolves`; the first edit of a conductor).
    far_blocks : True when the blocks between the edited and the unchanged panels were taken
        in low-rank form (:mod:`solver.bem.far_blocks`; the edited parts keep clear of the rest).
    reused_self_block : True when the edited panels were the previous ones moved rigidly
        (along the ground plane, when there is one) and their own block was reused.
    superposed : True when the last model differed from the one before only in potentials
        and floating charges, and was answered by superposition (:meth:`Solution.with_potentials`).
    reused_solves : True when the edited panels stayed inside the previous expansion disc
        and A_PP^-1 [U_PE | A_PX] was reused (no solve with A_PP but the right-hand sides).
    prepared : True when the last solve was the first edit of a conductor made ready by
        :meth:`prepare`.
    """

    def __init__(self, low_rank: bool = True) -> None:
        self.low_rank = low_rank
        self._previous: _Previous | None = None
        self._solves: LUSolves | BorderedSolves | None = None
        self._full: FullFactor | None = None
        self._far: FarParts | None = None
        self._last: Solution | None = None
        self._fresh = False  # the last system was solved afresh (its factors are self._full)
        self._prepared: dict[str, PreparedEdit] = {}
        self._vz: tuple | None = None  # (V_EP, Z, V_EP @ Z) of the last step in low-rank form
        self._consistent = True  # what is kept describes one system (False while it is rewritten)
        self.bordered = False
        self.superposed = False
        self.reused_panels = 0
        self.reused_factor = False
        self.far_blocks = False
        self.reused_self_block = False
        self.reused_solves = False
        self.prepared = False

    def solve(self, model: Model, settings: MeshSettings | None = None,
              cancel: CancelCallback | None = None) -> Solution:
        """Solve ``model`` (no error estimate), reusing the previous solve where possible.

        A solve cancelled (or failing) after its system is assembled keeps that system as the
        previous one (the next edit reuses it, as a drag released while its last position is
        being solved does); one that raises while the previous matrix is being written over
        forgets what was kept, and the next model is solved afresh.
        """
        self._consistent = True
        try:
            return self._solve(model, settings, cancel)
        except BaseException:
            if not self._consistent:
                self._previous, self._far, self._full, self._solves, self._last = None, None, None, None, None
                self._fresh = False
            raise

    def _solve(self, model: Model, settings: MeshSettings | None, cancel: CancelCallback | None) -> Solution:
        settings = settings or MeshSettings.for_density(model.mesh_density)
        self.reused_panels, self.reused_factor, self.far_blocks, self.reused_self_block = 0, False, False, False
        self.reused_solves = self.bordered = self.prepared = False
        self.superposed = False
        superposed = self._superposed(model, settings)
        if superposed is not None:
            self.superposed = True
            return superposed  # the system is unchanged: preparations still hold
        self._last = None
        prepared, self._prepared = self._prepared, {}
        fresh, self._fresh = self._fresh, False
        mesh = discretize_boundary(model, settings)
        if model.dielectrics:
            self._previous, self._far, self._full = None, None, None
            self._last = solve_mesh(model, mesh, cancel)
            return self._last
        large = solve_if_large(model, mesh, cancel)
        if large is not None:
            self._previous, self._far, self._full = None, None, None
            self._last = large
            return large
        kept_new, kept_old = self._unchanged(model, mesh)
        block, full_parts, prev = None, None, self._previous
        if len(kept_new) and fresh:
            self._take_prepared(model, mesh, kept_new, prepared)
        if len(kept_new):
            assert prev is not None
            full_parts = self._in_full(model, mesh, kept_new)
            anchor = None if full_parts is None else full_parts[2]
            block = ReusedBlock(prev.matrix, kept_new, kept_old, self._far, self.low_rank, anchor,
                                (prev.mesh.starts / prev.ell, prev.mesh.ends / prev.ell))
            self._consistent = False  # the previous matrix is being written over
        with one_blas_thread() if block is not None else contextlib.nullcontext():
            system = build_system(model, mesh, block)  # thin products U @ V of the low-rank blocks
        self._far = None if block is None else block.far
        self._previous = _Previous(model.conductor_names, system.mesh, system.length_scale_m,
                                   system.plane, system.matrix, system.layout)
        self._consistent = True
        self.reused_self_block = block is not None and block.moved_rigidly
        linear_solve = None
        if block is not None and prev is not None and system.length_scale_m == prev.ell:
            self.reused_panels = len(kept_new)
            self.far_blocks = block.far is not None
            linear_solve = self._block_solver(system, kept_new, block.far, full_parts)
        if linear_solve is None:
            linear_solve = self._fresh_solver(system)
        solution = solve_system(system, cancel, linear_solve)
        self._last = solution
        self._fresh = block is None and self._full is not None
        return solution

    # ---- making the first edit ready -----------------------------------------------------
    def prepare(self, names: Sequence[str] | None = None, cancel: CancelCallback | None = None) -> tuple[str, ...]:
        """Make the first edit of each named conductor (default: every one) cheap, in idle time
        after a fresh solve; returns the names made ready.

        For a conductor whose panels keep clear of the others' (the disc of
        :mod:`solver.bem.far_blocks`, widened by :data:`solver.bem.edit_blocks.DRAG_MARGIN`;
        :mod:`solver.bem.edit_preparation`),
        this does now what its first edit would: the expansion terms at the others' panels and
        their compression (an SVD), the local coefficients, and the solves with the others'
        block from the fresh solve's LU factors (:class:`BorderedSolves`). An edit that keeps
        the conductor's panels inside that disc then solves without any of it; one that
        leaves the disc, or edits two conductors, is solved as without preparation. The
        preparations are dropped by the next solve that changes the system (a potential-only
        change keeps them), and are held to :data:`PREPARED_BYTES` together. Nothing is
        prepared unless the last solve was a fresh one without dielectrics; the result does
        not depend on it (tested to 1e-12 against a fresh solve).

        ``cancel`` is polled between the steps; a cancelled preparation keeps what it finished.
        """
        full, prev, last = self._full, self._previous, self._last
        if not (self._fresh and self.low_rank and full is not None and prev is not None and last is not None):
            return ()
        if full.ell != prev.ell or full.plane != prev.plane or full.names != prev.names:
            return ()
        wanted = prev.names if names is None else tuple(n for n in prev.names if n in set(names))
        rhs = right_hand_sides(prev.mesh, prev.layout, *solve_columns(last.model)[2:])
        targets = prev.mesh.midpoints / prev.ell
        held = sum(p.nbytes for p in self._prepared.values())
        done = []
        for name in wanted:
            if name in self._prepared:
                done.append(name)
                continue
            if cancel is not None and cancel():
                break
            made = prepared_edit(name, full, prev.matrix, targets, rhs, cancel)
            if made is None:
                continue
            if held + made.nbytes > PREPARED_BYTES:
                break
            held += made.nbytes
            self._prepared[name] = made
            done.append(name)
        return tuple(done)

    def _take_prepared(self, model: Model, mesh: PanelMesh, kept_new: np.ndarray,
                       prepared: dict[str, PreparedEdit]) -> None:
        """Start from the preparation of the one edited conductor, when there is one."""
        kept = {model.conductor_names[k] for k in np.unique(mesh.conductor_index[kept_new])}
        edited = [n for n in model.conductor_names if n not in kept]
        if len(edited) == 1 and edited[0] in prepared and self._far is None:
            ready = prepared[edited[0]]
            self._far, self._solves = ready.far, ready.solves
            self.prepared = True

    def _superposed(self, model: Model, settings: MeshSettings) -> Solution | None:
        """The last solution at ``model``'s potentials and floating charges, when ``model``
        differs from the last one in nothing else (:meth:`Solution.with_potentials`, no solve)."""
        last = self._last
        if (last is None or last.unit_solutions is None or last.mesh.settings != settings
                or not last.unit_solutions.matches(model) or model.conductor_names != last.model.conductor_names):
            return None
        fixed = {c.name: c.potential_V for c in model.conductors if c.role == "fixed"}
        floating = {c.name: c.charge_C_per_m for c in model.conductors if c.role == "floating"}
        moved = last.with_potentials(fixed, floating or None)
        return moved if moved.model == model else None

    def _fresh_solver(self, system: BoundarySystem):
        """A solve with the LU factors of the whole matrix, kept for the next edit
        (:class:`BorderedSolves`); factorised at the first call, after the system's checks."""
        self._full = None

        def linear_solve(b: np.ndarray) -> np.ndarray:
            a, n, model = system.matrix, system.layout.n_panels, system.model
            with blas_threads_for(len(a)):
                if self._full is None:
                    try:
                        lu = scipy.linalg.lu_factor(a, check_finite=False)
                    except MemoryError:
                        raise MeshTooLargeError(
                            f"Not enough memory to factorise the system of {len(a)} unknowns; "
                            "choose a coarser mesh or close other programs."
                        ) from None
                    self._full = FullFactor(
                        lu, system.sources.starts[:n], system.sources.ends[:n], system.mesh.conductor_index,
                        model.conductor_names, tuple(c.role for c in model.conductors),
                        system.length_scale_m, system.plane, np.array(a[:n, n:]),
                    )
                return scipy.linalg.lu_solve(self._full.lu, b, check_finite=False)

        return linear_solve

    def _in_full(self, model: Model, mesh: PanelMesh, kept_new: np.ndarray):
        """(P in the last fresh system, its other panels, their (starts, ends)) when that
        system's block on the unchanged panels is this one's A_PP, else None."""
        full, prev = self._full, self._previous
        if full is None or prev is None or not self.low_rank or full.ell != prev.ell or full.plane != prev.plane:
            return None
        if model.conductor_names != full.names or tuple(c.role for c in model.conductors) != full.roles:
            return None
        kept_conductors = np.unique(mesh.conductor_index[kept_new])
        p_full = full.panels_of([full.names[k] for k in kept_conductors])
        if (len(p_full) != len(kept_new) or not np.array_equal(full.starts[p_full], mesh.starts[kept_new] / full.ell)
                or not np.array_equal(full.ends[p_full], mesh.ends[kept_new] / full.ell)):
            return None
        q_old = np.setdiff1d(np.arange(full.n_panels), p_full)
        return p_full, q_old, (full.starts[q_old], full.ends[q_old])

    # ---- what did not change -------------------------------------------------------------
    def _unchanged(self, model: Model, mesh: PanelMesh) -> tuple[np.ndarray, np.ndarray]:
        """Indices (new mesh, previous mesh) of the panels of conductors whose panels are
        identical in both, when the length scale and plane would be the same."""
        prev = self._previous
        empty = np.zeros(0, dtype=int)
        if prev is None:
            return empty, empty
        pts = np.vstack([mesh.starts, mesh.ends])
        ell = float(np.hypot(*(pts.max(axis=0) - pts.min(axis=0)))) or 1.0
        plane = None if model.ground_plane is None else model.ground_plane.y * model.metres_per_unit / ell
        if ell != prev.ell or plane != prev.plane:
            return empty, empty
        new_parts, old_parts = [], []
        for k, name in enumerate(model.conductor_names):
            if name not in prev.names:
                continue
            new = np.flatnonzero(mesh.conductor_index == k)
            old = np.flatnonzero(prev.mesh.conductor_index == prev.names.index(name))
            if (len(new) == len(old) and np.array_equal(mesh.starts[new], prev.mesh.starts[old])
                    and np.array_equal(mesh.ends[new], prev.mesh.ends[old])
                    and np.array_equal(mesh.is_strip[new], prev.mesh.is_strip[old])):
                new_parts.append(new)
                old_parts.append(old)
        if not new_parts:
            return empty, empty
        return np.concatenate(new_parts), np.concatenate(old_parts)

    # ---- block elimination ---------------------------------------------------------------
    def _block_solver(self, system: BoundarySystem, p: np.ndarray, far: FarParts | None, full_parts):
        a = system.matrix
        q = np.setdiff1d(np.arange(len(a)), p)
        starts, ends = system.sources.starts[p], system.sources.ends[p]
        ell, plane = system.length_scale_m, system.plane
        known = self._solves
        if isinstance(known, LUSolves) and known.matches(starts, ends, ell, plane):
            solves: LUSolves | BorderedSolves = known
            self.reused_factor = True
        else:
            with one_blas_thread():  # solves with the full factors, no factorisation
                bordered = self._bordered(system, p, q, far, full_parts)
            if bordered is not None:
                solves = bordered
                self.reused_factor = self.bordered = True
            else:
                self._full = None  # its unchanged block is no longer this one's: free its memory
                with blas_threads_for(len(a)):
                    lu = scipy.linalg.lu_factor(block(a, p, p), check_finite=False)
                solves = LUSolves(lu, starts, ends, ell, plane)
        self._solves = solves
        if len(q) == 0:
            return solves.solve
        if far is not None:
            with one_blas_thread():
                return self._far_solver(a, p, q, solves, far)
        with blas_threads_for(len(a)):
            a_pq, a_qp = block(a, p, q), block(a, q, p)
            y = solves.solve(a_pq)
            lu_s = scipy.linalg.lu_factor(block(a, q, q) - a_qp @ y, check_finite=False)

        def linear_solve(b: np.ndarray) -> np.ndarray:
            with one_blas_thread():
                yb = solves.solve(b[p])
                x_q = scipy.linalg.lu_solve(lu_s, b[q] - a_qp @ yb, check_finite=False)
                x = np.empty_like(b)
                x[p] = yb - y @ x_q
                x[q] = x_q
            return x

        return linear_solve

    def _bordered(self, system: BoundarySystem, p: np.ndarray, q: np.ndarray, far: FarParts | None,
                  full_parts) -> BorderedSolves | None:
        """Solves with A_PP from the last fresh solve's factors, when the extra columns are the
        same: on the expansion disc when it holds the edited conductors' panels of then and
        now, else on a disc around those of then alone."""
        if far is None or full_parts is None or self._full is None:
            return None
        a = system.matrix
        p_full, q_old, (old_starts, old_ends) = full_parts
        a_px = block(a, p, q[len(far.edited):])
        if not np.array_equal(a_px, self._full.extra_columns[p_full]):
            return None
        known = self._solves
        if isinstance(known, BorderedSolves) and known.serves(self._full, p_full, a_px):
            return known
        if len(far.near):  # the border would need the closed-form rows of the near panels too
            return None
        if far.anchored:
            disc, u, moment_map = far.disc, far.kept_from_edited[0], far.moment_map
        else:  # the conductor went far from where it was: a disc of its own for its old panels
            p_starts, p_ends = system.sources.starts[p], system.sources.ends[p]
            disc = separation(old_starts, old_ends, p_starts, p_ends, system.plane)
            if not disc.usable:
                return None
            u, moment_map = compressed_far_evaluation(disc, system.mesh.midpoints[p] / system.length_scale_m,
                                                      system.plane)
        rhs = right_hand_sides(system.mesh, system.layout, *solve_columns(system.model)[2:])
        solves = BorderedSolves(self._full, p_full, q_old, disc, u, a_px, moment_map, also=rhs[p])
        return solves if solves.usable else None

    def _far_solver(self, a: np.ndarray, p: np.ndarray, q: np.ndarray, solves: LUSolves | BorderedSolves,
                    far: FarParts):
        """Block elimination with A_PQ and A_QP in low-rank form.

        Q = the edited panels E (first in ``q``, as ``far.edited``) and the extra unknowns X
        (floating potentials, phi_inf). A_PQ = [U_PE | A_PX] diag(V_E, I) and
        A_QP = [[U_EP V_EP], [A_XP]], so Y = A_PP^-1 A_PQ = Z diag(V_E, I) with
        Z = A_PP^-1 [U_PE | A_PX]: r + |X| columns instead of |Q|.
        """
        n_edit = len(far.edited)
        assert np.array_equal(q[:n_edit], far.edited)
        x_idx = q[n_edit:]
        a_px, a_xp = block(a, p, x_idx), block(a, x_idx, p)
        u_pe, v_e = far.kept_from_edited
        u_ep, v_ep = far.edited_from_kept
        rank, n_x = u_pe.shape[1], len(x_idx)
        if len(far.near):
            z, self.reused_solves = solves.z_with_near(u_pe, far.near, a_px)
        else:
            z, self.reused_solves = solves.z_for(u_pe, a_px)  # A_PP^-1 [U_PE | A_PX]
        kept = self._vz
        if kept is not None and kept[0] is v_ep and kept[1] is z:  # a drag step inside the same disc
            vz = kept[2]
        else:
            vz = _local_terms_times(v_ep, far.near, z)
            self._vz = (v_ep, z, vz)

        def from_kept(values: np.ndarray, v_values: np.ndarray | None = None) -> np.ndarray:
            """A_QP @ values for (n_p, m) values (``v_values``: V_EP @ values when known)."""
            v_values = v_ep @ values if v_values is None else v_values
            return np.vstack([u_ep @ v_values, a_xp @ values])

        def to_columns(zq: np.ndarray) -> np.ndarray:
            """diag(V_E, I) @ x_Q."""
            return np.vstack([v_e @ zq[:n_edit], zq[n_edit:]])

        w = from_kept(z, vz)  # A_QP Z, (|Q|, r + |X|)
        s = np.array(block(a, q, q))  # a copy: the block may be a view of the system matrix
        s[:, :n_edit] -= w[:, :rank] @ v_e
        s[:, n_edit:] -= w[:, rank:rank + n_x]
        lu_s = scipy.linalg.lu_factor(s, check_finite=False, overwrite_a=True)

        def linear_solve(b: np.ndarray) -> np.ndarray:
            with one_blas_thread():
                yb = solves.solve(b[p])
                x_q = scipy.linalg.lu_solve(lu_s, b[q] - from_kept(yb), check_finite=False)
                x = np.empty_like(b)
                x[p] = yb - z @ to_columns(x_q)
                x[q] = x_q
            return x

        return linear_solve


def _local_terms_times(v_ep: np.ndarray, near: np.ndarray, z: np.ndarray) -> np.ndarray:
    """V_EP @ Z, where the last len(near) rows of V_EP select the near panels' rows of Z and
    the others are zero on those columns (:class:`solver.bem.edit_blocks.FarParts`)."""
    if not len(near):
        return v_ep @ z
    n_local = v_ep.shape[0] - len(near)
    far = np.setdiff1d(np.arange(v_ep.shape[1]), near)
    return np.vstack([v_ep[:n_local, far] @ z[far], z[near]])
