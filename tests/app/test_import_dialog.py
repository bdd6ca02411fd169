"""File > Import drawing...: the layers found, the mapping, the preview, the parts added (undoable)."""

from __future__ import annotations

from pathlib import Path

import ezdxf
import pytest

from solver import Circle, Conductor, Dielectric, Model, Rectangle

ROOT = Path(__file__).resolve().parents[2]
POST_DXF = ROOT / "sample_geometries" / "bus_on_post.dxf"
POST_SVG = ROOT / "sample_geometries" / "bus_on_post.svg"


def bus_on_post_parts() -> tuple[Conductor, Conductor, Dielectric]:
    """The parts of the bus-on-post sample (scripts/make_sample_drawings.py, our own scenario)."""
    return (Conductor("BUS", (Rectangle((0.0, 35.0), 40.0, 8.0, 2.0),), "fixed", 10e3),
            Conductor("EARTH", (Rectangle((0.0, 3.0), 200.0, 6.0),), "reference"),
            Dielectric("EPOXY", (Rectangle((0.0, 18.5), 30.0, 25.0),), 4.4))


def _map_bus_on_post(dialog) -> None:
    dialog.set_layer("BUS", "conductor at a potential", "10 kV")
    dialog.set_layer("EARTH", "reference conductor")
    dialog.set_layer("EPOXY", "dielectric region", "4.4")
    dialog.set_layer("NOTES", "ignore")


@pytest.fixture
def open_dialog(window):
    """The dialog as File > Import drawing... opens it (a child of the window, deleted on close)."""
    return window.studies.import_drawing


def test_the_layers_are_listed_with_their_entity_counts(open_dialog):
    d = open_dialog(POST_DXF)
    rows = [(d.table.item(r, 0).text(), d.table.item(r, 1).text()) for r in range(d.table.rowCount())]
    assert rows == [("BUS", "1 LWPOLYLINE"), ("EARTH", "4 LINE"), ("EPOXY", "1 LWPOLYLINE"), ("NOTES", "1 LINE, 1 TEXT")]


@pytest.mark.parametrize("path", [POST_DXF, POST_SVG])
def test_the_mapped_parts_are_added_as_one_undoable_edit(open_dialog, window, path):
    window.document.apply(Model(unit="mm", conductors=(Conductor("rod", (Circle((0.0, 80.0), 3.0),), "fixed", 1.0),)),
                          "a rod")
    before = window.document.model
    d = open_dialog(path)
    _map_bus_on_post(d)
    assert d.add_button.isEnabled()
    assert "BUS (fixed, 10000 V), EARTH (reference), EPOXY (eps_r 4.4)" in d.message.text()
    assert len(d.preview.getPlotItem().items) == 3
    assert d.add_to_drawing()
    bus, earth, epoxy = bus_on_post_parts()
    model = window.document.model
    assert model.conductor_names == ("rod", "BUS", "EARTH")
    assert model.conductor("BUS").shapes == bus.shapes and model.conductor("BUS").potential_V == 10e3
    assert model.conductor("EARTH").role == "reference" and model.conductor("EARTH").shapes == earth.shapes
    assert model.dielectrics[0].shapes == epoxy.shapes and model.dielectrics[0].eps_r == 4.4
    assert window.document.undo_text.endswith(path.name)
    window.document.undo()
    assert window.document.model == before


def test_parts_are_converted_to_the_documents_unit_and_clashing_names_made_unique(open_dialog, window):
    window.document.apply(Model(unit="m", conductors=(Conductor("BUS", (Circle((0.0, 0.2), 0.01),), "fixed", 1.0),)),
                          "a bar in metres")
    d = open_dialog(POST_DXF)
    _map_bus_on_post(d)
    assert d.add_to_drawing()
    model = window.document.model
    assert model.unit == "m" and model.conductor_names == ("BUS", "BUS 2", "EARTH")
    assert model.conductor("BUS 2").shapes[0] == Rectangle((0.0, 0.035), 0.04, 0.008, 0.002)


def test_an_empty_drawing_takes_the_drawings_unit(open_dialog, window):
    window.load(Model(unit="inch"), None)
    d = open_dialog(POST_DXF)
    _map_bus_on_post(d)
    assert d.add_to_drawing()
    assert window.document.model.unit == "mm"


def test_a_bad_outline_is_named_and_nothing_can_be_added(open_dialog, window):
    before = window.document.model
    d = open_dialog(POST_DXF)
    _map_bus_on_post(d)
    d.set_layer("NOTES", "conductor at a potential", "0 V")  # its leader line is an open chain
    line = next(iter(ezdxf.readfile(POST_DXF).modelspace().query('LINE[layer=="NOTES"]')))
    assert f"DXF LINE {line.dxf.handle} on layer 'NOTES'" in d.message.text() and "open" in d.message.text()
    assert not d.add_button.isEnabled() and not d.add_to_drawing()
    assert window.document.model == before


def test_values_not_understood_name_the_layer(open_dialog):
    d = open_dialog(POST_DXF)
    _map_bus_on_post(d)
    d.set_layer("BUS", "conductor at a potential", "ten kV")
    assert "Layer 'BUS': the potential 'ten kV' is not a voltage" in d.message.text()
    d.set_layer("BUS", "conductor at a potential", "10 kV")
    d.set_layer("EPOXY", "dielectric region", "high")
    assert "Layer 'EPOXY': the relative permittivity 'high' is not a number" in d.message.text()
    assert not d.add_button.isEnabled()


def test_a_file_that_is_no_drawing_is_refused_with_a_message(window, tmp_path, shown_messages):
    bad = tmp_path / "broken.dxf"
    bad.write_text("not a drawing", encoding="utf-8")
    assert window.studies.import_drawing(bad) is None
    assert shown_messages and "cannot be read as DXF" in shown_messages[-1][2]


def test_the_menu_entries_exist(window):
    texts = [a.text() for a in window.commands.file_menu.actions()]
    assert "Import drawing (DXF, SVG)…" in texts
    assert window.studies.sweep_action.shortcut().toString() == "Ctrl+Shift+W"
