"""Everything the program shows after a solve, computed in one go off the GUI thread (Qt-free).

:func:`compute_results` calls the solver for the solution, the potential and field maps on a
grid around the model, the field lines and each conductor's equivalent radius.
"""

from __future__ import annotations

import logging
from collections.abc import Callable
from dataclasses import dataclass, field

import numpy as np

import solver
from app.framing import framing_box
from solver import GridField, Model, Solution, SolveCancelled

logger = logging.getLogger(__name__)


@dataclass(frozen=True)
class Results:
    """A solution and the figures drawn from it.

    Attributes
    ----------
    model : the Model solved.
    solution : the Solution.
    grid : potential and |E| maps (metres, volts, V/m) or None.
    field_lines : tuple of solver.FieldLine (metres).
    equivalent_radius_m : conductor name -> equivalent radius, metres.
    """

    model: Model
    solution: Solution
    grid: GridField | None
    field_lines: tuple = ()
    equivalent_radius_m: dict = field(default_factory=dict)


def view_box(model: Model, margin: float = 0.35) -> tuple[float, float, float, float]:
    """(xmin, ymin, xmax, ymax) in model units around the model, with a margin."""
    box = model.bounds() or (-50.0, -30.0, 50.0, 50.0)  # an empty drawing: a 100-unit field
    x0, y0, x1, y1 = box
    if model.ground_plane is not None:
        y0 = min(y0, model.ground_plane.y)
    size = max(x1 - x0, y1 - y0, 1e-12)
    pad = margin * size
    x0, x1 = x0 - pad, x1 + pad
    y0 = model.ground_plane.y - 0.05 * size if model.ground_plane is not None else y0 - pad
    return x0, y0, x1, y1 + pad


def grid_axes(model: Model, n_long: int = 120) -> tuple[np.ndarray, np.ndarray]:
    """Grid abscissae and ordinates in metres covering :func:`view_box` (at most the opening frame of
    :func:`app.framing.framing_box` and its own size around it), about ``n_long`` along the longer side."""
    x0, y0, x1, y1 = view_box(model)
    frame = framing_box(model)
    if frame is not None:  # the map is sharpest where the view opens (app.framing), and reaches a frame beyond
        fx0, fy0, fx1, fy1 = frame
        grow = max(fx1 - fx0, fy1 - fy0)
        x0, x1 = max(x0, fx0 - grow), min(x1, fx1 + grow)
        y0, y1 = max(y0, fy0 - grow), min(y1, fy1 + grow)
    # widen the short side so that the map fills a roughly square drawing area
    if (x1 - x0) < (y1 - y0):
        pad = 0.5 * ((y1 - y0) - (x1 - x0))
        x0, x1 = x0 - pad, x1 + pad
    elif model.ground_plane is None:
        pad = 0.5 * ((x1 - x0) - (y1 - y0))
        y0, y1 = y0 - pad, y1 + pad
    else:
        y1 = y0 + (x1 - x0)
    step = max(x1 - x0, y1 - y0) / n_long
    scale = model.metres_per_unit
    nx = max(int(round((x1 - x0) / step)), 8)
    ny = max(int(round((y1 - y0) / step)), 8)
    return np.linspace(x0, x1, nx) * scale, np.linspace(y0, y1, ny) * scale


def compute_results(
    model: Model,
    progress: Callable[[float, str], None] | None = None,
    cancel: Callable[[], bool] | None = None,
    *,
    grid_points: int = 120,
    n_field_lines: int = 48,
) -> Results:
    """Solve ``model`` and compute every figure the program draws.

    Raises the solver's errors (SolverError subclasses) unchanged; SolveCancelled on cancel.
    """
    def report(fraction: float, message: str) -> None:
        if progress is not None:
            progress(fraction, message)
        if cancel is not None and cancel():
            raise SolveCancelled("Solve cancelled.")

    solution = solver.solve(
        model, estimate_error=True,
        progress=lambda f, m: report(0.5 * f, m), cancel=cancel,
    )
    report(0.5, "Computing the potential and field maps")
    grid = None
    if grid_points > 0:
        x_m, y_m = grid_axes(model, grid_points)
        grid = solver.evaluate_on_grid(solution, x_m, y_m)
    report(0.8, "Tracing field lines")
    lines = solver.trace_field_lines(solution, n_field_lines) if n_field_lines > 0 else ()
    report(0.9, "Equivalent radii")
    radii = {}
    for k, conductor in enumerate(model.conductors):
        report(0.9 + 0.1 * k / len(model.conductors), f"Equivalent radius of {conductor.name}")
        try:
            radii[conductor.name] = solver.equivalent_radius_m(solution, [conductor.name])
        except solver.SolverError as exc:  # shown as "n/a" with the reason logged
            logger.warning("equivalent radius of %s: %s", conductor.name, exc)
    report(1.0, "Done")
    return Results(model, solution, grid, lines, radii)
