"""The one engine behind sweeps, searches and spreads: run cases, in order, serially or on Dask.

A *case* is a mapping ``{parameter: value}`` (parameters are field paths, see
:mod:`solver.studies.paths`). :func:`run_case` turns the base project and one case into a
table row; it is a plain top-level function of plain data so that Dask can ship it to other
processes or machines. A case that fails (bad geometry, a solver error, anything) gives a row
whose ``error`` names the reason and whose figures are NaN; the other cases go on.
"""

from __future__ import annotations

import logging
import math
import os
from collections.abc import Callable, Mapping, Sequence
from typing import Any

from solver.errors import SolveCancelled
from solver.io.project_file import load_project, model_to_dict
from solver.model.model import Model
from solver.studies.figures import figure_function, split_figure
from solver.studies.paths import get_value, model_with_values, split_parameter
from solver.studies.table import StudyTable

logger = logging.getLogger(__name__)

#: progress(done, total): called after each finished case.
StudyProgress = Callable[[int, int], None]
#: cancel() -> bool: polled between cases; True stops the study.
StudyCancel = Callable[[], bool]

#: ``error`` text of cases left unrun after a cancel.
NOT_RUN = "not run: the study was cancelled"


def as_model(project: Model | Mapping | str | os.PathLike) -> Model:
    """A Model from a Model, a project dictionary or a project file path."""
    if isinstance(project, Model):
        return project
    if isinstance(project, Mapping):
        from solver.io.project_file import model_from_dict

        return model_from_dict(dict(project))
    return load_project(project)


def check_parameters(project: dict, parameters: Sequence[str]) -> None:
    """Raise FieldPathError early when a parameter path does not lead to a number."""
    for parameter in parameters:
        for path in split_parameter(parameter):
            get_value(project, path)


def run_case(project: dict, values: Mapping[str, float], figures: Sequence[str],
             estimate_error: bool = False, case: int = 0) -> dict:
    """Solve one case and return its table row (never raises for a bad case).

    Parameters
    ----------
    project : dict
        The base project dictionary (:func:`solver.model_to_dict`).
    values : mapping of parameter -> float
        The case's parameter values (project units).
    figures : sequence of str
        Figure names (see :mod:`solver.studies.figures`).
    estimate_error : bool
        Also make the two-mesh error estimate.
    case : int
        The case number written into the row.

    Returns
    -------
    dict
        ``case``, the parameters, the figures (SI; NaN on failure) and ``error`` ("" if none).
    """
    row: dict[str, Any] = {"case": case, **{k: float(v) for k, v in values.items()}}
    try:
        from solver.io.project_file import model_from_dict

        model = model_with_values(model_from_dict(project), values)
        row.update(figure_function(tuple(figures), estimate_error)(model))
        row["error"] = ""
    except Exception as e:  # noqa: BLE001 - a batch goes on past any one bad case; the row records why
        logger.warning("case %d (%s) failed: %s", case, dict(values), e)
        row.update({name: math.nan for name in figures})
        row["error"] = f"{type(e).__name__}: {e}"
    return row


def run_cases(
    project: Model | Mapping | str | os.PathLike,
    cases: Sequence[Mapping[str, float]],
    figures: Sequence[str],
    *,
    cluster: Any = None,
    estimate_error: bool = False,
    progress: StudyProgress | None = None,
    cancel: StudyCancel | None = None,
    notes: dict | None = None,
) -> StudyTable:
    """Run every case and return the rows in case order.

    Parameters
    ----------
    project : Model, project dict or path
    cases : sequence of {parameter: value}
    figures : sequence of figure names
    cluster : None, "local", a scheduler address ("tcp://host:8786") or a distributed.Client
        None runs the cases one after another in this process; anything else runs them on
        Dask (see :func:`solver.studies.dask_runner.run_on_dask`).
    estimate_error : bool
        Also make each case's two-mesh error estimate.
    progress, cancel : callables
        ``progress(done, total)`` after each case; ``cancel()`` polled between cases. Cases
        left unrun after a cancel have ``error`` = :data:`NOT_RUN`.
    """
    base = model_to_dict(as_model(project))
    for name in figures:
        split_figure(name)
    parameters = tuple(dict.fromkeys(k for c in cases for k in c))
    check_parameters(base, parameters)
    if cluster is None:
        rows = _run_serially(base, cases, tuple(figures), estimate_error, progress, cancel)
    else:
        from solver.studies.dask_runner import run_on_dask

        rows = run_on_dask(base, cases, tuple(figures), cluster=cluster, estimate_error=estimate_error,
                           progress=progress, cancel=cancel)
    return StudyTable(parameters, tuple(figures), tuple(rows), dict(notes or {}))


def not_run_row(values: Mapping[str, float], figures: Sequence[str], case: int) -> dict:
    return {"case": case, **{k: float(v) for k, v in values.items()},
            **{n: math.nan for n in figures}, "error": NOT_RUN}


def _run_serially(base, cases, figures, estimate_error, progress, cancel) -> list[dict]:
    rows: list[dict] = []
    for i, values in enumerate(cases):
        if cancel is not None and cancel():
            logger.info("study cancelled after %d of %d cases", i, len(cases))
            rows.extend(not_run_row(v, figures, j) for j, v in enumerate(cases[i:], start=i))
            break
        rows.append(run_case(base, values, figures, estimate_error, i))
        if progress is not None:
            progress(i + 1, len(cases))
    return rows


def raise_if_cancelled(cancel: StudyCancel | None) -> None:
    """Raise SolveCancelled when ``cancel()`` is True (for loops that cannot return partial rows)."""
    if cancel is not None and cancel():
        raise SolveCancelled("Study cancelled.")
