"""The panels of a ring, built at once, equal grading every edge by itself (to the last bit)."""

from __future__ import annotations

import numpy as np
import pytest

from solver.io.project_file import load_project
from solver.mesh.grading import graded_panels
from solver.mesh.panels import MeshSettings, _plans, _ring_breaks, discretize_boundary
from solver.samples import sample_path


def _edge_by_edge(plan, settings):
    lo, hi, owner = [], [], []
    for e, length in enumerate(plan.edge_len):
        breaks = graded_panels(length, plan.h_start[e], plan.h_end[e], plan.h_max, settings.growth_ratio)
        lo.append(breaks[:-1])
        hi.append(breaks[1:])
        owner.append(np.full(len(breaks) - 1, e))
    return np.concatenate(lo), np.concatenate(hi), np.concatenate(owner)


@pytest.mark.parametrize("name", ["busbar_enclosure", "microstrip_on_substrate", "twin_lead"])
@pytest.mark.parametrize("level", [0.5, 1.0, 2.0])
def test_sample_rings_match_edge_by_edge_grading(name, level):
    model = load_project(sample_path(name))
    settings = MeshSettings(level)
    plans, _ = _plans(model, settings)
    singles = 0
    for plan in plans:
        got, want = _ring_breaks(plan, settings), _edge_by_edge(plan, settings)
        for g, w in zip(got, want):
            np.testing.assert_array_equal(g, w)
        singles += int(np.sum(np.bincount(got[2], minlength=len(plan.edge_len)) == 1))
    if name != "microstrip_on_substrate":  # straight outlines only there: every edge is graded
        assert singles > 0


def test_random_edges_match_edge_by_edge_grading():
    """Edge lengths around the end sizes, where one panel turns into two or three."""
    rng = np.random.default_rng(7)
    settings = MeshSettings(1.0)
    plans, _ = _plans(load_project(sample_path("busbar_enclosure")), settings)
    base = plans[0]
    n = 400
    h_max = 1e-3
    h_start = h_max * rng.uniform(0.05, 1.5, n)
    h_end = h_max * rng.uniform(0.05, 1.5, n)
    length = np.minimum(h_start, h_end) * rng.uniform(0.5, 3.0, n)
    plan = type(base)(base.ring, np.zeros(n), np.zeros(n), np.zeros(n, bool), length, h_start, h_end, h_max)
    got, want = _ring_breaks(plan, settings), _edge_by_edge(plan, settings)
    for g, w in zip(got, want):
        np.testing.assert_array_equal(g, w)
    counts = np.bincount(got[2], minlength=n)
    assert (counts == 1).any() and (counts > 1).any()


def test_mesh_is_the_edge_by_edge_mesh():
    """Panel ends, arc lengths and arc radii of a whole mesh built edge by edge."""
    model = load_project(sample_path("busbar_enclosure"))
    settings = MeshSettings(1.0)
    mesh = discretize_boundary(model, settings)
    plans, _ = _plans(model, settings)
    starts = []
    for plan in plans:
        pts = plan.ring.points
        for e, length in enumerate(plan.edge_len):
            p, q = pts[e], pts[(e + 1) % len(pts)]
            t = graded_panels(length, plan.h_start[e], plan.h_end[e], plan.h_max, settings.growth_ratio) / length
            starts.append((p[None, :] + t[:, None] * (q - p)[None, :])[:-1])
    np.testing.assert_array_equal(mesh.starts, np.concatenate(starts))
    assert np.all(np.isfinite(mesh.arc_length_m)) and np.all(np.diff(mesh.arc_length_m[mesh.conductor_index == 0]) > 0)
