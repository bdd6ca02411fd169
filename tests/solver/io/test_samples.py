"""Every bundled sample loads, matches the schema, solves, and the coax and pair match formulas."""

from __future__ import annotations

import json
import math
from pathlib import Path

import jsonschema
import numpy as np
import pytest

import solver
from solver import EPSILON_0_F_PER_M, load_project, maxwell_matrix_problems, model_to_dict, solve

ROOT = Path(__file__).resolve().parents[3]
SAMPLES = sorted((ROOT / "sample_geometries").glob("*.json"))
SCHEMA = json.loads((Path(solver.__file__).parent / "io" / "project_schema.json").read_text(encoding="utf-8"))
REQUIRED = {"coaxial_feeder", "twin_lead", "busbar_enclosure", "three_traces_over_ground", "hv_electrode_over_earth"}


def test_the_five_required_samples_exist():
    assert REQUIRED <= {p.stem for p in SAMPLES}


@pytest.mark.parametrize("sample", SAMPLES, ids=[p.stem for p in SAMPLES])
def test_sample_validates_loads_and_solves(sample):
    data = json.loads(sample.read_text(encoding="utf-8"))
    jsonschema.validate(data, SCHEMA)
    model = load_project(sample)
    assert model.title and model.description.endswith(".")
    jsonschema.validate(model_to_dict(model), SCHEMA)
    assert solver.model_from_dict(model_to_dict(model)) == model
    sol = solve(model, estimate_error=False)
    assert sol.has_capacitance
    c = sol.capacitance_maxwell_F_per_m
    assert c.shape == (len(model.signal_names),) * 2
    assert maxwell_matrix_problems(c, rtol=1e-4) == []
    assert np.all(np.isfinite([p.field_V_per_m for p in sol.peak_surface_fields]))


def test_coax_sample_matches_the_coaxial_formula():
    # C' = 2 pi eps0 / ln(b/a) for a coaxial line: D. K. Cheng, Field and Wave Electromagnetics, 2nd ed., 1989.
    model = load_project(ROOT / "sample_geometries" / "coaxial_feeder.json")
    inner, shield = model.conductors
    assert inner.shapes[0].radius == 1.0 and shield.shapes[0].inner_radius == 3.5 and model.unit == "mm"
    c = solve(model, estimate_error=False).capacitance_maxwell_F_per_m[0, 0]
    expected = 2 * math.pi * EPSILON_0_F_PER_M / math.log(3.5)
    assert abs(c / expected - 1) < 1e-4


def test_twin_lead_sample_matches_the_two_wire_formula():
    # C' = pi eps0 / arccosh(D / 2a) between two parallel round wires: D. K. Cheng,
    # Field and Wave Electromagnetics, 2nd ed., 1989 (two-wire transmission line).
    model = load_project(ROOT / "sample_geometries" / "twin_lead.json")
    go, ret = (c.shapes[0] for c in model.conductors)
    spacing = math.dist(go.center, ret.center)
    c = solve(model, estimate_error=False).capacitance_maxwell_F_per_m[0, 0]
    expected = math.pi * EPSILON_0_F_PER_M / math.acosh(spacing / (2 * go.radius))
    assert abs(c / expected - 1) < 1e-4


def test_hv_electrode_sample_field_is_enhanced_but_below_air_strength():
    # Plain field V / gap is 100 kV/m; rounded edges raise it, yet stay below about 3 MV/m
    # (air, uniform field, sea level: common practice).
    model = load_project(ROOT / "sample_geometries" / "hv_electrode_over_earth.json")
    peak = solve(model, estimate_error=False).peak_surface_fields[0]
    assert 1e5 < peak.field_V_per_m < 3e6
    assert not peak.at_sharp_corner
