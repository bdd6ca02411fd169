"""The fast grid sums of potential and field maps against the closed-form direct sums.

:func:`solver.evaluate_on_grid` sums on a lattice by FFT with exact near-field corrections
(:mod:`solver.bem.grid_sums`); the stated tolerance is 1e-6 of the largest |phi| and 2e-5 of
the largest |E| over the map, at every node outside metal, nodes next to the boundary included.
The reference is :meth:`Solution.potential_and_field` on the same nodes, which sums the
closed-form panel integrals of every panel (no approximation).
"""

from __future__ import annotations

import numpy as np
import pytest
from scipy.spatial import cKDTree

import solver
from solver.bem.grid_sums import grid_potential_and_gradient_sums
from solver.bem.kernels import log_potential_and_gradient_sums
from solver.figures.field_lines import evaluate_on_grid

SAMPLES = ["busbar_enclosure", "hv_electrode_over_earth", "microstrip_on_substrate", "coaxial_feeder"]


def _reference_nodes(solution, x, y, grid, rng):
    """Random free nodes plus every free node within one grid step of a panel midpoint."""
    xx, yy = np.meshgrid(x, y)
    nodes = np.column_stack([xx.ravel(), yy.ravel()])
    free = np.flatnonzero(np.isfinite(grid.potential_V.ravel()))
    step = max(x[1] - x[0], y[1] - y[0])
    near = cKDTree(nodes[free]).query_ball_point(solution.mesh.midpoints, step)
    near_idx = np.unique(np.concatenate([np.asarray(n, dtype=int) for n in near if n] or [np.zeros(0, int)]))
    picked = np.union1d(free[near_idx], rng.choice(free, size=min(800, len(free)), replace=False))
    return picked, nodes[picked]


@pytest.mark.parametrize("name", SAMPLES)
def test_grid_map_matches_direct_sums_within_the_stated_tolerance(name):
    model = solver.load_project(f"sample_geometries/{name}.json").with_mesh_density("coarse")
    sol = solver.solve(model, estimate_error=False)
    x0, y0, x1, y1 = (v * model.metres_per_unit for v in model.bounds())
    pad = 0.2 * max(x1 - x0, y1 - y0)
    x = np.linspace(x0 - pad, x1 + pad, 181)
    y = np.linspace(y0 - pad, y1 + pad, 137)  # a different step in y: cells are not square
    grid = evaluate_on_grid(sol, x, y)
    picked, pts = _reference_nodes(sol, x, y, grid, np.random.default_rng(3))
    assert len(picked) > 300
    phi_ref, e_ref = sol.potential_and_field(pts)
    phi = grid.potential_V.ravel()[picked]
    e = grid.field_V_per_m.ravel()[picked]
    e_ref_abs = np.hypot(*e_ref.T)
    assert np.all(np.isfinite(phi))
    assert np.max(np.abs(phi - phi_ref)) <= 1e-6 * np.max(np.abs(phi_ref))
    assert np.max(np.abs(e - e_ref_abs)) <= 2e-5 * np.max(e_ref_abs)


def test_grid_sums_match_closed_forms_for_random_panels_on_and_off_the_grid():
    """Panels of every length (many grid steps down to a thousandth of one), some outside the
    grid, some ending exactly on grid nodes: the vector gradient and the potential agree."""
    rng = np.random.default_rng(11)
    x, y = np.linspace(-1.0, 1.0, 97), np.linspace(-0.7, 0.9, 75)
    n = 400
    starts = rng.uniform([-1.3, -1.0], [1.3, 1.2], size=(n, 2))
    angle = rng.uniform(0, 2 * np.pi, n)
    length = 10.0 ** rng.uniform(-4.7, -0.5, n)
    ends = starts + length[:, None] * np.column_stack([np.cos(angle), np.sin(angle)])
    starts[:5] = np.column_stack([x[[3, 10, 20, 40, 60]], y[[5, 9, 30, 50, 70]]])  # on nodes
    q = rng.normal(size=n)
    s, grad = grid_potential_and_gradient_sums(x, y, starts, ends, q)
    xx, yy = np.meshgrid(x, y)
    nodes = np.column_stack([xx.ravel(), yy.ravel()])
    s_ref, g_ref = log_potential_and_gradient_sums(nodes, starts, ends, q)
    # at a panel's end the gradient is infinite: compare nodes clear of every panel
    d = nodes[:, None, :] - starts[None]
    t = np.clip(np.einsum("mnk,nk->mn", d, ends - starts) / length[None, :] ** 2, 0.0, 1.0)
    gap = np.hypot(*(d - t[..., None] * (ends - starts)[None]).transpose(2, 0, 1)).min(axis=1)
    clear = gap > 1e-9
    assert (~clear).sum() == 5  # the five panels that start on nodes
    assert np.max(np.abs(s.ravel() - s_ref)) <= 1e-6 * np.max(np.abs(s_ref))
    err = np.hypot(*(grad.reshape(-1, 2)[clear] - g_ref[clear]).T)
    assert np.max(err) <= 2e-5 * np.max(np.hypot(*g_ref[clear].T))


def test_uneven_axes_are_summed_point_by_point():
    model = solver.load_project("sample_geometries/coaxial_feeder.json").with_mesh_density("coarse")
    sol = solver.solve(model, estimate_error=False)
    x = np.array([-4.0, -3.1, -2.9, 0.5, 3.3]) * 1e-3
    y = np.array([-3.5, 0.2, 3.0]) * 1e-3
    phi, e = sol.potential_and_field_on_grid(x, y)
    xx, yy = np.meshgrid(x, y)
    phi_ref, e_ref = sol.potential_and_field(np.column_stack([xx.ravel(), yy.ravel()]))
    assert np.array_equal(phi.ravel(), phi_ref)
    assert np.array_equal(e.reshape(-1, 2), e_ref)


def test_skipped_nodes_leave_the_other_nodes_unchanged():
    """Nodes marked ``skip`` (inside metal, masked by the caller) get no exact near-field
    terms; every other node keeps its value (to rounding of the summation order)."""
    rng = np.random.default_rng(5)
    x, y = np.linspace(-1.0, 1.0, 41), np.linspace(-0.8, 0.8, 33)
    starts = rng.uniform(-0.9, 0.9, (60, 2))
    ends = starts + rng.uniform(-0.2, 0.2, (60, 2))
    q = rng.normal(size=60)
    skip = rng.random((len(y), len(x))) < 0.5
    s_all, g_all = grid_potential_and_gradient_sums(x, y, starts, ends, q)
    s_some, g_some = grid_potential_and_gradient_sums(x, y, starts, ends, q, skip)
    scale = np.max(np.abs(s_all))
    assert np.max(np.abs(s_some - s_all)[~skip]) <= 1e-13 * scale
    assert np.max(np.abs(g_some - g_all)[~skip]) <= 1e-13 * np.max(np.abs(g_all))
    assert np.max(np.abs(s_some - s_all)[skip]) > 1e-6 * scale  # the exact terms were left out there
