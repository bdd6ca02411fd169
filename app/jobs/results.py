"""Everything the program shows after a solve, computed off the GUI thread in two stages (Qt-free).

:func:`compute_first` asks the solver for the solution and the potential and field maps on a
grid around the model: enough to draw. :func:`compute_rest` then adds the error estimate, the
field lines and each conductor's equivalent radius. :func:`compute_results` runs both.
Every stage polls ``cancel`` and raises SolveCancelled.

Equivalent radii depend on one conductor's outline alone (taken in isolation), so they are
kept per conductor geometry (:class:`RadiusCache`): an edit of one conductor recomputes only
that conductor's radius.
"""

from __future__ import annotations

import logging
import time
from collections import OrderedDict
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
    complete : False for the first stage (solution and maps; no error estimate, field lines
        or radii yet).
    seconds : the first stage's wall-clock seconds ("solve", "map") and when it began and
        ended ("began", "ended": :func:`time.perf_counter` readings), for :mod:`app.bench_window`.
    """

    model: Model
    solution: Solution
    grid: GridField | None
    field_lines: tuple = ()
    equivalent_radius_m: dict = field(default_factory=dict)
    complete: bool = True
    seconds: dict = field(default_factory=dict)


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


class RadiusCache:
    """Equivalent radii by conductor geometry (outline, length unit, mesh settings), the
    ``size`` most recent kept. Thread-safe for one writer (the solve thread)."""

    def __init__(self, size: int = 64) -> None:
        self.size = size
        self._values: OrderedDict = OrderedDict()
        self.computed = 0  # radii computed (not found), for tests

    @staticmethod
    def key(solution: Solution, name: str) -> tuple:
        model = solution.model
        return (model.conductor(name).shapes, model.metres_per_unit, solution.mesh.settings)

    def radius_m(self, solution: Solution, name: str) -> float:
        key = self.key(solution, name)
        if key in self._values:
            self._values.move_to_end(key)
            return self._values[key]
        value = solver.equivalent_radius_m(solution, [name])
        self.computed += 1
        self._values[key] = value
        while len(self._values) > self.size:
            self._values.popitem(last=False)
        return value


#: The cache the desktop program's solves share.
RADII = RadiusCache()


def _reporter(progress, cancel, start: float, span: float) -> Callable[[float, str], None]:
    def report(fraction: float, message: str) -> None:
        if progress is not None:
            progress(start + span * fraction, message)
        if cancel is not None and cancel():
            raise SolveCancelled("Solve cancelled.")

    return report


def compute_first(
    model: Model,
    progress: Callable[[float, str], None] | None = None,
    cancel: Callable[[], bool] | None = None,
    *,
    grid_points: int = 120,
    edits: solver.GeometryEditSolver | None = None,
) -> Results:
    """The solution (no error estimate) and the maps: what the window draws first.

    With ``edits`` (one per sequence of solves, used by one thread at a time) a model that
    differs from the previous one by a few conductors' geometry reuses the factorised block of
    the others (:class:`solver.GeometryEditSolver`), as while dragging a part.

    Raises the solver's errors (SolverError subclasses) unchanged; SolveCancelled on cancel.
    """
    report = _reporter(progress, cancel, 0.0, 1.0)
    started = time.perf_counter()
    if edits is None:
        solution = solver.solve(
            model, estimate_error=False, progress=lambda f, m: report(0.6 * f, m), cancel=cancel,
        )
    else:
        report(0.0, "Solving (reusing the parts that did not change)")
        solution = edits.solve(model, cancel=cancel)
    solved = time.perf_counter()
    report(0.6, "Computing the potential and field maps")
    grid = None
    if grid_points > 0:
        x_m, y_m = grid_axes(model, grid_points)
        grid = solver.evaluate_on_grid(solution, x_m, y_m)
    ended = time.perf_counter()
    seconds = {"solve": solved - started, "map": ended - solved, "began": started, "ended": ended}
    report(1.0, "Solution and maps ready")
    return Results(model, solution, grid, complete=False, seconds=seconds)


def compute_rest(
    first: Results,
    progress: Callable[[float, str], None] | None = None,
    cancel: Callable[[], bool] | None = None,
    *,
    n_field_lines: int = 48,
    radii: RadiusCache | None = None,
) -> Results:
    """``first`` completed with the error estimate, the field lines and the equivalent radii."""
    report = _reporter(progress, cancel, 0.0, 1.0)
    solution = solver.with_error_estimate(
        first.solution, progress=lambda f, m: report(0.5 * f, m), cancel=cancel
    )
    report(0.5, "Tracing field lines")
    lines = solver.trace_field_lines(solution, n_field_lines, cancel=cancel) if n_field_lines > 0 else ()
    report(0.8, "Equivalent radii")
    cache = RADII if radii is None else radii
    found = {}
    conductors = first.model.conductors
    for k, conductor in enumerate(conductors):
        report(0.8 + 0.2 * k / len(conductors), f"Equivalent radius of {conductor.name}")
        try:
            found[conductor.name] = cache.radius_m(solution, conductor.name)
        except solver.SolverError as exc:  # shown as "n/a" with the reason logged
            logger.warning("equivalent radius of %s: %s", conductor.name, exc)
    report(1.0, "Done")
    return Results(first.model, solution, first.grid, lines, found, complete=True, seconds=first.seconds)


def compute_results(
    model: Model,
    progress: Callable[[float, str], None] | None = None,
    cancel: Callable[[], bool] | None = None,
    *,
    grid_points: int = 120,
    n_field_lines: int = 48,
) -> Results:
    """Solve ``model`` and compute every figure the program draws (both stages).

    Raises the solver's errors (SolverError subclasses) unchanged; SolveCancelled on cancel.
    """
    first = compute_first(model, _reporter(progress, None, 0.0, 0.5), cancel, grid_points=grid_points)
    return compute_rest(first, _reporter(progress, None, 0.5, 0.5), cancel, n_field_lines=n_field_lines)
