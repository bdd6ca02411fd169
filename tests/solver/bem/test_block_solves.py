"""Solves with the block of the unchanged conductors from the full matrix's factors equal
solves with that block's own factors (the block-inverse identity in solver.bem.block_solves)."""

from __future__ import annotations

import numpy as np
import scipy.linalg

from solver.bem.block_solves import BorderedSolves, FullFactor, LUSolves
from solver.bem.far_blocks import far_evaluation, separation
from solver.bem.system import build_system
from solver.io.project_file import load_project
from solver.mesh.panels import MeshSettings, discretize_boundary
from solver.samples import sample_path


def test_bordered_solves_equal_the_blocks_own_lu():
    model = load_project(sample_path("busbar_enclosure"))
    mesh = discretize_boundary(model, MeshSettings(0.5))
    system = build_system(model, mesh)
    a, n = system.matrix, system.layout.n_panels
    s = system.sources
    full = FullFactor(scipy.linalg.lu_factor(a), s.starts[:n], s.ends[:n], mesh.conductor_index,
                      model.conductor_names, tuple(c.role for c in model.conductors),
                      system.length_scale_m, system.plane, np.array(a[:n, n:]))
    p = full.panels_of(["L2", "enclosure"])
    q_old = full.panels_of(["L1"])
    disc = separation(s.starts[q_old], s.ends[q_old], s.starts[p], s.ends[p], None, 1.25)
    assert disc.usable
    u = far_evaluation(disc, mesh.midpoints[p] / system.length_scale_m, None)
    a_px = a[np.ix_(p, np.arange(n, len(a)))]
    bordered = BorderedSolves(full, p, q_old, disc, u, a_px)
    assert bordered.usable
    own = LUSolves(scipy.linalg.lu_factor(a[np.ix_(p, p)]), s.starts[p], s.ends[p], 1.0, None)
    x = np.random.default_rng(3).standard_normal((len(p), 3))
    want = own.solve(x)
    assert np.max(np.abs(bordered.solve(x) - want)) <= 1e-11 * np.max(np.abs(want))  # measured 1e-14
    z_bordered, _ = bordered.z_for(u, a_px)
    z_own, reused = own.z_for(u, a_px)
    assert not reused and own.z_for(u, a_px)[1]  # kept for the same U
    # measured 1e-10: T takes A0's border in low-rank form (1e-14 from the closed form),
    # which A_PP's condition number (3.7e6 here, measured) amplifies
    assert np.max(np.abs(z_bordered - z_own)) <= 1e-9 * np.max(np.abs(z_own))
    # columns of A_PP^-1 kept by panel: equal to solving the unit vectors, computed once
    inverse = scipy.linalg.inv(a[np.ix_(p, p)])
    for solves in (own, bordered):
        first = solves.columns(np.array([5, 40, 7]))
        again = solves.columns(np.array([7, 5, 41]))
        assert solves._columns.shape[1] == 4  # 41 was the one missing
        assert np.max(np.abs(first - inverse[:, [5, 40, 7]])) <= 1e-9 * np.max(np.abs(inverse))
        assert np.array_equal(again[:, :2], first[:, [2, 0]])
        assert np.max(np.abs(again[:, 2] - inverse[:, 41])) <= 1e-9 * np.max(np.abs(inverse))


def test_columns_beyond_the_memory_bound_are_solved_not_kept(monkeypatch):
    import solver.bem.block_solves as block_solves

    rng = np.random.default_rng(5)
    a = rng.standard_normal((30, 30)) + 30 * np.eye(30)
    solves = LUSolves(scipy.linalg.lu_factor(a), np.zeros((30, 2)), np.zeros((30, 2)), 1.0, None)
    monkeypatch.setattr(block_solves, "MOST_KEPT_COLUMN_BYTES", 8 * 30 * 5)  # five columns
    inverse = np.linalg.inv(a)
    assert np.allclose(solves.columns(np.array([1, 2, 3])), inverse[:, [1, 2, 3]], rtol=0, atol=1e-13)
    assert np.allclose(solves.columns(np.array([4, 5, 6])), inverse[:, [4, 5, 6]], rtol=0, atol=1e-13)
    assert solves._columns.shape[1] == 3  # started over with the new ones
    assert np.allclose(solves.columns(np.arange(8)), inverse[:, :8], rtol=0, atol=1e-13)
    assert solves._columns.shape[1] == 0  # eight would not fit: solved, not kept
