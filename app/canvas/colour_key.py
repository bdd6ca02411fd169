"""The colour key beside the drawing: always in the same place and of the same width, so the
drawing does not change size when the shading changes; 5 to 7 round ticks; dimmed with the map
when the results are out of date.
"""

from __future__ import annotations

import math

import numpy as np
import pyqtgraph as pg

from app import colours

#: Width of the key's colour strip and of its tick column, px.
STRIP_WIDTH = 14
AXIS_WIDTH = 62

#: Fewest and most ticks on a key.
FEWEST_TICKS, MOST_TICKS = 5, 7


def round_ticks(lo: float, hi: float) -> list[float]:
    """Between 5 and 7 round values (1, 2, 2.5 or 5 times a power of ten apart) within [lo, hi].

    Falls back to evenly spaced values when no round step gives 5-7 ticks (a very narrow
    range shows its ends and three values between).
    """
    if not (math.isfinite(lo) and math.isfinite(hi)) or hi <= lo:
        return [lo]
    span = hi - lo
    tol = 1e-9 * span + 4.0 * math.ulp(max(abs(lo), abs(hi)))  # round-off, also at a large offset
    for exponent in range(int(math.floor(math.log10(span))) + 1, int(math.floor(math.log10(span))) - 3, -1):
        for m in (5.0, 2.5, 2.0, 1.0):
            step = m * 10.0 ** exponent
            first = math.ceil(lo / step - 1e-9) * step
            ticks = [first + k * step for k in range(int((hi - first) / step + 1e-9) + 2)]
            ticks = [t for t in ticks if lo - tol <= t <= hi + tol]
            if FEWEST_TICKS <= len(ticks) <= MOST_TICKS:
                return [0.0 if abs(t) < 1e-9 * step else t for t in ticks]
    return list(np.linspace(lo, hi, FEWEST_TICKS))


def tick_text(value: float) -> str:
    """A tick label with a true minus sign and no trailing zeros."""
    text = f"{value:.4g}"
    return text.replace("-", "−")


def colour_map(positions, hex_colours) -> pg.ColorMap:
    return pg.ColorMap(list(positions), [colours.hex_to_rgb(c) for c in hex_colours])


class ColourKey:
    """One colour bar at a fixed cell of the plot's layout (column ``column``, row 2)."""

    def __init__(self, plot_item: pg.PlotItem, column: int) -> None:
        self.plot = plot_item
        self.bar = pg.ColorBarItem(values=(0.0, 1.0), colorMap=colour_map([0, 1], [colours.PAGE, colours.PAGE]),
                                   interactive=False, width=STRIP_WIDTH)
        self.bar.axis.setWidth(AXIS_WIDTH)
        self.bar.axis.setTextPen(pg.mkPen(colours.TEXT))
        self.bar.axis.setPen(pg.mkPen(colours.TEXT_MUTED))
        self.plot.layout.addItem(self.bar, 2, column)
        self.blank()

    def show(self, lo: float, hi: float, cmap: pg.ColorMap, label: str, ticks=None) -> None:
        """Show ``cmap`` from ``lo`` to ``hi`` with ``label``; ``ticks`` as (value, text) pairs, or round ones."""
        if not hi > lo:
            hi = lo + 1.0
        self.bar.setColorMap(cmap)
        self.bar.setLevels(values=(lo, hi))
        if ticks is None:
            ticks = [(t, tick_text(t)) for t in round_ticks(lo, hi)]
        self.bar.axis.setTicks([ticks, []])
        self.bar.axis.setLabel(label, color=colours.TEXT)
        self.bar.setOpacity(1.0)
        self.shown = True

    def blank(self) -> None:
        """Keep the place, show nothing (the drawing keeps its size)."""
        self.bar.setOpacity(0.0)
        self.shown = False

    def set_stale(self, stale: bool) -> None:
        if self.shown:
            self.bar.setOpacity(0.3 if stale else 1.0)
