"""Edgewise solver: 2-D electrostatics of conductor cross-sections by the boundary-element method.

Pure numerics (numpy, scipy, shapely). Data flows one way:
Model -> PanelMesh -> Solution -> figures (capacitance matrices, fields, peaks, radii).

>>> from solver import Model, Conductor, Circle, Ring, solve
>>> coax = Model(unit="mm", conductors=(
...     Conductor("inner", (Circle((0, 0), 1.0),), role="fixed", potential_V=1.0),
...     Conductor("shield", (Ring((0, 0), 3.5, 4.0),), role="reference")))
>>> round(float(solve(coax).capacitance_maxwell_F_per_m[0, 0]) * 1e12, 2)  # pF/m
44.41
"""

from solver.bem.capacitance import maxwell_matrix_problems, mutual_from_maxwell
from solver.bem.geometry_update import GeometryEditSolver
from solver.bem.solution import PeakField, RegionPeakField, Solution
from solver.bem.solve import solve, solve_mesh, with_error_estimate
from solver.constants import EPSILON_0_F_PER_M, MU_0_H_PER_M, SPEED_OF_LIGHT_M_PER_S
from solver.cross_check import (
    CrossCheck,
    check_each_equivalent_radius,
    check_equivalent_radius,
    green_function,
    robin_constant,
)
from solver.errors import (
    InvalidGeometryError,
    InvalidModelError,
    NoReferenceError,
    ProjectFileError,
    SolveCancelled,
    SolverError,
    SuperpositionError,
)
from solver.figures.bundles import BundleComparison, bundle_equivalent_radius_formula_m, compare_bundle
from solver.figures.end_effects import LengthCheck, check_part_length, end_field_rise_estimate
from solver.figures.equilibrium import EquilibriumCharge, equilibrium_charge, equivalent_radius_m
from solver.figures.field_lines import FieldLine, GridField, evaluate_at_points, evaluate_on_grid, trace_field_lines
from solver.figures.layers import truncated_layers, truncation_error, widen_until_converged
from solver.figures.transmission_line import TransmissionLineFigures, figures_from_matrices, transmission_line_figures
from solver.hot_spots.air_conditions import (
    HIGH_VOLTAGE_CAUTION,
    THIN_MARGIN,
    AirConditions,
    air_breakdown_field_V_per_m,
    air_conditions_of,
    peek_corona_onset_field_V_per_m,
    pressure_at_altitude_Pa,
    relative_air_density,
    relative_air_density_at_altitude,
    with_air_conditions,
)
from solver.hot_spots.air_region import AirRegionPeak
from solver.hot_spots.air_strength import AirStrength, air_strength, uniform_field_breakdown_voltage_V
from solver.hot_spots.analysis import analyse_hot_spots, richardson_estimate
from solver.hot_spots.corner_rounding import conductors_with_sharp_corners, round_sharp_corners
from solver.hot_spots.corner_sweep import CornerRadiusSweep, peak_field_vs_corner_radius
from solver.hot_spots.curvature import local_radius_of_curvature_m, signed_radius_of_curvature_m
from solver.hot_spots.hot_spot import HotSpot, HotSpotReport
from solver.hot_spots.margins import ConductorMargin, MarginReport, assess_margins
from solver.hot_spots.verdict import (
    LOW_VOLTAGE_THRESHOLD_V,
    STATUS_WORDS,
    CautionVerdict,
    PeakVerdict,
    judge_peak,
    judge_solution,
    largest_potential_difference_V,
    solution_potential_difference_V,
    summarise_verdicts,
)
from solver.hot_spots.voltage_basis import (
    OPERATING_CREST,
    VOLTAGE_BASES,
    VoltageBasis,
    voltage_basis_of,
    with_voltage_basis,
)
from solver.io.project_file import PROJECT_FORMAT_VERSION, load_project, model_from_dict, model_to_dict, save_project
from solver.mesh.panels import MeshSettings, PanelMesh, discretize_boundary, graded_panels
from solver.model import *  # noqa: F403 - the model layer's public names are the solver's own
from solver.model import __all__ as _MODEL_NAMES
from solver.model.materials import (
    MATERIALS,
    Material,
    Medium,
    background_is_air,
    dielectric_of,
    is_air_material,
    material,
    material_names,
    region_is_air,
)
from solver.model.shapes import DRAWING_ARC_STEP_RAD
from solver.samples import sample_names, sample_path, samples_dir

__all__ = [
    *_MODEL_NAMES, "DRAWING_ARC_STEP_RAD",
    "MeshSettings", "PanelMesh", "discretize_boundary", "graded_panels",
    "PeakField", "Solution", "solve", "solve_mesh", "with_error_estimate", "GeometryEditSolver",
    "EquilibriumCharge", "equilibrium_charge", "equivalent_radius_m",
    "mutual_from_maxwell", "maxwell_matrix_problems",
    "EPSILON_0_F_PER_M", "MU_0_H_PER_M", "SPEED_OF_LIGHT_M_PER_S",
    "SolverError", "InvalidGeometryError", "InvalidModelError", "NoReferenceError",
    "ProjectFileError", "SolveCancelled", "SuperpositionError",
    "PROJECT_FORMAT_VERSION", "load_project", "save_project", "model_to_dict", "model_from_dict",
    "FieldLine", "GridField", "evaluate_at_points", "evaluate_on_grid", "trace_field_lines",
    "HotSpot", "HotSpotReport", "analyse_hot_spots", "richardson_estimate",
    "conductors_with_sharp_corners", "round_sharp_corners", "CornerRadiusSweep", "peak_field_vs_corner_radius",
    "local_radius_of_curvature_m", "signed_radius_of_curvature_m", "AirRegionPeak",
    "HIGH_VOLTAGE_CAUTION", "THIN_MARGIN", "AirConditions", "ConductorMargin", "MarginReport",
    "air_breakdown_field_V_per_m", "assess_margins", "peek_corona_onset_field_V_per_m",
    "pressure_at_altitude_Pa", "relative_air_density", "relative_air_density_at_altitude",
    "air_conditions_of", "with_air_conditions",
    "AirStrength", "air_strength", "uniform_field_breakdown_voltage_V",
    "OPERATING_CREST", "VOLTAGE_BASES", "VoltageBasis", "voltage_basis_of", "with_voltage_basis",
    "LOW_VOLTAGE_THRESHOLD_V", "STATUS_WORDS", "CautionVerdict", "PeakVerdict", "judge_peak", "judge_solution",
    "largest_potential_difference_V", "solution_potential_difference_V", "summarise_verdicts",
    "Medium", "background_is_air", "is_air_material", "region_is_air",
    "BundleComparison", "bundle_equivalent_radius_formula_m", "compare_bundle",
    "LengthCheck", "check_part_length", "end_field_rise_estimate",
    "DielectricSolution", "RegionPeakField", "MATERIALS", "Material", "dielectric_of", "material", "material_names",
    "TransmissionLineFigures", "figures_from_matrices", "transmission_line_figures",
    "truncated_layers", "truncation_error", "widen_until_converged",
    "CrossCheck", "check_equivalent_radius", "check_each_equivalent_radius", "green_function", "robin_constant",
    "sample_names", "sample_path", "samples_dir",
]

# ---- studies, drawings and AC lines (third-party readers are imported only when used) ----
from solver.figures.ac_lines import (
    ICNIRP_2010_PUBLIC_50HZ,
    AcFieldProfile,
    ExposureReference,
    ac_field_profile,
    field_ellipse,
    phasors_of,
)
from solver.io.dxf import LayerTarget, parse_layer_target, read_dxf
from solver.io.dxf_export import layer_map_for, write_dxf
from solver.io.svg import read_svg
from solver.studies import Normal, SearchResult, SpreadResult, StudyTable, Uniform, search, spread, sweep

__all__ += [
    "ICNIRP_2010_PUBLIC_50HZ", "AcFieldProfile", "ExposureReference", "ac_field_profile", "field_ellipse",
    "phasors_of", "LayerTarget", "layer_map_for", "parse_layer_target", "read_dxf", "write_dxf", "read_svg",
    "Normal", "SearchResult", "SpreadResult", "StudyTable", "Uniform", "search", "spread", "sweep",
]

#: Earlier name of :class:`Solution` for models with dielectric regions; one type serves all models now.
DielectricSolution = Solution

from solver.model.quantities import QuantityError, TypedQuantity, parse_quantity, read_quantity, unit_choices  # noqa: E402

__all__ += ["QuantityError", "TypedQuantity", "parse_quantity", "read_quantity", "unit_choices"]
