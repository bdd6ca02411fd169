"""Cross-check routes: Fekete points, the Chebyshev estimate, Green's function, command line.

Sources
-------
- Fekete points of a circle are equally spaced and delta_N = N^(1/(N-1)) r: from
  prod_{k=1}^{N-1} |1 - e^(2 pi i k / N)| = N (T. Ransford, Potential Theory in the Complex
  Plane, 1995, sec. 5.5).
- Fekete points of a segment are its end points and the zeros of the Jacobi polynomial
  P_(N-2)^(1,1) (L. Fejer, 1932; T. J. Stieltjes, 1885; G. Szego, Orthogonal Polynomials, 1939,
  sec. 6.7).
- The least sup norm of a monic polynomial of degree N on [-1, 1] is 2^(1-N), reached by
  2^(1-N) T_N whose roots are the Chebyshev nodes (P. L. Chebyshev, 1854; Ransford 1995,
  Theorem 5.5.4): the Chebyshev constant of a segment of length L is L / 4.
- delta_N does not increase with N (Fekete, 1923; Ransford 1995, Theorem 5.5.2).
- Green's function with pole at infinity of a disc of radius r: ln(|z - c| / r) (Ransford 1995,
  sec. 4.4).
"""

from __future__ import annotations

import json
import math

import numpy as np
import pytest
from hypothesis import given, settings
from hypothesis import strategies as st
from scipy.special import roots_jacobi

from solver import Circle, Conductor, Model, Polygon, Rectangle, Strip, equilibrium_charge, save_project
from solver.cli.command import main
from solver.cross_check import (
    check_equivalent_radius,
    extrapolate_chebyshev,
    extrapolate_nth_diameter,
    fekete_points,
    fekete_polynomial_norm_root_m,
    green_function,
    green_function_on_grid,
    log_abs_monic,
    nth_diameter_m,
    outline_of,
    robin_constant,
    round_wire_distance_m,
)
from solver.errors import InvalidModelError


def _one(shape, unit: str = "mm") -> Model:
    return Model(unit=unit, conductors=(Conductor("part", (shape,)),))


@pytest.fixture(scope="module")
def disc_outline():
    return outline_of(equilibrium_charge(_one(Circle((1.0, -2.0), 2.0))))


@pytest.fixture(scope="module")
def segment_outline():
    return outline_of(equilibrium_charge(_one(Strip(((-5.0, 0.0), (5.0, 0.0))))))


@pytest.mark.parametrize("n", [3, 7, 16, 40])
def test_circle_fekete_points_equally_spaced_with_closed_form_diameter(disc_outline, n):  # Ransford 1995
    f = fekete_points(disc_outline, n)
    # The outline is the solver's polygon (a vertex every 0.7 degrees): between vertices it lies
    # inside the circle by up to r (1 - cos(0.35 deg)) = 1.9e-5 r.
    assert f.nth_diameter_m == pytest.approx(n ** (1 / (n - 1)) * 2e-3, rel=3e-5)
    angles = np.sort(np.arctan2(f.points_m[:, 1] + 2e-3, f.points_m[:, 0] - 1e-3))
    gaps = np.diff(np.append(angles, angles[0] + 2 * math.pi))
    np.testing.assert_allclose(gaps, 2 * math.pi / n, rtol=0.01)  # the product is flat near its maximum


@pytest.mark.parametrize("n", [4, 9, 20])
def test_segment_fekete_points_are_end_points_and_jacobi_zeros(segment_outline, n):  # Fejer; Stieltjes
    f = fekete_points(segment_outline, n)
    x = np.sort(f.points_m[:, 0]) / 5e-3
    expected = np.concatenate([[-1.0], roots_jacobi(n - 2, 1.0, 1.0)[0], [1.0]])
    np.testing.assert_allclose(x, expected, atol=2e-4)
    assert f.nth_diameter_m == pytest.approx(nth_diameter_m(np.column_stack([expected * 5e-3, 0 * expected])), rel=1e-6)


@pytest.mark.parametrize("n", [5, 12, 30])
def test_chebyshev_nodes_give_the_least_norm_two_to_one_minus_n(segment_outline, n):  # Chebyshev 1854
    nodes = np.cos((2 * np.arange(n) + 1) * math.pi / (2 * n))
    samples = np.column_stack([np.cos(np.linspace(0, math.pi, 20001)), np.zeros(20001)])
    assert math.exp(np.max(log_abs_monic(samples, np.column_stack([nodes, 0 * nodes])))) == pytest.approx(
        2.0 ** (1 - n), rel=1e-6)
    # The Fekete polynomial is monic too: its norm is at least the least one, 2^(1-N) (L/2)^N here.
    fekete = fekete_points(segment_outline, n)
    norm_root = fekete_polynomial_norm_root_m(segment_outline, fekete)
    assert norm_root >= (2.0 ** (1 - n)) ** (1 / n) * 5e-3 * (1 - 1e-9)


def test_chebyshev_estimate_of_a_segment_tends_to_quarter_length(segment_outline):  # Chebyshev; Ransford 1995
    ns = [8, 16, 32, 64]
    values = [fekete_polynomial_norm_root_m(segment_outline, fekete_points(segment_outline, n)) for n in ns]
    assert all(v > 2.5e-3 for v in values) and np.all(np.diff(values) < 0)
    assert extrapolate_chebyshev(ns, values).limit_m == pytest.approx(2.5e-3, rel=3e-3)


def test_chebyshev_estimate_of_a_circle_is_two_to_one_over_n(disc_outline):  # Fekete polynomial z^N - r^N
    for n in (6, 20):
        f = fekete_points(disc_outline, n)
        assert fekete_polynomial_norm_root_m(disc_outline, f) == pytest.approx(2.0 ** (1 / n) * 2e-3, rel=3e-5)


@settings(max_examples=6, deadline=None, derandomize=True)
@given(a=st.floats(1.0, 4.0), b=st.floats(0.5, 1.0), n=st.integers(3, 16), square=st.booleans())
def test_nth_diameters_do_not_increase_with_n(a, b, n, square):  # Fekete 1923
    if square:
        shape = Rectangle((0.0, 0.0), a, b)
    else:
        t = 2 * math.pi * np.arange(128) / 128
        shape = Polygon(tuple(zip(a * np.cos(t), b * np.sin(t))))
    outline = outline_of(equilibrium_charge(_one(shape).with_mesh_density("coarse")))
    d = [fekete_points(outline, m).nth_diameter_m for m in (n, n + 1, n + 5)]
    assert d[0] >= d[1] * (1 - 1e-9) and d[1] >= d[2] * (1 - 1e-9)


def test_optimiser_improves_on_the_start_and_moves_only_help():
    outline = outline_of(equilibrium_charge(_one(Polygon(((0.0, 0.0), (5.0, 0.0), (2.5, 2.5 * math.sqrt(3)))))))
    plain = fekete_points(outline, 12)
    moved = fekete_points(outline, 12, max_moves=2)
    assert plain.nth_diameter_m > plain.start_diameter_m
    assert moved.nth_diameter_m >= plain.nth_diameter_m * (1 - 1e-12)
    # every point lies on the outline: the triangle's boundary
    x, y = plain.points_m.T * 1e3
    on_edge = np.minimum.reduce([np.abs(y), np.abs(y - math.sqrt(3) * x), np.abs(y + math.sqrt(3) * (x - 5))])
    assert np.max(on_edge) < 1e-6


def test_fit_recovers_a_known_limit_and_flags_uncertainty():
    n = np.array([8, 12, 16, 24, 32])
    exact = 3e-3 * np.exp(np.log(n) / (n - 1) + 0.4 / n - 1.5 / n**2)
    fit = extrapolate_nth_diameter(n, exact)
    assert fit.limit_m == pytest.approx(3e-3, rel=1e-10) and fit.relative_uncertainty < 1e-9
    noisy = exact * (1 + 0.01 * np.array([1, -1, 1, -1, 1]))
    assert extrapolate_nth_diameter(n, noisy).relative_uncertainty > 1e-3
    with pytest.raises(ValueError, match="3 or more"):
        extrapolate_chebyshev([8, 16], [1.0, 1.0])


def test_green_function_of_a_disc_and_its_robin_constant():  # Ransford 1995, sec. 4.4
    eq = equilibrium_charge(_one(Circle((1.0, -2.0), 2.0)))
    pts = np.array([[1e-3 + 3e-3, -2e-3], [1e-3, -2e-3 + 10e-3], [-50e-3, 40e-3]])
    expected = np.log(np.hypot(pts[:, 0] - 1e-3, pts[:, 1] + 2e-3) / 2e-3)
    np.testing.assert_allclose(green_function(eq, pts), expected, atol=1e-4)
    assert np.max(np.abs(green_function(eq, eq.mesh.midpoints))) < 1e-9
    assert robin_constant(eq.equivalent_radius_m, 1e-3) == pytest.approx(-math.log(2.0), abs=1e-4)
    assert robin_constant(eq.equivalent_radius_m, 1.0) == pytest.approx(-math.log(2e-3), abs=1e-4)
    grid = green_function_on_grid(eq, np.linspace(-3e-3, 5e-3, 9), np.linspace(-6e-3, 2e-3, 9))
    assert grid.shape == (9, 9) and np.isnan(grid[4, 4]) and np.all(grid[0] > 0)


def test_a_disc_looks_round_at_once_and_a_strip_only_far_away():
    disc = equilibrium_charge(_one(Circle((0.0, 0.0), 2.0)))
    assert round_wire_distance_m(disc) == pytest.approx(2e-3, rel=3e-3)
    strip = equilibrium_charge(_one(Strip(((-5.0, 0.0), (5.0, 0.0)))))
    d = round_wire_distance_m(strip)
    assert 10e-3 < d < 40e-3
    # just beyond it the potential is within 1 % of the round wire's, just inside it is not
    from solver.cross_check.robin import round_wire_difference
    assert round_wire_difference(strip, d * 1.01) < 0.01 <= round_wire_difference(strip, d * 0.98)


def test_cross_check_rejects_too_few_point_counts():
    with pytest.raises(InvalidModelError, match="at least three"):
        check_equivalent_radius(_one(Circle((0.0, 0.0), 1.0)), n_points=(8, 16))


@pytest.mark.slow  # about 15 s: two full solves with their hot-spot sections
def test_command_line_prints_and_exports_the_cross_check(tmp_path, capsys):
    model = Model(unit="mm", mesh_density="coarse", conductors=(
        Conductor("wire", (Circle((0.0, 0.0), 1.5),), role="fixed", potential_V=1.0),
        Conductor("bar", (Rectangle((10.0, 0.0), 2.0, 2.0),), role="reference")))
    path = tmp_path / "pair.json"
    save_project(model, path)
    assert main([str(path), "--cross-check", "--cross-check-points", "6,8,12"]) == 0
    text = capsys.readouterr().out
    assert "Conductor 'wire' alone" in text and "Conductor 'bar' alone" in text
    assert "Robin constant V = -ln(radius / 1 mm)" in text and text.count("AGREE:") == 2
    assert main([str(path), "--json", "--cross-check", "--cross-check-points", "8,16,32"]) == 0  # 3 s
    data = json.loads(capsys.readouterr().out)
    wire = data["cross_check"][0]
    assert wire["conductors"] == ["wire"] and wire["agrees"]
    assert wire["fekete"]["limit_m"] == pytest.approx(1.5e-3, rel=2e-3)
    assert len(wire["fekete_points_m"]) == 32
    assert main([str(path), "--json"]) == 0
    assert "cross_check" not in json.loads(capsys.readouterr().out)
    assert main([str(path), "--cross-check-points", "8,16"]) == 2
