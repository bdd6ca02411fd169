"""The command line prints (and its JSON part exports) the dielectric and transmission-line figures."""

import json
from pathlib import Path

import pytest

from solver import load_project, solve
from solver.cli import command as cli
from solver.cli.line_figures import transmission_line_json

ROOT = Path(__file__).resolve().parents[3]


def test_summary_has_impedance_and_layer_stress(capsys):
    assert cli.main([str(ROOT / "sample_geometries" / "two_layer_coax_cable.json"), "--density", "coarse"]) == 0
    out = capsys.readouterr().out
    assert "Largest field in each dielectric region" in out
    assert "inner insulation (eps_r 2.3)" in out and "outer insulation (eps_r 5)" in out
    assert "characteristic impedance Z0" in out
    # outside the earthed screen the field vanishes (Gauss's law, any textbook): the solver's
    # few V/m there are numerical and read "≈ 0"; locations carry true minus signs
    background = next(line for line in out.splitlines() if line.strip().startswith("background (eps_r 1)"))
    assert "≈ 0 MV/m (°)" in background and "(°) Under 0.0001 of the largest" in out
    inner = next(line for line in out.splitlines() if line.strip().startswith("inner insulation"))
    assert "≈ 0" not in inner and "−" in inner and "-" not in inner.split(" at ")[1]


def _json_part(name):
    solution = solve(load_project(ROOT / "sample_geometries" / name), estimate_error=False)
    return json.loads(json.dumps(transmission_line_json(solution), allow_nan=False))


def test_json_has_pair_figures():
    data = _json_part("edge_coupled_pair.json")
    line = data["transmission_line"]
    assert line["differential_impedance_ohm"] == pytest.approx(2 * line["odd_mode_impedance_ohm"])
    assert line["signal_names"] == ["p", "n"]
    assert {r["name"] for r in data["dielectric_regions"]} == {"prepreg", "background"}


def test_homogeneous_model_needs_no_second_solve():
    data = _json_part("coaxial_feeder.json")
    assert data["transmission_line"]["effective_permittivity"] == pytest.approx(1.0)
    assert data["dielectric_regions"] == []
