"""Transmission-line figures against exact results.

Sources:
* coaxial line: Z0 = (eta0 / (2 pi sqrt(eps_r))) ln(b/a), eps_eff = eps_r, delay sqrt(eps_r)/c;
  with two concentric layers L' = (mu0 / 2 pi) ln(b/a) and C' is the series of logarithmic
  layers (D. K. Cheng, Field and Wave Electromagnetics, 2nd ed., 1989, ch. 9);
* in a homogeneous medium L C = mu eps I, so every mode travels at c / sqrt(eps_r)
  (C. R. Paul, Analysis of Multiconductor Transmission Lines, Wiley, 1994, ch. 3);
* even/odd modes of a symmetric pair, Z_diff = 2 Z_odd and Z_common = Z_even / 2 (common
  practice; e.g. Paul 1994, ch. 5).
"""

import math
from pathlib import Path

import numpy as np
import pytest

from solver import (
    EPSILON_0_F_PER_M,
    MU_0_H_PER_M,
    SPEED_OF_LIGHT_M_PER_S,
    Circle,
    Conductor,
    Dielectric,
    Model,
    NoReferenceError,
    Ring,
    load_project,
)
from solver.figures.transmission_line import figures_from_matrices, transmission_line_figures

ROOT = Path(__file__).resolve().parents[2]
C_LIGHT = SPEED_OF_LIGHT_M_PER_S
ETA0 = MU_0_H_PER_M * C_LIGHT


def _coax(layers, a=0.5, b=1.75):
    return Model(
        unit="mm",
        conductors=(
            Conductor("inner", (Circle((0.0, 0.0), a),), potential_V=1.0),
            Conductor("outer", (Ring((0.0, 0.0), b, b + 0.2),), role="reference"),
        ),
        dielectrics=tuple(layers),
    )


def test_filled_coax_impedance_and_delay():
    a, b, eps_r = 0.5, 1.75, 2.25
    f = transmission_line_figures(_coax([Dielectric("fill", (Ring((0.0, 0.0), a, b),), eps_r)], a, b))
    assert f.characteristic_impedance_ohm == pytest.approx(ETA0 / (2 * math.pi * math.sqrt(eps_r)) * math.log(b / a), rel=1e-5)
    assert f.effective_permittivity == pytest.approx(eps_r, rel=1e-6)
    assert f.delay_s_per_m == pytest.approx(math.sqrt(eps_r) / C_LIGHT, rel=1e-6)
    assert f.inductance_H_per_m[0, 0] == pytest.approx(MU_0_H_PER_M / (2 * math.pi) * math.log(b / a), rel=1e-5)


def test_two_layer_coax_impedance():
    a, c, b, e1, e2 = 0.5, 1.0, 1.75, 2.3, 5.0
    f = transmission_line_figures(
        _coax([Dielectric("in", (Ring((0.0, 0.0), a, c),), e1), Dielectric("out", (Ring((0.0, 0.0), c, b),), e2)], a, b)
    )
    cap = 2 * math.pi * EPSILON_0_F_PER_M / (math.log(c / a) / e1 + math.log(b / c) / e2)
    ind = MU_0_H_PER_M / (2 * math.pi) * math.log(b / a)
    assert f.characteristic_impedance_ohm == pytest.approx(math.sqrt(ind / cap), rel=2e-5)
    assert f.effective_permittivity == pytest.approx(cap / (2 * math.pi * EPSILON_0_F_PER_M / math.log(b / a)), rel=4e-5)


def test_homogeneous_medium_modes_all_travel_at_the_same_speed():
    model = load_project(ROOT / "sample_geometries" / "three_traces_over_ground.json")
    f = transmission_line_figures(model)
    eps_r = model.background_eps_r
    np.testing.assert_allclose(f.modal_effective_permittivities, eps_r, rtol=1e-9)
    lc = f.inductance_H_per_m @ f.capacitance_F_per_m
    np.testing.assert_allclose(lc, np.eye(3) * eps_r / C_LIGHT**2, atol=1e-9 * eps_r / C_LIGHT**2)


def test_coupled_pair_on_a_substrate_sample():
    f = transmission_line_figures(load_project(ROOT / "sample_geometries" / "edge_coupled_pair.json"))
    assert f.is_symmetric_pair
    # fields of the odd mode sit more in the air above the gap: a lower eps_eff (common practice)
    assert f.even_mode_effective_permittivity > f.odd_mode_effective_permittivity
    assert f.even_mode_impedance_ohm > f.odd_mode_impedance_ohm
    assert sorted(f.modal_impedances_ohm) == pytest.approx(sorted([f.even_mode_impedance_ohm, f.odd_mode_impedance_ohm]), rel=1e-9)
    assert sorted(f.modal_effective_permittivities) == pytest.approx(
        sorted([f.even_mode_effective_permittivity, f.odd_mode_effective_permittivity]), rel=1e-9
    )
    assert f.differential_impedance_ohm == pytest.approx(2 * f.odd_mode_impedance_ohm)
    assert f.common_mode_impedance_ohm == pytest.approx(f.even_mode_impedance_ohm / 2)
    assert 0 < f.capacitive_coupling[0, 1] < 1 and 0 < f.inductive_coupling[0, 1] < 1
    assert f.inductive_coupling[0, 1] > f.capacitive_coupling[0, 1]  # inhomogeneous: k_L > k_C for microstrip


def test_pair_formulas_from_matrices():
    c0 = np.array([[60e-12, -10e-12], [-10e-12, 60e-12]])
    c = 3.0 * c0
    f = figures_from_matrices(c, c0, ("a", "b"))
    z_even = 1 / (C_LIGHT * math.sqrt(3.0) * 50e-12)
    z_odd = 1 / (C_LIGHT * math.sqrt(3.0) * 70e-12)
    assert f.even_mode_impedance_ohm == pytest.approx(z_even)
    assert f.odd_mode_impedance_ohm == pytest.approx(z_odd)
    assert f.capacitive_coupling[0, 1] == pytest.approx(1 / 6)
    assert f.inductive_coupling[0, 1] == pytest.approx(1 / 6)
    assert f.as_dict()["signal_names"] == ["a", "b"]
    unequal = figures_from_matrices(np.array([[60e-12, -10e-12], [-10e-12, 80e-12]]), c0)
    assert not unequal.is_symmetric_pair and unequal.odd_mode_impedance_ohm is None


def test_no_return_path_is_refused():
    model = Model(unit="mm", conductors=(Conductor("lonely", (Circle((0.0, 0.0), 1.0),), potential_V=1.0),))
    with pytest.raises(NoReferenceError, match="return path"):
        transmission_line_figures(model)
