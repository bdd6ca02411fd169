"""Property test: random small models load through model_from_dict and solve at coarse
density with physical invariants, or fail with a documented SolverError.

Invariants (common practice for the Maxwell capacitance matrix of conductors in a linear
dielectric: symmetric, positive diagonal, non-positive off-diagonal, non-negative row sums;
see e.g. Smythe, Static and Dynamic Electricity, 1968): finite results, invariance under
translation, scaling with the unit, and floating conductors carrying their set charge.
"""

from __future__ import annotations

import math

import numpy as np
import pytest
from hypothesis import HealthCheck, given, settings
from hypothesis import strategies as st

from solver import model_from_dict, model_to_dict, solve
from solver.errors import SolverError
from solver.mesh.panels import MeshSettings

COARSE = MeshSettings(0.5)
UNITS = ("m", "mm", "um", "mil", "inch")


def _shape(kind: str, cx: float, cy: float, size: float, seed: int) -> dict:
    if kind == "circle":
        return {"kind": "circle", "center": [cx, cy], "radius": size}
    if kind == "rectangle":
        return {"kind": "rectangle", "center": [cx, cy], "width": 2 * size, "height": size,
                "corner_radius": 0.2 * size * (seed % 2)}
    if kind == "polygon":
        n = 3 + seed % 4
        angles = 2 * math.pi * np.arange(n) / n + 0.3 * seed
        return {"kind": "polygon", "exterior": [[cx + size * math.cos(a), cy + size * math.sin(a)] for a in angles]}
    return {"kind": "strip", "points": [[cx - size, cy], [cx + size, cy + 0.3 * size * (seed % 3 - 1)]]}


@st.composite
def project_dicts(draw) -> dict:
    n = draw(st.integers(1, 3))
    plane = draw(st.booleans())
    conductors = []
    for i in range(n):
        kind = draw(st.sampled_from(["circle", "rectangle", "polygon", "strip"]))
        size = draw(st.floats(0.3, 1.0))
        # parts sit on a row 3 apart, so they may be close but never overlap
        cx = 3.0 * i + draw(st.floats(-0.2, 0.2))
        cy = draw(st.floats(1.6, 3.0)) if plane else draw(st.floats(-0.5, 0.5))
        role = draw(st.sampled_from(["fixed", "fixed", "reference", "floating"]))
        c = {"name": f"c{i}", "role": role, "shapes": [_shape(kind, cx, cy, size, draw(st.integers(0, 5)))]}
        if role == "fixed":
            c["potential_V"] = draw(st.sampled_from([1.0, -2.0, 100.0]))
        elif role == "floating":
            c["charge_C_per_m"] = draw(st.sampled_from([0.0, 1e-10, -3e-10]))
        conductors.append(c)
    data = {"format": "edgewise-project", "version": 1, "unit": draw(st.sampled_from(UNITS)),
            "mesh_density": "coarse", "conductors": conductors}
    if plane:
        data["ground_plane"] = {"y": 0.0}
    return data


def _solve(data: dict):
    return solve(model_from_dict(data), estimate_error=False, settings=COARSE)


def _moved(data: dict, dx: float, dy: float, factor: float = 1.0, unit: str | None = None) -> dict:
    def point(p):
        return [factor * p[0] + dx, factor * p[1] + dy]

    out = model_to_dict(model_from_dict(data))
    if unit:
        out["unit"] = unit
    if "ground_plane" in out:
        out["ground_plane"]["y"] = factor * out["ground_plane"]["y"] + dy
    for c in out["conductors"]:
        for s in c["shapes"]:
            for key in ("center",):
                if key in s:
                    s[key] = point(s[key])
            for key in ("exterior", "points"):
                if key in s:
                    s[key] = [point(p) for p in s[key]]
            for key in ("radius", "width", "height", "corner_radius", "inner_radius", "outer_radius"):
                if key in s:
                    s[key] = factor * s[key]
    return out


@settings(max_examples=30, deadline=None, suppress_health_check=[HealthCheck.too_slow])
@given(project_dicts())
def test_random_models_solve_with_physical_invariants(data):
    try:
        sol = _solve(data)
    except SolverError:
        return  # documented refusal (e.g. a net floating charge with no return path)
    model = sol.model
    assert np.isfinite(sol.conductor_potentials_V).all()
    assert np.isfinite(sol.strengths).all()
    q = np.asarray(sol.conductor_charges_C_per_m)
    assert np.isfinite(q).all()
    for k, c in enumerate(model.conductors):
        if c.role == "floating":  # floating charges honoured
            scale = max(1e-10, float(np.abs(q).max()))
            assert q[k] == pytest.approx(c.charge_C_per_m, abs=1e-6 * scale)
        if c.role == "fixed":
            assert sol.conductor_potentials_V[k] == pytest.approx(c.potential_V)
    if model.has_return_path and model.signal_names:
        c = sol.capacitance_maxwell_F_per_m
        assert np.isfinite(c).all()
        tol = 2e-3 * float(np.abs(c).max())
        assert np.allclose(c, c.T, rtol=0, atol=tol)
        assert (np.diag(c) > 0).all()
        off = c - np.diag(np.diag(c))
        assert (off <= tol).all()
        assert (c.sum(axis=1) >= -tol).all()

        moved = _solve(_moved(data, 17.0, 3.0 if "ground_plane" not in data else 0.0))
        assert np.allclose(moved.capacitance_maxwell_F_per_m, c, rtol=2e-3, atol=tol)
        # a drawing scaled up by 1000 in a unit 1000 times smaller is the same part
        smaller = {"m": "mm", "mm": "um"}.get(data["unit"])
        if smaller:
            same = _solve(_moved(data, 0.0, 0.0, 1000.0, smaller))
            assert np.allclose(same.capacitance_maxwell_F_per_m, c, rtol=2e-3, atol=tol)
