"""The command line's JSON result: parts, each a dictionary built from the :class:`Report`.

:data:`JSON_PARTS` lists them; :func:`report_to_json` merges their dictionaries in order. Every
key names its SI unit. To add keys, pass your own tuple, e.g. ``report_to_json(report,
(*JSON_PARTS, my_part))`` with ``my_part(report) -> dict``.
"""

from __future__ import annotations

from collections.abc import Callable, Sequence

from solver.bem.high_order.solution import HighOrderSolution
from solver.cli.cross_check import cross_check_json
from solver.cli.hot_spots import hot_spot_json
from solver.cli.line_figures import transmission_line_json
from solver.cli.report import Report
from solver.errors import NoReferenceError

JsonPart = Callable[[Report], dict]


def model_json(report: Report) -> dict:
    """Title, unit, density, medium, ground plane, panel count and conductor names and roles."""
    solution = report.solution
    m = solution.model
    return {
        "title": m.title,
        "unit": m.unit,
        "mesh_density": m.mesh_density,
        "background_eps_r": m.background_eps_r,
        "ground_plane_y_m": None if m.ground_plane is None else m.ground_plane.y * m.metres_per_unit,
        "n_panels": solution.mesh.n_panels,
        "conductors": list(solution.conductor_names),
        "conductor_roles": [c.role for c in m.conductors],
        "signal_conductors": list(solution.signal_names),
    }


def capacitance_json(report: Report) -> dict:
    """Both capacitance matrices (F/m) or None, with the note saying why there are none, and the
    raw asymmetry of the computed Maxwell matrix before it was symmetrised (an accuracy check:
    largest |C_ij - C_ji| / largest |C_ij|)."""
    solution, note = report.solution, report.capacitance_note
    maxwell = mutual = asymmetry = None
    if note is None:
        try:
            maxwell = solution.capacitance_maxwell_F_per_m.tolist()
            mutual = solution.capacitance_mutual_F_per_m.tolist()
            asymmetry = solution.capacitance_asymmetry
        except NoReferenceError as e:  # the solution knows better than our note
            note = str(e)
    return {"capacitance_maxwell_F_per_m": maxwell, "capacitance_mutual_F_per_m": mutual,
            "capacitance_asymmetry": asymmetry, "capacitance_note": note}


def operating_point_json(report: Report) -> dict:
    """Conductor potentials and charges, the potential at infinity and the peak surface fields."""
    solution = report.solution
    peaks = solution.peak_surface_fields
    return {
        "conductor_potentials_V": [float(v) for v in solution.conductor_potentials_V],
        "conductor_charges_C_per_m": [float(q) for q in solution.conductor_charges_C_per_m],
        "potential_at_infinity_V": float(solution.phi_inf_V),
        "peak_surface_field_V_per_m": [p.field_V_per_m for p in peaks],
        "peak_surface_field_location_m": [list(p.location_m) for p in peaks],
        "peak_at_sharp_corner": [p.at_sharp_corner for p in peaks],
        "peak_corner_exponent": [p.corner_exponent for p in peaks],
    }


def figures_json(report: Report) -> dict:
    """Equivalent radii (with their estimated errors on a large model, else None), the error
    estimate, the size of the linear system (``unknowns``), which solver ran, its time per
    stage in seconds, and ``not_computed``: the figures asked for but left out, each as
    ``{"figure", "reason", "way_out"}``."""
    errors = report.equivalent_radius_errors
    return {
        "equivalent_radius_m": list(report.equivalent_radii_m),
        "equivalent_radius_estimated_relative_error": None if errors is None else list(errors),
        "estimated_relative_error": report.solution.estimated_relative_error,
        "coarse_mesh_panels": report.solution.coarse_mesh_panels,
        "unknowns": report.solution.n_unknowns,
        "solver": "high-order" if isinstance(report.solution, HighOrderSolution) else "low-order",
        "stage_seconds": dict(report.solution.stage_seconds),
        "not_computed": [vars(item) for item in report.not_computed],
    }


def hot_spots_json(report: Report) -> dict:
    """Hot-spot and margin keys (see :func:`solver.cli.hot_spots.hot_spot_json`)."""
    return hot_spot_json(report.solution, report.hot_spots)


def line_figures_json(report: Report) -> dict:
    """Transmission-line and dielectric-region keys (see :mod:`solver.cli.line_figures`)."""
    return transmission_line_json(report.solution, report.line_figures)


def cross_check_part(report: Report) -> dict:
    """The ``cross_check`` key, when asked for (see :mod:`solver.cli.cross_check`)."""
    return cross_check_json(report.cross_checks)


#: The JSON result's parts; their dictionaries are merged in order.
JSON_PARTS: tuple[JsonPart, ...] = (
    model_json, capacitance_json, operating_point_json, figures_json, hot_spots_json, line_figures_json,
    cross_check_part,
)


def report_to_json(report: Report, parts: Sequence[JsonPart] = JSON_PARTS) -> dict:
    """The full result as a JSON-ready dict (the union of every part's keys, in order)."""
    out: dict = {}
    for part in parts:
        out.update(part(report))
    return out
