"""Local radius of curvature of a conductor outline at a panel.

On the exact arcs of the shapes (circles, rings, rounded corners) the mesh knows each panel's
circle (:attr:`PanelMesh.arc_radius_m`, carried from the shapes), and that radius is the
answer. Elsewhere (outlines that are only polygons, e.g. corners rounded by shapely) the
curvature comes from the panels: the tangent direction of the panels along a boundary ring, as a function of arc length,
turns at the rate kappa = 1 / R. A straight-line fit of the unwrapped tangent angle against
arc length over a window around the panel gives kappa; the window is 0.2 R wide (found by
iterating from a few panel lengths), so a polygonised arc with many short chords gives its
radius, and a straight run gives an infinite radius.
"""

from __future__ import annotations

import math

import numpy as np

from solver.mesh.panels import PanelMesh


def local_radius_of_curvature_m(mesh: PanelMesh, panel_index: int) -> float:
    """Radius of curvature (m) of the outline at ``panel_index``; ``inf`` on a straight run.

    Convex and concave (seen from the field) alike; see :func:`signed_radius_of_curvature_m`.
    """
    return abs(signed_radius_of_curvature_m(mesh, panel_index))


def signed_radius_of_curvature_m(mesh: PanelMesh, panel_index: int) -> float:
    """Radius of curvature (m) at ``panel_index``: > 0 where the conductor bulges into the
    field (the outside of a wire), < 0 where it is hollow toward the field (the inside of a
    tube); ``inf`` on a straight run.

    Strips and panels next to sharp corners give ``inf`` (no curvature to speak of there).

    Parameters
    ----------
    mesh : PanelMesh
    panel_index : int
        A panel of a closed boundary ring.

    Returns
    -------
    float
    """
    if mesh.is_strip[panel_index]:
        return math.inf
    if len(mesh.arc_radius_m) and math.isfinite(mesh.arc_radius_m[panel_index]):
        return float(mesh.arc_radius_m[panel_index])
    ring = np.flatnonzero(mesh.ring_index == mesh.ring_index[panel_index])
    position = int(np.flatnonzero(ring == panel_index)[0])
    t = mesh.tangents[ring]
    angle = np.unwrap(np.arctan2(t[:, 1], t[:, 0]))
    lengths = mesh.lengths[ring]
    s = np.cumsum(lengths) - 0.5 * lengths
    perimeter = float(lengths.sum())
    # Arc-length offsets from the panel, wrapped around the closed ring.
    ds = (s - s[position] + 0.5 * perimeter) % perimeter - 0.5 * perimeter
    turn_total = angle[-1] - angle[0] + (np.arctan2(t[0, 1], t[0, 0]) - np.arctan2(t[-1, 1], t[-1, 0]))
    turns_per_lap = 2 * math.pi * round(turn_total / (2 * math.pi)) if abs(turn_total) > 1 else 0.0
    # Put the angles on the same branch as the panel's own, following the wrap of ds.
    wrapped = np.where(s - s[position] > 0.5 * perimeter, -1, np.where(s - s[position] < -0.5 * perimeter, 1, 0))
    theta = angle + wrapped * turns_per_lap
    theta = theta - theta[position]
    window = 4.0 * lengths[position]
    radius = math.inf
    for _ in range(6):
        near = np.abs(ds) <= min(window, 0.45 * perimeter)
        if near.sum() < 3:
            window *= 2.0
            continue
        slope = np.polyfit(ds[near], theta[near], 1)[0]
        if slope == 0 or not math.isfinite(slope):
            return math.inf
        radius = 1.0 / slope
        new_window = 0.2 * abs(radius)
        if abs(new_window - window) <= 0.05 * window:
            break
        window = new_window
    return float(radius)
