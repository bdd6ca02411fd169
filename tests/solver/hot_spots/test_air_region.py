"""The largest field in the air around insulated conductors: real figure, or numerical zero."""

from solver import Circle, Conductor, Dielectric, GroundPlane, Model, Ring, analyse_hot_spots


def _insulated_wire(screened: bool) -> Model:
    conductors = [Conductor("core", (Circle((0.0, 5.0), 1.0),), potential_V=10_000.0)]
    plane = GroundPlane(0.0)
    if screened:
        conductors.append(Conductor("screen", (Ring((0.0, 5.0), 2.0, 2.3),), role="reference"))
        plane = None
    return Model(
        unit="mm",
        mesh_density="coarse",
        ground_plane=plane,
        conductors=tuple(conductors),
        dielectrics=(Dielectric("insulation", (Circle((0.0, 5.0), 2.0),), eps_r=2.3),),
    )


def test_air_outside_an_earthed_screen_is_negligible_and_has_no_error_figure():
    air = analyse_hot_spots(_insulated_wire(screened=True)).air_region
    assert air is not None and air.negligible
    assert air.estimated_relative_error is None


def test_air_around_bare_insulation_over_earth_is_a_real_figure():
    air = analyse_hot_spots(_insulated_wire(screened=False)).air_region
    assert air is not None and not air.negligible
    assert air.field_V_per_m > 1e5  # 10 kV across a few millimetres of air
    assert air.estimated_relative_error is not None and air.estimated_relative_error < 0.01
