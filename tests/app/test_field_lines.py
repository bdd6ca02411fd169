"""Field lines and field maps (solver/field_lines.py) on the coaxial line, where the answer is known:
phi(r) = V ln(b/r) / ln(b/a), radial field lines, uniform charge on the inner conductor."""

import math

import numpy as np
import pytest

from solver import Circle, Conductor, Model, Ring, evaluate_at_points, evaluate_on_grid, solve, trace_field_lines

A_MM, B_MM = 1.0, 3.5


@pytest.fixture(scope="module")
def coax():
    model = Model(unit="mm", mesh_density="coarse", conductors=(
        Conductor("inner", (Circle((0.0, 0.0), A_MM),), potential_V=1.0),
        Conductor("shield", (Ring((0.0, 0.0), B_MM, B_MM + 0.5),), role="reference"),
    ))
    return solve(model, estimate_error=False)


def test_grid_is_nan_inside_conductors_and_logarithmic_between(coax):
    x = np.linspace(-5e-3, 5e-3, 41)
    grid = evaluate_on_grid(coax, x, x)
    xx, yy = np.meshgrid(x, x)
    r_mm = np.hypot(xx, yy) * 1e3
    inside = (r_mm < A_MM * 0.98) | ((r_mm > B_MM * 1.02) & (r_mm < (B_MM + 0.5) * 0.98))
    assert np.isnan(grid.potential_V[inside]).all()
    between = (r_mm > 1.2 * A_MM) & (r_mm < 0.9 * B_MM)
    expected = np.log(B_MM / r_mm[between]) / math.log(B_MM / A_MM)
    assert np.nanmax(np.abs(grid.potential_V[between] - expected)) < 2e-3
    e_expected = 1.0 / (r_mm[between] * 1e-3 * math.log(B_MM / A_MM))
    assert np.allclose(grid.field_V_per_m[between], e_expected, rtol=5e-3)


def test_points_inside_a_conductor_are_nan(coax):
    phi, e = evaluate_at_points(coax, np.array([[0.0, 0.0], [2e-3, 0.0]]))
    assert np.isnan(phi[0]) and np.isnan(e[0])
    assert phi[1] == pytest.approx(math.log(B_MM / 2.0) / math.log(B_MM / A_MM), abs=2e-3)


def test_field_lines_are_radial_evenly_spaced_and_end_on_the_shield(coax):
    lines = trace_field_lines(coax, n_lines=40)
    # half the absolute charge is on the inner conductor: 20 lines leave it; the 20 seeded on the
    # shield end on the inner conductor and are not drawn twice
    assert len(lines) == 20
    starts = np.array([line.points_m[0] for line in lines])
    ends = np.array([line.points_m[-1] for line in lines])
    assert np.allclose(np.hypot(*starts.T) * 1e3, A_MM, atol=0.05)
    assert np.allclose(np.hypot(*ends.T) * 1e3, B_MM, atol=0.1)
    angles = np.sort(np.arctan2(starts[:, 1], starts[:, 0]))
    gaps = np.diff(np.r_[angles, angles[0] + 2 * math.pi])
    assert np.allclose(gaps, 2 * math.pi / 20, atol=0.02)  # uniform charge: equal angular steps
    end_angles = np.arctan2(ends[:, 1], ends[:, 0])
    start_angles = np.arctan2(starts[:, 1], starts[:, 0])
    assert np.allclose(np.angle(np.exp(1j * (end_angles - start_angles))), 0.0, atol=0.05)  # radial within 3 degrees
