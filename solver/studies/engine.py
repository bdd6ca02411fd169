"""The one engine behind sweeps, searches and spreads: run cases, in order, serially or on Dask.

A *case* is a mapping ``{parameter: value}`` (parameters are field paths, see
:mod:`solver.studies.paths`); :func:`solver.studies.cases.run_case` turns the base project and
one case into a table row. A case that fails gives a row naming the reason; the others go on.
"""

from __future__ import annotations

import logging
import os
from collections.abc import Mapping, Sequence
from typing import Any

from solver.io.project_file import model_to_dict
from solver.model.model import Model
from solver.studies.cases import (
    StudyCancel,
    StudyProgress,
    as_model,
    check_parameters,
    not_run_row,
    run_case,
)
from solver.studies.dask_runner import run_on_dask
from solver.studies.figures import split_figure
from solver.studies.table import StudyTable

logger = logging.getLogger(__name__)


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
        rows = run_on_dask(base, cases, tuple(figures), cluster=cluster, estimate_error=estimate_error,
                           progress=progress, cancel=cancel)
    return StudyTable(parameters, tuple(figures), tuple(rows), dict(notes or {}))


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
