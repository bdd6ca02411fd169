"""A finer potential and field map over the framed view where the drawing's parts are small
against the map's cells (thin traces on a board), Qt-free.

The map of a solve covers the view and some way around it (:func:`app.jobs.results.grid_axes`)
at a fixed number of cells; a 35 µm trace on a 1.6 mm board then spans a cell or two and its
edges look like steps. :func:`detail_axes` gives a second, finer lattice over the framed view
(:func:`app.framing.framing_box`), its cell a third of the smallest part there, only when that
part spans fewer than :data:`CELLS_PER_PART` cells of the first map: a busbar whose 10 mm bars
span three cells gets none and costs nothing more. The values come from the solver
(:func:`solver.evaluate_on_grid`) like the first map's.
"""

from __future__ import annotations

import math

import numpy as np

from app.framing import framing_box
from solver import Model

#: A finer map is made when the smallest part in view spans fewer than this many cells of the
#: first map across its thinner side ...
CELLS_PER_PART = 2

#: ... and its cells are this many times finer than that part (or :data:`MOST_CELLS` allow).
DETAIL_CELLS_PER_PART = 3

#: Most cells along the longer side of the finer map (about 300 x 300 points at most).
MOST_CELLS = 300

#: The finer map is drawn only when its cell is at most this fraction of the first map's.
WORTH_IT = 0.6


def smallest_part(model: Model, box: tuple[float, float, float, float]) -> float | None:
    """The thinner side of the smallest part (conductor or dielectric shape) whose box meets
    ``box`` (model units); None when no part of positive size does."""
    sides = []
    for part in list(model.conductors) + list(model.dielectrics):
        for shape in part.shapes:
            x0, y0, x1, y1 = shape.bounds()
            if not all(math.isfinite(v) for v in (x0, y0, x1, y1)):
                continue
            if x1 < box[0] or x0 > box[2] or y1 < box[1] or y0 > box[3]:
                continue
            positive = [s for s in (x1 - x0, y1 - y0) if s > 0]
            if positive:
                sides.append(min(positive))
    return min(sides) if sides else None


def detail_axes(model: Model, grid_x_m: np.ndarray, grid_y_m: np.ndarray) -> tuple[np.ndarray, np.ndarray] | None:
    """Abscissae and ordinates (metres) of a finer map over the framed view, or None when the
    first map (``grid_x_m``, ``grid_y_m``) already resolves the parts in view.

    Examples
    --------
    A 35 µm trace under a map of 40 µm cells gets a finer map; a 10 mm bar does not:

    >>> from solver import Conductor, GroundPlane, Model, Rectangle
    >>> trace = Model(unit="mm", ground_plane=GroundPlane(0.0),
    ...               conductors=(Conductor("t", (Rectangle((0.0, 1.6), 3.0, 0.035),), "fixed", 1.0),))
    >>> coarse = np.linspace(-2.5e-3, 2.5e-3, 126)
    >>> detail_axes(trace, coarse, coarse) is not None
    True
    >>> bar = Model(unit="mm", ground_plane=GroundPlane(0.0),
    ...             conductors=(Conductor("b", (Rectangle((0.0, 100.0), 10.0, 100.0),), "fixed", 1.0),))
    >>> detail_axes(bar, np.linspace(-0.3, 0.3, 121), np.linspace(0.0, 0.6, 121)) is None
    True
    """
    frame = framing_box(model)
    if frame is None or len(grid_x_m) < 2:
        return None
    scale = model.metres_per_unit
    cell = float(grid_x_m[1] - grid_x_m[0]) / scale
    part = smallest_part(model, frame)
    if part is None or part >= CELLS_PER_PART * cell:
        return None
    x0, y0, x1, y1 = frame
    step = max(part / DETAIL_CELLS_PER_PART, max(x1 - x0, y1 - y0) / MOST_CELLS)
    if step > WORTH_IT * cell:
        return None
    nx = int(math.ceil((x1 - x0) / step)) + 1
    ny = int(math.ceil((y1 - y0) / step)) + 1
    return np.linspace(x0, x1, nx) * scale, np.linspace(y0, y1, ny) * scale
