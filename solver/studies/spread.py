"""Tolerance spread: Monte Carlo over fields with stated distributions, plus sensitivities.

Each varied field gets a distribution around its nominal value (the value in the project):
:class:`Normal` (standard deviation) or :class:`Uniform` (half-width). All samples are drawn
up front from ``numpy.random.default_rng(seed)``, so a run is reproducible whatever runs the
cases and in whatever order they finish. The cases of the Monte Carlo run and of the
first-order sensitivities (central finite differences at the nominal point, step a tenth of
each spread) run as one batch through :func:`solver.studies.engine.run_cases`.
"""

from __future__ import annotations

import os
from collections.abc import Mapping, Sequence
from dataclasses import dataclass
from typing import Any

import numpy as np

from solver.errors import SolverError
from solver.io.project_file import model_to_dict
from solver.model.model import Model
from solver.studies.cases import StudyCancel, StudyProgress, as_model, check_parameters
from solver.studies.engine import run_cases
from solver.studies.paths import get_value, split_parameter
from solver.studies.table import StudyTable

#: Finite-difference step as a fraction of each field's spread (std or half-width).
SENSITIVITY_STEP_FRACTION = 0.1


@dataclass(frozen=True)
class Normal:
    """Normal distribution: standard deviation ``std`` about ``mean`` (None: the nominal value)."""

    std: float
    mean: float | None = None

    def draw(self, rng: np.random.Generator, nominal: float, n: int) -> np.ndarray:
        return rng.normal(nominal if self.mean is None else self.mean, self.std, n)

    @property
    def spread(self) -> float:
        return float(self.std)


@dataclass(frozen=True)
class Uniform:
    """Uniform distribution of half-width ``half_width`` about ``centre`` (None: the nominal value)."""

    half_width: float
    centre: float | None = None

    def draw(self, rng: np.random.Generator, nominal: float, n: int) -> np.ndarray:
        c = nominal if self.centre is None else self.centre
        return rng.uniform(c - self.half_width, c + self.half_width, n)

    @property
    def spread(self) -> float:
        return float(self.half_width)


Distribution = Normal | Uniform


def parse_distribution(text: str) -> Distribution:
    """``"normal:0.05"`` -> Normal(0.05); ``"uniform:0.1"`` -> Uniform(0.1) (project units)."""
    kind, _, value = text.partition(":")
    try:
        size = float(value)
    except ValueError:
        raise SolverError(f"Distribution '{text}': write normal:STD or uniform:HALF_WIDTH, e.g. normal:0.05.") from None
    if kind == "normal":
        return Normal(size)
    if kind == "uniform":
        return Uniform(size)
    raise SolverError(f"Distribution '{text}': kind '{kind}' is not known; use normal or uniform.")


@dataclass(frozen=True)
class SpreadResult:
    """Outcome of a tolerance spread.

    Attributes
    ----------
    table : StudyTable
        The Monte Carlo cases (in draw order).
    nominal : dict
        Figures at the nominal point (SI).
    percentiles : dict
        ``{figure: {percentile: value}}`` over the successful cases.
    histograms : dict
        ``{figure: (counts, bin_edges)}``, numpy arrays.
    sensitivities : dict
        ``{figure: {parameter: d figure / d parameter}}`` (SI per project unit).
    contributions : dict
        ``{figure: {parameter: |sensitivity| * spread}}``: how far one spread of each field
        moves the figure (the largest moves it most).
    seed : int
    n_failed : int
    """

    table: StudyTable
    nominal: dict
    percentiles: dict
    histograms: dict
    sensitivities: dict
    contributions: dict
    seed: int
    n_failed: int


def _as_distribution(d: Distribution | str) -> Distribution:
    return parse_distribution(d) if isinstance(d, str) else d


def spread(
    project: Model | Mapping | str | os.PathLike,
    distributions: Mapping[str, Distribution | str],
    figures: Sequence[str],
    *,
    n_cases: int = 100,
    seed: int = 0,
    percentiles: Sequence[float] = (5.0, 50.0, 95.0),
    bins: int = 20,
    sensitivities: bool = True,
    cluster: Any = None,
    progress: StudyProgress | None = None,
    cancel: StudyCancel | None = None,
) -> SpreadResult:
    """Monte Carlo tolerance spread of figures, with first-order sensitivities.

    Parameters
    ----------
    project : Model, project dict or path
    distributions : mapping of parameter -> Normal, Uniform or "normal:STD" / "uniform:HALF"
        Spreads in the project's units.
    figures : sequence of figure names
    n_cases : int
        Monte Carlo cases.
    seed : int
        Seed of ``numpy.random.default_rng``; the same seed gives the same cases.
    percentiles : sequence of float
        Percentiles (0-100) to report.
    bins : int
        Histogram bins.
    sensitivities : bool
        Also solve 2 cases per parameter (plus the nominal) for d figure / d parameter.
    cluster, progress, cancel :
        As in :func:`solver.studies.engine.run_cases`.

    Returns
    -------
    SpreadResult
    """
    dists = {p: _as_distribution(d) for p, d in distributions.items()}
    base = model_to_dict(as_model(project))
    check_parameters(base, list(dists))
    nominal = {p: get_value(base, split_parameter(p)[0]) for p in dists}
    rng = np.random.default_rng(seed)
    samples = {p: d.draw(rng, nominal[p], n_cases) for p, d in dists.items()}
    cases = [{p: float(samples[p][i]) for p in dists} for i in range(n_cases)]
    steps = {p: SENSITIVITY_STEP_FRACTION * d.spread for p, d in dists.items()}
    extra = [dict(nominal)]
    if sensitivities:
        for p in dists:
            extra += [{**nominal, p: nominal[p] + steps[p]}, {**nominal, p: nominal[p] - steps[p]}]
    table = run_cases(base, cases + extra, figures, cluster=cluster, progress=progress, cancel=cancel)
    mc_rows, fd_rows = table.rows[:n_cases], table.rows[n_cases:]
    ok = [r for r in mc_rows if not r["error"]]
    pct: dict[str, dict[float, float]] = {}
    hist: dict[str, tuple[np.ndarray, np.ndarray]] = {}
    sens: dict[str, dict[str, float]] = {}
    contrib: dict[str, dict[str, float]] = {}
    for f in figures:
        values = np.array([r[f] for r in ok], dtype=float)
        values = values[np.isfinite(values)]
        pct[f] = {float(q): float(v) for q, v in zip(percentiles, np.percentile(values, percentiles))} if values.size else {}
        hist[f] = np.histogram(values, bins=bins) if values.size else (np.zeros(0, int), np.zeros(0))
        if sensitivities:
            sens[f], contrib[f] = {}, {}
            for i, p in enumerate(dists):
                up, down = fd_rows[1 + 2 * i][f], fd_rows[2 + 2 * i][f]
                slope = (up - down) / (2 * steps[p])
                sens[f][p] = float(slope)
                contrib[f][p] = float(abs(slope) * dists[p].spread)
    mc_table = StudyTable(tuple(dists), tuple(figures), mc_rows, {"seed": seed, "n_cases": n_cases})
    return SpreadResult(mc_table, {f: fd_rows[0][f] for f in figures}, pct, hist, sens, contrib, seed,
                        len(mc_rows) - len(ok))
