"""Zero-thickness strips and sharp corners: singular charge, graded panels.

Sources
-------
- Arcsine law: the equilibrium measure of a segment [-a, a] is dx / (pi sqrt(a^2 - x^2))
  (T. Ransford, Potential Theory in the Complex Plane, Cambridge University Press, 1995, sec. 3.3
  and Table 5.1 for its logarithmic capacity a / 2).
- Edge condition: near a conducting wedge whose field region opens by beta the charge density
  goes like r^(pi/beta - 1); -1/3 at a right-angle convex corner (J. D. Jackson, Classical
  Electrodynamics, 3rd ed., Wiley, 1999, sec. 2.11).
- Zero-thickness stripline: C' = 4 eps K(k') / K(k), k = sech(pi w / 2b), strip of width w
  centred between plates spaced b (S. B. Cohn, "Characteristic impedance of the shielded-strip
  transmission line", IRE Trans. Microwave Theory Tech., 1954). The infinite plates are wide
  reference strips (width w + 12 b); the field between plates decays like exp(-pi x / b), so the
  truncation changes C' by far less than the tolerance.

Tolerance: 1e-3 relative for strips and corners.
"""

import math

import numpy as np
import pytest
from scipy.optimize import least_squares
from scipy.special import ellipk

from solver import (
    EPSILON_0_F_PER_M,
    Conductor,
    MeshSettings,
    Model,
    Rectangle,
    Ring,
    Strip,
    equilibrium_charge,
    solve,
)


def test_isolated_strip_follows_arcsine_law():
    a = 2.0
    eq = equilibrium_charge(Model(unit="mm", conductors=(Conductor("strip", (Strip(((-a, 0.0), (a, 0.0))),),),)))
    mesh = eq.mesh
    x1 = np.minimum(mesh.starts[:, 0], mesh.ends[:, 0]) / 1e-3
    x2 = np.maximum(mesh.starts[:, 0], mesh.ends[:, 0]) / 1e-3
    order = np.argsort(x1)
    x1, x2 = x1[order], np.clip(x2[order], -a, a)
    density = eq.density_per_coulomb[order] * 1e-3  # per unit charge, per mm
    charge = density * (x2 - x1)
    # The cumulative charge from the left edge, graded end panels included.
    cumulative_exact = 0.5 + np.arcsin(x2 / a) / math.pi
    assert np.abs(np.cumsum(charge) - cumulative_exact).max() < 1e-3
    # Pointwise away from the edges (the density is infinite at them).
    inner = np.abs(x1) < 0.75 * a
    exact_average = (np.arcsin(x2[inner] / a) - np.arcsin(x1[inner] / a)) / (math.pi * (x2 - x1)[inner])
    assert np.abs(density[inner] / exact_average - 1).max() < 1e-3
    assert charge.sum() == pytest.approx(1.0, rel=1e-9)
    assert eq.equivalent_radius_m == pytest.approx(a / 2 * 1e-3, rel=1e-4)


def _fit_corner_exponent(level: float) -> float:
    """Exponent of sigma ~ r^alpha along one side of a square's corner, fitted from panel averages."""
    square = Model(
        unit="m",
        conductors=(
            Conductor("square", (Rectangle((0.0, 0.0), 1.0, 1.0),), potential_V=1.0),
            Conductor("far ring", (Ring((0.0, 0.0), 5.0, 5.5),), role="reference"),
        ),
    )
    sol = solve(square, settings=MeshSettings(level), estimate_error=False)
    mesh, sigma = sol.mesh, sol.surface_charge_density_C_per_m2
    corner = np.array([0.5, 0.5])
    side = (mesh.conductor_index == 0) & (np.abs(mesh.midpoints[:, 1] - 0.5) < 1e-12) & (mesh.midpoints[:, 0] > 0)
    ra = np.hypot(*(mesh.starts[side] - corner).T)
    rb = np.hypot(*(mesh.ends[side] - corner).T)
    r1, r2, s = np.minimum(ra, rb), np.maximum(ra, rb), sigma[side]
    near = r2 < 0.05

    def panel_average(e, lo, hi):
        return (hi ** (e + 1) - lo ** (e + 1)) / ((e + 1) * (hi - lo))

    def residual(p):
        c1, c2, alpha = p
        # Next term of the wedge expansion has exponent alpha + pi/beta = alpha + 2/3.
        fit = c1 * panel_average(alpha, r1[near], r2[near]) + c2 * panel_average(alpha + 2 / 3, r1[near], r2[near])
        return (fit - s[near]) / s[near]

    return least_squares(residual, [s[near].mean(), 0.0, -0.3]).x[2]


def test_right_angle_corner_exponent_is_minus_one_third():
    assert _fit_corner_exponent(1.0) == pytest.approx(-1 / 3, abs=1e-3)


def _stripline(w: float, b: float) -> Model:
    wide = w + 12 * b
    return Model(
        unit="mm",
        conductors=(
            Conductor("strip", (Strip(((-w / 2, 0.0), (w / 2, 0.0))),), potential_V=1.0),
            Conductor("upper plate", (Strip(((-wide / 2, b / 2), (wide / 2, b / 2))),), role="reference"),
            Conductor("lower plate", (Strip(((-wide / 2, -b / 2), (wide / 2, -b / 2))),), role="reference"),
        ),
    )


def _cohn_capacitance(w: float, b: float) -> float:
    k = 1.0 / math.cosh(math.pi * w / (2 * b))
    return 4 * EPSILON_0_F_PER_M * ellipk(1 - k * k) / ellipk(k * k)


@pytest.mark.parametrize("w, b", [(1.0, 1.0), (0.3, 1.0), (2.5, 1.0)])
def test_zero_thickness_stripline_matches_cohn(w, b):
    c = solve(_stripline(w, b), estimate_error=False).capacitance_maxwell_F_per_m[0, 0]
    assert c == pytest.approx(_cohn_capacitance(w, b), rel=1e-3)


def test_error_falls_as_mesh_is_refined():
    """Fitted convergence: the stripline error must fall steadily, at least like h^1."""
    exact = _cohn_capacitance(1.0, 1.0)
    levels = np.array([0.5, 1.0, 2.0, 4.0])
    errors, panels = [], []
    for level in levels:
        sol = solve(_stripline(1.0, 1.0), settings=MeshSettings(level), estimate_error=False)
        errors.append(abs(sol.capacitance_maxwell_F_per_m[0, 0] / exact - 1))
        panels.append(sol.mesh.n_panels)
    assert all(e2 < e1 for e1, e2 in zip(errors, errors[1:]))
    rate = -np.polyfit(np.log(panels), np.log(errors), 1)[0]
    assert rate > 1.0


def test_estimated_error_bounds_the_true_error():
    sol = solve(_stripline(1.0, 1.0))
    true_error = abs(sol.capacitance_maxwell_F_per_m[0, 0] / _cohn_capacitance(1.0, 1.0) - 1)
    assert true_error < sol.estimated_relative_error < 0.01
