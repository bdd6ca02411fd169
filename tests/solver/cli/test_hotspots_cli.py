"""Command line: hot-spot and margin section, JSON keys, air options and their errors."""

from __future__ import annotations

import json
from pathlib import Path

import pytest

from solver import Conductor, GroundPlane, Model, Rectangle, save_project
from solver.cli.command import main
from solver.hot_spots.air_conditions import HIGH_VOLTAGE_CAUTION, relative_air_density_at_altitude
from solver.hot_spots.air_strength import air_strength

ROOT = Path(__file__).resolve().parents[3]
HV = ROOT / "sample_geometries" / "hv_electrode_over_earth.json"


def _json(capsys, *argv) -> dict:
    assert main([*map(str, argv), "--json"]) == 0
    return json.loads(capsys.readouterr().out)


def test_json_has_margins_and_peak_error_in_si_keys(capsys):
    data = _json(capsys, HV, "--altitude-m", "2000", "--surface-factor", "0.9")
    assert data["conductors"] == ["electrode"]
    assert data["peak_field_estimated_relative_error"][0] < 0.01
    assert data["relative_air_density"] == pytest.approx(relative_air_density_at_altitude(2000.0))
    # strength of air across the 1 m gap to earth, x density, x surface factor (Kuffel, Zaengl &
    # Kuffel, High Voltage Engineering Fundamentals, 2000)
    strength = air_strength(1.0, data["relative_air_density"], 0.9).field_V_per_m
    assert data["air_gap_m"][0] == pytest.approx(1.0)
    assert data["air_breakdown_field_V_per_m"][0] == pytest.approx(strength, rel=1e-6)
    assert data["air_breakdown_margin"][0] == pytest.approx(data["air_breakdown_field_V_per_m"][0]
                                                            / data["peak_field_V_per_m"][0])
    assert data["corona_onset_field_V_per_m"][0] > data["air_breakdown_field_V_per_m"][0]
    assert data["corona_onset_margin"][0] == pytest.approx(data["corona_onset_field_V_per_m"][0]
                                                           / data["peak_field_V_per_m"][0])
    assert data["margins"]["surface_factor"] == 0.9
    # ample, but a high-voltage model: the full caution, word for word (SAFETY.md)
    assert data["margin_status"] == ["ample"] and data["high_voltage_caution"].endswith(HIGH_VOLTAGE_CAUTION)
    assert data["voltage_basis"] == {"basis": "operating", "potentials": "crest"} and data["field_factor"] == 1.0
    assert "at operating voltage" in data["caution_headline"] and "check again" in data["high_voltage_caution"]
    assert data["caution_status"] == "ample"
    assert data["air_region_peak_field_V_per_m"] is None and data["air_region_margin"] is None  # no insulation
    detail = data["hot_spots"]["conductors"][0]
    assert detail["nearest_conductor"] == "ground plane" and detail["gap_m"] == pytest.approx(1.0)


def test_summary_shows_thin_margin_with_the_caution(tmp_path, capsys):
    # A sharp-cornered bar at 80 kV, 100 mm above earth, rounded to 5 mm on the command line:
    # peak about 2.6 MV/m. Peek's onset for the 5 mm corner radius (about 4.3 MV/m, corona margin
    # about 1.6) rests on a local radius of curvature, so the smaller air-breakdown margin (the
    # uniform-field strength of air for the 100 mm gap, about 2.7 MV/m: margin about 1.02) decides.
    bar = Model(unit="mm", ground_plane=GroundPlane(0.0), title="Bar", conductors=(
        Conductor("bar", (Rectangle((0.0, 120.0), 60.0, 40.0),), potential_V=8.0e4),))
    path = tmp_path / "bar.json"
    save_project(bar, path)
    assert main([str(path), "--corner-radius-m", "0.005"]) == 0
    out = capsys.readouterr().out
    assert "corners rounded to 5 mm" in out
    section = out[out.index("Hot spots:"):].splitlines()
    row = next(line for line in section if line.strip().startswith("bar "))
    assert row.split()[-1] == "thin"
    assert " ".join(HIGH_VOLTAGE_CAUTION.split()) in " ".join(out.split())
    data = _json(capsys, path, "--corner-radius-m", "0.005")
    assert data["hot_spots"]["corner_radius_m"] == 0.005 and not data["peak_field_singular"][0]
    assert data["high_voltage_caution"].endswith(HIGH_VOLTAGE_CAUTION) and data["caution_status"] == "thin"
    assert data["high_voltage_caution"].startswith(data["caution_headline"]) and "flashover" not in out
    assert data["caution_headline"] in out and data["high_voltage_caution"] in " ".join(out.split())
    assert 1.0 < data["air_breakdown_margin"][0] < 1.5 < data["corona_onset_margin"][0]
    assert data["deciding_margin"] == ["air breakdown"]
    assert "does not decide" in data["high_voltage_caution"]


def test_sharp_corner_without_radius_is_not_assessed(tmp_path, capsys):
    bar = Model(unit="mm", ground_plane=GroundPlane(0.0), conductors=(
        Conductor("bar", (Rectangle((0.0, 120.0), 60.0, 40.0),), potential_V=4.5e5),))
    path = tmp_path / "bar.json"
    save_project(bar, path)
    data = _json(capsys, path)
    assert data["peak_field_singular"] == [True] and data["margin_status"] == ["not assessed"]
    assert data["air_breakdown_margin"] == [None]
    assert data["hot_spots"]["conductors"][0]["corner_exponent"] == pytest.approx(-1 / 3)


def test_pressure_and_temperature_options(capsys):
    data = _json(capsys, HV, "--pressure-kPa", "90", "--temperature-C", "30")
    assert data["relative_air_density"] == pytest.approx(0.858931, rel=1e-5)


def test_bad_altitude_is_a_one_line_error(capsys):
    assert main([str(HV), "--altitude-m", "30000"]) == 2
    err = capsys.readouterr().err
    assert err.startswith("error:") and "Altitude" in err and err.count("\n") == 1


def test_conductors_at_one_potential_are_compared_with_the_bundle_formula(tmp_path, capsys):
    from solver import Circle

    pair = Model(unit="mm", ground_plane=GroundPlane(0.0), mesh_density="coarse", conductors=(
        Conductor("a", (Circle((-100.0, 5000.0), 5.0),), potential_V=1e5),
        Conductor("b", (Circle((100.0, 5000.0), 5.0),), potential_V=1e5)))
    path = tmp_path / "pair.json"
    save_project(pair, path)
    bundles = _json(capsys, path)["bundles"]
    assert len(bundles) == 1 and bundles[0]["conductors"] == ["a", "b"] and bundles[0]["n_subconductors"] == 2
    assert bundles[0]["formula_equivalent_radius_m"] == pytest.approx((2 * 0.005 * 0.1) ** 0.5)
    assert abs(bundles[0]["relative_difference"]) < 2e-3
    assert main([str(path)]) == 0
    assert "bundle formula (n r A^(n-1))^(1/n) with n = 2" in capsys.readouterr().out


@pytest.mark.slow  # full command line with hot-spot refinement
def test_part_length_option(capsys):
    data = _json(capsys, HV, "--part-length-m", "6")
    check = data["part_length_check"]
    assert check["length_to_size_ratio"] == pytest.approx(6 / 1.1) and check["long_enough"] is False
    assert main([str(HV), "--part-length-m", "6"]) == 0
    assert "Part length: The part is 5.45 times as long" in capsys.readouterr().out
    assert _json(capsys, HV)["part_length_check"] is None


@pytest.mark.slow  # full command line with hot-spot refinement
def test_radius_sweep_option(capsys):
    data = _json(capsys, HV, "--radius-sweep", "electrode=0.05,0.02")
    sweep = data["corner_radius_sweep"]
    assert sweep["conductor"] == "electrode" and sweep["corner_radius_m"] == [0.02, 0.05]
    assert sweep["peak_field_V_per_m"][0] > sweep["peak_field_V_per_m"][1]
    assert max(sweep["peak_field_estimated_relative_error"]) < 0.01
    for bad, words in (("electrode", "CONDUCTOR=R1,R2"), ("nobody=0.01", "no conductor named 'nobody'")):
        assert main([str(HV), "--radius-sweep", bad]) == 2
        err = capsys.readouterr().err
        assert words in err and err.count("\n") == 1


def test_voltage_basis_scales_the_margins_and_is_said(capsys):
    # rms to crest by sqrt 2 (common practice); fields scale with the potentials in electrostatics
    plain = _json(capsys, HV)
    rms = _json(capsys, HV, "--potentials-rms")
    assert rms["field_factor"] == pytest.approx(2**0.5)
    assert rms["voltage_basis"] == {"basis": "operating", "potentials": "rms"}
    assert "converted to crest" in rms["voltage_basis_text"]
    assert rms["corona_onset_margin"][0] == pytest.approx(plain["corona_onset_margin"][0] / 2**0.5, rel=1e-9)
    assert rms["peak_field_V_per_m"] == plain["peak_field_V_per_m"]  # the model's own fields, unscaled
    impulse = _json(capsys, HV, "--voltage-basis", "lightning_impulse")
    assert "lightning-impulse withstand" in impulse["caution_headline"]
    assert "check again" not in impulse["high_voltage_caution"]
    assert impulse["high_voltage_caution"].endswith(HIGH_VOLTAGE_CAUTION)
    over = _json(capsys, HV, "--voltage-factor", "6")
    assert over["corona_onset_margin"][0] == pytest.approx(plain["corona_onset_margin"][0] / 6, rel=1e-9)
    assert over["caution_status"] != "ample" and "at 6 x operating voltage" in over["caution_headline"]


def test_a_bad_voltage_basis_ends_in_exit_2_with_one_line(capsys):
    assert main([str(HV), "--voltage-basis", "factor"]) == 2
    assert "--voltage-factor" in capsys.readouterr().err
    assert main([str(HV), "--voltage-basis", "lightning_impulse", "--potentials-rms"]) == 2
    assert "no rms value" in capsys.readouterr().err


@pytest.mark.parametrize("name", ["microstrip_on_substrate", "hv_electrode_over_earth", "two_layer_coax_cable",
                                  "three_phase_line", "edge_coupled_pair"])
def test_the_full_caution_appears_word_for_word_whenever_the_model_is_high_voltage(name, capsys):
    # SAFETY.md: every model with potentials 300 V or more apart carries the caution in text and JSON
    from solver import load_project
    from solver.hot_spots.verdict import LOW_VOLTAGE_THRESHOLD_V, largest_potential_difference_V

    path = ROOT / "sample_geometries" / f"{name}.json"
    model = load_project(path)
    fixed = [c.potential_V for c in model.conductors if c.role == "fixed"]
    has_zero = model.ground_plane is not None or any(c.role == "reference" for c in model.conductors)
    high = largest_potential_difference_V(fixed, has_zero) >= LOW_VOLTAGE_THRESHOLD_V
    data = _json(capsys, path, "--density", "coarse")
    assert main([str(path), "--density", "coarse"]) == 0
    text = " ".join(capsys.readouterr().out.split())
    if high:
        assert data["high_voltage_caution"] and data["high_voltage_caution"].endswith(HIGH_VOLTAGE_CAUTION)
        assert " ".join(HIGH_VOLTAGE_CAUTION.split()) in text
    else:
        assert data["high_voltage_caution"] == "" and "Caution - high voltage" not in text


def test_hot_spot_locations_carry_true_minus_signs(capsys):
    assert main([str(ROOT / "sample_geometries" / "busbar_enclosure.json"), "--density", "coarse"]) == 0
    out = capsys.readouterr().out
    row = next(line for line in out.splitlines() if line.strip().startswith("L1") and "%" in line and "kV/m" in line)
    assert "(−" in row and "(-" not in row  # L1 sits at x = -40 mm: its peak's x is negative
