"""The command line computes once: one solve, hot spots refined from its meshes, nothing solved twice."""

from __future__ import annotations

import contextlib
import io
import json
from pathlib import Path

import pytest
import scipy.linalg

from solver import analyse_hot_spots, load_project, solve
from solver.cli.command import main

ROOT = Path(__file__).resolve().parents[3]
COAX = ROOT / "sample_geometries" / "coaxial_feeder.json"


def _count(monkeypatch, name: str) -> list[tuple[int, ...]]:
    """Wrap ``scipy.linalg.<name>`` and record the shape of every matrix it is given."""
    shapes: list[tuple[int, ...]] = []
    original = getattr(scipy.linalg, name)

    def counting(a, *args, **kwargs):
        shapes.append(a.shape)
        return original(a, *args, **kwargs)

    monkeypatch.setattr(scipy.linalg, name, counting)
    return shapes


def test_coax_json_run_factorises_at_most_three_systems(monkeypatch):
    factorised = _count(monkeypatch, "lu_factor")
    isolated = _count(monkeypatch, "solve")
    out = io.StringIO()
    with contextlib.redirect_stdout(out):
        assert main([str(COAX), "--json"]) == 0
    data = json.loads(out.getvalue())
    # solve(): the mesh and the mesh at half the resolution; hot spots: one coarser mesh only
    # (the coax meets the 1 % target on the solution's own mesh, so nothing finer is solved)
    assert len(factorised) <= 3, factorised
    assert len(set(factorised)) == len(factorised), f"a system was factorised twice: {factorised}"
    assert data["hot_spots"]["n_panels"] == [factorised[-1][0] - 1, data["coarse_mesh_panels"], data["n_panels"]]
    # the equivalent radius of each conductor alone: a circle and a ring have closed forms
    # (capacity r and outer radius, Ransford 1995), so nothing more is solved for the coax
    assert isolated == []
    assert data["equivalent_radius_m"] == pytest.approx([1.0e-3, 4.0e-3], rel=1e-12)  # radius 1 mm; ring outer 4 mm


def test_hot_spots_from_a_solution_match_those_from_the_model(monkeypatch):
    model = load_project(COAX).with_mesh_density("coarse")
    solution = solve(model)
    factorised = _count(monkeypatch, "lu_factor")
    from_solution = analyse_hot_spots(solution)
    reused = len(factorised)
    from_model = analyse_hot_spots(model)
    assert reused == len(from_solution.levels) - 2  # the solution's two meshes were not solved again
    assert len(factorised) - reused == len(from_model.levels)
    assert from_solution.levels == from_model.levels and from_solution.n_panels == from_model.n_panels
    for a, b in zip(from_solution.hot_spots, from_model.hot_spots):
        assert a.field_V_per_m == pytest.approx(b.field_V_per_m, rel=1e-12)
        assert a.estimated_relative_error == pytest.approx(b.estimated_relative_error, rel=1e-6, abs=1e-15)
