"""Truncated layers: wide dielectric rectangles standing in for unbounded substrates.

A board substrate or a laminate is unbounded in the cross-section; the model draws it as a
wide rectangle. A region counts as a *truncated layer* when it is one sharp-cornered
rectangle at least :data:`LAYER_WIDTH_FACTOR` times wider than the span of the signal and
floating conductors. Its truncation error is estimated by solving again with every such
layer (and every reference conductor of the same width or wider, e.g. a plane bonded to it)
widened by a factor about its centre, and taking the relative change of the capacitance
matrix; :func:`widen_until_converged` widens until that change is below a target.

The field of a line over a layer decays with distance from the conductors, so the error
falls quickly with the width (measured: below 1e-4 in eps_eff for a microstrip once the
substrate is 20 thicknesses wide).
"""

from __future__ import annotations

from dataclasses import replace

import numpy as np

from solver.mesh.panels import MeshSettings
from solver.model.model import Model

#: Width, relative to the span of the signal and floating conductors, from which a
#: rectangular dielectric region is treated as a truncated layer.
LAYER_WIDTH_FACTOR = 4.0


def _signal_span(model: Model) -> float:
    from solver.model.geometry import conductor_geometries

    geoms = conductor_geometries(model, MeshSettings(0.5).arc_step_rad)
    xs = [g.bounds for g, c in zip(geoms, model.conductors) if c.role != "reference"]
    if not xs:
        return 0.0
    b = np.array(xs)
    return float(b[:, 2].max() - b[:, 0].min()) / model.metres_per_unit


def truncated_layers(model: Model) -> tuple[str, ...]:
    """Names of the dielectric regions treated as truncated layers (see the module docstring)."""
    span = _signal_span(model)
    out = []
    for d in model.dielectrics:
        size = d.shapes[0].rectangle_size() if len(d.shapes) == 1 else None
        if size is not None and size[2] == 0 and size[0] >= LAYER_WIDTH_FACTOR * max(span, size[1]):
            out.append(d.name)
    return tuple(out)


def widened(model: Model, factor: float) -> Model:
    """A copy with every truncated layer, and reference rectangles at least as wide, ``factor`` times wider."""
    names = set(truncated_layers(model))
    if not names:
        return model
    narrowest = min(d.shapes[0].bounds()[2] - d.shapes[0].bounds()[0] for d in model.dielectrics if d.name in names)

    def grow(shape):
        size = shape.rectangle_size()
        if size is not None and size[0] >= narrowest * (1 - 1e-9):
            return shape.widened(factor)
        return shape

    return replace(
        model,
        dielectrics=tuple(replace(d, shapes=tuple(map(grow, d.shapes))) if d.name in names else d for d in model.dielectrics),
        conductors=tuple(
            replace(c, shapes=tuple(map(grow, c.shapes))) if c.role == "reference" else c for c in model.conductors
        ),
    )


def _capacitance(model: Model, settings: MeshSettings | None) -> np.ndarray:
    from solver.bem.solve import solve

    return solve(model, estimate_error=False, settings=settings).capacitance_maxwell_F_per_m


def truncation_error(
    model: Model,
    factor: float = 2.0,
    settings: MeshSettings | None = None,
    capacitance_F_per_m: np.ndarray | None = None,
) -> float | None:
    """Relative change of the capacitance matrix when the truncated layers are ``factor`` times wider.

    None when the model has no truncated layer. ``capacitance_F_per_m`` is the model's own
    Maxwell matrix at ``settings`` when already solved (then only the widened model is solved).
    """
    if not truncated_layers(model):
        return None
    a = _capacitance(model, settings) if capacitance_F_per_m is None else np.asarray(capacitance_F_per_m)
    b = _capacitance(widened(model, factor), settings)
    return float(np.abs(a - b).max() / np.abs(b).max())


def widen_until_converged(
    model: Model, target: float = 1e-4, factor: float = 2.0, max_steps: int = 4, settings: MeshSettings | None = None
) -> tuple[Model, float | None]:
    """Widen the truncated layers until doubling them changes C by less than ``target``.

    Returns the (possibly widened) model and the last relative change (None without layers).
    """
    if not truncated_layers(model):
        return model, None
    current = _capacitance(model, settings)
    change = None
    for _ in range(max_steps):
        wider = widened(model, factor)
        c_wider = _capacitance(wider, settings)
        change = float(np.abs(current - c_wider).max() / np.abs(c_wider).max())
        if change < target:
            return model, change
        model, current = wider, c_wider
    return model, change
