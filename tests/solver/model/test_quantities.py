"""Typed values with units: what engineers type is read into SI, and bad input is named."""

import math

import pytest

from solver.model.quantities import QuantityError, parse_quantity, read_quantity


@pytest.mark.parametrize(("text", "unit", "expected"), [
    ("150 kV", "V", 150e3),
    ("150kV", "V", 150e3),
    ("−5 kV", "V", -5e3),          # a true minus sign, as pasted from a report
    ("0.5 MV", "V", 0.5e6),
    ("12 mil", "m", 12 * 25.4e-6),  # 1 mil = 0.001 inch = 25.4 um (common practice)
    ("0.5 mm", "m", 0.5e-3),
    ("3 um", "m", 3e-6),
    ("3 µm", "m", 3e-6),
    ("1e-3 m", "m", 1e-3),
    ("2 inch", "m", 50.8e-3),
    ("1.5 cm", "m", 15e-3),
    ("2.2 pF/m", "F/m", 2.2e-12),
    ("0.1 nF/m", "F/m", 1e-10),
    ("3 kV/mm", "V/m", 3e6),
    ("30 kV/cm", "V/m", 3e6),
    ("4 nC/m", "C/m", 4e-9),
    ("101.325 kPa", "Pa", 101325.0),
    ("1 atm", "Pa", 101325.0),
    ("20 °C", "K", 293.15),
    ("20 C", "K", 293.15),
    ("4.4", "", 4.4),
    ("+7", "V", 7.0),
    ("50 ohm", "\u03a9", 50.0),     # goal targets of impedance figures
    ("50 ohms", "\u03a9", 50.0),
    ("0.1 k\u03a9", "\u03a9", 100.0),
    ("6 ns/m", "s/m", 6e-9),       # a delay per length
])
def test_engineering_values_are_read_into_si(text, unit, expected):
    assert parse_quantity(text, unit, "a field") == pytest.approx(expected, rel=1e-12)


def test_bare_number_takes_the_default_unit():
    assert parse_quantity("12", "m", "width", default_unit="mil") == pytest.approx(12 * 25.4e-6)
    assert parse_quantity("12", "m", "width", default_unit="mm") == pytest.approx(12e-3)
    assert parse_quantity("12 um", "m", "width", default_unit="mm") == pytest.approx(12e-6)
    assert parse_quantity("20", "K", "temperature", default_unit="°C") == pytest.approx(293.15)


def test_rms_potential_comes_back_as_crest_and_says_so():
    q = read_quantity("12 kV rms", "V", "potential of bar A")
    assert q.value_si == pytest.approx(12e3 * math.sqrt(2))
    assert q.basis == "rms" and "crest" in q.note and q.text == "12 kV rms"
    crest = read_quantity("12 kV crest", "V", "potential of bar A")
    assert crest.value_si == 12e3 and crest.basis == "crest" and crest.note == ""
    assert read_quantity("12 kV", "V", "potential").basis is None


def test_rms_is_only_for_potentials():
    with pytest.raises(QuantityError, match="unknown unit 'mm rms'"):
        parse_quantity("3 mm rms", "m", "width")


@pytest.mark.parametrize(("text", "unit", "field", "message"), [
    ("12 kv", "V", "potential of bar A", "'12 kv' in 'potential of bar A': unknown unit 'kv'; use V, kV, MV"),
    ("abc", "V", "potential of bar A", "'abc' in 'potential of bar A': not a number"),
    ("0,5 mm", "m", "width", "use a point for decimals"),
    ("", "m", "width", "nothing typed"),
    ("5 kV", "m", "radius", "'kV' is not a unit of length; use m, mm, um, mil, inch"),
    ("2 pF", "F/m", "capacitance", "'pF' is not a unit of capacitance per length"),
    ("4 mm", "", "relative permittivity", "takes a plain number without a unit"),
    ("1e999 V", "V", "potential", "not finite"),
    ("3 m/s/s", "m", "width", "unknown unit"),
])
def test_bad_input_is_refused_with_the_field_named(text, unit, field, message):
    with pytest.raises(QuantityError) as info:
        parse_quantity(text, unit, field)
    assert message in str(info.value)
    assert f"'{text}' in '{field}'" in str(info.value)


def test_case_matters_for_prefixes():
    assert parse_quantity("1 mV", "V") == pytest.approx(1e-3)
    assert parse_quantity("1 MV", "V") == pytest.approx(1e6)


def test_the_rms_note_gives_the_crest_in_kV():
    assert read_quantity("12 kV rms", "V", "potential").note == "12 kV rms is taken as 16.97 kV crest (√2 × rms, a sine wave)."
