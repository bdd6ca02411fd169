"""Isolated conductors: equilibrium charge and equivalent radius (logarithmic capacity).

Conductors tied together and taken alone (no other conductor, no ground plane) with net
charge Q and the potential at infinity 0 reach a potential V; their logarithmic capacity is
cap = exp(-2 pi eps V / Q), the radius of the round wire that looks the same from far away.
The charge then spreads as the equilibrium distribution: uniform on a disc, the arcsine law
1 / (pi sqrt(a^2 - x^2)) on a strip of half-width a.
"""

from __future__ import annotations

import math
from collections.abc import Iterable
from dataclasses import dataclass, replace

import numpy as np
import scipy.linalg

from solver.bem.kernels import log_potential_integrals
from solver.bem.solution import Solution
from solver.mesh.panels import MeshSettings, PanelMesh, discretize_boundary
from solver.model.model import Model


@dataclass(frozen=True)
class EquilibriumCharge:
    """Equilibrium charge of isolated conductors tied together.

    Attributes
    ----------
    mesh : PanelMesh of the conductors taken alone.
    density_per_coulomb : (n_panels,) surface charge density per unit net charge, 1/m
        (multiply by Q in C/m to get C/m^2); sums to 1 when weighted by panel lengths.
    equivalent_radius_m : logarithmic capacity, metres.
    """

    mesh: PanelMesh
    density_per_coulomb: np.ndarray
    equivalent_radius_m: float


def _model_and_settings(source: Solution | Model, settings: MeshSettings | None) -> tuple[Model, MeshSettings]:
    """The model, and the mesh settings: as given, else the solution's, else the model's density."""
    if isinstance(source, Solution):
        return source.model, settings or MeshSettings(source.mesh.settings.level)
    return source, settings or MeshSettings.for_density(source.mesh_density)


def equilibrium_charge(
    source: Solution | Model, names: Iterable[str] | None = None, settings: MeshSettings | None = None
) -> EquilibriumCharge:
    """Equilibrium charge and equivalent radius of the named conductors (all by default).

    ``source`` is a solution (its model, meshed at the solution's resolution) or a model
    (meshed at its mesh density); ``settings`` overrides the resolution.
    """
    model, settings = _model_and_settings(source, settings)
    wanted = list(model.conductor_names if names is None else names)
    for name in wanted:
        model.conductor(name)  # raises a KeyError naming the known conductors
    sub = replace(
        model,
        conductors=tuple(c for c in model.conductors if c.name in wanted),
        ground_plane=None,
        dielectrics=(),
    )
    mesh = discretize_boundary(sub, settings)
    pts = np.vstack([mesh.starts, mesh.ends])
    ell = float(np.hypot(*(pts.max(axis=0) - pts.min(axis=0))))
    starts, ends = mesh.starts / ell, mesh.ends / ell
    n = mesh.n_panels
    a = np.zeros((n + 1, n + 1))
    a[:n, :n] = -log_potential_integrals(0.5 * (starts + ends), starts, ends)
    a[:n, n] = -1.0
    a[n, :n] = mesh.lengths / ell
    b = np.zeros(n + 1)
    b[n] = 1.0
    x = scipy.linalg.solve(a, b, check_finite=False)
    # In scaled units the net charge is 1 and x[n] the potential less ln(ell); undo the scale.
    return EquilibriumCharge(mesh, x[:n] / ell, float(ell * math.exp(-x[n])))


def equivalent_radius_m(
    source: Solution | Model, names: Iterable[str] | None = None, settings: MeshSettings | None = None
) -> float:
    """Equivalent radius (logarithmic capacity) of conductors tied together, in isolation, metres.

    The named conductors (all by default) are taken alone — no other conductor, no ground
    plane — connected together and given a net charge Q with the potential at infinity 0.
    With the resulting potential V, cap = exp(-2 pi eps V / Q): a disc of radius r gives r,
    a segment of length l gives l / 4; a bundle behaves like one round wire of this radius.
    ``source`` is a solution (meshed at its resolution) or a model (at its mesh density).
    A lone circle or ring needs no solve: its capacity is known in closed form
    (:meth:`solver.model.shapes.Shape.exact_capacity`).
    """
    model = source.model if isinstance(source, Solution) else source
    wanted = list(model.conductor_names if names is None else names)
    if len(wanted) == 1:
        shapes = model.conductor(wanted[0]).shapes
        exact = shapes[0].exact_capacity() if len(shapes) == 1 else None
        if exact is not None:
            return exact * model.metres_per_unit
    return equilibrium_charge(source, names, settings).equivalent_radius_m
