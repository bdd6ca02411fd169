"""Weak corners: outline vertices that turn by only a little, yet still make the field singular.

Near a corner whose field region opens by beta > pi the surface charge density goes like
r^(pi / beta - 1) (J. D. Jackson, Classical Electrodynamics, 3rd ed., 1999, sect. 2.11). For a
vertex that turns by a small angle theta, beta = pi + theta and the exponent -theta / (pi +
theta) is small but negative: the 2-D peak there has no finite value and creeps up at every
refinement (by about 2^(theta / (pi + theta)) per halving of the panels). The mesher treats
vertices turning by more than 25 degrees as corners (:data:`solver.mesh.panels.CORNER_TURN_RAD`);
this module finds the convex vertices that turn by less -- drawn polygon vertices, never the
vertices of an arc (a circle, a ring or a fillet, whose chords the mesh knows exactly) -- so
that a peak sitting on one is treated as a corner, not graded with a radius of curvature the
mesh has made.

A vertex counts when it turns by more than :data:`WEAK_CORNER_MIN_TURN_RAD` (1 degree, a
choice of this program: below it the charge density grows by less than 0.4 % per halving of
the panels, beneath the error targets used here).
"""

from __future__ import annotations

import math

import numpy as np

from solver.mesh.panels import CORNER_TURN_RAD, PanelMesh

#: Smallest turn of a vertex that counts as a weak corner, rad (1 degree; a choice of this program).
WEAK_CORNER_MIN_TURN_RAD = math.radians(1.0)


def _next_panels(mesh: PanelMesh) -> np.ndarray:
    """Index of the panel that follows each panel on its closed ring (-1 on open strips)."""
    n = mesh.n_panels
    nxt = np.arange(1, n + 1)
    for r in np.unique(mesh.ring_index):
        idx = np.flatnonzero(mesh.ring_index == r)
        last, first = idx[-1], idx[0]
        closed = np.hypot(*(mesh.ends[last] - mesh.starts[first])) <= 1e-9 * max(float(mesh.lengths[idx].sum()), 1e-300)
        nxt[last] = first if closed and not mesh.is_strip[last] else -1
    return nxt


def _same_arc(mesh: PanelMesh, a: np.ndarray, b: np.ndarray) -> np.ndarray:
    radius = mesh.arc_radius_m if mesh.arc_radius_m.size == mesh.n_panels else np.full(mesh.n_panels, np.inf)
    on_arc_a, on_arc_b = np.isfinite(radius[a]), np.isfinite(radius[b])
    return on_arc_a | on_arc_b


def weak_corner_turns(mesh: PanelMesh) -> tuple[np.ndarray, np.ndarray, np.ndarray]:
    """Every weak corner of ``mesh``: (vertex points (k, 2) m, turns (k,) rad, panel pairs (k, 2)).

    A weak corner is the vertex between two consecutive panels of a closed outline where the
    outline turns toward the material (the field region opens wider than pi) by more than
    :data:`WEAK_CORNER_MIN_TURN_RAD` and at most 25 degrees, and where neither panel is a chord
    of an arc (a turn there is the arc's own discretisation).
    """
    nxt = _next_panels(mesh)
    a = np.flatnonzero(nxt >= 0)
    b = nxt[a]
    ta, tb = mesh.tangents[a], mesh.tangents[b]
    cross = ta[:, 0] * tb[:, 1] - ta[:, 1] * tb[:, 0]
    dot = np.einsum("ij,ij->i", ta, tb)
    turn = np.arctan2(cross, dot)  # > 0: toward the material on the left, a convex vertex
    keep = (turn > WEAK_CORNER_MIN_TURN_RAD) & (turn <= CORNER_TURN_RAD + 1e-12) & ~_same_arc(mesh, a, b)
    keep &= ~(mesh.is_strip[a] | mesh.is_strip[b])
    return mesh.ends[a[keep]], turn[keep], np.column_stack([a[keep], b[keep]])


def weak_corner_at(mesh: PanelMesh, panel_index: int) -> float | None:
    """The turn (rad) of a weak corner at either end of panel ``panel_index``, or None.

    Examples
    --------
    >>> from solver import Model, Conductor, Polygon, GroundPlane
    >>> from solver.mesh.panels import discretize_boundary, MeshSettings
    >>> m = Model(unit="mm", ground_plane=GroundPlane(0.0), conductors=(Conductor("p", (Polygon(
    ...     ((-10, 10), (0, 8), (10, 10), (10, 20), (-10, 20))),), potential_V=1e4),))
    >>> mesh = discretize_boundary(m, MeshSettings(1.0))
    >>> i = int(np.argmin(mesh.midpoints[:, 1]))  # next to the vertex at (0, 8)
    >>> round(math.degrees(weak_corner_at(mesh, i)), 1)
    22.6
    """
    _, turns, pairs = weak_corner_turns(mesh)
    hit = np.flatnonzero((pairs[:, 0] == panel_index) | (pairs[:, 1] == panel_index))
    return float(turns[hit].max()) if hit.size else None


def weak_corner_at_peak(solution, conductor_index: int) -> float | None:
    """The turn (rad) of a weak corner under the largest surface field of a conductor, or None."""
    mesh = solution.mesh
    idx = np.flatnonzero(mesh.conductor_index == conductor_index)
    if idx.size == 0:
        return None
    i = int(idx[np.argmax(solution.surface_field_V_per_m[idx])])
    return weak_corner_at(mesh, i)


def corner_exponent(turn_rad: float) -> float:
    """Exponent pi / beta - 1 of the charge density at a convex vertex turning by ``turn_rad`` (beta = pi + turn)."""
    return math.pi / (math.pi + turn_rad) - 1.0


def weak_corner_note(turn_rad: float) -> str:
    """Why a peak at a weak corner is not graded, in words."""
    beta = math.pi + turn_rad
    return (f"Weak corner (the outline turns by {math.degrees(turn_rad):.3g} degrees, field-region opening "
            f"{math.degrees(beta):.0f} degrees): the charge density goes like r^({corner_exponent(turn_rad):.3f}), "
            "so the 2-D peak has no finite value and creeps up with every refinement, and the radius of curvature "
            "there is made by the mesh. It is treated as a sharp corner: give it a radius to get a peak you can use.")
