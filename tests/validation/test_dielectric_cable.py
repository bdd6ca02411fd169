"""Coaxial lines with dielectrics against exact closed forms.

Sources (exact results found in any electromagnetics text, e.g. D. K. Cheng, Field and Wave
Electromagnetics, 2nd ed., Addison-Wesley, 1989, ch. 3-4):

* two concentric layers (a < r < c: eps1; c < r < b: eps2) are logarithmic capacitances in
  series:  1/C' = ln(c/a) / (2 pi eps0 eps1) + ln(b/c) / (2 pi eps0 eps2); the field is
  E(r) = V / (r eps_i S) with S = ln(c/a)/eps1 + ln(b/c)/eps2, largest at the inner edge of
  each layer;
* the two halves filled with different dielectrics are capacitances in parallel:
  C' = pi eps0 (eps1 + eps2) / ln(b/a).

The curved interface uses arc-exact panels; its convergence order is fitted (common
practice: np.polyfit of log error against log panel count) and must be about 2, like
conductors, not 1 as with flat panels of constant bound charge.
"""

import math

import numpy as np
import pytest

from solver import EPSILON_0_F_PER_M, Circle, Conductor, Dielectric, Model, Polygon, Ring, solve
from solver.mesh.panels import MeshSettings

EPS0 = EPSILON_0_F_PER_M


def _two_layer(a, c, b, e1, e2, volts=1.0):
    return Model(
        unit="mm",
        conductors=(
            Conductor("core", (Circle((0.0, 0.0), a),), potential_V=volts),
            Conductor("screen", (Ring((0.0, 0.0), b, b + 0.4),), role="reference"),
        ),
        dielectrics=(
            Dielectric("inner layer", (Ring((0.0, 0.0), a, c),), e1),
            Dielectric("outer layer", (Ring((0.0, 0.0), c, b),), e2),
        ),
    )


def _series(a, c, b, e1, e2):
    return 2 * math.pi * EPS0 / (math.log(c / a) / e1 + math.log(b / c) / e2)


@pytest.mark.parametrize("a, c, b, e1, e2", [(1.0, 2.0, 3.0, 4.0, 2.0), (0.5, 0.8, 2.0, 2.3, 6.0)])
def test_two_concentric_layers(a, c, b, e1, e2):
    sol = solve(_two_layer(a, c, b, e1, e2), estimate_error=False)
    assert sol.capacitance_maxwell_F_per_m[0, 0] == pytest.approx(_series(a, c, b, e1, e2), rel=5e-5)
    # free charge on the core equals C' V; the bound charge of each closed layer sums to zero
    assert sol.conductor_charges_C_per_m[0] == pytest.approx(_series(a, c, b, e1, e2), rel=5e-5)


def test_peak_stress_in_each_layer():
    a, c, b, e1, e2, volts = 1.0, 2.0, 3.0, 4.0, 2.0, 10e3
    sol = solve(_two_layer(a, c, b, e1, e2, volts), estimate_error=False)
    s = math.log(c / a) / e1 + math.log(b / c) / e2
    peaks = {p.region: p for p in sol.peak_region_fields}
    assert peaks["inner layer"].field_V_per_m == pytest.approx(volts / (a * 1e-3 * e1 * s), rel=1e-3)
    assert peaks["outer layer"].field_V_per_m == pytest.approx(volts / (c * 1e-3 * e2 * s), rel=1e-3)
    assert math.hypot(*peaks["outer layer"].location_m) == pytest.approx(c * 1e-3, rel=1e-3)


def test_curved_interface_converges_at_second_order():
    a, c, b, e1, e2 = 1.0, 2.0, 3.0, 4.0, 2.0
    model = _two_layer(a, c, b, e1, e2)
    exact = _series(a, c, b, e1, e2)
    counts, errors = [], []
    for level in (0.25, 0.5, 1.0):
        sol = solve(model, estimate_error=False, settings=MeshSettings(level))
        counts.append(sol.interfaces.n_panels)
        errors.append(abs(sol.capacitance_maxwell_F_per_m[0, 0] / exact - 1))
    order = -np.polyfit(np.log(counts), np.log(errors), 1)[0]
    assert order > 1.8
    assert errors[-1] < 2e-5


def _half_annulus(r_in, r_out, upper, n=256):
    t = np.linspace(0.0, math.pi, n) * (1 if upper else -1)
    outer = [(r_out * math.cos(x), r_out * math.sin(x)) for x in t]
    inner = [(r_in * math.cos(x), r_in * math.sin(x)) for x in t[::-1]]
    return Polygon(tuple(outer + inner))


@pytest.mark.parametrize("e1, e2", [(4.0, 1.0), (2.2, 9.8)])
def test_halves_filled_with_different_dielectrics(e1, e2):
    a, b = 1.0, 3.0
    model = Model(
        unit="mm",
        conductors=(
            Conductor("core", (Circle((0.0, 0.0), a),), potential_V=1.0),
            Conductor("screen", (Ring((0.0, 0.0), b, b + 0.4),), role="reference"),
        ),
        dielectrics=(
            Dielectric("upper", (_half_annulus(a * 0.9, b * 1.05, True),), e1),
            Dielectric("lower", (_half_annulus(a * 0.9, b * 1.05, False),), e2),
        ),
    )
    c = solve(model, estimate_error=False).capacitance_maxwell_F_per_m[0, 0]
    assert c == pytest.approx(math.pi * EPS0 * (e1 + e2) / math.log(b / a), rel=1e-5)
