"""The parts list shows typed values through the shared formatter: SI prefixes, true minus
signs, no round-off of a unit conversion, and each conductor's identity colour as a swatch."""

from app import colours
from app.panels.parts_list import PartsList
from solver import Circle, Conductor, Dielectric, GroundPlane, Model, Rectangle


def _parts_and_rows(qtbot, model):
    """The parts list of ``model`` and its rows as {part: role / value text}."""
    from app.document import Document

    parts = PartsList(Document(model))
    qtbot.addWidget(parts)
    return parts, {parts.topLevelItem(i).text(0): parts.topLevelItem(i).text(1)
                   for i in range(parts.topLevelItemCount())}


def test_values_read_as_typed_with_prefixes(qtbot):

    model = Model(unit="mm", ground_plane=GroundPlane(0.1 + 0.2), conductors=(  # 0.30000000000000004
        Conductor("bar A", (Rectangle((0.0, 5.0), 2.0, 1.0),), "fixed", -9800.0),
        Conductor("float", (Circle((5.0, 5.0), 1.0),), "floating", charge_C_per_m=2e-9),
        Conductor("sheath", (Circle((5.0, 9.0), 1.0),), "reference")),
        dielectrics=(Dielectric("board", (Rectangle((0.0, 1.0), 20.0, 1.0),), 4.4),))
    parts, rows = _parts_and_rows(qtbot, model)
    assert rows["bar A"].startswith("\u22129.8 kV")
    assert rows["float"].startswith("floating, 2 nC/m")
    assert rows["sheath"].startswith("reference, 0 V")
    assert rows["board"] == "εr = 4.4"
    assert rows["ground plane"] == "y = 0.3 mm, 0 V"
    first = parts.topLevelItem(0)
    colour = first.icon(0).pixmap(12, 12).toImage().pixelColor(6, 6).name()
    assert colour == colours.display_colour(model.conductors[0], 0)


def test_shape_sizes_go_through_the_shared_formatter(qtbot):
    # ":g" wrote a 1010 mm bar as "1.01e+03" and a converted radius with its round-off
    from app.document import Document
    from solver import Ring

    model = Model(unit="mm", conductors=(
        Conductor("bar", (Rectangle((0.0, 5.0), 1010.0, 0.1 + 0.2, corner_radius=0.1 + 0.05),), "fixed", 1.0),
        Conductor("tube", (Ring((5.0, 5.0), 1234.5, 2345.6),), "reference"),
        Conductor("pair", (Circle((-5.0, 5.0), 1.0), Circle((-9.0, 5.0), 0.0025)), "fixed", 2.0)))
    parts = PartsList(Document(model))
    qtbot.addWidget(parts)
    rows = {parts.topLevelItem(i).text(0): parts.topLevelItem(i) for i in range(parts.topLevelItemCount())}
    assert rows["bar"].text(1).endswith("(rectangle 1010 x 0.3 mm, corners r = 0.15)")
    assert rows["tube"].text(1).endswith("(tube 1234.5/2345.6 mm)")
    pair = rows["pair"]
    assert [pair.child(k).text(0) for k in range(pair.childCount())] == ["circle r = 1 mm", "circle r = 0.0025 mm"]


def test_the_goal_target_is_the_unit_aware_entry(qtbot):
    from app.panels.goal_box import GoalBox
    from app.panels.quantity_edit import QuantityEdit

    box = GoalBox(length_unit="mil")
    qtbot.addWidget(box)
    box.add_figure("Z0_ohm")
    box.add_figure("equivalent_radius_m.wire")
    box.choose_figure("equivalent_radius_m.wire")
    assert isinstance(box.target, QuantityEdit) and box.target.unit_label.text() == "mil"
    assert "mil" in box.target.toolTip() and "SI prefixes" in box.target.toolTip()
    box.target.setText("2")
    assert box.target_si() == 2 * 25.4e-6
    box.choose_figure("Z0_ohm")
    box.target.setText("0.05 kohm")
    assert box.target_si() == 50.0 and box.target.unit_label.text() == "\u03a9"


def test_computed_potentials_read_to_sensible_figures(qtbot):
    """A potential computed rather than typed (400 kV x sqrt(2/3) for a phase to earth) reads
    "326.599 kV", not "326.598632 kV"; a typed one still reads as typed."""
    import math


    model = Model(unit="mm", conductors=(
        Conductor("L1", (Circle((0.0, 5.0), 1.0),), "fixed", 400e3 * math.sqrt(2 / 3)),
        Conductor("L2", (Circle((5.0, 5.0), 1.0),), "fixed", 3600 * math.sqrt(2)),
        Conductor("L3", (Circle((9.0, 5.0), 1.0),), "fixed", 150e3),
        Conductor("earth", (Circle((15.0, 5.0), 1.0),), "reference")))
    parts, rows = _parts_and_rows(qtbot, model)
    assert rows["L1"].startswith("326.599 kV")
    assert rows["L2"].startswith("5.09117 kV")
    assert rows["L3"].startswith("150 kV")
