"""Figures a study can collect, by name, computed from as few solves as possible.

A figure name is one word, optionally followed by dotted conductor names:

=================================  ==========================================================
``C_F_per_m.<a>.<b>``              Maxwell capacitance matrix entry (with dielectrics), F/m
``C_mutual_F_per_m.<a>.<b>``       mutual ("circuit") form entry, F/m
``C_vacuum_F_per_m.<a>.<b>``       Maxwell entry with every eps_r = 1, F/m
``Z0_ohm``, ``eps_eff``,           one signal conductor: characteristic impedance, effective
``delay_s_per_m``                  permittivity, propagation delay
``Z_even_ohm``, ``Z_odd_ohm``,     symmetric pair: even/odd-mode impedance, differential
``Z_diff_ohm``, ``Z_common_ohm``,  (2 Z_odd) and common (Z_even / 2) impedance, and the
``eps_eff_even``, ``eps_eff_odd``  even/odd effective permittivities
``peak_field_V_per_m.<a>``         largest surface field on conductor a at the set potentials
``margin.<a>``                     the margin that sets conductor a's high-voltage status (its
                                   verdict's deciding margin, solver.judge_peak; refined hot-spot
                                   analysis; needs a rounded conductor)
``equivalent_radius_m.<a>[.<b>]``  equivalent radius (logarithmic capacity) of the named
                                   conductors tied together
``relative_error``                 estimated relative error of C (two-mesh estimate)
=================================  ==========================================================

:class:`FigureCache` holds one case's solves so that every figure of that case reuses them:
C, C0 and the transmission-line figures cost two solves together; the peak field reuses the
solve with dielectrics.
"""

from __future__ import annotations

import math
from collections.abc import Callable
from functools import cached_property

import numpy as np

from solver.errors import SolverError
from solver.model.model import Model

#: Figure words and what they mean (for ``--help`` and error messages).
FIGURE_WORDS: dict[str, str] = {
    "C_F_per_m": "Maxwell capacitance entry C_F_per_m.<a>.<b>, F/m",
    "C_mutual_F_per_m": "mutual-form capacitance entry C_mutual_F_per_m.<a>.<b>, F/m",
    "C_vacuum_F_per_m": "Maxwell entry with every eps_r = 1, C_vacuum_F_per_m.<a>.<b>, F/m",
    "Z0_ohm": "characteristic impedance of one signal conductor, ohm",
    "eps_eff": "effective permittivity of one signal conductor",
    "delay_s_per_m": "propagation delay of one signal conductor, s/m",
    "Z_even_ohm": "even-mode impedance of a symmetric pair, ohm",
    "Z_odd_ohm": "odd-mode impedance of a symmetric pair, ohm",
    "Z_diff_ohm": "differential impedance (2 Z_odd), ohm",
    "Z_common_ohm": "common-mode impedance (Z_even / 2), ohm",
    "eps_eff_even": "even-mode effective permittivity",
    "eps_eff_odd": "odd-mode effective permittivity",
    "peak_field_V_per_m": "largest surface field on a conductor, peak_field_V_per_m.<a>, V/m",
    "margin": "the margin that sets a conductor's high-voltage status, margin.<a>",
    "equivalent_radius_m": "equivalent radius of conductors tied together, equivalent_radius_m.<a>[.<b>...], m",
    "relative_error": "estimated relative error of the capacitance matrix",
}

_LINE_ATTRIBUTES = {
    "Z0_ohm": "characteristic_impedance_ohm",
    "eps_eff": "effective_permittivity",
    "delay_s_per_m": "delay_s_per_m",
    "Z_even_ohm": "even_mode_impedance_ohm",
    "Z_odd_ohm": "odd_mode_impedance_ohm",
    "Z_diff_ohm": "differential_impedance_ohm",
    "Z_common_ohm": "common_mode_impedance_ohm",
    "eps_eff_even": "even_mode_effective_permittivity",
    "eps_eff_odd": "odd_mode_effective_permittivity",
}


class FigureNameError(SolverError):
    """A figure name is unknown or does not fit the model."""


def split_figure(name: str) -> tuple[str, tuple[str, ...]]:
    """The figure word and its conductor names: ``"C_F_per_m.a.b"`` -> ``("C_F_per_m", ("a", "b"))``."""
    word, *names = name.split(".")
    if word not in FIGURE_WORDS:
        raise FigureNameError(
            f"Figure '{name}' is not known; use one of {', '.join(FIGURE_WORDS)} (see FIGURE_WORDS)."
        )
    return word, tuple(names)


class FigureCache:
    """The solves of one model, made on first use and shared by every figure asked of it.

    Parameters
    ----------
    model : Model
    estimate_error : bool
        Also solve at half resolution, for ``relative_error`` (costs one more solve each).
    """

    def __init__(self, model: Model, estimate_error: bool = False) -> None:
        self.model = model
        self.estimate_error = estimate_error

    @cached_property
    def solution(self):
        from solver.bem.solve import solve

        return solve(self.model, estimate_error=self.estimate_error)

    @cached_property
    def vacuum_solution(self):
        from solver.bem.solve import solve
        from solver.figures.transmission_line import vacuum_model

        if not self.model.dielectrics and self.model.background_eps_r == 1.0:
            return self.solution
        return solve(vacuum_model(self.model), estimate_error=False)

    @cached_property
    def line_figures(self):
        from solver.figures.transmission_line import figures_from_matrices

        return figures_from_matrices(
            self.solution.capacitance_maxwell_F_per_m,
            self.vacuum_solution.capacitance_maxwell_F_per_m,
            self.model.signal_names,
            self.solution.estimated_relative_error,
        )

    @cached_property
    def hot_spots(self):
        from solver.hot_spots.analysis import analyse_hot_spots

        return analyse_hot_spots(self.model)

    def _index(self, name: str, figure: str) -> int:
        signals = self.model.signal_names
        if name not in signals:
            raise FigureNameError(
                f"Figure '{figure}': '{name}' is not a fixed-potential conductor; the matrix rows are "
                f"{', '.join(signals) or 'none'}."
            )
        return signals.index(name)

    def _matrix_entry(self, matrix: np.ndarray, names: tuple[str, ...], figure: str) -> float:
        if len(names) == 1:
            names = names * 2
        if len(names) != 2:
            raise FigureNameError(f"Figure '{figure}' needs two conductor names, e.g. C_F_per_m.trace.trace.")
        return float(matrix[self._index(names[0], figure), self._index(names[1], figure)])

    def figure(self, name: str) -> float:
        """The value of the figure called ``name`` (SI units; NaN where it does not apply)."""
        word, names = split_figure(name)
        if word == "C_F_per_m":
            return self._matrix_entry(self.solution.capacitance_maxwell_F_per_m, names, name)
        if word == "C_mutual_F_per_m":
            return self._matrix_entry(self.solution.capacitance_mutual_F_per_m, names, name)
        if word == "C_vacuum_F_per_m":
            return self._matrix_entry(self.vacuum_solution.capacitance_maxwell_F_per_m, names, name)
        if word in _LINE_ATTRIBUTES:
            value = getattr(self.line_figures, _LINE_ATTRIBUTES[word])
            return math.nan if value is None else float(value)
        if word == "peak_field_V_per_m":
            return self._peak(names, name)
        if word == "margin":
            return self._margin(names, name)
        if word == "equivalent_radius_m":
            from solver.figures.equilibrium import equivalent_radius_m

            return float(equivalent_radius_m(self.model, names or None))
        if word == "relative_error":
            error = self.solution.estimated_relative_error
            return math.nan if error is None else float(error)
        raise FigureNameError(f"Figure '{name}' has no rule.")  # pragma: no cover - FIGURE_WORDS guards

    def _one_conductor(self, names: tuple[str, ...], figure: str) -> str:
        if len(names) != 1 or names[0] not in self.model.conductor_names:
            raise FigureNameError(
                f"Figure '{figure}' needs one conductor name, one of {', '.join(self.model.conductor_names)}."
            )
        return names[0]

    def _peak(self, names: tuple[str, ...], figure: str) -> float:
        name = self._one_conductor(names, figure)
        for peak in self.solution.peak_surface_fields:
            if peak.conductor == name:
                return float(peak.field_V_per_m)
        return math.nan

    def _margin(self, names: tuple[str, ...], figure: str) -> float:
        from solver.hot_spots.margins import assess_margins

        name = self._one_conductor(names, figure)
        report = assess_margins(self.model, self.hot_spots.hot_spots)
        for m in report.margins:
            if m.conductor == name:
                return math.nan if m.margin is None else float(m.margin)  # the margin that sets the status
        return math.nan


def figure_function(names: tuple[str, ...], estimate_error: bool = False) -> Callable[[Model], dict[str, float]]:
    """A function ``model -> {figure name: value}`` computing all ``names`` from shared solves."""
    for name in names:
        split_figure(name)

    def compute(model: Model) -> dict[str, float]:
        cache = FigureCache(model, estimate_error or "relative_error" in names)
        return {name: cache.figure(name) for name in names}

    return compute
