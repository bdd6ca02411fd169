"""The component-wise kernels and the fused potential-and-gradient pass equal the plain formulas.

The reference below is the straightforward (m, n, 2) evaluation of the closed-form panel
integrals (the formulas in the docstring of solver.bem.kernels), kept here as the oracle.
Tolerance: 1e-13 relative to the natural scale of each result (sum over panels of |q_j| times
the kernel's magnitude), on random targets and on targets placed on panels (midpoints, ends,
interior points).
"""

import numpy as np
import pytest

from solver import Circle, Conductor, GroundPlane, Model, Rectangle, Ring, solve_mesh
from solver.bem import kernels
from solver.mesh.panels import MeshSettings, discretize_boundary

RTOL = 1e-13


def _reference_local(targets, starts, ends):
    d = ends - starts
    length = np.hypot(d[:, 0], d[:, 1])
    t = d / length[:, None]
    n = np.column_stack([t[:, 1], -t[:, 0]])
    rel = targets[:, None, :] - 0.5 * (starts + ends)[None, :, :]
    u = rel[..., 0] * t[None, :, 0] + rel[..., 1] * t[None, :, 1]
    v = rel[..., 0] * n[None, :, 0] + rel[..., 1] * n[None, :, 1]
    half = 0.5 * length[None, :]
    s1, s2 = -half - u, half - u
    r1, r2 = s1 * s1 + v * v, s2 * s2 + v * v
    theta = np.where(v == 0.0, 0.0, np.arctan2(v * (s2 - s1), v * v + s1 * s2))
    with np.errstate(divide="ignore", invalid="ignore"):
        xl2 = np.where(r2 > 0.0, s2 * np.log(r2), 0.0)
        xl1 = np.where(r1 > 0.0, s1 * np.log(r1), 0.0)
    g = 0.5 * (xl2 - xl1) - (s2 - s1) + v * theta
    du = 0.5 * (np.log(np.maximum(r1, 1e-300)) - np.log(np.maximum(r2, 1e-300)))
    grad = du[..., None] * t[None] + theta[..., None] * n[None]
    return g, grad


def _panels_and_targets(seed: int = 1):
    rng = np.random.default_rng(seed)
    n = 300
    starts = rng.random((n, 2))
    ends = starts + 0.05 * rng.standard_normal((n, 2))
    on_panels = [0.5 * (starts + ends), starts, ends, starts + 0.3 * (ends - starts)]
    targets = np.vstack([rng.random((400, 2)) * 1.4 - 0.2, *on_panels])
    return starts, ends, targets, rng


def test_potential_gradient_and_normal_derivative_match_the_plain_formulas():
    starts, ends, targets, rng = _panels_and_targets()
    g_ref, grad_ref = _reference_local(targets, starts, ends)
    g = kernels.log_potential_integrals(targets, starts, ends)
    gx, gy = kernels.log_gradient_components(targets, starts, ends)
    scale_g, scale_grad = np.abs(g_ref).max(), np.abs(grad_ref).max()
    assert np.abs(g - g_ref).max() <= RTOL * scale_g
    assert np.abs(gx - grad_ref[..., 0]).max() <= RTOL * scale_grad
    assert np.abs(gy - grad_ref[..., 1]).max() <= RTOL * scale_grad
    assert np.array_equal(kernels.log_gradient_integrals(targets, starts, ends), np.stack([gx, gy], -1))
    normals = rng.standard_normal((len(targets), 2))
    normals /= np.hypot(*normals.T)[:, None]
    d = kernels.log_normal_derivative_integrals(targets, normals, starts, ends)
    d_ref = np.einsum("mnk,mk->mn", grad_ref, normals)
    assert np.abs(d - d_ref).max() <= RTOL * scale_grad


@pytest.mark.parametrize("columns", [(), (3,)])
def test_fused_sums_match_the_plain_formulas(columns):
    starts, ends, targets, rng = _panels_and_targets(2)
    q = rng.standard_normal((len(starts),) + columns)
    g_ref, grad_ref = _reference_local(targets, starts, ends)
    phi, grad = kernels.log_potential_and_gradient_sums(targets, starts, ends, q)
    qa = np.abs(q)
    phi_scale = np.abs(g_ref) @ qa
    grad_scale = np.abs(grad_ref).max(axis=-1) @ qa
    assert phi.shape == (len(targets),) + columns and grad.shape == (len(targets), 2) + columns
    assert np.all(np.abs(phi - g_ref @ q) <= RTOL * phi_scale)
    for k in range(2):
        assert np.all(np.abs(grad[:, k] - grad_ref[..., k] @ q) <= RTOL * grad_scale)


def test_small_blocks_give_the_same_result(monkeypatch):
    starts, ends, targets, rng = _panels_and_targets(3)
    q = rng.standard_normal(len(starts))
    whole = kernels.log_potential_and_gradient_sums(targets, starts, ends, q)
    monkeypatch.setattr(kernels, "CHUNK_PAIRS", 7 * len(starts) + 5)
    blocked = kernels.log_potential_and_gradient_sums(targets, starts, ends, q)
    for a, b in zip(whole, blocked):  # the matrix-vector products may round differently
        assert np.abs(a - b).max() <= RTOL * np.abs(a).max()


@pytest.mark.parametrize("plane", [None, GroundPlane(-3.0)])
def test_solution_potential_and_field_in_one_pass(plane):
    model = Model(
        unit="mm",
        ground_plane=plane,
        conductors=(
            Conductor("bar", (Rectangle((0.0, 0.0), 4.0, 2.0, 0.5),), potential_V=5.0),
            Conductor("wire", (Circle((5.0, 1.0), 0.7),), potential_V=-2.0),
        ) + (() if plane else (Conductor("shield", (Ring((1.0, 0.0), 12.0, 13.0),), role="reference"),)),
    )
    sol = solve_mesh(model, discretize_boundary(model, MeshSettings(0.5)))
    rng = np.random.default_rng(4)
    pts = np.column_stack([rng.uniform(-8e-3, 9e-3, 200), rng.uniform(-2e-3, 8e-3, 200)])
    pts = np.vstack([pts, sol.mesh.midpoints[:20]])
    phi, e = sol.potential_and_field(pts)
    ell = sol.length_scale_m
    g_ref, grad_ref = _reference_local(pts / ell, sol.source_starts, sol.source_ends)
    q = sol.total_strengths * sol.source_weights
    phi_ref, e_ref = -g_ref @ q, np.einsum("mnk,n->mk", grad_ref, q)
    phi_scale, e_scale = np.abs(g_ref) @ np.abs(q), np.abs(grad_ref).max(axis=-1) @ np.abs(q)
    if plane is not None:
        mir = pts / ell * np.array([1.0, -1.0]) + np.array([0.0, 2.0 * sol._plane_scaled()])
        g_img, grad_img = _reference_local(mir, sol.source_starts, sol.source_ends)
        phi_ref += g_img @ q
        img = np.einsum("mnk,n->mk", grad_img, q)
        img[:, 1] *= -1.0
        e_ref -= img
        phi_scale += np.abs(g_img) @ np.abs(q)
        e_scale += np.abs(grad_img).max(axis=-1) @ np.abs(q)
    phi_ref += sol.phi_inf_V
    assert np.all(np.abs(phi - phi_ref) <= RTOL * phi_scale + 1e-15 * abs(sol.phi_inf_V))
    assert np.all(np.abs(e - e_ref / ell) <= RTOL * e_scale[:, None] / ell)
    assert np.array_equal(sol.field_V_per_m(pts), e)
    assert np.allclose(sol.potential_V(pts), phi, rtol=0, atol=RTOL * phi_scale.max())


def test_large_evaluations_by_the_fmm_match_the_closed_forms(monkeypatch):
    """Above the pair threshold the fused sums go through the FMM with exact near terms."""
    from solver.bem import fast_operator

    model = Model(unit="mm", conductors=(
        Conductor("bar", (Rectangle((0.0, 0.0), 4.0, 2.0, 0.5),), potential_V=5.0),
        Conductor("shield", (Ring((1.0, 0.0), 12.0, 13.0),), role="reference")))
    sol = solve_mesh(model, discretize_boundary(model, MeshSettings(0.5)))
    rng = np.random.default_rng(5)
    pts = np.column_stack([rng.uniform(-9e-3, 9e-3, 300), rng.uniform(-9e-3, 9e-3, 300)])
    pts = np.vstack([pts, sol.mesh.midpoints[::7] + 1e-6 * sol.mesh.normals[::7]])
    exact = sol.potential_and_field(pts)
    monkeypatch.setattr(fast_operator, "FMM_EVALUATION_PAIRS", 0)
    fast = sol.potential_and_field(pts)
    assert np.abs(fast[0] - exact[0]).max() <= 1e-8 * np.abs(exact[0]).max()
    assert np.abs(fast[1] - exact[1]).max() <= 1e-8 * np.abs(exact[1]).max()
