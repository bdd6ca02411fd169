"""One study case: a base project and ``{parameter: value}`` in, one table row out.

:func:`run_case` is a plain top-level function of plain data so that Dask can ship it to
other processes or machines (:mod:`solver.studies.dask_runner`); the serial runner in
:mod:`solver.studies.engine` calls it too. A case that fails (bad geometry, a solver error,
anything) gives a row whose ``error`` names the reason and whose figures are NaN.
"""

from __future__ import annotations

import logging
import math
import os
from collections.abc import Callable, Mapping, Sequence
from typing import Any

from solver.errors import SolveCancelled
from solver.io.project_file import load_project, model_from_dict
from solver.model.model import Model
from solver.studies.figures import figure_function
from solver.studies.paths import get_value, model_with_values, split_parameter

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
        model = model_with_values(model_from_dict(project), values)
        row.update(figure_function(tuple(figures), estimate_error)(model))
        row["error"] = ""
    except Exception as e:  # noqa: BLE001 - a batch goes on past any one bad case; the row records why
        logger.warning("case %d (%s) failed: %s", case, dict(values), e)
        row.update({name: math.nan for name in figures})
        row["error"] = f"{type(e).__name__}: {e}"
    return row


def not_run_row(values: Mapping[str, float], figures: Sequence[str], case: int) -> dict:
    return {"case": case, **{k: float(v) for k, v in values.items()},
            **{n: math.nan for n in figures}, "error": NOT_RUN}


def raise_if_cancelled(cancel: StudyCancel | None) -> None:
    """Raise SolveCancelled when ``cancel()`` is True (for loops that cannot return partial rows)."""
    if cancel is not None and cancel():
        raise SolveCancelled("Study cancelled.")
