"""Peak surface fields from a high-order solution, between its nodes, without re-solving.

Every high-order solution's operating-point peaks
(:attr:`~solver.bem.high_order.solution.HighOrderSolution.peak_surface_fields`) and the hot
spots of a large model (:mod:`solver.hot_spots.large_model_peaks`) read the same values here,
so a peak shows one value everywhere.

A large model (:mod:`solver.bem.high_order.large_models`, e.g. the 100-conductor bus) is
solved once on coarse high-order panels; its low-order meshes would not fit in memory, so
the peaks cannot be refined level by level as :func:`solver.analyse_hot_spots` does for
other models. Instead the surface field |E| = |sigma| / eps of each conductor is read from
that one solution: on every panel the nodal charge density is the Gauss-Legendre
interpolant of degree ``order - 1`` (the polynomial the Nystrom solve stands for), sampled
at :data:`SAMPLES_PER_PANEL` points from end to end, so a peak between two nodes is found.

Estimated error of a peak: the larger of

* the solution's own estimate (the relative change of the capacitance matrix against the
  check solve with fewer nodes per panel), and
* the Legendre tail on the peak's panel: the last two Legendre coefficients of the density
  relative to the peak (the size of the next terms of a series that is resolved; common
  practice in spectral methods, and the indicator the adaptive solver refines by).

Sharp convex corners and strip ends (field-region opening beta > pi) make the 2-D peak
unbounded (charge density like r^(pi/beta - 1), J. D. Jackson, Classical Electrodynamics,
3rd ed., 1999, sec. 2.11): a conductor whose panels next to such a corner carry more than
:data:`NEGLIGIBLE_CORNER_FRACTION` of the model's largest field is reported as singular,
with no error estimate. Strip panels are read at their nodes only (each side of a strip
carries its own share of charge, which the nodal field already holds).
"""

from __future__ import annotations

import math
from typing import Protocol

import numpy as np

from solver.mesh.curved_panels import CurvedPanels, gauss_legendre


class NodalSolution(Protocol):
    """What the peaks read of a high-order solution (:class:`~solver.bem.high_order.solution.HighOrderSolution`;
    named by its parts so that the solution can ask this module for its own peaks)."""

    @property
    def panels(self) -> CurvedPanels | None: ...
    @property
    def length_scale_m(self) -> float: ...
    @property
    def total_strengths(self) -> np.ndarray: ...
    @property
    def surface_field_V_per_m(self) -> np.ndarray: ...
    @property
    def estimated_relative_error(self) -> float | None: ...

#: Points per panel at which the interpolated surface field is sampled (ends included).
SAMPLES_PER_PANEL = 65

#: A convex corner whose neighbouring field is below this fraction of the model's largest
#: surface field carries no charge worth the name (the outside of an earthed screen).
NEGLIGIBLE_CORNER_FRACTION = 1e-3


def _convex_corner_panels(solution: NodalSolution) -> tuple[np.ndarray, np.ndarray]:
    """(P,) bool: the panel touches a convex corner or strip end; (P,) its opening angle (rad, 0 if none)."""
    panels = solution.panels
    assert panels is not None
    beta_start = np.array([p.opening_start_rad or 0.0 for p in panels.pieces])[panels.piece_index]
    beta_end = np.array([p.opening_end_rad or 0.0 for p in panels.pieces])[panels.piece_index]
    at_start = (panels.s0 == 0.0) & (beta_start > math.pi + 1e-6)
    at_end = (panels.s1 == 1.0) & (beta_end > math.pi + 1e-6)
    beta = np.maximum(np.where(at_start, beta_start, 0.0), np.where(at_end, beta_end, 0.0))
    return at_start | at_end, beta


def interpolated_surface_field(solution: NodalSolution) -> tuple[np.ndarray, np.ndarray, np.ndarray]:
    """Surface field |E| sampled along every panel of a high-order solution.

    Returns
    -------
    field_V_per_m : (P, SAMPLES_PER_PANEL) |E| from the interpolated density, V/m (the
        nodal values on strip panels, padded by repeating the last).
    points_m : (P, SAMPLES_PER_PANEL, 2) where, metres.
    tail : (P,) relative size of the last two Legendre coefficients of the signed field on
        each panel, against the panel's largest |E| (0 on an uncharged panel).
    """
    panels = solution.panels
    assert panels is not None
    p = panels.order
    t_nodes, w = gauss_legendre(p)
    signed = (2.0 * math.pi / solution.length_scale_m) * np.asarray(solution.total_strengths).reshape(panels.n_panels, p)
    # Legendre coefficients of the interpolant through the nodal values (Gauss quadrature is exact for it).
    legendre = np.polynomial.legendre.legvander(t_nodes, p - 1)
    coeffs = (signed * w[None, :]) @ legendre * ((2 * np.arange(p) + 1) / 2.0)[None, :]
    t = np.linspace(-1.0, 1.0, SAMPLES_PER_PANEL)
    field = np.abs(coeffs @ np.polynomial.legendre.legvander(t, p - 1).T)
    points = panels.points_at(t)
    strip = panels.is_strip
    if strip.any():
        nodal = np.asarray(solution.surface_field_V_per_m).reshape(panels.n_panels, p)[strip]
        field[strip] = np.concatenate([nodal, np.repeat(nodal[:, -1:], SAMPLES_PER_PANEL - p, axis=1)], axis=1)
        points[strip] = np.concatenate([panels.nodes[strip],
                                        np.repeat(panels.nodes[strip][:, -1:], SAMPLES_PER_PANEL - p, axis=1)], axis=1)
    largest = field.max(axis=1)
    tail = (np.abs(coeffs[:, -1]) + np.abs(coeffs[:, -2])) / np.where(largest > 0, largest, 1.0)
    return field, points, np.where(largest > 0, tail, 0.0)


def conductor_peak(
    solution: NodalSolution, k: int, sampled: tuple[np.ndarray, np.ndarray, np.ndarray] | None = None
) -> tuple[float, tuple[float, float], float, float | None, float | None]:
    """Peak surface field of conductor ``k`` from the interpolated density.

    Returns
    -------
    (field_V_per_m, (x_m, y_m), estimated_relative_error, corner_opening_rad,
    radius_of_curvature_m): the opening is None unless the conductor has a charged convex
    corner (then the peak is singular and the error estimate means nothing); the radius is
    that of the arc the peak lies on when it bulges into the field, else None.
    """
    panels = solution.panels
    assert panels is not None
    field, points, tail = sampled if sampled is not None else interpolated_surface_field(solution)
    on_k = np.flatnonzero(panels.conductor_index == k)
    local = field[on_k]
    i, j = np.unravel_index(int(np.argmax(local)), local.shape)
    peak = float(local[i, j])
    where = points[on_k[i], j]
    estimate = max(float(solution.estimated_relative_error or 0.0), float(tail[on_k[i]]))
    corner, beta = _convex_corner_panels(solution)
    charged = corner[on_k] & (local.max(axis=1) > NEGLIGIBLE_CORNER_FRACTION * float(field.max()))
    opening = float(beta[on_k][charged].max()) if charged.any() else None
    panel = on_k[i]
    convex_arc = bool(panels.is_arc[panel]) and float(panels.half_sweep[panel]) > 0
    radius = float(panels.radii[panel]) if convex_arc else None
    return peak, (float(where[0]), float(where[1])), estimate, opening, radius


__all__ = ["interpolated_surface_field", "conductor_peak", "SAMPLES_PER_PANEL"]
