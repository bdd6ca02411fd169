"""What a study of a model offers: every field listed resolves to its value; figures that apply."""

from __future__ import annotations

from pathlib import Path

import pytest

from solver import Circle, Conductor, Model, load_project, model_to_dict
from solver.studies import get_value, model_with_values
from solver.studies.choices import figure_choices, sweepable_fields
from solver.studies.figures import split_figure
from solver.studies.paths import split_parameter

ROOT = Path(__file__).resolve().parents[2]
SAMPLES = sorted((ROOT / "sample_geometries").glob("*.json"))


@pytest.mark.parametrize("sample", SAMPLES, ids=lambda p: p.stem)
def test_every_field_offered_leads_to_its_value(sample):
    model = load_project(sample)
    data = model_to_dict(model)
    fields = sweepable_fields(model)
    assert len({f.path for f in fields}) == len(fields)
    for f in fields:
        for path in split_parameter(f.path):
            assert get_value(data, path) == f.value, f.path


@pytest.mark.parametrize("sample", SAMPLES, ids=lambda p: p.stem)
def test_every_figure_offered_names_real_conductors(sample):
    model = load_project(sample)
    for choice in figure_choices(model):
        _, names = split_figure(choice.name)
        assert set(names) <= set(model.conductor_names), choice.name


def test_a_dimension_both_bars_share_moves_both():
    model = load_project(ROOT / "sample_geometries" / "busbar_enclosure.json")
    shared = [f for f in sweepable_fields(model) if f.label == "L1 + L2: corner radius"]
    assert len(shared) == 1 and shared[0].value == 3.0
    moved = model_with_values(model, {shared[0].path: 5.0})
    assert moved.conductor("L1").shapes[0].corner_radius == 5.0 == moved.conductor("L2").shapes[0].corner_radius


def test_line_figures_only_where_there_is_a_return_path():
    free = Model(unit="mm", conductors=(Conductor("a", (Circle((0, 0), 1),), "fixed", 1.0),
                                        Conductor("b", (Circle((5, 0), 1),), "fixed", 0.0)))
    names = [c.name for c in figure_choices(free)]
    assert not any(n.startswith(("Z", "C_F", "eps_eff")) for n in names)
    assert "peak_field_V_per_m.a" in names and "equivalent_radius_m.b" in names
    pair = [c.name for c in figure_choices(load_project(ROOT / "sample_geometries" / "edge_coupled_pair.json"))]
    assert pair[:4] == ["Z_even_ohm", "Z_odd_ohm", "Z_diff_ohm", "Z_common_ohm"]
