"""One set of air conditions per project: saved in the project file, read back, old files still load."""

import json

import pytest

import solver
from solver import AirConditions, Circle, Conductor, Model, ProjectFileError
from solver.hot_spots import air_conditions
from solver.io import project_reading

WIRE = Model(unit="mm", conductors=(Conductor("w", (Circle((0, 0), 1.0),), potential_V=1.0),))


@pytest.mark.parametrize("air", [
    AirConditions.at_altitude(1500.0, surface_factor=0.9),
    AirConditions.at_pressure(90e3, 303.15, peek_form="coaxial"),
    AirConditions(),
])
def test_air_conditions_round_trip_through_the_file(tmp_path, air):
    path = tmp_path / "w.json"
    solver.save_project(solver.with_air_conditions(WIRE, air), path)
    data = json.loads(path.read_text())
    assert "air_conditions" in data and "air_conditions" not in data["extras"]
    back = solver.air_conditions_of(solver.load_project(path))
    assert back.relative_air_density == pytest.approx(air.relative_air_density, rel=1e-12)
    assert (back.surface_factor, back.peek_form) == (air.surface_factor, air.peek_form)


def test_files_without_air_conditions_load_with_the_reference_atmosphere(tmp_path):
    path = tmp_path / "old.json"
    solver.save_project(WIRE, path)
    assert "air_conditions" not in json.loads(path.read_text())
    assert solver.air_conditions_of(solver.load_project(path)) == AirConditions()


def test_an_earlier_programs_site_altitude_in_extras_is_still_used():
    old = Model(unit="mm", conductors=WIRE.conductors, extras={"altitude_m": 2000.0})
    assert solver.air_conditions_of(old).relative_air_density == pytest.approx(
        solver.relative_air_density_at_altitude(2000.0))
    assert "altitude_m" not in solver.with_air_conditions(old, AirConditions()).extras


@pytest.mark.parametrize("air, field", [
    ({"altitude_m": 20000}, "air_conditions.altitude_m"),
    ({"altitude_m": 100, "pressure_kPa": 90}, "air_conditions.pressure_kPa"),
    ({"surface_factor": 1.2}, "air_conditions.surface_factor"),
    ({"peek_form": "sphere"}, "air_conditions.peek_form"),
    ({"temperature_C": -300}, "air_conditions.temperature_C"),
    ({"humidity": 50}, "air_conditions.humidity"),
    ([], "air_conditions"),
])
def test_bad_air_conditions_are_refused_naming_the_field(air, field):
    data = solver.model_to_dict(WIRE) | {"air_conditions": air}
    with pytest.raises(ProjectFileError, match=f"f.json: {field}:"):
        solver.model_from_dict(data, "f.json")


def test_the_file_reader_and_the_solver_agree_on_key_and_altitude_range():
    assert project_reading.AIR_CONDITIONS_KEY == air_conditions.AIR_CONDITIONS_KEY
    low, high = project_reading.ALTITUDE_RANGE_M
    air_conditions.pressure_at_altitude_Pa(low)
    air_conditions.pressure_at_altitude_Pa(high)
    with pytest.raises(solver.InvalidModelError):
        air_conditions.pressure_at_altitude_Pa(high + 1.0)
