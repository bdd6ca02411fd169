"""The largest corner radius a conductor can take: rounding accepts it and refuses a little more
(geometry only; the wall thickness of the enclosure is the sample's own, from its file)."""

import pytest

import solver
from solver import Conductor, Model, Rectangle
from solver.errors import InvalidGeometryError
from solver.hot_spots.corner_limits import largest_corner_radius_m


def test_a_bar_takes_half_its_smaller_side():
    m = Model(unit="mm", conductors=(Conductor("bar", (Rectangle((0, 0), 10, 2),)),))
    assert largest_corner_radius_m(m, "bar") == pytest.approx(1e-3)


def test_an_enclosure_takes_about_half_its_wall_not_half_its_box():
    model = solver.load_project(solver.sample_path("busbar_enclosure.json"))
    x0, y0, x1, y1 = model.conductor("enclosure").shapes[0].bounds()
    box_half_m = 0.5 * min(x1 - x0, y1 - y0) * model.metres_per_unit
    r = largest_corner_radius_m(model, "enclosure")
    assert 0 < r < 0.1 * box_half_m  # the wall, not the box, sets the limit
    solver.round_sharp_corners(model, r, ["enclosure"], replace_radius=True)  # accepted
    with pytest.raises(InvalidGeometryError):
        solver.round_sharp_corners(model, 1.05 * r, ["enclosure"], replace_radius=True)  # 1 % tolerance: refused


def test_an_unknown_conductor_is_named():
    m = Model(unit="mm", conductors=(Conductor("bar", (Rectangle((0, 0), 10, 2),)),))
    with pytest.raises(KeyError):
        largest_corner_radius_m(m, "nope")
