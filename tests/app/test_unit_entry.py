"""Values typed like an engineer ("150 kV", "12 mil", "0.5 mm") in every field of the properties area."""

import math

import pytest

from app.document import Document, PartRef
from app.panels.properties import PropertiesPanel
from solver import Circle, Conductor, Dielectric, GroundPlane, Model, Polygon, Rectangle

MIL_MM = 0.0254  # 1 mil = 0.001 inch = 0.0254 mm (common practice)


@pytest.fixture
def panel(qtbot):
    doc = Document()
    model = Model(
        conductors=(Conductor("bar A", (Rectangle((0, 10), 20, 10),), potential_V=1000.0),
                    Conductor("float", (Rectangle((40, 10), 10, 10),), role="floating"),
                    Conductor("tri", (Polygon(((60, 5), (70, 5), (65, 12))),))),
        dielectrics=(Dielectric("board", (Rectangle((0, -20), 200, 10),), 4.4),),
        ground_plane=GroundPlane(-30.0), unit="mm")
    doc.replace(model, None)
    p = PropertiesPanel(doc)
    qtbot.addWidget(p)
    return p


def _type(panel, key, text):
    edit = panel.fields[key]
    edit.setText(text)
    edit.editingFinished.emit()


def _select(panel, kind, index=0):
    panel.document.select(PartRef(kind, index, 0))


def test_potential_in_kV_is_kept_as_typed(panel):
    _select(panel, "conductor")
    _type(panel, "potential", "150 kV")
    assert panel.document.model.conductors[0].potential_V == 150e3
    assert panel.fields["potential"].text() == "150 kV"
    assert panel.problem_label.text() == ""
    _select(panel, "conductor", 1)
    _select(panel, "conductor", 0)
    assert panel.fields["potential"].text() == "150 kV"  # still what was typed
    panel.document.undo()
    assert panel.fields["potential"].text() == "1000"  # the model changed: the number it holds


def test_the_potential_field_says_crest_and_takes_rms_as_crest(panel):
    _select(panel, "conductor")
    assert panel.fields["potential"].unit_label.text() == "V crest"
    _type(panel, "potential", "12 kV rms")
    assert panel.document.model.conductors[0].potential_V == pytest.approx(12e3 * math.sqrt(2))
    assert "crest" in panel.note_label.text() and "12 kV rms" in panel.note_label.text()


@pytest.mark.parametrize(("key", "text", "expected_mm"), [
    ("width", "12 mil", 12 * MIL_MM),
    ("height", "0.5 mm", 0.5),
    ("corner_radius", "300 um", 0.3),
    ("cx", "1e-3 m", 1.0),
    ("cy", "2 cm", 20.0),
    ("width", "35", 35.0),  # a bare number is in the model's unit
])
def test_every_dimension_takes_a_unit(panel, key, text, expected_mm):
    _select(panel, "conductor")
    _type(panel, key, text)
    shape = panel.document.model.conductors[0].shapes[0]
    value = {"width": shape.width, "height": shape.height, "corner_radius": shape.corner_radius,
             "cx": shape.center[0], "cy": shape.center[1]}[key]
    assert value == pytest.approx(expected_mm, rel=1e-12)
    assert panel.fields[key].text() == text
    assert panel.fields[key].unit_label.text() == "mm"


def test_net_charge_ground_plane_permittivities_and_vertices(panel):
    _select(panel, "conductor", 1)
    _type(panel, "charge", "4 nC/m")
    assert panel.document.model.conductors[1].charge_C_per_m == pytest.approx(4e-9)
    _select(panel, "plane")
    _type(panel, "plane_y", "−1 inch")
    assert panel.document.model.ground_plane.y == pytest.approx(-25.4)
    _select(panel, "dielectric")
    _type(panel, "eps_r", "3.8")
    assert panel.document.model.dielectrics[0].eps_r == 3.8
    panel.eps_edit.setText("1.0006")
    panel.eps_edit.editingFinished.emit()
    assert panel.document.model.background_eps_r == 1.0006
    _select(panel, "conductor", 2)
    _type(panel, "points", "60, 5; 400 mil, 5 mm; 0.065 m, 12")
    assert panel.document.model.conductors[2].shapes[0].exterior[1] == pytest.approx((10.16, 5.0))
    assert panel.fields["points"].text() == "60, 5; 400 mil, 5 mm; 0.065 m, 12"


@pytest.mark.parametrize(("key", "text", "message"), [
    ("potential", "12 kv", "'12 kv' in 'potential of bar A': unknown unit 'kv'; use V, kV, MV"),
    ("potential", "150 kV/m", "not a unit of potential"),
    ("width", "12 kV", "'12 kV' in 'width of bar A': 'kV' is not a unit of length"),
    ("width", "0,5 mm", "use a point for decimals"),
    ("points", "0, 0; 1 kV, 0; 1, 1", "vertices of bar A"),
])
def test_bad_input_is_refused_with_the_field_named(panel, key, text, message):
    if key == "points":
        panel.document.replace(panel.document.model, None)
        _select(panel, "conductor", 2)
        message = message.replace("bar A", "tri")
    else:
        _select(panel, "conductor")
    before = panel.document.model
    _type(panel, key, text)
    assert panel.document.model == before
    assert message in panel.problem_label.text()
    assert panel.problem_label.text().startswith("Not applied:")


def test_the_unit_follows_a_unit_conversion(panel):
    _select(panel, "conductor")
    panel.unit_combo.setCurrentText("mil")
    panel.unit_combo.activated.emit(panel.unit_combo.currentIndex())
    assert panel.fields["width"].unit_label.text() == "mil"
    assert panel.fields["width"].text() == f"{20 / MIL_MM:.10g}"


def test_part_length_takes_a_unit(qtbot):
    from app.panels.safety_views import PART_LENGTH_KEY, CaveatsView

    doc = Document()
    doc.replace(Model(conductors=(Conductor("w", (Rectangle((0, 10), 2, 2),)),), unit="mm"), None)
    view = CaveatsView(doc)
    qtbot.addWidget(view)
    view.length_edit.setText("0.5 m")
    view.length_edit.editingFinished.emit()
    assert doc.model.extras[PART_LENGTH_KEY] == 500.0
    view.length_edit.setText("2 kV")
    view.length_edit.editingFinished.emit()
    assert "'2 kV' in 'part length': 'kV' is not a unit of length" in view.verdict.text()
    assert doc.model.extras[PART_LENGTH_KEY] == 500.0


def _capture_jobs(monkeypatch, runner):
    started = []
    monkeypatch.setattr(runner, "start_with_progress", lambda fn, *args: started.append(args))
    return started


def test_sweep_radii_and_corner_radius_take_units(qtbot, monkeypatch):
    from types import SimpleNamespace

    from app.panels.corner_radius_view import CornerRadiusPart
    from app.panels.hot_spots_view import HotSpotsView

    results = SimpleNamespace(model=Model(conductors=(Conductor("bar", (Rectangle((0, 10), 4, 2),)),), unit="mm"),
                              solution=None)
    part = CornerRadiusPart()
    qtbot.addWidget(part)
    assert not part.plot.isVisible() and part.plot.isHidden()  # no empty plot before a sweep
    part.results = results
    part.conductor_box.addItem("bar")
    started = _capture_jobs(monkeypatch, part.runner)
    part.radii_edit.setText("0.1, 200 um, 20 mil")
    part.run_sweep()
    assert started[-1][2] == pytest.approx([1e-4, 2e-4, 20 * 25.4e-6])
    part.radii_edit.setText("0.1, 2 kV")
    part.run_sweep()
    assert len(started) == 1 and "give positive numbers" in part.status.text()

    view = HotSpotsView()
    qtbot.addWidget(view)
    view.results = results
    started = _capture_jobs(monkeypatch, view.runner)
    view.corner_edit.setText("20 mil")
    view.corner_button.click()
    assert started[-1][2] == pytest.approx(20 * 25.4e-6)


@pytest.mark.parametrize(("text", "reason"), [
    ("-1", "must be greater than 0"),
    ("1e-20", "is smaller than 1e-10 m; check the number and the unit"),  # the project reader's words
])
def test_a_radius_the_solver_would_refuse_is_refused_at_entry_naming_part_field_and_unit(qtbot, text, reason):
    doc = Document()
    doc.replace(Model(conductors=(Conductor("go", (Circle((-4, 0), 0.65),), potential_V=1.0),
                                  Conductor("return", (Circle((4, 0), 0.65),), role="reference")), unit="mm"), None)
    panel = PropertiesPanel(doc)
    qtbot.addWidget(panel)
    _select(panel, "conductor")
    before = doc.model
    _type(panel, "radius", text)
    assert doc.model == before  # not applied, so the solve never sees it
    shown = panel.problem_label.text()
    assert shown.startswith(f"Not applied: '{text}' in 'radius of go', in mm: "), shown
    assert reason in shown
