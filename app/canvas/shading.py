"""The shading of the drawing: how a map of potential or field strength becomes colours.

:func:`shading_of` reads the levels, the colour map and the key's label from the solve's map
and returns a :class:`Shading` whose :meth:`Shading.image` turns that map, or a finer map of
the same solve (:mod:`app.canvas.detail_map`), into an image item on the same levels, so that
both read off the one colour key.
"""

from __future__ import annotations

from collections.abc import Callable
from dataclasses import dataclass

import numpy as np
import pyqtgraph as pg
from PySide6.QtCore import QRectF
from scipy import ndimage

from app import colours
from app.canvas.colour_key import colour_map
from app.units import format_field, si_scale

FIELD_MAP = colour_map(np.linspace(0.0, 1.0, len(colours.FIELD_STOPS)), colours.FIELD_STOPS)

SHADINGS = ("none", "potential", "field strength", "field strength (log)")


@dataclass(frozen=True)
class Shading:
    """Levels ``lo``..``hi`` of ``cmap``, the key's ``label`` and ``ticks`` (None: round
    ones), and ``values``: a map (GridField) -> the array to colour."""

    cmap: pg.ColorMap
    lo: float
    hi: float
    label: str
    ticks: list | None
    values: Callable

    def image(self, grid, metres_per_unit: float) -> pg.ImageItem:
        """``grid`` as an image item in model units, on this shading's levels."""
        x, y = grid.x_m / metres_per_unit, grid.y_m / metres_per_unit
        dx, dy = x[1] - x[0], y[1] - y[0]
        img = pg.ImageItem(under_metal_filled(self.values(grid), grid))
        img.setRect(QRectF(x[0] - dx / 2, y[0] - dy / 2, dx * len(x), dy * len(y)))
        img.setColorMap(self.cmap)
        img.setLevels((self.lo, self.hi if self.hi > self.lo else self.lo + 1.0))
        return img


def under_metal_filled(values: np.ndarray, grid) -> np.ndarray:
    """``values`` with the rim of cells inside metal (no potential there, within 1.5 cells of
    the field) given their nearest field cell's value. The conductors are drawn over those
    cells; without this, cells whose centres lie inside a conductor but which reach past its
    drawn edge showed as white slivers along straight edges."""
    metal = ~np.isfinite(grid.potential_V)
    if not metal.any() or metal.all():
        return values
    distance, nearest = ndimage.distance_transform_edt(metal, return_indices=True)
    # only the rim next to the field; rows without any field cell lie below a ground plane,
    # where the earth band, not a colour, belongs
    rim = metal & (distance <= 1.5) & ~metal.all(axis=1, keepdims=True)
    return np.where(rim, values[tuple(nearest)], values)


def shading_of(kind: str, grid, conductor_potentials_V) -> Shading | None:
    """The shading ``kind`` (one of :data:`SHADINGS` but "none") of the map ``grid``; None when
    the map holds no finite value."""
    if kind == "potential":
        data = grid.potential_V
        if not np.isfinite(data).any():
            return None
        potentials = [float(v) for v in conductor_potentials_V] + [0.0]
        lo_v = min(potentials + [float(np.nanmin(data))])
        hi_v = max(potentials + [float(np.nanmax(data))])
        positions, stops, lo_v, hi_v = colours.potential_stops(lo_v, hi_v)
        factor, prefix = si_scale(max(abs(lo_v), abs(hi_v)))
        return Shading(colour_map(positions, stops), lo_v / factor, hi_v / factor,
                       f"potential ({prefix}V), 0 V neutral", None, lambda g: g.potential_V / factor)
    e = grid.field_V_per_m
    if not np.isfinite(e).any():
        return None
    if kind == "field strength (log)":
        logs = np.log10(np.where(e > 0, e, np.nan))
        hi = float(np.nanmax(logs))
        lo = max(float(np.nanmin(logs)), hi - 3.0)  # three decades; weaker fields share the lightest colour
        marks = [m * 10.0 ** k for k in range(int(np.floor(lo)), int(np.ceil(hi)) + 1) for m in (1, 2, 5)]
        marks = [v for v in marks if lo <= np.log10(v) <= hi]
        if len(marks) > 7:
            marks = [v for v in marks if f"{v:.0e}".startswith("1")]
        ticks = [(float(np.log10(v)), format_field(v)) for v in marks]

        def log_values(g):
            f = g.field_V_per_m
            return np.clip(np.log10(np.where(f > 0, f, np.nan)), lo, None)

        return Shading(FIELD_MAP, lo, hi, "field strength |E| (log scale, three decades)", ticks, log_values)
    top = float(np.percentile(e[np.isfinite(e)], 99.5))  # corners would wash out the rest of the map
    factor, prefix = si_scale(top or 1.0)
    return Shading(FIELD_MAP, 0.0, top / factor, f"|E| ({prefix}V/m); darkest: 99.5th percentile and above", None,
                   lambda g: g.field_V_per_m / factor)
