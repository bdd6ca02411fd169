"""Command-line part for hot spots and margins: the figures, a summary section and JSON keys.

:func:`hot_spot_figures` computes, once per report, the refined peaks (starting from the
solution's own meshes, :func:`solver.analyse_hot_spots`), the margins
(:func:`solver.assess_margins`), bundles, the corner-radius sweep and the part-length check;
:func:`hot_spot_section` and :func:`hot_spot_json` only read that value.

JSON keys (lists follow the order of ``conductors``): ``peak_field_V_per_m``,
``peak_field_estimated_relative_error``, ``peak_field_singular``, ``enhancement_factor``,
``air_breakdown_field_V_per_m`` (the strength of air for each conductor's gap, ``air_gap_m``),
``air_breakdown_margin``, ``corona_onset_field_V_per_m``,
``corona_onset_margin``, ``margin_status``, ``deciding_margin`` (which margin set the status:
"corona onset" or "air breakdown"), ``margin_reason``, ``relative_air_density``,
``thin_margin_threshold``, ``voltage_basis`` (its project-file form), ``voltage_basis_text``,
``field_factor`` (what the peaks were multiplied by for the margins), ``caution_status``, ``caution_headline``, ``high_voltage_caution``
(the full caution, word for word, whenever the model is not low-voltage) and the details
under ``hot_spots`` and ``margins``. Status, reason and caution come from
:func:`solver.judge_peak`, the one caution rule.
"""

from __future__ import annotations

from dataclasses import dataclass

from solver.bem.high_order.solution import HighOrderSolution
from solver.bem.solution import Solution
from solver.bem.solve import CancelCallback, ProgressCallback
from solver.cli.formatting import format_location, format_optional, text_table
from solver.cli.large_model import bundle_comparison, is_large_solution
from solver.cli.options import ReportOptions
from solver.errors import InvalidModelError
from solver.figures.bundles import BundleComparison, compare_bundle
from solver.figures.end_effects import LengthCheck, check_part_length
from solver.hot_spots.air_conditions import THIN_MARGIN
from solver.hot_spots.analysis import analyse_hot_spots
from solver.hot_spots.corner_sweep import CornerRadiusSweep, peak_field_vs_corner_radius
from solver.hot_spots.hot_spot import HotSpotReport
from solver.hot_spots.margins import MarginReport, assess_margins
from solver.hot_spots.verdict import STATUS_WORDS, solution_potential_difference_V


@dataclass(frozen=True)
class HotSpotFigures:
    """Everything the hot-spot section and JSON keys show, computed once.

    Attributes
    ----------
    report : refined peak fields.
    margins : air-breakdown and corona-onset margins of those peaks.
    bundles : equivalent radius of each group of fixed conductors at one potential.
    radius_sweep : peak field against corner radius (None when not asked).
    part_length : how far the real part is from the 2-D assumption (None when not asked).
    """

    report: HotSpotReport
    margins: MarginReport
    bundles: tuple[BundleComparison, ...]
    radius_sweep: CornerRadiusSweep | None
    part_length: LengthCheck | None


def radius_sweep(
    solution: Solution, options: ReportOptions, cancel: CancelCallback | None = None
) -> CornerRadiusSweep | None:
    """The corner-radius sweep asked for with --radius-sweep (None when not asked)."""
    if options.radius_sweep is None or is_large_solution(solution):
        return None  # a large model's sweep is left out (solver.cli.large_model.not_computed)
    name, radii = options.radius_sweep
    if name not in solution.model.conductor_names:
        raise InvalidModelError(f"--radius-sweep: no conductor named '{name}'; the model has "
                                f"{', '.join(solution.model.conductor_names)}.")
    return peak_field_vs_corner_radius(solution, name, radii, options.peak_target, cancel=cancel)


def analysis(
    solution: Solution, options: ReportOptions, progress: ProgressCallback | None = None,
    cancel: CancelCallback | None = None,
) -> tuple[HotSpotReport, MarginReport]:
    """Hot spots (refined from the solution's meshes) and margins of the solution's model."""
    report = analyse_hot_spots(solution, options.peak_target, options.corner_radius_m,
                               progress=progress, cancel=cancel)
    margins = assess_margins(report.solved_model, report.hot_spots, options.air_for(solution.model),
                             THIN_MARGIN, report.air_region, solution_potential_difference_V(solution),
                             options.basis_for(solution.model))
    return report, margins


def hot_spot_figures(
    solution: Solution, options: ReportOptions, progress: ProgressCallback | None = None,
    cancel: CancelCallback | None = None,
) -> HotSpotFigures:
    """Compute the :class:`HotSpotFigures` of ``solution`` for one run's ``options``."""
    report, margins = analysis(solution, options, progress, cancel)
    part_length = None if options.part_length_m is None else check_part_length(solution.model, options.part_length_m)
    return HotSpotFigures(report, margins, bundle_comparisons(solution), radius_sweep(solution, options, cancel),
                          part_length)


def bundle_groups(solution: Solution) -> list[tuple[str, ...]]:
    """Groups of two or more fixed conductors at the same potential (tied together, like a bundle)."""
    groups: dict[float, list[str]] = {}
    for c in solution.model.conductors:
        if c.role == "fixed":
            groups.setdefault(float(c.potential_V), []).append(c.name)
    return [tuple(names) for names in groups.values() if len(names) >= 2]


def bundle_comparisons(solution: Solution) -> tuple[BundleComparison, ...]:
    """Equivalent radius of each group of :func:`bundle_groups`, with the bundle formula (on a
    large model's own high-order panels, :mod:`solver.cli.large_model`)."""
    if is_large_solution(solution):
        assert isinstance(solution, HighOrderSolution)
        return tuple(bundle_comparison(solution, names) for names in bundle_groups(solution))
    return tuple(compare_bundle(solution, names) for names in bundle_groups(solution))


_fmt = format_optional
_table = text_table


def hot_spot_section(solution: Solution, figures: HotSpotFigures) -> list[str]:
    """Peak fields refined to the target, with error, enhancement and margins per conductor."""
    report, margins = figures.report, figures.margins
    model = solution.model
    rounded = "" if report.corner_radius_m is None else f", corners rounded to {report.corner_radius_m * 1e3:g} mm"
    rows = []
    for spot, m in zip(report.hot_spots, margins.margins):
        x, y = (v / model.metres_per_unit for v in spot.location_m)
        if spot.singular:
            error = "singular"
        else:
            assert spot.estimated_relative_error is not None  # a peak that is not singular has an estimate
            error = f"{100 * spot.estimated_relative_error:.2g} %"
        rows.append([spot.conductor, _fmt(spot.field_V_per_m, "V/m"), error, format_location(model, x, y),
                     _fmt(spot.enhancement_factor), _fmt(m.air_breakdown_margin),
                     _fmt(m.corona_onset_field_V_per_m, "V/m"), _fmt(m.corona_onset_margin), m.deciding_margin or "-",
                     m.status])
    air = margins.air
    strengths = ", ".join(f"{m.conductor} {_fmt(m.air_breakdown_field_V_per_m, 'V/m')}" for m in margins.margins)
    if report.method == "mesh refinement":
        head = (f"Hot spots: peak surface field, refined to an error target of {100 * report.target_relative_error:g} % "
                f"({report.n_panels[-1]} panels{rounded})")
    else:
        head = (f"Hot spots: peak surface field from the high-order solution ({report.n_panels[-1]} unknowns{rounded}; "
                "a large model is not refined); error: the larger of the solution's estimate and the unresolved "
                f"part of the charge density at the peak (target {100 * report.target_relative_error:g} %)")
    lines = [
        head,
        *_table(["conductor", "peak |E|", "error", "at", "enhancement", "air margin", "corona onset",
                 "corona margin", "decided by", "status"], rows),
        f"  Air: {air.description}, relative density {air.relative_air_density:.3f}, surface factor "
        f"{air.surface_factor:g}; breakdown: uniform-field strength of air for each conductor's gap "
        f"(Kuffel, Zaengl & Kuffel 2000) x density x surface factor, "
        f"{strengths}"
        f"; corona onset by Peek (1929, {air.peek_form.replace('_', ' ')}).",
        f"  Voltage basis: {margins.voltage_basis.describe()}"
        + (f"; margins compare the thresholds with the peaks x {margins.voltage_basis.field_factor:.4g}."
           if margins.voltage_basis.field_factor != 1.0 else "; margins compare the thresholds with the peaks as shown."),
        f"  Enhancement = peak / (potential difference / gap) to the nearest conductor at another potential. "
        f"Margin = threshold / peak; below {margins.thin_margin:g} is thin. Fields are crest values.",
        "  Decided by: corona onset on a round conductor; the smaller margin where Peek's radius is only the "
        "outline's local radius of curvature; air breakdown where there is no radius.",
    ]
    for spot, m in zip(report.hot_spots, margins.margins):
        if m.corona_radius_basis and m.corona_radius_basis != "round conductor":
            # corona_radius_m gives any other basis only with the local radius of curvature
            assert spot.local_radius_of_curvature_m is not None
            lines.append(f"  {spot.conductor}: corona onset uses the local radius of curvature at the peak "
                         f"({spot.local_radius_of_curvature_m * 1e3:.3g} mm), an approximation.")
        if spot.singular or not spot.converged:
            lines.append(f"  {spot.conductor}: {spot.note}")
    if figures.part_length is not None:
        lines.append("  Part length: " + figures.part_length.note)

    if report.air_region is not None:
        ar = report.air_region
        x, y = (v / model.metres_per_unit for v in ar.location_m)
        if ar.negligible:
            error = "negligible: zero to solver accuracy, as outside an earthed screen"
        elif ar.at_sharp_corner:
            error = "singular"
        else:
            assert ar.estimated_relative_error is not None  # air_region_peak estimates all but these two cases
            error = f"error {100 * ar.estimated_relative_error:.2g} %"
        graded = (f"air margin {_fmt(margins.air_region_margin)}, {margins.air_region_status}"
                  if margins.air_region_status is not None
                  else "on a bare conductor, whose own row above grades it")
        lines.append(f"  Largest field in the surrounding air: {_fmt(ar.field_V_per_m, 'V/m')} ({error}) on the "
                     f"{ar.where} at {format_location(model, x, y)}; {graded}.")
    for b in figures.bundles:
        text = (f"  Conductors {', '.join(b.conductors)} (same potential) together: equivalent radius "
                f"{b.equivalent_radius_m / model.metres_per_unit:.5g} {model.unit}")
        if b.is_regular_bundle:
            # compare_bundle gives the formula figures exactly for a regular bundle
            assert b.formula_equivalent_radius_m is not None and b.relative_difference is not None
            text += (f"; bundle formula (n r A^(n-1))^(1/n) with n = {b.n_subconductors}: "
                     f"{b.formula_equivalent_radius_m / model.metres_per_unit:.5g} {model.unit} "
                     f"({100 * b.relative_difference:+.2g} %)")
        lines.append(text + ".")
    sweep = figures.radius_sweep
    if sweep is not None:
        lines += ["", *sweep.as_table().splitlines()]
        if sweep.fitted_exponent is not None:
            lines.append(f"  Peak grows like radius^{sweep.fitted_exponent:.3f} over this range.")
    for m in margins.margins:
        if m.status == "not assessed":
            lines.append(f"  {m.conductor}: not assessed, {m.reason}.")
    return lines


def caution_lines(figures: HotSpotFigures) -> list[str]:
    """The model's verdict (:func:`solver.judge_peak`, one rule) and its caution, word for word."""
    v = figures.margins.verdict
    if v is None:
        return []
    basis = figures.margins.voltage_basis
    head = f"High-voltage verdict: {STATUS_WORDS[v.status]} (voltage basis: {basis.describe()})."
    if v.caution.startswith(v.headline):
        return [head, v.caution]
    return [head, v.headline, *([v.caution] if v.caution else [])]


def hot_spot_json(solution: Solution, figures: HotSpotFigures) -> dict:
    """JSON keys of the hot spots and margins (SI units; lists in conductor order)."""
    report, margins = figures.report, figures.margins
    margin_dict = margins.as_dict()
    per = margin_dict["conductors"]
    return {
        "peak_field_V_per_m": [s.field_V_per_m for s in report.hot_spots],
        "peak_field_estimated_relative_error": [s.estimated_relative_error for s in report.hot_spots],
        "peak_field_singular": [s.singular for s in report.hot_spots],
        "enhancement_factor": [s.enhancement_factor for s in report.hot_spots],
        "air_breakdown_field_V_per_m": [m["air_breakdown_field_V_per_m"] for m in per],
        "air_gap_m": [m["gap_m"] for m in per],
        "air_breakdown_margin": [m["air_breakdown_margin"] for m in per],
        "corona_onset_field_V_per_m": [m["corona_onset_field_V_per_m"] for m in per],
        "corona_onset_margin": [m["corona_onset_margin"] for m in per],
        "margin_status": [m["status"] for m in per],
        "deciding_margin": [m["deciding_margin"] for m in per],
        "air_region_peak_field_V_per_m": margin_dict["air_region_peak_field_V_per_m"],
        "air_region_margin": margin_dict["air_region_margin"],
        "relative_air_density": margins.air.relative_air_density,
        "thin_margin_threshold": margins.thin_margin,
        "voltage_basis": margin_dict["voltage_basis_settings"],
        "voltage_basis_text": margin_dict["voltage_basis"],
        "field_factor": margin_dict["field_factor"],
        "margin_reason": [m["reason"] for m in per],
        "caution_status": margin_dict["status"],
        "caution_headline": margin_dict["headline"],
        "high_voltage_caution": margin_dict["caution"],
        "hot_spots": report.as_dict(),
        "margins": margin_dict,
        "corner_radius_sweep": None if figures.radius_sweep is None else figures.radius_sweep.as_dict(),
        "part_length_check": None if figures.part_length is None else vars(figures.part_length),
        "bundles": [vars(b) | {"conductors": list(b.conductors)} for b in figures.bundles],
    }
