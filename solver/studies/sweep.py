"""Sweeps: vary one or several fields over a grid of values and collect figures per case."""

from __future__ import annotations

import itertools
import os
from collections.abc import Mapping, Sequence
from typing import Any

import numpy as np

from solver.model.model import Model
from solver.studies.cases import StudyCancel, StudyProgress
from solver.studies.engine import run_cases
from solver.studies.table import StudyTable


def grid_cases(vary: Mapping[str, Sequence[float]]) -> list[dict[str, float]]:
    """Every combination of the values in ``vary`` (the last parameter changes fastest).

    Examples
    --------
    >>> grid_cases({"a": [1, 2], "b": [10, 20]})
    [{'a': 1.0, 'b': 10.0}, {'a': 1.0, 'b': 20.0}, {'a': 2.0, 'b': 10.0}, {'a': 2.0, 'b': 20.0}]
    """
    names = list(vary)
    values = [np.asarray(vary[n], dtype=float).ravel() for n in names]
    return [dict(zip(names, map(float, combo))) for combo in itertools.product(*values)]


def sweep(
    project: Model | Mapping | str | os.PathLike,
    vary: Mapping[str, Sequence[float]],
    figures: Sequence[str],
    *,
    cluster: Any = None,
    estimate_error: bool = False,
    progress: StudyProgress | None = None,
    cancel: StudyCancel | None = None,
) -> StudyTable:
    """Solve the project on a grid of parameter values and tabulate the figures.

    Parameters
    ----------
    project : Model, project dict or path to a project file
    vary : mapping of parameter -> values
        Parameters are field paths (:mod:`solver.studies.paths`), values in the project's
        units; several parameters make a grid (every combination).
    figures : sequence of str
        Figure names (:mod:`solver.studies.figures`), e.g. ``"Z0_ohm"``, ``"C_F_per_m.a.a"``.
    cluster : None, "local", scheduler address or distributed.Client
        Where to run (None: here, one case after another).
    estimate_error, progress, cancel :
        As in :func:`solver.studies.engine.run_cases`.

    Returns
    -------
    StudyTable

    Examples
    --------
    >>> from solver.studies import sweep
    >>> t = sweep("sample_geometries/twin_lead.json",
    ...           {"conductors.a.shapes.0.radius": [0.5, 1.0]}, ["C_F_per_m.a.a"])  # doctest: +SKIP
    """
    return run_cases(project, grid_cases(vary), figures, cluster=cluster, estimate_error=estimate_error,
                     progress=progress, cancel=cancel)
