"""Margins: statuses, singular peaks, input checks, JSON form, and SAFETY.md agreeing with the code."""

import json
import re
from dataclasses import dataclass
from pathlib import Path

import pytest

from solver import Circle, Conductor, Model, Rectangle
from solver.errors import InvalidModelError
from solver.hot_spots.air_conditions import (
    HIGH_VOLTAGE_CAUTION,
    THIN_MARGIN,
    AirConditions,
    peek_corona_onset_field_V_per_m,
    pressure_at_altitude_Pa,
    relative_air_density,
    round_radius_m,
)
from solver.hot_spots.air_strength import air_strength
from solver.hot_spots.margins import assess_margins
from solver.model.materials import Medium

ROOT = Path(__file__).resolve().parents[3]


@dataclass(frozen=True)
class _Spot:  # the fields assess_margins reads from a HotSpot
    conductor: str
    field_V_per_m: float
    singular: bool = False
    estimated_relative_error: float | None = 1e-4
    local_radius_of_curvature_m: float | None = None
    medium: Medium | None = None
    gap_m: float | None = None


MODEL = Model(unit="mm", conductors=(
    Conductor("wire", (Circle((0, 0), 5.0),), potential_V=1e5),
    Conductor("bar", (Rectangle((50, 0), 20, 10, 2.0),), role="reference"),
))


def test_round_radius_only_for_circles_and_rings():
    assert round_radius_m(MODEL, "wire") == pytest.approx(5e-3)
    assert round_radius_m(MODEL, "bar") is None


def test_a_round_conductor_is_graded_by_its_corona_onset():
    # 5 mm smooth wire: Peek's onset (about 4.3 MV/m) lies above 3 MV/m, and it is the onset --
    # not the uniform-field strength -- that governs a round conductor (Peek 1929).
    onset = peek_corona_onset_field_V_per_m(5e-3)
    assert onset > 3e6
    for peak, status in ((2.5e6, "ample"), (3.5e6, "thin"), (4.5e6, "exceeded")):
        m = assess_margins(MODEL, [_Spot("wire", peak)]).margins[0]
        assert m.status == status
        # no gap known: the long-gap limit of the uniform-field relation (Kuffel, Zaengl & Kuffel, 2000)
        assert m.air_breakdown_margin == pytest.approx(air_strength(None).field_V_per_m / peak)
        assert m.corona_onset_margin == pytest.approx(onset / peak)
        assert m.caution.endswith(HIGH_VOLTAGE_CAUTION)  # 100 kV: the full caution always applies
        assert ("expect corona or flashover" in m.caution.lower()) == (status == "exceeded")


def test_air_margin_above_one_but_corona_margin_above_one_is_not_told_to_expect_flashover():
    # 3.5 MV/m exceeds 3 MV/m, but the 5 mm wire's Peek onset is 4.3 MV/m: corona margin 1.23.
    m = assess_margins(MODEL, [_Spot("wire", 3.5e6)]).margins[0]
    assert m.air_breakdown_margin < 1 < m.corona_onset_margin
    assert m.status == "thin" and "flashover" not in m.caution


def test_a_conductor_without_corona_radius_is_graded_by_the_strength_of_air():
    # no gap known: 2.47 MV/m, the long-gap limit of Kuffel, Zaengl & Kuffel (2000)
    for peak, status in ((1.0e6, "ample"), (2.0e6, "thin"), (2.6e6, "exceeded")):
        m = assess_margins(MODEL, [_Spot("bar", peak)]).margins[0]
        assert m.corona_onset_margin is None and m.status == status
        assert "uniform-field strength of air" in m.reason


def test_the_strength_of_air_depends_on_the_gap_and_the_surface_of_a_flat_face():
    # Kuffel, Zaengl & Kuffel (2000): 3.14 MV/m across 1 cm, 4.61 MV/m across 1 mm at 1 atm; the same
    # 3.2 MV/m peak is exceeded across a 1 m gap and only thin across 1 mm.
    near = assess_margins(MODEL, [_Spot("bar", 3.2e6, gap_m=1e-3)]).margins[0]
    far = assess_margins(MODEL, [_Spot("bar", 3.2e6, gap_m=1.0)]).margins[0]
    assert near.air_breakdown_field_V_per_m == pytest.approx(4.607e6, rel=1e-3) and near.gap_m == 1e-3
    assert near.status == "thin" and far.status == "exceeded"
    # the surface factor lowers the strength of a flat face too, not only Peek's onset (common practice)
    rough = assess_margins(MODEL, [_Spot("bar", 3.2e6, gap_m=1e-3)], AirConditions(surface_factor=0.8)).margins[0]
    assert rough.air_breakdown_field_V_per_m == pytest.approx(0.8 * near.air_breakdown_field_V_per_m)


def test_singular_peak_is_not_assessed_and_cautioned():
    m = assess_margins(MODEL, [_Spot("bar", 9e9, singular=True)]).margins[0]
    assert m.status == "not assessed" and m.air_breakdown_margin is None and m.corona_onset_margin is None
    assert m.reason.startswith("at a sharp corner: the 2-D peak is mesh-made")
    assert "corner radius" in m.caution and HIGH_VOLTAGE_CAUTION in m.caution


def test_local_curvature_feeds_peek_for_non_round_conductors():
    m = assess_margins(MODEL, [_Spot("bar", 1e6, local_radius_of_curvature_m=2e-3)]).margins[0]
    assert m.corona_radius_m == 2e-3 and "approximation" in m.corona_radius_basis
    assert m.corona_onset_field_V_per_m == pytest.approx(peek_corona_onset_field_V_per_m(2e-3))
    flat = assess_margins(MODEL, [_Spot("bar", 1e6)]).margins[0]
    assert flat.corona_onset_field_V_per_m is None and flat.corona_onset_margin is None


def test_zero_field_gives_an_infinite_margin_and_clean_json():
    report = assess_margins(MODEL, [_Spot("wire", 0.0), _Spot("bar", 2.9e6)], AirConditions.at_pressure(95e3, 303.15))
    assert report.margins[0].status == "ample" and report.needs_caution
    text = json.dumps(report.as_dict(), allow_nan=False)
    data = json.loads(text)
    assert data["conductors"][0]["air_breakdown_margin"] is None
    assert data["thin_margin_threshold"] == THIN_MARGIN and data["caution"].endswith(HIGH_VOLTAGE_CAUTION)
    assert data["status"] == "exceeded" and data["caution"].startswith("CAUTION: the peak surface field on 'bar'")
    assert data["relative_air_density"] == pytest.approx(relative_air_density(95e3, 303.15))


def test_inputs_are_checked():
    with pytest.raises(InvalidModelError, match="Altitude"):
        pressure_at_altitude_Pa(20_000.0)
    with pytest.raises(InvalidModelError, match="Surface factor"):
        peek_corona_onset_field_V_per_m(0.01, surface_factor=1.2)
    with pytest.raises(InvalidModelError, match="Peek form"):
        peek_corona_onset_field_V_per_m(0.01, form="sphere")
    with pytest.raises(InvalidModelError, match="positive"):
        relative_air_density(-1.0)


def _words(text: str) -> str:
    return " ".join(text.split())


def test_safety_file_repeats_the_caution_and_the_thresholds():
    safety = _words((ROOT / "SAFETY.md").read_text(encoding="utf-8"))
    assert _words(HIGH_VOLTAGE_CAUTION) in safety
    for needed in ("does not determine clearances, creepage distances or insulation coordination",
                   "qualified persons only", "Peek", "3 MV/m", "ISO 2533", "below 1.5"):
        assert needed in safety
    assert re.search(r"local codes, applicable standards and licensed or qualified practice prevail", safety, re.I)


def test_peak_in_a_dielectric_is_not_judged_against_air():
    oil = Medium("tank", "transformer oil", 2.2, False)
    m = assess_margins(MODEL, [_Spot("wire", 1e6, medium=oil)]).margins[0]
    assert m.status == "not assessed" and m.air_breakdown_margin is None
    assert m.reason.startswith("not in air: inside 'tank' (transformer oil, eps_r 2.2)")


def test_inside_of_a_tube_has_no_corona_radius():
    from solver import Ring

    model = Model(unit="mm", conductors=(Conductor("tube", (Ring((0, 0), 3.0, 4.0),), role="reference"),))
    assert round_radius_m(model, "tube") == pytest.approx(4e-3)
    assert round_radius_m(model, "tube", (3e-3, 0.0)) is None
    assert round_radius_m(model, "tube", (0.0, 4e-3)) == pytest.approx(4e-3)
