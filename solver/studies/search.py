"""Goal search: the value of one parameter that makes one figure equal a target.

The figure, as a function of the parameter, is handed to scipy's bracketing root finders
(:func:`scipy.optimize.brentq` or :func:`scipy.optimize.toms748`). Every solve is kept: the
bracket ends, an optional scan for a sign change and the root finder's steps share one memo,
so no case is solved twice, and every evaluation is returned as a table.
"""

from __future__ import annotations

import logging
import math
import os
from collections.abc import Mapping
from dataclasses import dataclass

import numpy as np
import scipy.optimize

from solver.errors import SolverError
from solver.io.project_file import model_to_dict
from solver.model.model import Model
from solver.studies.cases import (
    StudyCancel,
    StudyProgress,
    as_model,
    check_parameters,
    raise_if_cancelled,
    run_case,
)
from solver.studies.figures import split_figure
from solver.studies.table import StudyTable

logger = logging.getLogger(__name__)

ROOT_FINDERS = {"brentq": scipy.optimize.brentq, "toms748": scipy.optimize.toms748}


class GoalNotBracketedError(SolverError):
    """The figure does not cross the target between the bracket ends."""


@dataclass(frozen=True)
class SearchResult:
    """The outcome of a goal search.

    Attributes
    ----------
    parameter, figure : str
        What was varied and what was matched.
    target : float
        Wanted figure value (SI).
    value : float
        Parameter value found (project units).
    figure_value : float
        Figure at ``value`` (SI).
    parameter_tolerance : float
        Absolute tolerance of ``value`` asked of the root finder (project units).
    n_solves : int
        Cases solved (each once).
    evaluations : StudyTable
        Every case solved, in the order solved.
    """

    parameter: str
    figure: str
    target: float
    value: float
    figure_value: float
    parameter_tolerance: float
    n_solves: int
    evaluations: StudyTable


def search(
    project: Model | Mapping | str | os.PathLike,
    parameter: str,
    figure: str,
    target: float,
    bracket: tuple[float, float],
    *,
    scan: int = 0,
    method: str = "brentq",
    xtol: float | None = None,
    progress: StudyProgress | None = None,
    cancel: StudyCancel | None = None,
) -> SearchResult:
    """Find the value of ``parameter`` in ``bracket`` where ``figure`` equals ``target``.

    Parameters
    ----------
    project : Model, project dict or path
    parameter : str
        A field path (or ``+``-joined paths), project units.
    figure : str
        A figure name, e.g. ``"Z0_ohm"``.
    target : float
        Wanted figure value, SI units.
    bracket : (float, float)
        Parameter range to search, project units.
    scan : int
        If > 0 and the figure does not change side of the target across the bracket, try this
        many evenly spaced interior points for a sign change first (every solve is reused).
    method : {"brentq", "toms748"}
    xtol : float, optional
        Absolute parameter tolerance; default 1e-5 of the bracket width (well below the
        solver's own error for smooth figures).
    progress : callable(done, total), optional
        Called after each solve (``total`` is an estimate).
    cancel : callable() -> bool, optional
        Raises SolveCancelled when it returns True.

    Raises
    ------
    GoalNotBracketedError
        When no sign change of (figure - target) is found; the message gives both end values.

    Examples
    --------
    >>> from solver.studies import search
    >>> r = search("sample_geometries/microstrip_on_substrate.json", "conductors.trace.shapes.0.width",
    ...            "Z0_ohm", 50.0, (1.0, 5.0))  # doctest: +SKIP
    """
    if method not in ROOT_FINDERS:
        raise SolverError(f"Search method '{method}' is not known; use one of {', '.join(ROOT_FINDERS)}.")
    split_figure(figure)
    base = model_to_dict(as_model(project))
    check_parameters(base, [parameter])
    lo, hi = sorted(map(float, bracket))
    if not hi > lo:
        raise SolverError(f"Search bracket ({lo}, {hi}) of '{parameter}' is empty; give two different values.")
    tol = float(xtol) if xtol is not None else 1e-5 * (hi - lo)
    memo: dict[float, dict] = {}
    expected = 2 + scan + 12

    def residual(x: float) -> float:
        x = float(x)
        if x not in memo:
            raise_if_cancelled(cancel)
            row = run_case(base, {parameter: x}, [figure], case=len(memo))
            memo[x] = row
            if progress is not None:
                progress(len(memo), max(expected, len(memo) + 1))
            if row["error"]:
                raise SolverError(f"Search of '{parameter}' stopped: the case {parameter} = {x:g} failed: {row['error']}")
        return memo[x][figure] - target

    a, b = lo, hi
    fa, fb = residual(a), residual(b)
    if np.sign(fa) == np.sign(fb) and scan > 0:
        for x in np.linspace(lo, hi, scan + 2)[1:-1]:
            fx = residual(float(x))
            if np.sign(fx) != np.sign(fa):
                b, fb = float(x), fx
                break
            a, fa = float(x), fx
    if not (math.isfinite(fa) and math.isfinite(fb)) or np.sign(fa) == np.sign(fb):
        raise GoalNotBracketedError(
            f"'{figure}' does not cross {target:g} for '{parameter}' between {lo:g} and {hi:g}: it is "
            f"{memo[lo][figure]:.6g} and {memo[hi][figure]:.6g} at the ends; widen the bracket or use scan."
        )
    x = ROOT_FINDERS[method](residual, a, b, xtol=tol)
    residual(x)
    if progress is not None:
        progress(len(memo), len(memo))
    rows = tuple(memo.values())
    logger.info("goal search: %s = %.6g gives %s = %.6g after %d solves", parameter, x, figure,
                memo[float(x)][figure], len(rows))
    return SearchResult(parameter, figure, float(target), float(x), float(memo[float(x)][figure]), tol,
                        len(rows), StudyTable((parameter,), (figure,), rows))
