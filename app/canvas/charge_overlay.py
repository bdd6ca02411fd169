"""Surface charge density drawn on the conductor outlines, in one of two forms.

* **Colour strips** (:func:`charge_strips`) when no shading is shown: each panel in the colour
  of its σ, read off the one colour key.
* **Sticks** (:func:`charge_sticks`) when a shading holds the colour key: a stick on each panel
  along the outward normal, its length proportional to σ (out of the surface for positive
  charge, into it for negative), one dark colour that reads on every map colour. A note in
  the corner of the drawing gives the scale, so no second colour key is needed.

Corner spikes would flatten the rest: lengths and colours are clipped at the 98th percentile
of |σ|, and clipped sticks carry a dot at their end.
"""

from __future__ import annotations

import numpy as np
import pyqtgraph as pg

from app import colours
from app.canvas.colour_key import colour_map
from app.units import format_measured, si_scale

CHARGE_MAP = colour_map(np.linspace(0.0, 1.0, len(colours.POTENTIAL_STOPS)), colours.POTENTIAL_STOPS)

#: |σ| at this percentile sets the full colour or the full stick length; larger values are clipped.
CLIP_PERCENTILE = 98

#: Length of the longest stick, in pixels of the view at the time it is drawn.
STICK_PX = 18

#: One stick per this many pixels of outline.
STICK_GAP_PX = 5


def clip_level(sigma_C_per_m2: np.ndarray) -> float:
    """|σ| that takes the full colour or length (the 98th percentile; C/m²), never 0."""
    level = float(np.percentile(np.abs(sigma_C_per_m2), CLIP_PERCENTILE)) if sigma_C_per_m2.size else 0.0
    return level or float(np.max(np.abs(sigma_C_per_m2), initial=0.0)) or 1.0


def charge_strips(mesh, sigma_C_per_m2: np.ndarray, metres_per_unit: float, n_bins: int = 48):
    """(items, limit, prefix): panels drawn in the colour of σ, and the key's range ±limit in
    ``prefix``C/m²."""
    factor, prefix = si_scale(np.max(np.abs(sigma_C_per_m2)) or 1.0)
    limit = clip_level(sigma_C_per_m2) / factor
    t = np.clip(0.5 + 0.5 * sigma_C_per_m2 / factor / limit, 0, 1)
    bins = np.minimum((t * n_bins).astype(int), n_bins - 1)
    items = []
    for b in np.unique(bins):
        sel = bins == b
        x = np.column_stack([mesh.starts[sel, 0], mesh.ends[sel, 0]]).ravel() / metres_per_unit
        y = np.column_stack([mesh.starts[sel, 1], mesh.ends[sel, 1]]).ravel() / metres_per_unit
        color = CHARGE_MAP.map((b + 0.5) / n_bins, mode="qcolor")
        items.append(pg.PlotCurveItem(x, y, connect="pairs", pen=pg.mkPen(color, width=5)))
    return items, limit, prefix


def _groups(mesh, units_per_px: float, metres_per_unit: float):
    """(centres, normals, lengths-weighted group index): panels gathered, conductor by
    conductor along the outline, into pieces :data:`STICK_GAP_PX` pixels long, so that sticks
    stand apart at any mesh density."""
    lengths = mesh.lengths / metres_per_unit
    conductor = np.asarray(getattr(mesh, "conductor_index", np.zeros(len(lengths), dtype=int)))
    along = np.cumsum(lengths) - 0.5 * lengths
    piece = np.floor(along / (STICK_GAP_PX * units_per_px)).astype(np.int64)
    _, group = np.unique(np.column_stack([conductor, piece]), axis=0, return_inverse=True)
    group = np.asarray(group).ravel()
    weight = np.bincount(group, lengths)
    centre = np.column_stack([np.bincount(group, lengths * mesh.midpoints[:, k] / metres_per_unit) / weight
                              for k in (0, 1)])
    normal = np.column_stack([np.bincount(group, lengths * mesh.normals[:, k]) for k in (0, 1)])
    normal /= np.maximum(np.linalg.norm(normal, axis=1), 1e-300)[:, None]
    return centre, normal, group, weight, lengths


def charge_sticks(mesh, sigma_C_per_m2: np.ndarray, metres_per_unit: float, units_per_px: float):
    """(items, note): sticks along the outward normal, length ∝ σ (the longest :data:`STICK_PX`
    pixels in the view of ``units_per_px`` model units per pixel), one per
    :data:`STICK_GAP_PX` pixels of outline (σ averaged over the panels it stands for), and the
    note that gives the scale."""
    centre, normal, group, weight, lengths = _groups(mesh, units_per_px, metres_per_unit)
    sigma = np.bincount(group, lengths * sigma_C_per_m2) / weight
    level = clip_level(sigma)
    fraction = sigma / level
    clipped = np.abs(fraction) > 1.0
    fraction = np.clip(fraction, -1.0, 1.0)
    tip = centre + (STICK_PX * units_per_px * fraction)[:, None] * normal
    x = np.column_stack([centre[:, 0], tip[:, 0]]).ravel()
    y = np.column_stack([centre[:, 1], tip[:, 1]]).ravel()
    items = [pg.PlotCurveItem(x, y, connect="pairs", pen=pg.mkPen(colours.CHARGE_STICK, width=1.3))]
    if clipped.any():
        items.append(pg.ScatterPlotItem(tip[clipped, 0], tip[clipped, 1], symbol="o", size=5,
                                        pen=pg.mkPen(colours.CHARGE_STICK), brush=pg.mkBrush(colours.CHARGE_STICK)))
    note = (f"Surface charge σ: sticks out for +, in for −;\nlongest {format_measured(level, 'C/m²', digits=2)}"
            + (" (longer ones cut: dot)" if clipped.any() else ""))
    return items, note
