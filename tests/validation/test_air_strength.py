"""Uniform-field strength of air against the gap, density and surface.

Source: E. Kuffel, W. S. Zaengl & J. Kuffel, High Voltage Engineering Fundamentals, 2nd ed.,
2000, empirical relation for uniform-field breakdown of air at 20 degC,
U_b = 6.72 sqrt(p d) + 24.36 p d kV (p in bar, d in cm; coefficients and range 1e-2 to 10
bar cm from memory of that book). Cross-check: about 30 kV across 1 cm at one atmosphere
(common practice, "30 kV/cm").
"""

import numpy as np
import pytest

from solver.hot_spots.air_strength import (
    PD_RANGE_BAR_CM,
    air_strength,
    long_gap_limit_V_per_m,
    uniform_field_breakdown_voltage_V,
)


@pytest.mark.parametrize("gap_cm, kV", [(0.1, 4.607), (1.0, 31.447), (10.0, 268.22)])
def test_breakdown_voltage_follows_the_relation(gap_cm, kV):
    pd = 1.01325 * gap_cm
    assert kV == pytest.approx(6.72 * np.sqrt(pd) + 24.36 * pd, rel=2e-4)
    assert uniform_field_breakdown_voltage_V(gap_cm / 100.0) == pytest.approx(kV * 1e3, rel=2e-4)


def test_one_centimetre_is_the_familiar_thirty_kilovolts():  # common practice, 30 kV/cm
    assert air_strength(0.01).field_V_per_m == pytest.approx(3.0e6, rel=0.06)


def test_longer_gaps_are_weaker_and_tend_to_the_long_gap_limit():
    gaps = np.geomspace(1e-4, 10.0, 30)
    strength = np.array([air_strength(g).field_V_per_m for g in gaps])
    assert np.all(np.diff(strength) < 0)
    assert strength[-1] == pytest.approx(long_gap_limit_V_per_m(), rel=0.01)
    assert air_strength(None).field_V_per_m == pytest.approx(24.36 * 1.01325 * 1e5)
    assert strength[-1] < 3e6 < strength[0]  # 3 MV/m is not conservative for long gaps


def test_density_enters_through_p_d():
    # at half the density a 2 cm gap behaves like a 1 cm gap at full density (Paschen's law)
    assert uniform_field_breakdown_voltage_V(0.02, 0.5) == pytest.approx(uniform_field_breakdown_voltage_V(0.01, 1.0))


def test_gaps_shorter_than_the_range_get_the_strength_at_its_shortest_gap():
    shortest_m = PD_RANGE_BAR_CM[0] / 1.01325 / 100.0
    tiny = air_strength(1e-6)
    assert tiny.field_V_per_m == pytest.approx(air_strength(shortest_m).field_V_per_m)
    assert "shorter than the relation's range" in tiny.basis and "Kuffel" in tiny.basis


def test_surface_factor_scales_every_surface():
    assert air_strength(0.01, surface_factor=0.85).field_V_per_m == pytest.approx(
        0.85 * air_strength(0.01).field_V_per_m)
