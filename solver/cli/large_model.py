"""Command-line figures of a large model, from its one high-order solution.

A model of many conductors (:func:`solver.bem.high_order.large_models.is_large`, e.g. the
100-conductor bus) is solved on coarse high-order panels because its low-order meshes would
not fit in memory. The report's other figures must then not fall back to low-order meshes
either:

* equivalent radii and bundles: the equilibrium charge (Ransford, "Potential Theory in the
  Complex Plane", 1995, sec. 5.2) of the conductor (or group) alone on the solution's own
  panels of that conductor, with its error estimated by the same solve with
  :data:`~solver.bem.high_order.large_models.CHECK_ORDER` nodes per panel;
* peak fields: :mod:`solver.hot_spots.large_model_peaks`;
* figures that would need one large solve each (the corner-radius sweep) are not computed;
  :func:`not_computed` says which, why and what to do instead.
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

from solver.bem.high_order.adaptive import logarithmic_capacity
from solver.bem.high_order.large_models import CHECK_ORDER
from solver.bem.high_order.solution import HighOrderSolution
from solver.cli.options import ReportOptions
from solver.figures.bundles import BundleComparison, bundle_comparison_of
from solver.hot_spots.analysis import is_large_solution
from solver.mesh.curved_panels import CurvedPanels


@dataclass(frozen=True)
class NotComputed:
    """A figure the report leaves out, in plain words.

    Attributes
    ----------
    figure : what is missing; reason : why; way_out : what the user can do instead.
    """

    figure: str
    reason: str
    way_out: str

    def sentence(self) -> str:
        """One line for the text summary."""
        return f"Not computed: {self.figure}. {self.reason} {self.way_out}"


def _panels_of(panels: CurvedPanels, conductors: list[int], order: int) -> CurvedPanels:
    """The panels of the given conductors only (with only their pieces), ``order`` nodes each."""
    keep = np.flatnonzero([p.conductor_index in conductors for p in panels.pieces])
    new_index = np.full(len(panels.pieces), -1)
    new_index[keep] = np.arange(len(keep))
    on = np.isin(panels.piece_index, keep)
    return CurvedPanels(tuple(panels.pieces[i] for i in keep), new_index[panels.piece_index[on]],
                        panels.s0[on], panels.s1[on], order)


def equivalent_radius_with_error(solution: HighOrderSolution, names: list[str]) -> tuple[float, float]:
    """Logarithmic capacity (metres) of the named conductors tied together and taken alone, on
    the solution's panels of those conductors, and its estimated relative error (change against
    :data:`CHECK_ORDER` nodes per panel). A lone circle or ring is exact (closed form)."""
    model = solution.model
    if len(names) == 1:
        shapes = model.conductor(names[0]).shapes
        exact = shapes[0].exact_capacity() if len(shapes) == 1 else None
        if exact is not None:
            return exact * model.metres_per_unit, 0.0
    panels = solution.panels
    assert panels is not None
    index = [model.conductor_names.index(n) for n in names]
    cap, _ = logarithmic_capacity(_panels_of(panels, index, panels.order))
    check, _ = logarithmic_capacity(_panels_of(panels, index, CHECK_ORDER))
    return cap, abs(cap - check) / cap


def _shape_key(panels: CurvedPanels, k: int) -> bytes:
    """Conductor k's nodes relative to its first node: equal for translated copies meshed alike
    (whose logarithmic capacity is the same; it does not change under translation)."""
    nodes = panels.nodes[panels.conductor_index == k].reshape(-1, 2)
    relative = nodes - nodes[0]
    scale = float(np.abs(relative).max()) or 1.0
    return np.round(relative / scale, 12).tobytes() + np.float64(scale).tobytes()


def equivalent_radii(solution: HighOrderSolution) -> tuple[tuple[float, ...], tuple[float, ...]]:
    """Each conductor's equivalent radius alone (metres) and its estimated relative error.

    Conductors whose panels are translated copies of one already solved (the bars of a bus)
    take its figures instead of being solved again.
    """
    panels = solution.panels
    assert panels is not None
    known: dict[bytes, tuple[float, float]] = {}
    pairs = []
    for k, name in enumerate(solution.conductor_names):
        key = _shape_key(panels, k)
        if key not in known:
            known[key] = equivalent_radius_with_error(solution, [name])
        pairs.append(known[key])
    return tuple(r for r, _ in pairs), tuple(e for _, e in pairs)


def bundle_comparison(solution: HighOrderSolution, names: tuple[str, ...]) -> BundleComparison:
    """:class:`BundleComparison` of conductors tied together, on the solution's own panels."""
    radius, error = equivalent_radius_with_error(solution, list(names))
    return bundle_comparison_of(solution.model, names, radius, error)


def not_computed(solution: HighOrderSolution, options: ReportOptions) -> tuple[NotComputed, ...]:
    """The figures asked for that a large model's report leaves out."""
    out = []
    if options.radius_sweep is not None:
        n = len(solution.model.conductors)
        seconds = dict(solution.stage_seconds).get("solving")
        took = "" if seconds is None else f" (the solve took {seconds:.0f} s)"
        out.append(NotComputed(
            "peak field against corner radius (--radius-sweep)",
            f"The model has {n} conductors and is solved on coarse high-order panels; each radius would need "
            f"one more solve of the whole model{took}.",
            "Sweep a smaller model that holds the conductor and its nearest neighbours, or give one radius "
            "with --corner-radius-m.",
        ))
    return tuple(out)


def solver_words(solution: HighOrderSolution) -> str:
    """How a large model was solved, for the summary's header."""
    panels = solution.panels
    assert panels is not None
    if solution.tolerance is not None:
        return (f"large model: high-order solver to tolerance {solution.tolerance:.2g} on {panels.n_panels} panels "
                f"x {panels.order} nodes, {solution.n_unknowns} unknowns")
    return (f"large model: high-order solver on {panels.n_panels} coarse panels x {panels.order} nodes, "
            f"{solution.n_unknowns} unknowns")


def error_words(solution: HighOrderSolution) -> str:
    """Where the error estimate of a large model's solution comes from."""
    panels = solution.panels
    assert panels is not None
    err = solution.estimated_relative_error
    value = "not estimated" if err is None else f"{err:.2g}"
    what = "capacitance matrix" if solution.has_capacitance else "conductor charges"
    if solution.tolerance is not None:
        return (f"Estimated relative error of the {what}: {value} (large model, high-order solver, "
                f"{solution.n_unknowns} unknowns; change against a check mesh with every panel split; "
                f"tolerance {solution.tolerance:.2g})")
    return (f"Estimated relative error of the {what}: {value} (large model, high-order solver, "
            f"{solution.n_unknowns} unknowns; change against the same panels with {CHECK_ORDER} nodes "
            f"instead of {panels.order})")


__all__ = ["NotComputed", "is_large_solution", "equivalent_radii", "equivalent_radius_with_error",
           "bundle_comparison", "not_computed", "solver_words", "error_words"]
