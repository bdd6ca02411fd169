"""The high-order Nystrom core: product rules against adaptive quadrature, round lines against
their closed forms (Cheng, "Field and Wave Electromagnetics", 2nd ed., 1989)."""

from __future__ import annotations

import math

import numpy as np
import pytest
from reference_geometries import (
    coax,
    coax_capacitance_F_per_m,
    two_wire,
    two_wire_capacitance_F_per_m,
    wire_over_plane,
    wire_over_plane_capacitance_F_per_m,
)
from scipy.integrate import quad

from solver.bem.high_order.nystrom import NodalSolve
from solver.bem.high_order.product_rules import bernstein_rho, cauchy_weights, log_weights, preimages
from solver.mesh.curved_panels import CurvedPanels, curved_panels, gauss_legendre
from solver.mesh.curved_pieces import Piece, boundary_pieces

pytestmark = pytest.mark.filterwarnings("ignore::scipy.integrate.IntegrationWarning")

ARC = Piece("arc", 0, 0, False, (1.0, 0.0), (1.0, 0.0), centre=(0.0, 0.0), radius=1.0, start_rad=0.0,
            sweep_rad=-2 * math.pi, opening_start_rad=None, opening_end_rad=None)
LINE = Piece("line", 1, 1, False, (0.0, 0.0), (2.0, 1.0))
PANELS = CurvedPanels((ARC, LINE), np.array([0, 1]), np.array([0.1, 0.2]), np.array([0.3, 0.6]), 16)


def _density(t):
    return np.cos(2 * t) + t**3 - 0.5 * t**7


def _targets(j: int) -> list[np.ndarray]:
    node, normal = PANELS.nodes[j, 3], PANELS.normals[j, 3]
    start = PANELS.ends[0][j]
    return [node, node + 0.01 * normal, node - 0.01 * normal, start + np.array([0.003, -0.002]),
            PANELS.nodes[j, 9] - 0.3 * PANELS.normals[j, 9]]


@pytest.mark.parametrize("j", [0, 1])
def test_log_product_rule_matches_adaptive_quadrature_on_and_near_a_panel(j):
    t = gauss_legendre(16)[0]
    for x in _targets(j):
        which = np.array([j])
        z = preimages(x[None, :], PANELS, which)[:, 0]
        approx = log_weights(z, PANELS, which)[0] @ _density(t)

        def integrand(tt, x=x):
            y = PANELS.points_at(np.array([tt]))[j, 0]
            return math.log(math.hypot(*(x - y))) * _density(tt)

        on_panel = abs(z.real[0]) < 1 and abs(z.imag[0]) < 1e-12
        pieces = [(-1.0, float(z.real[0])), (float(z.real[0]), 1.0)] if on_panel else [(-1.0, 1.0)]
        exact = sum(quad(integrand, lo, hi, limit=400, epsabs=1e-15, epsrel=1e-15)[0] for lo, hi in pieces)
        assert abs(approx - exact) < 1e-13, (x, z, approx - exact)


@pytest.mark.parametrize("j", [0, 1])
def test_cauchy_product_rule_matches_adaptive_quadrature_off_the_panel(j):
    t = gauss_legendre(16)[0]
    for x in _targets(j)[1:]:
        which = np.array([j])
        z = preimages(x[None, :], PANELS, which)[:, 0]
        approx = cauchy_weights(z, PANELS, which)[0] @ _density(t)
        xc = x[0] + 1j * x[1]

        def part(tt, k, xc=xc):
            y = PANELS.points_at(np.array([tt]))[j, 0]
            v = _density(tt) / (xc - (y[0] + 1j * y[1]))
            return v.real if k == 0 else v.imag

        exact = sum(quad(part, -1, 1, args=(k,), limit=400, epsabs=1e-14, epsrel=1e-14)[0] * (1j) ** k
                    for k in (0, 1))
        assert abs(approx - exact) < 1e-10 * max(1.0, abs(exact))


def test_the_preimage_maps_back_and_the_ellipse_parameter_is_one_on_the_panel():
    t = gauss_legendre(16)[0]
    for j in (0, 1):
        z = preimages(PANELS.nodes[j], PANELS, np.array([j]))[:, 0]
        assert np.allclose(z, t, atol=1e-13)
        assert np.allclose(bernstein_rho(z), 1.0)


def _capacitance_error(model, exact, size_m, order):
    pieces = boundary_pieces(model)
    panels = curved_panels(pieces, np.full(len(pieces), size_m), math.pi / 4, 0, order=order)
    solve = NodalSolve(model, panels)
    return abs(solve.capacitance_maxwell_F_per_m()[0, 0] / exact - 1.0), solve.n_unknowns


def test_coax_reaches_1e_minus_12_with_few_hundred_unknowns():
    # C' = 2 pi eps0 / ln(b / a) (Cheng 1989), a = 1 mm, b = 2.5 mm.
    error, n = _capacitance_error(coax(1.0, 2.5), coax_capacitance_F_per_m(1e-3, 2.5e-3), 2e-3, 16)
    assert n < 500 and error < 1e-12


def test_two_wire_reaches_1e_minus_12_with_few_hundred_unknowns():
    # C' = pi eps0 / arccosh(d / 2a) (Cheng 1989), a = 1 mm, centres 3 mm apart.
    error, n = _capacitance_error(two_wire(1.0, 3.0), two_wire_capacitance_F_per_m(1e-3, 3e-3), 2e-3, 16)
    assert n < 500 and error < 1e-12


def test_wire_over_plane_by_images_reaches_1e_minus_12():
    # C' = 2 pi eps0 / arccosh(h / a) (Cheng 1989, method of images), a = 1 mm, h = 1.5 mm.
    error, n = _capacitance_error(wire_over_plane(1.0, 1.5), wire_over_plane_capacitance_F_per_m(1e-3, 1.5e-3),
                                  1e-3, 16)
    assert n < 500 and error < 1e-12


def test_two_wire_converges_exponentially_in_the_nodes_per_panel():
    """Close wires (gap 0.2 r) make the density far from uniform; the error falls like
    exp(-c p) in the nodes per panel p: a straight line fitted to log(error) against p has a
    clearly negative slope, and the finest error is small."""
    exact = two_wire_capacitance_F_per_m(1e-3, 2.2e-3)
    orders = [4, 6, 8, 10, 12]
    errors = [_capacitance_error(two_wire(1.0, 2.2), exact, 2e-3, p)[0] for p in orders]
    slope = np.polyfit(orders, np.log10(errors), 1)[0]
    assert slope < -0.5, errors  # at least half a digit per added node per panel
    assert errors[-1] < 1e-6 and all(b < a for a, b in zip(errors, errors[1:]))
