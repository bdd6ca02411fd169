"""Numbers shown with the digits their error supports, and never round-off as data."""

import pytest

from solver.cli.formatting import digits_for, format_measured, format_percent, format_plain, format_point


@pytest.mark.parametrize(("error", "digits"), [(0.05, 2), (0.003, 3), (4e-4, 4), (2e-5, 5), (1e-9, 6), (None, 4)])
def test_digits_follow_the_error_estimate(error, digits):
    assert digits_for(error) == digits


def test_round_off_is_not_shown_as_data():
    # the four cases seen on screen: a coordinate, a field on an earthed face, a percentage, a length
    assert format_point(0.0, 1.83697e-17, "mm", size=30.0) == "(0, 0) mm"
    assert format_measured(3.67e-10, "V/m", 1e-3, largest=2.4e6) == "0 V/m"
    assert format_percent(2.0) == "200 %"
    assert format_plain(1010.0, 3) + " mm" == "1010 mm"


def test_true_minus_and_prefixes():
    assert format_measured(-2.3456e-11, "F/m", 0.002) == "\u221223.5 pF/m"
    assert format_measured(2.3456e-11, "F/m", 2e-5) == "23.456 pF/m"
    assert format_plain(-0.00125, 2) == "\u22120.0013"
    assert format_percent(1.2e-5) == "0.0012 %"
    assert format_measured(None, "V") == "n/a"
    # a small but real value is kept: a millionth of the largest is data
    assert format_measured(2.4, "V/m", largest=2.4e6) == "2.4 V/m"
