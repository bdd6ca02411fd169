"""Drawings on the main command line: --layer maps, the model read, unmapped layers, bad outlines."""

from __future__ import annotations

import dataclasses
import json
from pathlib import Path

import ezdxf
import numpy as np
import pytest

from solver import Conductor, Dielectric, Model, ProjectFileError, Rectangle, load_project, solve
from solver.cli.command import build_parser, main
from solver.cli.drawing_input import layer_map, load_model, parse_layer_option, parse_voltage
from solver.io.dxf import LayerTarget

ROOT = Path(__file__).resolve().parents[3]
POST_DXF = ROOT / "sample_geometries" / "bus_on_post.dxf"
POST_SVG = ROOT / "sample_geometries" / "bus_on_post.svg"
LAYERS = ["--layer", "BUS=conductor:10kV", "--layer", "EARTH=conductor:reference",
          "--layer", "EPOXY=dielectric:4.4", "--layer", "NOTES=ignore"]


def hand_built_bus_on_post() -> Model:
    """The scene of scripts/make_sample_drawings.py built from shapes (our own scenario)."""
    return Model(unit="mm", conductors=(
        Conductor("BUS", (Rectangle((0.0, 35.0), 40.0, 8.0, 2.0),), "fixed", 10e3),
        Conductor("EARTH", (Rectangle((0.0, 3.0), 200.0, 6.0),), "reference")),
        dielectrics=(Dielectric("EPOXY", (Rectangle((0.0, 18.5), 30.0, 25.0),), 4.4),))


def _model(path, *options) -> Model:
    return load_model(build_parser().parse_args([str(path), *options]))


@pytest.mark.parametrize("text, volts", [("10kV", 1e4), ("0V", 0.0), ("-400 V", -400.0), ("250mV", 0.25),
                                         ("1.5MV", 1.5e6), ("1000", 1000.0), ("2e3", 2000.0)])
def test_voltages_with_prefixes(text, volts):
    assert parse_voltage(text) == pytest.approx(volts)


@pytest.mark.parametrize("text", ["bus", "kV", "10 kA", "", "1.2.3V"])
def test_words_are_not_voltages(text):
    assert parse_voltage(text) is None


def test_layer_targets_default_to_the_layer_name():
    assert parse_layer_option("BUS=conductor:10kV") == ("BUS", LayerTarget("conductor", "BUS", potential_V=1e4))
    assert parse_layer_option("G=conductor:earth:reference") == ("G", LayerTarget("conductor", "earth", "reference"))
    assert parse_layer_option("T=conductor:trace:1V:strip") == ("T", LayerTarget("conductor", "trace", potential_V=1.0,
                                                                                 strips=True))
    assert parse_layer_option("EPOXY=dielectric:4.4") == ("EPOXY", LayerTarget("dielectric", "EPOXY", eps_r=4.4))
    assert parse_layer_option("B=dielectric:board:3.5")[1] == LayerTarget("dielectric", "board", eps_r=3.5)
    assert parse_layer_option("N=ignore") == ("N", LayerTarget("ignore"))


@pytest.mark.parametrize("text, words", [
    ("BUS", "LAYER=TARGET"), ("BUS=wire:10kV", "not a part kind"), ("BUS=conductor", "potential"),
    ("EPOXY=dielectric", "permittivity"), ("BUS=conductor:a:b", "'b' is not understood"),
    ("BUS=conductor:reference:10kV", "no set potential"),
])
def test_bad_layer_targets_say_what_to_write(text, words):
    with pytest.raises(ProjectFileError, match=words):
        parse_layer_option(text)


def test_a_layer_mapped_twice_is_refused():
    with pytest.raises(ProjectFileError, match="mapped twice"):
        layer_map(["A=ignore", "A=conductor:1V"])


@pytest.mark.parametrize("drawing", [POST_DXF, POST_SVG])
def test_the_drawing_reads_as_the_hand_built_model(drawing):
    read = _model(drawing, *LAYERS)
    assert read.title == Path(drawing).name  # a drawing carries no title: its file names it
    assert dataclasses.replace(read, title="") == hand_built_bus_on_post()


def test_the_drawing_solves_from_the_command_line_like_the_hand_built_model(capsys):
    code = main([str(POST_DXF), *LAYERS, "--json"])
    assert code == 0
    out = json.loads(capsys.readouterr().out)
    hand = solve(hand_built_bus_on_post(), estimate_error=False)
    assert out["conductors"] == ["BUS", "EARTH"]
    np.testing.assert_allclose(out["conductor_charges_C_per_m"], hand.conductor_charges_C_per_m, rtol=1e-9)
    np.testing.assert_allclose(out["capacitance_maxwell_F_per_m"], hand.capacitance_maxwell_F_per_m, rtol=1e-9)


def test_unmapped_layers_are_named_with_the_layers_found(capsys):
    code = main([str(POST_DXF), "--layer", "BUS=conductor:10kV", "--layer", "EARTH=conductor:0V"])
    err = capsys.readouterr().err
    assert code == 2
    assert "'EPOXY', 'NOTES' hold outlines but are not mapped" in err
    assert "BUS: 1 LWPOLYLINE; EARTH: 4 LINE; EPOXY: 1 LWPOLYLINE; NOTES: 1 LINE, 1 TEXT" in err
    assert "Traceback" not in err


def test_a_layer_not_in_the_drawing_is_named(capsys):
    assert main([str(POST_DXF), *LAYERS, "--layer", "BUSS=conductor:1V"]) == 2
    err = capsys.readouterr().err
    assert "'BUSS' are not in the drawing" in err and "EPOXY: 1 LWPOLYLINE" in err


def test_an_open_outline_names_its_entity_and_layer(tmp_path, capsys):
    doc = ezdxf.new(units=4)
    msp = doc.modelspace()
    msp.add_lwpolyline([(0, 0), (10, 0), (10, 5)], dxfattribs={"layer": "BUS"})  # not closed
    handle = msp.add_circle((5, -20), 2, dxfattribs={"layer": "EARTH"})
    assert handle is not None
    path = tmp_path / "open.dxf"
    doc.saveas(path)
    assert main([str(path), "--layer", "BUS=conductor:1kV", "--layer", "EARTH=conductor:reference"]) == 2
    err = capsys.readouterr().err
    polyline = next(iter(doc.modelspace().query("LWPOLYLINE")))
    assert f"DXF LWPOLYLINE {polyline.dxf.handle} on layer 'BUS'" in err and "open" in err


def test_layer_options_are_refused_for_project_files():
    with pytest.raises(ProjectFileError, match="applies to drawings"):
        _model(ROOT / "sample_geometries" / "twin_lead.json", "--layer", "A=ignore")


def test_the_model_read_can_be_kept_as_a_project_file(tmp_path):
    target = tmp_path / "post.json"
    model = _model(POST_DXF, *LAYERS, "--save-project", str(target))
    assert load_project(target) == model


def test_svg_layers_count_text_but_only_shapes_hold_outlines():
    from solver.io.drawing_layers import drawing_layers

    found = {layer.name: layer for layer in drawing_layers(POST_SVG)}
    assert found["NOTES"].counts == (("text", 1),) and not found["NOTES"].holds_outlines
    assert found["EARTH"].counts == (("rect", 1),) and found["EARTH"].holds_outlines


def test_a_drawing_without_a_title_is_named_by_its_file():
    args = build_parser().parse_args([str(POST_DXF), *LAYERS])
    assert load_model(args).title == "bus_on_post.dxf"
