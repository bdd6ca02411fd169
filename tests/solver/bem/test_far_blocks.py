"""Low-rank blocks from multipole and local expansions equal the closed-form panel integrals.

The expansions of ln|x - z| are the classical ones (Greengard & Rokhlin, "A fast algorithm
for particle simulations", J. Comput. Phys. 73, 1987); here they are checked against
:func:`solver.bem.assembly.single_layer_potential_matrix`, column by column (relative to
the column's largest entry), on the busbar sample's panels, with and without a ground plane.
"""

from __future__ import annotations

import numpy as np
import pytest

from solver.bem.assembly import single_layer_potential_matrix
from solver.bem.far_blocks import (
    MAX_RATIO,
    compressed_far_evaluation,
    far_potential_factors,
    near_potential_factors,
    panel_moments,
    separation,
)
from solver.bem.system import build_system
from solver.io.project_file import load_project
from solver.mesh.panels import MeshSettings, discretize_boundary
from solver.samples import sample_path


@pytest.fixture(scope="module")
def busbar():
    model = load_project(sample_path("busbar_enclosure"))
    mesh = discretize_boundary(model, MeshSettings(0.5))
    system = build_system(model, mesh)
    return mesh, system


def _column_error(approx, exact):
    return float(np.max(np.abs(approx - exact).max(axis=0) / np.abs(exact).max(axis=0)))


@pytest.mark.parametrize("plane", [None, -0.35])
def test_blocks_between_a_bar_and_the_rest(busbar, plane):
    mesh, system = busbar
    s = system.sources
    mids = mesh.midpoints / system.length_scale_m
    q = mesh.conductor_index == 0
    p = ~q
    sep = separation(s.starts[q], s.ends[q], s.starts[p], s.ends[p], plane)
    assert sep.usable and 0.3 < sep.ratio < 0.5 and sep.terms > 20
    u, v = far_potential_factors(sep, s.starts[q], s.ends[q], mids[p], plane)
    exact = single_layer_potential_matrix(mids[p], s.starts[q], s.ends[q], plane)
    assert _column_error(u @ v, exact) < 1e-11
    u, v = near_potential_factors(sep, s.starts[p], s.ends[p], mids[q], plane)
    exact = single_layer_potential_matrix(mids[q], s.starts[p], s.ends[p], plane)
    # the enclosure's corner panels are 1e-7 of the model long: the closed form itself loses
    # digits there (see solver.bem.geometry_update); ordinary panels agree to round-off
    long = np.hypot(*(s.ends[p] - s.starts[p]).T) > 1e-4
    assert _column_error((u @ v)[:, long], exact[:, long]) < 1e-10
    assert _column_error(u @ v, exact) < 1e-7
    assert u.shape[1] == (1 + 2 * sep.terms) * (1 if plane is None else 2)


def test_truncation_is_what_limits_accuracy(busbar):
    """Fewer terms give a visibly worse block: the check above can fail."""
    mesh, system = busbar
    s = system.sources
    mids = mesh.midpoints / system.length_scale_m
    q = mesh.conductor_index == 0
    p = ~q
    sep = separation(s.starts[q], s.ends[q], s.starts[p], s.ends[p], None)
    short = type(sep)(sep.centre, sep.radius, sep.ratio, 5)
    u, v = far_potential_factors(short, s.starts[q], s.ends[q], mids[p], None)
    exact = single_layer_potential_matrix(mids[p], s.starts[q], s.ends[q], None)
    assert _column_error(u @ v, exact) > 1e-5


def test_close_or_overlapping_groups_are_refused():
    starts = np.array([[0.0, 0.0], [1.0, 0.0]])
    ends = np.array([[1.0, 0.0], [1.0, 1.0]])
    near = separation(starts, ends, starts + [1.3, 0.0], ends + [1.3, 0.0], None)
    assert not near.usable and near.ratio > MAX_RATIO
    inside = separation(starts, ends, np.array([[0.5, 0.4]]), np.array([[0.6, 0.4]]), None)
    assert not inside.usable
    far = separation(starts, ends, starts + [5.0, 0.0], ends + [5.0, 0.0], None)
    assert far.usable
    # images lie farther than the panels themselves when everything is above the plane
    below = separation(starts, ends, starts + [5.0, 0.0], ends + [5.0, 0.0], -0.1)
    assert below.ratio == far.ratio


@pytest.mark.parametrize("plane", [None, -0.35])
def test_compressed_far_terms_give_the_same_blocks_with_fewer_columns(busbar, plane):
    """Q @ (C @ V) equals the closed-form block as U @ V does, for the bar's panels and for
    the bar moved inside the disc (the compression holds for any panels in it)."""
    mesh, system = busbar
    s = system.sources
    mids = mesh.midpoints / system.length_scale_m
    q = mesh.conductor_index == 0
    p = ~q
    sep = separation(s.starts[q], s.ends[q], s.starts[p], s.ends[p], plane, margin=1.25)
    basis, moment_map = compressed_far_evaluation(sep, mids[p], plane)
    assert np.allclose(basis.T @ basis, np.eye(basis.shape[1]), atol=1e-12)
    assert basis.shape[1] < 0.8 * moment_map.shape[1]
    shift = np.array([0.1 * sep.radius, 0.0])
    for starts, ends in ((s.starts[q], s.ends[q]), (s.starts[q] + shift, s.ends[q] + shift)):
        assert sep.holds(starts, ends)
        exact = single_layer_potential_matrix(mids[p], starts, ends, plane)
        u, v = far_potential_factors(sep, starts, ends, mids[p], plane)
        approx = basis @ (moment_map @ panel_moments(sep, starts, ends, plane))
        assert _column_error(approx, exact) < 1e-11
        assert _column_error(approx, u @ v) < 1e-13
