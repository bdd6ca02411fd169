"""Equivalent radius (logarithmic capacity) against closed forms, and the bundle formula.

Sources
-------
- Logarithmic capacities: T. Ransford, Potential Theory in the Complex Plane, Cambridge
  University Press, 1995, Table 5.1: disc of radius r -> r; segment of length l -> l / 4;
  ellipse with semi-axes a, b -> (a + b) / 2; square of side s -> Gamma(1/4)^2 s / (4 pi^(3/2));
  equilateral triangle of side s -> sqrt(3) Gamma(1/3)^3 s / (8 pi^2).
- Bundle of n round subconductors of radius r evenly spaced on a circle of radius A:
  equivalent radius (n r A^(n-1))^(1/n), the geometric mean radius of overhead-line practice
  (common practice; e.g. J. J. Grainger and W. D. Stevenson, Power System Analysis, 1994, from
  memory), exact as r / A -> 0; the correction falls like (r / A)^2.
"""

import math

import numpy as np
import pytest
from scipy.special import gamma

from solver import Circle, Conductor, Model, Polygon, Rectangle, Strip, equivalent_radius_m
from solver.figures.bundles import bundle_equivalent_radius_formula_m, compare_bundle

TOLERANCE = 1e-4


def _one(shape, unit="mm") -> Model:
    return Model(unit=unit, conductors=(Conductor("part", (shape,)),))


def test_disc_radius_r():  # Ransford 1995, Table 5.1: disc -> r
    assert equivalent_radius_m(_one(Circle((3.0, -1.0), 2.5))) == pytest.approx(2.5e-3, rel=TOLERANCE)


def test_segment_quarter_length():  # Ransford 1995, Table 5.1: segment -> l / 4
    strip = Strip(((0.0, 0.0), (6.0, 8.0)))  # length 10 mm, oblique
    assert equivalent_radius_m(_one(strip)) == pytest.approx(10e-3 / 4, rel=TOLERANCE)


@pytest.mark.parametrize("a, b", [(3.0, 1.0), (2.0, 1.5)])
def test_ellipse_half_sum_of_semi_axes(a, b):  # Ransford 1995, Table 5.1: ellipse -> (a + b) / 2
    # Vertices at equal steps of the parametric angle: the polygon's capacity is below the
    # ellipse's by O(1/n^2), about 1e-6 here.
    t = 2 * math.pi * np.arange(2048) / 2048
    ellipse = Polygon(tuple(zip(a * np.cos(t), b * np.sin(t))))
    assert equivalent_radius_m(_one(ellipse)) == pytest.approx((a + b) / 2 * 1e-3, rel=TOLERANCE)


def test_square():  # Ransford 1995, Table 5.1: square of side s -> Gamma(1/4)^2 s / (4 pi^(3/2))
    s = 4.0
    exact = gamma(0.25) ** 2 * s / (4 * math.pi ** 1.5) * 1e-3
    assert equivalent_radius_m(_one(Rectangle((1.0, 2.0), s, s))) == pytest.approx(exact, rel=TOLERANCE)


def test_equilateral_triangle():  # Ransford 1995, Table 5.1: sqrt(3) Gamma(1/3)^3 s / (8 pi^2)
    s = 5.0
    triangle = Polygon(((0.0, 0.0), (s, 0.0), (s / 2, s * math.sqrt(3) / 2)))
    exact = math.sqrt(3) * gamma(1 / 3) ** 3 * s / (8 * math.pi ** 2) * 1e-3
    assert equivalent_radius_m(_one(triangle)) == pytest.approx(exact, rel=TOLERANCE)


def test_capacity_does_not_depend_on_the_unit_of_length():
    # A square of logarithmic capacity exactly 1 in its own unit: the case where a plain
    # log-kernel system would be singular.
    side = 4 * math.pi ** 1.5 / gamma(0.25) ** 2
    for unit, scale in (("m", 1.0), ("mm", 1e-3)):
        r = equivalent_radius_m(_one(Rectangle((0.0, 0.0), side, side), unit))
        assert r == pytest.approx(scale, rel=TOLERANCE)


def _bundle(n: int, r_over_a: float, a_mm: float = 200.0) -> Model:
    centres = [(a_mm * math.cos(2 * math.pi * i / n + 0.3), a_mm * math.sin(2 * math.pi * i / n + 0.3)) for i in range(n)]
    return Model(unit="mm", conductors=tuple(
        Conductor(f"sub{i}", (Circle(c, r_over_a * a_mm),)) for i, c in enumerate(centres)))


@pytest.mark.parametrize("n", [2, 3, 4])
def test_bundle_matches_formula_for_small_r_over_a(n):  # bundle formula, common practice
    c = compare_bundle(_bundle(n, 0.01))
    assert c.is_regular_bundle and c.n_subconductors == n
    assert c.bundle_radius_m == pytest.approx(0.2, rel=1e-9)
    assert c.subconductor_radius_m == pytest.approx(0.002, rel=1e-9)
    assert c.formula_equivalent_radius_m == pytest.approx(
        (n * 0.002 * 0.2 ** (n - 1)) ** (1 / n), rel=1e-12)
    assert abs(c.relative_difference) < 1e-4


@pytest.mark.parametrize("n", [2, 4])
def test_bundle_formula_error_falls_like_r_over_a_squared(n):  # the formula is exact as r/A -> 0
    ratios = np.array([0.2, 0.1, 0.05])
    diffs = np.array([compare_bundle(_bundle(n, q)).relative_difference for q in ratios])
    assert np.all(diffs > 0)  # charge crowds outward: the real bundle looks a little larger
    slope = np.polyfit(np.log(ratios), np.log(diffs), 1)[0]
    assert slope == pytest.approx(2.0, abs=0.15)


def test_formula_for_one_conductor_is_its_radius():
    assert bundle_equivalent_radius_formula_m(1, 0.015, 0.0) == pytest.approx(0.015)


def test_irregular_group_has_no_formula_but_a_radius():
    pair = Model(unit="mm", conductors=(
        Conductor("a", (Circle((0.0, 0.0), 5.0),)), Conductor("b", (Rectangle((40.0, 0.0), 10.0, 4.0),))))
    c = compare_bundle(pair)
    assert not c.is_regular_bundle and c.formula_equivalent_radius_m is None and c.relative_difference is None
    # Larger than either part alone, smaller than the whole extent.
    assert equivalent_radius_m(pair, ["a"]) < c.equivalent_radius_m < 0.05
    assert c.estimated_relative_error < 1e-3


def test_closed_form_capacities_agree_with_the_solver():
    """A disc of radius r has capacity r, and an annulus the capacity of its outer disc
    (Ransford, Potential Theory in the Complex Plane, 1995): the closed forms the equivalent
    radius uses for a lone circle or ring agree with the boundary-element equilibrium."""
    from solver import Circle, Conductor, Model, Ring, equilibrium_charge, equivalent_radius_m

    for shape, exact in ((Circle((1.0, 2.0), 3.0), 3.0), (Ring((0.0, 0.0), 2.0, 5.0), 5.0)):
        model = Model(unit="mm", conductors=(Conductor("c", (shape,)),))
        assert equivalent_radius_m(model, ["c"]) == pytest.approx(exact * 1e-3, rel=1e-15)
        assert equilibrium_charge(model, ["c"]).equivalent_radius_m == pytest.approx(exact * 1e-3, rel=1e-4)
