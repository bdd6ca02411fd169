"""Peak surface fields: corner exponents, rounded corners, an exact peak, the high-voltage sample.

Sources
-------
- Edge condition: near a conducting wedge whose field region opens by beta, the surface charge
  density is sigma = c1 r^a + c2 r^(a + pi/beta) + ... with a = pi/beta - 1 (the potential
  near the wedge is a sum of r^(n pi/beta) sin(n pi theta/beta)); J. D. Jackson, Classical
  Electrodynamics, 3rd ed., Wiley, 1999, sec. 2.11. By the same local analysis the peak field
  on a corner rounded to a small radius rho grows like rho^(pi/beta - 1) as rho -> 0.
- Round wire of radius a, axis at height h over a grounded plane, potential V: the image line
  charges sit at +-d, d = sqrt(h^2 - a^2), and the largest surface field (at the point nearest
  the plane) is E = V d / (a (h - a) arccosh(h / a)) (method of images; e.g. W. R. Smythe,
  Static and Dynamic Electricity, 3rd ed., 1968, from memory; derived in the test).
"""

import math
from pathlib import Path

import numpy as np
import pytest
from scipy.optimize import minimize_scalar

import solver
from solver import Circle, Conductor, GroundPlane, MeshSettings, Model, Polygon, Rectangle, Ring, Strip, solve
from solver.hot_spots.analysis import analyse_hot_spots
from solver.hot_spots.corner_sweep import peak_field_vs_corner_radius
from solver.hot_spots.margins import assess_margins
from solver.io.project_file import load_project

SAMPLE = Path(__file__).resolve().parents[2] / "sample_geometries" / "hv_electrode_over_earth.json"


def _fitted_exponent(model: Model, apex: np.ndarray, beta: float, level: float = 1.0) -> float:
    """Fit panel averages of c1 r^a + c2 r^(a + pi/beta) (a free) along the sides at ``apex``."""
    sol = solve(model, settings=MeshSettings(level), estimate_error=False)
    mesh, sigma = sol.mesh, sol.surface_charge_density_C_per_m2
    on_first = mesh.conductor_index == 0
    rel = mesh.midpoints - apex
    along = np.abs(rel[:, 0] * mesh.tangents[:, 1] - rel[:, 1] * mesh.tangents[:, 0]) < 1e-9
    ra, rb = np.hypot(*(mesh.starts - apex).T), np.hypot(*(mesh.ends - apex).T)
    lo, hi = np.minimum(ra, rb), np.maximum(ra, rb)
    sel = on_first & along & (hi < 0.05 * hi[on_first & along].max())
    lo, hi, y = lo[sel], hi[sel], sigma[sel]
    assert sel.sum() > 30

    def average(e):
        return (hi ** (e + 1) - lo ** (e + 1)) / ((e + 1) * (hi - lo))

    def misfit(a):
        basis = np.column_stack([average(a), average(a + math.pi / beta)]) / np.abs(y)[:, None]
        coef, *_ = np.linalg.lstsq(basis, np.sign(y), rcond=None)
        return float(np.sum((basis @ coef - np.sign(y)) ** 2))

    return minimize_scalar(misfit, bounds=(-0.95, 0.5), method="bounded", options={"xatol": 1e-7}).x


@pytest.mark.parametrize("apex_angle_deg", [30.0, 60.0, 120.0, 150.0])
def test_wedge_exponent_matches_edge_condition(apex_angle_deg):  # Jackson 1999, sec. 2.11
    alpha = math.radians(apex_angle_deg)
    beta = 2 * math.pi - alpha  # the field region's opening at the apex
    c, s = math.cos(alpha / 2), math.sin(alpha / 2)
    model = Model(unit="m", conductors=(
        Conductor("wedge", (Polygon(((0.0, 0.0), (c, s), (c, -s))),), potential_V=1.0),
        Conductor("far ring", (Ring((0.5, 0.0), 6.0, 6.5),), role="reference")))
    fitted = _fitted_exponent(model, np.zeros(2), beta)
    assert fitted == pytest.approx(math.pi / beta - 1, abs=1e-3)


def test_strip_edge_exponent_is_minus_one_half():  # Jackson 1999, sec. 2.11: beta = 2 pi
    model = Model(unit="m", conductors=(
        Conductor("strip", (Strip(((0.0, 0.0), (1.0, 0.0))),), potential_V=1.0),
        Conductor("far ring", (Ring((0.5, 0.0), 6.0, 6.5),), role="reference")))
    assert _fitted_exponent(model, np.zeros(2), 2 * math.pi) == pytest.approx(-0.5, abs=1e-3)


def test_sharp_corner_is_reported_singular_with_its_exponent():  # Jackson 1999, sec. 2.11
    bar = Model(unit="mm", ground_plane=GroundPlane(0.0), conductors=(
        Conductor("bar", (Rectangle((0.0, 30.0), 40.0, 10.0),), potential_V=1e4),))
    spot = analyse_hot_spots(bar).for_conductor("bar")
    assert spot.singular and spot.estimated_relative_error is None and not spot.converged
    assert spot.corner_exponent == pytest.approx(-1 / 3, abs=1e-9)
    # The value is a property of the mesh, not of the part: it keeps growing.
    assert np.all(np.diff(spot.peak_history_V_per_m) > 0)
    assert spot.peak_history_V_per_m[-1] > 3 * spot.peak_history_V_per_m[0]


def _rounded_bar(radius_mm: float) -> Model:
    return Model(unit="mm", ground_plane=GroundPlane(0.0), conductors=(
        Conductor("bar", (Rectangle((0.0, 30.0), 40.0, 10.0, radius_mm),), potential_V=1e4),))


def test_rounded_corner_peak_converges_at_a_fitted_rate():
    model = _rounded_bar(0.5)
    levels = np.array([0.5, 1.0, 2.0, 4.0])
    peaks = np.array([solve(model, settings=MeshSettings(lv), estimate_error=False).peak_surface_fields[0].field_V_per_m
                      for lv in levels])
    changes = np.abs(np.diff(peaks)) / peaks[-1]
    rate = -np.polyfit(np.log(levels[:-1]), np.log(changes), 1)[0]
    assert rate > 1.5  # the change per doubling falls at least like h^1.5
    assert changes[-1] < 1e-4


def test_peak_falls_as_corner_radius_grows_with_the_corner_law():  # Jackson 1999, sec. 2.11
    sweep = peak_field_vs_corner_radius(_rounded_bar(0.0), "bar", [0.05e-3, 0.1e-3, 0.5e-3, 2e-3, 5e-3])
    assert np.all(np.diff(sweep.peak_field_V_per_m) < 0)
    assert np.all(sweep.estimated_relative_error < 0.01)
    small = np.log(sweep.peak_field_V_per_m[1] / sweep.peak_field_V_per_m[0]) / math.log(2.0)
    assert small == pytest.approx(-1 / 3, abs=0.02)  # right-angle corner: pi/beta - 1 = -1/3


@pytest.mark.parametrize("a_mm, h_mm", [(5.0, 20.0), (2.0, 100.0)])
def test_wire_over_ground_peak_and_honest_error(a_mm, h_mm):  # method of images (Smythe 1968)
    v = 1e5
    a, h = a_mm * 1e-3, h_mm * 1e-3
    d = math.sqrt(h * h - a * a)
    exact = v * d / (a * (h - a) * math.acosh(h / a))
    model = Model(unit="mm", ground_plane=GroundPlane(0.0), mesh_density="coarse", conductors=(
        Conductor("wire", (Circle((0.0, h_mm), a_mm),), potential_V=v),))
    spot = analyse_hot_spots(model).for_conductor("wire")
    true_error = abs(spot.field_V_per_m / exact - 1)
    assert true_error < 1e-4
    assert spot.estimated_relative_error == pytest.approx(true_error, rel=0.2)  # Richardson is honest
    assert spot.observed_order == pytest.approx(2.0, abs=0.1)
    assert spot.location_m[1] == pytest.approx(h - a, rel=1e-4)
    assert spot.enhancement_factor == pytest.approx(exact / (v / (h - a)), rel=1e-4)


@pytest.mark.slow  # hot-spot refinement and a radius sweep on a sample
def test_high_voltage_sample_peak_margins_and_sweep():
    model = load_project(SAMPLE)
    report = analyse_hot_spots(model, target_relative_error=0.01)
    spot = report.for_conductor("electrode")
    assert not spot.singular and spot.converged and spot.estimated_relative_error < 0.01
    # A finer, independent mesh agrees within the estimate (plus round-off level slack).
    finer = solve(model, settings=MeshSettings(2 * report.levels[-1]), estimate_error=False)
    fine_peak = finer.peak_surface_fields[0].field_V_per_m
    assert abs(fine_peak / spot.field_V_per_m - 1) <= max(3 * spot.estimated_relative_error, 1e-5)
    assert spot.local_radius_of_curvature_m == pytest.approx(0.03, rel=1e-3)
    margins = assess_margins(model, report.hot_spots).margins[0]
    # uniform-field strength of air for the peak's gap (Kuffel, Zaengl & Kuffel 2000), standard air
    strength = solver.air_strength(margins.gap_m, 1.0).field_V_per_m
    assert margins.air_breakdown_margin == pytest.approx(strength / spot.field_V_per_m)
    assert margins.corona_onset_margin is not None and margins.corona_onset_margin > 1
    sweep = peak_field_vs_corner_radius(model, "electrode", [0.01, 0.02, 0.03, 0.05])
    assert np.all(np.diff(sweep.peak_field_V_per_m) < 0)
    assert sweep.peak_field_V_per_m[2] == pytest.approx(spot.field_V_per_m, rel=0.01)


def test_air_field_outside_the_insulation_of_a_coated_core():
    # Concentric layers (Gauss's law; common practice, e.g. E. Kuffel, W. S. Zaengl and J. Kuffel,
    # High Voltage Engineering: Fundamentals, 2nd ed., 2000, from memory): core radius a,
    # insulation to b with eps_r, air to the earthed tube at c. With D = ln(b/a)/eps_r + ln(c/b):
    # field in the insulation at the core V / (a eps_r D), in the air at the insulation V / (b D).
    from solver import Dielectric

    a, b, c, eps_r, v = 1.0, 2.0, 5.0, 4.0, 1e4
    model = Model(unit="mm", mesh_density="coarse", conductors=(
        Conductor("core", (Circle((0.0, 0.0), a),), potential_V=v),
        Conductor("tube", (Ring((0.0, 0.0), c, c + 1.0),), role="reference")),
        dielectrics=(Dielectric("insulation", (Ring((0.0, 0.0), a, b),), eps_r),))
    d = math.log(b / a) / eps_r + math.log(c / b)
    report = analyse_hot_spots(model)
    core = report.for_conductor("core")
    assert core.medium_eps_r == eps_r
    assert core.field_V_per_m == pytest.approx(v / (a * 1e-3 * eps_r * d), rel=1e-4)
    air = report.air_region
    assert air is not None and air.where == "interface"
    assert air.field_V_per_m == pytest.approx(v / (b * 1e-3 * d), rel=1e-4)
    assert math.hypot(*air.location_m) == pytest.approx(b * 1e-3, rel=1e-3)
    assert air.estimated_relative_error < 1e-3
    margins = assess_margins(model, report.hot_spots, air_region=air)
    assert margins.margins[0].status == "not assessed"  # the core's surface is in the insulation
    # no gap for the air around insulation: the long-gap limit of the uniform-field relation
    # (Kuffel, Zaengl & Kuffel, High Voltage Engineering Fundamentals, 2000), 2.47 MV/m
    assert margins.air_region_margin == pytest.approx(2.4683e6 / air.field_V_per_m, rel=1e-4)
    assert margins.air_region_status == "exceeded" and margins.needs_caution
