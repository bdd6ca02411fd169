"""Truncated substrate layers: detection, truncation estimate, widening to a target."""


import pytest
from reference_geometries import microstrip

from solver.figures.layers import truncated_layers, truncation_error, widen_until_converged, widened
from solver.figures.transmission_line import transmission_line_figures


def test_only_wide_rectangles_count_as_layers():
    assert truncated_layers(microstrip(1.0, 4.4, 20.0)) == ("substrate",)
    assert truncated_layers(microstrip(1.0, 4.4, 3.0)) == ()
    assert truncation_error(microstrip(1.0, 4.4, 3.0)) is None


def test_widened_copies_only_the_layers():
    model = microstrip(1.0, 4.4, 20.0)
    wide = widened(model, 2.0)
    assert wide.dielectrics[0].shapes[0].width == 40.0
    assert wide.conductors == model.conductors


def test_truncation_error_falls_with_width_and_widening_meets_a_target():
    narrow, wide = truncation_error(microstrip(1.0, 4.4, 6.0)), truncation_error(microstrip(1.0, 4.4, 24.0))
    assert wide < narrow / 10
    model, change = widen_until_converged(microstrip(1.0, 4.4, 6.0), target=2e-4)
    assert change < 2e-4
    assert model.dielectrics[0].shapes[0].width > 6.0


def test_figures_carry_the_truncation_estimate():
    f = transmission_line_figures(microstrip(1.0, 4.4, 20.0), estimate_truncation=True)
    assert f.truncation_relative_error == pytest.approx(truncation_error(microstrip(1.0, 4.4, 20.0)))
    assert f.truncation_relative_error < 1e-4
