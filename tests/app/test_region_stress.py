"""The Numbers tab lists the largest field inside each dielectric region (insulation stress).

Check value: a coaxial line with two concentric insulation layers. With the core at V, radii
a < c < b and permittivities e1 (inner) and e2 (outer), the field in the inner layer peaks at
the core surface, E = V / (a e1 (ln(c/a)/e1 + ln(b/c)/e2)), and in the outer layer at r = c,
E = V / (c e2 (...)) — series logarithmic layers, exact (any electromagnetics textbook, e.g.
D. K. Cheng, Field and Wave Electromagnetics, 1989).
"""

import math

import pytest

from app.jobs.results import compute_results
from app.panels.matrices_view import MatricesView
from solver import Circle, Conductor, Dielectric, Model, Ring


def _two_layer_coax() -> Model:
    return Model(
        unit="mm",
        conductors=(
            Conductor("core", (Circle((0.0, 0.0), 1.0),), potential_V=1000.0),
            Conductor("screen", (Ring((0.0, 0.0), 3.0, 3.3),), role="reference"),
        ),
        dielectrics=(
            Dielectric("inner layer", (Ring((0.0, 0.0), 1.0, 2.0),), eps_r=2.3),
            Dielectric("outer layer", (Ring((0.0, 0.0), 2.0, 3.0),), eps_r=5.0),
        ),
    )


def test_numbers_tab_shows_the_largest_field_in_each_layer(qtbot):
    view = MatricesView()
    qtbot.addWidget(view)
    results = compute_results(_two_layer_coax(), grid_points=0, n_field_lines=0)
    view.show_results(results)
    assert not view.regions.isHidden()
    rows = [view.regions.verticalHeaderItem(i).text() for i in range(view.regions.rowCount())]
    assert "inner layer" in rows and "outer layer" in rows

    a, c, b, e1, e2, v = 1e-3, 2e-3, 3e-3, 2.3, 5.0, 1000.0
    series = math.log(c / a) / e1 + math.log(b / c) / e2
    exact = {"inner layer": v / (a * e1 * series), "outer layer": v / (c * e2 * series)}
    heading = view.regions.horizontalHeaderItem(1).text().replace("\n", " ")  # e.g. "largest |E| (kV/m)"
    unit = heading.split("(")[-1].rstrip(")")
    factor = {"V/m": 1.0, "kV/m": 1e3, "MV/m": 1e6}[unit]  # one unit for the column, in its heading
    for i, name in enumerate(rows):
        if name in exact:
            shown = view.regions.item(i, 1).text()  # a number only, e.g. "383"
            assert float(shown) * factor == pytest.approx(exact[name], rel=5e-3)


def test_numbers_tab_hides_the_region_table_without_dielectrics(qtbot):
    view = MatricesView()
    qtbot.addWidget(view)
    model = Model(unit="mm", conductors=(
        Conductor("core", (Circle((0.0, 0.0), 1.0),), potential_V=1.0),
        Conductor("screen", (Ring((0.0, 0.0), 3.0, 3.3),), role="reference"),
    ))
    view.show_results(compute_results(model, grid_points=0, n_field_lines=0))
    assert view.regions.isHidden()
