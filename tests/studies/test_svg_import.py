"""SVG import: rounded bars from arc paths, even-odd holes, plain errors."""

import numpy as np
import pytest

from solver import (
    InvalidGeometryError,
    ProjectFileError,
    Rectangle,
    load_project,
    solve,
)
from solver.io.svg import read_svg

LAYERS = {"L1": "conductor:L1:9800", "L2": "conductor:L2:-4900", "ENCLOSURE": "conductor:enclosure:reference"}


def test_svg_busbars_read_exactly_and_solve_like_the_hand_built_model():
    hand = load_project("sample_geometries/busbar_enclosure.json")
    drawn = read_svg("sample_geometries/busbar_fillets.svg", LAYERS)
    assert drawn.conductor("L1").shapes == (Rectangle((-40.0, 0.0), 10.0, 60.0, 3.0),)
    assert len(drawn.conductor("enclosure").shapes[0].holes) == 1
    np.testing.assert_allclose(solve(drawn, estimate_error=False).capacitance_maxwell_F_per_m,
                               solve(hand, estimate_error=False).capacitance_maxwell_F_per_m, rtol=1e-12)


def test_svg_circle_and_errors(tmp_path):
    path = tmp_path / "w.svg"
    path.write_text('<svg xmlns="http://www.w3.org/2000/svg" viewBox="0 0 10 10">'
                    '<g id="W"><circle cx="5" cy="5" r="2"/></g>'
                    '<g id="E"><path id="arc" d="M 1 1 A 2 1 0 0 1 4 1 Z"/></g>'
                    '<g id="O"><path id="loose" d="M 1 1 L 4 1 L 4 4"/></g></svg>')
    model = read_svg(path, {"W": "conductor:w:1", "E": "ignore", "O": "ignore"}, unit="um")
    (c,) = model.conductor("w").shapes
    assert model.unit == "um" and c.kind == "circle" and c.radius == pytest.approx(2.0) and c.center[1] == pytest.approx(-5.0)
    with pytest.raises(InvalidGeometryError, match="'arc' in layer 'E'.*elliptical"):
        read_svg(path, {"W": "ignore", "E": "conductor:e", "O": "ignore"})
    with pytest.raises(InvalidGeometryError, match="'loose' in layer 'O'.*open"):
        read_svg(path, {"W": "ignore", "E": "ignore", "O": "conductor:o"})
    with pytest.raises(ProjectFileError, match="'O'.*not mapped"):
        read_svg(path, {"W": "ignore", "E": "ignore"})
