"""The fast path (FMM-accelerated GMRES) equals the dense LU; too-large models are refused."""

import numpy as np
import pytest

from solver import (
    Circle,
    Conductor,
    Dielectric,
    GroundPlane,
    Model,
    Rectangle,
    Strip,
    solve_mesh,
)
from solver.bem import fast_solve
from solver.bem.fast_solve import InsufficientMemoryError, solve_fast, solve_if_large
from solver.bem.solve import solve_system
from solver.bem.system import build_system
from solver.bench.bus import hundred_conductor_bus
from solver.errors import SolverError
from solver.mesh.panels import MeshSettings, discretize_boundary

#: FMM precision (about 5e-10), Gauss-Legendre far field (< 1e-8 of each panel's part) and
#: GMRES residual 1e-8: capacitance and charges agree with the dense LU to better than 1e-7.
RTOL_CHARGE = 1e-7


def _both(model: Model, level: float):
    mesh = discretize_boundary(model, MeshSettings(level))
    return solve_fast(model, mesh), solve_system(build_system(model, mesh))


def _rel(a, b) -> float:
    return float(np.abs(np.asarray(a) - np.asarray(b)).max() / np.abs(b).max())


def test_small_bus_in_a_box_equals_the_dense_solve():
    fast, dense = _both(hundred_conductor_bus(2, 1), 0.25)
    assert _rel(fast.capacitance_maxwell_F_per_m, dense.capacitance_maxwell_F_per_m) < RTOL_CHARGE
    assert _rel(fast.conductor_charges_C_per_m, dense.conductor_charges_C_per_m) < RTOL_CHARGE
    pts = np.array([[0.0, 0.0], [0.01, 0.02], [-0.03, 0.0]])
    assert _rel(fast.potential_V(pts), dense.potential_V(pts)) < RTOL_CHARGE
    assert fast.n_unknowns == dense.n_unknowns


def test_ground_plane_floating_conductor_and_strip_equal_the_dense_solve():
    model = Model(
        unit="mm",
        ground_plane=GroundPlane(0.0),
        conductors=(
            Conductor("bar", (Rectangle((-3.0, 2.0), 2.0, 1.0, 0.2),), potential_V=3.0),
            Conductor("trace", (Strip(((1.0, 1.0), (3.0, 1.0))),), potential_V=-1.0),
            Conductor("drain", (Circle((0.0, 4.0), 0.6),), role="floating", charge_C_per_m=2e-11),
        ),
    )
    fast, dense = _both(model, 0.5)
    assert _rel(fast.capacitance_maxwell_F_per_m, dense.capacitance_maxwell_F_per_m) < RTOL_CHARGE
    assert _rel(fast.conductor_potentials_V, dense.conductor_potentials_V) < RTOL_CHARGE
    assert _rel(fast.surface_field_V_per_m, dense.surface_field_V_per_m) < 1e-6
    quick = fast.with_potentials({"bar": -2.0})
    assert _rel(quick.conductor_charges_C_per_m,
                solve_system(build_system(model.with_potentials({"bar": -2.0}), fast.mesh)).conductor_charges_C_per_m
                ) < RTOL_CHARGE


def test_solve_mesh_switches_to_the_fast_path_above_the_crossover(monkeypatch):
    model = hundred_conductor_bus(2, 1)
    mesh = discretize_boundary(model, MeshSettings(0.25))
    assert solve_if_large(model, mesh) is None
    monkeypatch.setattr(fast_solve, "FAST_PATH_FROM_PANELS", mesh.n_panels)
    assert solve_if_large(model, mesh) is None  # the dense LU is quicker here
    monkeypatch.setattr(fast_solve, "DENSE_FLOPS_PER_S", 1.0)
    calls = []
    monkeypatch.setattr(fast_solve, "solve_fast", lambda *a: calls.append(a) or "fast")
    assert solve_mesh(model, mesh) == "fast" and len(calls) == 1


def test_refuses_with_the_cause_when_memory_is_short(monkeypatch):
    model = hundred_conductor_bus(2, 2)
    mesh = discretize_boundary(model, MeshSettings(0.25))
    monkeypatch.setattr(fast_solve, "available_memory_bytes", lambda: 10_000_000)
    with pytest.raises(InsufficientMemoryError, match=r"'4-conductor bus' is too large .* the fast solver on "
                       r"[\d,]+ panels with 5 right-hand sides needs about [\d.]+ GB, but only 0.0 GB"):
        solve_mesh(model, mesh)
    assert issubclass(InsufficientMemoryError, SolverError)


def test_dense_only_models_are_refused_naming_the_dense_system(monkeypatch):
    model = Model(
        unit="mm",
        conductors=(Conductor("w", (Circle((0.0, 0.0), 1.0),), potential_V=1.0),
                    Conductor("g", (Rectangle((0.0, -3.0), 8.0, 1.0),), role="reference")),
        dielectrics=(Dielectric("coat", (Rectangle((0.0, 1.5), 3.0, 1.0),), 3.0),),
    )
    mesh = discretize_boundary(model, MeshSettings(0.5))
    monkeypatch.setattr(fast_solve, "available_memory_bytes", lambda: 1000)
    with pytest.raises(InsufficientMemoryError, match="the dense system of .* dielectric regions"):
        solve_mesh(model, mesh)


def test_memory_estimates_grow_with_the_model():
    small = discretize_boundary(hundred_conductor_bus(2, 2), MeshSettings(0.25))
    large = discretize_boundary(hundred_conductor_bus(4, 4), MeshSettings(0.25))
    assert fast_solve.fast_memory_bytes(large, False, 17) > 3 * fast_solve.fast_memory_bytes(small, False, 5)
    # The 100-conductor bus at the normal density: the dense matrix alone is ~35 GB.
    assert fast_solve.dense_memory_bytes(65_798, 101) > 8 * 65_798**2
    # Many right-hand sides favour the LU; few favour the fast path at the same size.
    assert fast_solve.dense_seconds(20_000) < fast_solve.fast_seconds(20_000, 101, 101)
    assert fast_solve.dense_seconds(20_000) > fast_solve.fast_seconds(20_000, 2, 3)
