"""Independent routes to the logarithmic capacity against closed forms, and against the solver.

Sources
-------
- Logarithmic capacities: T. Ransford, Potential Theory in the Complex Plane, Cambridge
  University Press, 1995, Table 5.1: disc of radius r -> r; segment of length L -> L / 4;
  ellipse with semi-axes a, b -> (a + b) / 2; square of side s -> Gamma(1/4)^2 s / (4 pi^(3/2));
  equilateral triangle of side s -> sqrt(3) Gamma(1/3)^3 s / (8 pi^2).
- delta_N -> cap (Fekete 1923, Szego 1924) and ||F_N||^(1/N) -> cap (Fekete-Szego); both are
  upper bounds at every N (Ransford 1995, Theorems 5.5.2 and 5.5.4).

Tolerances: the Fekete limit is fitted from N = 8 to 64 and lands within 1e-3 of the closed forms
here (the fit's residual bias; see solver/cross_check/extrapolate.py); the Chebyshev limit,
fitted against 1/N alone, within 4e-3 (corners make its sequence wobble with N). A solver off
by 1 % would fail every case.
"""

import math

import numpy as np
import pytest
from scipy.special import gamma

from solver import Circle, Conductor, Model, Polygon, Rectangle, Strip, check_equivalent_radius
from solver.cross_check.report import upper_bounds_hold

N_POINTS = (8, 12, 16, 24, 32, 48, 64)


def _one(shape) -> Model:
    return Model(unit="mm", conductors=(Conductor("part", (shape,)),))


_T = 2 * math.pi * np.arange(1024) / 1024
CASES = {
    # name: (model, exact capacity in metres) — Ransford 1995, Table 5.1
    "disc": (_one(Circle((3.0, -1.0), 2.5)), 2.5e-3),
    "segment": (_one(Strip(((0.0, 0.0), (6.0, 8.0)))), 10e-3 / 4),
    "ellipse": (_one(Polygon(tuple(zip(3.0 * np.cos(_T), 1.0 * np.sin(_T))))), (3.0 + 1.0) / 2 * 1e-3),
    "square": (_one(Rectangle((1.0, 2.0), 4.0, 4.0)), gamma(0.25) ** 2 * 4.0 / (4 * math.pi**1.5) * 1e-3),
    "triangle": (_one(Polygon(((0.0, 0.0), (5.0, 0.0), (2.5, 2.5 * math.sqrt(3))))),
                 math.sqrt(3) * gamma(1 / 3) ** 3 * 5.0 / (8 * math.pi**2) * 1e-3),
}


@pytest.fixture(scope="module", params=sorted(CASES))
def case(request):
    model, exact = CASES[request.param]
    return request.param, check_equivalent_radius(model, n_points=N_POINTS), exact


def test_fekete_limit_matches_closed_form(case):  # Ransford 1995, Table 5.1
    _, check, exact = case
    assert check.fekete.limit_m == pytest.approx(exact, rel=1e-3)


def test_chebyshev_limit_matches_closed_form(case):  # Ransford 1995, Table 5.1
    _, check, exact = case
    assert check.chebyshev.limit_m == pytest.approx(exact, rel=4e-3)


def test_finite_n_values_are_upper_bounds_falling_with_n(case):  # Ransford 1995, Theorems 5.5.2, 5.5.4
    _, check, exact = case
    assert min(check.fekete.values_m) > exact and min(check.chebyshev.values_m) > exact * (1 - 1e-5)
    assert np.all(np.diff(check.fekete.values_m) < 0)
    assert upper_bounds_hold(check)


def test_routes_agree_with_solver_and_verdict_says_so(case):
    _, check, exact = case
    assert check.equivalent_radius_m == pytest.approx(exact, rel=1e-4)
    assert check.agrees and check.verdict.startswith("AGREE")
    assert check.robin_constant == pytest.approx(-math.log(exact / 1e-3), abs=1e-4)


def test_verdict_flags_a_wrong_solver_radius():
    # The same routes held against a radius 2 % off must disagree: the check can fail.
    from dataclasses import replace

    from solver.cross_check.report import _route

    model, exact = CASES["square"]
    check = check_equivalent_radius(model, n_points=(8, 16, 32, 64))
    wrong = 1.02 * check.equivalent_radius_m
    route = _route("fekete", check.fekete.title, check.fekete.n_points, check.fekete.values_m,
                   check.fekete.extrapolation, wrong, check.solver_relative_error)
    assert not route.agrees
    flagged = replace(check, fekete=route)
    assert not flagged.agrees and flagged.verdict.startswith("DISAGREE") and "Fekete" in flagged.verdict


@pytest.mark.slow  # about 20 s: the bar needs N up to 96
def test_two_samples_round_wire_pair_and_flat_bar():
    # Two samples of the trade: a tied pair of round wires and a flat bar with rounded corners.
    pair = Model(unit="mm", conductors=(
        Conductor("a", (Circle((-20.0, 0.0), 2.0),)), Conductor("b", (Circle((20.0, 0.0), 2.0),))))
    check = check_equivalent_radius(pair, n_points=N_POINTS)
    # Two well-separated wires: close to the bundle formula sqrt(r * 2A) = sqrt(2 * 40) mm (common practice)
    assert check.equivalent_radius_m == pytest.approx(math.sqrt(2.0 * 40.0) * 1e-3, rel=0.01)
    assert check.agrees, check.verdict
    bar = Model(unit="mm", conductors=(Conductor("bar", (Rectangle((0.0, 0.0), 40.0, 8.0, corner_radius=1.0),)),))
    check = check_equivalent_radius(bar, n_points=(16, 24, 32, 48, 64, 96))
    assert check.agrees, check.verdict
