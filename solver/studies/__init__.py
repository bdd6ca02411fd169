"""Studies: sweeps, goal search and tolerance spreads over a project, serially or on Dask.

>>> from solver.studies import grid_cases
>>> len(grid_cases({"conductors.trace.shapes.0.width": [1, 2, 3], "dielectrics.board.eps_r": [4.2, 4.6]}))
6
"""

from solver.studies.cases import NOT_RUN, run_case
from solver.studies.engine import run_cases
from solver.studies.figures import (
    FIGURE_WORDS,
    FigureCache,
    FigureNameError,
    figure_function,
)
from solver.studies.paths import (
    FieldPathError,
    get_value,
    model_with_values,
    with_values,
)
from solver.studies.search import GoalNotBracketedError, SearchResult, search
from solver.studies.spread import (
    Normal,
    SpreadResult,
    Uniform,
    parse_distribution,
    spread,
)
from solver.studies.sweep import grid_cases, sweep
from solver.studies.table import StudyTable

__all__ = [
    "FIGURE_WORDS",
    "NOT_RUN",
    "FieldPathError",
    "FigureCache",
    "FigureNameError",
    "GoalNotBracketedError",
    "Normal",
    "SearchResult",
    "SpreadResult",
    "StudyTable",
    "Uniform",
    "figure_function",
    "get_value",
    "grid_cases",
    "model_with_values",
    "parse_distribution",
    "run_case",
    "run_cases",
    "search",
    "spread",
    "sweep",
    "with_values",
]
