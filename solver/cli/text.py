"""The command line's printed summary: sections, each a function of the :class:`Report`.

:data:`TEXT_SECTIONS` lists them in order; :func:`summary_lines` joins their lines with blank
lines. To print more, pass your own tuple, e.g. ``summary_lines(report, (*TEXT_SECTIONS,
my_section))`` with ``my_section(report) -> list[str]``.
"""

from __future__ import annotations

import math
from collections.abc import Callable, Sequence

import numpy as np

from solver.bem.high_order.solution import HighOrderSolution
from solver.cli.cross_check import cross_check_lines
from solver.cli.formatting import (
    digits_for,
    format_measured,
    format_percent,
    format_plain,
    format_point,
    text_table,
)
from solver.cli.hot_spots import caution_lines, hot_spot_section
from solver.cli.large_model import error_words, is_large_solution, solver_words
from solver.cli.line_figures import dielectric_section, transmission_line_section
from solver.cli.report import Report

TextSection = Callable[[Report], list[str]]


def header_section(report: Report) -> list[str]:
    """Title, description, unit, medium and mesh size."""
    solution = report.solution
    m = solution.model
    lines = [m.title or "(untitled model)"]
    if m.description:
        lines.append(m.description)
    lines += [
        "",
        f"Unit of length: {m.unit}    background eps_r: {m.background_eps_r:g}    {_mesh_words(report)}",
        f"Ground plane: y = {m.ground_plane.y:g} {m.unit}" if m.ground_plane is not None else "Ground plane: none",
        "Figures are per metre of a long, uniform cross-section (2-D electrostatics).",
    ]
    return lines


def _mesh_words(report: Report) -> str:
    """How the boundary was discretised: the named density, or the high-order tolerance solve."""
    solution = report.solution
    if is_large_solution(solution):
        assert isinstance(solution, HighOrderSolution)
        return solver_words(solution)
    reached = getattr(solution, "tolerance", None)
    if reached is not None:
        return f"high-order solver to tolerance {reached:.2g}, {solution.n_unknowns} unknowns"
    if report.options.tolerance is not None:
        return f"low-order solver refined to tolerance {report.options.tolerance:.2g}, {solution.mesh.n_panels} panels"
    return f"mesh: {solution.model.mesh_density}, {solution.mesh.n_panels} panels"


def conductors_section(report: Report) -> list[str]:
    """Each conductor's role, potential and net charge per unit length."""
    solution = report.solution
    charges = np.abs(np.asarray(solution.conductor_charges_C_per_m))
    floor = 1e-9 * float(charges.max()) if charges.size else 0.0  # round-off of the solve, shown as 0
    rows = [
        [c.name, c.role, format_plain(v, 6),
         format_plain(q * 1e12, digits_for(solution.estimated_relative_error)) if abs(q) > floor else "0"]
        for c, v, q in zip(solution.model.conductors, solution.conductor_potentials_V,
                           solution.conductor_charges_C_per_m)
    ]
    return ["Conductors", *text_table(["name", "role", "potential (V)", "net charge (pC/m)"], rows)]


def _matrix_lines(title: str, names: Sequence[str], matrix_F_per_m: np.ndarray, relative_error: float | None) -> list[str]:
    """A matrix in pF/m to the digits the error supports; entries at round-off level read 0."""
    values = np.asarray(matrix_F_per_m) * 1e12
    floor = 1e-9 * float(np.max(np.abs(values))) if values.size else 0.0
    digits = digits_for(relative_error)
    rows = [[name, *(format_plain(x, digits) if abs(x) > floor else "0" for x in row)]
            for name, row in zip(names, values)]
    return [title, *text_table(["pF/m", *names], rows)]


def capacitance_section(report: Report) -> list[str]:
    """Maxwell and mutual capacitance matrices in pF/m, or why there are none."""
    if report.capacitance_note is not None:
        return [report.capacitance_note]
    solution = report.solution
    names = solution.signal_names
    err = solution.estimated_relative_error
    lines = _matrix_lines("Capacitance matrix, Maxwell form (pF/m): Maxwell diagonal C_ii (charge per volt with "
                          "all others at 0 V)", names, solution.capacitance_maxwell_F_per_m, err)
    lines.append("")
    lines += _matrix_lines(
        "Capacitance matrix, mutual form (pF/m): capacitance to earth C_i0 on the diagonal, between conductors "
        "off it", names, solution.capacitance_mutual_F_per_m, err,
    )
    if len(names) > 1:  # a 1 x 1 matrix is symmetric by construction
        lines.append(asymmetry_line(solution.capacitance_asymmetry))
    return lines


def asymmetry_line(asymmetry: float) -> str:
    """The raw asymmetry of the computed matrix, an accuracy check made before it is symmetrised.

    Below :data:`SYMMETRIC_TO_ROUND_OFF` it is round-off of the solve and said so, not printed.

    >>> asymmetry_line(2.5e-4)
    'Accuracy check: the computed matrix was asymmetric by 0.025 % (largest |C_ij - C_ji| / largest |C_ij|) before it was symmetrised.'
    >>> asymmetry_line(3e-16)
    'Accuracy check: the computed matrix was symmetric to round-off (largest |C_ij - C_ji| / largest |C_ij| under 10⁻⁸) before it was symmetrised.'
    """
    if asymmetry < SYMMETRIC_TO_ROUND_OFF:
        return ("Accuracy check: the computed matrix was symmetric to round-off (largest |C_ij - C_ji| / largest "
                f"|C_ij| under {_power_of_ten(SYMMETRIC_TO_ROUND_OFF)}) before it was symmetrised.")
    return (f"Accuracy check: the computed matrix was asymmetric by {format_percent(asymmetry)} "
            "(largest |C_ij - C_ji| / largest |C_ij|) before it was symmetrised.")


def _power_of_ten(value: float) -> str:
    """10⁻⁸ for 1e-8 (a power of ten written as one)."""
    exponent = str(round(math.log10(value)))
    return "10" + exponent.translate(str.maketrans("-0123456789", "⁻⁰¹²³⁴⁵⁶⁷⁸⁹"))


#: An asymmetry of the computed capacitance matrix below this is round-off of the solve (the
#: collocation error itself makes 1e-6 to 1e-3 on the samples; from the benchmark).
SYMMETRIC_TO_ROUND_OFF = 1e-8


def peak_field_section(report: Report) -> list[str]:
    """Largest surface field of each conductor, where it sits, and a note at sharp corners."""
    m = report.solution.model
    rows: list[list[str]] = []
    corner_exponents: dict[float | None, list[str]] = {}
    peaks = report.solution.peak_surface_fields
    largest = max((p.field_V_per_m for p in peaks if np.isfinite(p.field_V_per_m)), default=None)
    midpoints = np.asarray(report.solution.mesh.midpoints)
    size = float(np.max(np.ptp(midpoints, axis=0))) / m.metres_per_unit if midpoints.size else 1.0
    for p in peaks:
        x, y = p.location_m
        mark = " *" if p.at_sharp_corner else ""
        rows.append([p.conductor, format_measured(p.field_V_per_m, "V/m", digits=3, largest=largest) + mark,
                     format_point(x / m.metres_per_unit, y / m.metres_per_unit, m.unit, size)])
        if p.at_sharp_corner:
            corner_exponents.setdefault(p.corner_exponent, []).append(p.conductor)
    notes = []
    for exponent, names in corner_exponents.items():
        law = "" if exponent is None else f" (charge density ~ r^{exponent:.2f})"
        notes.append(
            f"  * At a sharp corner or edge{law}: {', '.join(names)}. The 2-D field is singular there, so "
            "this value grows as the mesh is refined; round the corner to get a finite figure."
        )
    return ["Peak surface field (operating point)", *text_table(["conductor", "|E| max", "at"], rows), *notes]


def error_section(report: Report) -> list[str]:
    """The estimated relative error from the solve on a mesh at half the resolution."""
    solution = report.solution
    err = solution.estimated_relative_error
    if err is None:
        return ["Estimated relative error: not estimated."]
    if is_large_solution(solution):
        assert isinstance(solution, HighOrderSolution)
        return [error_words(solution)]
    what = "capacitance matrix" if solution.has_capacitance else "conductor charges"
    tolerance = report.options.tolerance
    if tolerance is not None and getattr(solution, "tolerance", None) is not None:
        return [f"Estimated relative error of the {what}: {err:.2g} (high-order solver, {solution.n_unknowns} "
                f"unknowns; change against a check mesh with every panel split; tolerance {tolerance:.2g})"]
    if tolerance is not None:
        return [f"Estimated relative error of the {what}: {err:.2g} (tolerance {tolerance:.2g})",
                "  The high-order solver declined this model (dielectric regions of another permittivity); "
                f"the low-order solver was refined to the tolerance ({solution.n_unknowns} unknowns)."]
    coarse = f", against {solution.coarse_mesh_panels} panels" if solution.coarse_mesh_panels else ""
    return [f"Estimated relative error of the {what}: {format_percent(err)} (change from a mesh at half the "
            f"resolution{coarse}); figures are shown to {digits_for(err)} significant digits"]


def equivalent_radius_section(report: Report) -> list[str]:
    """Each conductor's equivalent radius, in the model's unit."""
    m = report.solution.model
    errors = report.equivalent_radius_errors
    if errors is None:
        rows = [[name, f"{format_plain(r / m.metres_per_unit, 5)} {m.unit}"]
                for name, r in zip(report.solution.conductor_names, report.equivalent_radii_m)]
        return ["Equivalent radius (logarithmic capacity) of each conductor alone",
                *text_table(["conductor", "radius"], rows)]
    rows = [[name, f"{format_plain(r / m.metres_per_unit, 5)} {m.unit}", f"{e:.1g}"]
            for name, r, e in zip(report.solution.conductor_names, report.equivalent_radii_m, errors)]
    return ["Equivalent radius (logarithmic capacity) of each conductor alone (on the solution's panels; "
            "error: change against fewer nodes per panel)",
            *text_table(["conductor", "radius", "est. error"], rows)]


def not_computed_section(report: Report) -> list[str]:
    """Figures asked for but left out, why, and what to do instead."""
    return [item.sentence() for item in report.not_computed]


def hot_spots_section(report: Report) -> list[str]:
    """The hot-spot section (see :func:`solver.cli.hot_spots.hot_spot_section`)."""
    return hot_spot_section(report.solution, report.hot_spots)


def dielectrics_section(report: Report) -> list[str]:
    """The largest field in each dielectric region (see :mod:`solver.cli.line_figures`)."""
    return dielectric_section(report.solution)


def line_figures_section(report: Report) -> list[str]:
    """The transmission-line figures (see :mod:`solver.cli.line_figures`)."""
    return transmission_line_section(report.line_figures)


def high_voltage_section(report: Report) -> list[str]:
    """The model's high-voltage verdict and caution, from the one caution rule (:func:`solver.judge_peak`)."""
    return caution_lines(report.hot_spots)


def cross_check_section(report: Report) -> list[str]:
    """Each equivalent radius by independent routes, when asked for (see :mod:`solver.cli.cross_check`)."""
    return cross_check_lines(report.cross_checks)


#: The printed summary's sections, in order; each returns lines (an empty list to skip).
TEXT_SECTIONS: tuple[TextSection, ...] = (
    header_section,
    conductors_section,
    capacitance_section,
    peak_field_section,
    error_section,
    equivalent_radius_section,
    hot_spots_section,
    dielectrics_section,
    line_figures_section,
    cross_check_section,
    not_computed_section,
    high_voltage_section,
)


def summary_lines(report: Report, sections: Sequence[TextSection] = TEXT_SECTIONS) -> list[str]:
    """The printed summary: every section's lines, blank-line separated (empty sections skipped)."""
    lines: list[str] = []
    for section in sections:
        part = section(report)
        if part:
            if lines:
                lines.append("")
            lines += part
    return lines
