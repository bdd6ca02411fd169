"""Large models on coarse high-order panels: accuracy against 16-node panels, memory refusal."""

from __future__ import annotations

import numpy as np
import pytest

from solver import solve
from solver.bem.high_order.large_models import CHECK_ORDER, LARGE_MODEL_ORDER, coarse_panels, is_large, solve_large
from solver.bem.high_order.memory import check_system_memory, system_memory_bytes
from solver.bem.high_order.nystrom import NodalSolve
from solver.bem.high_order.solution import HighOrderSolution
from solver.bench.bus import hundred_conductor_bus
from solver.errors import MeshTooLargeError
from solver.mesh.curved_panels import CurvedPanels


def _refined_16_node(panels: CurvedPanels) -> CurvedPanels:
    """The same panels each split in two, with 16 nodes: a much finer discretisation."""
    fine = CurvedPanels(panels.pieces, panels.piece_index, panels.s0, panels.s1, 16)
    return fine.split(np.ones(fine.n_panels, dtype=bool))


def test_coarse_nodes_match_16_node_panels_on_a_2x2_bus():
    # 8 nodes per panel, no joint grading, against twice the panels with 16 nodes each:
    # the capacitance matrix agrees to 2e-5 relative (measured 4e-7 on the 3 x 3 bus against
    # an adaptive 16-node solve to 1e-9; the bound leaves a margin).
    model = hundred_conductor_bus(2, 2)
    coarse = coarse_panels(model)
    assert coarse.order == LARGE_MODEL_ORDER
    c = NodalSolve(model, coarse).capacitance_maxwell_F_per_m()
    fine_panels = _refined_16_node(coarse)
    assert fine_panels.n_nodes > 3 * coarse.n_nodes
    c_fine = NodalSolve(model, fine_panels).capacitance_maxwell_F_per_m()
    assert np.abs(c - c_fine).max() / np.abs(c_fine).max() < 2e-5


def test_error_estimate_of_a_large_solve_bounds_the_true_error():
    model = hundred_conductor_bus(2, 2)
    sol = solve_large(model)
    assert isinstance(sol, HighOrderSolution)
    c_fine = NodalSolve(model, _refined_16_node(coarse_panels(model))).capacitance_maxwell_F_per_m()
    c = sol.capacitance_maxwell_F_per_m
    true_error = np.abs(c - c_fine).max() / np.abs(c_fine).max()
    # The estimate (change from CHECK_ORDER nodes) is pessimistic but within a factor of 100.
    assert sol.estimated_relative_error is not None
    assert true_error <= sol.estimated_relative_error < 100 * max(true_error, 1e-12)
    assert CHECK_ORDER < LARGE_MODEL_ORDER


def test_solve_routes_many_conductors_to_the_large_path_and_few_to_the_low_order_path():
    assert is_large(hundred_conductor_bus(6, 5))
    assert not is_large(hundred_conductor_bus(2, 2))
    few = solve(hundred_conductor_bus(2, 1), estimate_error=False)
    assert not isinstance(few, HighOrderSolution)


def test_memory_estimate_counts_the_matrix_once():
    n, k = 10_000, 101
    need = system_memory_bytes(n, k)
    assert 8 * n * n < need < 1.3 * 8 * n * n  # the matrix once, not twice (factorised in place)


def test_oversized_system_is_refused_before_allocation(monkeypatch):
    monkeypatch.setenv("EDGEWISE_MAX_SYSTEM_MB", "4000")
    with pytest.raises(MeshTooLargeError, match="unknowns") as info:
        check_system_memory(30_000, 101, "'big' on 3,000 panels", available_bytes=64 * 1024**3)
    assert "7.46 GB" in str(info.value)  # 7.2 GB matrix, right-hand sides and block temporaries
    # Free memory below the budget limits too.
    monkeypatch.setenv("EDGEWISE_MAX_SYSTEM_MB", "100000")
    with pytest.raises(MeshTooLargeError):
        check_system_memory(10_000, 101, "'bus'", available_bytes=512 * 1024**2)
    assert check_system_memory(10_000, 101, "'bus'", available_bytes=64 * 1024**3) == system_memory_bytes(10_000, 101)


def test_nodal_solve_refuses_a_bus_over_a_small_budget(monkeypatch):
    monkeypatch.setenv("EDGEWISE_MAX_SYSTEM_MB", "10")
    with pytest.raises(MeshTooLargeError, match="2-conductor bus|4-conductor bus"):
        NodalSolve(hundred_conductor_bus(2, 2), coarse_panels(hundred_conductor_bus(2, 2)))
