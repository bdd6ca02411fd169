"""Large models (many conductors) by the high-order solver on coarse panels, in one dense solve.

A model of many conductors, whose low-order mesh would not fit the dense memory budget (the
100-conductor bus: about 65,000 panels, a 32 GB matrix), is solved here instead: exact outlines with few
panels, because straight faces and exact arcs need few, and :data:`LARGE_MODEL_ORDER`
Gauss-Legendre nodes per panel instead of 16:

* panel sizes as the first mesh of :mod:`solver.bem.high_order.adaptive` (a quarter of the
  conductor's outline, twice its gap to the nearest other conductor), at most a quarter turn;
* no grading at the tangent-continuous joints of fillets and faces; :data:`CORNER_LEVELS`
  graded panels toward sharp corners (the inside corners of a box).

A rounded bar then has 8 panels and 64 unknowns, the 100-bar bus about 7,600. The matrix is
assembled in blocks straight into place and factorised in place with all right-hand sides
solved at once (:mod:`solver.bem.high_order.nystrom`); the memory is estimated and checked
before it is allocated (:mod:`solver.bem.high_order.memory`).

Error estimate: the same model is solved again with :data:`CHECK_ORDER` nodes per panel on
the same panels (about half the memory and a third of the time), and the relative change of
the capacitance matrix is reported for the finer solve, as the low-order solver reports the
change from its half-resolution mesh. Measured on the 3 x 3 bus (1,185 unknowns): the change
was 1.3e-6 and the true error of the 8-node solve 4.0e-7 (against the adaptive 16-node solve
to an estimated 1e-10 with 5,569 unknowns, and likewise against twice the panels with 16
nodes), so the estimate was 3.3 times pessimistic there (see ``python -m solver.bench.bus``).
"""

from __future__ import annotations

import logging
import time
from dataclasses import replace

import numpy as np

from solver.bem.high_order.adaptive import MAX_SWEEP_RAD, piece_sizes_m, relative_difference
from solver.bem.high_order.nystrom import NodalSolve, check_supported
from solver.bem.high_order.solution import HighOrderSolution, high_order_solution
from solver.mesh.curved_panels import CurvedPanels, curved_panels
from solver.mesh.curved_pieces import boundary_pieces
from solver.mesh.panels import MeshSettings
from solver.model.model import Model

logger = logging.getLogger(__name__)

#: Models with this many conductors or more (in one medium) are large. A plain threshold: it is
#: cheap to test, whereas counting the low-order panels of the 100-bar bus took 13 s; that
#: bus's low-order mesh (65,000 panels) far exceeds the dense budget (about 16,000).
LARGE_MODEL_CONDUCTORS = 30

#: Gauss-Legendre nodes per panel on large models.
LARGE_MODEL_ORDER = 8

#: Nodes per panel of the check solve that gives the error estimate.
CHECK_ORDER = 6

#: Graded panels toward each sharp corner of a large model.
CORNER_LEVELS = 2

#: Size ratio of neighbouring panels graded toward a corner.
GRADING_RATIO = 4.0


def is_large(model: Model) -> bool:
    """True for a model of at least :data:`LARGE_MODEL_CONDUCTORS` conductors in one homogeneous
    medium: :func:`solver.solve` then uses :func:`solve_large` instead of the low-order mesh."""
    if any(d.eps_r != model.background_eps_r for d in model.dielectrics):
        return False
    return len(model.conductors) >= LARGE_MODEL_CONDUCTORS


def coarse_panels(model: Model, order: int = LARGE_MODEL_ORDER) -> CurvedPanels:
    """Few high-order panels on the exact outlines of ``model`` (see module doc), metres."""
    pieces = boundary_pieces(model)
    return curved_panels(pieces, piece_sizes_m(model, pieces), MAX_SWEEP_RAD, CORNER_LEVELS, GRADING_RATIO,
                         order=order, smooth_joint_levels=0)


def solve_large(model: Model, estimate_error: bool = True) -> HighOrderSolution:
    """Solve a large ``model`` on coarse high-order panels in one dense, in-place solve.

    Parameters
    ----------
    model : Model
        Conductors in one homogeneous medium.
    estimate_error : bool
        Also solve with :data:`CHECK_ORDER` nodes per panel and record the relative change of
        the capacitance matrix as ``estimated_relative_error``.

    Raises
    ------
    HighOrderUnsupported
        For models with dielectric regions of another permittivity.
    MeshTooLargeError
        When the system would not fit in memory (checked before it is allocated).
    """
    check_supported(model)
    timings: dict[str, float] = {}
    tick = time.perf_counter()
    panels = coarse_panels(model)
    timings["meshing"] = time.perf_counter() - tick
    tick = time.perf_counter()
    solve = NodalSolve(model, panels)
    timings["solving"] = time.perf_counter() - tick
    logger.info("large model: %d unknowns on %d panels, %.1f s, about %.2f GB",
                solve.n_unknowns, panels.n_panels, timings["solving"], solve.memory_bytes / 1e9)
    estimate = None
    if estimate_error:
        tick = time.perf_counter()
        figures = solve.capacitance_maxwell_F_per_m()
        check_panels = CurvedPanels(panels.pieces, panels.piece_index, panels.s0, panels.s1, CHECK_ORDER)
        check = NodalSolve(model, check_panels).capacitance_maxwell_F_per_m()
        estimate = relative_difference(figures, check) if figures.size else None
        timings["checking"] = time.perf_counter() - tick
    stages = tuple((k, round(v, 6)) for k, v in timings.items())
    solution = high_order_solution(solve, MeshSettings.for_density(model.mesh_density), estimate, None, stages)
    return replace(solution, coarse_mesh_panels=None)


def unknowns_per_conductor(panels: CurvedPanels) -> float:
    """Mean nodes per conductor of ``panels``."""
    n_conductors = len(np.unique(panels.conductor_index))
    return panels.n_nodes / max(n_conductors, 1)


__all__ = ["is_large", "coarse_panels", "solve_large", "LARGE_MODEL_ORDER", "CHECK_ORDER", "unknowns_per_conductor"]
