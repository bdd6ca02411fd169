"""The voltage basis of the high-voltage check: saved with the project, applied, and said.

Physics: crest = rms x sqrt 2 for a sine wave, and the electrostatic field scales linearly
with the potentials (common practice). Air gaps are sized by the test and overvoltage levels
they must withstand, not by the operating voltage (common practice; the levels come from the
equipment's standard and insulation coordination).
"""

import json
import math

import pytest

import solver
from solver import Circle, Conductor, GroundPlane, Model, VoltageBasis, judge_peak, voltage_basis_of, with_voltage_basis
from solver.errors import InvalidModelError, ProjectFileError
from solver.hot_spots.voltage_basis import CHECK_AT_TEST_LEVELS, IMPULSE_NOTE


def _judge(peak, dv=50e3, basis=solver.OPERATING_CREST):
    return judge_peak(peak, where="'c'", largest_potential_difference_V=dv, medium=None, at_sharp_corner=False,
                      gap_m=0.01, voltage_basis=basis)


def test_old_files_load_as_operating_crest_and_the_basis_round_trips(tmp_path):
    old = solver.load_project("sample_geometries/busbar_enclosure.json")
    assert "voltage_basis" not in json.load(open("sample_geometries/busbar_enclosure.json"))
    assert voltage_basis_of(old) == VoltageBasis("operating", "crest", 1.0)
    for basis in (VoltageBasis("power_frequency_withstand", "rms"), VoltageBasis("factor", "crest", 1.2),
                  VoltageBasis("lightning_impulse")):
        path = tmp_path / "p.json"
        solver.save_project(with_voltage_basis(old, basis), path)
        assert json.loads(path.read_text())["voltage_basis"] == basis.as_settings()
        assert voltage_basis_of(solver.load_project(path)) == basis


def test_a_bad_basis_in_a_file_names_the_field(tmp_path):
    data = json.loads(open("sample_geometries/busbar_enclosure.json").read())
    data["voltage_basis"] = {"basis": "switching", "potentials": "crest"}
    path = tmp_path / "bad.json"
    path.write_text(json.dumps(data))
    with pytest.raises(ProjectFileError, match="voltage_basis.basis"):
        solver.load_project(path)
    with pytest.raises(InvalidModelError, match="no rms value"):
        VoltageBasis("lightning_impulse", "rms")


def test_rms_potentials_are_judged_at_their_crest():
    crest, rms = _judge(2.0e6), _judge(2.0e6 / math.sqrt(2), basis=VoltageBasis(potentials="rms"))
    assert rms.margin == pytest.approx(crest.margin) and rms.field_factor == pytest.approx(math.sqrt(2))
    assert rms.peak_field_V_per_m == pytest.approx(2.0e6)
    assert "converted to crest (x 1.414)" in rms.caution
    # 250 V rms is 354 V crest: above the 300 V low-voltage line once converted
    assert _judge(1e5, dv=250.0).caution == ""
    assert _judge(1e5, dv=250.0, basis=VoltageBasis(potentials="rms")).caution != ""


def test_ample_at_operating_voltage_says_so_and_asks_for_the_test_levels():
    v = _judge(1.0e6)
    assert v.status == "ample" and v.headline.endswith("at operating voltage.")
    assert CHECK_AT_TEST_LEVELS in v.caution and v.caution.endswith(solver.HIGH_VOLTAGE_CAUTION)
    withstand = _judge(1.0e6, basis=VoltageBasis("power_frequency_withstand", "rms"))
    assert "at the power-frequency withstand voltage" in withstand.headline
    assert CHECK_AT_TEST_LEVELS not in withstand.caution
    impulse = _judge(1.0e6, basis=VoltageBasis("lightning_impulse"))
    assert IMPULSE_NOTE in impulse.caution


def test_an_overvoltage_factor_scales_the_margin():
    assert _judge(1.0e6, basis=VoltageBasis("factor", factor=2.0)).margin == pytest.approx(_judge(1.0e6).margin / 2)


def test_the_solution_verdict_reads_the_projects_basis():
    wire = Model(unit="mm", ground_plane=GroundPlane(0.0), mesh_density="coarse", conductors=(
        Conductor("wire", (Circle((0.0, 100.0), 5.0),), potential_V=40e3),))
    plain = solver.judge_solution(solver.solve(wire))
    rms = solver.judge_solution(solver.solve(with_voltage_basis(wire, VoltageBasis(potentials="rms"))))
    assert rms.verdicts[0].margin == pytest.approx(plain.verdicts[0].margin / math.sqrt(2), rel=1e-9)
    assert "rms" in rms.caution and "rms" not in plain.caution


def test_the_cable_sample_states_that_its_8_7_kV_is_rms():
    # cable voltages are rated in rms (U0 of an 8.7/15 kV cable; common practice)
    model = solver.load_project("sample_geometries/two_layer_coax_cable.json")
    assert model.conductor("core").potential_V == 8700.0
    assert voltage_basis_of(model) == VoltageBasis("operating", "rms")
    assert "rms" in model.description and "crest" in model.description
