"""The command line's result: one frozen :class:`Report`, computed once, printed by renderers.

Solution -> :func:`build_report` -> Report -> text (:mod:`solver.cli.text`), JSON
(:mod:`solver.cli.json_output`) or CSV (:mod:`solver.cli.csv_output`). Every figure in the
report is computed from the one solution (hot spots refine from its meshes); the renderers
compute nothing.
"""

from __future__ import annotations

from dataclasses import dataclass

from solver.bem.high_order.adaptive import equivalent_radius_to_tolerance
from solver.bem.high_order.solution import HighOrderSolution
from solver.bem.solution import Solution
from solver.bem.solve import CancelCallback, ProgressCallback, progress_reporter, solve
from solver.cli import large_model
from solver.cli.hot_spots import HotSpotFigures, hot_spot_figures
from solver.cli.line_figures import figures_for_solution
from solver.cli.options import ReportOptions
from solver.cross_check.report import CrossCheck, check_each_equivalent_radius
from solver.figures.equilibrium import equivalent_radius_m
from solver.figures.transmission_line import TransmissionLineFigures

NO_RETURN_PATH = (
    "No capacitance matrix: the model has neither a reference conductor nor a ground plane, and "
    "there is no 2-D capacitance without a return path. Set one conductor's role to 'reference' "
    "or add a ground plane."
)
NO_FIXED_CONDUCTOR = (
    "No capacitance matrix: no conductor has a fixed potential, so the matrix has no rows. "
    "Set at least one conductor's role to 'fixed'."
)


def capacitance_note(solution: Solution) -> str | None:
    """Why the solution has no capacitance matrix, or None when it has one."""
    if not solution.model.has_return_path:
        return NO_RETURN_PATH
    if not solution.signal_names:
        return NO_FIXED_CONDUCTOR
    return None


def _equivalent_radii(solution: Solution) -> tuple[tuple[float, ...], tuple[float, ...] | None]:
    """Each conductor's equivalent radius; to the solution's tolerance after a high-order solve;
    on the solution's own panels, with an error estimate, for a large model."""
    if large_model.is_large_solution(solution):
        assert isinstance(solution, HighOrderSolution)
        return large_model.equivalent_radii(solution)
    return _radii(solution), None


def _radii(solution: Solution) -> tuple[float, ...]:
    tolerance = solution.tolerance if isinstance(solution, HighOrderSolution) else None
    if tolerance is None:
        return tuple(equivalent_radius_m(solution, [name]) for name in solution.conductor_names)
    return tuple(equivalent_radius_to_tolerance(solution.model, [name], tolerance)[0]
                 for name in solution.conductor_names)


@dataclass(frozen=True)
class Report:
    """Everything one run of the command line prints, in SI units.

    Attributes
    ----------
    solution : the solved model (with its error estimate).
    options : what the run asked for.
    capacitance_note : why there is no capacitance matrix, or None.
    equivalent_radii_m : equivalent radius (logarithmic capacity) of each conductor alone,
        metres, model order.
    hot_spots : refined peaks, margins, bundles, corner-radius sweep and part-length check.
    line_figures : transmission-line figures, or None without a return path or signal line.
    cross_checks : each conductor's equivalent radius by independent routes (``--cross-check``),
        or None when not asked for.
    equivalent_radius_errors : estimated relative error of each equivalent radius (large
        models), or None where the radii are to the mesh density or tolerance.
    not_computed : figures asked for but left out, each with the reason and a way out (large
        models: see :mod:`solver.cli.large_model`).
    """

    solution: Solution
    options: ReportOptions
    capacitance_note: str | None
    equivalent_radii_m: tuple[float, ...]
    hot_spots: HotSpotFigures
    line_figures: TransmissionLineFigures | None
    cross_checks: tuple[CrossCheck, ...] | None = None
    equivalent_radius_errors: tuple[float, ...] | None = None
    not_computed: tuple[large_model.NotComputed, ...] = ()


def build_report(
    solution: Solution,
    options: ReportOptions | None = None,
    progress: ProgressCallback | None = None,
    cancel: CancelCallback | None = None,
) -> Report:
    """Compute every figure of the command line's output from ``solution``, once.

    Parameters
    ----------
    solution : Solution
        From :func:`solver.solve` (with its error estimate, so that the hot spots start from
        its two meshes).
    options : ReportOptions, optional
        Air conditions, corner radius, error target, part length, radius sweep.
    progress, cancel : optional callbacks as for :func:`solver.solve`.
    """
    options = options or ReportOptions()
    report = progress_reporter(progress, cancel)
    report(0.0, "Equivalent radii")
    radii, radius_errors = _equivalent_radii(solution)
    report(0.2, "Hot spots")
    missing: tuple[large_model.NotComputed, ...] = ()
    if large_model.is_large_solution(solution):
        # A large model is not refined on low-order meshes (they would not fit): its peaks come
        # from its high-order solution, and figures needing more large solves are left out.
        assert isinstance(solution, HighOrderSolution)
        missing = large_model.not_computed(solution, options)
        hot_source: Solution = solution
    else:
        # Hot spots refine on the low-order meshes, level by level; a high-order solution is not one
        # of those levels, so they start from a low-order solve of the same model.
        hot_source = solve(solution.model) if isinstance(solution, HighOrderSolution) else solution
    hot_spots = hot_spot_figures(hot_source, options, lambda f, m: report(0.2 + 0.7 * f, m), cancel)
    report(0.9, "Transmission-line figures")
    line_figures = figures_for_solution(solution)
    checks = None
    if options.cross_check_points is not None:
        report(0.95, "Cross-checking the equivalent radii")
        checks = tuple(check_each_equivalent_radius(solution.model, options.cross_check_points))
    report(1.0, "Done")
    return Report(solution, options, capacitance_note(solution), radii, hot_spots, line_figures, checks,
                  radius_errors, missing)
