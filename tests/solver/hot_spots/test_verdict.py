"""The one caution rule (solver.judge_peak): order of the checks, reasons, words, and "air" by material."""

import math

import pytest

import solver
from solver import (
    HIGH_VOLTAGE_CAUTION,
    AirConditions,
    Circle,
    Conductor,
    Dielectric,
    GroundPlane,
    Model,
    Rectangle,
    Ring,
    Strip,
    analyse_hot_spots,
    assess_margins,
    judge_peak,
    judge_solution,
    solve,
)
from solver.model.materials import (
    Medium,
    background_is_air,
    dielectric_of,
    medium_of_region,
    region_is_air,
)

AIR = Medium("background", None, 1.0, True)
XLPE = Medium("jacket", "XLPE", 2.3, False)


def _judge(peak, dv=50e3, medium=AIR, corner=False, corona=None, **kw):
    return judge_peak(peak, where="'c'", largest_potential_difference_V=dv, medium=medium, at_sharp_corner=corner,
                      corona_onset_field_V_per_m=corona, **kw)


def test_margins_grade_ample_thin_and_exceeded_against_air():
    # uniform-field strength of air across a 1 cm gap, 31.45 kV / 1 cm (Kuffel, Zaengl & Kuffel,
    # High Voltage Engineering Fundamentals, 2000); thin below 1.5 (a choice of this program)
    for peak, status in ((1.9e6, "ample"), (2.1e6, "thin"), (3.2e6, "exceeded")):
        v = _judge(peak, gap_m=0.01)
        assert v.status == status and v.margin == pytest.approx(3.1447e6 / peak, rel=1e-4)
        assert v.caution.endswith(HIGH_VOLTAGE_CAUTION)
        assert ("Expect corona or flashover" in v.caution) == (status == "exceeded")


def test_air_density_lowers_the_threshold():
    air = AirConditions.at_altitude(3000.0)
    v = _judge(2.3e6, air=air, gap_m=0.01)
    # p d scales with the relative density (Kuffel, Zaengl & Kuffel, 2000)
    delta = air.relative_air_density
    pd = 1.01325 * delta
    assert v.air_breakdown_field_V_per_m == pytest.approx((6.72 * pd**0.5 + 24.36 * pd) * 1e5, rel=1e-9)
    assert v.status == "exceeded"  # 2.3 MV/m is above the 2.27 MV/m of 1 cm of air at 3000 m


def test_non_finite_values_are_not_assessed():
    for peak, dv in ((math.nan, 1e4), (math.inf, 1e4), (1e6, math.nan)):
        v = _judge(peak, dv=dv)
        assert v.status == "not assessed" and v.margin is None
        assert v.reason.startswith("non-finite value")


def test_low_voltage_models_get_no_breakdown_caution():
    # a PCB pair at +/-0.5 V with its mesh-made corner peak (issue: a nine-line caution)
    v = _judge(5e5, dv=1.0, corner=True)
    assert v.status == "not assessed" and v.caution == "" and v.reason.startswith("low voltage")
    assert "a choice of this program" in v.reason
    assert _judge(5e5, dv=solver.LOW_VOLTAGE_THRESHOLD_V).caution != ""


def test_sharp_corner_peaks_are_never_graded():
    # a 500 V strip edge (issue: "4264 % ... expect corona or flashover")
    v = _judge(1.3e8, dv=500.0, corner=True)
    assert v.status == "not assessed" and v.air_breakdown_margin is None
    assert v.reason.startswith("at a sharp corner: the 2-D peak is mesh-made")
    assert "flashover" not in v.caution and v.caution.endswith(HIGH_VOLTAGE_CAUTION)


def test_peaks_in_insulation_are_not_judged_against_air():
    v = _judge(5e6, medium=XLPE)
    assert v.status == "not assessed" and v.reason.startswith("not in air: inside 'jacket' (XLPE, eps_r 2.3)")


def test_a_rounded_conductor_within_its_corona_onset_is_not_told_to_expect_flashover():
    # the rounded 150 kV bar: peak above 3 MV/m, Peek onset 1.47 times the peak
    peak = 3.2e6
    v = _judge(peak, dv=150e3, corona=1.47 * peak, corona_radius_basis="round conductor")
    assert v.air_breakdown_margin < 1 and v.margin == pytest.approx(1.47)
    assert v.status == "thin" and "flashover" not in v.caution.lower()
    assert v.deciding == "corona onset"


def test_a_radius_from_the_outline_curvature_never_makes_the_verdict_more_lenient_than_air():
    # Peek's formula (F. W. Peek, Dielectric Phenomena in High-Voltage Engineering, 1929) is made
    # for round conductors; with only a local radius of curvature the smaller margin decides, so
    # the status agrees with every margin the tables show.
    local = solver.hot_spots.air_conditions.LOCAL_RADIUS_BASIS
    air_strength_1cm = 3.1447e6  # 1 cm gap (Kuffel, Zaengl & Kuffel, 2000), as in the first test
    peak = air_strength_1cm / 1.48  # the 100-bar bus's air margin: 1.48, corona margin 2.54
    v = _judge(peak, dv=150e3, corona=2.54 * peak, corona_radius_basis=local, gap_m=0.01)
    assert v.deciding == "air breakdown" and v.margin == pytest.approx(1.48, rel=1e-4)
    assert v.status == "thin" and v.corona_onset_margin == pytest.approx(2.54)
    assert "the uniform-field strength of air" in v.headline and "does not decide" in v.caution
    # where the curvature's corona margin is the smaller one, it decides (and no note is needed)
    v = _judge(peak, dv=150e3, corona=1.2 * peak, corona_radius_basis=local, gap_m=0.01)
    assert v.deciding == "corona onset" and v.margin == pytest.approx(1.2) and v.status == "thin"
    assert "does not decide" not in v.caution
    # on a round conductor Peek's onset decides even above the uniform-field strength
    v = _judge(peak, dv=150e3, corona=2.54 * peak, corona_radius_basis="round conductor", gap_m=0.01)
    assert v.deciding == "corona onset" and v.status == "ample"
    # without a radius: air breakdown
    assert _judge(peak, dv=150e3, gap_m=0.01).deciding == "air breakdown"
    # not graded: nothing decided
    assert _judge(peak, dv=150e3, corner=True).deciding is None


def test_the_sweep_figure_margin_is_the_deciding_margin(tmp_path):
    # the margin a sweep or goal search reads is the one the status was graded on
    from solver.studies.figures import figure_function

    bar = Model(unit="mm", ground_plane=GroundPlane(0.0), conductors=(
        Conductor("bar", (Rectangle((0.0, 120.0), 60.0, 40.0, corner_radius=5.0),), potential_V=8.0e4),))
    figures = figure_function(("margin.bar",))(bar)
    report = assess_margins(bar, analyse_hot_spots(bar).hot_spots)
    (m,) = report.margins
    assert m.deciding_margin == "air breakdown" and m.margin == m.air_breakdown_margin < m.corona_onset_margin
    assert figures["margin.bar"] == pytest.approx(m.margin, rel=1e-6)


def test_the_model_verdict_is_the_most_severe_and_ample_still_carries_the_full_caution():
    verdicts = [_judge(1e6), _judge(2.0e6), _judge(9e9, corner=True)]
    summary = solver.summarise_verdicts(verdicts)
    assert summary.status == "thin" and summary.alarming
    calm = solver.summarise_verdicts([_judge(1e6)])
    assert calm.status == "ample" and calm.caution.endswith(HIGH_VOLTAGE_CAUTION) and not calm.alarming
    assert calm.headline.endswith("at operating voltage.") and "check again" in calm.caution
    quiet = solver.summarise_verdicts([_judge(1e6, dv=5.0)])
    assert quiet.caution == "" and not quiet.alarming


# ---- air, by material ------------------------------------------------------------------------
def test_air_is_decided_by_material_not_by_comparing_eps_r_with_one():
    ring = (Ring((0, 0), 1.0, 2.0),)
    assert region_is_air(dielectric_of("gap", ring, "air"))          # library air, eps_r 1.0006
    assert region_is_air(Dielectric("air", ring, 1.0))                # named air, no material
    assert not region_is_air(dielectric_of("jacket", ring, "XLPE"))
    assert not region_is_air(dielectric_of("gap", ring, "air", eps_r=4.0))  # says air, is not
    assert background_is_air(Model(background_eps_r=1.0006))
    assert not background_is_air(Model(background_eps_r=2.2))
    oil = Model(background_eps_r=2.2, dielectrics=(dielectric_of("gap", ring, "air"),))
    assert medium_of_region(oil, 0).is_air and not medium_of_region(oil, 1).is_air


def _coax(with_air_region: bool) -> Model:
    # 1 mm wire at 10 kV inside a 10 mm tube (issue 10 item 9)
    regions = (dielectric_of("gap", (Ring((0, 0), 1.0, 9.0),), "air"),) if with_air_region else ()
    return Model(unit="mm", mesh_density="coarse", dielectrics=regions, conductors=(
        Conductor("wire", (Circle((0, 0), 1.0),), potential_V=10e3),
        Conductor("tube", (Ring((0, 0), 9.0, 10.0),), role="reference")))


def test_a_gap_drawn_as_library_air_gets_the_same_verdict_as_an_empty_gap():
    empty, drawn = (judge_solution(solve(_coax(flag))) for flag in (False, True))
    wire_empty, wire_drawn = empty.verdicts[0], drawn.verdicts[0]
    assert wire_empty.status == wire_drawn.status == "thin"  # Peek onset of a 1 mm wire: 5.9 MV/m
    assert wire_empty.reason == wire_drawn.reason and wire_empty.caution == wire_drawn.caution
    assert wire_drawn.margin == pytest.approx(wire_empty.margin, rel=2e-2)
    assert (empty.status, empty.headline) == (drawn.status, drawn.headline)


def test_the_refined_peaks_of_a_gap_drawn_as_air_are_graded_too():
    model = _coax(True)
    report = analyse_hot_spots(model)
    assert report.hot_spots[0].medium.is_air and report.hot_spots[0].medium.region == "gap"
    margins = assess_margins(report.solved_model, report.hot_spots, air_region=report.air_region)
    assert margins.margins[0].status == "thin" and margins.verdict.status == "thin"


def test_a_bar_in_insulation_is_not_in_air_and_the_air_outside_is_judged():
    model = Model(unit="mm", ground_plane=GroundPlane(0.0), mesh_density="coarse", conductors=(
        Conductor("core", (Circle((0, 50), 5.0),), potential_V=60e3),), dielectrics=(
        dielectric_of("jacket", (Ring((0, 50), 5.0, 9.0),), "XLPE"),))
    summary = judge_solution(solve(model))
    core, outside = summary.verdicts
    assert core.status == "not assessed" and core.reason.startswith("not in air: inside 'jacket' (XLPE")
    assert outside.where == "the surrounding air" and outside.graded


def test_a_strip_at_low_voltage_has_no_caution():
    model = Model(unit="mm", ground_plane=GroundPlane(0.0), mesh_density="coarse", conductors=(
        Conductor("trace", (Strip(((-1, 0.5), (1, 0.5))),), potential_V=0.5),
        Conductor("pad", (Rectangle((5, 1), 2, 0.1),), potential_V=-0.5)))
    summary = judge_solution(solve(model))
    assert summary.caution == "" and not summary.alarming
    assert all(v.reason.startswith("low voltage") for v in summary.verdicts)
