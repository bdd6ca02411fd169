"""Air-breakdown and corona-onset thresholds, air density, and margins of an exact peak.

Sources
-------
- Corona onset: F. W. Peek, Dielectric Phenomena in High-Voltage Engineering, 3rd ed.,
  McGraw-Hill, 1929: visual critical gradient, crest kV/cm, r in cm,
  parallel wires E_c = 30 m delta (1 + 0.301 / sqrt(delta r)),
  coaxial cylinders E_c = 31 m delta (1 + 0.308 / sqrt(delta r)).
  The worked values below were computed by hand (arithmetic shown beside each check).
- Standard atmosphere: ISO 2533:1975 / U.S. Standard Atmosphere, 1976, pressure at geopotential
  altitude (from memory of the published tables): 1000 m 89 874.6 Pa, 2000 m 79 495.2 Pa,
  5000 m 54 019.9 Pa, 11 000 m 22 632.1 Pa.
- Air strength about 3 MV/m in a uniform field at standard conditions, proportional to the
  relative air density (common practice).
- Peak field of a round wire over a ground plane by the method of images (see
  test_hotspots.py).
"""

import json
import math

import pytest

from solver import Circle, Conductor, GroundPlane, Model
from solver.hot_spots.air_conditions import (
    HIGH_VOLTAGE_CAUTION,
    AirConditions,
    air_breakdown_field_V_per_m,
    peek_corona_onset_field_V_per_m,
    pressure_at_altitude_Pa,
    relative_air_density,
    relative_air_density_at_altitude,
)
from solver.hot_spots.air_strength import air_strength
from solver.hot_spots.analysis import analyse_hot_spots
from solver.hot_spots.margins import assess_margins


def test_peek_parallel_wires_one_centimetre():  # Peek 1929
    # 30 x 1 x 1 x (1 + 0.301 / sqrt(1 x 1)) = 30 x 1.301 = 39.03 kV/cm = 3.903 MV/m
    assert peek_corona_onset_field_V_per_m(0.01) == pytest.approx(3.903e6, rel=1e-9)


def test_peek_parallel_wires_thin_air_and_stranded_surface():  # Peek 1929
    # r = 0.5 cm, delta = 0.9, m = 0.85: sqrt(0.45) = 0.670820, 0.301 / 0.670820 = 0.448704,
    # 30 x 0.85 x 0.9 = 22.95, 22.95 x 1.448704 = 33.2478 kV/cm = 3.32478 MV/m
    assert peek_corona_onset_field_V_per_m(0.005, 0.9, 0.85) == pytest.approx(3.32478e6, rel=1e-5)


def test_peek_coaxial_form():  # Peek 1929
    # r = 0.2 cm: sqrt(0.2) = 0.447214, 0.308 / 0.447214 = 0.688711, 31 x 1.688711 = 52.350 kV/cm
    assert peek_corona_onset_field_V_per_m(0.002, form="coaxial") == pytest.approx(5.2350e6, rel=1e-4)


def test_peek_gradient_rises_for_thin_wires():  # Peek 1929: the 1/sqrt(r) term
    fields = [peek_corona_onset_field_V_per_m(r) for r in (0.05, 0.01, 0.002, 0.0005)]
    assert fields == sorted(fields)
    assert peek_corona_onset_field_V_per_m(10.0) == pytest.approx(3.0e6, rel=0.01)  # tends to 30 kV/cm


@pytest.mark.parametrize("altitude_m, pressure_Pa", [(0.0, 101325.0), (1000.0, 89874.6), (2000.0, 79495.2),
                                                     (5000.0, 54019.9), (11000.0, 22632.1)])
def test_standard_atmosphere_pressure(altitude_m, pressure_Pa):  # U.S. Standard Atmosphere, 1976
    assert pressure_at_altitude_Pa(altitude_m) == pytest.approx(pressure_Pa, rel=1e-5)


def test_relative_air_density_from_pressure_and_temperature():
    # (90 / 101.325) x (293.15 / 303.15) = 0.888231 x 0.967013 = 0.858931
    assert relative_air_density(90_000.0, 303.15) == pytest.approx(0.858931, rel=1e-5)
    assert relative_air_density(101_325.0, 293.15) == pytest.approx(1.0)


def test_air_strength_scales_with_density_at_altitude():  # common practice, 3 MV/m at delta = 1
    assert air_breakdown_field_V_per_m() == pytest.approx(3.0e6)
    # 2000 m: delta = 79495.2 / 101325 = 0.784557 -> 2.35367 MV/m
    assert air_breakdown_field_V_per_m(relative_air_density_at_altitude(2000.0)) == pytest.approx(2.35367e6, rel=1e-5)


def _wire(voltage: float, a_mm: float = 20.0, h_mm: float = 300.0) -> tuple[Model, float]:
    a, h = a_mm * 1e-3, h_mm * 1e-3
    peak_per_volt = math.sqrt(h * h - a * a) / (a * (h - a) * math.acosh(h / a))
    model = Model(unit="mm", ground_plane=GroundPlane(0.0), mesh_density="coarse", conductors=(
        Conductor("wire", (Circle((0.0, h_mm), a_mm),), potential_V=voltage),))
    return model, peak_per_volt


@pytest.mark.parametrize("wanted_margin, status", [(2.0, "ample"), (1.2, "thin"), (0.8, "exceeded")])
def test_corona_margin_of_a_wire_over_earth(wanted_margin, status):  # Peek 1929 and images
    # A 20 mm wire with a rough surface (m = 0.8) at 1500 m: a round conductor is graded by
    # Peek's onset, which holds the strength of air and the help of its curved surface.
    air = AirConditions.at_altitude(1500.0, surface_factor=0.8)
    onset = peek_corona_onset_field_V_per_m(0.02, air.relative_air_density, 0.8)
    model, peak_per_volt = _wire(1.0)
    model = model.with_potentials({"wire": onset / wanted_margin / peak_per_volt})
    report = assess_margins(model, analyse_hot_spots(model).hot_spots, air)
    m = report.margins[0]
    assert m.corona_radius_m == pytest.approx(0.02) and m.corona_radius_basis == "round conductor"
    assert m.corona_onset_margin == pytest.approx(wanted_margin, rel=1e-4)
    # strength of air across the gap to earth, rough surface included (Kuffel, Zaengl & Kuffel, 2000)
    breakdown = air_strength(m.gap_m, air.relative_air_density, 0.8).field_V_per_m
    assert m.gap_m == pytest.approx(model.conductors[0].shapes[0].center[1] * 1e-3 - 0.02, rel=1e-6)
    assert m.air_breakdown_field_V_per_m == pytest.approx(breakdown)
    assert m.air_breakdown_margin == pytest.approx(breakdown / onset * wanted_margin, rel=1e-4)
    assert m.status == status
    assert m.caution.endswith(HIGH_VOLTAGE_CAUTION)  # a high-voltage model: always the full caution
    assert ("expect corona or flashover" in m.caution.lower()) == (status == "exceeded")
    assert report.needs_caution == (status != "ample")
    json.dumps(report.as_dict(), allow_nan=False)
