"""Command-line part for hot spots and margins: options, a summary section and JSON keys.

:mod:`solver.cli` calls :func:`add_arguments` on its parser, :func:`configure` with the parsed
arguments, and lists :func:`hot_spot_section` and :func:`hot_spot_json` among its sections.
The analysis (:func:`solver.analyse_hot_spots`, :func:`solver.assess_margins`) runs once per
solution and is shared by the summary and the JSON output.

JSON keys (lists follow the order of ``conductors``): ``peak_field_V_per_m``,
``peak_field_estimated_relative_error``, ``peak_field_singular``, ``enhancement_factor``,
``air_breakdown_field_V_per_m``, ``air_breakdown_margin``, ``corona_onset_field_V_per_m``,
``corona_onset_margin``, ``margin_status``, ``margin_reason``, ``relative_air_density``,
``thin_margin_threshold``, ``caution_status``, ``caution_headline``, ``high_voltage_caution``
(the full caution, word for word, whenever the model is not low-voltage) and the details
under ``hot_spots`` and ``margins``. Status, reason and caution come from
:func:`solver.judge_peak`, the one caution rule.
"""

from __future__ import annotations

import argparse
import math

from solver.figures.bundles import BundleComparison, compare_bundle
from solver.hot_spots.corner_sweep import CornerRadiusSweep, peak_field_vs_corner_radius
from solver.figures.end_effects import check_part_length
from solver.errors import InvalidModelError
from solver.hot_spots.analysis import HotSpotReport, analyse_hot_spots
from solver.hot_spots.margins import (
    THIN_MARGIN,
    AirConditions,
    MarginReport,
    air_breakdown_field_V_per_m,
    air_conditions_of,
    assess_margins,
)
from solver.hot_spots.verdict import solution_potential_difference_V
from solver.bem.solution import Solution

_options: dict = {}
_memo: dict = {}


def add_arguments(parser: argparse.ArgumentParser) -> None:
    """Add the air, surface, corner-radius and error-target options to ``parser``."""
    group = parser.add_argument_group("hot spots and margins")
    group.add_argument("--altitude-m", type=float, help="site altitude above sea level, m (standard-atmosphere pressure)")
    group.add_argument("--pressure-kPa", type=float, help="air pressure, kPa (instead of --altitude-m)")
    group.add_argument("--temperature-C", type=float, help="air temperature, degC (default 20)")
    group.add_argument("--surface-factor", type=float,
                       help="Peek's surface factor m of round conductors (1 smooth, ~0.85 stranded)")
    group.add_argument("--corner-radius-m", type=float,
                       help="round every sharp corner and strip edge to this radius, m, for the peak fields")
    group.add_argument("--peak-target", type=float, default=0.01,
                       help="relative error target of the peak fields (default 0.01)")
    group.add_argument("--part-length-m", type=float,
                       help="length of the real part, m: how far it is from the 2-D assumption")
    group.add_argument("--radius-sweep", metavar="CONDUCTOR=R1,R2,...",
                       help="peak field of CONDUCTOR with its corners rounded to each radius (m)")


def configure(args: argparse.Namespace) -> None:
    """Take the options of one command-line run (call before the sections run).

    The air options override the project's own air conditions (``air_conditions`` in the
    project file) field by field; without them the project's are used.
    """
    _memo.clear()
    override: dict = {}
    if getattr(args, "altitude_m", None) is not None:
        override["altitude_m"] = args.altitude_m
    if getattr(args, "pressure_kPa", None) is not None:
        override["pressure_kPa"] = args.pressure_kPa
    if getattr(args, "temperature_C", None) is not None:
        override["temperature_C"] = args.temperature_C
    if getattr(args, "surface_factor", None) is not None:
        override["surface_factor"] = args.surface_factor
    if "altitude_m" in override and "pressure_kPa" in override:
        raise InvalidModelError("Give --altitude-m or --pressure-kPa, not both.")
    AirConditions.from_settings(override)  # check the options before any solve
    _options.update(air_override=override, corner_radius_m=getattr(args, "corner_radius_m", None),
                    target=getattr(args, "peak_target", 0.01), part_length_m=getattr(args, "part_length_m", None),
                    sweep=_parse_sweep(getattr(args, "radius_sweep", None)))


def air_for(model) -> AirConditions:
    """The project's air conditions with the command-line air options applied over them."""
    override = _options.get("air_override") or {}
    settings = air_conditions_of(model).as_settings()
    if {"altitude_m", "pressure_kPa"} & override.keys():
        for key in ("altitude_m", "pressure_kPa", "relative_air_density"):
            settings.pop(key, None)
    return AirConditions.from_settings(settings | override)


def _parse_sweep(text: str | None) -> tuple[str, list[float]] | None:
    if not text:
        return None
    name, sep, radii = text.rpartition("=")
    try:
        values = [float(r) for r in radii.split(",") if r.strip()]
    except ValueError:
        values = []
    if not sep or not name or not values:
        raise InvalidModelError(f"--radius-sweep '{text}': write CONDUCTOR=R1,R2,... with radii in metres.")
    return name, values


def radius_sweep(solution: Solution) -> CornerRadiusSweep | None:
    """The corner-radius sweep asked for with --radius-sweep (None when not asked)."""
    if _options.get("sweep") is None:
        return None
    cached = _memo.get("sweep")
    if cached is None or cached[0] is not solution:
        name, radii = _options["sweep"]
        if name not in solution.model.conductor_names:
            raise InvalidModelError(f"--radius-sweep: no conductor named '{name}'; the model has "
                                    f"{', '.join(solution.model.conductor_names)}.")
        cached = _memo["sweep"] = (solution, peak_field_vs_corner_radius(solution.model, name, radii,
                                                                          _options.get("target", 0.01)))
    return cached[1]


def analysis(solution: Solution) -> tuple[HotSpotReport, MarginReport]:
    """Hot spots and margins of the solution's model (computed once per solution)."""
    cached = _memo.get("analysis")
    if cached is None or cached[0] is not solution:
        report = analyse_hot_spots(solution.model, _options.get("target", 0.01), _options.get("corner_radius_m"))
        margins = assess_margins(report.solved_model, report.hot_spots, air_for(solution.model), THIN_MARGIN,
                                 report.air_region, solution_potential_difference_V(solution))
        cached = _memo["analysis"] = (solution, report, margins)
    return cached[1], cached[2]


def bundle_groups(solution: Solution) -> list[tuple[str, ...]]:
    """Groups of two or more fixed conductors at the same potential (tied together, like a bundle)."""
    groups: dict[float, list[str]] = {}
    for c in solution.model.conductors:
        if c.role == "fixed":
            groups.setdefault(float(c.potential_V), []).append(c.name)
    return [tuple(names) for names in groups.values() if len(names) >= 2]


def bundle_comparisons(solution: Solution) -> list[BundleComparison]:
    """Equivalent radius of each group of :func:`bundle_groups`, with the bundle formula."""
    cached = _memo.get("bundles")
    if cached is None or cached[0] is not solution:
        cached = _memo["bundles"] = (solution, [compare_bundle(solution.model, names) for names in bundle_groups(solution)])
    return cached[1]


def _fmt(value: float | None, unit: str = "", digits: int = 3) -> str:
    from solver.cli.command import format_engineering

    if value is None:
        return "-"
    if not math.isfinite(value):
        return "inf"
    return format_engineering(value, unit, digits) if unit else f"{value:.{digits}g}"


def hot_spot_section(solution: Solution) -> list[str]:
    """Peak fields refined to the target, with error, enhancement and margins per conductor."""
    from solver.cli.command import _table

    report, margins = analysis(solution)
    model = solution.model
    rounded = "" if report.corner_radius_m is None else f", corners rounded to {report.corner_radius_m * 1e3:g} mm"
    rows = []
    for spot, m in zip(report.hot_spots, margins.margins):
        x, y = (v / model.metres_per_unit for v in spot.location_m)
        error = "singular" if spot.singular else f"{100 * spot.estimated_relative_error:.2g} %"
        rows.append([spot.conductor, _fmt(spot.field_V_per_m, "V/m"), error, f"({x:.4g}, {y:.4g}) {model.unit}",
                     _fmt(spot.enhancement_factor), _fmt(m.air_breakdown_margin),
                     _fmt(m.corona_onset_field_V_per_m, "V/m"), _fmt(m.corona_onset_margin), m.status])
    air = margins.air
    lines = [
        f"Hot spots: peak surface field, refined to an error target of {100 * report.target_relative_error:g} % "
        f"({report.n_panels[-1]} panels{rounded})",
        *_table(["conductor", "peak |E|", "error", "at", "enhancement", "air margin", "corona onset",
                 "corona margin", "status"], rows),
        f"  Air: {air.description}, relative density {air.relative_air_density:.3f}; breakdown "
        f"{_fmt(air_breakdown_field_V_per_m(air.relative_air_density), 'V/m')} "
        f"(3 MV/m x density, common practice); corona onset by Peek (1929, {air.peek_form.replace('_', ' ')}), "
        f"surface factor {air.surface_factor:g}.",
        f"  Enhancement = peak / (potential difference / gap) to the nearest conductor at another potential. "
        f"Margin = threshold / peak; below {margins.thin_margin:g} is thin. Fields are crest values.",
    ]
    for spot, m in zip(report.hot_spots, margins.margins):
        if m.corona_radius_basis and m.corona_radius_basis != "round conductor":
            lines.append(f"  {spot.conductor}: corona onset uses the local radius of curvature at the peak "
                         f"({spot.local_radius_of_curvature_m * 1e3:.3g} mm), an approximation.")
        if spot.singular or not spot.converged:
            lines.append(f"  {spot.conductor}: {spot.note}")
    if _options.get("part_length_m") is not None:
        lines.append("  Part length: " + check_part_length(model, _options["part_length_m"]).note)

    if report.air_region is not None:
        ar = report.air_region
        x, y = (v / model.metres_per_unit for v in ar.location_m)
        if ar.negligible:
            error = "negligible: zero to solver accuracy, as outside an earthed screen"
        else:
            error = "singular" if ar.at_sharp_corner else f"error {100 * ar.estimated_relative_error:.2g} %"
        lines.append(f"  Largest field in the surrounding air: {_fmt(ar.field_V_per_m, 'V/m')} ({error}) on the "
                     f"{ar.where} at ({x:.4g}, {y:.4g}) {model.unit}; air margin {_fmt(margins.air_region_margin)}, "
                     f"{margins.air_region_status}.")
    for b in bundle_comparisons(solution):
        text = (f"  Conductors {', '.join(b.conductors)} (same potential) together: equivalent radius "
                f"{b.equivalent_radius_m / model.metres_per_unit:.5g} {model.unit}")
        if b.is_regular_bundle:
            text += (f"; bundle formula (n r A^(n-1))^(1/n) with n = {b.n_subconductors}: "
                     f"{b.formula_equivalent_radius_m / model.metres_per_unit:.5g} {model.unit} "
                     f"({100 * b.relative_difference:+.2g} %)")
        lines.append(text + ".")
    sweep = radius_sweep(solution)
    if sweep is not None:
        lines += ["", *sweep.as_table().splitlines()]
        if sweep.fitted_exponent is not None:
            lines.append(f"  Peak grows like radius^{sweep.fitted_exponent:.3f} over this range.")
    for m in margins.margins:
        if m.status == "not assessed":
            lines.append(f"  {m.conductor}: not assessed, {m.reason}.")
    return lines


def caution_lines(solution: Solution) -> list[str]:
    """The model's verdict (:func:`solver.judge_peak`, one rule) and its caution, word for word."""
    _, margins = analysis(solution)
    v = margins.verdict
    if v is None:
        return []
    head = f"High-voltage verdict: {v.status}."
    if v.caution.startswith(v.headline):
        return [head, v.caution]
    return [head, v.headline, *([v.caution] if v.caution else [])]


def hot_spot_json(solution: Solution) -> dict:
    """JSON keys of the hot spots and margins (SI units; lists in conductor order)."""
    report, margins = analysis(solution)
    margin_dict = margins.as_dict()
    per = margin_dict["conductors"]
    return {
        "peak_field_V_per_m": [s.field_V_per_m for s in report.hot_spots],
        "peak_field_estimated_relative_error": [s.estimated_relative_error for s in report.hot_spots],
        "peak_field_singular": [s.singular for s in report.hot_spots],
        "enhancement_factor": [s.enhancement_factor for s in report.hot_spots],
        "air_breakdown_field_V_per_m": margins.margins[0].air_breakdown_field_V_per_m if margins.margins else None,
        "air_breakdown_margin": [m["air_breakdown_margin"] for m in per],
        "corona_onset_field_V_per_m": [m["corona_onset_field_V_per_m"] for m in per],
        "corona_onset_margin": [m["corona_onset_margin"] for m in per],
        "margin_status": [m["status"] for m in per],
        "air_region_peak_field_V_per_m": margin_dict["air_region_peak_field_V_per_m"],
        "air_region_margin": margin_dict["air_region_margin"],
        "relative_air_density": margins.air.relative_air_density,
        "thin_margin_threshold": margins.thin_margin,
        "margin_reason": [m["reason"] for m in per],
        "caution_status": margin_dict["status"],
        "caution_headline": margin_dict["headline"],
        "high_voltage_caution": margin_dict["caution"],
        "hot_spots": report.as_dict(),
        "margins": margin_dict,
        "corner_radius_sweep": None if radius_sweep(solution) is None else radius_sweep(solution).as_dict(),
        "part_length_check": None if _options.get("part_length_m") is None
        else vars(check_part_length(solution.model, _options["part_length_m"])),
        "bundles": [vars(b) | {"conductors": list(b.conductors)} for b in bundle_comparisons(solution)],
    }
