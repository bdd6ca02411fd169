"""2-D against 3-D: part-length check and the indicative rise of the field at round ends."""

import doctest
import math

import pytest

import solver.figures.end_effects
from solver import Circle, Conductor, GroundPlane, Model, Rectangle
from solver.errors import InvalidModelError
from solver.figures.end_effects import (
    LONG_ENOUGH_RATIO,
    check_part_length,
    cross_section_size_m,
    end_field_rise_estimate,
)


def test_docstring_examples():
    assert doctest.testmod(solver.figures.end_effects).failed == 0


def test_size_includes_the_height_above_the_ground_plane():
    bar = Model(unit="mm", ground_plane=GroundPlane(0.0), conductors=(
        Conductor("bar", (Rectangle((0.0, 1050.0), 300.0, 100.0),), potential_V=1.0),))
    assert cross_section_size_m(bar) == pytest.approx(1.1)
    free = Model(unit="mm", conductors=(Conductor("a", (Circle((0, 0), 1),)), Conductor("b", (Circle((10, 0), 1),))))
    assert cross_section_size_m(free) == pytest.approx(0.012)


@pytest.mark.parametrize("length_m, long_enough", [(5.0, False), (10.9, False), (12.1, True), (100.0, True)])
def test_ratio_and_verdict(length_m, long_enough):
    bar = Model(unit="m", ground_plane=GroundPlane(0.0), conductors=(
        Conductor("bar", (Rectangle((0.0, 1.05), 0.3, 0.1),), potential_V=1.0),))
    check = check_part_length(bar, length_m)
    assert check.length_to_size_ratio == pytest.approx(length_m / 1.1)
    assert check.long_enough is long_enough and (check.length_to_size_ratio >= LONG_ENOUGH_RATIO) is long_enough
    assert check.capacitance_end_effect_order == pytest.approx(1.1 / length_m)
    assert ("below" in check.note) is (not long_enough)
    with pytest.raises(InvalidModelError, match="Part length"):
        check_part_length(bar, 0.0)


def test_end_rise_tends_to_log_of_height_over_radius():
    for h_over_r in (1e3, 1e5):
        rise = end_field_rise_estimate(1.0, h_over_r - 1.0)
        assert rise == pytest.approx(math.log(2 * h_over_r), rel=2.0 / h_over_r)  # corrections O(r/h)
    assert end_field_rise_estimate(0.03, 1.0) > 3.0  # the high-voltage sample's bar: about 4
    with pytest.raises(InvalidModelError):
        end_field_rise_estimate(0.0, 1.0)
