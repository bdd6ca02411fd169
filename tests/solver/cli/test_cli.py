"""Command line: summary, --json, --csv, --density, exit status and one-line errors."""

from __future__ import annotations

import csv
import dataclasses
import json
import math
import re
import subprocess
import sys
from pathlib import Path

import pytest
import scipy.linalg

from solver import EPSILON_0_F_PER_M, Circle, Conductor, Model, Ring, save_project, solve
from solver.cli.command import format_engineering, main
from solver.cli.json_output import JSON_PARTS, report_to_json
from solver.cli.options import ReportOptions
from solver.cli.report import build_report
from solver.cli.text import TEXT_SECTIONS, summary_lines

ROOT = Path(__file__).resolve().parents[3]
SAMPLES = sorted((ROOT / "sample_geometries").glob("*.json"))
COAX = ROOT / "sample_geometries" / "coaxial_feeder.json"

JSON_KEYS = {
    "conductors", "signal_conductors", "capacitance_maxwell_F_per_m", "capacitance_mutual_F_per_m",
    "capacitance_note", "conductor_potentials_V", "conductor_charges_C_per_m", "peak_surface_field_V_per_m",
    "peak_surface_field_location_m", "peak_at_sharp_corner", "equivalent_radius_m",
    "estimated_relative_error", "n_panels",
}


def small_coax(radius_mm: float = 1.0) -> Model:
    return Model(unit="mm", mesh_density="coarse", conductors=(
        Conductor("core", (Circle((0.0, 0.0), radius_mm),), role="fixed", potential_V=1.0),
        Conductor("tube", (Ring((0.0, 0.0), 3.5, 4.0),), role="reference")))


@pytest.fixture
def no_return_path(tmp_path) -> Path:
    model = Model(unit="mm", mesh_density="coarse", title="Two wires, no return", conductors=(
        Conductor("a", (Circle((-3.0, 0.0), 1.0),), role="fixed", potential_V=1.0),
        Conductor("b", (Circle((3.0, 0.0), 1.0),), role="fixed", potential_V=-1.0)))
    path = tmp_path / "loose.json"
    save_project(model, path)
    return path


@pytest.mark.parametrize("sample", [
    # The full command line with hot-spot refinement takes many seconds per sample: the quick run
    # keeps the coaxial feeder, CI runs them all.
    pytest.param(p, id=p.stem, marks=() if p == COAX else pytest.mark.slow) for p in SAMPLES])
def test_every_sample_prints_a_summary(sample, capsys):
    assert main([str(sample)]) == 0
    out = capsys.readouterr().out
    data = json.loads(sample.read_text(encoding="utf-8"))
    assert data["title"] in out
    for conductor in data["conductors"]:
        assert conductor["name"] in out
    assert "pF/m" in out and "Maxwell form" in out and "mutual form" in out
    assert "Estimated relative error" in out and "Equivalent radius" in out


def test_coax_summary_figures(capsys):
    assert main([str(COAX)]) == 0
    out = capsys.readouterr().out
    c_pF = 2 * math.pi * EPSILON_0_F_PER_M / math.log(3.5) * 1e12  # 44.408 pF/m
    digits = int(re.search(r"shown to (\d) significant digits", out).group(1))
    assert digits >= 4  # the coax solves to better than 1e-4
    shown = re.search(r"^  inner +([\d.]+)$", out, re.M).group(1)
    assert len(shown.replace(".", "")) <= digits and float(shown) == pytest.approx(c_pF, rel=10.0 ** (1 - digits))
    e_peak = 1.0 / (1e-3 * math.log(3.5))  # V / (a ln(b/a)) = 798 V/m at the inner surface
    assert re.search(rf"^  inner +{format_engineering(e_peak, 'V/m')} ", out, re.M)
    assert re.search(r"^  inner +(0\.9999\d|1) mm$", out, re.M)  # equivalent radius
    assert "High voltage" not in out


def test_json_output_has_the_documented_keys(capsys):
    assert main([str(COAX), "--json"]) == 0
    result = json.loads(capsys.readouterr().out)
    assert JSON_KEYS <= result.keys()
    assert result["conductors"] == ["inner", "shield"] and result["signal_conductors"] == ["inner"]
    c = 2 * math.pi * EPSILON_0_F_PER_M / math.log(3.5)
    assert result["capacitance_maxwell_F_per_m"][0][0] == pytest.approx(c, rel=1e-4)
    assert result["capacitance_mutual_F_per_m"][0][0] == pytest.approx(c, rel=1e-4)
    assert result["capacitance_note"] is None
    assert result["conductor_charges_C_per_m"] == pytest.approx([c, -c], rel=1e-4)
    assert result["peak_surface_field_V_per_m"][0] == pytest.approx(1.0 / (1e-3 * math.log(3.5)), rel=1e-3)
    assert math.hypot(*result["peak_surface_field_location_m"][0]) == pytest.approx(1e-3, rel=1e-3)
    assert result["peak_at_sharp_corner"] == [False, False]
    assert result["equivalent_radius_m"] == pytest.approx([1e-3, 4e-3], rel=1e-4)
    assert 0 < result["estimated_relative_error"] < 1e-4
    assert result["n_panels"] > 100


def test_csv_has_names_as_headers(tmp_path, capsys):
    sample = ROOT / "sample_geometries" / "three_traces_over_ground.json"
    out_csv = tmp_path / "c.csv"
    assert main([str(sample), "--json", "--csv", str(out_csv)]) == 0
    result = json.loads(capsys.readouterr().out)
    names = result["signal_conductors"]
    with open(out_csv, newline="", encoding="utf-8") as f:
        rows = list(csv.reader(f))
    # one block per matrix: title with unit, then names; one row per conductor; an empty row after
    assert rows[0] == ["Maxwell capacitance matrix (pF/m)", *names]
    assert rows[4] == [] and rows[5] == ["Mutual capacitance matrix (pF/m)", *names] and rows[9] == []
    assert len(rows) == 10
    for form, block in (("maxwell", rows[1:4]), ("mutual", rows[6:9])):
        assert [r[0] for r in block] == names
        expected = result[f"capacitance_{form}_F_per_m"]
        for i, row in enumerate(block):
            assert [float(x) for x in row[1:]] == pytest.approx([x * 1e12 for x in expected[i]], rel=1e-9)


@pytest.mark.slow  # three full command-line runs
def test_density_option_changes_the_mesh(tmp_path, capsys):
    path = tmp_path / "coax.json"
    save_project(small_coax(), path)
    panels = {}
    for density in ("coarse", "fine"):
        assert main([str(path), "--json", "--density", density]) == 0
        panels[density] = json.loads(capsys.readouterr().out)["n_panels"]
    assert panels["fine"] > 2 * panels["coarse"]


def test_no_return_path_says_so_and_exits_0(no_return_path, capsys):
    assert main([str(no_return_path)]) == 0
    out = capsys.readouterr().out
    assert "there is no 2-D capacitance without a return path" in out
    assert "Maxwell form" not in out
    assert main([str(no_return_path), "--json"]) == 0
    result = json.loads(capsys.readouterr().out)
    assert result["capacitance_maxwell_F_per_m"] is None and result["capacitance_mutual_F_per_m"] is None
    assert "return path" in result["capacitance_note"]
    assert result["conductor_charges_C_per_m"][0] == pytest.approx(-result["conductor_charges_C_per_m"][1])


def test_csv_without_return_path_is_refused(no_return_path, tmp_path, capsys):
    target = tmp_path / "never.csv"
    assert main([str(no_return_path), "--csv", str(target)]) == 2
    err = capsys.readouterr().err
    assert err.count("\n") == 1 and "return path" in err and "never.csv" in err
    assert not target.exists()


def test_bad_file_exits_2_with_one_line(tmp_path, capsys):
    path = tmp_path / "broken.json"
    path.write_text('{"format": "edgewise-project", "version": 1, "unit": "mm", "conductors": [{"name": "a"}]}')
    assert main([str(path)]) == 2
    captured = capsys.readouterr()
    assert captured.out == ""
    assert captured.err == f"error: {path}: conductors[0].role: missing (one of fixed, floating, reference)\n"


def test_missing_file_exits_2(tmp_path, capsys):
    assert main([str(tmp_path / "nothing.json")]) == 2
    assert capsys.readouterr().err == f"error: {tmp_path / 'nothing.json'}: file not found\n"


def test_invalid_geometry_exits_2_naming_file_and_conductors(tmp_path, capsys):
    model = Model(unit="mm", conductors=(
        Conductor("a", (Circle((0.0, 0.0), 2.0),), role="fixed", potential_V=1.0),
        Conductor("b", (Circle((1.0, 0.0), 2.0),), role="reference")))
    path = tmp_path / "overlap.json"
    save_project(model, path)
    assert main([str(path)]) == 2
    err = capsys.readouterr().err
    assert err.startswith(f"error: {path}: Conductors 'a' and 'b' touch or overlap")
    assert err.count("\n") == 1


def test_unknown_option_exits_2(capsys):
    assert main([str(COAX), "--density", "ultra"]) == 2
    assert "invalid choice" in capsys.readouterr().err


def test_sections_and_json_parts_can_be_extended(tmp_path, capsys):
    path = tmp_path / "coax.json"
    save_project(small_coax(), path)
    seen = []

    def extra_section(report):
        seen.append(report)
        return ["Extra section", f"  {report.solution.mesh.n_panels}"]

    def extra_part(report):
        seen.append(report)
        return {"extra_panels": report.solution.mesh.n_panels}

    assert main([str(path)], sections=(*TEXT_SECTIONS, extra_section)) == 0
    out = capsys.readouterr().out
    assert out.rstrip().endswith(f"Extra section\n  {seen[-1].solution.mesh.n_panels}")
    assert main([str(path), "--json"], json_parts=(*JSON_PARTS, extra_part)) == 0
    data = json.loads(capsys.readouterr().out)
    assert data["extra_panels"] == data["n_panels"] == seen[-1].solution.mesh.n_panels
    # the defaults are immutable tuples: an extension for one run leaves the next run as it was
    assert isinstance(TEXT_SECTIONS, tuple) and isinstance(JSON_PARTS, tuple)
    assert main([str(path)]) == 0
    assert "Extra section" not in capsys.readouterr().out


def test_report_is_computed_once_and_rendered_without_solving(monkeypatch):
    report = build_report(solve(small_coax()), ReportOptions())
    calls = []
    monkeypatch.setattr(scipy.linalg, "lu_factor", lambda *a, **k: calls.append(a) or pytest.fail("solved again"))
    monkeypatch.setattr(scipy.linalg, "solve", lambda *a, **k: calls.append(a) or pytest.fail("solved again"))
    text = "\n".join(summary_lines(report))
    data = report_to_json(report)
    assert "Hot spots" in text and data["conductors"] == ["core", "tube"]
    assert data["equivalent_radius_m"] == list(report.equivalent_radii_m)
    assert not calls
    with pytest.raises(dataclasses.FrozenInstanceError):
        report.equivalent_radii_m = ()  # type: ignore[misc]


def test_high_voltage_sample_carries_the_caution(capsys):
    assert main([str(ROOT / "sample_geometries" / "hv_electrode_over_earth.json")]) == 0
    out = capsys.readouterr().out
    from solver import HIGH_VOLTAGE_CAUTION

    # rounded 30 mm edges, within their corona onset; the basis is said, and at operating voltage
    # the result asks for a check at the test and overvoltage levels (common practice)
    assert "High-voltage verdict: ample (voltage basis: operating voltage (crest))." in out
    assert "check again with the voltage basis set to those levels" in " ".join(out.split())
    assert " ".join(HIGH_VOLTAGE_CAUTION.split()) in " ".join(out.split())  # word for word (SAFETY.md)


def test_sharp_corner_note(capsys):
    assert main([str(ROOT / "sample_geometries" / "three_traces_over_ground.json")]) == 0
    out = capsys.readouterr().out
    assert "At a sharp corner or edge (charge density ~ r^-0.33)" in out
    assert "grows as the mesh is refined" in out


@pytest.mark.parametrize("value, text", [
    (2.31e6, "2.31 MV/m"), (798.24, "798 V/m"), (0.0, "0 V/m"), (999.7, "1 kV/m"),
    (-4.5e-12, "-4.5 pV/m"), (1.5e-3, "1.5 mV/m"),
])
def test_format_engineering(value, text):
    assert format_engineering(value, "V/m") == text


@pytest.mark.slow  # a fresh interpreter runs the full command line
def test_python_dash_m_runs_and_fails_cleanly(tmp_path):
    ok = subprocess.run([sys.executable, "-m", "solver", str(COAX)], capture_output=True, text=True, cwd=ROOT)
    assert ok.returncode == 0 and "Air-spaced 75-ohm coaxial feeder" in ok.stdout
    bad = tmp_path / "bad.json"
    bad.write_text("{not json")
    failed = subprocess.run([sys.executable, "-m", "solver", str(bad)], capture_output=True, text=True, cwd=ROOT)
    assert failed.returncode == 2 and "Traceback" not in failed.stderr
    assert failed.stderr == f"error: {bad}: not JSON (line 1, column 2: Expecting property name enclosed in double quotes)\n"


def test_csv_into_missing_folder_exits_2(tmp_path, capsys):
    path = tmp_path / "coax.json"
    save_project(small_coax(), path)
    target = tmp_path / "no_such_folder" / "c.csv"
    assert main([str(path), "--csv", str(target)]) == 2
    err = capsys.readouterr().err
    assert err == f"error: cannot write {target}: No such file or directory\n"


def test_raw_asymmetry_of_the_capacitance_matrix_is_shown_in_text_and_json(capsys):
    # accuracy check before symmetrising: a reciprocal medium has C_ij = C_ji (common practice)
    path = ROOT / "sample_geometries" / "three_traces_over_ground.json"
    assert main([str(path), "--density", "coarse"]) == 0
    text = capsys.readouterr().out
    assert main([str(path), "--density", "coarse", "--json"]) == 0
    data = json.loads(capsys.readouterr().out)
    from solver import load_project, solve

    expected = solve(load_project(path).with_mesh_density("coarse")).capacitance_asymmetry
    assert data["capacitance_asymmetry"] == pytest.approx(expected, rel=1e-6, abs=1e-18)
    assert 0 < data["capacitance_asymmetry"] < 1e-3  # the JSON keeps the raw value
    # the text calls an asymmetry of round-off size (1e-9 here) what it is
    assert expected < 1e-8 and "symmetric to round-off" in text and "before it was symmetrised" in text
    from solver.cli.text import asymmetry_line

    assert "asymmetric by 0.025 %" in asymmetry_line(2.5e-4)
