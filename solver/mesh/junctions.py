"""Conductor panels split where a dielectric boundary meets a conductor surface (a junction).

A conductor panel that straddles the boundary between two regions would carry one free-charge
factor (the permittivity next to it) for two media, and the field near the junction changes
quickly. :func:`split_at_junctions` cuts every such panel at the crossing point into panels
graded geometrically toward it, so each new panel lies in one medium. Panels whose end point
already sits on the boundary (mesh vertices at corners) are left alone.
"""

from __future__ import annotations

from dataclasses import replace

import numpy as np
import shapely

from solver.mesh.panels import PanelMesh

#: First panel at a junction, as a fraction of the panel being split.
JUNCTION_FRACTION = 1e-3
#: Size ratio of neighbouring panels in the graded run away from a junction.
JUNCTION_RATIO = 1.3


def _graded_fractions(t: float) -> np.ndarray:
    """Break points in (0, 1) of a unit panel cut at ``t`` and graded toward it from both sides."""
    out = [t]
    for side, room in ((-1.0, t), (1.0, 1.0 - t)):
        h, s = JUNCTION_FRACTION, 0.0
        while s + h < room * (1.0 - 1e-9):
            s += h
            out.append(t + side * s)
            h *= JUNCTION_RATIO
            if s + h > room - 0.5 * h:
                break
    return np.unique(np.clip(out, 0.0, 1.0))[1:-1] if len(out) > 1 else np.array([t])


def split_at_junctions(mesh: PanelMesh, region_geoms: list) -> PanelMesh:
    """A copy of ``mesh`` with the panels that cross a region boundary split and graded.

    ``region_geoms`` are the dielectric regions' shapely geometries (metres).
    """
    if not region_geoms or mesh.n_panels == 0:
        return mesh
    boundaries = shapely.union_all([g.boundary for g in region_geoms])
    segments = shapely.linestrings(np.stack([mesh.starts, mesh.ends], axis=1))
    hits = shapely.intersection(segments, boundaries)
    crossing = np.flatnonzero(shapely.get_type_id(hits) == 0)  # a single point
    if crossing.size == 0:
        return mesh
    pts = shapely.get_coordinates(hits[crossing])
    d = mesh.ends[crossing] - mesh.starts[crossing]
    t = np.einsum("ij,ij->i", pts - mesh.starts[crossing], d) / np.einsum("ij,ij->i", d, d)
    inner = (t > 1e-6) & (t < 1.0 - 1e-6)
    crossing, t = crossing[inner], t[inner]
    if crossing.size == 0:
        return mesh

    pieces = np.ones(mesh.n_panels, dtype=int)
    fractions = [np.concatenate([[0.0], _graded_fractions(float(ti)), [1.0]]) for ti in t]
    pieces[crossing] = [len(f) - 1 for f in fractions]
    repeat = np.repeat(np.arange(mesh.n_panels), pieces)
    first = np.cumsum(pieces) - pieces  # index of each old panel's first new panel
    starts, ends = mesh.starts[repeat].copy(), mesh.ends[repeat].copy()
    arc = mesh.arc_length_m[repeat].copy()
    for i, f in zip(crossing, fractions):
        p = mesh.starts[i][None, :] + f[:, None] * (mesh.ends[i] - mesh.starts[i])[None, :]
        rows = slice(first[i], first[i] + len(f) - 1)
        starts[rows], ends[rows] = p[:-1], p[1:]
        arc[rows] = mesh.arc_length_m[i] + (0.5 * (f[:-1] + f[1:]) - 0.5) * mesh.lengths[i]
    return replace(
        mesh,
        starts=starts,
        ends=ends,
        conductor_index=mesh.conductor_index[repeat],
        ring_index=mesh.ring_index[repeat],
        is_strip=mesh.is_strip[repeat],
        arc_length_m=arc,
    )
