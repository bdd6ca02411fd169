"""Solves with the block A_PP of the unchanged conductors, for :mod:`solver.bem.geometry_update`.

Two ways, one interface (``solve(x)`` = A_PP^-1 x, ``z_for(U, A_PX)`` = A_PP^-1 [U | A_PX]):

* :class:`LUSolves`: the LU factors of A_PP itself;
* :class:`BorderedSolves`: no factorisation at all, from the LU factors of the full matrix
  A0 of the last fresh solve, whose block on the same panels P is A_PP. Write
  A0 = [[A_PP, B], [C, D]] with B = [U V0 | A_PX] in low-rank form (U the far terms at the
  panels P of a disc around the edited conductor's old and new panels, V0 the moments of its
  old panels, :mod:`solver.bem.far_blocks`). For y = A0^-1 [x; 0],
      A_PP y_P + B y_Q = x,   so   A_PP^-1 x = y_P + A_PP^-1 [U | A_PX] (diag(V0, I) y_Q),
  and with x = the columns of [U | A_PX] this gives T = A_PP^-1 [U | A_PX] from
      T (I - W) = Y_P,   W = diag(V0, I) Y_Q,   Y = A0^-1 [[U | A_PX]; 0]
  (r + |X| solves with A0's factors and an (r + |X|)-square system). The first edit of a
  conductor after a fresh solve then costs about a tenth of factorising A_PP. The disc needs
  to hold only the edited conductor's panels of the fresh solve: once made, the solves serve
  wherever the conductor is dragged (for a disc that does not hold its new panels,
  A_PP^-1 [U' | A_PX] of the new disc costs r' + |X| more solves).
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np
import scipy.linalg

from solver.bem.far_blocks import Separation, panel_moments

#: Largest condition number of I - W accepted for :class:`BorderedSolves`. I - W is singular
#: exactly when the full matrix's block on the edited panels and extra unknowns is (for
#: instance a floating conductor without a plane: its charge row and the neutrality row agree
#: on its own panels); round-off in T grows with it.
MAX_BORDER_CONDITION = 1e6

#: Most memory (bytes) the columns of A_PP^-1 kept by panel may take (:meth:`LUSolves.columns`).
MOST_KEPT_COLUMN_BYTES = 64 * 2**20


@dataclass(frozen=True)
class FullFactor:
    """The LU factors of a fresh solve's full matrix, and what identifies its panels (scaled)."""

    lu: tuple
    starts: np.ndarray
    ends: np.ndarray
    conductor_index: np.ndarray
    names: tuple[str, ...]
    roles: tuple[str, ...]
    ell: float
    plane: float | None
    extra_columns: np.ndarray  # A0[:n_panels, n_panels:], the floating and phi_inf columns

    @property
    def n_panels(self) -> int:
        return len(self.starts)

    def panels_of(self, names: list[str]) -> np.ndarray:
        """Indices of the panels of the named conductors, in the given order."""
        parts = [np.flatnonzero(self.conductor_index == self.names.index(n)) for n in names]
        return np.concatenate(parts) if parts else np.zeros(0, dtype=int)


class _InverseColumns:
    """Columns of A_PP^-1 kept by panel, for the exact rows of near panels
    (:class:`solver.bem.edit_blocks.FarParts` ``near``): a drag that passes a neighbour makes
    a new disc at every long step, but the neighbour's panels, and so these columns, stay."""

    def _init_columns(self, n_p: int) -> None:
        self._n_p = n_p
        self._columns = np.zeros((n_p, 0))  # kept columns of A_PP^-1
        self._column_of = np.full(n_p, -1)  # position of each panel's column in _columns, -1 if not kept
        self._mixed: tuple | None = None  # (U_PE, A_PX, Z) of the last z_with_near

    def solve(self, x: np.ndarray) -> np.ndarray:
        raise NotImplementedError

    def columns(self, idx: np.ndarray) -> np.ndarray:
        """A_PP^-1 e_j for each j in ``idx`` (positions in P), (n_p, len(idx)); the missing
        ones solved together and kept."""
        missing = idx[self._column_of[idx] < 0]
        if len(missing) and 8 * self._n_p * (self._columns.shape[1] + len(missing)) > MOST_KEPT_COLUMN_BYTES:
            self._init_columns(self._n_p)  # start over
            missing = np.unique(idx)
            if 8 * self._n_p * len(missing) > MOST_KEPT_COLUMN_BYTES:  # too many to keep: solved, not kept
                return self.solve(self._unit_columns(idx))
        if len(missing):
            self._column_of[missing] = self._columns.shape[1] + np.arange(len(missing))
            self._columns = np.hstack([self._columns, self.solve(self._unit_columns(missing))])
        return self._columns[:, self._column_of[idx]]

    def _unit_columns(self, idx: np.ndarray) -> np.ndarray:
        unit = np.zeros((self._n_p, len(idx)))
        unit[idx, np.arange(len(idx))] = 1.0
        return unit

    def z_with_near(self, u_pe: np.ndarray, near: np.ndarray, a_px: np.ndarray) -> tuple[np.ndarray, bool]:
        """(A_PP^-1 [U_PE | A_PX], reused) when the last len(near) columns of U_PE select the
        near panels (:class:`solver.bem.edit_blocks.FarParts`): their columns come from those
        kept by panel (:meth:`columns`), the rest are solved; the whole is kept while U_PE is
        the same array (the same disc)."""
        kept = self._mixed
        if kept is not None and kept[0] is u_pe and np.array_equal(kept[1], a_px):
            return kept[2], True
        rank = u_pe.shape[1] - len(near)
        solved = self.solve(np.hstack([u_pe[:, :rank], a_px]))
        z = np.hstack([solved[:, :rank], self.columns(near), solved[:, rank:]])
        self._mixed = (u_pe, np.array(a_px), z)
        return z, False


class LUSolves(_InverseColumns):
    """A_PP^-1 by the LU factors of A_PP (``starts``, ``ends``: its panels, scaled)."""

    def __init__(self, lu: tuple, starts: np.ndarray, ends: np.ndarray, ell: float, plane: float | None) -> None:
        self.lu, self.starts, self.ends, self.ell, self.plane = lu, starts, ends, ell, plane
        self._init_columns(len(starts))
        self._z: tuple | None = None
        self._last: tuple | None = None  # (x, A_PP^-1 x) of the last solve

    def matches(self, starts: np.ndarray, ends: np.ndarray, ell: float, plane: float | None) -> bool:
        return (ell == self.ell and plane == self.plane and starts.shape == self.starts.shape
                and np.array_equal(starts, self.starts) and np.array_equal(ends, self.ends))

    def solve(self, x: np.ndarray) -> np.ndarray:
        """A_PP^-1 x (the last one kept: a drag's right-hand sides repeat from step to step)."""
        last = self._last
        if last is not None and last[0].shape == x.shape and np.array_equal(last[0], x):
            return last[1].copy()
        out = scipy.linalg.lu_solve(self.lu, x, check_finite=False)
        if x.ndim == 2 and x.shape[1] <= 8:  # right-hand sides, not the columns of a block
            self._last = (np.array(x), out.copy())
        return out

    def z_for(self, u: np.ndarray, a_px: np.ndarray) -> tuple[np.ndarray, bool]:
        """(A_PP^-1 [U | A_PX], reused): kept while U is the same array (the same disc)."""
        z = self._z
        if z is not None and z[0] is u and z[1].shape == a_px.shape and np.array_equal(z[1], a_px):
            return z[2], True
        out = self.solve(np.hstack([u, a_px]))
        self._z = (u, np.array(a_px), out)
        return out, False


class BorderedSolves(_InverseColumns):
    """A_PP^-1 from the full factors (see the module docstring).

    ``p_full``: the panels P in the full system (in the order of P); ``q_old``: the other
    panels of the full system (the edited conductors' old panels); ``disc`` must hold them.
    ``usable`` is False (and the solves must not be used) when I - W is ill-conditioned.
    ``moment_map``: C when ``u`` is compressed (U = Q, moments C @ V; see
    :func:`solver.bem.far_blocks.compressed_far_evaluation`). ``also``: right-hand sides
    (rows P) expected at the first :meth:`solve`, solved in the same pass as the border.
    """

    def __init__(self, full: FullFactor, p_full: np.ndarray, q_old: np.ndarray, disc: Separation,
                 u: np.ndarray, a_px: np.ndarray, moment_map: np.ndarray | None = None,
                 also: np.ndarray | None = None) -> None:
        self.full, self.p_full, self.disc, self.u = full, p_full, disc, u
        self._init_columns(len(p_full))
        size = full.lu[0].shape[0]
        self.q_full = np.concatenate([q_old, np.arange(full.n_panels, size)])
        self.v_old = panel_moments(disc, full.starts[q_old], full.ends[q_old], full.plane)
        if moment_map is not None:  # U is compressed (far_blocks.compressed_far_evaluation)
            self.v_old = moment_map @ self.v_old
        self.a_px = np.array(a_px)
        n_border = u.shape[1] + self.a_px.shape[1]
        # the right-hand sides ``also`` go along in the same pass over the factors
        y = self._full_solve(np.hstack([u, self.a_px] + ([] if also is None else [also])))
        border = np.eye(n_border) - self._old_columns(y[self.q_full, :n_border])
        self.usable = bool(np.all(np.isfinite(border)) and np.linalg.cond(border) <= MAX_BORDER_CONDITION)
        self.t = y[p_full, :n_border]
        if self.usable:
            self.t = scipy.linalg.solve(border.T, self.t.T, check_finite=False).T
        self._used = False
        self._z: tuple | None = None
        self._last: tuple | None = None  # (x, A_PP^-1 x) of the last solve
        if also is not None and self.usable:
            self._last = (np.array(also), self._combined(y[:, n_border:]))

    def _full_solve(self, x_p: np.ndarray) -> np.ndarray:
        padded = np.zeros((self.full.lu[0].shape[0],) + x_p.shape[1:])
        padded[self.p_full] = x_p
        return scipy.linalg.lu_solve(self.full.lu, padded, check_finite=False)

    def _old_columns(self, y_q: np.ndarray) -> np.ndarray:
        """diag(V0, I) y_Q."""
        n_old = self.v_old.shape[1]
        return np.vstack([self.v_old @ y_q[:n_old], y_q[n_old:]])

    def serves(self, full: FullFactor, p_full: np.ndarray, a_px: np.ndarray) -> bool:
        """True when these solves are A_PP^-1 for that system (wherever the edited panels
        are now: the disc holds their panels of the fresh solve, which is all it needs)."""
        return (full is self.full and np.array_equal(p_full, self.p_full) and a_px.shape == self.a_px.shape
                and np.array_equal(a_px, self.a_px))

    def solve(self, x: np.ndarray) -> np.ndarray:
        """A_PP^-1 x (the last one kept: a drag's right-hand sides repeat from step to step)."""
        last = self._last
        if last is not None and last[0].shape == x.shape and np.array_equal(last[0], x):
            return last[1].copy()
        out = self._combined(self._full_solve(x))
        self._last = (np.array(x), out.copy())
        return out

    def _combined(self, y: np.ndarray) -> np.ndarray:
        return y[self.p_full] + self.t @ self._old_columns(y[self.q_full])

    def z_for(self, u: np.ndarray, a_px: np.ndarray) -> tuple[np.ndarray, bool]:
        """A_PP^-1 [U | A_PX] and whether it was reused: T itself for this disc's U, else
        solved (and kept while U is the same array, as :meth:`LUSolves.z_for`)."""
        if u is self.u and np.array_equal(a_px, self.a_px):
            reused, self._used = self._used, True
            return self.t, reused
        z = self._z
        if z is not None and z[0] is u and z[1].shape == a_px.shape and np.array_equal(z[1], a_px):
            return z[2], True
        out = self.solve(np.hstack([u, a_px]))
        self._z = (u, np.array(a_px), out)
        return out, False
