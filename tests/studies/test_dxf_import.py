"""DXF import and export: fillets as exact arcs, layers to parts, round trip, plain errors."""

import math

import ezdxf
import numpy as np
import pytest

from solver import (
    Conductor,
    InvalidGeometryError,
    Model,
    ProjectFileError,
    Rectangle,
    load_project,
    solve,
)
from solver.io.dxf import parse_layer_target, read_dxf
from solver.io.dxf_export import layer_map_for, write_dxf

SAMPLES = "sample_geometries"
BUSBAR_LAYERS = {"L1": "conductor:L1:9800", "L2": "conductor:L2:-4900",
                 "ENCLOSURE": "conductor:enclosure:reference", "NOTES": "ignore"}


def test_bulge_and_line_arc_busbars_read_as_exact_rounded_rectangles():
    drawn = read_dxf(f"{SAMPLES}/busbar_fillets.dxf", BUSBAR_LAYERS)
    assert drawn.unit == "mm"
    for name, cx in (("L1", -40.0), ("L2", 40.0)):
        (bar,) = drawn.conductor(name).shapes
        assert bar == Rectangle((cx, 0.0), 10.0, 60.0, 3.0)
    (box,) = drawn.conductor("enclosure").shapes
    assert len(box.holes) == 1 and drawn.conductor("enclosure").role == "reference"


def test_busbar_drawing_solves_with_the_hand_built_capacitance():
    hand = load_project(f"{SAMPLES}/busbar_enclosure.json")
    drawn = read_dxf(f"{SAMPLES}/busbar_fillets.dxf", BUSBAR_LAYERS)
    c_hand = solve(hand, estimate_error=False).capacitance_maxwell_F_per_m
    c_drawn = solve(drawn, estimate_error=False).capacitance_maxwell_F_per_m
    np.testing.assert_allclose(c_drawn, c_hand, rtol=1e-12)


def _rotated_busbars(path, angle_deg):
    """The busbar scene turned by angle_deg: nothing is axis-aligned, so fillets are sampled arcs."""
    a = math.radians(angle_deg)
    rot = np.array([[math.cos(a), -math.sin(a)], [math.sin(a), math.cos(a)]])
    doc = ezdxf.new(units=4)
    msp = doc.modelspace()
    b = math.tan(math.pi / 8)
    for layer, cx in (("L1", -40.0), ("L2", 40.0)):
        x0, x1, y0, y1 = cx - 5, cx + 5, -30, 30
        pts = [(x0 + 3, y0, 0), (x1 - 3, y0, b), (x1, y0 + 3, 0), (x1, y1 - 3, b), (x1 - 3, y1, 0),
               (x0 + 3, y1, b), (x0, y1 - 3, 0), (x0, y0 + 3, b)]
        msp.add_lwpolyline([(*(rot @ (x, y)), 0, 0, bb) for x, y, bb in pts], format="xyseb", close=True,
                           dxfattribs={"layer": layer})
    for half in (153, 150):
        ring = [(-half, -half + 50), (half, -half + 50), (half, half - 50), (-half, half - 50)]
        msp.add_lwpolyline([tuple(rot @ p) for p in ring], close=True, dxfattribs={"layer": "ENCLOSURE"})
    doc.saveas(path)


@pytest.mark.slow
def test_turned_drawing_with_sampled_fillets_gives_the_same_capacitance(tmp_path):
    # C' does not change when the whole cross-section turns; the turned fillets are sampled at the
    # solver's arc step, so the two models differ only by the mesh: agreement to its error (~1e-5).
    _rotated_busbars(tmp_path / "turned.dxf", 30.0)
    drawn = read_dxf(tmp_path / "turned.dxf", {k: v for k, v in BUSBAR_LAYERS.items() if k != "NOTES"})
    assert drawn.conductor("L1").shapes[0].kind == "polygon"
    hand = load_project(f"{SAMPLES}/busbar_enclosure.json")
    c_hand = solve(hand, estimate_error=False).capacitance_maxwell_F_per_m
    c_drawn = solve(drawn, estimate_error=False).capacitance_maxwell_F_per_m
    np.testing.assert_allclose(c_drawn, c_hand, rtol=2e-4)


@pytest.mark.parametrize("sample", ["busbar_enclosure", "microstrip_on_substrate", "two_layer_coax_cable",
                                    "hv_electrode_over_earth", "three_traces_over_ground"])
def test_export_reimports_identically(tmp_path, sample):
    model = load_project(f"{SAMPLES}/{sample}.json")
    layers = write_dxf(model, tmp_path / "out.dxf")
    assert read_dxf(tmp_path / "out.dxf", layers, template=model) == model


def test_export_of_strips_reimports_as_strips(tmp_path):
    from solver import GroundPlane, Strip

    model = Model(unit="um", ground_plane=GroundPlane(0.0),
                  conductors=(Conductor("trace", (Strip(((-50.0, 100.0), (50.0, 100.0))),), potential_V=1.0),))
    assert read_dxf(tmp_path / "s.dxf", write_dxf(model, tmp_path / "s.dxf"), template=model) == model
    assert layer_map_for(model)["conductor-trace"].strips


def test_hatch_boundary_with_arc_edges_reads_as_a_circle_ring_free_outline(tmp_path):
    doc = ezdxf.new(units=6)  # metres
    hatch = doc.modelspace().add_hatch(dxfattribs={"layer": "WIRE"})
    path = hatch.paths.add_edge_path()
    path.add_arc((0, 0), 0.01, 0, 180)
    path.add_line((-0.01, 0), (0.01, 0))
    doc.saveas(tmp_path / "h.dxf")
    model = read_dxf(tmp_path / "h.dxf", {"WIRE": "conductor:wire:1"})
    (half_disc,) = model.conductor("wire").shapes
    assert model.unit == "m" and half_disc.kind == "polygon"
    pts = np.array(half_disc.exterior)
    assert np.hypot(*pts.T).max() == pytest.approx(0.01, rel=1e-12)
    area = 0.5 * abs(np.dot(pts[:, 0], np.roll(pts[:, 1], 1)) - np.dot(pts[:, 1], np.roll(pts[:, 0], 1)))
    assert area == pytest.approx(0.5 * math.pi * 0.01**2, rel=1e-4)


def test_open_outline_names_its_handle_and_layer(tmp_path):
    doc = ezdxf.new(units=4)
    e = doc.modelspace().add_lwpolyline([(0, 0), (10, 0), (10, 5)], close=False, dxfattribs={"layer": "BAR"})
    doc.saveas(tmp_path / "open.dxf")
    with pytest.raises(InvalidGeometryError, match=rf"LWPOLYLINE {e.dxf.handle} on layer 'BAR'.*open"):
        read_dxf(tmp_path / "open.dxf", {"BAR": "conductor:bar"})


def test_open_line_arc_chain_and_unmapped_layer_are_reported(tmp_path):
    doc = ezdxf.new(units=4)
    msp = doc.modelspace()
    line = msp.add_line((0, 0), (10, 0), dxfattribs={"layer": "BAR"})
    msp.add_circle((0, 20), 1, dxfattribs={"layer": "SPARE"})
    doc.saveas(tmp_path / "bad.dxf")
    with pytest.raises(ProjectFileError, match="'SPARE'.*not mapped"):
        read_dxf(tmp_path / "bad.dxf", {"BAR": "conductor:bar"})
    with pytest.raises(InvalidGeometryError, match=rf"LINE {line.dxf.handle} on layer 'BAR'.*open"):
        read_dxf(tmp_path / "bad.dxf", {"BAR": "conductor:bar", "SPARE": "ignore"})


def test_drawing_without_a_unit_asks_for_one(tmp_path):
    doc = ezdxf.new(units=0)
    doc.modelspace().add_circle((0, 0), 1, dxfattribs={"layer": "W"})
    doc.saveas(tmp_path / "nounit.dxf")
    with pytest.raises(ProjectFileError, match=r"INSUNITS = 0.*unit="):
        read_dxf(tmp_path / "nounit.dxf", {"W": "conductor:w"})
    assert read_dxf(tmp_path / "nounit.dxf", {"W": "conductor:w"}, unit="inch").unit == "inch"


def test_centimetre_drawing_is_converted_to_millimetres(tmp_path):
    doc = ezdxf.new(units=5)
    doc.modelspace().add_circle((1, 2), 0.5, dxfattribs={"layer": "W"})
    doc.saveas(tmp_path / "cm.dxf")
    model = read_dxf(tmp_path / "cm.dxf", {"W": "conductor:w"})
    assert model.unit == "mm" and model.conductor("w").shapes[0].radius == pytest.approx(5.0)


def test_layer_target_text():
    t = parse_layer_target("conductor:gnd:reference")
    assert (t.kind, t.name, t.role) == ("conductor", "gnd", "reference")
    assert parse_layer_target("conductor:bar:1000").potential_V == 1000.0
    assert parse_layer_target("dielectric:board:4.4").eps_r == 4.4
    with pytest.raises(ProjectFileError, match="conductor:NAME"):
        parse_layer_target("metal:x")
