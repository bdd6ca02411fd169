"""The parts list shows typed values through the shared formatter: SI prefixes, true minus
signs, no round-off of a unit conversion, and each conductor's identity colour as a swatch."""

from app import colours
from app.panels.parts_list import PartsList
from solver import Circle, Conductor, Dielectric, GroundPlane, Model, Rectangle


def test_values_read_as_typed_with_prefixes(qtbot):
    from app.document import Document

    model = Model(unit="mm", ground_plane=GroundPlane(0.1 + 0.2), conductors=(  # 0.30000000000000004
        Conductor("bar A", (Rectangle((0.0, 5.0), 2.0, 1.0),), "fixed", -9800.0),
        Conductor("float", (Circle((5.0, 5.0), 1.0),), "floating", charge_C_per_m=2e-9),
        Conductor("sheath", (Circle((5.0, 9.0), 1.0),), "reference")),
        dielectrics=(Dielectric("board", (Rectangle((0.0, 1.0), 20.0, 1.0),), 4.4),))
    parts = PartsList(Document(model))
    qtbot.addWidget(parts)
    rows = {parts.topLevelItem(i).text(0): parts.topLevelItem(i).text(1) for i in range(parts.topLevelItemCount())}
    assert rows["bar A"].startswith("\u22129.8 kV")
    assert rows["float"].startswith("floating, 2 nC/m")
    assert rows["sheath"].startswith("reference, 0 V")
    assert rows["board"] == "εr = 4.4"
    assert rows["ground plane"] == "y = 0.3 mm, 0 V"
    first = parts.topLevelItem(0)
    colour = first.icon(0).pixmap(12, 12).toImage().pixelColor(6, 6).name()
    assert colour == colours.display_colour(model.conductors[0], 0)
